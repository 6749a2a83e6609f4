"""The quality and time-domain views of S-parameters (a ``network.inspection.Inspection``)
as text, charts and HTML, for ``losslane inspect`` and for every build.

* text: the IEEE 370 quality with its levels and where passivity fails, the features of
  each impedance profile, the step delays and rise times, the skew, the pulse cursors;
* charts: the impedance profile(s) against the round-trip time (and one-way distance when
  a delay per length is known), the step responses, the pulse response against unit
  intervals from its main cursor;
* HTML: the same numbers as tables for a report page (the charts are embedded by the page);
* the build's hooks: one summary line, the JSON under ``quality`` and ``time_domain``,
  and the charts and section of the build's report page.

matplotlib is imported inside the chart functions.
"""

from __future__ import annotations

from html import escape
from pathlib import Path

import numpy as np

from losslane.report.text import table

#: how a profile's features read (the legend of the text and the page)
FEATURE_NOTE = (
    "a dip is a capacitive discontinuity (pad, via barrel, open stub, connector pins) or a "
    "section of lower impedance; a peak an inductive one (long via, narrowed trace, gap in "
    "the return path) or a section of higher impedance; a width near the rise time means a "
    "lumped discontinuity, a longer one a section"
)
#: the pulse chart starts this many unit intervals before the main cursor
PULSE_UIS_BEFORE = 5.0
ROUND_TRIP_NOTE = (
    "time is the round trip of the reflection: a feature at one-way delay tau shows at 2 tau"
)


# ---------------------------------------------------------------- numbers as text


def _ps(x: float | None, fmt: str = ".1f") -> str:
    return "-" if x is None else format(x * 1e12, fmt)


def _ghz(x: float) -> str:
    return f"{x / 1e9:.6g}"


def rate_text(bps: float) -> str:
    return f"{bps / 1e9:g} Gb/s" if bps >= 1e9 else f"{bps / 1e6:g} Mb/s"


def failure_bands(freqs: np.ndarray, step: float, limit: int = 6) -> list[str]:
    """The frequencies where passivity fails as bands ("18.3..19.1 GHz"): points closer
    than 1.5 sweep steps belong to one band; at most ``limit`` bands, then "..."."""
    fr = np.asarray(freqs, float)
    if fr.size == 0:
        return []
    cut = np.flatnonzero(np.diff(fr) > 1.5 * step) + 1
    bands = []
    for part in np.split(fr, cut):
        a, b = part[0], part[-1]
        bands.append(f"{_ghz(a)} GHz" if a == b else f"{_ghz(a)}..{_ghz(b)} GHz")
    return bands[:limit] + (["..."] if len(bands) > limit else [])


def quality_line(q) -> str:
    """One line: the three IEEE 370 metrics with their levels (``q`` a QualityReport)."""
    worst = f", worst {q.worst_causality_entry}" if q.worst_causality_entry else ""
    return (
        f"IEEE 370 quality: passivity {q.passivity:.2f} ({q.passivity_level}), reciprocity "
        f"{q.reciprocity:.2f} ({q.reciprocity_level}), causality {q.causality:.1f} "
        f"({q.causality_level}{worst})"
    )


def passivity_text(insp) -> str:
    """Where passivity fails, or that it does not."""
    q = insp.quality
    fails = q.passivity_failures_hz
    if fails.size == 0:
        return (
            f"passive at every point: the largest singular value of S is {q.max_singular_value:.6g}"
            f" (at {_ghz(q.max_singular_value_hz)} GHz), within the standard's 1.00001"
        )
    step = (insp.stop_hz - insp.start_hz) / max(insp.points - 1, 1)
    return (
        f"NOT passive at {fails.size} of {insp.points} points: "
        + ", ".join(failure_bands(fails, step))
        + f"; largest singular value {q.max_singular_value:.6g} at "
        f"{_ghz(q.max_singular_value_hz)} GHz"
    )


def quality_text(insp) -> str:
    """The quality block of the terminal text."""
    q = insp.quality
    rows = [
        ["passivity", f"{q.passivity:.2f}", q.passivity_level, "99.9 / 99 / 80", ""],
        ["reciprocity", f"{q.reciprocity:.2f}", q.reciprocity_level, "99.9 / 99 / 80", ""],
        [
            "causality",
            f"{q.causality:.2f}",
            q.causality_level,
            "80 / 50 / 20",
            f"worst entry {q.worst_causality_entry}" if q.worst_causality_entry else "",
        ],
    ]
    out = [
        "S-parameter quality (IEEE 370-2020 frequency-domain metrics, 0..100)",
        table(
            ["metric", "value", "level", "levels from", "note"],
            ["", "0..100", "", "good / acceptable / inconclusive", ""],
            rows,
            left=1,
        ),
        passivity_text(insp),
    ]
    if q.negligible_entries:
        out.append(
            "negligible entries (|S| <= 1e-6 at every point, no phase to judge; not counted "
            "in causality): " + ", ".join(q.negligible_entries)
        )
    return "\n".join(out)


def stimulus_text(insp) -> str:
    td = insp.time
    return (
        f"stimulus: Gaussian edge, 10-90 % rise time {_ps(td.rise_time_s)} ps "
        f"(shortest the data support 0.5 / f_max = {_ps(0.5 / insp.stop_hz)} ps; default "
        f"0.75 / f_max = {_ps(0.75 / insp.stop_hz)} ps), truncation ringing "
        f"{100 * td.ringing:.2g} % of the step"
    )


def _profile_title(p) -> str:
    mode = "differential pair" if p.mode == "differential" else "single-ended"
    return f"port {p.port} ({mode}, against {p.reference_ohm:g} ohm)"


def _after_edge(p) -> tuple[np.ndarray, np.ndarray]:
    """A profile's time and impedance from the stimulus edge on (t >= 0)."""
    keep = p.time_s >= 0
    return p.time_s[keep], p.impedance_ohm[keep]


def features_table(p, feats) -> str:
    """A profile's range and features as a text table."""
    t, z = _after_edge(p)
    lo, hi = int(np.argmin(z)), int(np.argmax(z))
    head = (
        f"{_profile_title(p)}: {z[lo]:.1f} ohm at {_ps(t[lo])} ps .. "
        f"{z[hi]:.1f} ohm at {_ps(t[hi])} ps"
    )
    if not feats:
        return head + "\n  no feature stands out by 2 % of the reference"
    dist = p.distance_m is not None
    heads = ["kind", "time", "impedance", "vs reference", "stands out by", "width"]
    units = ["", "ps", "ohm", "ohm", "ohm", "ps"]
    if dist:
        heads.append("distance")
        units.append("in")
    rows = []
    for x in feats:
        row = [
            x.kind,
            _ps(x.time_s),
            f"{x.impedance_ohm:.2f}",
            f"{x.deviation_ohm:+.2f}",
            f"{x.prominence_ohm:.2f}",
            _ps(x.width_s),
        ]
        if dist:
            row.append(f"{x.distance_m / 25.4e-3:.3f}")
        rows.append(row)
    body = table(heads, units, rows, left=1)
    return head + "\n" + "\n".join("  " + line for line in body.splitlines())


def steps_text(insp) -> str:
    td = insp.time
    rows = [[s.path, _ps(s.delay_s), _ps(s.rise_time_s), f"{s.final:.4g}"] for s in td.step]
    out = [
        "step response (unit step, 50 % point at t = 0)",
        table(
            ["path", "delay (50 %)", "rise time 10-90 %", "final level"],
            ["", "ps", "ps", "V"],
            rows,
            left=1,
        ),
    ]
    if td.skew_s is not None:
        a, b = td.step[-2].path, td.step[-1].path
        out.append(f"intra-pair skew ({b} delay - {a} delay): {_ps(td.skew_s, '.2f')} ps")
    return "\n".join(out)


def pulse_text(insp) -> str:
    p = insp.time.pulse
    if p is None:
        if insp.ports == 1:
            return "pulse response: none for a 1-port"
        return "pulse response: none (give a data rate)"
    posts = ", ".join(f"{v:.4g}" for v in p.post_cursors)
    return (
        f"pulse response of {p.path} ({rate_text(p.data_rate_bps)} {p.modulation.upper()}, one "
        f"unit interval {_ps(p.ui_s)} ps wide, {p.amplitude:g} V): main cursor "
        f"{p.main_cursor:.4g} V at {_ps(p.main_cursor_time_s)} ps, pre-cursor "
        f"{p.pre_cursor:.4g} V, post-cursors {posts} V"
    )


def views_text(insp) -> str:
    """Everything after the heading: quality, stimulus, profiles, steps, skew, pulse,
    notes."""
    out = [quality_text(insp), "", stimulus_text(insp), "", "impedance profile"]
    out.append(f"({ROUND_TRIP_NOTE}; {FEATURE_NOTE})")
    for p, feats in zip(insp.time.tdr, insp.features, strict=True):
        out.append(features_table(p, feats))
    if insp.time.step:
        out += ["", steps_text(insp)]
    out += ["", pulse_text(insp)]
    notes = [n for n in insp.notes if not n.startswith("stimulus:")]
    if notes:
        out += ["", "notes:"] + [f"  {n}" for n in notes]
    return "\n".join(out)


# ---------------------------------------------------------------- charts


def _figure(rows: int = 1):
    from losslane.report.charts import pyplot

    plt = pyplot()
    fig, axes = plt.subplots(rows, 1, figsize=(10.5, 3.2 + 2.4 * rows), dpi=110, squeeze=False)
    for ax in axes[:, 0]:
        ax.grid(True, alpha=0.3)
    return plt, fig, list(axes[:, 0])


def _save(plt, fig, path: Path) -> Path:
    from losslane.report.charts import save_figure

    fig.tight_layout()
    try:
        return save_figure(fig, path)
    finally:
        plt.close(fig)


def _z_limits(profiles) -> tuple[float, float]:
    """A y-range showing every profile's features; an open or short end (Z beyond 3 Z_ref
    or below 0) is cut off rather than squeezing the rest flat."""
    ref = max(p.reference_ohm for p in profiles)
    lo = min(float(np.min(p.impedance_ohm)) for p in profiles)
    hi = max(float(np.max(p.impedance_ohm)) for p in profiles)
    lo, hi = max(lo, 0.0), min(hi, 3.0 * ref)
    lo, hi = min(lo, 0.9 * ref), max(hi, 1.1 * ref)
    span = hi - lo
    return lo - 0.05 * span, hi + 0.08 * span


def _scale(k: float):
    """Forward and inverse of x -> k x, for a secondary axis."""
    return (lambda x: x * k), (lambda y: y / k)


def profile_chart(path: Path | str, insp, title: str, modes: tuple[str, ...] | None = None) -> Path:
    """The impedance profiles against the round-trip time (ns), single-ended ports and the
    differential pairs in separate panels (only ``modes``, if given), features marked; a
    top axis in one-way inches when distances are known."""
    groups = {}
    for p, feats in zip(insp.time.tdr, insp.features, strict=True):
        if modes is None or p.mode in modes:
            groups.setdefault(p.mode, []).append((p, feats))
    plt, fig, axes = _figure(len(groups))
    for ax, (mode, items) in zip(axes, groups.items(), strict=True):
        for k, (p, feats) in enumerate(items):
            line = ax.plot(p.time_s * 1e9, p.impedance_ohm, lw=1.4, label=_profile_title(p))[0]
            for kind, marker in (("peak", "^"), ("dip", "v")):
                pts = [(x.time_s * 1e9, x.impedance_ohm) for x in feats if x.kind == kind]
                if pts:
                    tx, zx = zip(*pts, strict=True)
                    ax.plot(tx, zx, marker=marker, ms=5, color=line.get_color(), ls="none")
            if k == 0:
                ax.axhline(p.reference_ohm, color="0.4", lw=0.9, ls="--")
        ax.set_ylim(*_z_limits([p for p, _ in items]))
        ax.set_xlim(items[0][0].time_s[0] * 1e9, max(p.time_s[-1] for p, _ in items) * 1e9)
        ax.set_ylabel(f"{mode} impedance (ohm)")
        ax.legend(fontsize=8, loc="best", framealpha=0.85)
        first = items[0][0]
        if first.distance_m is not None and first.time_s[-1] > 0:
            per_ns = float(first.distance_m[-1] / 25.4e-3) / float(first.time_s[-1] * 1e9)
            top = ax.secondary_xaxis("top", functions=_scale(per_ns))
            top.set_xlabel("one-way distance (in)", fontsize=9)
    axes[-1].set_xlabel("round-trip time (ns); a feature at one-way delay tau shows at 2 tau")
    axes[0].set_title(title, fontsize=11)
    return _save(plt, fig, Path(path))


def step_chart(path: Path | str, insp, title: str) -> Path:
    """The step responses of the through paths, their 50 % delays marked."""
    plt, fig, (ax,) = _figure()
    for s in insp.time.step:
        line = ax.plot(s.time_s * 1e9, s.volts, lw=1.5, label=s.path)[0]
        if s.delay_s is not None:
            ax.plot(s.delay_s * 1e9, 0.5 * s.final, "o", ms=4, color=line.get_color())
    ax.set_xlim(insp.time.step[0].time_s[0] * 1e9, max(s.time_s[-1] for s in insp.time.step) * 1e9)
    ax.set_xlabel("time (ns); the 1 V step's 50 % point is at 0, dots: each path's 50 % delay")
    ax.set_ylabel("volts")
    ax.set_title(title, fontsize=11)
    ax.legend(fontsize=8, loc="best", framealpha=0.85)
    return _save(plt, fig, Path(path))


def pulse_chart(path: Path | str, insp, title: str) -> Path:
    """The pulse response against unit intervals from its main cursor, cursors marked."""
    p = insp.time.pulse
    plt, fig, (ax,) = _figure()
    ui = (p.time_s - p.main_cursor_time_s) / p.ui_s
    ax.plot(ui, p.volts, lw=1.5, color="black", label=f"{p.path}, one symbol")
    k = np.arange(-1, len(p.post_cursors) + 1)
    vals = [p.pre_cursor, p.main_cursor, *p.post_cursors]
    ax.plot(k, vals, "o", ms=5, color="tab:red", label="cursors (one UI apart)")
    for x, v in zip(k, vals, strict=True):
        ax.annotate(f"{v:.3g}", (x, v), textcoords="offset points", xytext=(4, 4), fontsize=7)
    ax.axhline(0.0, color="0.4", lw=0.8)
    ax.set_xlim(max(float(ui[0]), -PULSE_UIS_BEFORE), float(ui[-1]))
    ax.set_xlabel(
        f"unit intervals from the main cursor (UI = {p.ui_s * 1e12:.4g} ps; main cursor at "
        f"{p.main_cursor_time_s * 1e9:.4g} ns)"
    )
    ax.set_ylabel("volts")
    ax.set_title(title, fontsize=11)
    ax.legend(fontsize=8, loc="best", framealpha=0.85)
    return _save(plt, fig, Path(path))


# ---------------------------------------------------------------- HTML


def _td(text: str, cls: str = "num") -> str:
    return f'<td class="{cls}">{escape(text)}</td>'


def _level_cell(level: str) -> str:
    return _td(level, "num FAIL" if level == "poor" else "num")


def views_html(insp) -> str:
    """The quality and time-domain tables of a report page (no charts, no headings above
    h3)."""
    q = insp.quality
    parts = [
        "<h3>S-parameter quality (IEEE 370-2020)</h3>",
        "<table><tr><th>metric</th><th>value (0..100)</th><th>level</th>"
        "<th>good / acceptable / inconclusive from</th></tr>",
        "<tr><td>passivity</td>"
        + _td(f"{q.passivity:.2f}")
        + _level_cell(q.passivity_level)
        + _td(">= 99.9 / 99 / 80")
        + "</tr>",
        "<tr><td>reciprocity</td>"
        + _td(f"{q.reciprocity:.2f}")
        + _level_cell(q.reciprocity_level)
        + _td(">= 99.9 / 99 / 80")
        + "</tr>",
        "<tr><td>causality"
        + (f" (worst entry {escape(q.worst_causality_entry)})" if q.worst_causality_entry else "")
        + "</td>"
        + _td(f"{q.causality:.2f}")
        + _level_cell(q.causality_level)
        + _td(">= 80 / 50 / 20")
        + "</tr></table>",
        f"<p>{escape(passivity_text(insp))}</p>",
    ]
    if q.negligible_entries:
        parts.append(
            "<p>Negligible entries (|S| &lt;= 1e-6 at every point, not counted in causality): "
            + escape(", ".join(q.negligible_entries))
            + "</p>"
        )
    parts.append("<h3>Impedance profile</h3>")
    parts.append(
        f"<p>{escape(stimulus_text(insp))}. {escape(ROUND_TRIP_NOTE)}; {escape(FEATURE_NOTE)}.</p>"
    )
    for p, feats in zip(insp.time.tdr, insp.features, strict=True):
        parts.append(f"<p><strong>{escape(_profile_title(p))}</strong></p>")
        if not feats:
            parts.append("<p>No feature stands out by 2 % of the reference.</p>")
            continue
        dist = p.distance_m is not None
        head = (
            "<tr><th>kind</th><th>round-trip time (ps)</th><th>impedance (ohm)</th>"
            "<th>vs reference (ohm)</th><th>stands out by (ohm)</th><th>width (ps)</th>"
            + ("<th>one-way distance (in)</th>" if dist else "")
            + "</tr>"
        )
        rows = "".join(
            "<tr>"
            + _td(x.kind, "")
            + _td(_ps(x.time_s))
            + _td(f"{x.impedance_ohm:.2f}")
            + _td(f"{x.deviation_ohm:+.2f}")
            + _td(f"{x.prominence_ohm:.2f}")
            + _td(_ps(x.width_s))
            + (_td(f"{x.distance_m / 25.4e-3:.3f}") if dist else "")
            + "</tr>"
            for x in feats
        )
        parts.append("<table>" + head + rows + "</table>")
    td = insp.time
    if td.step:
        parts.append("<h3>Step response</h3>")
        rows = "".join(
            "<tr>"
            + _td(s.path, "")
            + _td(_ps(s.delay_s))
            + _td(_ps(s.rise_time_s))
            + _td(f"{s.final:.4g}")
            + "</tr>"
            for s in td.step
        )
        parts.append(
            "<table><tr><th>path</th><th>delay, 50 % (ps)</th><th>rise time 10-90 % (ps)</th>"
            "<th>final level (V)</th></tr>" + rows + "</table>"
        )
        if td.skew_s is not None:
            a, b = td.step[-2].path, td.step[-1].path
            parts.append(
                f"<p>Intra-pair skew ({escape(b)} delay &#8722; {escape(a)} delay): "
                f"{_ps(td.skew_s, '.2f')} ps</p>"
            )
    parts.append("<h3>Pulse response</h3>")
    parts.append(f"<p>{escape(pulse_text(insp))}</p>")
    notes = [n for n in insp.notes if not n.startswith("stimulus:")]
    if notes:
        parts.append(
            "<p>Notes:</p><ul>" + "".join(f"<li>{escape(n)}</li>" for n in notes) + "</ul>"
        )
    return "\n".join(parts)


# ---------------------------------------------------------------- the build's hooks


def build_view_files(
    insp, stage: Path, stem: str, name: str, plots: bool = True
) -> tuple[list[Path], list[tuple[Path, str]]]:
    """The build's time-domain charts in the staging directory ``stage``: the impedance
    profile, and the pulse response (or, without a data rate, the step response); returns
    the files and the charts with their captions (for the report page)."""
    if insp is None or not plots:
        return [], []
    stage = Path(stage)
    if insp.ports == 4:  # the channel's own mode; inspect the file for the legs
        p = profile_chart(
            stage / f"{stem}-impedance-profile.png",
            insp,
            f"{name}: differential impedance profile",
            ("differential",),
        )
        charts = [(p, "Differential impedance profile at each end (round-trip time)")]
    else:
        p = profile_chart(
            stage / f"{stem}-impedance-profile.png", insp, f"{name}: impedance profile"
        )
        charts = [(p, "Impedance profile at each port (round-trip time)")]
    if insp.time.pulse is not None:
        q = pulse_chart(
            stage / f"{stem}-pulse.png",
            insp,
            f"{name}: pulse response, {rate_text(insp.time.pulse.data_rate_bps)} "
            f"{insp.time.pulse.modulation.upper()}",
        )
        charts.append((q, "Pulse response of one symbol, with its cursors"))
    elif insp.time.step:
        q = step_chart(stage / f"{stem}-step.png", insp, f"{name}: step response")
        charts.append((q, "Step response of the through paths"))
    return [c for c, _ in charts], charts


def build_summary_lines(insp) -> list[str]:
    """The build summary's lines on the S-parameters it wrote."""
    if insp is None:
        return ["quality and time-domain views: none (fewer than 3 sweep points)"]
    td = insp.time
    out = ["written S-parameters: " + quality_line(insp.quality)]
    if insp.quality.passivity_failures_hz.size:
        out.append("  " + passivity_text(insp))
    main = td.step[0] if td.step else None
    if main is not None:
        line = (
            f"time domain ({_ps(td.rise_time_s)} ps edge): {main.path} delay "
            f"{_ps(main.delay_s)} ps, rise time {_ps(main.rise_time_s)} ps"
        )
        if td.skew_s is not None:
            line += f", intra-pair skew {_ps(td.skew_s, '.2f')} ps"
        out.append(line)
    if td.pulse is not None:
        out.append(pulse_text(insp))
    elif td.step:
        out.append("pulse response: none (no data_rate in [time] or [budget])")
    return out


def build_json(insp) -> dict:
    """The build's ``quality`` and ``time_domain`` JSON keys (no waveforms: those are in
    the charts, and in ``losslane inspect --json`` of the written file)."""
    if insp is None:
        return {"quality": None, "time_domain": None}
    td = insp.time
    pulse = None
    if td.pulse is not None:
        pulse = {k: v for k, v in td.pulse.to_json().items() if k not in ("time_s", "volts")}
    profiles = []
    for p, feats in zip(td.tdr, insp.features, strict=True):
        profiles.append(
            {
                "port": p.port,
                "mode": p.mode,
                "reference_ohm": p.reference_ohm,
                "min_ohm": float(np.min(_after_edge(p)[1])),
                "max_ohm": float(np.max(_after_edge(p)[1])),
                "features": [x.to_json() for x in feats],
            }
        )
    return {
        "quality": insp.quality.to_json(),
        "time_domain": {
            "rise_time_s": td.rise_time_s,
            "ringing": td.ringing,
            "data_rate_bps": insp.data_rate_bps,
            "modulation": insp.modulation,
            "step": [s.to_json() for s in td.step],
            "skew_s": td.skew_s,
            "pulse": pulse,
            "tdr": profiles,
            "notes": list(insp.notes),
        },
    }


def build_section_html(insp) -> str:
    """The build page's section on the S-parameters it wrote."""
    if insp is None:
        return (
            '<h2 id="quality">Quality and time-domain views</h2>'
            "<p>None: the sweep has fewer than 3 points.</p>"
        )
    return (
        '<h2 id="quality">Quality and time-domain views of the written S-parameters</h2>'
        + views_html(insp)
    )

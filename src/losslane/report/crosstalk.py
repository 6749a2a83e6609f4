"""The crosstalk outputs of a build on group lines: the victim's own Touchstone file, the
NEXT/FEXT chart against frequency, the victim's step waveforms, the terminal text, the
report page's section and the port lines of the 2n-port file's header.

matplotlib is imported inside the chart functions (Agg backend, no display needed).
"""

from __future__ import annotations

from html import escape
from pathlib import Path

import numpy as np

from losslane.report.charts import (
    CHART_CAUTION,
    Curve,
    Marker,
    db_plot,
    pyplot,
    save_figure,
    stamp,
    to_db,
    user_text,
)
from losslane.report.text import table, verdict

__all__ = [
    "crosstalk_html",
    "crosstalk_text",
    "port_lines",
    "step_chart",
    "write_crosstalk_files",
    "xtalk_chart",
]


def conductor_labels(members) -> list[str]:
    """'agg1 P', 'agg1 N', 'clk', ... in conductor order."""
    out = []
    for m in members:
        out += [f"{m.name} P", f"{m.name} N"] if m.pair else [m.name]
    return out


def port_lines(result) -> list[str]:
    """Header lines naming each port of a channel on group lines (none for a plain one)."""
    if not result.members:
        return []
    labels = conductor_labels(result.members)
    n = len(labels)
    near = ", ".join(f"{k + 1} = {lab}" for k, lab in enumerate(labels))
    far = ", ".join(f"{n + k + 1} = {lab}" for k, lab in enumerate(labels))
    return [
        f"group of traces: near ends (transmitter side) {near}",
        f"far ends (receiver side) {far}",
        f"victim: {result.victim}",
    ]


def _ghz(x: float) -> str:
    return f"{x / 1e9:.6g}"


def crosstalk_text(xt) -> str:
    """The terminal section (``xt`` a CrosstalkResult, or None: empty)."""
    if xt is None:
        return ""
    data = xt.to_json()
    pts = data["points_hz"]
    heads = ["aggressor", "mode"]
    units = ["", ""]
    for p in pts:
        heads += [f"NEXT {_ghz(p)}", f"FEXT {_ghz(p)}"]
        units += ["dB", "dB"]
    rows = []
    for a in data["aggressors"]:
        row = [a["name"], a["mode"]]
        for nx, fx in zip(a["next_db"], a["fext_db"], strict=True):
            row += [f"{nx:.1f}", f"{fx:.1f}"]
        rows.append(row)
    out = [
        f"crosstalk into {xt.victim} ({data['victim_mode']}) at its receiver, isolation in dB "
        "(NEXT: aggressor transmitting at the receiving end; FEXT: at the transmitting end)",
        table(heads, units, rows, left=2),
    ]
    if xt.noise is not None:
        lim = "" if xt.max_icn is None else f", limit {1e3 * xt.max_icn:.3g} mV"
        out.append(
            f"integrated crosstalk noise {1e3 * xt.noise.total:.3f} mV rms "
            f"(from NEXT {1e3 * xt.noise.near:.3f}, from FEXT {1e3 * xt.noise.far:.3f}){lim}: "
            f"{verdict(xt.passed)}"
        )
    if xt.icr_at_nyquist_db is not None:
        out.append(
            f"insertion-loss-to-crosstalk ratio at Nyquist {_ghz(xt.nyquist)} GHz: "
            f"{xt.icr_at_nyquist_db:.1f} dB"
        )
    out += [f"note: {n}" for n in xt.notes]
    return "\n".join(out)


def xtalk_chart(path: Path, xt, title: str) -> Path:
    """NEXT and FEXT of each aggressor (dB) against frequency, with the power sums and the
    victim's insertion loss; the Nyquist frequency marked."""
    import matplotlib

    cmap = matplotlib.colormaps["tab10"]
    curves = [Curve(f"{xt.victim} through (insertion loss)", to_db(xt.through), "-", 2.2, "black")]
    for i, c in enumerate(xt.couplings):
        col = cmap(i % 10)
        curves.append(Curve(f"NEXT from {c.aggressor}", to_db(c.next), "-", 1.3, col))
        curves.append(Curve(f"FEXT from {c.aggressor}", to_db(c.fext), "--", 1.3, col))
    if len(xt.couplings) > 1:
        with np.errstate(divide="ignore"):
            curves.append(
                Curve("power-sum NEXT", 10 * np.log10(xt.next_power), "-", 2.0, "tab:red")
            )
            curves.append(
                Curve("power-sum FEXT", 10 * np.log10(xt.fext_power), "--", 2.0, "tab:red")
            )
    markers = [Marker(xt.nyquist, "Nyquist")] if xt.nyquist is not None else []
    return db_plot(path, xt.f, curves, title, "dB", markers, floor_db=-140)


@user_text
def step_chart(path: Path, xt, title: str) -> Path:
    """The victim's waveforms at its receiver (% of the aggressor's step): NEXT for a step
    on each aggressor at the same end, FEXT for a step at the other end."""
    import matplotlib

    w = xt.step_waveforms()
    plt = pyplot()
    fig, (a1, a2) = plt.subplots(1, 2, figsize=(11.5, 4.8), dpi=110, sharey=False)
    cmap = matplotlib.colormaps["tab10"]
    t_ns = w.time_s * 1e9
    for i, c in enumerate(xt.couplings):
        col = cmap(i % 10)
        for ax, e in ((a1, 0), (a2, 1)):
            ax.plot(t_ns, 100 * w.values[:, i, e], color=col, lw=1.3, label=c.aggressor)
    # NEXT lasts one round trip of the victim: show 2.5 one-way delays and the edge
    delay = xt.victim_delay(w.rise_time_s)
    start = -3 * w.rise_time_s * 1e9
    stop = (2.5 * delay + 10 * w.rise_time_s) * 1e9 if delay else t_ns[-1]
    for ax, what in (
        (a1, "NEXT: aggressor stepped at the receiving end"),
        (a2, "FEXT: aggressor stepped at the transmitting end"),
    ):
        ax.grid(True, alpha=0.3)
        ax.set_xlim(max(start, t_ns[0]), min(stop, t_ns[-1]))
        ax.set_xlabel("time (ns)")
        ax.set_ylabel("victim at its receiver (% of the aggressor's step)")
        ax.set_title(f"{xt.victim}: {what}", fontsize=10)
        ax.legend(fontsize=8)
        ax.axvline(0.0, color="0.35", lw=0.9, ls=":")
    fig.suptitle(title, fontsize=11)
    stamp(fig, f"edge 10-90 % {w.rise_time_s * 1e12:.3g} ps; {CHART_CAUTION}")
    fig.tight_layout()
    try:
        return save_figure(fig, path)
    finally:
        plt.close(fig)


def write_crosstalk_files(
    result, xt, stage: Path, stem: str, version: int = 1, form: str = "ri", plots: bool = True
) -> tuple[list[Path], list[tuple[Path, str]]]:
    """The victim's own Touchstone file and the crosstalk charts, staged in ``stage``;
    returns the files and the charts with their captions (for the report page)."""
    from losslane.network.touchstone import write_touchstone
    from losslane.report.channel import slug

    if xt is None:
        return [], []
    stage = Path(stage)
    net = result.victim_network
    files = [
        write_touchstone(
            net,
            stage / f"{stem}-{slug(xt.victim)}.s{net.nports}p",
            version=version,
            form=form,
            scenario=result.scenario.name,
            comments=[
                f"victim {xt.victim} of a group of traces, every other conductor's ports "
                f"terminated in {result.scenario.ports.reference:g} ohm",
                "estimate: confirm against the fabricator's stackup and measured test coupons",
            ],
        )
    ]
    charts: list[tuple[Path, str]] = []
    if plots:
        name = result.scenario.name
        p = xtalk_chart(
            stage / f"{stem}-crosstalk.png",
            xt,
            f"{name}: crosstalk into {xt.victim} at its receiver",
        )
        files.append(p)
        charts.append((p, f"NEXT and FEXT into {xt.victim}, and its insertion loss"))
        p = step_chart(
            stage / f"{stem}-crosstalk-step.png",
            xt,
            f"{name}: {xt.victim}'s near- and far-end crosstalk waveforms for an aggressor step",
        )
        files.append(p)
        charts.append(
            (p, f"{xt.victim}'s near- and far-end crosstalk waveforms for an aggressor step")
        )
    return files, charts


def _td(text: str) -> str:
    return f'<td class="num">{escape(text)}</td>'


def crosstalk_html(xt) -> str:
    """The report page's crosstalk section ('' without crosstalk)."""
    if xt is None:
        return ""
    data = xt.to_json()
    pts = data["points_hz"]
    parts = ['<h2 id="crosstalk">Crosstalk</h2>']
    if xt.passed is not None:
        ok = xt.passed
        text = (
            f"Integrated crosstalk noise {1e3 * xt.noise.total:.3f} mV rms against a limit of "
            f"{1e3 * xt.max_icn:.3g} mV: " + ("within the limit." if ok else "over the limit.")
        )
        parts.append(f'<p class="verdict {"pass" if ok else "fail"}">{escape(text)}</p>')
    parts.append(
        f"<p>Victim <strong>{escape(xt.victim)}</strong> ({escape(data['victim_mode'])}); "
        "every port not driven terminated in the reference. Isolation in dB (positive), both "
        "at the victim's receiver (its far end): NEXT from an aggressor transmitting at that "
        "end, FEXT from an aggressor transmitting at the victim's transmitting end.</p>"
    )
    head = "<tr><th>aggressor</th><th>mode</th>" + "".join(
        f"<th>NEXT {_ghz(p)} GHz (dB)</th><th>FEXT {_ghz(p)} GHz (dB)</th>" for p in pts
    )
    rows = []
    for a in data["aggressors"]:
        cells = "".join(
            _td(f"{nx:.1f}") + _td(f"{fx:.1f}")
            for nx, fx in zip(a["next_db"], a["fext_db"], strict=True)
        )
        rows.append(f"<tr><td>{escape(a['name'])}</td><td>{escape(a['mode'])}</td>{cells}</tr>")
    parts.append("<table>" + head + "</tr>" + "".join(rows) + "</table>")
    items = []
    if xt.noise is not None:
        n = xt.noise
        items += [
            ("integrated crosstalk noise", f"{1e3 * n.total:.3f} mV rms"),
            ("  from NEXT / from FEXT", f"{1e3 * n.near:.3f} / {1e3 * n.far:.3f} mV rms"),
            (
                "limit ([budget] max_icn)",
                "-" if xt.max_icn is None else f"{1e3 * xt.max_icn:.3g} mV",
            ),
            ("baud rate", f"{n.baud / 1e9:.6g} GBd"),
            (
                "NEXT / FEXT aggressor amplitude",
                f"{1e3 * n.near_amplitude:.4g} / {1e3 * n.far_amplitude:.4g} mV (peak)",
            ),
            (
                "NEXT / FEXT aggressor transition (20-80 %)",
                f"{n.near_transition * 1e12:.4g} / {n.far_transition * 1e12:.4g} ps",
            ),
            ("receiver reference bandwidth", f"{n.bandwidth / 1e9:.6g} GHz"),
            (
                "sum over",
                f"{n.band[0] / 1e9:.6g} .. {n.band[1] / 1e9:.6g} GHz, step {n.step / 1e6:.6g} MHz",
            ),
        ]
    if xt.icr_at_nyquist_db is not None:
        items.append(
            (
                f"insertion-loss-to-crosstalk ratio at Nyquist ({_ghz(xt.nyquist)} GHz)",
                f"{xt.icr_at_nyquist_db:.1f} dB",
            )
        )
    if items:
        body = "".join(f"<tr><th>{escape(k)}</th><td>{escape(v)}</td></tr>" for k, v in items)
        parts.append("<table>" + body + "</table>")
        parts.append(
            "<p>Integrated crosstalk noise as IEEE 802.3 defines it for its backplane and cable "
            "channels: the power sums of NEXT and FEXT weighted by the aggressors' symbol "
            "spectrum (sinc&#178;), their edge and the receiver's reference filter (form and "
            "default parameters recalled from memory; see the README).</p>"
        )
    parts += [f"<p>{escape(n)}</p>" for n in xt.notes]
    return "\n".join(parts)

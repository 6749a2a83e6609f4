"""The charts a radio engineer reads: the band in focus, and for a 2-port the phase and
group delay of S21, the VSWR at both ports and a Smith chart of S11 and S22.

* The focus: ``[plots] focus`` when given; otherwise, when every limit of the budget
  (Nyquist, check points, bands, masks) lies inside a narrow band -- its width at most
  ``NARROW_SHARE`` of its centre frequency and at most half the sweep -- that band with a
  little room on each side (our own rule). The focus chart zooms the insertion-loss axis
  (``[plots] loss_range`` when given) and the return-loss axis to what is inside it; the
  full-span charts are written too.
* The RF views of a 2-port cover the focus, or the whole sweep above DC without one.
  The group delay is a phase difference over a stated aperture
  (``network.rfmetrics.group_delay``); the Smith chart is scikit-rf's.

matplotlib and scikit-rf are imported inside the functions that draw.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np

from losslane.bands import band_list
from losslane.network.rfmetrics import default_aperture, group_delay, unwrapped_phase_deg, vswr
from losslane.report.budget import chart_limits
from losslane.report.charts import (
    LIMIT_COLOUR,
    Curve,
    draw_db,
    finish,
    label_vline,
    legend,
    merge_markers,
    pyplot,
    stamp,
    title,
)

#: the widest band, as a share of its centre frequency, that the charts focus on by themselves
NARROW_SHARE = 0.4


@dataclass(frozen=True)
class Focus:
    """A frequency range the charts zoom into, and why (for the captions)."""

    start: float
    stop: float
    why: str


def limit_span(budget, f: np.ndarray) -> tuple[float, float] | None:
    """The range of every frequency the budget judges: (lowest, highest), or None."""
    if budget is None:
        return None
    xs: list[float] = []
    if budget.nyquist is not None:
        xs.append(budget.nyquist)
    xs += [c.at for c in budget.checks]
    for b in band_list(budget, f):
        xs += [b.start, b.stop]
    for m in budget.masks:
        xs += [m.start, m.stop]
    return (min(xs), max(xs)) if xs else None


def focus_of(scenario, f: np.ndarray) -> Focus | None:
    """The chart focus of a scenario on its sweep ``f`` (see the module docstring)."""
    f = np.asarray(f, dtype=float)
    opts = scenario.plots
    if opts.focus is not None:
        lo, hi = opts.focus
        return Focus(lo, hi, "[plots] focus")
    if not opts.auto_focus:
        return None
    span = limit_span(scenario.budget, f)
    if span is None:
        return None
    lo, hi = span
    width, centre = hi - lo, 0.5 * (hi + lo)
    if centre <= 0 or width > NARROW_SHARE * centre or width > 0.5 * (f[-1] - f[0]):
        return None
    step = float(f[1] - f[0])
    pad = max(0.15 * width, 0.03 * centre, 2 * step)
    start, stop = max(lo - pad, float(f[0])), min(hi + pad, float(f[-1]))
    if np.count_nonzero((f >= start) & (f <= stop)) < 5:
        return None
    return Focus(
        start,
        stop,
        f"every limit lies within {lo / 1e9:.4g}..{hi / 1e9:.4g} GHz",
    )


def _range_of(result, focus: Focus | None) -> tuple[float, float]:
    f = result.f
    if focus is not None:
        return focus.start, focus.stop
    above = f[f > 0]
    return float(above[0]), float(f[-1])


def _mode(result) -> str:
    return "" if result.nports == 2 else " (differential mode)"


def focus_chart(path: Path, result, focus: Focus) -> Path:
    """Two panels over the focus: the insertion loss (axis from ``[plots] loss_range`` or
    zoomed to what is inside) and the return loss at both ends, with every limit."""
    plt = pyplot()
    sc = result.scenario
    f = result.f
    fig, (a1, a2) = plt.subplots(2, 1, figsize=(10.5, 7.4), dpi=110, sharex=True)
    xlim = (focus.start, focus.stop)
    markers, lines = chart_limits(sc, f, "insertion-loss")
    lr = sc.plots.loss_range
    ylim = None if lr is None else (-lr[1], -lr[0])
    il = [Curve("insertion loss" + _mode(result), -result.insertion_loss_db, "-", 2.0, "black")]
    draw_db(a1, f, il, markers, -1.0, -200.0, lines, xlim, ylim)
    a1.set_ylabel(("Sdd21" if result.nports == 4 else "S21") + " (dB)")
    room = legend(a1, 1 + len(lines))
    rl_in, rl_out = result.return_loss
    rl = [
        Curve("input" if result.nports == 4 else "input (S11)", -rl_in, "-", 1.5, "tab:blue"),
        Curve("output" if result.nports == 4 else "output (S22)", -rl_out, "--", 1.5, "tab:orange"),
    ]
    markers, lines = chart_limits(sc, f, "return-loss")
    draw_db(a2, f, rl, markers, -1.0, -120.0, lines, xlim)
    a2.set_ylabel("return loss as 20 log10 |S11|, |S22| (dB)")
    a2.set_xlabel("frequency (GHz)")
    room = max(room, legend(a2, 2 + len(lines)))
    n = title(
        a1,
        f"{sc.name}: the band {focus.start / 1e9:.4g}..{focus.stop / 1e9:.4g} GHz"
        f"{_mode(result)} ({focus.why})",
        width=int(12 * (10.5 - room)),
    )
    stamp(fig)
    return finish(plt, fig, path, right=room, top=0.2 + 0.22 * n)


def _clip_range(values: np.ndarray, low_q: float = 2.0, high_q: float = 98.0):
    v = values[np.isfinite(values)]
    if v.size == 0:
        return -1.0, 1.0
    lo, hi = np.percentile(v, [low_q, high_q])
    span = max(float(hi - lo), 1e-3 * max(abs(float(hi)), 1e-12))
    return float(lo) - 0.1 * span, float(hi) + 0.1 * span


def _marks(ax, result, lo: float, hi: float) -> None:
    """The budget's point checks as vertical lines, one label per group of close ones."""
    markers, _ = chart_limits(result.scenario, result.f, "insertion-loss")
    shown = [m for m in markers if lo <= m.at_hz <= hi]
    for m in shown:
        ax.axvline(m.at_hz / 1e9, color="0.35", lw=0.9, ls=":")
    for x, text in merge_markers(shown, hi - lo):
        label_vline(ax, x / 1e9, text)


def phase_delay_chart(path: Path, result, focus: Focus | None) -> Path:
    """S21's unwrapped phase and its group delay over the focus (or the sweep above DC),
    the aperture stated."""
    plt = pyplot()
    sc = result.scenario
    f = result.f
    lo, hi = _range_of(result, focus)
    s21 = result.s[:, 1, 0]
    opt = sc.plots.delay_aperture
    aperture = opt if opt is not None else default_aperture(f, lo, hi)
    fm, tau = group_delay(f, s21, aperture)
    step = float(f[1] - f[0])
    k = max(1, int(round(aperture / step)))
    sel = (f >= lo) & (f <= hi)
    phase = unwrapped_phase_deg(s21)
    ph = phase[sel]
    ph = ph - 360.0 * np.round(ph[0] / 360.0)  # start within +/-180 degrees
    fig, (a1, a2) = plt.subplots(2, 1, figsize=(10.5, 7.0), dpi=110, sharex=True)
    a1.plot(f[sel] / 1e9, ph, color="black", lw=1.5, label="phase of S21 (unwrapped)")
    a1.set_ylabel("phase (degrees)")
    ms = (fm >= lo) & (fm <= hi)
    t_ns = tau[ms] * 1e9
    ylo, yhi = _clip_range(t_ns)
    inside = (t_ns >= ylo) & (t_ns <= yhi)
    a2.plot(
        fm[ms] / 1e9,
        np.where(inside, t_ns, np.nan),
        color="tab:blue",
        lw=1.5,
        label=f"group delay over a {k * step / 1e6:.4g} MHz aperture ({k} sweep step"
        + ("s)" if k > 1 else ")"),
    )
    if not inside.all():
        edge = np.where(t_ns < ylo, ylo, np.where(t_ns > yhi, yhi, np.nan))
        a2.plot(fm[ms] / 1e9, edge, ":", color="tab:blue", lw=1.6, label="clipped at the axis")
    a2.set_ylim(ylo, yhi)
    a2.set_ylabel("group delay (ns)")
    a2.set_xlabel("frequency (GHz)")
    for ax in (a1, a2):
        _marks(ax, result, lo, hi)
        ax.grid(True, alpha=0.3)
        ax.legend(fontsize=8, loc="best", framealpha=0.85)
    a1.set_xlim(lo / 1e9, hi / 1e9)
    n = title(
        a1, f"{sc.name}: transmission phase and group delay, {lo / 1e9:.4g}..{hi / 1e9:.4g} GHz"
    )
    stamp(fig)
    return finish(plt, fig, path, top=0.2 + 0.22 * n)


def vswr_of_return_loss(rl_db) -> np.ndarray:
    """The VSWR of a return loss (positive dB): |Gamma| = 10^(-RL/20)."""
    g = 10.0 ** (-np.asarray(rl_db, dtype=float) / 20.0)
    return vswr(g)


def vswr_chart(path: Path, result, focus: Focus | None) -> Path:
    """VSWR at port 1 and port 2 over the focus (or the sweep above DC), with the
    return-loss limits as VSWR limits."""
    plt = pyplot()
    sc = result.scenario
    f = result.f
    lo, hi = _range_of(result, focus)
    sel = (f >= lo) & (f <= hi)
    v1 = vswr(result.s[sel, 0, 0])
    v2 = vswr(result.s[sel, 1, 1])
    markers, lines = chart_limits(sc, f, "return-loss")
    limits = [vswr_of_return_loss(m.limit_db) for m in markers if m.limit_db is not None]
    limits += [vswr_of_return_loss(ln.db) for ln in lines]
    top_data = max(
        float(np.max(v1[np.isfinite(v1)], initial=1.0)),
        float(np.max(v2[np.isfinite(v2)], initial=1.0)),
    )
    top_lim = max([float(np.max(x)) for x in limits], default=1.0)
    top = min(max(top_data, top_lim) * 1.08, 10.0)
    top = max(top, 1.1)
    fig, ax = plt.subplots(figsize=(10.5, 5.2), dpi=110)
    for v, label, style, colour in (
        (v1, "port 1 (input)", "-", "tab:blue"),
        (v2, "port 2 (output)", "--", "tab:orange"),
    ):
        over = ~np.isfinite(v) | (v > top)
        if over.any():
            label += f" (clipped above {top:.3g})"
        ax.plot(f[sel] / 1e9, np.where(over, np.nan, v), style, color=colour, lw=1.5, label=label)
        if over.any():
            ax.plot(f[sel] / 1e9, np.where(over, top, np.nan), ":", color=colour, lw=1.6)
    for m in markers:
        if m.limit_db is not None and lo <= m.at_hz <= hi:
            ax.plot(
                [m.at_hz / 1e9],
                [float(vswr_of_return_loss(m.limit_db))],
                "v",
                color=LIMIT_COLOUR,
                ms=8,
                zorder=5,
            )
    for ln in lines:
        ax.plot(
            np.asarray(ln.f_hz) / 1e9,
            vswr_of_return_loss(ln.db),
            "-",
            color=LIMIT_COLOUR,
            lw=1.8,
            alpha=0.85,
            label=ln.label.replace("band:", "band (as VSWR):"),
        )
    _marks(ax, result, lo, hi)
    ax.set_xlim(lo / 1e9, hi / 1e9)
    ax.set_ylim(1.0, top)
    ax.grid(True, alpha=0.3)
    ax.set_xlabel("frequency (GHz)")
    ax.set_ylabel("VSWR = (1 + |S11|) / (1 - |S11|)")
    room = legend(ax, 2 + len(lines))
    n = title(
        ax,
        f"{sc.name}: VSWR at both ports, {lo / 1e9:.4g}..{hi / 1e9:.4g} GHz "
        f"(reference {sc.ports.reference:g} ohm)",
        width=int(12 * (10.5 - room)),
    )
    stamp(fig)
    return finish(plt, fig, path, right=room, top=0.2 + 0.22 * n)


def smith_chart(path: Path, result, focus: Focus | None) -> Path:
    """S11 and S22 on a Smith chart (scikit-rf's), over the focus (or the sweep above DC);
    the first and last frequency marked."""
    import skrf

    plt = pyplot()
    sc = result.scenario
    f = result.f
    lo, hi = _range_of(result, focus)
    sel = (f >= lo) & (f <= hi)
    net = skrf.Network(
        frequency=skrf.Frequency.from_f(f[sel], unit="hz"),
        s=result.s[sel],
        z0=sc.ports.reference,
        name=sc.name,
    )
    fig, ax = plt.subplots(figsize=(7.4, 7.4), dpi=110)
    net.plot_s_smith(
        m=0,
        n=0,
        ax=ax,
        draw_labels=True,
        label="S11 (input)",
        color="tab:blue",
        lw=1.5,
        show_legend=False,
    )
    net.plot_s_smith(
        m=1,
        n=1,
        ax=ax,
        label="S22 (output)",
        color="tab:orange",
        lw=1.5,
        ls="--",
        show_legend=False,
    )
    for m, colour in ((0, "tab:blue"), (1, "tab:orange")):
        g = net.s[:, m, m]
        ax.plot([g[0].real], [g[0].imag], "o", color=colour, ms=5)
        ax.plot([g[-1].real], [g[-1].imag], "s", color=colour, ms=5)
    ax.plot([], [], "o", color="0.3", ms=5, label=f"{lo / 1e9:.4g} GHz (first)")
    ax.plot([], [], "s", color="0.3", ms=5, label=f"{hi / 1e9:.4g} GHz (last)")
    ax.legend(fontsize=8, loc="upper left", bbox_to_anchor=(0.0, 1.0), framealpha=0.85)
    n = title(
        ax,
        f"{sc.name}: S11 and S22, {lo / 1e9:.4g}..{hi / 1e9:.4g} GHz, "
        f"normalised to {sc.ports.reference:g} ohm",
        size=10,
        width=80,
    )
    ax.set_aspect("equal")
    stamp(fig)
    return finish(plt, fig, path, left=0.35, right=0.35, top=0.2 + 0.2 * n, bottom=0.35)


def rf_charts(result, stage: Path, stem: str) -> list[tuple[Path, str]]:
    """The focus chart (when there is a focus) and a 2-port's RF views (unless
    ``[plots] rf_views = false``), written into ``stage``: ``[(path, caption)]``."""
    stage = Path(stage)
    focus = focus_of(result.scenario, result.f)
    out: list[tuple[Path, str]] = []
    if focus is not None:
        p = focus_chart(stage / f"{stem}-focus.png", result, focus)
        out.append(
            (
                p,
                f"The band {focus.start / 1e9:.4g}..{focus.stop / 1e9:.4g} GHz in focus "
                f"({focus.why}): insertion and return loss with every limit",
            )
        )
    if result.nports == 2 and result.scenario.plots.rf_views:
        where = "over the focus" if focus is not None else "over the sweep above DC"
        out.append(
            (
                phase_delay_chart(stage / f"{stem}-phase-delay.png", result, focus),
                f"Phase and group delay of S21 {where}",
            )
        )
        out.append((vswr_chart(stage / f"{stem}-vswr.png", result, focus), f"VSWR {where}"))
        out.append(
            (
                smith_chart(stage / f"{stem}-smith.png", result, focus),
                f"S11 and S22 on a Smith chart {where}",
            )
        )
    return out


__all__ = [
    "NARROW_SHARE",
    "Focus",
    "focus_chart",
    "focus_of",
    "limit_span",
    "phase_delay_chart",
    "rf_charts",
    "smith_chart",
    "vswr_chart",
    "vswr_of_return_loss",
]

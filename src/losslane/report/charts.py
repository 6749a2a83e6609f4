"""What every chart shares: matplotlib on the Agg backend, dB curves against GHz with
vertical markers (close ones sharing one label) and limit lines, curves that leave the
axis drawn clipped and said so in the legend, values at the numeric floor written as
"< -200 dB", fixed margins so a figure is drawn once (when saved), and saving a figure
atomically.

matplotlib is imported inside the functions (Agg backend, no display needed), so
importing this module costs nothing.
"""

from __future__ import annotations

import functools
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from losslane.atomic import write_atomic

#: values beyond this many dB are the numeric floor of a dB conversion, not results: text
#: shows them as "< -200 dB" (or "> 200 dB" for a loss)
FLOOR_TEXT_DB = 200.0
#: markers closer than this share of the frequency axis share one label
LABEL_GAP = 0.018
LIMIT_COLOUR = "crimson"


@dataclass(frozen=True)
class Curve:
    """A dB curve; ``f`` (Hz) when it has its own frequencies (a measurement), else the
    chart's."""

    label: str
    db: np.ndarray
    style: str = "-"
    width: float = 1.6
    color: str | None = None
    f: np.ndarray | None = None


@dataclass(frozen=True)
class Marker:
    """A vertical line with a label (Nyquist, a check point) and optional limit in dB."""

    at_hz: float
    label: str
    limit_db: float | None = None


@dataclass(frozen=True)
class LimitLine:
    """A limit over a frequency range, drawn as a line: a band's limit (its two ends) or a
    mask (its points, or the sweep points of its span when interpolated in log frequency).
    ``db`` is positive dB; the chart's ``limit_sign`` places it."""

    label: str
    f_hz: np.ndarray
    db: np.ndarray


def user_text(chart: Callable) -> Callable:
    """Decorate a chart function so that its texts are shown as written: titles, legends
    and notes carry user names (a scenario, a segment, a material), and a ``$`` in them
    must not start matplotlib's math mode, where unbalanced markup is an error. (The
    setting holds while the chart is drawn; matplotlib is imported only then.)"""

    @functools.wraps(chart)
    def draw(*args, **kwargs):
        import matplotlib

        with matplotlib.rc_context({"text.parse_math": False}):
            return chart(*args, **kwargs)

    return draw


def pyplot():
    """matplotlib.pyplot on the Agg backend (files only, no display needed)."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt


def label_vline(ax, x: float, label: str) -> None:
    """Write ``label`` up the foot of a vertical marker line at ``x`` (Nyquist, a check)."""
    ax.annotate(
        label,
        (x, 0.02),
        xycoords=("data", "axes fraction"),
        rotation=90,
        fontsize=8,
        color="0.25",
        ha="right",
        va="bottom",
    )


def merge_markers(markers: Sequence[Marker], span_hz: float) -> list[tuple[float, str]]:
    """One label per group of markers closer than LABEL_GAP of the axis: ``(x_hz, text)``,
    the texts of a group joined ("Nyquist 8 GHz, check 1 8 GHz"), placed at its first
    marker. Markers are taken in frequency order."""
    out: list[tuple[float, list[str]]] = []
    for m in sorted(markers, key=lambda m: m.at_hz):
        if out and m.at_hz - out[-1][0] <= LABEL_GAP * span_hz:
            if m.label not in out[-1][1]:
                out[-1][1].append(m.label)
        else:
            out.append((m.at_hz, [m.label]))
    return [(x, ", ".join(names)) for x, names in out]


def db_text(value: float | None, fmt: str = ".1f", unit: str = " dB") -> str:
    """A dB value for text: "-" for None, "< -200 dB" / "> 200 dB" beyond the numeric
    floor, else the number."""
    if value is None or np.isnan(value):
        return "-"
    if value < -FLOOR_TEXT_DB:
        return f"< {-FLOOR_TEXT_DB:g}{unit}"
    if value > FLOOR_TEXT_DB:
        return f"> {FLOOR_TEXT_DB:g}{unit}"
    return f"{format(value, fmt)}{unit}"


def auto_range(
    f: np.ndarray,
    curves: Sequence[Curve],
    xlim: tuple[float, float],
    floor_db: float | None = None,
    extra: Sequence[float] = (),
    min_span: float = 0.5,
) -> tuple[float, float]:
    """The y range (dB) of the curves inside ``xlim`` (Hz): from the lowest to the highest
    value, leaving out each curve's lowest 1 % of points (a DC block's roll-off, a notch's
    bottom: they are drawn clipped) and anything below ``floor_db``; ``extra`` values (the
    limits) are always inside."""
    f = np.asarray(f)
    los, his = [], []
    for c in curves:
        cf = f if c.f is None else np.asarray(c.f)  # a measurement has its own frequencies
        v = np.asarray(c.db)[(cf >= xlim[0]) & (cf <= xlim[1])]
        v = v[np.isfinite(v)]
        if floor_db is not None:
            v = v[v >= floor_db]
        if v.size:
            los.append(float(np.percentile(v, 1.0)) if v.size >= 50 else float(v.min()))
            his.append(float(v.max()))
    ex = [float(x) for x in extra if np.isfinite(x)]
    lo = min(los + ex) if los or ex else -1.0
    hi = max(his + ex) if his or ex else 0.0
    span = max(hi - lo, min_span)
    mid = 0.5 * (hi + lo)
    lo, hi = mid - span / 2, mid + span / 2
    return lo - 0.05 * span, hi + 0.08 * span


def _plot_clipped(ax, ghz: np.ndarray, c: Curve, ylo: float, yhi: float, shown: np.ndarray) -> None:
    """Draw a curve inside the axis; where it leaves it (at the sweep points ``shown``), a
    dotted line along the edge shows it clipped, and the legend says so (with its extreme,
    "< -200 dB" at the floor)."""
    db = np.asarray(c.db, dtype=float)
    finite = np.isfinite(db) & shown
    below = finite & (db < ylo)
    above = finite & (db > yhi)
    inside = finite & ~below & ~above
    label = c.label
    if below.any():
        low = db_text(float(np.min(db[below])))
        label += f" [below the axis: {low}]" if not inside.any() else f" [clipped, min {low}]"
    if above.any():
        label += f" [clipped, max {db_text(float(np.max(db[above])))}]"
    (line,) = ax.plot(
        ghz, np.where(inside, db, np.nan), c.style, lw=c.width, color=c.color, label=label
    )
    colour = line.get_color()
    if below.any() or above.any():
        edge = np.where(below, ylo, np.where(above, yhi, np.nan))
        ax.plot(ghz, edge, ":", lw=max(c.width, 1.6), color=colour, clip_on=False)


def draw_db(
    ax,
    f: np.ndarray,
    curves: Sequence[Curve],
    markers: Sequence[Marker] = (),
    limit_sign: float = -1.0,
    floor_db: float | None = None,
    limits: Sequence[LimitLine] = (),
    xlim: tuple[float, float] | None = None,
    ylim: tuple[float, float] | None = None,
) -> tuple[float, float]:
    """Draw dB curves against GHz on ``ax``: curves clipped visibly at the axis, limits
    (``limit_sign`` * positive dB) as red lines and triangles, markers with one label per
    group of close ones. ``xlim``/``ylim`` in Hz/dB (default: the sweep, automatic).
    Returns the y range used."""
    f = np.asarray(f, dtype=float)
    x0, x1 = xlim if xlim is not None else (float(f[0]), float(f[-1]))
    shown_markers = [m for m in markers if x0 <= m.at_hz <= x1]
    if ylim is None:
        extra = [limit_sign * m.limit_db for m in shown_markers if m.limit_db is not None]
        for lim in limits:
            keep = (lim.f_hz >= x0) & (lim.f_hz <= x1)
            extra += [limit_sign * float(v) for v in np.asarray(lim.db)[keep]]
        ylim = auto_range(f, curves, (x0, x1), floor_db, extra)
    ylo, yhi = ylim
    for c in curves:
        cf = f if c.f is None else np.asarray(c.f, dtype=float)
        # the visible points, and one point beyond each end so the curves reach the edges
        step = float(cf[1] - cf[0]) if cf.size > 1 else 0.0
        shown = (cf >= x0 - step * 1.001) & (cf <= x1 + step * 1.001)
        _plot_clipped(ax, cf / 1e9, c, ylo, yhi, shown)
    for lim in limits:
        ax.plot(
            np.asarray(lim.f_hz) / 1e9,
            limit_sign * np.asarray(lim.db),
            "--" if lim.label.startswith("mask") else "-",
            color=LIMIT_COLOUR,
            lw=1.8,
            alpha=0.85,
            label=lim.label,
        )
    for m in shown_markers:
        ax.axvline(m.at_hz / 1e9, color="0.35", lw=0.9, ls=":")
        if m.limit_db is not None:
            ax.plot(
                [m.at_hz / 1e9],
                [limit_sign * m.limit_db],
                marker="v" if limit_sign < 0 else "^",
                color=LIMIT_COLOUR,
                ms=8,
                zorder=5,
            )
    for x, text in merge_markers(shown_markers, x1 - x0):
        label_vline(ax, x / 1e9, text)
    ax.set_ylim(ylo, yhi)
    ax.set_xlim(x0 / 1e9, x1 / 1e9)
    ax.grid(True, which="both", alpha=0.3)
    return ylo, yhi


def _figure():
    plt = pyplot()
    fig, ax = plt.subplots(figsize=(10.5, 5.2), dpi=110)
    ax.grid(True, which="both", alpha=0.3)
    return plt, fig, ax


#: average width of a character of the 8 pt legend text, inches (DejaVu Sans, measured)
LEGEND_CHAR_IN = 0.056


def legend(ax, entries: int) -> float:
    """Beside the axis when there are many entries, inside it otherwise; returns the room
    (inches) the figure needs on the right for it."""
    if entries > 3:
        leg = ax.legend(fontsize=8, loc="upper left", bbox_to_anchor=(1.01, 1.0), framealpha=0.85)
        longest = max((len(t.get_text()) for t in leg.get_texts()), default=10)
        return min(0.6 + LEGEND_CHAR_IN * longest, 0.45 * ax.figure.get_size_inches()[0])
    ax.legend(fontsize=8, loc="best", framealpha=0.85)
    return 0.3


def title(ax, text: str, size: float = 11, width: int = 100) -> int:
    """A title wrapped to ``width`` characters; returns its number of lines."""
    import textwrap

    lines = textwrap.wrap(text, width) or [""]
    # an explicit position: matplotlib then skips measuring the axis for the title
    ax.set_title("\n".join(lines), fontsize=size, y=1.0)
    return len(lines)


CHART_CAUTION = "estimate - confirm with measured coupons"


def stamp(fig, text: str = CHART_CAUTION) -> None:
    """A small note in the chart's lower right corner: by default the caution every chart
    carries."""
    fig.text(
        0.995,
        0.005,
        text,
        ha="right",
        va="bottom",
        fontsize=7,
        color="0.45",
    )


def layout(
    fig,
    left: float = 0.85,
    right: float = 0.3,
    top: float = 0.45,
    bottom: float = 0.62,
    hspace: float = 0.12,
    wspace: float = 0.25,
) -> None:
    """Fixed margins in inches (the axis labels, a wrapped title, a legend beside the
    axis), so no layout pass has to measure the figure: it is drawn once, when saved."""
    w, h = fig.get_size_inches()
    fig.subplots_adjust(
        left=left / w,
        right=1.0 - right / w,
        top=1.0 - top / h,
        bottom=bottom / h,
        hspace=hspace,
        wspace=wspace,
    )


def finish(plt, fig, path: Path, **margins: float) -> Path:
    """Lay out (``layout`` margins in inches), save atomically, close."""
    layout(fig, **margins)
    try:
        return save_figure(fig, path)
    finally:
        plt.close(fig)


@user_text
def db_plot(
    path: Path,
    f: np.ndarray,
    curves: Sequence[Curve],
    heading: str,
    ylabel: str,
    markers: Sequence[Marker] = (),
    limit_sign: float = -1.0,
    floor_db: float | None = None,
    limits: Sequence[LimitLine] = (),
    xlim: tuple[float, float] | None = None,
    ylim: tuple[float, float] | None = None,
) -> Path:
    """Plot dB curves against GHz and save a PNG at ``path`` (see ``draw_db``)."""
    plt, fig, ax = _figure()
    draw_db(ax, f, curves, markers, limit_sign, floor_db, limits, xlim, ylim)
    ax.set_xlabel("frequency (GHz)")
    ax.set_ylabel(ylabel)
    room = legend(ax, len(curves) + len(limits))
    lines = title(ax, heading, width=int(12 * (10.5 - room)))
    stamp(fig)
    return finish(plt, fig, path, right=room, top=0.2 + 0.22 * lines)


def save_figure(fig, path: Path | str, dpi: float | None = None) -> Path:
    """Write ``fig`` to ``path`` (its suffix names the format: .png, .svg, .pdf)
    atomically; the caller closes the figure."""
    path = Path(path)
    fmt = path.suffix.lower()[1:] or "png"
    return write_atomic(path, lambda tmp: fig.savefig(tmp, format=fmt, dpi=dpi or "figure"))


def to_db(x: np.ndarray) -> np.ndarray:
    with np.errstate(divide="ignore"):
        return 20.0 * np.log10(np.maximum(np.abs(x), 1e-300))

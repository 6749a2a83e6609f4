"""What every chart shares: matplotlib on the Agg backend, dB curves against GHz with
vertical markers, and saving a figure atomically.

matplotlib is imported inside the functions (Agg backend, no display needed), so
importing this module costs nothing.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from losslane.atomic import write_atomic


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


def _figure():
    plt = pyplot()
    fig, ax = plt.subplots(figsize=(10.5, 5.2), dpi=110)
    ax.grid(True, which="both", alpha=0.3)
    return plt, fig, ax


def db_plot(
    path: Path,
    f: np.ndarray,
    curves: Sequence[Curve],
    title: str,
    ylabel: str,
    markers: Sequence[Marker] = (),
    limit_sign: float = -1.0,
    floor_db: float | None = None,
) -> Path:
    """Plot dB curves against GHz and save a PNG at ``path``."""
    plt, fig, ax = _figure()
    ghz = np.asarray(f) / 1e9
    for c in curves:
        x = ghz if c.f is None else np.asarray(c.f) / 1e9
        ax.plot(x, c.db, c.style, lw=c.width, label=c.label, color=c.color)
    lo = min(float(np.nanmin(c.db[np.isfinite(c.db)])) for c in curves)
    hi = max(float(np.nanmax(c.db[np.isfinite(c.db)])) for c in curves)
    if floor_db is not None:
        lo = max(lo, floor_db)
    span = max(hi - lo, 1.0)
    ax.set_ylim(lo - 0.05 * span, hi + 0.08 * span)
    for m in markers:
        ax.axvline(m.at_hz / 1e9, color="0.35", lw=0.9, ls=":")
        label_vline(ax, m.at_hz / 1e9, m.label)
        if m.limit_db is not None:
            y = limit_sign * m.limit_db
            ax.plot(
                [m.at_hz / 1e9],
                [y],
                marker="v" if limit_sign < 0 else "^",
                color="crimson",
                ms=8,
                zorder=5,
            )
    ax.set_xlim(ghz[0], ghz[-1])
    ax.set_xlabel("frequency (GHz)")
    ax.set_ylabel(ylabel)
    ax.set_title(title, fontsize=11)
    if len(curves) > 3:
        ax.legend(fontsize=8, loc="upper left", bbox_to_anchor=(1.01, 1.0), framealpha=0.85)
    else:
        ax.legend(fontsize=8, loc="best", framealpha=0.85)
    fig.text(
        0.995,
        0.005,
        "estimate - confirm with measured coupons",
        ha="right",
        va="bottom",
        fontsize=7,
        color="0.45",
    )
    fig.tight_layout()
    try:
        return save_figure(fig, path)
    finally:
        plt.close(fig)


def save_figure(fig, path: Path | str, dpi: float | None = None) -> Path:
    """Write ``fig`` to ``path`` (its suffix names the format: .png, .svg, .pdf)
    atomically; the caller closes the figure."""
    path = Path(path)
    fmt = path.suffix.lower()[1:] or "png"
    return write_atomic(path, lambda tmp: fig.savefig(tmp, format=fmt, dpi=dpi or "figure"))


def to_db(x: np.ndarray) -> np.ndarray:
    with np.errstate(divide="ignore"):
        return 20.0 * np.log10(np.maximum(np.abs(x), 1e-300))

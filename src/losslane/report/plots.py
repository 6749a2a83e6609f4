"""PNG charts. matplotlib is imported inside each function (Agg backend), so importing this
module costs nothing; every file is written to a temporary name and renamed, so a failed
run leaves no half-written chart."""

from __future__ import annotations

import os
import tempfile
from collections.abc import Sequence
from pathlib import Path

import numpy as np

from losslane.report.channel_plots import pyplot

CAPTION = "estimates from published models; confirm against fabricated test coupons"


def save_figure(fig, path: Path | str) -> Path:
    """Write ``fig`` as PNG to ``path`` through a temporary file in the same directory."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".png", dir=path.parent)
    os.close(fd)
    try:
        fig.savefig(tmp, format="png", dpi=110)
        os.replace(tmp, path)
    finally:
        if os.path.exists(tmp):
            os.unlink(tmp)
    return path


def loss_comparison_chart(
    curves: Sequence[tuple[str, np.ndarray, np.ndarray]],
    path: Path | str,
    title: str,
    marks: Sequence[float] = (),
    colour_by: Sequence[str] | None = None,
    style_by: Sequence[str] | None = None,
) -> Path:
    """dB/in against frequency, one line per candidate (``(label, f_hz, db_per_in)``), in
    the given order. ``colour_by``/``style_by`` (one key per curve, e.g. the material and
    the foil) give curves sharing a key the same colour / line style; ``marks`` are
    frequencies drawn as thin vertical lines."""
    plt = pyplot()
    fig, ax = plt.subplots(figsize=(10.0, 5.2))
    try:
        palette = plt.rcParams["axes.prop_cycle"].by_key()["color"]
        styles = ["-", "--", ":", "-."]
        ckeys = list(dict.fromkeys(colour_by)) if colour_by else []
        skeys = list(dict.fromkeys(style_by)) if style_by else []
        for i, (label, f, y) in enumerate(curves):
            colour = palette[(ckeys.index(colour_by[i]) if colour_by else i) % len(palette)]
            style = styles[
                (skeys.index(style_by[i]) if style_by else i // len(palette)) % len(styles)
            ]
            ax.plot(np.asarray(f) / 1e9, y, style, color=colour, lw=1.6, label=label)
        for m in marks:
            ax.axvline(m / 1e9, color="0.75", lw=0.8, zorder=0)
        ax.set_xlabel("frequency (GHz)")
        ax.set_ylabel("loss (dB/in)")
        ax.set_title(title, fontsize=10)
        ax.set_xlim(left=0)
        ax.set_ylim(bottom=0)
        ax.grid(True, alpha=0.3)
        ax.legend(
            fontsize=7,
            loc="upper left",
            bbox_to_anchor=(1.01, 1.0),
            title="lowest loss first",
            title_fontsize=7,
            frameon=False,
        )
        fig.text(0.99, 0.005, CAPTION, ha="right", va="bottom", fontsize=6, color="0.4")
        fig.tight_layout()
        return save_figure(fig, path)
    finally:
        plt.close(fig)


def spread_histograms(
    impedance: np.ndarray,
    impedance_label: str,
    target: float,
    band: float,
    loss: np.ndarray,
    loss_label: str,
    path: Path | str,
    title: str,
) -> Path:
    """Two histograms side by side: the impedance samples (target and accepted band
    marked) and the loss samples."""
    plt = pyplot()
    fig, (a1, a2) = plt.subplots(1, 2, figsize=(9.0, 4.0))
    try:
        bins = min(80, max(10, int(np.sqrt(impedance.size))))
        a1.hist(impedance, bins=bins, color="#4a7fb5", alpha=0.85)
        a1.axvline(target, color="k", lw=1.2, label=f"target {target:.4g} ohm")
        for edge in (target - band, target + band):
            a1.axvline(edge, color="#c0392b", lw=1.0, ls="--")
        a1.plot([], [], color="#c0392b", ls="--", label=f"band +/-{band:.3g} ohm")
        a1.set_xlabel(impedance_label)
        a1.set_ylabel("samples")
        a1.legend(fontsize=7)
        a2.hist(loss, bins=bins, color="#6a9f58", alpha=0.85)
        a2.set_xlabel(loss_label)
        for ax in (a1, a2):
            ax.grid(True, alpha=0.3)
        fig.suptitle(title, fontsize=10)
        fig.text(0.99, 0.005, CAPTION, ha="right", va="bottom", fontsize=6, color="0.4")
        fig.tight_layout()
        return save_figure(fig, path)
    finally:
        plt.close(fig)

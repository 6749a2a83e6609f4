"""PNG charts of the loss budget: a waterfall of where the loss goes at each check point,
and the fitted insertion loss with its deviation (ILD).

matplotlib is imported inside the functions (Agg backend, no display needed).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from losslane.report.channel_plots import label_vline, pyplot
from losslane.report.tables import point_title

NOTE = "estimate - confirm with measured coupons"
# colours by segment kind, so a glance tells lines from discontinuities
KIND_COLOURS = {
    "line": "#3b75af",
    "via": "#e08a2c",
    "capacitor": "#8c6bb1",
    "series": "#b15928",
    "shunt": "#b15928",
    "touchstone": "#2b9a73",
}
REFLECTION_COLOUR = "#c0392b"
TOTAL_COLOUR = "#333333"


def budget_chart(path: Path, budget, title: str) -> Path:
    """A horizontal waterfall per check point: each segment's own loss stacked from the
    input, then the reflections row (red; negative when reflections cancel), then the
    total (dark) against the allowance (dashed) with the margin written beside it."""
    from losslane.budget import REFLECTIONS_ROW

    plt = pyplot()
    pts = budget.points
    names = [r.name for r in pts[0].segments] + [REFLECTIONS_ROW, "total"]
    kinds = [r.kind for r in pts[0].segments]
    height = 1.4 + 0.34 * len(names)
    width = 3.6 + 3.4 * len(pts)
    fig, axes = plt.subplots(
        1, len(pts), figsize=(width, height), dpi=110, sharey=True, squeeze=False
    )
    y = np.arange(len(names))[::-1]
    for ax, pb in zip(axes[0], pts, strict=True):
        start = 0.0
        for i, r in enumerate(pb.segments):
            ax.barh(y[i], r.loss_db, left=start, color=KIND_COLOURS.get(r.kind, "0.5"), height=0.7)
            start += r.loss_db
        k = len(pb.segments)
        refl = pb.reflections_db
        ax.barh(y[k], refl, left=start, color=REFLECTION_COLOUR, height=0.7)
        ax.barh(y[k + 1], pb.total_db, left=0.0, color=TOTAL_COLOUR, height=0.7)
        top = max(pb.total_db, start, start + refl)
        if pb.allowance_db is not None:
            a = pb.allowance_db
            ax.axvline(a, color="crimson", ls="--", lw=1.2)
            ax.annotate(
                f"max {a:.3g} dB",
                (a, 0.995),
                xycoords=("data", "axes fraction"),
                xytext=(-3, 0),
                textcoords="offset points",
                ha="right",
                va="top",
                fontsize=8,
                color="crimson",
            )
            top = max(top, a)
            ax.annotate(
                f"margin {pb.margin_db:+.2f} dB",
                (pb.total_db, y[k + 1]),
                xytext=(4, 0),
                textcoords="offset points",
                va="center",
                fontsize=8,
                color="crimson" if pb.margin_db < 0 else "0.2",
            )
        else:
            ax.annotate(
                f"{pb.total_db:.2f} dB",
                (pb.total_db, y[k + 1]),
                xytext=(4, 0),
                textcoords="offset points",
                va="center",
                fontsize=8,
            )
        ax.set_xlim(min(0.0, start + refl) - 0.02 * top, 1.12 * top if top > 0 else 1.0)
        ax.set_title(point_title(pb, budget), fontsize=9)
        ax.set_xlabel("insertion loss (dB)")
        ax.grid(True, axis="x", alpha=0.3)
    ax0 = axes[0][0]
    ax0.set_yticks(y)
    ax0.set_yticklabels(
        [f"{n} ({kd})" for n, kd in zip(names[:-2], kinds, strict=True)] + names[-2:],
        fontsize=8,
    )
    fig.suptitle(title, fontsize=11)
    fig.text(0.995, 0.005, NOTE, ha="right", va="bottom", fontsize=7, color="0.45")
    fig.tight_layout()
    fig.savefig(path, format="png")
    plt.close(fig)
    return Path(path)


def ild_plot(
    path: Path,
    f: np.ndarray,
    il_db: np.ndarray,
    fit,
    title: str,
    nyquist: float | None,
    ylabel: str = "20 log10 |S21| (dB)",
) -> Path:
    """Two panels: the channel's insertion loss with the fitted curve (fit band shaded),
    and the deviation ILD = IL - IL_fit over the band with its peak marked."""
    plt = pyplot()
    fig, (a1, a2) = plt.subplots(
        2, 1, figsize=(10.5, 6.6), dpi=110, sharex=True, gridspec_kw={"height_ratios": [3, 2]}
    )
    ghz = np.asarray(f) / 1e9
    lo, hi = fit.band.start / 1e9, fit.band.stop / 1e9
    show = np.asarray(f) > 0  # the DC point of a DC-blocked channel is not informative
    a1.plot(ghz[show], -il_db[show], color="black", lw=1.6, label="channel")
    fb = np.asarray(f)[show]
    a1.plot(
        ghz[show],
        -fit.fitted_db(fb),
        color="#3b75af",
        lw=1.4,
        ls="--",
        label="fitted a0 + a1*sqrt(f) + a2*f + a4*f^2",
    )
    band_il = fit.il_db
    span = float(np.ptp(band_il)) or 1.0
    a1.set_ylim(-float(np.max(band_il)) - 0.3 * span, -float(np.min(band_il)) + 0.1 * span)
    a2.plot(fit.f / 1e9, fit.ild_db, color="#c0392b", lw=1.4, label="ILD = IL - fitted IL")
    a2.axhline(0.0, color="0.4", lw=0.8)
    a2.plot([fit.ild_peak_hz / 1e9], [fit.ild_peak_db], "o", color="#c0392b", ms=6)
    a2.text(
        0.01,
        0.96,
        f"peak {fit.ild_peak_db:+.2f} dB at {fit.ild_peak_hz / 1e9:.4g} GHz; "
        f"rms {fit.ild_rms_db:.2f} dB",
        transform=a2.transAxes,
        ha="left",
        va="top",
        fontsize=8,
        bbox={"facecolor": "white", "edgecolor": "0.8", "alpha": 0.9},
    )
    for ax in (a1, a2):
        ax.axvspan(lo, hi, color="#3b75af", alpha=0.07, lw=0)
        if nyquist is not None:
            ax.axvline(nyquist / 1e9, color="0.35", lw=0.9, ls=":")
        ax.grid(True, alpha=0.3)
    if nyquist is not None:
        label_vline(a1, nyquist / 1e9, "Nyquist")
    a1.set_xlim(ghz[0], ghz[-1])
    a1.set_ylabel(ylabel)
    a2.set_ylabel("ILD (dB)")
    a2.set_xlabel(f"frequency (GHz); fit band {lo:.4g}..{hi:.4g} GHz shaded")
    a1.legend(fontsize=8, loc="lower left")
    a2.legend(fontsize=8, loc="lower left")
    a1.set_title(title, fontsize=11)
    fig.text(0.995, 0.005, NOTE, ha="right", va="bottom", fontsize=7, color="0.45")
    fig.tight_layout()
    fig.savefig(path, format="png")
    plt.close(fig)
    return Path(path)

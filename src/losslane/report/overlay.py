"""A measurement beside the built channel (a scenario's [compare] section) in the build's
outputs: the measured curves added to the insertion- and return-loss charts, a chart and a
CSV of the difference model - measured, the terminal lines and the report page's section.

The computation is :mod:`losslane.measure.overlay`; everything here renders a
``MeasuredOverlay``. matplotlib is imported inside the chart function.
"""

from __future__ import annotations

from collections.abc import Sequence
from html import escape
from pathlib import Path
from typing import TYPE_CHECKING

from losslane.report.charts import (
    Curve,
    Marker,
    label_vline,
    pyplot,
    save_figure,
    stamp,
    user_text,
)
from losslane.report.text import table

if TYPE_CHECKING:
    from losslane.measure.overlay import MeasuredOverlay

__all__ = [
    "difference_chart",
    "measured_il_curves",
    "measured_rl_curves",
    "overlay_html",
    "overlay_text",
    "write_overlay_files",
]

MEASURED_COLOUR = "#c0392b"
MEASURED_OUT_COLOUR = "#6a3d9a"
MEASURED_STYLE = ":"  # dotted over the model's solid lines, so both stay visible
DIFFERENCE_SUFFIX = "measured-difference"


def measured_il_curves(overlay: MeasuredOverlay | None) -> list[Curve]:
    """The measured insertion loss as a curve for the build's insertion-loss chart."""
    if overlay is None:
        return []
    return [
        Curve(
            f"measured: {overlay.label}",
            -overlay.insertion_loss_db,
            MEASURED_STYLE,
            1.8,
            MEASURED_COLOUR,
            f=overlay.f,
        )
    ]


def measured_rl_curves(overlay: MeasuredOverlay | None) -> list[Curve]:
    """The measured return loss at both ends, for the build's return-loss chart."""
    if overlay is None:
        return []
    return [
        Curve(
            f"measured input: {overlay.label}",
            -overlay.return_loss_in_db,
            MEASURED_STYLE,
            1.6,
            MEASURED_COLOUR,
            f=overlay.f,
        ),
        Curve(
            f"measured output: {overlay.label}",
            -overlay.return_loss_out_db,
            MEASURED_STYLE,
            1.6,
            MEASURED_OUT_COLOUR,
            f=overlay.f,
        ),
    ]


@user_text
def difference_chart(
    overlay: MeasuredOverlay, path: Path, title: str, markers: Sequence[Marker] = ()
) -> Path:
    """Two panels over the common band: the insertion-loss difference model - measured,
    and the return-loss differences at both ends; check points marked with their values."""
    plt = pyplot()
    fig, (a1, a2) = plt.subplots(2, 1, figsize=(10.5, 6.6), dpi=110, sharex=True)
    ghz = overlay.f_common / 1e9
    a1.plot(ghz, overlay.difference_il_db, "-", color=MEASURED_COLOUR, lw=1.3)
    a2.plot(ghz, overlay.difference_rl_in_db, "-", color=MEASURED_COLOUR, lw=1.1, label="input")
    a2.plot(
        ghz, overlay.difference_rl_out_db, "--", color=MEASURED_OUT_COLOUR, lw=1.1, label="output"
    )
    for row in overlay.rows:
        d = row["insertion_loss_difference_db"]
        if d is not None:
            a1.plot([row["at_hz"] / 1e9], [d], "o", color="black", ms=5, zorder=5)
            a1.annotate(
                f"{d:+.3g} dB",
                (row["at_hz"] / 1e9, d),
                xytext=(4, 6),
                textcoords="offset points",
                fontsize=8,
            )
    for ax in (a1, a2):
        ax.axhline(0.0, color="0.4", lw=0.8)
        ax.grid(True, alpha=0.3)
        for m in markers:
            ax.axvline(m.at_hz / 1e9, color="0.35", lw=0.9, ls=":")
    for m in markers:
        label_vline(a1, m.at_hz / 1e9, m.label)
    a1.set_ylabel("insertion loss,\nmodel - measured (dB)")
    a2.set_ylabel("return loss,\nmodel - measured (dB)")
    a2.set_xlabel("frequency (GHz)")
    a2.legend(fontsize=8, loc="best")
    if ghz.size > 1:
        a1.set_xlim(ghz[0], ghz[-1])
    a1.set_title(title, fontsize=11)
    stamp(fig, "positive: the model predicts more loss than measured")
    fig.tight_layout()
    try:
        return save_figure(fig, path)
    finally:
        plt.close(fig)


def write_overlay_files(
    overlay: MeasuredOverlay | None,
    name: str,
    stage: Path,
    stem: str,
    plots: bool,
    markers: Sequence[Marker] = (),
) -> list[Path]:
    """The difference CSV and, with ``plots``, the difference chart, into ``stage``."""
    if overlay is None:
        return []
    stage = Path(stage)
    csv = stage / f"{stem}-measured.csv"
    csv.write_text(overlay.curves_csv(), encoding="utf-8")
    files = [csv]
    if plots:
        mode = "" if overlay.nports == 2 else " (differential mode)"
        files.append(
            difference_chart(
                overlay,
                stage / f"{stem}-{DIFFERENCE_SUFFIX}.png",
                f"{name}: model minus measurement ({overlay.label}){mode}",
                markers,
            )
        )
    return files


def _num(v: float | None, fmt: str) -> str:
    return "-" if v is None else format(v, fmt)


def _quality_line(overlay) -> str:
    q = overlay.quality
    if q is None:
        return "quality: too few points for the IEEE 370 metrics"
    return (
        f"IEEE 370 quality as read: passivity {q.passivity:.4g} ({q.passivity_level}), "
        f"reciprocity {q.reciprocity:.4g} ({q.reciprocity_level}), causality "
        f"{q.causality:.4g} ({q.causality_level}); shown as measured, never repaired"
    )


def _rows(overlay) -> list[list[str]]:
    return [
        [
            f"{r['at_hz'] / 1e9:.4g}",
            _num(r["model_insertion_loss_db"], ".2f"),
            _num(r["measured_insertion_loss_db"], ".2f"),
            _num(r["insertion_loss_difference_db"], "+.3f"),
            _num(r["return_loss_in_difference_db"], "+.2f"),
            _num(r["return_loss_out_difference_db"], "+.2f"),
        ]
        for r in overlay.rows
    ]


_HEADS = [
    "frequency",
    "model IL",
    "measured IL",
    "difference",
    "RL in diff.",
    "RL out diff.",
]


def overlay_text(overlay: MeasuredOverlay | None) -> str:
    """The terminal lines of a build's measurement comparison ('' without one)."""
    if overlay is None:
        return ""
    d = overlay.difference_summary()
    fc = overlay.f_common
    mode = "" if overlay.nports == 2 else " (differential mode)"
    out = [
        f"model against measurement{mode}: {overlay.label} ({overlay.path.name}, "
        f"{overlay.f.size} points, compared over {fc[0] / 1e9:.4g}..{fc[-1] / 1e9:.4g} GHz)",
        "  " + _quality_line(overlay),
        f"  insertion loss, model - measured: largest {d['insertion_loss_max_abs_db']:.3g} dB "
        f"at {d['insertion_loss_max_at_hz'] / 1e9:.4g} GHz, "
        f"RMS {d['insertion_loss_rms_db']:.3g} dB",
    ]
    if overlay.rows:
        units = ["GHz", "dB", "dB", "dB", "dB", "dB"]
        out.append(table(_HEADS, units, _rows(overlay)))
    return "\n".join(out)


def overlay_html(overlay: MeasuredOverlay | None) -> str:
    """The report page's section on the measurement ('' without one)."""
    if overlay is None:
        return ""
    d = overlay.difference_summary()
    fc = overlay.f_common
    mode = "" if overlay.nports == 2 else " (differential mode)"
    head = "".join(f"<th>{escape(h)}</th>" for h in _HEADS)
    body = "".join(
        "<tr>" + "".join(f'<td class="num">{escape(c)}</td>' for c in row) + "</tr>"
        for row in _rows(overlay)
    )
    parts = [
        f'<h2 id="measured">Model against measurement{escape(mode)}</h2>',
        f"<p>Measured file <strong>{escape(overlay.path.name)}</strong> "
        f"({escape(overlay.label)}), {overlay.f.size} points, compared over "
        f"{fc[0] / 1e9:.4g} .. {fc[-1] / 1e9:.4g} GHz; the charts show it beside the model. "
        f"{escape(_quality_line(overlay))}.</p>",
        f"<p>Insertion loss, model &#8722; measured: largest "
        f"{d['insertion_loss_max_abs_db']:.3g} dB at {d['insertion_loss_max_at_hz'] / 1e9:.4g} "
        f"GHz, RMS {d['insertion_loss_rms_db']:.3g} dB. Positive differences: the model "
        "predicts more loss than measured.</p>",
    ]
    if overlay.rows:
        parts.append(
            "<table><tr>"
            + head
            + "</tr><tr>"
            + "".join(f"<th>{u}</th>" for u in ["GHz", "dB", "dB", "dB", "dB", "dB"])
            + "</tr>"
            + body
            + "</table>"
        )
    return "\n".join(parts)

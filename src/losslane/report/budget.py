"""The loss budget's outputs: the terminal text, the tidy CSV, the JSON document, and the
charts (a waterfall of where the loss goes at each check point; the fitted insertion loss
with its deviation). ``budget_writer`` stages these files with the rest of a build.

matplotlib is imported inside the chart functions (Agg backend, no display needed).
"""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import numpy as np

from losslane import __version__
from losslane.bands import band_list, in_range
from losslane.budget import REFLECTIONS_ROW, FitOff
from losslane.report.charts import (
    LimitLine,
    Marker,
    db_text,
    finish,
    label_vline,
    pyplot,
)
from losslane.report.text import table, verdict


def point_title(pb, budget) -> str:
    """'Nyquist 8 GHz (16 Gb/s NRZ, 16 GBd)' or 'check 1 at 4 GHz'."""
    p = pb.point
    if p.nyquist:
        return (
            f"Nyquist {p.at / 1e9:.10g} GHz ({budget.data_rate / 1e9:.10g} Gb/s "
            f"{budget.modulation.upper()}, {budget.baud / 1e9:.10g} GBd)"
        )
    return f"{p.label} at {p.at / 1e9:.10g} GHz"


def budget_rows(pb) -> list[dict]:
    """The rows of the budget at one point (a PointBudget), as plain values: each segment,
    the reflections row, the total with its allowance, margin and result, then the return
    loss at each end with its limit. ``quantity`` says which loss a row holds."""
    rows = []
    for r in pb.segments:
        rows.append(
            {
                "row": r.name,
                "kind": r.kind,
                "quantity": "insertion loss",
                "value_db": r.loss_db,
                "db_per_in": r.db_per_in,
                "share": pb.share(r.loss_db),
                "limit_db": None,
                "margin_db": None,
                "result": None,
            }
        )
    rows.append(
        {
            "row": REFLECTIONS_ROW,
            "kind": "",
            "quantity": "insertion loss",
            "value_db": pb.reflections_db,
            "db_per_in": None,
            "share": pb.share(pb.reflections_db),
            "limit_db": None,
            "margin_db": None,
            "result": None,
        }
    )
    rows.append(
        {
            "row": "total",
            "kind": "",
            "quantity": "insertion loss",
            "value_db": pb.total_db,
            "db_per_in": None,
            "share": pb.share(pb.total_db),
            "limit_db": pb.allowance_db,
            "margin_db": pb.margin_db,
            "result": pb.loss_passed,
        }
    )
    lim = pb.point.min_return_loss
    conversion = [("mode conversion Scd21", pb.scd21_db), ("mode conversion Sdc21", pb.sdc21_db)]
    for end, value in (("input", pb.return_loss_in_db), ("output", pb.return_loss_out_db)):
        rows.append(
            {
                "row": f"return loss at the {end}",
                "kind": "",
                "quantity": "return loss",
                "value_db": value,
                "db_per_in": None,
                "share": None,
                "limit_db": lim,
                "margin_db": None if lim is None else value - lim,
                "result": None if lim is None else bool(value >= lim),
            }
        )
    for label, value in conversion:
        if value is not None:
            rows.append(
                {
                    "row": label,
                    "kind": "",
                    "quantity": "mode conversion",
                    "value_db": value,
                    "db_per_in": None,
                    "share": None,
                    "limit_db": None,
                    "margin_db": None,
                    "result": None,
                }
            )
    return rows


def _f(v: float | None, fmt: str) -> str:
    return "-" if v is None else format(v, fmt)


def _conversion(v: float | None) -> str:
    """A mode conversion in dB ("-" when absent, "none" at the -6000 dB floor)."""
    if v is None:
        return "-"
    return "none" if v <= -1000 else f"{v:.1f}"


def _points_text(budget) -> list[str]:
    out: list[str] = []
    pts = budget.points
    mode = "" if budget.mode == "single-ended" else f" ({budget.mode} mode)"
    out.append(f"loss budget{mode}: each segment alone between matched references")
    for k, pb in enumerate(pts):
        out.append(f"  [{k + 1}] {point_title(pb, budget)}")
    heads, units = ["segment", "kind"], ["", ""]
    pair = pts[0].scd21_db is not None
    for k, _ in enumerate(pts):
        heads += [f"[{k + 1}] loss", "per in", "share"] + (["Scd21"] if pair else [])
        units += ["dB", "dB/in", "of max"] + (["dB"] if pair else [])
    per_point = [budget_rows(pb) for pb in pts]
    n_ins = len(pts[0].segments) + 2  # segments, reflections, total
    rows = []
    for i in range(n_ins):
        base = per_point[0][i]
        row = [base["row"], base["kind"]]
        for pb, pr in zip(pts, per_point, strict=True):
            r = pr[i]
            share = "-" if r["share"] is None else f"{100 * r['share']:.1f}%"
            row += [f"{r['value_db']:.2f}", _f(r["db_per_in"], ".3f"), share]
            if pair:
                conv = pb.segments[i].conversion_db if i < len(pb.segments) else None
                if r["row"] == "total":
                    conv = pb.scd21_db
                row.append(_conversion(conv))
        rows.append(row)
    extra = [
        ("max loss", lambda pb: _f(pb.allowance_db, ".2f")),
        ("margin", lambda pb: _f(pb.margin_db, "+.2f")),
        ("return loss, worse end", lambda pb: f"{pb.return_loss_db:.1f}"),
        ("min return loss", lambda pb: _f(pb.point.min_return_loss, ".1f")),
        ("result", lambda pb: verdict(pb.passed)),
    ]
    if pair:
        extra.insert(4, ("mode conversion Sdc21", lambda pb: _conversion(pb.sdc21_db)))
        extra.insert(4, ("mode conversion Scd21", lambda pb: _conversion(pb.scd21_db)))
    for label, get in extra:
        row = [label, ""]
        for pb in pts:
            row += [get(pb), "", ""] + ([""] if pair else [])
        rows.append(row)
    out.append(table(heads, units, rows, left=2))
    notes = [n.text() for n in budget.ripples if n.on_ripple]
    if notes:
        out.append(
            "point checks on a ripple (within +/-5 % of the point, or 2 sweep steps, the "
            "curve is worse than at the point):"
        )
        out += [f"  {n}" for n in notes]
    return out


def _db(v: float | None, fmt: str = ".2f") -> str:
    return db_text(v, fmt, "")


def band_rows(budget) -> list[list[str]]:
    """The bands as table rows (text), worst values and where they occur."""
    rows = []
    for b in budget.bands:
        band = b.band
        rows.append(
            [
                band.name,
                f"{band.start / 1e9:.6g}..{band.stop / 1e9:.6g}",
                f"{b.points}",
                f"{_db(b.loss.value_db)} @ {b.loss.at_hz / 1e9:.6g}",
                _f(band.max_loss, ".2f"),
                f"{_db(b.return_loss.value_db)} @ {b.return_loss.at_hz / 1e9:.6g}"
                + (f" {b.return_loss.end}" if b.return_loss.end else ""),
                _f(band.min_return_loss, ".2f"),
                verdict(b.passed),
            ]
        )
    return rows


BAND_HEADS = (
    ["band", "GHz", "points", "worst loss @ GHz", "max loss", "worst return loss @ GHz"]
    + ["min return loss", "result"],
    ["", "", "", "dB", "dB", "dB", "dB", ""],
)


def mode_band_rows(budget) -> list[list[str]]:
    """For a differential channel: each band's worst common-mode loss and largest mode
    conversion (Scd21, Scd11/Scd22 as S-parameters in dB) with where they occur."""
    rows = []
    for b in budget.bands:
        if b.common_mode_loss is None:
            continue
        rows.append(
            [
                b.band.name,
                f"{_db(b.common_mode_loss.value_db)} @ {b.common_mode_loss.at_hz / 1e9:.6g}",
                f"{_db(-b.far_conversion.value_db, '.1f')} @ {b.far_conversion.at_hz / 1e9:.6g}",
                f"{_db(-b.near_conversion.value_db, '.1f')} @ "
                f"{b.near_conversion.at_hz / 1e9:.6g} {b.near_conversion.end}",
            ]
        )
    return rows


MODE_BAND_HEADS = (
    ["band", "worst common-mode loss @ GHz", "largest Scd21 @ GHz", "largest Scd11/Scd22 @ GHz"],
    ["", "dB", "dB", "dB"],
)


def mask_rows(budget) -> list[list[str]]:
    rows = []
    for m in budget.masks:
        mk = m.mask
        rows.append(
            [
                mk.name,
                mk.quantity,
                "maximum" if mk.kind == "max" else "minimum",
                f"{mk.start / 1e9:.6g}..{mk.stop / 1e9:.6g}"
                + (" (log f)" if mk.log_frequency else ""),
                f"{_db(m.worst_margin_db, '+.3f')} @ {m.worst_margin_hz / 1e9:.6g}"
                + (f" {m.end}" if m.end else ""),
                _db(m.value_db),
                f"{m.limit_db:.2f}",
                verdict(m.passed),
            ]
        )
    return rows


MASK_HEADS = (
    ["mask", "quantity", "limit", "GHz", "worst margin @ GHz", "value", "limit", "result"],
    ["", "", "", "", "dB", "dB", "dB", ""],
)


def fit_lines(fit, budget=None) -> list[str]:
    """The fitted insertion loss for the terminal: its coefficients and ILD when the fit
    applies, else why there is none."""
    if fit is None:
        return []
    if isinstance(fit, FitOff):
        return [f"fitted insertion loss: none ({fit.reason})"]
    out = [
        "fitted insertion loss a0 + a1*sqrt(f) + a2*f + a4*f^2 (f in GHz), least squares "
        f"over {fit.band.start / 1e9:.6g}..{fit.band.stop / 1e9:.6g} GHz",
        f"  band: {fit.band.rule}",
    ]
    if not fit.applies:
        out.append(f"  does not apply, no coefficients or ILD quoted: {fit.reason}")
        return out
    a0, a1, a2, a4 = fit.coefficients
    out.append(
        f"  a0 = {a0:.4g} dB, a1 = {a1:.4g} dB/sqrt(GHz), a2 = {a2:.4g} dB/GHz, "
        f"a4 = {a4:.4g} dB/GHz^2"
    )
    ny = budget.nyquist if budget is not None else None
    if ny is not None:
        out.append(
            f"  fitted loss at Nyquist {float(fit.fitted_db(ny.at)[0]):.2f} dB "
            f"(channel {ny.total_db:.2f} dB)"
        )
    out.append(
        f"  ILD (channel minus fit): peak {fit.ild_peak_db:+.2f} dB at "
        f"{fit.ild_peak_hz / 1e9:.4g} GHz, rms {fit.ild_rms_db:.2f} dB"
    )
    return out


def budget_text(budget, fit=None) -> str:
    """The budget and the fit for the terminal (``budget``: a ChannelBudget or None;
    ``fit``: a LossFit, a FitOff or None)."""
    out: list[str] = []
    if budget is None or not budget.judged:
        out.append("no [budget] limits: nothing is judged (--strict passes)")
    else:
        if budget.points:
            out += _points_text(budget)
        if budget.bands:
            out.append("bands: judged at every sweep point inside (worst value and where)")
            out.append(table(*BAND_HEADS, band_rows(budget), left=1))
            modes = mode_band_rows(budget)
            if modes:
                out.append(table(*MODE_BAND_HEADS, modes, left=1))
        if budget.masks:
            out.append("limit masks: judged at every sweep point of their span")
            out.append(table(*MASK_HEADS, mask_rows(budget), left=3))
        ny = budget.nyquist
        overall = "PASS" if budget.passed else "FAIL"
        if ny is not None and ny.margin_db is not None:
            head = f"budget: {overall}, margin {ny.margin_db:+.2f} dB at Nyquist"
        else:
            head = f"budget: {overall}"
        failed = [pb.point.label for pb in budget.points if not pb.passed]
        failed += [b.band.name for b in budget.bands if not b.passed]
        failed += [m.mask.name for m in budget.masks if not m.passed]
        if failed:
            head += f"; failing: {', '.join(failed)}"
        out.append(head)
    lines = fit_lines(fit, budget)
    if lines:
        if out:
            out.append("")
        out += lines
    return "\n".join(out)


# ----------------------------------------------------------------------- files


CSV_COLUMNS = (
    "point",
    "frequency_ghz",
    "row",
    "kind",
    "quantity",
    "value_db",
    "db_per_in",
    "share_of_max_loss_pct",
    "limit_db",
    "margin_db",
    "result",
)


def _cell(v) -> str:
    if v is None:
        return ""
    if isinstance(v, bool):
        return "pass" if v else "fail"
    if isinstance(v, float):
        return f"{v:.6f}"
    return str(v)


def _finite(v):
    return v if v is None or np.isfinite(v) else None


def limit_csv_rows(budget) -> list[list]:
    """The bands' and masks' lines of the CSV: a band's worst insertion and return loss
    (frequency = where it occurs), a mask's worst margin."""
    rows = []
    for b in budget.bands:
        band = b.band
        rows.append(
            [b.band.name, b.loss.at_hz / 1e9, "worst in band", "", "insertion loss"]
            + [_finite(b.loss.value_db), None, None, band.max_loss]
            + [_finite(b.loss_margin_db), b.loss_passed]
        )
        rows.append(
            [b.band.name, b.return_loss.at_hz / 1e9, "worst in band", b.return_loss.end]
            + ["return loss", _finite(b.return_loss.value_db), None, None, band.min_return_loss]
            + [_finite(b.return_loss_margin_db), b.return_loss_passed]
        )
    for m in budget.masks:
        rows.append(
            [m.mask.name, m.worst_margin_hz / 1e9, "worst margin on mask", m.end]
            + [m.mask.quantity.replace("-", " "), _finite(m.value_db), None, None, m.limit_db]
            + [_finite(m.worst_margin_db), m.passed]
        )
    return rows


def budget_csv(budget) -> str:
    """The budget as one tidy table: a line per (check point, row), then the bands' and
    masks' worst values (``kind`` holds the end of a return loss)."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(CSV_COLUMNS)
    for pb in budget.points:
        for r in budget_rows(pb):
            share = None if r["share"] is None else 100.0 * r["share"]
            w.writerow(
                [
                    _cell(pb.point.label),
                    _cell(pb.at / 1e9),
                    _cell(r["row"]),
                    _cell(r["kind"]),
                    _cell(r["quantity"]),
                    _cell(r["value_db"]),
                    _cell(r["db_per_in"]),
                    _cell(share),
                    _cell(r["limit_db"]),
                    _cell(r["margin_db"]),
                    _cell(r["result"]),
                ]
            )
    for row in limit_csv_rows(budget):
        w.writerow([_cell(v) for v in row])
    return buf.getvalue()


def budget_document(result, budget, fit) -> dict:
    """The content of ``<name>-budget.json``."""
    ny = budget.nyquist.at if budget is not None and budget.nyquist is not None else None
    return {
        "scenario": result.scenario.name,
        "losslane_version": __version__,
        "mode": "differential" if result.differential else "single-ended",
        "budget": None if budget is None else budget.to_json(),
        "fit": None if fit is None else fit.to_json(ny),
        "warnings": list(result.warnings),
    }


def _mode(result) -> str:
    return " (differential mode)" if result.differential else ""


def write_budget_files(
    result, budget, fit, stage: Path, stem: str, plots: bool = True
) -> tuple[list[Path], list[tuple[Path, str]]]:
    """Write the budget's files into the staging directory ``stage`` (``budget`` a
    ChannelBudget or None, ``fit`` a LossFit or None); returns the files and the charts
    with their captions (for the report page)."""
    stage = Path(stage)
    files: list[Path] = []
    has_points = budget is not None and bool(budget.points)
    if budget is not None and budget.judged:
        p = stage / f"{stem}-budget.csv"
        p.write_text(budget_csv(budget), encoding="utf-8")
        files.append(p)
    p = stage / f"{stem}-budget.json"
    p.write_text(json.dumps(budget_document(result, budget, fit), indent=2), encoding="utf-8")
    files.append(p)
    charts: list[tuple[Path, str]] = []
    if plots:
        name = result.scenario.name
        if has_points:
            p = budget_chart(
                stage / f"{stem}-budget.png",
                budget,
                f"{name}: where the loss goes{_mode(result)}",
            )
            files.append(p)
            charts.append((p, "Where the loss goes: each segment's own loss, stacked"))
        if fit is not None and not isinstance(fit, FitOff) and fit.applies:
            ny = budget.nyquist.at if has_points and budget.nyquist is not None else None
            p = ild_plot(
                stage / f"{stem}-ild.png",
                result.f,
                result.insertion_loss_db,
                fit,
                f"{name}: fitted insertion loss and deviation (ILD){_mode(result)}",
                ny,
                ylabel="Sdd21 (dB)" if result.differential else "20 log10 |S21| (dB)",
            )
            files.append(p)
            charts.append((p, "Fitted insertion loss and insertion-loss deviation"))
    return files, charts


# ----------------------------------------------------------------------- charts


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
        ax.set_title(point_title(pb, budget), fontsize=9, y=1.0)
        ax.set_xlabel("insertion loss (dB)")
        ax.grid(True, axis="x", alpha=0.3)
    ax0 = axes[0][0]
    ax0.set_yticks(y)
    labels = [f"{n} ({kd})" for n, kd in zip(names[:-2], kinds, strict=True)] + names[-2:]
    ax0.set_yticklabels(labels, fontsize=8)
    fig.suptitle(title, fontsize=11)
    fig.text(0.995, 0.005, NOTE, ha="right", va="bottom", fontsize=7, color="0.45")
    # room on the left for the longest row name (8 pt text), no measuring pass
    left = 0.35 + 0.06 * max(len(t) for t in labels)
    return finish(plt, fig, path, left=min(left, 0.5 * width), right=0.35, top=0.75, wspace=0.12)


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
    a1.set_title(title, fontsize=11, y=1.0)
    fig.text(0.995, 0.005, NOTE, ha="right", va="bottom", fontsize=7, color="0.45")
    return finish(plt, fig, path)


# ------------------------------------------------------------ limits drawn on the charts

#: the chart quantities and the mask quantities drawn on them
CHART_MASKS = {
    "insertion-loss": ("insertion-loss",),
    "return-loss": ("return-loss",),
    "mixed-mode": ("common-mode-loss", "far-end-conversion", "near-end-conversion"),
}


def _mask_line(mask, f: np.ndarray) -> LimitLine:
    """A mask as a line: its own points when straight in frequency, else its limit at the
    sweep points of its span (and its ends)."""
    if mask.log_frequency:
        inside = f[in_range(f, mask.start, mask.stop)]
        x = np.unique(np.concatenate([[mask.start], inside, [mask.stop]]))
        x = x[(x >= mask.start) & (x <= mask.stop)]
    else:
        x = np.asarray(mask.freqs)
    return LimitLine(f"mask: {mask.name}", x, mask.limit_at(x))


def chart_limits(scenario, f: np.ndarray, chart: str) -> tuple[list[Marker], list[LimitLine]]:
    """The markers (Nyquist, check points, with their limit on this chart) and the limit
    lines (bands, masks) of a chart: ``chart`` is 'insertion-loss', 'return-loss' or
    'mixed-mode'. Limits are positive dB."""
    budget = scenario.budget
    if budget is None:
        return [], []
    f = np.asarray(f, dtype=float)
    rl = chart == "return-loss"
    markers = []
    if budget.nyquist is not None and not rl:
        markers.append(
            Marker(budget.nyquist, f"Nyquist {budget.nyquist / 1e9:.6g} GHz", budget.max_loss)
        )
    for i, c in enumerate(budget.checks):
        if rl and c.min_return_loss is None:
            continue
        markers.append(
            Marker(
                c.at, f"check {i + 1} {c.at / 1e9:.6g} GHz", c.min_return_loss if rl else c.max_loss
            )
        )
    lines = []
    if chart != "mixed-mode":
        for b in band_list(budget, f):
            lim = b.min_return_loss if rl else b.max_loss
            if lim is not None:
                lines.append(
                    LimitLine(f"band: {b.name}", np.array([b.start, b.stop]), np.array([lim, lim]))
                )
    for m in budget.masks:
        if m.quantity in CHART_MASKS[chart]:
            lines.append(_mask_line(m, f))
    return markers, lines

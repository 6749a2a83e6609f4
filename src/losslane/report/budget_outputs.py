"""The budget's files of a build: ``<name>-budget.csv``, ``<name>-budget.json``, the
waterfall chart ``<name>-budget.png``, the fit chart ``<name>-ild.png`` and the page
``<name>-report.html``.

``budget_writer`` returns the callback for ``write_build(..., extra=...)``, so these files
are staged with the Touchstone file and plots and appear only when all are complete.
"""

from __future__ import annotations

import csv
import io
import json
from collections.abc import Callable, Sequence
from pathlib import Path

from losslane import __version__
from losslane.report.tables import budget_rows

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


def budget_csv(budget) -> str:
    """The budget as one tidy table: a line per (check point, row)."""
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
    return buf.getvalue()


def budget_document(result, budget, fit) -> dict:
    """The content of ``<name>-budget.json``."""
    ny = budget.nyquist.at if budget is not None and budget.nyquist is not None else None
    return {
        "scenario": result.scenario.name,
        "losslane_version": __version__,
        "mode": "single-ended" if result.nports == 2 else "differential",
        "budget": None if budget is None else budget.to_json(),
        "fit": None if fit is None else fit.to_json(ny),
        "warnings": list(result.warnings),
    }


def _mode(result) -> str:
    return "" if result.nports == 2 else " (differential mode)"


def budget_writer(budget, fit, plots: bool = True) -> Callable[[object, Path, str], list[Path]]:
    """The ``extra=`` callback of ``write_build`` writing the budget's files into the
    staging directory (``budget`` a ChannelBudget or None, ``fit`` a LossFit or None)."""

    def write(result, stage: Path, stem: str) -> list[Path]:
        stage = Path(stage)
        files: list[Path] = []
        has_points = budget is not None and bool(budget.points)
        if has_points:
            p = stage / f"{stem}-budget.csv"
            p.write_text(budget_csv(budget), encoding="utf-8")
            files.append(p)
        p = stage / f"{stem}-budget.json"
        p.write_text(json.dumps(budget_document(result, budget, fit), indent=2), encoding="utf-8")
        files.append(p)
        charts: list[tuple[Path, str]] = []
        if plots:
            from losslane.report.budget_plots import budget_chart, ild_plot

            name = result.scenario.name
            if has_points:
                p = budget_chart(
                    stage / f"{stem}-budget.png",
                    budget,
                    f"{name}: where the loss goes{_mode(result)}",
                )
                files.append(p)
                charts.append((p, "Where the loss goes: each segment's own loss, stacked"))
            if fit is not None:
                ny = budget.nyquist.at if has_points and budget.nyquist is not None else None
                p = ild_plot(
                    stage / f"{stem}-ild.png",
                    result.f,
                    result.insertion_loss_db,
                    fit,
                    f"{name}: fitted insertion loss and deviation (ILD){_mode(result)}",
                    ny,
                    ylabel="20 log10 |S21| (dB)" if result.nports == 2 else "Sdd21 (dB)",
                )
                files.append(p)
                charts.append((p, "Fitted insertion loss and insertion-loss deviation"))
        html_path = stage / f"{stem}-report.html"
        names = sorted(q.name for q in stage.iterdir() if q.is_file())
        names = sorted(set(names) | {html_path.name})
        html_path.write_text(
            report_html(result, budget, fit, stage, stem, charts, names), encoding="utf-8"
        )
        files.append(html_path)
        return files

    return write


def report_html(
    result,
    budget,
    fit,
    stage: Path,
    stem: str,
    charts: Sequence[tuple[Path, str]],
    names: Sequence[str],
) -> str:
    """The self-contained page: the channel plots already staged (insertion and return
    loss) and the budget charts, embedded."""
    from losslane.report.build_outputs import summary_rows
    from losslane.report.html import Figure, render_report

    sc = result.scenario
    figures = []
    for suffix, caption in (
        ("insertion-loss", "Insertion loss, cumulative through each segment"),
        ("return-loss", "Return loss at both ends"),
    ):
        p = Path(stage) / f"{stem}-{suffix}.png"
        if p.is_file():
            figures.append(Figure(caption, p.read_bytes()))
    figures += [Figure(caption, Path(p).read_bytes()) for p, caption in charts]
    f = result.f
    meta = [
        f"{len(result.blocks)} segments, {result.nports}-port"
        + (" (differential pair)" if result.nports == 4 else "")
        + f", reference {sc.ports.reference:g} ohm per port"
        + (f", port order {sc.ports.order}" if result.nports == 4 else ""),
        f"sweep {f[0] / 1e9:g}..{f[-1] / 1e9:g} GHz, {f.size} points",
        f"built by losslane {__version__} from "
        + (sc.path.name if sc.path is not None else "a scenario"),
    ]
    models = [seg.path.name for seg in sc.channel if seg.type == "touchstone" and seg.path]
    if models:
        meta.append("imported Touchstone models: " + ", ".join(models))
    return render_report(
        title=f"{sc.name}: channel report",
        meta=meta,
        budget=budget,
        fit=fit,
        summary=summary_rows(result),
        figures=figures,
        warnings=list(result.warnings),
        scenario_name=sc.path.name if sc.path is not None else "scenario",
        scenario_text=sc.source_text,
        files=names,
        mode=_mode(result),
    )

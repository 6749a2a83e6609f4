"""A built channel's outputs: the Touchstone file, the insertion-loss, return-loss and
mixed-mode charts, the terminal and JSON summary, and the writing of a whole build.

Everything is written into a staging directory beside the output directory and moved
into place only when every file is complete, so a failed build leaves nothing behind.
"""

from __future__ import annotations

import re
import shutil
import tempfile
from collections.abc import Sequence
from pathlib import Path

import numpy as np

from losslane import __version__
from losslane.channel import ChannelResult
from losslane.errors import LossLaneError
from losslane.report.budget import budget_text, write_budget_files
from losslane.report.charts import Curve, Marker, db_plot, db_text, to_db
from losslane.report.models import models_text
from losslane.report.page import guarantee_lines, report_html
from losslane.report.text import CAUTION, table
from losslane.report.timeviews import build_summary_lines, build_view_files


def slug(name: str) -> str:
    s = re.sub(r"[^A-Za-z0-9]+", "-", name.strip().lower()).strip("-")
    return s or "channel"


def prepare_out_dir(out: Path | str) -> Path:
    """Check the output directory is usable before any work is done."""
    p = Path(out)
    if p.exists() and not p.is_dir():
        raise LossLaneError(
            f"--out {str(p)!r} is an existing file, not a directory; choose a directory name"
        )
    parent = p.resolve().parent
    if not parent.exists():
        raise LossLaneError(
            f"--out {str(p)!r}: the parent directory {str(parent)!r} does not exist"
        )
    return p


def summary_frequencies(result: ChannelResult) -> list[float]:
    """Where to quote IL/RL: the budget's Nyquist and check points, else four even points."""
    sc = result.scenario
    f = result.f
    out: list[float] = []
    if sc.budget is not None:
        if sc.budget.nyquist is not None:
            out.append(sc.budget.nyquist)
        out += [c.at for c in sc.budget.checks]
    if not out:
        top = f[-1]
        out = [top * k / 4 for k in (1, 2, 3, 4)]
    return sorted({x for x in out if f[0] <= x <= f[-1]})


def _at(f: np.ndarray, y: np.ndarray, x: float) -> float:
    return float(np.interp(x, f, y))


def summary_rows(result: ChannelResult) -> list[dict]:
    rl_in, rl_out = result.return_loss
    mm = result.main_mixed_mode
    rows = []
    for x in summary_frequencies(result):
        row = {
            "at_hz": x,
            "insertion_loss_db": _at(result.f, result.insertion_loss_db, x),
            "return_loss_in_db": _at(result.f, rl_in, x),
            "return_loss_out_db": _at(result.f, rl_out, x),
        }
        if mm is not None:
            row["common_mode_loss_db"] = _at(result.f, -to_db(mm.cc[:, 1, 0]), x)
            row["mode_conversion_db"] = _at(result.f, to_db(mm.cd[:, 1, 0]), x)  # Scd21
            row["mode_conversion_near_db"] = _at(result.f, to_db(mm.cd[:, 0, 0]), x)  # Scd11
        rows.append(row)
    return rows


def check_markers(result: ChannelResult) -> list[Marker]:
    """The budget's Nyquist and check points as chart markers (with their loss limits)."""
    sc = result.scenario
    markers = []
    if sc.budget is not None:
        if sc.budget.nyquist is not None:
            markers.append(Marker(sc.budget.nyquist, "Nyquist", sc.budget.max_loss))
        for c in sc.budget.checks:
            markers.append(Marker(c.at, f"check {c.at / 1e9:g} GHz", c.max_loss))
    return markers


def plot_files(
    result: ChannelResult, stage: Path, stem: str, overlay=None
) -> list[tuple[Path, str]]:
    """The channel's charts, written into ``stage``: insertion loss (cumulative through
    each segment), return loss, mixed mode for a pair, with the budget's limits drawn;
    then the focus chart and a 2-port's RF views (``report.rf``). ``[(path, caption)]``.
    ``overlay`` (a measure.overlay.MeasuredOverlay or None) adds the measured curves to
    the insertion- and return-loss charts."""
    from losslane.report.budget import chart_limits
    from losslane.report.overlay import measured_il_curves, measured_rl_curves
    from losslane.report.rf import focus_of, rf_charts

    sc = result.scenario
    f = result.f
    mode = " (differential mode)" if result.differential else ""
    import matplotlib

    cmap = matplotlib.colormaps["viridis"]
    k = len(result.blocks)
    curves = []
    for i, (blk, cum) in enumerate(zip(result.blocks, result.cumulative_loss_db, strict=True)):
        if i == k - 1:
            continue
        curves.append(
            Curve(
                f"through {i + 1}: {blk.name}", -cum, "-", 0.9, cmap(0.15 + 0.7 * i / max(k - 1, 1))
            )
        )
    curves.append(Curve("whole channel", -result.insertion_loss_db, "-", 2.2, "black"))
    curves += measured_il_curves(overlay)
    markers, lines = chart_limits(sc, f, "insertion-loss")
    # [plots] loss_range sets this chart's axis when no focused chart takes it
    lr = sc.plots.loss_range
    il_ylim = None if lr is None or focus_of(sc, f) is not None else (-lr[1], -lr[0])
    il = db_plot(
        stage / f"{stem}-insertion-loss.png",
        f,
        curves,
        f"{sc.name}: insertion loss{mode}, cumulative through each segment",
        ("Sdd21" if result.differential else "S21") + " (dB), insertion loss below 0",
        markers,
        floor_db=-200,
        limits=lines,
        ylim=il_ylim,
    )
    rl_in, rl_out = result.return_loss
    markers, lines = chart_limits(sc, f, "return-loss")
    rl = db_plot(
        stage / f"{stem}-return-loss.png",
        f,
        [
            Curve("input (port 1)" if not mode else "input", -rl_in, "-", 1.4),
            Curve("output (port 2)" if not mode else "output", -rl_out, "--", 1.4),
            *measured_rl_curves(overlay),
        ],
        f"{sc.name}: return loss{mode}",
        "20 log10 |S11|, |S22| (dB)",
        markers,
        floor_db=-80,
        limits=lines,
    )
    files = [
        (il, "Insertion loss, cumulative through each segment"),
        (rl, "Return loss at both ends"),
    ]
    mm = result.main_mixed_mode
    if mm is not None:
        markers, lines = chart_limits(sc, f, "mixed-mode")
        mixed = db_plot(
            stage / f"{stem}-mixed-mode.png",
            f,
            [
                Curve("Sdd21 differential through", to_db(mm.dd[:, 1, 0]), "-", 2.0, "black"),
                Curve("Scc21 common-mode through", to_db(mm.cc[:, 1, 0]), "-", 1.3, "tab:blue"),
                Curve(
                    "Scd21 differential -> common (far end)",
                    to_db(mm.cd[:, 1, 0]),
                    "-",
                    1.3,
                    "tab:red",
                ),
                Curve(
                    "Scd11 differential -> common (near end)",
                    to_db(mm.cd[:, 0, 0]),
                    "--",
                    1.1,
                    "tab:orange",
                ),
            ],
            f"{sc.name}: mixed-mode S-parameters (differential {mm.z_diff:g} ohm, common "
            f"{mm.z_common:g} ohm)",
            "dB",
            markers,
            floor_db=-120,
            limits=lines,
        )
        files.append(
            (
                mixed,
                "Mixed-mode S-parameters: differential and common-mode through, and the "
                "mode conversion at both ends",
            )
        )
    return files + rf_charts(result, stage, stem)


def write_build(
    result: ChannelResult,
    budget,
    fit,
    summary: list[dict],
    out_dir: Path | str,
    version: int = 1,
    form: str = "ri",
    plots: bool = True,
    overlay=None,
    crosstalk=None,
    views=None,
) -> list[Path]:
    """Write the build's files into ``out_dir`` (checked with ``prepare_out_dir``): the
    Touchstone file, the channel charts, the budget's files and the report page; returns
    their final paths. ``budget``/``fit``: a ChannelBudget/LossFit or None; ``summary``:
    the rows of ``summary_rows``; ``overlay``: a measurement to show beside the model
    (``measure.overlay.MeasuredOverlay``) or None; ``crosstalk``: a CrosstalkResult of a
    channel on group lines (its victim's own file and charts are written too); ``views``
    the quality and time-domain views of the written S-parameters (an Inspection, charted
    and on the page; None: left out)."""
    from losslane.network.touchstone import write_touchstone
    from losslane.report.crosstalk import port_lines, write_crosstalk_files
    from losslane.report.overlay import write_overlay_files

    out = Path(out_dir)
    stem = slug(result.scenario.name)
    # staged beside the output directory, so nothing appears in it until all is written
    stage = Path(tempfile.mkdtemp(prefix=".losslane-build-", dir=out.resolve().parent))
    try:
        files = [
            write_touchstone(
                result.network,
                stage / f"{stem}.s{result.nports}p",
                version=version,
                form=form,
                scenario=result.scenario.name,
                order=result.scenario.ports.order,
                comments=[
                    f"built by losslane {__version__} from "
                    f"{result.scenario.path.name if result.scenario.path else 'a scenario'}",
                    "estimate: confirm against the fabricator's stackup and measured test coupons",
                    *guarantee_lines(result),
                    *port_lines(result),
                ],
            )
        ]
        xt_files, xt_charts = write_crosstalk_files(
            result, crosstalk, stage, stem, version, form, plots
        )
        files += xt_files
        charts = plot_files(result, stage, stem, overlay) if plots else []
        files += [p for p, _ in charts]
        ov_files = write_overlay_files(
            overlay, result.scenario.name, stage, stem, plots, check_markers(result)
        )
        files += ov_files
        charts += [
            (p, "Model minus measurement: insertion and return loss")
            for p in ov_files
            if p.name.endswith("-measured-difference.png")
        ]
        budget_files, budget_charts = write_budget_files(result, budget, fit, stage, stem, plots)
        files += budget_files
        view_files, view_charts = build_view_files(views, stage, stem, result.scenario.name, plots)
        files += view_files
        charts += budget_charts + xt_charts + view_charts
        page = stage / f"{stem}-report.html"
        names = sorted({p.name for p in files} | {page.name})
        page.write_text(
            report_html(result, budget, fit, charts, names, summary, overlay, crosstalk, views),
            encoding="utf-8",
        )
        files.append(page)
        final = []
        out.mkdir(exist_ok=True)
        for p in files:
            target = out / p.name
            p.replace(target)
            final.append(target)
        return final
    finally:
        shutil.rmtree(stage, ignore_errors=True)


def summary_text(
    result: ChannelResult,
    summary: list[dict],
    files: list[Path],
    sections: Sequence[str] = (),
) -> str:
    """The terminal summary (``summary``: the rows of ``summary_rows``); ``sections``
    (e.g. the loss budget) go before the file list."""
    sc = result.scenario
    four = result.differential
    mode = " (differential mode)" if four else ""
    heads = ["frequency", "insertion loss", "return loss in", "return loss out"]
    units = ["GHz", "dB", "dB", "dB"]
    if four:
        heads += ["common-mode loss", "Scd21", "Scd11"]
        units += ["dB", "dB", "dB"]
    rows = []
    for r in summary:
        row = [
            f"{r['at_hz'] / 1e9:.4g}",
            f"{r['insertion_loss_db']:.2f}",
            f"{r['return_loss_in_db']:.1f}",
            f"{r['return_loss_out_db']:.1f}",
        ]
        if four:
            row += [
                db_text(r["common_mode_loss_db"], ".2f", ""),
                db_text(r["mode_conversion_db"], ".1f", ""),
                db_text(r["mode_conversion_near_db"], ".1f", ""),
            ]
        rows.append(row)
    head = (
        f"{sc.name}: {len(result.blocks)} segments, {result.nports}-port, "
        f"{result.f.size} points {result.f[0] / 1e9:g}..{result.f[-1] / 1e9:g} GHz, "
        f"reference {sc.ports.reference:g} ohm"
        + (f", port order {sc.ports.order}" if result.nports >= 4 else "")
        + (f", victim {result.victim}" if result.victim else "")
    )
    out = [head, "", f"insertion and return loss{mode}", table(heads, units, rows)]
    if result.imports:
        out += ["", "imported models (IEEE 370 quality, as read)"]
        out += [f"  {c.summary()}" for c in result.imports]
        out += [f"  {line}" for line in guarantee_lines(result)]
    for sec in sections:
        if sec:
            out += ["", sec]
    if files:
        out += ["", "files written:"] + [f"  {p}" for p in files]
    out += ["", CAUTION]
    return "\n".join(out)


def summary_json(result: ChannelResult, summary: list[dict], files: list[Path]) -> dict:
    touch = next((str(p) for p in files if re.search(r"\.s\d+p$", p.name)), None)
    return {
        "touchstone": touch,
        "ports": result.nports,
        "points": int(result.f.size),
        "files": [str(p) for p in files],
        "port_order": result.scenario.ports.order if result.nports >= 4 else None,
        "reference_ohm": result.scenario.ports.reference,
        "summary": summary,
        "imports": [c.to_json() for c in result.imports],
        "guaranteed_passive_reciprocal": result.guaranteed,
    }


def build_text(build) -> str:
    """The terminal summary of a build (an ``api.BuildResult``): the channel's losses, the
    budget and the fit, the models used, the time-domain views and quality, the measurement
    beside the model, the crosstalk, the files written."""
    from losslane.report.crosstalk import crosstalk_text
    from losslane.report.overlay import overlay_text

    sections = [
        models_text(build.channel),
        "\n".join(build_summary_lines(getattr(build, "views", None))),
        budget_text(build.budget, build.fit),
        overlay_text(getattr(build, "overlay", None)),
        crosstalk_text(getattr(build, "crosstalk", None)),
    ]
    return summary_text(build.channel, build.summary, build.files, sections=sections)

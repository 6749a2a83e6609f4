"""One self-contained HTML page per build, to send to a colleague.

Everything the page shows is inside the file: the charts are embedded as base64
``data:image/png`` URIs, the styling is an inline ``<style>`` block, and there are no
scripts, no web fonts and no links to anything outside the file, so it opens the same
from an e-mail attachment, offline, in any browser. All text from the scenario is
HTML-escaped.
"""

from __future__ import annotations

import base64
from collections.abc import Sequence
from dataclasses import dataclass
from html import escape
from pathlib import Path

from losslane import __version__
from losslane.budget import FitOff
from losslane.report.budget import (
    BAND_HEADS,
    MASK_HEADS,
    MODE_BAND_HEADS,
    band_rows,
    budget_rows,
    mask_rows,
    mode_band_rows,
    point_title,
)
from losslane.report.charts import db_text
from losslane.report.models import models_lines
from losslane.report.text import CAUTION, verdict
from losslane.report.timeviews import build_section_html

STYLE = """
body { font-family: sans-serif; margin: 1.5em auto; max-width: 70em; color: #222;
       line-height: 1.4; padding: 0 1em; }
h1 { font-size: 1.5em; margin-bottom: 0.2em; }
h2 { font-size: 1.2em; border-bottom: 1px solid #ccc; padding-bottom: 0.2em; margin-top: 1.6em; }
h3 { font-size: 1.02em; margin-bottom: 0.3em; }
.meta { color: #555; font-size: 0.92em; }
.caution { background: #fff6e0; border-left: 4px solid #e0a000; padding: 0.6em 0.9em; }
.verdict { font-size: 1.15em; padding: 0.5em 0.9em; display: inline-block; border-radius: 4px; }
.pass { background: #e3f4e6; border: 1px solid #3c9a50; }
.fail { background: #fbe4e4; border: 1px solid #c0392b; }
table { border-collapse: collapse; margin: 0.4em 0 1em 0; font-size: 0.92em; }
th, td { border: 1px solid #ccc; padding: 0.25em 0.6em; }
th { background: #f0f0f0; text-align: left; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
tr.sum td { font-weight: bold; background: #fafafa; }
td.FAIL { color: #b00; font-weight: bold; }
figure { margin: 1em 0; }
figure img { max-width: 100%; border: 1px solid #ddd; }
figcaption { color: #555; font-size: 0.9em; }
pre { background: #f6f6f6; border: 1px solid #ddd; padding: 0.8em; overflow-x: auto;
      font-size: 0.85em; }
"""


@dataclass(frozen=True)
class Figure:
    """A chart for the page: its caption and the PNG bytes."""

    caption: str
    png: bytes


def data_uri(png: bytes) -> str:
    return "data:image/png;base64," + base64.b64encode(png).decode("ascii")


def page_head(title: str) -> list[str]:
    """The opening lines of a self-contained page (the style sheet inline) up to its
    heading; the caller adds the body and closes with ``PAGE_END``."""
    return [
        "<!DOCTYPE html>",
        '<html lang="en">',
        "<head>",
        '<meta charset="utf-8">',
        f"<title>{escape(title)}</title>",
        f"<style>{STYLE}</style>",
        "</head>",
        "<body>",
        f"<h1>{escape(title)}</h1>",
    ]


PAGE_END = ("</body>", "</html>", "")


def figure_html(caption: str, png: bytes) -> str:
    """One chart embedded in the page, with its caption."""
    return (
        f'<figure><img src="{data_uri(png)}" alt="{escape(caption)}">'
        f"<figcaption>{escape(caption)}</figcaption></figure>"
    )


def _num(v: float | None, fmt: str) -> str:
    return "-" if v is None else format(v, fmt)


def _td(text: str, cls: str = "num") -> str:
    return f'<td class="{cls}">{escape(text)}</td>'


def _budget_table(pb) -> str:
    head = (
        "<tr><th>row</th><th>kind</th><th>loss (dB)</th><th>line loss (dB/in)</th>"
        "<th>share of max loss</th><th>limit (dB)</th><th>margin (dB)</th><th>result</th></tr>"
    )
    body = []
    for r in budget_rows(pb):
        share = "-" if r["share"] is None else f"{100 * r['share']:.1f} %"
        res = verdict(r["result"])
        cls = ' class="sum"' if r["row"] == "total" else ""
        body.append(
            f"<tr{cls}><td>{escape(r['row'])}</td><td>{escape(r['kind'])}</td>"
            + _td(f"{r['value_db']:.2f}")
            + _td(_num(r["db_per_in"], ".3f"))
            + _td(share)
            + _td(_num(r["limit_db"], ".2f"))
            + _td(_num(r["margin_db"], "+.2f"))
            + _td(res, "num FAIL" if res == "FAIL" else "num")
            + "</tr>"
        )
    return "<table>" + head + "".join(body) + "</table>"


def _checks_table(budget) -> str:
    head = (
        "<tr><th>point</th><th>frequency (GHz)</th><th>insertion loss (dB)</th>"
        "<th>max loss (dB)</th><th>return loss, worse end (dB)</th>"
        "<th>min return loss (dB)</th><th>result</th></tr>"
    )
    body = []
    for pb in budget.points:
        res = verdict(pb.passed)
        body.append(
            f"<tr><td>{escape(pb.point.label)}</td>"
            + _td(f"{pb.at / 1e9:.6g}")
            + _td(f"{pb.total_db:.2f}")
            + _td(_num(pb.allowance_db, ".2f"))
            + _td(f"{pb.return_loss_db:.1f}")
            + _td(_num(pb.point.min_return_loss, ".1f"))
            + _td(res, "num FAIL" if res == "FAIL" else "num")
            + "</tr>"
        )
    return "<table>" + head + "".join(body) + "</table>"


def _fit_section(fit, budget) -> str:
    if fit is None or isinstance(fit, FitOff):
        reason = "the sweep is too coarse for the four-term fit" if fit is None else fit.reason
        return f"<p>No fitted insertion loss: {escape(reason)}.</p>"
    if not fit.applies:
        return (
            "<p>The fitted insertion loss a0 + a1&#183;&#8730;f + a2&#183;f + a4&#183;f&#178; "
            f"over {fit.band.start / 1e9:.6g} .. {fit.band.stop / 1e9:.6g} GHz "
            "<strong>does not apply</strong> to this channel, so no coefficients or ILD are "
            f"quoted: {escape(fit.reason or '')}.</p>"
        )
    a0, a1, a2, a4 = fit.coefficients
    rows = [
        ("fit band", f"{fit.band.start / 1e9:.6g} .. {fit.band.stop / 1e9:.6g} GHz"),
        ("how the band was chosen", fit.band.rule),
        ("sweep points in the band", f"{fit.f.size}"),
        ("a0", f"{a0:.5g} dB"),
        ("a1", f"{a1:.5g} dB/sqrt(GHz)"),
        ("a2", f"{a2:.5g} dB/GHz"),
        ("a4", f"{a4:.5g} dB/GHz^2"),
    ]
    ny = budget.nyquist if budget is not None else None
    if ny is not None:
        rows.append(
            (
                "fitted loss at Nyquist",
                f"{float(fit.fitted_db(ny.at)[0]):.2f} dB (channel {ny.total_db:.2f} dB)",
            )
        )
    rows += [
        (
            "ILD peak (channel minus fit)",
            f"{fit.ild_peak_db:+.2f} dB at {fit.ild_peak_hz / 1e9:.4g} GHz",
        ),
        ("ILD rms over the band", f"{fit.ild_rms_db:.2f} dB"),
    ]
    body = "".join(f"<tr><th>{escape(k)}</th><td>{escape(v)}</td></tr>" for k, v in rows)
    return (
        "<p>Least-squares fit of IL_fit(f) = a0 + a1&#183;&#8730;f + a2&#183;f + a4&#183;f&#178; "
        "(f in GHz, equal weights on the sweep points of the band) to the channel's insertion "
        "loss; the deviation ILD = IL &#8722; IL_fit shows ripple from reflections that a "
        "smooth loss curve does not have.</p><table>" + body + "</table>"
    )


# ------------------------------------------------------------- bands, masks, ripples


def _text_table(heads: Sequence[str], units: Sequence[str], rows, left: int = 1) -> str:
    """A table of text cells (the terminal's rows): names left, numbers right; a FAIL
    cell marked."""
    head = "".join(
        f"<th>{escape(h)}" + (f" ({escape(u)})" if u else "") + "</th>"
        for h, u in zip(heads, units, strict=True)
    )
    body = []
    for row in rows:
        cells = []
        for i, v in enumerate(row):
            if i < left:
                cells.append(f"<td>{escape(v)}</td>")
            else:
                cells.append(_td(v, "num FAIL" if v == "FAIL" else "num"))
        body.append("<tr>" + "".join(cells) + "</tr>")
    return "<table><tr>" + head + "</tr>" + "".join(body) + "</table>"


def _limits_section(budget) -> list[str]:
    """The bands' and masks' tables, the mode quantities in each band, and the point checks
    that sit on a ripple."""
    parts = []
    if budget.bands:
        parts.append('<h2 id="bands">Bands</h2>')
        parts.append(
            "<p>Each band is judged at every sweep point inside it, both ends included: the "
            "worst insertion loss and the worst return loss (the worse end) with the "
            "frequency where each occurs.</p>"
        )
        parts.append(_text_table(*BAND_HEADS, band_rows(budget)))
        modes = mode_band_rows(budget)
        if modes:
            parts.append(
                "<p>Common-mode loss and mode conversion in each band (Scd as "
                "20&#183;log10|S|, the largest in the band).</p>"
            )
            parts.append(_text_table(*MODE_BAND_HEADS, modes))
    if budget.masks:
        parts.append('<h2 id="masks">Limit masks</h2>')
        parts.append(
            "<p>Each mask is judged at every sweep point of its span; the margin is the "
            "distance to the limit line (negative: the limit is broken).</p>"
        )
        parts.append(_text_table(*MASK_HEADS, mask_rows(budget), left=4))
    notes = [n.text() for n in budget.ripples if n.on_ripple]
    if notes:
        parts.append('<h2 id="ripples">Point checks on a ripple</h2>')
        parts.append(
            "<p>A point check reads the curve at one frequency. Within &#177;5 % of these "
            "points the curve is worse than at the point: a band ([[budget.band]]) judges "
            "every sweep point instead.</p>"
        )
        parts.append("<ul>" + "".join(f"<li>{escape(n)}</li>" for n in notes) + "</ul>")
    return parts


def _summary_table(summary: Sequence[dict]) -> str:
    """Insertion and return loss at the quoted frequencies; for a differential channel also
    the common-mode loss and the mode conversion (Scd21, Scd11)."""
    pairs = bool(summary) and "common_mode_loss_db" in summary[0]
    head = (
        "<tr><th>frequency (GHz)</th><th>insertion loss (dB)</th>"
        "<th>return loss in (dB)</th><th>return loss out (dB)</th>"
    )
    if pairs:
        head += "<th>common-mode loss (dB)</th><th>Scd21 (dB)</th><th>Scd11 (dB)</th>"
    rows = []
    for r in summary:
        row = (
            "<tr>"
            + _td(f"{r['at_hz'] / 1e9:.6g}")
            + _td(f"{r['insertion_loss_db']:.2f}")
            + _td(f"{r['return_loss_in_db']:.1f}")
            + _td(f"{r['return_loss_out_db']:.1f}")
        )
        if pairs:
            row += (
                _td(db_text(r["common_mode_loss_db"], ".2f", ""))
                + _td(db_text(r["mode_conversion_db"], ".1f", ""))
                + _td(db_text(r["mode_conversion_near_db"], ".1f", ""))
            )
        rows.append(row + "</tr>")
    return "<table>" + head + "</tr>" + "".join(rows) + "</table>"


def render_report(
    *,
    title: str,
    meta: Sequence[str],
    budget,
    fit,
    summary: Sequence[dict],
    figures: Sequence[Figure],
    warnings: Sequence[str],
    scenario_name: str,
    scenario_text: str,
    files: Sequence[str],
    mode: str = "",
    sections: Sequence[str] = (),
) -> str:
    """The page as text. ``budget`` a ChannelBudget or None, ``fit`` a LossFit or None,
    ``summary`` the rows of the terminal summary (at_hz, insertion_loss_db,
    return_loss_in_db, return_loss_out_db); ``sections``: more HTML sections (crosstalk),
    placed before the charts."""
    parts = page_head(title) + [
        "".join(f'<p class="meta">{escape(m)}</p>' for m in meta),
        f'<p class="caution"><strong>Caution:</strong> {escape(CAUTION)}</p>',
    ]
    parts.append('<h2 id="verdict">Does it fit?</h2>')
    if budget is None or not budget.judged:
        parts.append(
            "<p>No limits: the scenario has no [budget] data_rate, [[budget.check]], "
            "[[budget.band]] or [[budget.mask]] entries, so nothing is judged. The loss "
            "figures below still apply.</p>"
        )
    else:
        ok = budget.passed
        ny = budget.nyquist
        text = "All checks pass." if ok else "At least one check fails."
        if ny is not None and ny.margin_db is not None:
            text += f" Margin at Nyquist: {ny.margin_db:+.2f} dB."
        cls = "pass" if ok else "fail"
        parts.append(f'<p class="verdict {cls}">{escape(text)}</p>')
        if budget.points:
            parts.append(_checks_table(budget))
        parts += _limits_section(budget)
    if budget is not None and budget.points:
        parts.append(f'<h2 id="budget">Where the loss goes{escape(mode)}</h2>')
        parts.append(
            "<p>Each segment's own insertion loss, that block alone between matched "
            "references; the row <em>reflections and interaction</em> is the cascaded total "
            "minus the sum of the parts (negative where reflections happen to cancel). Line "
            "loss per inch is the line model's attenuation of the matched line.</p>"
        )
        for pb in budget.points:
            parts.append(f"<h3>{escape(point_title(pb, budget))}</h3>")
            parts.append(_budget_table(pb))
    parts.append('<h2 id="fit">Fitted insertion loss and deviation</h2>')
    parts.append(_fit_section(fit, budget))
    parts.append(f'<h2 id="summary">Insertion and return loss{escape(mode)}</h2>')
    parts.append(_summary_table(summary))
    parts += [sec for sec in sections if sec]  # e.g. the time-domain views, the measurement
    parts.append('<h2 id="charts">Charts</h2>')
    if figures:
        for fig in figures:
            parts.append(figure_html(fig.caption, fig.png))
    else:
        parts.append("<p>Charts were not drawn for this build (--no-plots).</p>")
    parts.append('<h2 id="warnings">Warnings</h2>')
    if warnings:
        parts.append(
            "<p>Inputs outside a model's stated validity range; the results there are "
            "extrapolations.</p><ul>" + "".join(f"<li>{escape(w)}</li>" for w in warnings) + "</ul>"
        )
    else:
        parts.append("<p>None: every model stayed inside its stated validity range.</p>")
    parts.append('<h2 id="scenario">Scenario file</h2>')
    parts.append(f'<p class="meta">{escape(scenario_name)}, as read for this build:</p>')
    parts.append(f"<pre>{escape(scenario_text)}</pre>")
    parts.append('<h2 id="files">Files of this build</h2>')
    parts.append("<ul>" + "".join(f"<li>{escape(n)}</li>" for n in files) + "</ul>")
    parts.append(f'<p class="caution">{escape(CAUTION)}</p>')
    parts += PAGE_END
    return "\n".join(parts)


def guarantee_lines(result) -> list[str]:
    """What the outputs of ``result`` (a ChannelResult) do not guarantee: empty when they
    are passive and reciprocal to 1e-9."""
    loose = [c.path.name for c in result.imports if not c.guaranteed]
    if not loose:
        return []
    return [
        "NOT guaranteed passive or reciprocal: imported file(s) accepted as they are "
        f"(as_is = true): {', '.join(loose)}"
    ]


def report_html(
    result,
    budget,
    fit,
    charts: Sequence[tuple[Path, str]],
    names: Sequence[str],
    summary: Sequence[dict],
    overlay=None,
    crosstalk=None,
    views=None,
) -> str:
    """The self-contained page, with every chart of the build embedded: ``charts`` holds
    each written PNG with its caption, in the order written; ``overlay`` (a measurement
    beside the model), ``crosstalk`` (a CrosstalkResult) and ``views`` (an Inspection) add
    their sections."""
    from losslane.report.crosstalk import crosstalk_html
    from losslane.report.overlay import overlay_html

    sc = result.scenario
    figures = [Figure(caption, Path(p).read_bytes()) for p, caption in charts]
    f = result.f
    meta = [
        f"{len(result.blocks)} segments, {result.nports}-port"
        + (" (differential pair)" if result.nports == 4 and not result.victim else "")
        + (f" (group of traces, victim {result.victim})" if result.victim else "")
        + f", reference {sc.ports.reference:g} ohm per port"
        + (f", port order {sc.ports.order}" if result.nports >= 4 else ""),
        f"sweep {f[0] / 1e9:g}..{f[-1] / 1e9:g} GHz, {f.size} points",
        f"built by losslane {__version__} from "
        + (sc.path.name if sc.path is not None else "a scenario"),
    ]
    for check in result.imports:
        meta.append("imported model " + check.summary())
    meta += models_lines(result)
    meta += guarantee_lines(result)
    return render_report(
        title=f"{sc.name}: channel report",
        meta=meta,
        budget=budget,
        fit=fit,
        summary=summary,
        figures=figures,
        warnings=list(result.warnings),
        scenario_name=sc.path.name if sc.path is not None else "scenario",
        scenario_text=sc.source_text,
        files=names,
        mode=" (differential mode)" if result.differential else "",
        sections=[build_section_html(views), overlay_html(overlay), crosstalk_html(crosstalk)],
    )

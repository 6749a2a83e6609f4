"""The outputs of `losslane extract` and `losslane fit`: terminal text, charts and CSV
files, written into an output directory through a staging directory beside it (nothing
appears in it until every file is complete; a failure leaves none).

Charts: the extracted loss per inch and effective permittivity against frequency, with the
standard uncertainty shaded, the flagged points marked and the usable band shaded; the
fitted model against the extracted line, with the difference below. matplotlib is imported
inside the chart functions (Agg backend).
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from losslane.report.charts import pyplot, save_figure, user_text
from losslane.report.output import write_staged
from losslane.report.text import table

if TYPE_CHECKING:
    from losslane.api import ExtractResult, FitResult
    from losslane.measure.extract import LineExtraction
    from losslane.measure.fit import MaterialFit

__all__ = [
    "EXTRACT_FILES",
    "FIT_FILES",
    "extract_text",
    "fit_text",
    "write_extract_files",
    "write_fit_files",
]

EXTRACT_FILES = ("extract-loss.png", "extract-eps-eff.png", "extract-curves.csv")
FIT_FILES = ("fit-loss.png", "fit-eps-eff.png", "fit-curves.csv")
NOTE = "extracted from measured coupons (two-line eigenvalue method)"
FLAG_COLOUR = "#c0392b"
BAND_COLOUR = "#2b9a73"
LINE_COLOUR = "#3b75af"


# ----------------------------------------------------------------------- writing


def write_extract_files(
    extraction: LineExtraction, out: Path | str, plots: bool = True
) -> list[Path]:
    """The extraction's curves (CSV) and, with ``plots``, its two charts, into ``out``."""

    def write(stage: Path) -> list[Path]:
        files = []
        if plots:
            files += extract_charts(extraction, stage)
        csv = stage / EXTRACT_FILES[2]
        csv.write_text(extraction.curves_csv(), encoding="utf-8")
        files.append(csv)
        return files

    return write_staged(out, write)


def write_fit_files(fit: MaterialFit, out: Path | str, plots: bool = True) -> list[Path]:
    """The fit's measured and model curves (CSV) and, with ``plots``, its charts."""

    def write(stage: Path) -> list[Path]:
        files = []
        if plots:
            files += fit_charts(fit, stage)
        csv = stage / FIT_FILES[2]
        csv.write_text(fit_curves_csv(fit), encoding="utf-8")
        files.append(csv)
        return files

    return write_staged(out, write)


def fit_curves_csv(fit: MaterialFit) -> str:
    """The fit's points: measured and model loss (dB/in) and eps_eff, one row each."""
    from losslane.units import INCH
    from losslane.xsection.rlgc import NP_TO_DB

    head = (
        "frequency_hz,measured_loss_db_per_in,model_loss_db_per_in,measured_eps_eff,model_eps_eff"
    )
    k = NP_TO_DB * INCH
    cols = (fit.f, fit.alpha_measured * k, fit.alpha_model * k, fit.eps_measured, fit.eps_model)
    rows = [head] + [",".join(repr(float(c[i])) for c in cols) for i in range(fit.f.size)]
    return "\n".join(rows) + "\n"


# ----------------------------------------------------------------------- text


def _ghz(hz: float) -> str:
    return f"{hz / 1e9:.4g}"


def _band(band) -> str:
    return "none" if not band else f"{_ghz(band[0])}..{_ghz(band[1])} GHz"


def _inches(m: float) -> str:
    return f"{m / 0.0254:.4g} in"


def _checks_lines(checks: list[dict]) -> list[str]:
    out = ["measured files (checked and reported, never repaired)"]
    for c in checks:
        passive = "passive" if c["passive"] else "NOT passive"
        conv = c.get("mode_conversion_db")
        extra = "" if conv is None else f", mode conversion up to {conv:.1f} dB"
        out.append(
            f"  {c['name']}: {c['ports']} ports, largest singular value "
            f"{c['max_singular_value']:.6f} at {_ghz(c['max_singular_value_at_hz'])} GHz "
            f"({passive}), reciprocity max |Sij - Sji| {c['reciprocity_error']:.2g}{extra}"
        )
    return out


def _files_lines(files: list) -> list[str]:
    return ["", "files written:"] + [f"  {p}" for p in files] if files else []


def extract_text(result: ExtractResult) -> str:
    """The terminal output of `losslane extract` (``result``: an ``api.ExtractResult``)."""
    ext = result.extraction
    data = result.to_json()
    coupons = ", ".join(
        f"{n} ({_inches(ln)})" for n, ln in zip(ext.sources, ext.lengths_m, strict=True)
    )
    flagged = int(np.sum(~ext.ok))
    head = [
        f"extracted line ({ext.mode} mode) from {len(ext.sources)} coupons: {coupons}",
        f"{ext.f.size} points {_ghz(ext.f[0])}..{_ghz(ext.f[-1])} GHz"
        + (" (the 0 Hz point carries no phase and is left out)" if ext.dropped_dc else "")
        + f"; usable band {_band(ext.usable_band_hz)}; {flagged} point(s) flagged",
    ]
    rows = [
        [
            _ghz(x),
            _num(loss, ".4f"),
            _num(per_m, ".3f"),
            _num(eps, ".4f"),
            _num(delay, ".2f"),
            q,
        ]
        for x, loss, per_m, eps, delay, q in zip(
            data["frequencies_hz"],
            data["loss_db_per_in"],
            data["loss_db_per_m"],
            data["eps_eff"],
            data["delay_ps_per_in"],
            data["quality"],
            strict=True,
        )
    ]
    heads = ["frequency", "loss", "loss", "eps_eff", "delay", "quality"]
    units = ["GHz", "dB/in", "dB/m", "", "ps/in", ""]
    out = head + [""]
    out += [table(heads, units, rows)] if rows else ["(no --at frequency inside the band)"]
    out += [""] + _checks_lines(data["checks"])
    out += _files_lines(result.files)
    return "\n".join(out)


def _num(v, fmt: str) -> str:
    return "-" if v is None else format(v, fmt)


_SHOWN = {
    "dk": ("Dk", lambda v: f"{v:.4f}", 1.0, ""),
    "df": ("Df", lambda v: f"{v:.6f}", 1.0, ""),
    "rq": ("rq (RMS roughness)", lambda v: f"{v:.4g}", 1e-6, "um"),
    "radius": ("sphere radius", lambda v: f"{v:.4g}", 1e-6, "um"),
    "surface_ratio": ("surface ratio", lambda v: f"{v:.4f}", 1.0, ""),
    "conductivity": ("conductivity", lambda v: f"{v:.4g}", 1.0, "S/m"),
}
"""How each fitted parameter is shown: name, value format, unit scale, unit."""


def _shown(key: str, value: float, uncertainty: bool = False) -> str:
    _, fmt, scale, unit = _SHOWN[key]
    if not np.isfinite(value):
        return "undetermined"
    value = value / scale + 0.0  # no "-0"
    text_ = f"{value:.2g}" if uncertainty else fmt(value)
    return f"{text_} {unit}".rstrip()


def fit_text(result: FitResult) -> str:
    """The terminal output of `losslane fit` (``result``: an ``api.FitResult``)."""
    fit = result.fit
    data = result.to_json()
    at = _ghz(fit.at_hz)
    head = [
        f"materials fitted to the extracted line ({fit.mode} mode) over "
        f"{_band(fit.band_hz)}, {fit.f.size} points, weighted by {fit.weighting}",
        f"dielectric: wideband Debye, Dk and Df given at {at} GHz; foil model: "
        f"{data['foil']['model']}",
        "",
    ]
    rows = []
    for k in fit.vary:
        name = _SHOWN[k][0] + (f" at {at} GHz" if k in ("dk", "df") else "")
        rows.append([name, _shown(k, fit.values[k]), _shown(k, fit.uncertainty[k], True)])
    heads = ["fitted", "value", "uncertainty"]
    out = head + [table(heads, ["", "", "(1 sigma)"], rows, 1)]
    fixed = [k for k in fit.values if k not in fit.vary]
    if fixed:
        out += [
            "",
            "held fixed: " + ", ".join(f"{_SHOWN[k][0]} {_shown(k, fit.values[k])}" for k in fixed),
        ]
    chi2 = data["chi2_per_dof"]
    out += [
        "",
        f"RMS loss residual {fit.residual_db_per_in:.3g} dB/in (largest "
        f"{fit.residual_max_db_per_in:.3g} dB/in), RMS eps_eff residual "
        f"{fit.residual_eps_eff:.3g}"
        + ("" if chi2 is None else f", chi-square per degree of freedom {chi2:.3g}"),
        "parameters separable over the band: "
        + ("yes" if fit.separable else "NO (see the warning; the uncertainties say how little")
        + ("" if fit.separable else " is known)"),
    ]
    if fit.at_bound:
        out.append("ended on a search bound: " + ", ".join(fit.at_bound))
    if result.library_file is not None:
        d, f = result.library_names
        out += [
            "",
            f"library written: {result.library_file} (dielectric {d!r}, foil {f!r}); use it "
            f'in a scenario with library = ["{Path(result.library_file).name}"]',
        ]
    out += _files_lines(result.files)
    return "\n".join(out)


# ----------------------------------------------------------------------- charts


def _limits(y: np.ndarray, keep: np.ndarray) -> tuple[float, float]:
    """y limits from the points in ``keep`` (all finite points when none), padded."""
    good = np.isfinite(y) & keep
    if not np.any(good):
        good = np.isfinite(y)
    if not np.any(good):
        return -1.0, 1.0
    lo, hi = float(np.min(y[good])), float(np.max(y[good]))
    span = hi - lo if hi > lo else max(abs(hi), 1e-3)
    return lo - 0.08 * span, hi + 0.12 * span


@user_text
def _extract_chart(ext, path: Path, y, u, ylabel: str, title: str, at_key: str) -> Path:
    plt = pyplot()
    fig, ax = plt.subplots(figsize=(10.5, 5.2), dpi=110)
    ghz = ext.f / 1e9
    ok = ext.ok
    ax.grid(True, which="both", alpha=0.3)
    if ext.usable_band_hz is not None:
        lo, hi = ext.usable_band_hz
        ax.axvspan(
            lo / 1e9,
            hi / 1e9,
            color=BAND_COLOUR,
            alpha=0.08,
            lw=0,
            label=f"usable band {_band(ext.usable_band_hz)}",
        )
    band = np.isfinite(u)
    ax.fill_between(
        ghz,
        np.where(band, y - u, np.nan),
        np.where(band, y + u, np.nan),
        color=LINE_COLOUR,
        alpha=0.25,
        lw=0,
        label="+- 1 standard uncertainty (noise model)",
    )
    ax.plot(ghz, y, "-", color=LINE_COLOUR, lw=1.4, label="extracted")
    if np.any(~ok):
        ax.plot(
            ghz[~ok],
            y[~ok],
            "x",
            color=FLAG_COLOUR,
            ms=5,
            label=f"flagged ({int(np.sum(~ok))} points: ill-conditioned or branch)",
        )
    if ext.at_hz:
        vals = ext.at(ext.at_hz)[at_key]
        ax.plot(np.asarray(ext.at_hz) / 1e9, vals, "o", color="black", ms=5, zorder=5)
        for x, v in zip(ext.at_hz, vals, strict=True):
            ax.annotate(
                f"{v:.4g}",
                (x / 1e9, v),
                xytext=(4, 6),
                textcoords="offset points",
                fontsize=8,
            )
    ax.set_ylim(*_limits(y, ok))
    ax.set_xlim(0.0, ghz[-1])
    ax.set_xlabel("frequency (GHz)")
    ax.set_ylabel(ylabel)
    ax.set_title(title, fontsize=11)
    ax.legend(fontsize=8, loc="best", framealpha=0.85)
    fig.text(0.995, 0.005, NOTE, ha="right", va="bottom", fontsize=7, color="0.45")
    fig.tight_layout()
    try:
        return save_figure(fig, path)
    finally:
        plt.close(fig)


def extract_charts(ext: LineExtraction, directory: Path) -> list[Path]:
    """Loss per inch and eps_eff of an extraction against frequency (two PNG files)."""
    what = f"{ext.mode} mode, {len(ext.sources)} coupons"
    return [
        _extract_chart(
            ext,
            Path(directory) / EXTRACT_FILES[0],
            ext.loss_db_per_in,
            ext.u_loss_db_per_in,
            "loss (dB/in)",
            f"Extracted line loss per inch ({what})",
            "loss_db_per_in",
        ),
        _extract_chart(
            ext,
            Path(directory) / EXTRACT_FILES[1],
            ext.eps_eff,
            ext.u_eps_eff,
            "effective permittivity eps_eff",
            f"Extracted effective permittivity ({what})",
            "eps_eff",
        ),
    ]


@user_text
def _fit_chart(
    fit, path: Path, measured, model, ylabel: str, dlabel: str, title: str, subtitle: str
) -> Path:
    plt = pyplot()
    fig, (a1, a2) = plt.subplots(
        2, 1, figsize=(10.5, 6.6), dpi=110, sharex=True, gridspec_kw={"height_ratios": [3, 2]}
    )
    ghz = fit.f / 1e9
    a1.plot(ghz, measured, ".", color="0.35", ms=3, label="extracted from the coupons")
    a1.plot(ghz, model, "-", color=LINE_COLOUR, lw=1.6, label="model with the fitted materials")
    a2.plot(ghz, model - measured, "-", color=FLAG_COLOUR, lw=1.2, label="model - extracted")
    a2.axhline(0.0, color="0.4", lw=0.8)
    for ax in (a1, a2):
        ax.grid(True, alpha=0.3)
        ax.legend(fontsize=8, loc="best", framealpha=0.85)
    a1.set_ylabel(ylabel)
    a2.set_ylabel(dlabel)
    a2.set_xlabel(f"frequency (GHz); fit band {_band(fit.band_hz)}")
    a1.set_title(f"{title}\n{subtitle}", fontsize=10)
    fig.text(0.995, 0.005, NOTE, ha="right", va="bottom", fontsize=7, color="0.45")
    fig.tight_layout()
    try:
        return save_figure(fig, path)
    finally:
        plt.close(fig)


def fit_charts(fit: MaterialFit, directory: Path) -> list[Path]:
    """Measured against fitted loss per inch and eps_eff (two PNG files)."""
    from losslane.units import INCH
    from losslane.xsection.rlgc import NP_TO_DB

    k = NP_TO_DB * INCH
    parts = [f"{_SHOWN[key][0].split(' (')[0]} {_shown(key, fit.values[key])}" for key in fit.vary]
    subtitle = "fitted: " + ", ".join(parts) + f" (Dk/Df at {_ghz(fit.at_hz)} GHz)"
    return [
        _fit_chart(
            fit,
            Path(directory) / FIT_FILES[0],
            fit.alpha_measured * k,
            fit.alpha_model * k,
            "loss (dB/in)",
            "difference (dB/in)",
            f"Loss per inch: extracted and fitted model ({fit.mode} mode)",
            subtitle,
        ),
        _fit_chart(
            fit,
            Path(directory) / FIT_FILES[1],
            fit.eps_measured,
            fit.eps_model,
            "eps_eff",
            "difference",
            f"Effective permittivity: extracted and fitted model ({fit.mode} mode)",
            subtitle,
        ),
    ]

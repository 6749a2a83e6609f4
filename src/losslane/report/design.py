"""The design helpers' outputs (size, compare, spread, materials): terminal tables written
from the same dictionaries the commands print with --json, and the charts of compare (loss
per inch of every candidate) and spread (histograms).

matplotlib is imported inside the chart functions (Agg backend), so importing this module
costs nothing; charts are written atomically.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

import numpy as np

from losslane.report.charts import pyplot, save_figure, user_text
from losslane.report.line import stackup
from losslane.report.text import CAUTION, table
from losslane.units import MIL


def _mil(m: float | None) -> str:
    return "-" if m is None else f"{m / MIL:.4g}"


def _ghz(f: float) -> str:
    return f"{f / 1e9:.4g}"


def size_table(res: dict, title: str) -> str:
    """The readable form of ``losslane size``."""
    what = "Z_diff" if res["impedance"] == "z_diff" else "Z0"
    r = res["ratio"]
    geo = res["geometry_m"]
    lines = [title, ""]
    solved = res["vary"]
    value = geo[solved]
    lines.append(
        f"solved {solved}: {value / MIL:.4g} mil ({value * 1e3:.4g} mm), "
        f"{r['name']} = {r['value']:.4g} (model range {r['valid_from']:.3g}..{r['valid_to']:.3g})"
    )
    lines.append(
        f"{what} at {_ghz(res['frequency_hz'])} GHz: {res['achieved_ohm']:.3f} ohm "
        f"(target {res['target_ohm']:g} ohm)"
    )
    lines.append(f"effective permittivity: {res['eps_eff']:.4g}")
    lines.append("")
    s = res["sensitivity"]
    labels = {
        "ohm_per_mil_width": "per +1 mil of width",
        "ohm_per_mil_height": "per +1 mil of dielectric height",
        "ohm_per_0p1_dk": "per +0.1 of Dk",
    }
    rows = []
    for key, v in s.items():
        if key in labels:
            name = labels[key]
        elif key.startswith("ohm_per_mil_"):
            name = f"per +1 mil of {key[len('ohm_per_mil_') :]}"
        else:
            name = key
        rows.append([name, "-" if v is None else f"{v:+.3f}"])
    lines.append(f"sensitivity of {what}")
    lines.append(table(["change", "d" + what], ["", "ohm"], rows))
    lines.append("")
    loss_rows = [
        [_ghz(f), f"{t:.4f}", f"{c:.4f}", f"{d:.4f}"]
        for f, t, c, d in zip(
            res["loss_frequencies_hz"],
            res["loss_db_per_in"],
            res["conductor_db_per_in"],
            res["dielectric_db_per_in"],
            strict=True,
        )
    ]
    lines.append("loss of the sized line" + (" (differential mode)" if what == "Z_diff" else ""))
    lines.append(
        table(
            ["frequency", "loss", "conductor", "dielectric"],
            ["GHz", "dB/in", "dB/in", "dB/in"],
            loss_rows,
        )
    )
    lines += ["", CAUTION]
    return "\n".join(lines)


def compare_table(res: dict, title: str) -> str:
    """The readable form of ``losslane compare``: one row per candidate, lowest loss first,
    loss at each frequency as total (conductor + dielectric)."""
    f = res["frequencies_hz"]
    head = ["material", "foil", "width", "Dk", "Df"]
    unit = ["", "", "mil", "", ""]
    for fi in f:
        head.append(f"{_ghz(fi)} GHz")
        unit.append("dB/in (cond + diel)")
    rows = []
    for r in res["rows"]:
        row = [r["material"], r["foil"], _mil(r["width_m"]), f"{r['dk']:g}", f"{r['df']:g}"]
        for t, c, d in zip(
            r["loss_db_per_in"], r["conductor_db_per_in"], r["dielectric_db_per_in"], strict=True
        ):
            row.append(f"{t:.3f} ({c:.3f} + {d:.3f})")
        rows.append(row)
    what = "Z_diff" if res["impedance"] == "z_diff" else "Z0"
    out = [
        title,
        f"every candidate re-sized to {what} = {res['target_ohm']:g} ohm at "
        f"{_ghz(res['size_at_hz'])} GHz; sorted by loss at {_ghz(max(f))} GHz",
        "",
        table(head, unit, rows),
    ]
    if res.get("plot"):
        out += ["", f"chart: {res['plot']}"]
    out += ["", CAUTION]
    return "\n".join(out)


def spread_table(res: dict, title: str) -> str:
    """The readable form of ``losslane spread``."""
    what = "Z_diff" if res["impedance_kind"] == "z_diff" else "Z0"
    tol = ", ".join(
        f"{k[:-2] if k.endswith('_m') else k} +/-"
        f"{(v / MIL if k.endswith('_m') else v):.3g}{' mil' if k.endswith('_m') else ''}"
        for k, v in res["tolerances"].items()
    )
    dist = (
        "normal, the +/- value taken as 3 sigma"
        if res["distribution"] == "normal"
        else "uniform over the +/- interval"
    )
    head = ["frequency", "nominal", "mean", "std", "p01", "p99", "target", "outside"]
    unit = ["GHz", "ohm", "ohm", "ohm", "ohm", "ohm", "ohm", "%"]
    imp = res["impedance"]
    rows = []
    for i, f in enumerate(res["frequencies_hz"]):
        rows.append(
            [
                _ghz(f),
                f"{res['nominal']['impedance_ohm'][i]:.2f}",
                f"{imp['mean'][i]:.2f}",
                f"{imp['std'][i]:.3f}",
                f"{imp['p01'][i]:.2f}",
                f"{imp['p99'][i]:.2f}",
                f"{res['target_ohm'][i]:.4g} +/-{res['band_ohm'][i]:.3g}",
                f"{100 * imp['outside_share'][i]:.2f}",
            ]
        )
    loss = res["loss_db_per_in"]
    lrows = [
        [
            _ghz(f),
            f"{res['nominal']['loss_db_per_in'][i]:.4f}",
            f"{loss['mean'][i]:.4f}",
            f"{loss['std'][i]:.4f}",
            f"{loss['p01'][i]:.4f}",
            f"{loss['p99'][i]:.4f}",
        ]
        for i, f in enumerate(res["frequencies_hz"])
    ]
    out = [
        title,
        f"{res['samples']} samples, seed {res['seed']}, {dist}; {tol}",
        "",
        f"{what}",
        table(head, unit, rows),
        "",
        "loss",
        table(
            ["frequency", "nominal", "mean", "std", "p01", "p99"],
            ["GHz", "dB/in", "dB/in", "dB/in", "dB/in", "dB/in"],
            lrows,
        ),
    ]
    if res.get("plot"):
        out += ["", f"histograms: {res['plot']}"]
    out += ["", CAUTION]
    return "\n".join(out)


def _foil_parameters(entry: dict) -> str:
    parts = []
    for k, v in entry.items():
        if k in ("name", "model", "note", "source"):
            continue
        if k == "rq_m":
            parts.append(f"Rq {v * 1e6:.3g} um")
        elif k == "spheres":
            parts += [
                f"radius {s['radius_m'] * 1e6:.3g} um, surface ratio {s['surface_ratio']:g}"
                for s in v
            ]
        elif k == "matte_ratio":
            if v != 1.0:
                parts.append(f"matte ratio {v:g}")
        elif k == "layers":
            parts += [f"{x['name']} {x['thickness_m'] * 1e6:.3g} um" for x in v]
        elif k == "outside_dk":
            if v != 1.0:
                parts.append(f"outside Dk {v:g}")
        else:
            parts.append(f"{k} {v}")
    return "; ".join(parts) or "-"


def materials_table(res: dict) -> str:
    """The readable form of ``losslane materials``."""

    def src(e: dict) -> str:
        return "bundled" if e["source"].startswith("bundled") else e["source"]

    drows = [
        [
            d["name"],
            d["class"] or "-",
            f"{d['dk']:g}",
            f"{d['df']:g}",
            "-" if d["at_hz"] is None else _ghz(d["at_hz"]),
            d["model"],
            src(d),
            d["note"] or "-",
        ]
        for d in res["dielectrics"]
    ]
    frows = [
        [x["name"], x["model"], _foil_parameters(x), src(x), x["note"] or "-"] for x in res["foils"]
    ]
    user = sorted(
        {
            e["source"]
            for e in res["dielectrics"] + res["foils"]
            if not e["source"].startswith("bundled")
        }
    )
    out = [
        "dielectrics",
        _left(["name", "class", "Dk", "Df", "at GHz", "model", "from", "note"], drows),
        "",
        "foils",
        _left(["name", "model", "parameters", "from", "note"], frows),
        "",
        "Bundled entries are typical values of generic material classes, not any product's "
        "data; use your laminate's datasheet and the fabricator's stackup for design work.",
    ]
    if user:
        out.append("User entries from: " + ", ".join(user))
    return "\n".join(out)


def _left(headers: list[str], rows: list[list[str]]) -> str:
    widths = [max(len(str(r[i])) for r in [headers, *rows]) for i in range(len(headers))]
    return "\n".join(
        "  ".join(str(c).ljust(w) for c, w in zip(r, widths, strict=True)).rstrip()
        for r in [headers, *rows]
    )


# ----------------------------------------------------------------------- charts


CAPTION = "estimates from published models; confirm against fabricated test coupons"


@user_text
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
        return save_figure(fig, _chart_path(path), dpi=110)
    finally:
        plt.close(fig)


@user_text
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
        return save_figure(fig, _chart_path(path), dpi=110)
    finally:
        plt.close(fig)


def _chart_path(path: Path | str) -> Path:
    """A chart's path, checked by the one rule for outputs (``report.output``: its folder
    must exist and be writable; no folder is created)."""
    from losslane.report.output import check_output_file

    return check_output_file(path, "--plot")


def compare_chart(result, path: Path | str) -> Path:
    """dB/in against frequency of every candidate of a compare result
    (``design.compare.CompareResult``), titled with the stackup and the target."""
    first = result.candidates[0].section
    what = "Z_diff" if first.n_conductors == 2 else "Z0"
    title = (
        f"{stackup(first, ('width',))}; each re-sized to {what} = {result.target:g} ohm "
        f"at {result.size_at / 1e9:g} GHz"
    )
    curves = [
        (
            f"{c.material} / {c.foil} (w {c.section.width / MIL:.3g} mil)",
            c.curve_f,
            c.curve_db_per_in,
        )
        for c in result.candidates
    ]
    return loss_comparison_chart(
        curves,
        path,
        title,
        result.frequencies,
        [c.material for c in result.candidates],
        [c.foil for c in result.candidates],
    )


def spread_chart(result, section, path: Path | str) -> Path:
    """Histograms of a spread result (``design.spread.SpreadResult``): the impedance at
    the first frequency and the loss at the highest."""
    freqs = result.frequencies
    what = "Z_diff" if result.differential else "Z0"
    i_z = 0
    i_l = int(max(range(len(freqs)), key=lambda i: freqs[i]))
    title = f"{stackup(section)}; {result.samples} samples, {result.distribution}" + (
        " (tolerance = 3 sigma)" if result.distribution == "normal" else ""
    )
    return spread_histograms(
        result.impedance[:, i_z],
        f"{what} at {freqs[i_z] / 1e9:g} GHz (ohm)",
        float(result.target[i_z]),
        float(result.band[i_z]),
        result.loss[:, i_l],
        f"loss at {freqs[i_l] / 1e9:g} GHz (dB/in)",
        path,
        title,
    )

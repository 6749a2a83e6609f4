"""Terminal tables of the design helpers (size, compare, spread, materials), written from
the same dictionaries the commands print with --json."""

from __future__ import annotations

from losslane.report.tables import CAUTION, table
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

"""One cross-section's results: the `losslane line --json` object, its terminal table, and
the heading that names a section (kind, dimensions, materials, model)."""

from __future__ import annotations

import numpy as np

from losslane.report.text import CAUTION, table
from losslane.units import INCH, MIL
from losslane.xsection.base import LineValues

#: the order in which headings list dimensions
HEADING_ORDER = ("width", "spacing", "gap", "height", "below", "above", "thickness")


def _finite(a: np.ndarray) -> list:
    return [float(v) if np.isfinite(v) else None for v in a]


#: the per-frequency keys of `line --json`, in order (main mode, then a pair's)
MAIN_KEYS = (
    "z0_ohm",
    "zc_real_ohm",
    "zc_imag_ohm",
    "eps_eff",
    "delay_ps_per_in",
    "loss_db_per_in",
    "conductor_db_per_in",
    "dielectric_db_per_in",
)
PAIR_KEYS = (
    "z_odd_ohm",
    "z_even_ohm",
    "z_diff_ohm",
    "z_common_ohm",
    "eps_eff_odd",
    "eps_eff_even",
)


def line_arrays(values: LineValues) -> dict[str, np.ndarray]:
    """The per-frequency quantities of `line --json` as arrays (frequency last; any
    leading axis of geometry samples kept): the one place their arithmetic lives."""
    out: dict[str, np.ndarray] = {}
    m = values.main
    if m is None:
        return out
    total, conductor, dielectric = m.db_per_in()
    out.update(
        zip(
            MAIN_KEYS,
            (
                m.z0,
                m.zc.real,
                m.zc.imag,
                m.eps_eff,
                m.delay * INCH * 1e12,
                total,
                conductor,
                dielectric,
            ),
            strict=True,
        )
    )
    e = values.even
    if e is not None:
        # differential-mode loss equals the odd-mode loss of one line (same dB)
        out.update(
            zip(
                PAIR_KEYS,
                (m.z0, e.z0, 2 * m.z0, e.z0 / 2, m.eps_eff, e.eps_eff),
                strict=True,
            )
        )
    return out


def _matrix_list(a: np.ndarray) -> list:
    if a.shape[-1] == 1:
        return a[:, 0, 0].tolist()
    return a.tolist()


def line_json(
    values: LineValues, solver_report: dict | None = None, model_report: dict | None = None
) -> dict:
    """The `losslane line --json` object (DESIGN.md keys; a pair's loss keys are its
    differential mode). ``solver_report``: a field-solved section's report;
    ``model_report``: a closed-form section's (its methods and corrections)."""
    out: dict = {"kind": values.kind, "frequencies_hz": values.f.tolist()}
    arrays = line_arrays(values)
    for key in MAIN_KEYS:
        if key in arrays:
            a = arrays[key]
            out[key] = _finite(a) if key.startswith("zc_") else a.tolist()
    rl = values.rlgc
    if rl is not None:
        out["rlgc"] = {
            "r_ohm_per_m": _matrix_list(rl.r),
            "l_h_per_m": _matrix_list(rl.l),
            "g_s_per_m": _matrix_list(rl.g),
            "c_f_per_m": _matrix_list(rl.c),
        }
    for key in PAIR_KEYS:
        if key in arrays:
            out[key] = arrays[key].tolist()
    if values.eps_eff_modes is not None:
        out["eps_eff_modes"] = values.eps_eff_modes.tolist()
    if solver_report is not None:
        out["solver"] = "field"
        out["field_solver"] = solver_report
    elif model_report is not None:
        out["solver"] = model_report["solver"]
        out["model"] = model_report
    else:
        out["solver"] = "closed-form"
    return out


def stackup(section, skip: tuple[str, ...] = ()) -> str:
    """The kind and the input dimensions in mil (a field-solved section's labels include
    its etched top width), not a derived value such as a stripline's plane spacing."""
    given = {**section.dimension_values(), **dict(getattr(section, "labels", ()))}
    parts = [section.kind]
    for key in HEADING_ORDER:
        if key in given and key not in skip:
            parts.append(f"{key} {given[key] / MIL:.4g} mil")
    return ", ".join(parts)


def describe(section) -> str:
    """One heading line naming the cross-section, its geometry and materials."""
    parts = [stackup(section)]
    d = section.dielectric
    if d.model == "constant":
        parts.append(f"Dk {d.dk:g} Df {d.df:g} (constant, non-causal)")
    else:
        parts.append(f"Dk {d.dk:g} Df {d.df:g} at {d.at / 1e9:g} GHz (wideband Debye)")
    metal = getattr(section, "metal", None)
    if metal is not None:
        parts.append(f"foil {metal.foil.model}")
    report = getattr(section, "solver_report", None)
    if report is None and getattr(type(section), "correction", None) is not None:
        parts.append("closed forms with field-solver correction")
    if report is not None:
        est = report()["error_estimate"].get("z0")
        parts.append(
            f"field solver ({section.accuracy}"
            + ("" if est is None else f", estimated error of Z0 {100 * est:.2g} %")
            + ")"
        )
    return ", ".join(parts)


def describe_solved(section, vary: str) -> str:
    """The ``describe`` heading with the solved dimension marked."""
    parts = describe(section).split(", ")
    return ", ".join(p + " (solved)" if p.startswith(vary + " ") else p for p in parts)


def line_table(props: dict, title: str) -> str:
    """The readable form of ``losslane line``: impedance, delay, loss, then RLGC."""
    f = props["frequencies_hz"]
    pair = "z_diff_ohm" in props
    rows = []
    for i, fi in enumerate(f):
        zr, zi = props["zc_real_ohm"][i], props["zc_imag_ohm"][i]
        zc = "inf (DC)" if zr is None else f"{zr:.2f}{zi:+.2f}j"
        row = [f"{fi / 1e9:.4g}"]
        if pair:
            row += [
                f"{props['z_diff_ohm'][i]:.2f}",
                f"{props['z_common_ohm'][i]:.2f}",
                f"{props['eps_eff_odd'][i]:.3f}",
                f"{props['eps_eff_even'][i]:.3f}",
            ]
        else:
            row += [f"{props['z0_ohm'][i]:.2f}", zc, f"{props['eps_eff'][i]:.3f}"]
        row += [
            f"{props['delay_ps_per_in'][i]:.2f}",
            f"{props['loss_db_per_in'][i]:.4f}",
            f"{props['conductor_db_per_in'][i]:.4f}",
            f"{props['dielectric_db_per_in'][i]:.4f}",
        ]
        rows.append(row)
    if pair:
        head = ["frequency", "Z_diff", "Z_common", "eps_eff odd", "eps_eff even"]
        unit = ["GHz", "ohm", "ohm", "", ""]
        loss_note = "loss, delay: differential mode"
    else:
        head = ["frequency", "Z0", "Zc", "eps_eff"]
        unit = ["GHz", "ohm", "ohm", ""]
        loss_note = ""
    head += ["delay", "loss", "conductor", "dielectric"]
    unit += ["ps/in", "dB/in", "dB/in", "dB/in"]
    out = [title, "", table(head, unit, rows)]
    if loss_note:
        out.append(f"({loss_note})")
    rl = props["rlgc"]
    rrows = []

    def first(a: list, i: int) -> float:
        v = a[i]
        return v[0][0] if isinstance(v, list) else v

    for i, fi in enumerate(f):
        rrows.append(
            [
                f"{fi / 1e9:.4g}",
                f"{first(rl['r_ohm_per_m'], i):.4g}",
                f"{first(rl['l_h_per_m'], i) * 1e9:.4g}",
                f"{first(rl['g_s_per_m'], i) * 1e3:.4g}",
                f"{first(rl['c_f_per_m'], i) * 1e12:.4g}",
            ]
        )
    out += [
        "",
        "per-unit-length line constants" + (" (self terms, line 1)" if pair else ""),
        table(["frequency", "R", "L", "G", "C"], ["GHz", "ohm/m", "nH/m", "mS/m", "pF/m"], rrows),
    ]
    model = props.get("model")
    if model:
        out += ["", model_note(model)]
    out += ["", CAUTION]
    return "\n".join(out)


def model_note(model: dict) -> str:
    """Which models produced a closed-form table's numbers (from the ``model`` object of
    the JSON), wrapped to the tables' width."""
    import textwrap

    text = "models: " + "; ".join(model["methods"])
    fit = model.get("static_correction")
    if fit is not None:
        text += f"; quasi-static Z0 and eps_eff {fit['method']}"
    text += f"; R and L: {model['conductor']}"
    return "\n".join(textwrap.wrap(text, 92, subsequent_indent="  "))

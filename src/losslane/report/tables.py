"""Plain-text tables for the terminal."""

from __future__ import annotations

from collections.abc import Sequence

CAUTION = (
    "Estimates from published models: confirm against the fabricator's stackup and "
    "measured test coupons."
)


def table(headers: Sequence[str], units: Sequence[str], rows: Sequence[Sequence[str]]) -> str:
    cols = (
        list(zip(headers, units, *rows, strict=False))
        if rows
        else list(zip(headers, units, strict=True))
    )
    widths = [max(len(str(c)) for c in col) for col in cols]
    lines = []
    for r in [headers, units, *rows]:
        lines.append("  ".join(str(c).rjust(w) for c, w in zip(r, widths, strict=True)))
    return "\n".join(lines)


def _num(v: float | None, fmt: str) -> str:
    return "-" if v is None else format(v, fmt)


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
    out += ["", CAUTION]
    return "\n".join(out)

"""Plain-text tables for the terminal."""

from __future__ import annotations

from collections.abc import Sequence

CAUTION = (
    "Estimates from published models: confirm against the fabricator's stackup and "
    "measured test coupons."
)


def table(
    headers: Sequence[str],
    units: Sequence[str],
    rows: Sequence[Sequence[str]],
    left: int = 0,
) -> str:
    """Columns right-aligned (numbers), the first ``left`` columns left-aligned (names)."""
    cols = (
        list(zip(headers, units, *rows, strict=False))
        if rows
        else list(zip(headers, units, strict=True))
    )
    widths = [max(len(str(c)) for c in col) for col in cols]
    lines = []
    for r in [headers, units, *rows]:
        cells = [
            str(c).ljust(w) if i < left else str(c).rjust(w)
            for i, (c, w) in enumerate(zip(r, widths, strict=True))
        ]
        lines.append("  ".join(cells).rstrip())
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


# ------------------------------------------------------------------------ the loss budget


def verdict(passed: bool | None) -> str:
    return "-" if passed is None else ("pass" if passed else "FAIL")


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
    from losslane.budget import REFLECTIONS_ROW

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
    return rows


def _f(v: float | None, fmt: str) -> str:
    return "-" if v is None else format(v, fmt)


def budget_text(budget, fit=None) -> str:
    """The budget and the fit for the terminal (``budget``: a ChannelBudget or None;
    ``fit``: a LossFit or None)."""
    out: list[str] = []
    if budget is None or not budget.points:
        out.append("no [budget] check points: nothing is judged (--strict passes)")
    else:
        pts = budget.points
        mode = "" if budget.mode == "single-ended" else f" ({budget.mode} mode)"
        out.append(f"loss budget{mode}: each segment alone between matched references")
        for k, pb in enumerate(pts):
            out.append(f"  [{k + 1}] {point_title(pb, budget)}")
        heads, units = ["segment", "kind"], ["", ""]
        for k, _ in enumerate(pts):
            heads += [f"[{k + 1}] loss", "per in", "share"]
            units += ["dB", "dB/in", "of max"]
        per_point = [budget_rows(pb) for pb in pts]
        n_ins = len(pts[0].segments) + 2  # segments, reflections, total
        rows = []
        for i in range(n_ins):
            base = per_point[0][i]
            row = [base["row"], base["kind"]]
            for pr in per_point:
                r = pr[i]
                share = "-" if r["share"] is None else f"{100 * r['share']:.1f}%"
                row += [f"{r['value_db']:.2f}", _f(r["db_per_in"], ".3f"), share]
            rows.append(row)
        extra = [
            ("max loss", lambda pb: _f(pb.allowance_db, ".2f")),
            ("margin", lambda pb: _f(pb.margin_db, "+.2f")),
            ("return loss, worse end", lambda pb: f"{pb.return_loss_db:.1f}"),
            ("min return loss", lambda pb: _f(pb.point.min_return_loss, ".1f")),
            ("result", lambda pb: verdict(pb.passed)),
        ]
        for label, get in extra:
            row = [label, ""]
            for pb in pts:
                row += [get(pb), "", ""]
            rows.append(row)
        out.append(table(heads, units, rows, left=2))
        ny = budget.nyquist
        overall = "PASS" if budget.passed else "FAIL"
        if ny is not None and ny.margin_db is not None:
            head = f"budget: {overall}, margin {ny.margin_db:+.2f} dB at Nyquist"
        else:
            head = f"budget: {overall}"
        failed = [pb.point.label for pb in pts if not pb.passed]
        if failed:
            head += f"; failing: {', '.join(failed)}"
        out.append(head)
    if fit is not None:
        if out:
            out.append("")
        a0, a1, a2, a4 = fit.coefficients
        out.append(
            "fitted insertion loss a0 + a1*sqrt(f) + a2*f + a4*f^2 (f in GHz), least squares "
            f"over {fit.band.start / 1e9:.6g}..{fit.band.stop / 1e9:.6g} GHz"
        )
        out.append(f"  band: {fit.band.rule}")
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
    return "\n".join(out)

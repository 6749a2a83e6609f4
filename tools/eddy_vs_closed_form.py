"""Deviation of the closed-form conductor model (R(f), L(f) of ``Microstrip`` and
``Stripline``) from the eddy-current field solution, 1 kHz .. 10 GHz, for typical
smooth-copper geometries (strips 0.5-2 oz, planes 0.5-1 oz). Prints Markdown tables.

Both models see the same cross-section in air (dk = 1): the conductor model and the
quasi-static external inductance are compared, without the closed forms' dispersion
(which the quasi-static eddy-current solve does not have). The eddy-current planes are
``eddy.PLANE_WIDTH_SCALES`` structure sizes wide (the closed forms' planes are infinitely
wide with no DC resistance); ``--plane-width`` sets another width.

Run from the repository root: ``python tools/eddy_vs_closed_form.py`` (about a minute on
two cores). Deviation = closed form / eddy current - 1. Each table also splits R into
the strip's and the planes' shares (the closed forms' conductor groups against the power
dissipated in each conductor of the eddy-current solution).
"""

from __future__ import annotations

import argparse
import warnings

import numpy as np

from losslane.materials.dielectric import ConstantDielectric
from losslane.units import MIL, OZ_COPPER
from losslane.xsection.base import Metal
from losslane.xsection.fieldsolve import Geometry, Layer, Trace
from losslane.xsection.fieldsolve.eddy import eddy_impedance
from losslane.xsection.microstrip import Microstrip
from losslane.xsection.rlgc import group_impedances
from losslane.xsection.stripline import Stripline

AIR = ConstantDielectric(1.0, name="air")
F = np.array([1e3, 1e4, 1e5, 3e5, 1e6, 3e6, 1e7, 3e7, 1e8, 3e8, 1e9, 3e9, 1e10])
BANDS = (("1-100 kHz", 1e3, 1e5), ("0.3-100 MHz", 3e5, 1e8), ("0.3-10 GHz", 3e8, 1e10))


def group_r(cf, f: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The closed form's R split into (strip, planes), from its conductor groups."""
    dims = [np.asarray(getattr(cf, k), float) for k in cf.dimensions]
    strip = np.zeros(f.shape)
    planes = np.zeros(f.shape)
    groups = cf._groups(*dims)
    for grp, (r, _) in zip(groups, group_impedances(f, groups), strict=True):
        if grp.wide:
            planes = planes + r
        else:
            strip = strip + r
    return strip, planes


def cases() -> list[tuple[str, object, Geometry, float]]:
    """(label, closed-form section, eddy-current geometry, plane thickness)."""
    out = []
    for w, h, t_oz, p_oz in ((6, 3.5, 0.5, 0.5), (6, 3.5, 1, 1), (6, 3.5, 1, 0.5), (10, 6, 2, 1)):
        w_, h_, t, tp = w * MIL, h * MIL, t_oz * OZ_COPPER, p_oz * OZ_COPPER
        cf = Microstrip(w_, h_, t, AIR, Metal(plane_thickness=tp))
        geom = Geometry((Layer(h_, AIR),), (Trace.centred(0.0, w_, h_, t),))
        out.append((f"microstrip w {w} h {h} mil, {t_oz} oz strip, {p_oz} oz plane", cf, geom, tp))
    for w, lo, hi, t_oz, p_oz in (
        (5, 5, 5, 0.5, 0.5),
        (5, 6, 6, 1, 1),
        (5, 4, 8, 1, 0.5),
        (8, 8, 8, 2, 1),
    ):
        w_, lo_, hi_, t, tp = w * MIL, lo * MIL, hi * MIL, t_oz * OZ_COPPER, p_oz * OZ_COPPER
        cf = Stripline(w_, lo_, hi_, t, AIR, Metal(plane_thickness=tp))
        geom = Geometry(
            (Layer(lo_, AIR), Layer(t + hi_, AIR)), (Trace.centred(0.0, w_, lo_, t),), True, True
        )
        label = f"stripline w {w} mil, {lo}/{hi} mil to planes, {t_oz} oz strip, {p_oz} oz planes"
        out.append((label, cf, geom, tp))
    return out


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--plane-width", type=float, default=None, help="metres")
    ap.add_argument("--accuracy", default="normal")
    args = ap.parse_args()
    summary = []
    for label, cf, geom, tp in cases():
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # validity notes of the closed forms
            rl = cf.rlgc(F)
        r_cf, l_cf = rl.r[:, 0, 0], rl.l[:, 0, 0]
        res = eddy_impedance(
            geom, F, plane_thickness=tp, plane_width=args.plane_width, accuracy=args.accuracy
        )
        r_e, l_e = res.r[:, 0, 0], res.l[:, 0, 0]
        dr, dl = r_cf / r_e - 1, l_cf / l_e - 1
        s_cf, p_cf = group_r(cf, F)
        s_e = res.losses[res.names[0]][:, 0, 0]
        p_e = sum(v[:, 0, 0] for k, v in res.losses.items() if k.endswith("plane"))
        assert np.allclose(s_cf + p_cf, r_cf), "closed-form groups must sum to its R"
        print(f"\n### {label}\n")
        print(
            f"plane width {res.plane_width * 1e3:.2f} mm; eddy-current error estimate "
            f"R {100 * res.error_r.max():.2f} %, L {100 * res.error_l.max():.2f} %\n"
        )
        print(
            "| f | R eddy (ohm/m) | R closed/eddy - 1 | strip R: closed/eddy - 1 | "
            "planes' R, eddy (ohm/m) | planes' R closed (ohm/m) | L eddy (nH/m) | "
            "L closed/eddy - 1 |"
        )
        print("|---|---|---|---|---|---|---|---|")
        for i, fi in enumerate(F):
            print(
                f"| {fi:.0e} | {r_e[i]:.4g} | {100 * dr[i]:+.1f} % | "
                f"{100 * (s_cf[i] / s_e[i] - 1):+.1f} % | {p_e[i]:.3g} | {p_cf[i]:.3g} | "
                f"{1e9 * l_e[i]:.1f} | {100 * dl[i]:+.2f} % |"
            )
        row = [label]
        for _, lo, hi in BANDS:
            sel = (F >= lo) & (F <= hi)
            row.append(_span(dr[sel]))
            row.append(_span(dl[sel]))
        hf = F >= 1e6
        row.append(f"{100 * np.abs(dr).max():.1f} %")
        row.append(f"{100 * np.abs(dl[hf]).max():.2f} %")
        summary.append(row)
    print("\n### Summary: closed form / eddy current - 1 (min .. max over the band)\n")
    head = " | ".join(f"R {b} | L {b}" for b, _, _ in BANDS)
    print(f"| geometry | {head} | worst R 1 kHz-10 GHz | worst L 1 MHz-10 GHz |")
    print("|---" * (3 + 2 * len(BANDS)) + "|")
    for row in summary:
        print("| " + " | ".join(row) + " |")


def _span(v: np.ndarray) -> str:
    return f"{100 * v.min():+.1f} .. {100 * v.max():+.1f} %"


if __name__ == "__main__":
    main()

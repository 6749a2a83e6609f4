"""The closed forms' conductor model against the eddy-current solver: for every kind,
random typical smooth-copper geometries (seeded; none of them in the fitting set of
tools/fit_strip_transition.py, which has 1 oz planes and a fixed grid of widths), the
worst deviation of R from DC to 10 GHz and of L from 1 MHz to 10 GHz, per mode. Prints a
Markdown table. Every geometry lies inside the model's declared validity ranges (its
``limits``, checked without dispersion: a draw that leaves one is recorded and drawn
again), so the table states the accuracy where the model claims to hold; the worst
deviation of the refused draws is printed after it, for what lies outside. Run from the
repository root:
``python tools/conductor_accuracy_table.py [--seed S] [N [KIND ...]]`` (N geometries
per kind, default 6; about 10 minutes; KINDs: only those, same geometries; S the draws'
seed, default 1212, the README's table).

Both sides see the same cross-section in air (dk = 1), so the conductor model and the
quasi-static external inductance are compared, not the closed forms' dispersion. The
eddy-current planes are 1000 structure sizes wide (the closed forms' are unbounded with no
DC resistance, which the accuracy goal allows; at the solver's default 100, a 2 oz strip
on a 0.5 oz plane differs by the plane's 3.9 % at DC). Typical geometries: strips 0.5-2 oz,
3-20 mil wide, planes 0.5 or 1 oz, the dielectric to the nearer plane between a third
and twice the strip's width (microstrip and stripline: the conductor model's verified
box asks w/h <= 2); pairs spaced 0.5-3 widths; coplanar gaps 0.5-2 widths and at least
twice the copper's thickness.
"""

from __future__ import annotations

import warnings

import numpy as np

from losslane.errors import LossLaneWarning
from losslane.materials.dielectric import ConstantDielectric
from losslane.units import MIL, OZ_COPPER
from losslane.xsection import registry
from losslane.xsection.base import Metal
from losslane.xsection.fieldsolve.eddy import PLANE_WIDTH_SCALES
from losslane.xsection.fieldsolve.layouts import FieldOptions
from losslane.xsection.fieldsolve.section import FieldSection
from losslane.xsection.validity import Quantities, check_limits

AIR = ConstantDielectric(1.0, name="air")
F = np.array([0.0, 1e3, 1e4, 1e5, 3e5, 1e6, 3e6, 1e7, 3e7, 1e8, 3e8, 1e9, 3e9, 1e10])
#: the eddy-current planes' width in structure sizes: ten times the solver's default, so
#: that their own DC resistance (which the closed forms leave out for a wide plane, as the
#: accuracy goal allows) stays below about 0.5 % of a thick strip's
PLANE_SCALES = 10 * PLANE_WIDTH_SCALES
#: the modal transform of a symmetric pair (even, odd) as in ``xsection.base``
PAIR = np.array([[1.0, 1.0], [1.0, -1.0]]) / np.sqrt(2.0)


def sample(kind: str, rng) -> tuple[dict, float]:
    """One typical geometry of ``kind`` (m) and its plane thickness."""
    w = float(np.exp(rng.uniform(np.log(3.0), np.log(20.0)))) * MIL
    t = float(rng.choice([0.5, 1.0, 2.0])) * OZ_COPPER
    tp = float(rng.choice([0.5, 1.0])) * OZ_COPPER
    h = w / rng.uniform(0.5, 2.0)
    if kind in ("microstrip", "microstrip-pair"):
        dims = {"width": w, "height": h, "thickness": t}
    elif kind in ("stripline", "stripline-pair"):
        lo = h
        dims = {"width": w, "below": lo, "above": lo * rng.uniform(1.0, 2.0), "thickness": t}
    else:
        # the gap at least twice the copper (the correction's box, t/gap <= 0.5)
        gap = max(w * rng.uniform(0.5, 2.0), 2 * t)
        dims = {"width": w, "gap": gap, "height": h, "thickness": t}
    if kind.endswith("pair"):
        dims["spacing"] = w * rng.uniform(0.5, 3.0)
    return dims, tp


def declared(kind: str, dims: dict) -> bool:
    """Whether ``dims`` lie inside every static validity range of ``kind`` (its class's
    ``limits`` at DC, on a typical laminate of Dk 3.5; the dispersion ranges are not the
    conductor model's business)."""
    with warnings.catch_warnings():
        warnings.simplefilter("error", LossLaneWarning)
        try:
            check_limits(registry.model(kind).limits, Quantities(dims, 3.5, np.zeros(1)))
        except LossLaneWarning:
            return False
    return True


def modal(m: np.ndarray) -> dict[str, np.ndarray]:
    """{mode: diagonal entry} of a (N, n, n) matrix: itself for one conductor, the even
    and odd entries of a symmetric pair."""
    if m.shape[-1] == 1:
        return {"single": m[:, 0, 0]}
    d = np.einsum("ij,fjk,kl->fil", PAIR.T, m, PAIR)
    return {"even": d[:, 0, 0], "odd": d[:, 1, 1]}


def deviations(kind: str, dims: dict, tp: float) -> dict[str, tuple[float, float]]:
    """{mode: (worst |R| deviation DC-10 GHz, worst |L| deviation 1 MHz-10 GHz)}."""
    cls = registry.model(kind)
    metal = Metal(plane_thickness=tp)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # dk = 1 is outside some dispersion ranges
        rl = cls(**dims, dielectric=AIR, metal=metal).rlgc(F)
    sec = FieldSection.from_model(cls, dims, FieldOptions(AIR), metal)
    eddy = sec.eddy(F, estimate=False, plane_width=PLANE_SCALES * sec.geometry.scale)
    hf = F >= 1e6
    r_cf, l_cf, r_e, l_e = modal(rl.r), modal(rl.l), modal(eddy.r), modal(eddy.l)
    return {
        m: (
            float(np.max(np.abs(r_cf[m] / r_e[m] - 1))),
            float(np.max(np.abs(l_cf[m][hf] / l_e[m][hf] - 1))),
        )
        for m in r_cf
    }


def main() -> None:
    import argparse

    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--seed", type=int, default=1212)
    ap.add_argument("n", nargs="?", type=int, default=6)
    ap.add_argument("kinds", nargs="*")
    args = ap.parse_args()
    n = args.n
    only = set(args.kinds)  # kinds to solve (the others' samples are still drawn)
    rng = np.random.default_rng(args.seed)
    print("| kind | mode | worst R, DC-10 GHz | worst L, 1 MHz-10 GHz |")
    print("|---|---|---|---|")
    outside: list[str] = []
    for cls in (m for m in registry.MODELS if m.correction is not None):
        worst: dict[str, np.ndarray] = {}
        beyond: dict[str, np.ndarray] = {}
        kept = 0
        while kept < n:
            dims, tp = sample(cls.kind, rng)
            inside = declared(cls.kind, dims)
            kept += inside
            if only and cls.kind not in only:
                continue
            into = worst if inside else beyond
            for m, v in deviations(cls.kind, dims, tp).items():
                into[m] = np.maximum(into.get(m, 0.0), v)
        for m, (dr, dl) in worst.items():
            print(f"| {cls.kind} | {m} | {100 * dr:.1f} % | {100 * dl:.2f} % |", flush=True)
        for m, (dr, dl) in beyond.items():
            outside.append(f"{cls.kind} {m}: R {100 * dr:.1f} %, L {100 * dl:.2f} %")
    if outside:
        print("\noutside the declared ranges (refused draws): " + "; ".join(outside))


if __name__ == "__main__":
    main()

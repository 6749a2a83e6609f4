"""The closed forms' static accuracy against the 2-D field solver: for every kind, random
geometries inside its verified box (seeded; none of them a fitting node), the worst
deviation of Z0 (every mode) and eps_eff of the published formulas alone (``published()``)
and of the corrected default model, against the solver at its 'fine' setting. Prints a
Markdown table. Run from the repository root: ``python tools/accuracy_table.py [N]``
(N points per kind, default 25; about 10 minutes).
"""

from __future__ import annotations

import sys
import warnings

import numpy as np

from losslane.materials.dielectric import ConstantDielectric
from losslane.xsection import registry
from losslane.xsection.base import Metal
from losslane.xsection.fieldsolve.layouts import FieldOptions
from losslane.xsection.fieldsolve.section import FieldSection

H = 100e-6


def log_uniform(rng, lo: float, hi: float) -> float:
    return float(np.exp(rng.uniform(np.log(lo), np.log(hi))))


def offset(rng, tb: float) -> tuple[float, float, float]:
    t = tb * H
    near = rng.uniform(0.05, 0.5)
    lo = near * (H - t)
    return lo, H - t - lo, t


def sample(kind: str, rng) -> tuple[dict, float]:
    """One geometry inside the kind's verified box, and a Dk."""
    dk = float(rng.uniform(2.0, 10.0))
    if kind == "microstrip":
        return {
            "width": log_uniform(rng, 0.05, 50) * H,
            "height": H,
            "thickness": rng.uniform(0, 0.5) * H,
        }, dk
    if kind == "microstrip-pair":
        return {
            "width": log_uniform(rng, 0.1, 10) * H,
            "spacing": log_uniform(rng, 0.1, 10) * H,
            "height": H,
            "thickness": rng.uniform(0, 0.5) * H,
        }, dk
    if kind == "stripline":
        lo, hi, t = offset(rng, rng.uniform(0, 0.25))
        return {
            "width": log_uniform(rng, 0.02, 10) * H,
            "below": lo,
            "above": hi,
            "thickness": t,
        }, 1.0
    if kind == "stripline-pair":
        w = log_uniform(rng, 0.07, 5)
        lo, hi, t = offset(rng, min(rng.uniform(0, 0.25), w))
        dims = {"width": w * H, "spacing": log_uniform(rng, 0.05, 5) * H}
        return {**dims, "below": lo, "above": hi, "thickness": t}, 1.0
    return {
        "width": log_uniform(rng, 0.1, 10) * H,
        "gap": H,
        "height": log_uniform(rng, 0.2, 20) * H,
        "thickness": rng.uniform(0, 0.5) * H,
    }, dk


def worst(cls, cases) -> tuple[tuple[float, float], tuple[float, float]]:
    """((published Z0, eps_eff), (corrected Z0, eps_eff)) worst relative deviations."""
    out = np.zeros((2, 2))
    f = np.array([0.0])
    for dims, dk in cases:
        d = ConstantDielectric(dk)
        field = FieldSection.from_model(cls, dims, FieldOptions(d), Metal(), "fine").modes(f)
        for i, model in enumerate((cls.published(), cls)):
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                modes = model(**dims, dielectric=d).modes(f)
            for m, v in modes.items():
                out[i, 0] = max(out[i, 0], abs(v.z0[0] / field[m].z0[0] - 1))
                out[i, 1] = max(out[i, 1], abs(v.eps_eff[0] / field[m].eps_eff[0] - 1))
    return (out[0, 0], out[0, 1]), (out[1, 0], out[1, 1])


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 25
    rng = np.random.default_rng(2026)
    print("| kind | Z0 published | Z0 default | eps_eff published | eps_eff default |")
    print("|---|---|---|---|---|")
    for cls in (m for m in registry.MODELS if m.correction is not None):
        cases = [sample(cls.kind, rng) for _ in range(n)]
        (zp, ep), (zc, ec) = worst(cls, cases)
        print(
            f"| {cls.kind} | {100 * zp:.2f} % | {100 * zc:.2f} % | {100 * ep:.2f} % | "
            f"{100 * ec:.2f} % |",
            flush=True,
        )


if __name__ == "__main__":
    main()

"""Eddy-current solver speed at the default accuracy setting (targets from the accuracy
issue): one solve of a microstrip at one frequency within 2 s, a sweep of 20 frequencies
within 30 s, on the project's 2-core machine. Each figure is the median of three calls
of ``eddy_impedance`` (mesh built for the highest frequency and reused at every one; the
call includes the solve on the next coarser mesh for the error estimate). Run directly
to also print the error estimates reached.
"""

from __future__ import annotations

import statistics
import time

import numpy as np

MIL = 25.4e-6


def _geometry():
    from losslane.materials.dielectric import ConstantDielectric
    from losslane.xsection.fieldsolve import Geometry, Layer, Trace

    lam = ConstantDielectric(3.7)
    return Geometry((Layer(3.5 * MIL, lam),), (Trace.centred(0.0, 6 * MIL, 3.5 * MIL, 1.4 * MIL),))


def _time(f: np.ndarray, repeat: int = 3) -> float:
    from losslane.xsection.fieldsolve.eddy import eddy_impedance

    geom = _geometry()
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        eddy_impedance(geom, f)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def run() -> list[tuple[str, float, float, str]]:
    """Rows (name, measured seconds, target seconds, unit)."""
    import skfem  # noqa: F401  (import cost is not part of a solve)

    return [
        ("eddy current, microstrip, 1 frequency (10 GHz)", _time(np.array([10e9])), 2.0, "s"),
        (
            "eddy current, microstrip, 20 frequencies (1 kHz-10 GHz)",
            _time(np.geomspace(1e3, 10e9, 20)),
            30.0,
            "s",
        ),
    ]


def accuracy() -> dict[str, float]:
    """The largest error estimates of R and L over the benchmark sweep."""
    from losslane.xsection.fieldsolve.eddy import eddy_impedance

    res = eddy_impedance(_geometry(), np.geomspace(1e3, 10e9, 20))
    return {"R": float(res.error_r.max()), "L": float(res.error_l.max())}


if __name__ == "__main__":
    for name, measured, target, unit in run():
        print(f"{name}: {measured:.3f} {unit} (target {target:g} {unit})")
    shown = ", ".join(f"{k} {100 * v:.3g} %" for k, v in accuracy().items())
    print(f"estimated discretisation error (largest over the sweep): {shown}")

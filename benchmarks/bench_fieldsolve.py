"""Field-solver speed at the default accuracy setting (targets from the field-solver
issue): a single microstrip within 2 s, a coupled pair within 4 s, on the project's
2-core machine. Each figure is the median of three fresh solves (cache cleared) of the
section and its RLGC over a 0-40 GHz sweep of 4001 points; the solve includes the
coarser mesh used for the reported error estimate. Run directly to also print the
accuracy reached.
"""

from __future__ import annotations

import statistics
import time

import numpy as np

MIL = 25.4e-6


def _sections():
    from losslane.materials.dielectric import WidebandDebye
    from losslane.xsection import registry
    from losslane.xsection.base import Metal
    from losslane.xsection.fieldsolve.options import field_section

    lam = WidebandDebye(3.7, 0.009, 10e9, name="laminate (typical)")
    mask = WidebandDebye(3.5, 0.02, 1e9, name="solder mask (typical)")
    single = field_section(
        registry.model("microstrip"),
        {"width": 6 * MIL, "height": 3.5 * MIL, "thickness": 1.4 * MIL},
        lam,
        Metal(),
        {},
        "bench",
    )
    pair = field_section(
        registry.model("microstrip-pair"),
        {"width": 5 * MIL, "spacing": 6 * MIL, "height": 4 * MIL, "thickness": 1.4 * MIL},
        lam,
        Metal(),
        {"etch_factor": 2.5, "coating_thickness": "0.8 mil", "coating_dielectric": mask},
        "bench",
    )
    return {"microstrip": single, "coated trapezoidal microstrip pair": pair}


def _time(section, f: np.ndarray, repeat: int = 3) -> float:
    from losslane.xsection.fieldsolve import solve as fsolve

    times = []
    for _ in range(repeat):
        fsolve.CACHE.clear()
        t0 = time.perf_counter()
        section.rlgc(f)
        section.error_estimate()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def run() -> list[tuple[str, float, float, str]]:
    """Rows (name, measured seconds, target seconds, unit)."""
    import skfem  # noqa: F401  (import cost is not part of a solve)

    f = np.linspace(0.0, 40e9, 4001)
    secs = _sections()
    targets = {"microstrip": 2.0, "coated trapezoidal microstrip pair": 4.0}
    return [
        (f"field solver, {name}, default setting", _time(sec, f), targets[name], "s")
        for name, sec in secs.items()
    ]


def accuracy() -> dict[str, dict]:
    """The error estimates reported at the default setting for the benchmark sections."""
    return {name: sec.error_estimate() for name, sec in _sections().items()}


if __name__ == "__main__":
    for name, measured, target, unit in run():
        print(f"{name}: {measured:.3f} {unit} (target {target:g} {unit})")
    for name, est in accuracy().items():
        shown = ", ".join(f"{k} {100 * v:.3g} %" for k, v in est.items() if v is not None)
        print(f"{name}: estimated discretisation error: {shown}")

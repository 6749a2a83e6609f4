"""Single-ended line speed: RLGC of one cross-section over a dense sweep, and the
start-up time of the command line.

Targets: ``rlgc()`` over 10 001 frequency points <= 20 ms per cross-section (in-process,
after import and a warm-up call, median of repeats), and ``losslane --help`` <= 0.3 s
wall time in a new process (median of repeats).
"""

from __future__ import annotations

import os
import subprocess
import sys
import warnings
from pathlib import Path

from benchkit import median_time

POINTS = 10_001
REPEATS = 15
HELP_REPEATS = 7


def _sections():
    from losslane.materials.dielectric import WidebandDebye
    from losslane.materials.roughness import Huray
    from losslane.units import MIL
    from losslane.xsection.base import Metal
    from losslane.xsection.coplanar import Cpw, Gcpw
    from losslane.xsection.microstrip import Microstrip
    from losslane.xsection.stripline import Stripline

    # typical lines: a causal laminate and a rough foil, the heaviest closed-form path
    d = WidebandDebye(3.7, 0.009, 10e9)
    m = Metal(foil=Huray.from_surface_ratio(0.5e-6, 1.0))
    return {
        "microstrip": Microstrip(6 * MIL, 3.5 * MIL, 1.4 * MIL, d, m),
        "stripline": Stripline(5 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, d, m),
        "stripline (offset)": Stripline(5 * MIL, 4 * MIL, 9 * MIL, 0.6 * MIL, d, m),
        "cpw": Cpw(10 * MIL, 5 * MIL, 10 * MIL, 1.4 * MIL, d, m),
        "gcpw": Gcpw(10 * MIL, 5 * MIL, 10 * MIL, 1.4 * MIL, d, m),
    }


def run() -> list[tuple[str, float, float | None, str]]:
    import numpy as np

    from losslane.errors import LossLaneWarning

    f = np.linspace(0.0, 100e9, POINTS)  # DC to 100 GHz in 10 MHz steps
    rows = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)  # 100 GHz is past some ranges
        for name, section in _sections().items():
            section.rlgc(f)  # warm-up: lazy imports, caches
            t = median_time(lambda s=section: s.rlgc(f), REPEATS)
            rows.append((f"{name} rlgc(), {POINTS} points", t * 1e3, 20.0, "ms"))

    import losslane

    src = str(Path(losslane.__file__).resolve().parents[1])
    env = dict(os.environ)
    env["PYTHONPATH"] = src + os.pathsep + env.get("PYTHONPATH", "")
    cmd = [sys.executable, "-m", "losslane", "--help"]
    subprocess.run(cmd, env=env, capture_output=True, check=True)  # warm the file cache
    t = median_time(
        lambda: subprocess.run(cmd, env=env, capture_output=True, check=True), HELP_REPEATS
    )
    rows.append(("losslane --help, new process", t, 0.3, "s"))
    return rows

"""`losslane inspect` of a differential 4-port Touchstone file with 10 001 points:

* in-process, after the file is read: the IEEE 370 quality metrics, every time-domain view
  (six impedance profiles with their features, three step responses and the skew, a PAM4
  pulse response) -- what ``api.inspect`` computes; goal <= 1 s (median);
* the whole command in a new process, as a user meets it: start-up and imports, reading
  the file, the views, the three charts and the report page (``--out``); goal <= 4 s
  (median of runs).

``run()`` returns rows ``(name, measured, target, unit)``; run standalone with
``python benchmarks/bench_inspect.py``.
"""

from __future__ import annotations

import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
SRC = HERE.parent / "src"
POINTS = 10_001
RUNS = 5
IN_PROCESS_TARGET_S = 1.0
COMMAND_TARGET_S = 4.0


def _write_file(path: Path) -> Path:
    """A made-up differential lane (pair, DC blocks, a via pair with stubs, pair) at 10 001
    points to 40 GHz, written as a Touchstone 1 file by losslane."""
    import numpy as np

    from losslane.materials.dielectric import WidebandDebye
    from losslane.network import LineSegment, SeriesCapacitor, Via, build_network
    from losslane.network.touchstone import write_touchstone
    from losslane.units import INCH, MIL
    from losslane.xsection import StriplinePair

    core = WidebandDebye(3.7, 0.009, 10e9)
    pair = StriplinePair(
        width=4.5 * MIL,
        spacing=6 * MIL,
        below=6 * MIL,
        above=6 * MIL,
        thickness=0.6 * MIL,
        dielectric=core,
    )
    blocks = [
        LineSegment(pair, 3 * INCH, "breakout"),
        SeriesCapacitor(100e-9, esl=0.3e-9, esr=0.01, n=2),
        Via(55 * MIL, 12 * MIL, 45.0, core, n=2),
        LineSegment(pair, 8 * INCH, "route"),
    ]
    net = build_network(blocks, np.linspace(0.0, 40e9, POINTS), 50.0)
    return write_touchstone(net, path)


def _env() -> dict[str, str]:
    path = os.environ.get("PYTHONPATH", "")
    env = {**os.environ, "PYTHONPATH": str(SRC) + (os.pathsep + path if path else "")}
    env.pop("PYTHONDONTWRITEBYTECODE", None)  # as on a user's machine: bytecode cached
    return env


def _cpu_children() -> float:
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def _command(argv: list[str], cwd: Path) -> tuple[float, float]:
    """(wall, CPU) seconds of one run in a new process."""
    c0 = _cpu_children()
    t0 = time.perf_counter()
    r = subprocess.run(argv, cwd=cwd, env=_env(), capture_output=True, text=True, timeout=300)
    wall = time.perf_counter() - t0
    if r.returncode != 0:
        raise RuntimeError(f"{' '.join(argv)} failed ({r.returncode}):\n{r.stderr}")
    return wall, _cpu_children() - c0


def run() -> list[tuple[str, float, float | None, str]]:
    from losslane.network.inspection import inspect_network
    from losslane.network.touchstone import read_touchstone

    with tempfile.TemporaryDirectory() as tmp:
        d = Path(tmp)
        path = _write_file(d / "lane.s4p")
        net = read_touchstone(path)

        def views():
            return inspect_network(net.f, net.s, 50.0, data_rate=64e9, modulation="pam4")

        insp = views()  # warm-up
        assert insp.quality.passivity == 100.0 and len(insp.time.tdr) == 6
        times = []
        for _ in range(7):
            t0 = time.perf_counter()
            views()
            times.append(time.perf_counter() - t0)
        in_process = statistics.median(times)

        argv = [sys.executable, "-m", "losslane", "inspect", str(path)]
        argv += ["--data-rate", "64Gb/s", "--modulation", "pam4"]
        _command([*argv, "--out", str(d / "warm")], d)  # byte code and font caches
        runs = [_command([*argv, "--out", str(d / f"run{k}")], d) for k in range(RUNS)]
        wall = statistics.median(w for w, _ in runs)
        cpu = statistics.median(c for _, c in runs)
    label = f"4-port, {POINTS} points"
    return [
        (
            f"inspect in-process after reading: quality, views, features ({label})",
            in_process,
            IN_PROCESS_TARGET_S,
            "s",
        ),
        (
            f"losslane inspect --out, 3 charts + page, new process, wall ({label})",
            wall,
            COMMAND_TARGET_S,
            "s",
        ),
        (f"losslane inspect --out, new process, CPU ({label})", cpu, None, "s"),
    ]


if __name__ == "__main__":
    if str(SRC) not in sys.path:
        sys.path.insert(0, str(SRC))
    rows = run()
    width = max(len(r[0]) for r in rows)
    for name, measured, target, unit in rows:
        goal = "" if target is None else f"   (target {target:g} {unit})"
        print(f"{name:<{width}}  {measured:10.4g} {unit}{goal}")

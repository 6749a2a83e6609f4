"""Helpers the benchmark modules share: timing a function or a new process, the made-up
differential lane several of them run, and the standalone table. Not a benchmark itself
(``run.py`` loads only ``bench_*.py``); a module imports it as ``benchkit`` (this directory
is on ``sys.path`` whether a module runs standalone or through ``run.py``).
"""

from __future__ import annotations

import os
import resource
import statistics
import subprocess
import sys
import time
from collections.abc import Callable, Sequence
from pathlib import Path

HERE = Path(__file__).resolve().parent
SRC = HERE.parent / "src"

Row = tuple[str, float, float | None, str]


def use_source_tree() -> None:
    """Import losslane from this checkout's ``src/`` (standalone runs without installing)."""
    if SRC.is_dir() and str(SRC) not in sys.path:
        sys.path.insert(0, str(SRC))


def median_time(fn: Callable[[], object], repeats: int) -> float:
    """Median wall time in seconds of ``repeats`` calls of ``fn``."""
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def child_env() -> dict[str, str]:
    """The environment of a timed command: this tree's ``src/`` first on PYTHONPATH, and
    compiled bytecode cached after the first run, as on a user's machine (installed packages
    such as scikit-rf have theirs from pip already; some shells set PYTHONDONTWRITEBYTECODE,
    which would recompile losslane's sources on every run)."""
    path = os.environ.get("PYTHONPATH", "")
    env = {**os.environ, "PYTHONPATH": str(SRC) + (os.pathsep + path if path else "")}
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    return env


def losslane_argv(*args: str) -> list[str]:
    """The command line of ``losslane ARGS`` in a new interpreter."""
    return [sys.executable, "-m", "losslane", *args]


def _cpu_children() -> float:
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def timed_process(argv: list[str], cwd: Path, ok: Sequence[int] = (0,)) -> tuple[float, float]:
    """(wall, CPU) seconds of one run of ``argv`` in a new process (CPU: user + system time
    of the child, less sensitive to other work on a shared machine). An exit code outside
    ``ok`` raises with the command's stderr."""
    c0 = _cpu_children()
    t0 = time.perf_counter()
    r = subprocess.run(argv, cwd=cwd, env=child_env(), capture_output=True, text=True, timeout=300)
    wall = time.perf_counter() - t0
    if r.returncode not in ok:
        raise RuntimeError(f"{' '.join(argv)} failed ({r.returncode}):\n{r.stderr}")
    return wall, _cpu_children() - c0


def lane_blocks() -> list:
    """A made-up differential lane: a stripline pair (3 in), DC blocks, a via pair with
    stubs, the pair again (8 in); on a wideband Debye laminate (Dk 3.7, Df 0.009 at 10 GHz,
    typical values)."""
    from losslane.materials.dielectric import WidebandDebye
    from losslane.network import LineSegment, SeriesCapacitor, Via
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
    return [
        LineSegment(pair, 3 * INCH, "breakout"),
        SeriesCapacitor(100e-9, esl=0.3e-9, esr=0.01, n=2),
        Via(55 * MIL, 12 * MIL, 45.0, core, n=2),
        LineSegment(pair, 8 * INCH, "route"),
    ]


def print_rows(rows: Sequence[Row]) -> None:
    """A module's rows as a small table (its standalone run; ``run.py`` prints them all)."""
    width = max(len(r[0]) for r in rows)
    for name, measured, target, unit in rows:
        goal = "" if target is None else f"   (target {target:.3g} {unit})"
        print(f"{name:<{width}}  {measured:8.3g} {unit}{goal}")

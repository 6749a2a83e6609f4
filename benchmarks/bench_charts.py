"""Builds with every chart, in a new process, imports and file writing included: the
differential demo (five charts), its single-ended variant (seven: the 2-port's phase and
group delay, VSWR and Smith chart besides) and the Ku-band example (seven: the focused
band and the RF views). Goal for each: 5 s wall.

Rows ``(name, measured, target, unit)``: median wall time and median CPU time (user +
system of the child process; less sensitive to other work on a shared machine) of a few
runs, the three commands taking turns run by run. Run standalone with
``python benchmarks/bench_charts.py``.
"""

from __future__ import annotations

import statistics
import tempfile
from pathlib import Path

from benchkit import HERE, losslane_argv, print_rows, timed_process

KU = HERE.parent / "examples" / "ku-feed-band.toml"
TARGET_S = 5.0
RUNS = 3


def _timed(args: list[str], cwd: Path) -> tuple[float, float]:
    """(wall, CPU) seconds of one `losslane ...` run in a new process (exit 1 accepted: the
    Ku example's band fails, and --strict is not set)."""
    return timed_process(losslane_argv(*args), cwd, ok=(0, 1))


COMMANDS = (
    ("losslane demo, all 5 charts", ["demo"]),
    ("losslane demo --single-ended, all 7 charts", ["demo", "--single-ended"]),
    ("losslane build examples/ku-feed-band.toml, all 7 charts", ["build", str(KU)]),
)


def run() -> list[tuple[str, float, float | None, str]]:
    times: list[list[tuple[float, float]]] = [[] for _ in COMMANDS]
    with tempfile.TemporaryDirectory() as tmp:
        _timed(["demo", "--out", "warm"], Path(tmp))  # font and bytecode caches
        for k in range(RUNS):
            for i, (_, args) in enumerate(COMMANDS):
                d = Path(tmp) / f"r{k}-{i}"
                d.mkdir()
                times[i].append(_timed([*args, "--out", str(d / "o")], d))
    rows = []
    for (label, _), t in zip(COMMANDS, times, strict=True):
        rows.append(
            (f"{label}, wall (new process)", statistics.median(w for w, _ in t), TARGET_S, "s")
        )
        rows.append((f"{label}, CPU (new process)", statistics.median(c for _, c in t), None, "s"))
    return rows


if __name__ == "__main__":
    print_rows(run())

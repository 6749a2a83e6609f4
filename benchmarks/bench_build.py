"""Whole-command speed: `losslane build` and `losslane demo` in a new process, imports and
file writing included, as a user meets them.

Rows ``(name, measured, target, unit)``; times are medians of a few runs.

* the 20-segment microstrip channel of benchmarks/data/twenty-segments.toml at 10 001
  points, ``losslane build --no-plots``, against benchmarks/skrf_equivalent.py (the same
  channel from scikit-rf's microstrip media and ``cascade_list``, also in a new process,
  also writing the Touchstone file). Goal: losslane at most 1/3 of the scikit-rf script's
  wall time (the ratio row);
* ``losslane demo --no-plots``: goal 1.5 s; ``losslane demo`` with all its charts: goal 5 s
  (bench_charts.py times the builds with the RF views).

The CPU-time ratio (user + system time of the child processes) is reported beside the
wall-time ratio: it is less sensitive to other work on a shared machine. Both programs'
insertion loss at the top of the sweep is reported for information only: they share the
published microstrip Z0 / eps_eff formulas and the wideband Debye dielectric, but not the
conductor-loss method (losslane: Wheeler's incremental-inductance rule on the
thickness-corrected impedance; scikit-rf's MLine: a closed-form current-distribution
factor), so the figures differ.
Run standalone with ``python benchmarks/bench_build.py``.
"""

from __future__ import annotations

import statistics
import sys
import tempfile
from pathlib import Path

from benchkit import HERE, losslane_argv, print_rows, timed_process

SCENARIO = HERE / "data" / "twenty-segments.toml"
SKRF_SCRIPT = HERE / "skrf_equivalent.py"
RUNS = 5
RATIO_TARGET = 1 / 3
DEMO_TARGET_S = 1.5
DEMO_PLOTS_TARGET_S = 5.0


def _median_walls(*argv_for_run, runs: int = RUNS) -> list[tuple[float, float]]:
    """Median (wall, CPU) time of each command; the commands take turns, run by run, so a
    load change on the shared machine falls on all of them alike."""
    times: list[list[tuple[float, float]]] = [[] for _ in argv_for_run]
    with tempfile.TemporaryDirectory() as tmp:
        for k in range(runs):
            for i, make in enumerate(argv_for_run):
                d = Path(tmp) / f"run{k}-{i}"
                d.mkdir()
                times[i].append(timed_process(make(d), d))
    return [(statistics.median(w for w, _ in t), statistics.median(c for _, c in t)) for t in times]


def _top_loss_db(path: Path) -> float:
    import numpy as np
    import skrf

    net = skrf.Network(str(path))
    return float(-20 * np.log10(abs(net.s[-1, 1, 0])))


def run() -> list[tuple[str, float, float | None, str]]:
    # one untimed run of each program first: byte-code caches and the OS file cache are
    # warm for every timed run alike
    with tempfile.TemporaryDirectory() as tmp:
        d = Path(tmp)
        timed_process(losslane_argv("build", str(SCENARIO), "--no-plots", "--out", "a"), d)
        timed_process([sys.executable, str(SKRF_SCRIPT), str(SCENARIO), "b"], d)
        il_ours = _top_loss_db(d / "a" / "twenty-segments.s2p")
        il_skrf = _top_loss_db(d / "b" / "twenty-segments.s2p")
        timed_process(losslane_argv("demo", "--out", "c"), d)  # matplotlib's font cache, if any

    t_ours, t_skrf = _median_walls(
        lambda d: losslane_argv("build", str(SCENARIO), "--no-plots", "--out", str(d / "o")),
        lambda d: [sys.executable, str(SKRF_SCRIPT), str(SCENARIO), str(d)],
        runs=RUNS + 4,
    )
    t_demo, t_plots = _median_walls(
        lambda d: losslane_argv("demo", "--no-plots", "--out", str(d / "o")),
        lambda d: losslane_argv("demo", "--out", str(d / "o")),
    )
    label = "20 microstrip segments, 10 001 points, new process"
    return [
        (f"losslane build / skrf script, wall ({label})", t_ours[0] / t_skrf[0], RATIO_TARGET, "x"),
        (f"losslane build / skrf script, CPU ({label})", t_ours[1] / t_skrf[1], None, "x"),
        (f"losslane build --no-plots, wall ({label})", t_ours[0], None, "s"),
        (f"skrf MLine + cascade_list script, wall ({label})", t_skrf[0], None, "s"),
        ("losslane demo --no-plots, wall (new process)", t_demo[0], DEMO_TARGET_S, "s"),
        ("losslane demo with all charts, wall (new process)", t_plots[0], DEMO_PLOTS_TARGET_S, "s"),
        ("insertion loss at 50 GHz, losslane (20 segments)", il_ours, None, "dB"),
        ("insertion loss at 50 GHz, skrf MLine (20 segments)", il_skrf, None, "dB"),
    ]


if __name__ == "__main__":
    print_rows(run())

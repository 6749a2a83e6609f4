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

import statistics
import tempfile
from pathlib import Path

from benchkit import (
    lane_blocks,
    losslane_argv,
    median_time,
    print_rows,
    timed_process,
    use_source_tree,
)

POINTS = 10_001
RUNS = 5
IN_PROCESS_TARGET_S = 1.0
COMMAND_TARGET_S = 4.0


def _write_file(path: Path) -> Path:
    """The shared made-up differential lane at 10 001 points to 40 GHz, written as a
    Touchstone 1 file by losslane."""
    import numpy as np

    from losslane.network import build_network
    from losslane.network.touchstone import write_touchstone

    net = build_network(lane_blocks(), np.linspace(0.0, 40e9, POINTS), 50.0)
    return write_touchstone(net, path)


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
        in_process = median_time(views, 7)

        argv = losslane_argv("inspect", str(path))
        argv += ["--data-rate", "64Gb/s", "--modulation", "pam4"]
        timed_process([*argv, "--out", str(d / "warm")], d)  # byte code and font caches
        runs = [timed_process([*argv, "--out", str(d / f"run{k}")], d) for k in range(RUNS)]
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
    use_source_tree()
    print_rows(run())

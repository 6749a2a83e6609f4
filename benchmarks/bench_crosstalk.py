"""Crosstalk speed: the field solve of a group of traces and the build of a 2n-port channel,
in-process after import.

Rows ``(name, measured, target, unit)``; medians of repeats.

* two stripline pairs (4 conductors) at the default accuracy, a cold solve (the solver's
  cache cleared before each repeat): goal 3 s; and its ratio to the cold solve of the
  coated trapezoidal microstrip pair of the README's performance table (with its error
  estimate, as timed there), taken turn about in the same run, which a loaded shared
  machine changes far less than either time;
* a 10 001-point 8-port channel on that group (line, via, capacitor, line) built with
  ``channel.build_channel``, the field solution in the solver's cache as sizing and sweeps
  keep it: goal 2 s; the same with a cold solve, and the crosstalk evaluation (NEXT,
  FEXT, integrated noise) of the built channel, for information.

Run standalone with ``python benchmarks/bench_crosstalk.py``.
"""

from __future__ import annotations

import statistics
import time
import warnings

from benchkit import print_rows, use_source_tree

REPEATS = 3
SOLVE_TARGET_S = 3.0
BUILD_TARGET_S = 2.0

SCENARIO = """
name = "two pairs"
[sweep]
start = "0 Hz"
stop = "40 GHz"
points = 10001
[lines.bus]
kind = "stripline-group"
thickness = "0.6 mil"
below = "5 mil"
above = "5 mil"
dielectric = "low-loss"
traces = [
  { name = "agg", width = "5 mil", spacing = "7 mil" },
  { name = "vic", width = "5 mil", spacing = "7 mil", gap = "15 mil" },
]
[[channel]]
line = "bus"
length = "4 in"
[[channel]]
via = { barrel = "40 mil", stub = "8 mil", impedance = "45 ohm", dielectric = "low-loss" }
[[channel]]
capacitor = { value = "100 nF", esl = "0.3 nH" }
[[channel]]
line = "bus"
length = "6 in"
[crosstalk]
victim = "vic"
[budget]
data_rate = "32 Gb/s"
"""


def _median(fn, prepare=None) -> float:
    times = []
    for _ in range(REPEATS):
        if prepare is not None:
            prepare()
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def run() -> list[tuple[str, float, float | None, str]]:
    use_source_tree()
    import numpy as np

    from losslane.channel import build_channel
    from losslane.crosstalk.evaluate import evaluate_crosstalk
    from losslane.scenario import parse_scenario
    from losslane.xsection.fieldsolve import solve

    warnings.simplefilter("ignore")
    sc = parse_scenario(SCENARIO)
    section = sc.lines["bus"]
    one = np.array([1e9])

    def fresh():
        solve.CACHE.clear()

    # untimed: imports of the solver and the time-domain helpers
    built = build_channel(sc)
    evaluate_crosstalk(built)
    from losslane.api import section as make_section

    pair = make_section(
        {
            "kind": "microstrip-pair",
            "width": "5 mil",
            "spacing": "6 mil",
            "height": "4 mil",
            "thickness": "1.4 mil",
            "dielectric": "low-loss",
            "solver": "field",
            "etch_factor": 2.5,
            "coating_thickness": "0.8 mil",
            "coating_dielectric": "solder-mask",
        }
    )
    pair.rlgc(one)
    t_group, t_pair = [], []
    for _ in range(REPEATS):
        fresh()
        t0 = time.perf_counter()
        pair.rlgc(one)
        pair.error_estimate()
        t_pair.append(time.perf_counter() - t0)
        fresh()
        t0 = time.perf_counter()
        section.rlgc(one)
        t_group.append(time.perf_counter() - t0)
    t_solve = statistics.median(t_group)
    ratio = t_solve / statistics.median(t_pair)
    t_cold = _median(lambda: build_channel(sc), fresh)
    section.rlgc(one)
    t_warm = _median(lambda: build_channel(sc))
    t_xt = _median(lambda: evaluate_crosstalk(built))
    label = "8-port, 10 001 points, line + via + capacitor + line"
    return [
        ("field solve, two stripline pairs, default accuracy", t_solve, SOLVE_TARGET_S, "s"),
        ("  the same / coated microstrip pair solve, same run", ratio, None, "x"),
        (f"channel build, {label}, solution cached", t_warm, BUILD_TARGET_S, "s"),
        (f"channel build, {label}, with the solve", t_cold, None, "s"),
        ("crosstalk of that channel (NEXT, FEXT, integrated noise)", t_xt, None, "s"),
    ]


if __name__ == "__main__":
    print_rows(run())

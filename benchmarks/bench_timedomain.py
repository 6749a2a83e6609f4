"""Inspecting a differential 4-port at 10 001 points: the IEEE 370 quality metrics and
every time-domain view (six impedance profiles, three step responses with the skew, one
PAM4 pulse response), in-process on S-parameters already in memory (what ``inspect`` does
after reading its file). Goal: <= 1 s (median of repeats) for quality and all views.

``run()`` returns rows ``(name, measured, target, unit)``; run standalone with
``python benchmarks/bench_timedomain.py`` (PYTHONPATH=src).
"""

from __future__ import annotations

import json
import statistics
import time

import numpy as np

POINTS = 10_001
TARGET_S = 1.0


def _median_time(fn, repeats: int) -> float:
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def _channel(f: np.ndarray) -> np.ndarray:
    """A made-up differential lane: pair, DC blocks, a via pair with stubs, pair."""
    from losslane.materials.dielectric import WidebandDebye
    from losslane.network import LineSegment, SeriesCapacitor, Via, build_network
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
    return np.asarray(build_network(blocks, f, 50.0).s)


def run() -> list[tuple[str, float, float | None, str]]:
    from losslane.network.quality import quality
    from losslane.network.timedomain import time_domain

    f = np.linspace(0.0, 40e9, POINTS)
    s = _channel(f)

    def views():
        return time_domain(f, s, 50.0, data_rate=64e9, modulation="pam4")

    def both():
        return quality(f, s), views()

    q, rep = both()  # warm-up: scipy.fft's first call builds its plans
    assert q.passivity == 100.0 and q.reciprocity == 100.0, q
    assert len(rep.tdr) == 6 and len(rep.step) == 3 and rep.pulse is not None
    t_both = _median_time(both, 7)
    t_quality = _median_time(lambda: quality(f, s), 7)
    t_views = _median_time(views, 7)
    t_json = _median_time(lambda: json.dumps({"quality": q.to_json(), **rep.to_json()}), 5)
    size = len(json.dumps({"quality": q.to_json(), **rep.to_json()}))
    label = f"4-port, {POINTS} points"
    return [
        (f"quality + all time-domain views ({label})", t_both, TARGET_S, "s"),
        (f"  of which IEEE 370 quality metrics ({label})", t_quality * 1e3, None, "ms"),
        (f"  of which 6 profiles, 3 steps, skew, PAM4 pulse ({label})", t_views * 1e3, None, "ms"),
        (f"JSON of both ({size / 1e6:.2f} MB)", t_json * 1e3, None, "ms"),
    ]


if __name__ == "__main__":
    rows = run()
    width = max(len(r[0]) for r in rows)
    for name, measured, target, unit in rows:
        goal = "" if target is None else f"   (target {target:g} {unit})"
        print(f"{name:<{width}}  {measured:10.4g} {unit}{goal}")

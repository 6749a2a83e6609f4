"""Inspecting a differential 4-port at 10 001 points: the IEEE 370 quality metrics and
every time-domain view (six impedance profiles, three step responses with the skew, one
PAM4 pulse response), in-process on S-parameters already in memory (what ``inspect`` does
after reading its file). Goal: <= 1 s (median of repeats) for quality and all views.

``run()`` returns rows ``(name, measured, target, unit)``; run standalone with
``python benchmarks/bench_timedomain.py`` (PYTHONPATH=src).
"""

from __future__ import annotations

import json

import numpy as np
from benchkit import lane_blocks, median_time, print_rows, use_source_tree

POINTS = 10_001
TARGET_S = 1.0


def _channel(f: np.ndarray) -> np.ndarray:
    """The shared made-up differential lane (benchkit.lane_blocks) at ``f``."""
    from losslane.network import build_network

    return np.asarray(build_network(lane_blocks(), f, 50.0).s)


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
    t_both = median_time(both, 7)
    t_quality = median_time(lambda: quality(f, s), 7)
    t_views = median_time(views, 7)
    t_json = median_time(lambda: json.dumps({"quality": q.to_json(), **rep.to_json()}), 5)
    size = len(json.dumps({"quality": q.to_json(), **rep.to_json()}))
    label = f"4-port, {POINTS} points"
    return [
        (f"quality + all time-domain views ({label})", t_both, TARGET_S, "s"),
        (f"  of which IEEE 370 quality metrics ({label})", t_quality * 1e3, None, "ms"),
        (f"  of which 6 profiles, 3 steps, skew, PAM4 pulse ({label})", t_views * 1e3, None, "ms"),
        (f"JSON of both ({size / 1e6:.2f} MB)", t_json * 1e3, None, "ms"),
    ]


if __name__ == "__main__":
    use_source_tree()
    print_rows(run())

"""Cascade speed: losslane's vectorized chain-matrix cascade against scikit-rf's
``cascade_list`` on the same 20-segment single-ended channel at 10 001 points.

``run()`` returns rows ``(name, measured, target, unit)``; ``target`` is None for rows
that are reported for information only. Times are medians of several repeats in one
process; the speed-up row is the ratio of the two medians (goal: >= 10x). Both cascades
start from blocks already evaluated on the sweep (ours: scaled chain matrices; scikit-rf:
Networks) and end with an ``skrf.Network``; the results are asserted to agree.
Run standalone with ``python benchmarks/bench_cascade.py`` (PYTHONPATH=src).
"""

from __future__ import annotations

import numpy as np
from benchkit import median_time, print_rows

POINTS = 10_001
SEGMENTS = 20
SPEEDUP_TARGET = 10.0


def _sections():
    from losslane.materials.dielectric import WidebandDebye
    from losslane.units import MIL
    from losslane.xsection import Microstrip, Stripline

    core = WidebandDebye(3.7, 0.009, 10e9)
    low = WidebandDebye(3.3, 0.003, 10e9)
    return [
        Microstrip(width=6 * MIL, height=3.5 * MIL, thickness=1.4 * MIL, dielectric=core),
        Stripline(
            width=5 * MIL, below=6 * MIL, above=6 * MIL, thickness=0.6 * MIL, dielectric=core
        ),
        Stripline(
            width=4.5 * MIL, below=5 * MIL, above=7 * MIL, thickness=0.6 * MIL, dielectric=low
        ),
        Microstrip(width=8 * MIL, height=4 * MIL, thickness=1.9 * MIL, dielectric=low),
    ]


def run() -> list[tuple[str, float, float | None, str]]:
    import skrf

    from losslane.network import LineSegment, abcd_to_s, block_network, to_network
    from losslane.network.cascade import cascade_scaled
    from losslane.network.scaled import ScaledABCD, normalise
    from losslane.units import INCH

    f = np.linspace(0.0, 50e9, POINTS)
    sections = _sections()
    lengths = [(0.3 + 0.15 * (k % 7)) * INCH for k in range(SEGMENTS)]
    blocks = [
        LineSegment(sections[k % len(sections)], lengths[k], f"seg{k + 1}") for k in range(SEGMENTS)
    ]

    # building the blocks from cross-sections as a build does: each distinct section's
    # RLGC(f) and line constants once, then each segment's scaled chain matrix
    from losslane.network.line import UniformLine

    def build():
        lines = [UniformLine.from_rlgc(s.rlgc(f)) for s in sections]
        return [
            LineSegment(lines[k % len(sections)], lengths[k]).scaled_abcd(f)
            for k in range(SEGMENTS)
        ]

    def rlgc_all():
        return [s.rlgc(f) for s in sections]

    t_build = median_time(build, 3)
    rlgcs = rlgc_all()
    t_rlgc = median_time(rlgc_all, 3)

    def abcd_all():
        lines = [UniformLine.from_rlgc(r) for r in rlgcs]
        return [lines[k % len(sections)].scaled_abcd(lengths[k]) for k in range(SEGMENTS)]

    t_abcd = median_time(abcd_all, 3)
    items = build()
    nets = [block_network(b, f, 50.0) for b in blocks]

    def ours():
        chain = cascade_scaled(items)
        return to_network(abcd_to_s(chain, 50.0), f, 50.0, "channel")

    def theirs():
        return skrf.network.cascade_list(nets)

    def matmul_variant():
        # the same algorithm with np.matmul on (N, 2, 2) stacks instead of the entry-wise
        # product, for comparison
        m, s = items[0].matrix, items[0].log_scale
        for it in items[1:]:
            m, s = normalise(np.matmul(m, it.matrix), s + it.log_scale)
        return abcd_to_s(ScaledABCD.reciprocal(m, s), 50.0)

    a, b = ours(), theirs()
    diff = float(np.max(np.abs(a.s - b.s)))
    assert diff < 1e-9, f"cascade results differ from scikit-rf by {diff:g}"
    assert np.max(np.abs(matmul_variant() - a.s)) < 1e-12

    t_ours = median_time(ours, 7)
    t_theirs = median_time(theirs, 5)
    t_matmul = median_time(matmul_variant, 5)
    label = f"{SEGMENTS} segments x {POINTS} points"
    return [
        (
            # lower is better for the runner: losslane's time as a share of scikit-rf's
            # (goal <= 1/10, i.e. at least 10x faster)
            f"cascade time / skrf cascade_list time ({label})",
            t_ours / t_theirs,
            1.0 / SPEEDUP_TARGET,
            "ratio",
        ),
        (f"losslane cascade + S + Network ({label})", t_ours * 1e3, None, "ms"),
        (f"skrf cascade_list ({label})", t_theirs * 1e3, None, "ms"),
        (f"same cascade with np.matmul stacks ({label})", t_matmul * 1e3, None, "ms"),
        (f"max |S - S_skrf| ({label})", diff, 1e-9, ""),
        (
            f"build {SEGMENTS} line blocks from cross-sections, rlgc + abcd ({POINTS} points)",
            t_build * 1e3,
            None,
            "ms",
        ),
        (
            f"  of which cross-section rlgc(f) ({len(sections)} distinct of {SEGMENTS})",
            t_rlgc * 1e3,
            None,
            "ms",
        ),
        (f"  of which scaled abcd from rlgc ({SEGMENTS} blocks)", t_abcd * 1e3, None, "ms"),
    ]


if __name__ == "__main__":
    rows = run()
    print_rows(rows)
    speedup = 1.0 / rows[0][1]
    if speedup < SPEEDUP_TARGET:
        raise SystemExit(f"speed-up {speedup:.3g}x is below the {SPEEDUP_TARGET:g}x goal")

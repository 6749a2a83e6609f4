"""Vias from their drill geometry: the cost of the field solutions behind one via, on the
project's 2-core machine (medians of five fresh constructions, nothing shared between
them). Goals: a via pair (the boundary-element solve of two barrels in an oblong antipad
plus the axisymmetric solves of its two pads) within 0.5 s, a single via with pads within
0.3 s, so a channel with a handful of distinct vias adds about a second at most. The
block's S over 4001 points is included.
"""

from __future__ import annotations

import statistics
import time

BOARD = """
[sweep]
start = "0 Hz"
stop = "40 GHz"
points = 4001
[stackup]
layers = [
  { name = "mask", mask = "solder-mask", thickness = "0.8 mil" },
  { name = "L1", conductor = "signal", thickness = "1.6 mil" },
  { name = "pp1", dielectric = "low-loss", thickness = "3.5 mil" },
  { name = "L2", conductor = "plane", thickness = "1.2 mil" },
  { name = "core1", dielectric = "low-loss", thickness = "6 mil" },
  { name = "L3", conductor = "signal", thickness = "0.6 mil" },
  { name = "pp2", dielectric = "low-loss", thickness = "6 mil" },
  { name = "L4", conductor = "plane", thickness = "1.2 mil" },
  { name = "core2", dielectric = "low-loss", thickness = "30 mil" },
  { name = "L5", conductor = "plane", thickness = "1.2 mil" },
  { name = "pp3", dielectric = "low-loss", thickness = "3.5 mil" },
  { name = "L6", conductor = "signal", thickness = "1.6 mil" },
]
[lines.x]
kind = "KIND"
layer = "L3"
width = "5 mil"
SPACING
[[channel]]
line = "x"
length = "1 in"
[[channel]]
via = { from = "L1", to = "L3", drill = "8 mil", pad = "18 mil", antipad = "30 mil" PITCH }
"""


def _time(pair: bool, repeat: int = 5) -> float:
    from losslane.network.via import DrilledVia
    from losslane.scenario import parse_scenario

    text = (
        BOARD.replace("KIND", "stripline-pair" if pair else "stripline")
        .replace("SPACING", 'spacing = "7 mil"' if pair else "")
        .replace("PITCH", ', pitch = "36 mil"' if pair else "")
    )
    sc = parse_scenario(text)
    seg = sc.channel[1]
    f = sc.frequencies()
    DrilledVia(seg.drill, n=2 if pair else 1)  # imports (scipy, scikit-fem) are not timed
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        via = DrilledVia(seg.drill, n=2 if pair else 1)
        via.s(f)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def run() -> list[tuple[str, float, float, str]]:
    """Rows (name, measured seconds, target seconds, unit)."""
    return [
        ("drilled via pair with pads: barrels, pads and S at 4001 points", _time(True), 0.5, "s"),
        ("drilled single via with pads: the same", _time(False), 0.3, "s"),
    ]


if __name__ == "__main__":
    for name, measured, target, unit in run():
        print(f"{name}: {measured:.3f} {unit} (target {target:g} {unit})")

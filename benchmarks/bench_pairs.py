"""A 10-segment differential channel at 10 001 points, built in-process (modal
decomposition of the coupled lines included): goal <= 0.5 s."""

from __future__ import annotations

import statistics
import time

SCENARIO = """
[sweep]
start = "0 Hz"
stop = "50 GHz"
points = 10001

[lines.top]
kind = "microstrip-pair"
width = "5.4 mil"
spacing = "7 mil"
height = "3.5 mil"
thickness = "1.6 mil"
dielectric = "low-loss"
foil = "very-low-profile"

[lines.inner]
kind = "stripline-pair"
width = "5 mil"
spacing = "7 mil"
below = "6 mil"
above = "6 mil"
thickness = "0.6 mil"
dielectric = "low-loss"
foil = "very-low-profile"

[[channel]]
line = "top"
length = "0.4 in"
[[channel]]
via = { barrel = "50 mil", stub = "10 mil", impedance = "46 ohm", dielectric = "low-loss" }
[[channel]]
line = "inner"
length = "3 in"
[[channel]]
capacitor = { value = "100 nF", esl = "0.3 nH" }
[[channel]]
line = "inner"
length = "4 in"
[[channel]]
via = { barrel = "50 mil", stub = "10 mil", impedance = "46 ohm", dielectric = "low-loss" }
[[channel]]
line = "inner"
length = "5 in"
[[channel]]
via = { barrel = "50 mil", stub = "10 mil", impedance = "46 ohm", dielectric = "low-loss" }
[[channel]]
line = "inner"
length = "2 in"
[[channel]]
line = "top"
length = "0.6 in"
"""


def run() -> list[tuple[str, float, float | None, str]]:
    import warnings

    from losslane.channel import build_channel
    from losslane.scenario import parse_scenario

    sc = parse_scenario(SCENARIO)
    times = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        build_channel(sc)  # warm-up: first-call imports and caches
        for _ in range(5):
            # each build evaluates its cross-sections and their modes afresh (nothing is
            # kept between builds)
            t0 = time.perf_counter()
            res = build_channel(sc)
            times.append(time.perf_counter() - t0)
    assert res.nports == 4
    return [("10-segment differential channel, 10 001 points", statistics.median(times), 0.5, "s")]


if __name__ == "__main__":
    for row in run():
        print(row)

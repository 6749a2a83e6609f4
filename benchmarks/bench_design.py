"""Speed of the design helpers (issue 6 goals).

* spread: 100 000 Monte Carlo samples of a closed-form line at 3 frequencies <= 2 s
  (single lines and, since the pair models are array-native too, pairs);
* compare: 6 materials x 3 foils, each re-sized to the target, <= 1 s;
* size: one width solve with sensitivities (no stated goal; shown for reference).

``run()`` returns rows ``(name, measured_seconds, target_seconds, unit)`` (the median of a
few runs after a warm-up; target None where there is no goal). Standalone:
``python benchmarks/bench_design.py``.
"""

from __future__ import annotations

import sys
import warnings

from benchkit import median_time, use_source_tree

use_source_tree()

MIL = 25.4e-6
MATERIALS = [
    "epoxy-glass-standard",
    "epoxy-glass-midloss",
    "low-loss",
    "very-low-loss",
    "ultra-low-loss",
    "ptfe-ceramic",
]
FOILS = ["standard-ed", "very-low-profile", "hyper-low-profile"]


def _median(fn, repeat: int = 3) -> float:
    fn()  # warm-up: imports, caches
    return median_time(fn, repeat)


def run() -> list[tuple[str, float, float | None, str]]:
    from losslane.design import compare, size, spread
    from losslane.errors import LossLaneWarning
    from losslane.materials.library import load_library
    from losslane.xsection import Metal, Microstrip, MicrostripPair, Stripline, StriplinePair

    lib = load_library()
    metal = Metal(foil=lib.foil("very-low-profile"))
    ms = Microstrip(7.9 * MIL, 4 * MIL, 1.4 * MIL, lib.dielectric("low-loss"), metal)
    sl = Stripline(4.8 * MIL, 5 * MIL, 5 * MIL, 0.6 * MIL, lib.dielectric("low-loss"), metal)
    freqs = [1e9, 14e9, 28e9]
    tol = {"width": 0.5 * MIL, "height": 0.4 * MIL, "thickness": 0.2 * MIL, "dk": 0.1}
    tol_sl = {
        "width": 0.5 * MIL,
        "below": 0.4 * MIL,
        "above": 0.4 * MIL,
        "thickness": 0.1 * MIL,
        "dk": 0.1,
    }
    mp = MicrostripPair(5 * MIL, 7 * MIL, 3.5 * MIL, 1.4 * MIL, lib.dielectric("low-loss"), metal)
    sp = StriplinePair(
        5 * MIL, 7 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, lib.dielectric("low-loss"), metal
    )
    tol_pair = {"width": 0.5 * MIL, "spacing": 0.5 * MIL, "thickness": 0.2 * MIL, "dk": 0.1}
    mats = {n: lib.dielectric(n) for n in MATERIALS}
    foils = {n: lib.foil(n) for n in FOILS}
    rows = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        rows.append(
            (
                "spread microstrip, 100k samples x 3 frequencies",
                _median(lambda: spread(ms, tol, freqs, samples=100_000, seed=1)),
                2.0,
                "s",
            )
        )
        rows.append(
            (
                "spread stripline, 100k samples x 3 frequencies",
                _median(lambda: spread(sl, tol_sl, freqs, samples=100_000, seed=1)),
                2.0,
                "s",
            )
        )
        for name, pair in (("microstrip-pair", mp), ("stripline-pair", sp)):
            rows.append(
                (
                    f"spread {name}, 100k samples x 3 frequencies",
                    _median(lambda p=pair: spread(p, tol_pair, freqs, samples=100_000, seed=1)),
                    2.0,
                    "s",
                )
            )
        rows.append(
            (
                "compare microstrip, 6 materials x 3 foils re-sized",
                _median(lambda: compare(ms, mats, foils, 50.0, freqs)),
                1.0,
                "s",
            )
        )
        rows.append(
            (
                "size microstrip, one solve with sensitivities",
                _median(lambda: size(ms, 50.0, loss_at=freqs), 5),
                None,
                "s",
            )
        )
    return rows


def main() -> int:
    ok = True
    for name, measured, target, unit in run():
        verdict = "" if target is None else ("ok" if measured <= target else "SLOW")
        goal = "-" if target is None else f"<= {target:g} {unit}"
        print(f"{name:55s} {measured:8.3f} {unit}   goal {goal:8s} {verdict}")
        ok &= target is None or measured <= target
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())

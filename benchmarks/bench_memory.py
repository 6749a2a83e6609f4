"""Peak memory of a large build: 50 segments of a differential channel (microstrip and
stripline pairs, vias, DC blocks) at 100 001 points, `losslane build --no-plots` in a new
process: goal <= 1 GiB (the cascade keeps no block's S; each segment's own loss and the
loss through it are taken as it goes)."""

from __future__ import annotations

import subprocess
import sys
import tempfile
import time
from pathlib import Path

HEAD = """name = "fifty"
[sweep]
start = "0 Hz"
stop = "50 GHz"
points = 100001
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
"""
VIA = 'via = { barrel = "50 mil", stub = "10 mil", impedance = "46 ohm", dielectric = "low-loss" }'


def scenario() -> str:
    segs = []
    for k in range(50):
        if k % 5 == 4:
            segs.append(f"[[channel]]\n{VIA}")
        elif k % 7 == 6:
            segs.append('[[channel]]\ncapacitor = { value = "100 nF", esl = "0.3 nH" }')
        else:
            line = "top" if k % 2 else "inner"
            segs.append(f'[[channel]]\nline = "{line}"\nlength = "{0.3 + 0.1 * (k % 4):g} in"')
    return HEAD + "\n".join(segs) + "\n"


#: run the command in a new interpreter and print that process's own peak (kB on Linux)
CHILD = """
import resource, sys
from losslane.cli import main
code = main(sys.argv[1:])
print(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss, file=sys.stderr)
sys.exit(code)
"""


def run() -> list[tuple[str, float, float | None, str]]:
    with tempfile.TemporaryDirectory() as d:
        path = Path(d) / "fifty.toml"
        path.write_text(scenario(), encoding="utf-8")
        t0 = time.perf_counter()
        proc = subprocess.run(
            [sys.executable, "-c", CHILD, "build", str(path), "--out", str(Path(d) / "o")]
            + ["--no-plots"],
            check=True,
            capture_output=True,
            text=True,
        )
        wall = time.perf_counter() - t0
    mib = int(proc.stderr.strip().splitlines()[-1]) / 1024.0
    return [
        ("peak memory, 50-segment differential build, 100 001 points", mib, 1024.0, "MiB"),
        ("the same build, wall time (new process)", wall, None, "s"),
    ]

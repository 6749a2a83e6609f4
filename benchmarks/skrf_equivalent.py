"""The benchmark channel built with scikit-rf alone: the comparison script of
bench_build.py, run in a new process like `losslane build`.

Reads benchmarks/data/twenty-segments.toml (the same file losslane builds), makes one
scikit-rf microstrip medium (``skrf.media.MLine``: Hammerstad-Jensen, Kirschning-Jansen
dispersion, Djordjevic-Svensson wideband Debye dielectric, Hammerstad roughness) per
cross-section, a line network per segment, cascades them with
``skrf.network.cascade_list`` and writes the Touchstone file, as a user of scikit-rf would.

Usage: python benchmarks/skrf_equivalent.py SCENARIO.toml OUT_DIR
"""

from __future__ import annotations

import re
import sys
import tomllib
import warnings
from pathlib import Path

import skrf
from skrf.media import MLine

_UNITS = {
    "mil": 25.4e-6,
    "in": 25.4e-3,
    "mm": 1e-3,
    "um": 1e-6,
    "hz": 1.0,
    "mhz": 1e6,
    "ghz": 1e9,
    "ohm": 1.0,
}


def value(text: str) -> float:
    number, unit = re.fullmatch(r"\s*([0-9.eE+-]+)\s*(\S+)\s*", text).groups()
    return float(number) * _UNITS[unit.lower()]


def main(scenario: Path, out: Path) -> Path:
    data = tomllib.loads(scenario.read_text())
    sweep = data["sweep"]
    start, stop, step = (value(sweep[k]) for k in ("start", "stop", "step"))
    npoints = int(round((stop - start) / step)) + 1
    freq = skrf.Frequency(start, stop, npoints, unit="Hz")
    z_ref = value(data.get("ports", {}).get("reference", "50 ohm"))
    media = {}
    for name, line in data["lines"].items():
        diel = data["dielectrics"][line["dielectric"]]
        foil = data["foils"][line["foil"]]
        media[name] = MLine(
            freq,
            z0_port=z_ref,
            w=value(line["width"]),
            h=value(line["height"]),
            t=value(line["thickness"]),
            ep_r=diel["dk"],
            tand=diel["df"],
            f_epr_tand=value(diel["at"]),
            rho=1 / 5.8e7,  # annealed copper
            rough=value(foil["rq"]),
            model="hammerstadjensen",
            disp="kirschningjansen",
            diel="djordjevicsvensson",
        )
    nets = [media[seg["line"]].line(value(seg["length"]), unit="m") for seg in data["channel"]]
    channel = skrf.network.cascade_list(nets)
    channel.name = re.sub(r"[^a-z0-9]+", "-", data["name"].lower()).strip("-")
    out.mkdir(parents=True, exist_ok=True)
    channel.write_touchstone(str(out / channel.name), form="ri")
    return out / f"{channel.name}.s2p"


if __name__ == "__main__":
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # DC and skin-depth validity notes from MLine
        print(main(Path(sys.argv[1]), Path(sys.argv[2])))

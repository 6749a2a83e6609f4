"""Input limits: the physical range every value read from a user must lie in.

A value outside its range is refused with a LossLaneError naming the key, the value and
the range (the README's "Input limits" states them and why). The ranges are wide -- far
beyond any printed-board or cable channel -- and only keep absurd values (``"1e30 mil"``,
``"1e-300 m"``) from reaching the numerics, where they would overflow or underflow into
NaN instead of an answer.

Two layers: ``KIND_RANGES`` bounds the magnitude of every quantity of a kind wherever it
is parsed (``units.parse_quantity``); the tighter ``DIMENSION`` range bounds the lengths
of a cross-section, a via and a foil (they are the drawing of a board, not the length of
a cable). Signs stay with the callers, which know whether a negative or zero value means
anything (a negative frequency never does and is refused here).
"""

from __future__ import annotations

import math

from losslane.errors import LossLaneError

#: kind -> (smallest non-zero magnitude, largest magnitude), SI units. Zero stays legal
#: here (a DC point, a thickness of 0); callers refuse it where it means nothing.
KIND_RANGES: dict[str, tuple[float, float]] = {
    # 1 nm: below the thinnest plating (immersion gold is tens of nm); 10 km: longer than
    # any cable run a channel tool is asked about
    "length": (1e-9, 1e4),
    # 10 THz: two decades above the quasi-TEM models' range; 1 mHz: below any sweep step
    "frequency": (1e-3, 1e13),
    # 1 micro-ohm .. 1 giga-ohm: contact resistance .. an open
    "resistance": (1e-6, 1e9),
    # 1 aF .. 1 F; 1 aH .. 1 H: a via's fringe .. a bulk capacitor or a choke
    "capacitance": (1e-18, 1.0),
    "inductance": (1e-18, 1.0),
    # a Nyquist frequency inside the frequency range
    "data rate": (1.0, 2e13),
    # a loss allowance or a return-loss limit: beyond 1000 dB nothing is measured
    "decibel": (0.0, 1e3),
    # resistive inks and graphite (1e4 S/m) .. 1e12 S/m, a near-ideal conductor for checks
    # against lossless theory (its skin depth, 0.5 nm at 1 GHz, is still finite numerics)
    "conductivity": (1e3, 1e12),
    "time": (1e-18, 1.0),
    # 1 nV .. 1 kV: a noise floor .. any signalling amplitude
    "voltage": (1e-9, 1e3),
}

#: lengths that draw a cross-section, a via or a foil (widths, heights, thicknesses,
#: roughness, sphere radii, plating layers, barrels and stubs): 1 nm .. 1 m. No board
#: is a metre thick or wide; nothing below a nanometre is a layer.
DIMENSION = (1e-9, 1.0)

#: relative permittivity: vacuum .. high-permittivity ceramics
DK = (1.0, 100.0)
#: loss tangent: 0 .. 1 (above 1 a material is a conductor, not a dielectric)
DF = (0.0, 1.0)
#: the largest |S| entry accepted in an imported file: a passive model has |S| <= 1;
#: 10 (20 dB of gain) leaves room for measured data and its noise, and refuses unit or
#: format mistakes (a dB column read as magnitude, 1e308)
MAX_S_MAGNITUDE = 10.0


def _g(x: float) -> str:
    return f"{x:.6g}"


def describe(kind: str, unit: str) -> str:
    """The accepted range of ``kind``, in ``unit`` (SI), for messages."""
    lo, hi = KIND_RANGES[kind]
    span = f"0 or {_g(lo)} .. {_g(hi)} {unit}" if lo > 0 else f"0 .. {_g(hi)} {unit}"
    return span if kind == "frequency" else f"{span} in magnitude"


SI_UNITS = {
    "length": "m",
    "frequency": "Hz",
    "resistance": "ohm",
    "capacitance": "F",
    "inductance": "H",
    "data rate": "b/s",
    "decibel": "dB",
    "conductivity": "S/m",
    "time": "s",
    "voltage": "V",
}


def check_kind(value: float, kind: str, key: str, shown: object) -> float:
    """``value`` (SI) of ``kind`` if it lies in ``KIND_RANGES``; else a LossLaneError naming
    ``key``, the value as written (``shown``) and the range."""
    unit = SI_UNITS[kind]
    if not math.isfinite(value):
        raise LossLaneError(f"{key} = {shown!r}: not a finite {kind}")
    lo, hi = KIND_RANGES[kind]
    if kind == "frequency" and value < 0:
        raise LossLaneError(
            f"{key} = {shown!r}: must be >= 0 Hz (valid frequencies are {describe(kind, unit)})"
        )
    if kind == "conductivity" and value <= 0:
        raise LossLaneError(
            f"{key} = {shown!r}: a conductivity is > 0; valid values are "
            f"{_g(lo)} .. {_g(hi)} S/m (copper 5.8e7 S/m)"
        )
    mag = abs(value)
    if mag != 0 and not lo <= mag <= hi:
        if kind == "conductivity":
            rng = f"{_g(lo)} .. {_g(hi)} S/m (copper 5.8e7 S/m)"
        else:
            rng = describe(kind, unit)
        raise LossLaneError(
            f"{key} = {shown!r} ({_g(value)} {unit}) is outside the accepted {kind} range "
            f"{rng} (see 'Input limits' in the README)"
        )
    return value


def check_dimension(value: float, key: str, shown: object, zero_ok: bool = False) -> float:
    """A length that draws a board (``DIMENSION``): > 0 (or 0 with ``zero_ok``) and at most
    1 m; else a LossLaneError naming ``key`` and the range."""
    lo, hi = DIMENSION
    if value == 0 and zero_ok:
        return value
    if not (lo <= value <= hi):
        low = "0 or " if zero_ok else ""
        raise LossLaneError(
            f"{key} = {shown!r} ({_g(value)} m) is outside the accepted range of a board "
            f"dimension, {low}{_g(lo * 1e9)} nm .. {_g(hi)} m (see 'Input limits' in the "
            "README)"
        )
    return value


def check_number(value: float, key: str, shown: object, low: float, high: float) -> float:
    """A plain number in [low, high] (Dk, Df, ...); else a LossLaneError naming ``key``."""
    if not (math.isfinite(value) and low <= value <= high):
        raise LossLaneError(f"{key} = {shown!r}: valid values are {_g(low)} .. {_g(high)}")
    return value


__all__ = [
    "DF",
    "DIMENSION",
    "DK",
    "KIND_RANGES",
    "MAX_S_MAGNITUDE",
    "check_dimension",
    "check_kind",
    "check_number",
]

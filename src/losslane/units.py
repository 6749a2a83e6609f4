"""Strict parsing of the trade's units into SI floats.

Written by hand on purpose: the trade's units (mil, oz copper, Gb/s) are not what
general unit libraries assume, and a command-line tool must start fast. Every
length and frequency needs its unit; a bare number is an error that lists the
accepted forms.
"""

from __future__ import annotations

import math
import re

from losslane.errors import LossLaneError

MIL = 25.4e-6
INCH = 25.4e-3
#: Thickness of 1 oz/ft^2 copper foil, 1.37 mil (common practice).
OZ_COPPER = 34.8e-6

_MU = ("u", "µ", "μ")  # ASCII u, micro sign, Greek mu


def _with_micro(base: str, factor: float) -> dict[str, float]:
    return {p + base: factor for p in _MU}


_TABLES: dict[str, dict[str, float]] = {
    "length": {
        "m": 1.0,
        "cm": 1e-2,
        "mm": 1e-3,
        "nm": 1e-9,
        **_with_micro("m", 1e-6),
        "mil": MIL,
        "mils": MIL,
        "thou": MIL,
        "in": INCH,
        "inch": INCH,
        "inches": INCH,
        '"': INCH,
        "oz": OZ_COPPER,
    },
    "frequency": {
        "hz": 1.0,
        "khz": 1e3,
        "mhz": 1e6,
        "ghz": 1e9,
        "thz": 1e12,
    },
    "resistance": {
        "ohm": 1.0,
        "ohms": 1.0,
        "Ω": 1.0,
        "mohm": 1e-3,
        "mΩ": 1e-3,
        "kohm": 1e3,
        "kΩ": 1e3,
        "Mohm": 1e6,
        "MΩ": 1e6,
        **_with_micro("ohm", 1e-6),
    },
    "capacitance": {
        "F": 1.0,
        "mF": 1e-3,
        "nF": 1e-9,
        "pF": 1e-12,
        "fF": 1e-15,
        **_with_micro("F", 1e-6),
    },
    "inductance": {
        "H": 1.0,
        "mH": 1e-3,
        "nH": 1e-9,
        "pH": 1e-12,
        **_with_micro("H", 1e-6),
    },
    "data rate": {
        "b/s": 1.0,
        "bps": 1.0,
        "kb/s": 1e3,
        "kbps": 1e3,
        "Mb/s": 1e6,
        "Mbps": 1e6,
        "Gb/s": 1e9,
        "Gbps": 1e9,
        "GT/s": 1e9,
        "Tb/s": 1e12,
    },
    "decibel": {"dB": 1.0, "db": 1.0},
    "conductivity": {"S/m": 1.0, "MS/m": 1e6},
    "time": {"s": 1.0, "ms": 1e-3, "ns": 1e-9, "ps": 1e-12, "fs": 1e-15, **_with_micro("s", 1e-6)},
    "voltage": {"V": 1.0, "mV": 1e-3, **_with_micro("V", 1e-6)},
}

# Frequency units are matched without regard to case (nobody means millihertz).
_CASELESS = {"frequency"}

_NUMBER = r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?"
_PATTERN = re.compile(rf"^\s*({_NUMBER})\s*(\S.*?)?\s*$")


def accepted_units(kind: str) -> str:
    table = _TABLES[kind]
    seen: list[str] = []
    for unit in table:
        if unit.startswith(("µ", "μ")):
            continue
        if unit not in seen:
            seen.append(unit)
    if kind == "frequency":
        seen = ["Hz", "kHz", "MHz", "GHz", "THz"]
    return ", ".join(seen)


def _example(kind: str) -> str:
    return {
        "length": '"5 mil", "0.127 mm", "1.2 in", "1 oz" (copper thickness)',
        "frequency": '"10 GHz", "500 MHz", "0 Hz"',
        "resistance": '"50 ohm", "10 mohm"',
        "capacitance": '"100 nF", "0.2 pF"',
        "inductance": '"0.4 nH"',
        "data rate": '"32 Gb/s", "16 GT/s"',
        "decibel": '"28 dB"',
        "conductivity": '"5.8e7 S/m", "58 MS/m"',
        "time": '"10 ps"',
        "voltage": '"800 mV", "1.2 V"',
    }[kind]


def parse_quantity(value: object, kind: str, key: str = "value") -> float:
    """Parse ``value`` (a string with a unit) as a ``kind`` quantity, in SI units.

    ``kind`` is one of: length, frequency, resistance, capacitance, inductance,
    data rate, decibel, conductivity, time, voltage. ``key`` names the input in messages.
    """
    if kind not in _TABLES:
        raise KeyError(kind)
    hint = f"write it with a unit, e.g. {_example(kind)}; accepted units: {accepted_units(kind)}"
    if isinstance(value, bool) or not isinstance(value, (str, int, float)):
        raise LossLaneError(f"{key} = {value!r}: expected a {kind} as text; {hint}")
    if isinstance(value, (int, float)):
        raise LossLaneError(f"{key} = {value!r}: a bare number is not a {kind}; {hint}")
    m = _PATTERN.match(value)
    if not m:
        raise LossLaneError(f"{key} = {value!r}: not a number with a unit; {hint}")
    number, unit = m.group(1), m.group(2)
    if unit is None:
        raise LossLaneError(f"{key} = {value!r}: a bare number is not a {kind}; {hint}")
    table = _TABLES[kind]
    factor = table.get(unit)
    if factor is None and kind in _CASELESS:
        factor = table.get(unit.lower())
    if factor is None:
        raise LossLaneError(f"{key} = {value!r}: unknown {kind} unit {unit!r}; {hint}")
    result = float(number) * factor
    if not math.isfinite(result):
        raise LossLaneError(f"{key} = {value!r}: not a finite {kind}")
    return result


def parse_length(value: object, key: str = "length") -> float:
    return parse_quantity(value, "length", key)


def parse_frequency(value: object, key: str = "frequency") -> float:
    return parse_quantity(value, "frequency", key)


def parse_resistance(value: object, key: str = "resistance") -> float:
    return parse_quantity(value, "resistance", key)


def parse_capacitance(value: object, key: str = "capacitance") -> float:
    return parse_quantity(value, "capacitance", key)


def parse_inductance(value: object, key: str = "inductance") -> float:
    return parse_quantity(value, "inductance", key)


def parse_data_rate(value: object, key: str = "data_rate") -> float:
    return parse_quantity(value, "data rate", key)


def parse_decibel(value: object, key: str = "value") -> float:
    return parse_quantity(value, "decibel", key)


def parse_conductivity(value: object, key: str = "conductivity") -> float:
    """Conductivity with a unit, or a bare number taken as S/m (the only SI unit in use)."""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return float(value)
    if isinstance(value, str) and re.fullmatch(rf"\s*{_NUMBER}\s*", value):
        return float(value)
    return parse_quantity(value, "conductivity", key)


def parse_frequency_list(value: object, key: str = "frequencies") -> list[float]:
    """Parse ``"1GHz,10GHz,28GHz"``; a unit on the last item applies to bare items before it
    (``"1,10,28 GHz"``)."""
    if isinstance(value, (list, tuple)):
        return [parse_frequency(v, key) for v in value]
    if not isinstance(value, str) or not value.strip():
        raise LossLaneError(
            f'{key} = {value!r}: expected a comma-separated list such as "1GHz,10GHz,28GHz"'
        )
    items = [s.strip() for s in value.split(",")]
    if any(not s for s in items):
        raise LossLaneError(f"{key} = {value!r}: empty item in the list")
    last = _PATTERN.match(items[-1])
    shared = last.group(2) if last and last.group(2) else None
    out = []
    for item in items:
        m = _PATTERN.match(item)
        if m and m.group(2) is None and shared is not None:
            item = f"{item} {shared}"
        out.append(parse_frequency(item, key))
    return out


def format_length(meters: float) -> str:
    """A length as mil and mm, the way a board designer reads it."""
    return f"{meters / MIL:.3g} mil ({meters * 1e3:.4g} mm)"


def format_frequency(hz: float) -> str:
    for unit, factor in (("THz", 1e12), ("GHz", 1e9), ("MHz", 1e6), ("kHz", 1e3)):
        if abs(hz) >= factor:
            return f"{hz / factor:.4g} {unit}"
    return f"{hz:.4g} Hz"

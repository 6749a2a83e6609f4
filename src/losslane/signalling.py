"""Serial-link signalling: bits per symbol, baud rate and the Nyquist frequency (the one
place these are computed)."""

from __future__ import annotations

import math

from losslane.errors import LossLaneError

#: bits carried per symbol (common practice: NRZ 1, PAM4 2)
BITS_PER_SYMBOL = {"nrz": 1, "pam4": 2}
MODULATIONS = tuple(BITS_PER_SYMBOL)


def baud_rate(data_rate: float, modulation: str = "nrz") -> float:
    """Symbols per second: bit rate / bits per symbol (NRZ 1, PAM4 2; common practice)."""
    if modulation not in BITS_PER_SYMBOL:
        raise LossLaneError(
            f"modulation = {modulation!r}: valid values are "
            + ", ".join(repr(m) for m in BITS_PER_SYMBOL)
        )
    if not (math.isfinite(data_rate) and data_rate > 0):
        raise LossLaneError(f"data_rate = {data_rate!r} b/s: must be > 0")
    return data_rate / BITS_PER_SYMBOL[modulation]


def nyquist_frequency(data_rate: float, modulation: str = "nrz") -> float:
    """The Nyquist frequency of a serial link, baud rate / 2 (common practice)."""
    return baud_rate(data_rate, modulation) / 2.0


__all__ = ["BITS_PER_SYMBOL", "MODULATIONS", "baud_rate", "nyquist_frequency"]

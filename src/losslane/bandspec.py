"""Limits over frequency, as a scenario states them: bands (``[[budget.band]]`` and
``[budget] min_return_loss``) and limit masks (``[[budget.mask]]``).

A band holds a maximum insertion loss and/or a minimum return loss at every sweep point
between its ``start`` and ``stop`` (both included). A mask is a piecewise-linear limit in
dB against frequency, given as points, interpolated linearly in frequency or in
log10(frequency). All limits are positive dB; what they bound depends on the quantity:

=====================  ==========================================  ==================
``quantity``           the value judged (positive dB)              the limit is a
=====================  ==========================================  ==================
insertion-loss         -20 log10 |S21| (|Sdd21| of a pair)         maximum
return-loss            -20 log10 |S11|, |S22| (Sdd11, Sdd22), the  minimum
                       worse end
common-mode-loss       -20 log10 |Scc21| (pairs only)              maximum
far-end-conversion     -20 log10 |Scd21| (pairs only)              minimum (isolation)
near-end-conversion    -20 log10 |Scd11|, |Scd22|, the worse end   minimum (isolation)
                       (pairs only)
=====================  ==========================================  ==================

This module only reads and checks the tables and evaluates a mask's limit line; judging a
built channel against them is :mod:`losslane.bands`.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError
from losslane.spec import check_keys, quantity, text
from losslane.units import parse_quantity

#: mask quantities: name -> (kind of limit, needs a differential channel)
QUANTITIES: dict[str, tuple[str, bool]] = {
    "insertion-loss": ("max", False),
    "return-loss": ("min", False),
    "common-mode-loss": ("max", True),
    "far-end-conversion": ("min", True),
    "near-end-conversion": ("min", True),
}
INTERPOLATIONS = ("linear", "log-frequency")
BAND_KEYS = ("name", "start", "stop", "max_loss", "min_return_loss")
MASK_KEYS = ("name", "quantity", "points", "interpolation")


@dataclass(frozen=True)
class Band:
    """A frequency band with its limits (positive dB; None: not judged). ``key`` says where
    it comes from in the scenario, for messages and tables."""

    name: str
    key: str
    start: float
    stop: float
    max_loss: float | None = None
    min_return_loss: float | None = None


@dataclass(frozen=True)
class Mask:
    """A limit line: ``limit_db`` at ``freqs`` (Hz, increasing), joined by straight lines in
    frequency or, with ``log_frequency``, in log10(frequency)."""

    name: str
    key: str
    quantity: str
    freqs: tuple[float, ...]
    limit_db: tuple[float, ...]
    log_frequency: bool = False

    @property
    def kind(self) -> str:
        """'max' (the value must stay at or below the line) or 'min' (at or above)."""
        return QUANTITIES[self.quantity][0]

    @property
    def differential(self) -> bool:
        """Whether the quantity exists only for a differential channel."""
        return QUANTITIES[self.quantity][1]

    @property
    def start(self) -> float:
        return self.freqs[0]

    @property
    def stop(self) -> float:
        return self.freqs[-1]

    def limit_at(self, f) -> np.ndarray:
        """The limit (dB) at frequencies ``f`` inside the mask's span."""
        x = np.asarray(f, dtype=float)
        fp = np.asarray(self.freqs)
        yp = np.asarray(self.limit_db)
        if self.log_frequency:
            return np.interp(np.log10(x), np.log10(fp), yp)
        return np.interp(x, fp, yp)


def _table(where: str, entry: object) -> Mapping:
    if not isinstance(entry, Mapping):
        raise LossLaneError(f"{where}: expected a table")
    return entry


def _entries(spec: Mapping, key: str) -> list:
    raw = spec.get(key, [])
    if not isinstance(raw, list):
        raise LossLaneError(f"[budget].{key}: expected [[budget.{key}]] entries")
    return raw


def _positive(where: str, key: str, value: float | None) -> None:
    if value is not None and not (np.isfinite(value) and value > 0):
        raise LossLaneError(
            f'{where}.{key} = {value:g} dB: limits are positive dB (e.g. "15 dB"); use a value > 0'
        )


def _name(where: str, entry: Mapping, default: str) -> str:
    name = text(where, entry, "name", default=default)
    if not name.strip():
        raise LossLaneError(f"{where}.name = {name!r}: give a non-empty name or leave it out")
    return name


def parse_bands(spec: Mapping) -> tuple[Band, ...]:
    """The ``[[budget.band]]`` entries of a ``[budget]`` table."""
    out = []
    for i, entry in enumerate(_entries(spec, "band")):
        w = f"[[budget.band]] #{i + 1}"
        entry = _table(w, entry)
        check_keys(w, entry, BAND_KEYS, required=("start", "stop"))
        start = quantity(w, entry, "start", "frequency", required=True)
        stop = quantity(w, entry, "stop", "frequency", required=True)
        if not stop >= start:
            raise LossLaneError(
                f"{w}: stop = {entry['stop']!r} lies below start = {entry['start']!r}; a band "
                "runs from start up to stop"
            )
        max_loss = quantity(w, entry, "max_loss", "decibel")
        min_rl = quantity(w, entry, "min_return_loss", "decibel")
        if max_loss is None and min_rl is None:
            raise LossLaneError(f"{w}: give max_loss and/or min_return_loss")
        _positive(w, "max_loss", max_loss)
        _positive(w, "min_return_loss", min_rl)
        name = _name(w, entry, f"band {i + 1}")
        out.append(Band(name, w, start, stop, max_loss, min_rl))
    return tuple(out)


def _mask_points(where: str, raw: object) -> tuple[tuple[float, ...], tuple[float, ...]]:
    example = 'points = [["50 MHz", "1 dB"], ["16 GHz", "18 dB"]]'
    if not isinstance(raw, list) or len(raw) < 2:
        raise LossLaneError(
            f"{where}.points = {raw!r}: expected a list of at least two [frequency, limit] "
            f"pairs, e.g. {example}"
        )
    freqs, limits = [], []
    for j, pair in enumerate(raw):
        if not isinstance(pair, list) or len(pair) != 2:
            raise LossLaneError(
                f"{where}.points[{j}] = {pair!r}: expected a [frequency, limit] pair, e.g. "
                f"{example}"
            )
        freqs.append(parse_quantity(pair[0], "frequency", f"{where}.points[{j}][0]"))
        db = parse_quantity(pair[1], "decibel", f"{where}.points[{j}][1]")
        if not (np.isfinite(db) and db > 0):
            raise LossLaneError(
                f"{where}.points[{j}][1] = {pair[1]!r}: mask limits are positive dB (a "
                "maximum loss or a minimum return loss / isolation); use a value > 0"
            )
        limits.append(db)
    for j in range(1, len(freqs)):
        if not freqs[j] > freqs[j - 1]:
            raise LossLaneError(
                f"{where}.points[{j}][0] = {raw[j][0]!r}: the frequencies must increase from "
                f"point to point (the one before is {raw[j - 1][0]!r})"
            )
    return tuple(freqs), tuple(limits)


def parse_masks(spec: Mapping) -> tuple[Mask, ...]:
    """The ``[[budget.mask]]`` entries of a ``[budget]`` table."""
    out = []
    for i, entry in enumerate(_entries(spec, "mask")):
        w = f"[[budget.mask]] #{i + 1}"
        entry = _table(w, entry)
        check_keys(w, entry, MASK_KEYS, required=("quantity", "points"))
        qty = text(w, entry, "quantity", tuple(QUANTITIES), required=True)
        interp = text(w, entry, "interpolation", INTERPOLATIONS, default="linear")
        freqs, limits = _mask_points(w, entry["points"])
        log_f = interp == "log-frequency"
        if log_f and freqs[0] <= 0:
            raise LossLaneError(
                f"{w}.points[0][0] = {entry['points'][0][0]!r}: interpolation = "
                "'log-frequency' needs every frequency above 0 Hz; start the mask above DC "
                "or use interpolation = 'linear'"
            )
        name = _name(w, entry, f"mask {i + 1} ({qty})")
        out.append(Mask(name, w, qty, freqs, limits, log_f))
    return tuple(out)


def parse_min_return_loss(spec: Mapping) -> float | None:
    """``[budget] min_return_loss``: a minimum return loss over the default band (see
    :func:`default_band`)."""
    value = quantity("[budget]", spec, "min_return_loss", "decibel")
    _positive("[budget]", "min_return_loss", value)
    return value


def default_band(min_return_loss: float, f: np.ndarray, nyquist: float | None) -> Band:
    """The band of ``[budget] min_return_loss``: from the first sweep point above DC to the
    Nyquist frequency, or to the sweep's end without a data rate."""
    f = np.asarray(f, dtype=float)
    above = f[f > 0]
    start = float(above[0]) if above.size else float(f[0])
    stop = float(f[-1]) if nyquist is None else float(nyquist)
    upto = "Nyquist" if nyquist is not None else "sweep stop"
    return Band(
        f"return loss up to {upto}",
        "[budget].min_return_loss",
        start,
        max(stop, start),
        None,
        min_return_loss,
    )


__all__ = [
    "BAND_KEYS",
    "INTERPOLATIONS",
    "MASK_KEYS",
    "QUANTITIES",
    "Band",
    "Mask",
    "default_band",
    "parse_bands",
    "parse_masks",
    "parse_min_return_loss",
]

"""What every channel block shares: its interface and the checks of its arguments.

Interface of every block
------------------------
``name`` (label), ``kind`` (the scenario's segment type: "line", "via", "capacitor",
"series", "shunt", "touchstone"), ``n`` (signal conductors: 1 single-ended, 2 a pair),
``length`` (m: a line's length, a via's barrel length; 0 for lumped parts and files) and

* ``scaled_abcd(f) -> ScaledABCD``: the chain matrix as ``exp(log_scale) * matrix`` plus
  the reversed block (see :mod:`losslane.network.scaled`); what the cascade uses;
* ``abcd(f) -> (N, 2n, 2n)``: the plain matrix (overflows for very long lossy lines, and
  is infinite for a series capacitor at f = 0; fine for inspection and small cases).

Rows/columns 0..n-1 are the near-end voltages/currents of conductors 1..n, n..2n-1 the far
end; ``f`` is in Hz, (N,), and may contain 0 (exact DC results). The blocks live by topic:
``line`` (uniform lines), ``lumped`` (series and shunt parts), ``via``, ``imported``
(Touchstone models).
"""

from __future__ import annotations

import numpy as np

from losslane.errors import LossLaneError
from losslane.network.scaled import ScaledABCD, abcd_to_s, block_diagonal_legs

__all__ = ["Block", "conductors", "legs", "legs_s", "length_value", "nonnegative"]


class Block:
    """Base of all blocks (see the module docstring for the interface)."""

    name: str = ""
    kind: str = ""
    n: int = 1
    length: float = 0.0

    def scaled_abcd(self, f: np.ndarray) -> ScaledABCD:
        raise NotImplementedError

    def abcd(self, f: np.ndarray) -> np.ndarray:
        """The plain chain matrix (N, 2n, 2n); see ``scaled_abcd`` for long lossy lines."""
        return self.scaled_abcd(f).abcd()

    def s(self, f: np.ndarray, z_ref=50.0) -> np.ndarray:
        """This block's scattering matrix alone (internal in-in-out-out port order)."""
        return abcd_to_s(self.scaled_abcd(f), z_ref)

    def __repr__(self) -> str:
        return f"{type(self).__name__}(name={self.name!r}, n={self.n}, length={self.length:g})"


def length_value(owner: str, key: str, value: float) -> float:
    v = float(value)
    if not np.isfinite(v) or v < 0:
        raise LossLaneError(f"{owner}: {key} = {value!r} m is not a valid length; it must be >= 0")
    return v


def nonnegative(owner: str, key: str, value: float, unit: str, positive: bool = False) -> float:
    v = float(value)
    ok = np.isfinite(v) and (v > 0 if positive else v >= 0)
    if not ok:
        bound = "> 0" if positive else ">= 0"
        raise LossLaneError(f"{owner}: {key} = {value!r} {unit} is not valid; it must be {bound}")
    return v


def conductors(owner: str, n: int) -> int:
    if int(n) != n or n < 1:
        raise LossLaneError(
            f"{owner}: n = {n!r} conductors is not valid; it must be a whole number >= 1 "
            "(1 single-ended, 2 a pair)"
        )
    return int(n)


def legs(leg: ScaledABCD, n: int) -> ScaledABCD:
    """A single-conductor block ``leg`` repeated in each of ``n`` uncoupled legs."""
    if n == 1:
        return leg
    return ScaledABCD.reciprocal(block_diagonal_legs(leg.matrix, n), leg.log_scale)


def legs_s(leg: ScaledABCD, n: int, z_ref: float) -> np.ndarray:
    """S (N, 2n, 2n), internal port order, of the single-conductor block ``leg`` repeated in
    each of ``n`` uncoupled legs (the leg's 2-port S placed on each conductor's ports)."""
    s2 = abcd_to_s(leg, z_ref)
    if n == 1:
        return s2
    out = np.zeros((s2.shape[0], 2 * n, 2 * n), dtype=complex)
    for i in range(n):
        for a, b in ((0, 0), (0, 1), (1, 0), (1, 1)):
            out[:, i + a * n, i + b * n] = s2[:, a, b]
    return out

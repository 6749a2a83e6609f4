"""Intra-pair skew: a pair block whose one leg is longer than the other.

The extra length is modelled physically: after the pair block (a coupled line, a via
pair) leg P (or leg N, for a negative skew) continues alone as an uncoupled single-ended
line of ``extra`` metres -- that leg's own cross-section without its neighbour -- while
the other leg goes straight through. The mismatch converts differential signal into
common mode: for uncoupled, lossless, matched legs with a delay difference dt the
mixed-mode transmissions (Bockelman-Eisenstadt) are |Sdd21| = |cos(pi f dt)| and
|Scd21| = |sin(pi f dt)|. The block stays reciprocal and passive (a cascade of two
reciprocal, passive blocks).
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from losslane.errors import LossLaneError
from losslane.network.block import Block
from losslane.network.cascade import check_sweep
from losslane.network.scaled import ScaledABCD, abcd_to_s
from losslane.network.scatter import star

__all__ = ["LEGS", "SkewedPair", "legs_apart"]

#: the legs of a pair, in conductor order
LEGS = ("P", "N")


def legs_apart(leg: ScaledABCD, on: int) -> ScaledABCD:
    """The 4-port chain matrix of the single-conductor ``leg`` on conductor ``on`` (0: P,
    1: N) and a through connection (zero length) on the other."""
    m = leg.matrix
    npts = m.shape[0]
    out = np.zeros((npts, 4, 4), dtype=complex)
    other = 1 - on
    for i in (0, 1):
        for j in (0, 1):
            out[:, 2 * i + on, 2 * j + on] = m[:, i, j]
    # the through leg: identity, in the leg's scale
    with np.errstate(over="ignore"):
        unit = np.exp(-leg.log_scale)
    out[:, other, other] = out[:, 2 + other, 2 + other] = unit
    return ScaledABCD.reciprocal(out, leg.log_scale)


class SkewedPair(Block):
    """``block`` (a pair, n = 2) followed by ``extra`` metres of uncoupled line on one
    leg: leg P when ``extra`` > 0, leg N when < 0. ``leg(f, length)`` gives the chain
    matrix (ScaledABCD, 2 x 2) of that length of the leg's single-ended line on the sweep
    ``f``. ``skew_time`` (s), when known, is reported with it."""

    def __init__(
        self,
        block: Block,
        extra: float,
        leg: Callable[[np.ndarray, float], ScaledABCD],
        skew_time: float | None = None,
    ) -> None:
        if block.n != 2:
            raise LossLaneError(
                f"{block.kind} {block.name!r}: skew needs a pair (two conductors); this "
                f"segment has {block.n}"
            )
        v = float(extra)
        if not np.isfinite(v):
            raise LossLaneError(f"{block.kind} {block.name!r}: skew = {extra!r} m is not finite")
        self.block = block
        self.extra = v
        self.skew_time = skew_time
        self._leg = leg
        self.name = block.name
        self.kind = block.kind
        self.n = 2
        self.length = block.length
        self.section = getattr(block, "section", None)

    @property
    def longer(self) -> str:
        """The leg that is longer ("P" or "N")."""
        return LEGS[0] if self.extra >= 0 else LEGS[1]

    def _extra(self, f: np.ndarray) -> ScaledABCD:
        return legs_apart(self._leg(f, abs(self.extra)), 0 if self.extra >= 0 else 1)

    def scaled_abcd(self, f: np.ndarray) -> ScaledABCD:
        f = check_sweep(f)
        return self.block.scaled_abcd(f) @ self._extra(f)

    def s(self, f: np.ndarray, z_ref: float = 50.0) -> np.ndarray:
        f = check_sweep(f)
        return star(self.block.s(f, z_ref), abcd_to_s(self._extra(f), z_ref))

    def __repr__(self) -> str:
        return f"SkewedPair({self.block!r}, extra={self.extra:g} m on leg {self.longer})"

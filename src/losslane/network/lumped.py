"""Lumped parts in each leg of a channel: series impedances, an AC-coupling capacitor and
a shunt capacitance (ideal lumped models: valid while the part is small against the
wavelength). A part in a pair channel sits in each of the two legs, uncoupled.
"""

from __future__ import annotations

import numpy as np

from losslane.errors import LossLaneError
from losslane.network.block import Block, conductors, legs, legs_s, nonnegative
from losslane.network.cascade import check_sweep
from losslane.network.scaled import ScaledABCD, block_diagonal_legs

__all__ = ["SeriesCapacitor", "SeriesImpedance", "SeriesRL", "ShuntCapacitor"]


class _Lumped(Block):
    """A single-conductor 2-port chain matrix applied in each of the n legs."""

    length = 0.0

    def _leg(self, f: np.ndarray) -> ScaledABCD:
        raise NotImplementedError

    def scaled_abcd(self, f: np.ndarray) -> ScaledABCD:
        return legs(self._leg(check_sweep(f)), self.n)

    def s(self, f: np.ndarray, z_ref: float = 50.0) -> np.ndarray:
        return legs_s(self._leg(check_sweep(f)), self.n, z_ref)


def _series(z: np.ndarray) -> ScaledABCD:
    m = np.zeros(z.shape + (2, 2), dtype=complex)
    m[:, 0, 0] = m[:, 1, 1] = 1.0
    m[:, 0, 1] = z
    return ScaledABCD.reciprocal(m, np.zeros(z.shape))


class SeriesImpedance(_Lumped):
    """A series impedance Z(f) in each leg: T = [[1, Z], [0, 1]].

    ``impedance`` is a complex constant (ohm) or a function of the frequency array
    returning (N,) complex ohm; it must stay finite (use SeriesCapacitor for a DC block).
    """

    kind = "series"

    def __init__(self, impedance, n: int = 1, name: str = "series impedance") -> None:
        self.name = str(name)
        self.n = conductors(f"series impedance {self.name!r}", n)
        self.impedance = impedance

    def _leg(self, f: np.ndarray) -> ScaledABCD:
        imp = self.impedance
        z = np.asarray(imp(f) if callable(imp) else np.full(f.shape, imp), complex)
        z = np.broadcast_to(z, f.shape)
        if not np.all(np.isfinite(z)):
            raise LossLaneError(f"series impedance {self.name!r}: the impedance must be finite")
        return _series(z)


class SeriesRL(_Lumped):
    """A series resistance ``r`` (ohm) and inductance ``l`` (H) in each leg:
    Z = r + j w l (an ideal lumped part; valid while it is small against the wavelength)."""

    kind = "series"

    def __init__(self, r: float = 0.0, l: float = 0.0, n: int = 1, name: str = "series RL"):
        self.name = str(name)
        owner = f"series RL {self.name!r}"
        self.r = nonnegative(owner, "r", r, "ohm")
        self.l = nonnegative(owner, "l", l, "H")
        self.n = conductors(owner, n)

    def _leg(self, f: np.ndarray) -> ScaledABCD:
        return _series(self.r + 2j * np.pi * f * self.l)


class SeriesCapacitor(_Lumped):
    """An AC-coupling capacitor in each leg: Z = esr + j w esl + 1/(j w c).

    T = [[1, Z], [0, 1]] is infinite at f = 0; it is built as
    [[jwc, N], [0, jwc]] / (jwc) with N = 1 + jwc (esr + jw esl), which the scaled
    representation holds exactly: at f = 0 the block is an open (S21 = 0, S11 = 1).
    Above its series resonance 1/(2 pi sqrt(esl c)) the part is inductive, as measured
    parts are (an ideal lumped model: valid while the package is small vs the wavelength).
    """

    kind = "capacitor"

    def __init__(
        self, c: float, esl: float = 0.0, esr: float = 0.0, n: int = 1, name: str = "capacitor"
    ) -> None:
        self.name = str(name)
        owner = f"capacitor {self.name!r}"
        self.c = nonnegative(owner, "value", c, "F", positive=True)
        self.esl = nonnegative(owner, "esl", esl, "H")
        self.esr = nonnegative(owner, "esr", esr, "ohm")
        self.n = conductors(owner, n)

    def abcd(self, f: np.ndarray) -> np.ndarray:
        """The plain matrix [[1, Z], [0, 1]] per leg; B = esr - j inf at f = 0."""
        f = check_sweep(f)
        w = 2 * np.pi * f
        with np.errstate(divide="ignore"):
            x = np.where(w > 0, w * self.esl - 1.0 / (np.where(w > 0, w, 1.0) * self.c), -np.inf)
        m = np.zeros(f.shape + (2, 2), dtype=complex)
        m[:, 0, 0] = m[:, 1, 1] = 1.0
        m[:, 0, 1].real = self.esr
        m[:, 0, 1].imag = x
        return block_diagonal_legs(m, self.n)

    def _leg(self, f: np.ndarray) -> ScaledABCD:
        w = 2 * np.pi * f
        yc = 1j * w * self.c
        num = np.zeros(f.shape + (2, 2), dtype=complex)
        num[:, 0, 0] = num[:, 1, 1] = yc
        num[:, 0, 1] = 1.0 + yc * (self.esr + 1j * w * self.esl)
        return ScaledABCD.from_ratio(num, yc)


class ShuntCapacitor(_Lumped):
    """A capacitance ``c`` (F) from each leg to the reference (a pad, a launch):
    T = [[1, 0], [j w c, 1]]."""

    kind = "shunt"

    def __init__(self, c: float, n: int = 1, name: str = "shunt C") -> None:
        self.name = str(name)
        owner = f"shunt capacitor {self.name!r}"
        self.c = nonnegative(owner, "value", c, "F")
        self.n = conductors(owner, n)

    def _leg(self, f: np.ndarray) -> ScaledABCD:
        m = np.zeros(f.shape + (2, 2), dtype=complex)
        m[:, 0, 0] = m[:, 1, 1] = 1.0
        m[:, 1, 0] = 2j * np.pi * f * self.c
        return ScaledABCD.reciprocal(m, np.zeros(f.shape))

"""A plated through-hole transition as a channel block."""

from __future__ import annotations

import numpy as np

from losslane.errors import LossLaneError
from losslane.network.block import Block, conductors, legs, legs_s, length_value, nonnegative
from losslane.network.cascade import check_sweep
from losslane.network.line import line_scaled_abcd
from losslane.network.scaled import ScaledABCD
from losslane.xsection.rlgc import C0, RLGC

__all__ = ["Via"]


class Via(Block):
    """A plated through-hole transition: the barrel from the entry to the exit layer as a
    short line, and the unused barrel below the exit layer as an open-circuited stub
    hanging in shunt at the exit (common practice in channel models).

    The open stub's input admittance is Y = tanh(gamma l_stub) / Zc, infinite at its
    quarter-wave resonance f ~ c / (4 l_stub sqrt(eps_eff)): the notch in S21 that makes
    back-drilling worth its cost. Barrel and stub are TEM lines of ``impedance`` (stub:
    ``stub_impedance``, default the same) in ``dielectric``: a Dielectric object (its
    complex permittivity gives the delay and the dielectric loss; the impedance is taken
    as given at the dielectric's Dk; with eps(f) the line capacitance follows eps(f)
    at fixed inductance, which keeps the model causal) or a plain number eps_eff
    (lossless). The barrel's copper loss is neglected (a millimetre of barrel against the
    traces' tens of centimetres). Valid while the via's transverse size (antipad, pitch)
    is small against the wavelength -- at board scale, to a few tens of GHz (common
    practice; beyond that a 3-D field solution is needed).

    For n = 2 (a differential via) the two barrels are modelled as two identical,
    uncoupled single-ended vias, one per leg, so the differential impedance is
    2 x ``impedance``. Barrel-to-barrel coupling depends on pitch and antipad shape,
    which the model does not take; the uncoupled pair gets the stub notch and the
    barrel delay right, which dominate a via's effect on insertion loss.
    """

    kind = "via"
    length = 0.0

    def __init__(
        self,
        barrel_length: float,
        stub_length: float,
        impedance: float,
        dielectric,
        stub_impedance: float | None = None,
        n: int = 1,
        name: str = "via",
    ) -> None:
        self.name = str(name)
        owner = f"via {self.name!r}"
        self.barrel_length = length_value(owner, "barrel", barrel_length)
        self.stub_length = length_value(owner, "stub", stub_length)
        self.impedance = nonnegative(owner, "impedance", impedance, "ohm", positive=True)
        zs = impedance if stub_impedance is None else stub_impedance
        self.stub_impedance = nonnegative(owner, "stub_impedance", zs, "ohm", positive=True)
        self.n = conductors(owner, n)
        if isinstance(dielectric, int | float | np.floating | np.integer):
            eps = float(dielectric)
            if not np.isfinite(eps) or eps < 1:
                raise LossLaneError(
                    f"{owner}: eps_eff = {dielectric!r} is not valid; it must be >= 1"
                )
        elif not hasattr(dielectric, "eps"):
            raise LossLaneError(
                f"{owner}: dielectric {dielectric!r} is neither a dielectric nor an eps_eff"
            )
        self.dielectric = dielectric
        self.length = self.barrel_length

    def _eps(self, f: np.ndarray) -> tuple[np.ndarray, float]:
        d = self.dielectric
        if hasattr(d, "eps"):
            return np.asarray(d.eps(f), complex), float(d.dk)
        return np.full(f.shape, float(d), dtype=complex), float(d)

    def rlgc(self, f: np.ndarray, impedance: float) -> RLGC:
        """TEM line of ``impedance`` (at the nominal Dk) in the via's dielectric."""
        eps, dk = self._eps(f)
        l_pul = impedance * np.sqrt(dk) / C0
        c_air = 1.0 / (impedance * C0 * np.sqrt(dk))
        w = 2 * np.pi * f
        # Y = j w C_air eps(f): C = C_air eps', G = w C_air eps''
        c = c_air * eps.real
        g = w * c_air * (-eps.imag)
        return RLGC.single(f, np.zeros(f.shape), np.full(f.shape, l_pul), g, c)

    def notch_frequency(self) -> float:
        """Quarter-wave resonance of the stub, c / (4 l_stub sqrt(eps_eff)) (inf: no stub)."""
        eps = float(self.dielectric.dk) if hasattr(self.dielectric, "eps") else self.dielectric
        return C0 / (4 * self.stub_length * np.sqrt(eps)) if self.stub_length > 0 else np.inf

    def _leg(self, f: np.ndarray) -> ScaledABCD:
        barrel = line_scaled_abcd(self.rlgc(f, self.impedance), self.barrel_length)
        if self.stub_length == 0:
            return barrel
        stub = line_scaled_abcd(self.rlgc(f, self.stub_impedance), self.stub_length)
        a, c = stub.matrix[:, 0, 0], stub.matrix[:, 1, 0]
        # open end: I2 = 0, so Y_in = C/A (the scale cancels); T = [[A, 0], [C, A]] / A
        num = np.zeros(f.shape + (2, 2), dtype=complex)
        num[:, 0, 0] = num[:, 1, 1] = a
        num[:, 1, 0] = c
        return barrel @ ScaledABCD.from_ratio(num, a)

    def scaled_abcd(self, f: np.ndarray) -> ScaledABCD:
        return legs(self._leg(check_sweep(f)), self.n)

    def s(self, f: np.ndarray, z_ref: float = 50.0) -> np.ndarray:
        return legs_s(self._leg(check_sweep(f)), self.n, z_ref)

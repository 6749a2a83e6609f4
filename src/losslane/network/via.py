"""A plated through-hole transition as a channel block."""

from __future__ import annotations

import numpy as np

from losslane.errors import LossLaneError
from losslane.network.block import Block, conductors, legs, legs_s, length_value, nonnegative
from losslane.network.cascade import check_sweep
from losslane.network.line import line_scaled_abcd
from losslane.network.scaled import ScaledABCD, abcd_to_s
from losslane.xsection.rlgc import C0, RLGC

__all__ = ["DrilledVia", "Via"]


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

    def leg(self, f: np.ndarray, length: float) -> ScaledABCD:
        """``length`` of one barrel (a line of ``impedance``): a skewed pair's extra length."""
        f = check_sweep(f)
        return line_scaled_abcd(self.rlgc(f, self.impedance), length)

    def leg_delay(self, f_ref: float) -> float:
        """Delay per metre (s/m) of the barrel line at ``f_ref``."""
        eps, _ = self._eps(np.array([f_ref], float))
        return float(np.sqrt(eps[0].real) / C0)


def _tem_abcd(f: np.ndarray, c_air: float, dielectric, length: float) -> ScaledABCD:
    """``length`` of a lossless-conductor TEM line of vacuum capacitance ``c_air`` per
    metre in ``dielectric``: L = 1/(c0^2 C_air), Y = j w C_air eps(f) (the loss tangent
    gives G)."""
    from losslane.network.line import single_line_abcd

    eps = np.asarray(dielectric.eps(f), complex)
    w = 2 * np.pi * f
    z = 1j * w / (C0**2 * c_air)
    y = 1j * w * c_air * eps
    return single_line_abcd(z, y, np.sqrt(z * y), length)


def _shunt(y: np.ndarray) -> ScaledABCD:
    m = np.zeros(y.shape + (2, 2), dtype=complex)
    m[:, 0, 0] = m[:, 1, 1] = 1.0
    m[:, 1, 0] = y
    return ScaledABCD.reciprocal(m, np.zeros(y.shape))


def _open_stub(f: np.ndarray, c_air: float, pieces) -> ScaledABCD:
    """The shunt of an open-ended stub made of ``pieces`` (nearest first): Y = C/A of
    their chain with the far end open."""
    chain = _tem_abcd(f, c_air, pieces[0].dielectric, pieces[0].length)
    for p in pieces[1:]:
        chain = chain @ _tem_abcd(f, c_air, p.dielectric, p.length)
    a, c = chain.matrix[:, 0, 0], chain.matrix[:, 1, 0]
    num = np.zeros(f.shape + (2, 2), dtype=complex)
    num[:, 0, 0] = num[:, 1, 1] = a
    num[:, 1, 0] = c
    return ScaledABCD.from_ratio(num, a)


class DrilledVia(Block):
    """A via from its drill geometry on a stackup (``via_geometry.DrillVia``).

    Each leg's modes travel, in order (reversed for an ``upward`` via, whose signal enters
    at the lower layer): the stub above the entry (an open-ended stub in
    shunt, if the hole continues above the entry layer), the entry pad's excess
    capacitance (shunt), the barrel pieces from the entry centre to the exit centre (TEM
    lines, each in its own dielectric), the exit pad's capacitance, the stub below the
    exit (open-ended, in shunt). The barrel is the cross-section where it passes a plane:
    one barrel in a round antipad is a coaxial line, C = 2 pi eps / ln(D/d) per metre,
    Z = 60/sqrt(eps_r) ln(D/d) (Ramo-Whinnery); a pair's even and odd modes come from the
    2-D boundary-element solution of the two barrels in their antipad
    (``xsection.round``). The same cross-section is used over the whole length, also
    between planes, where the real field spreads wider (the usual coaxial-via picture,
    valid while the antipad and the pitch are small against the wavelength -- to a few
    tens of GHz at board scale, common practice). The pad capacitance is the excess
    capacitance of an axisymmetric electrostatic solution around the pad between the
    nearest planes (``xsection.fieldsolve.axisym``; pads of a pair taken one at a time,
    ``memo``: a dict shared by the vias of one build, so identical openings and pads are
    solved once;
    their mutual capacitance neglected; ``accuracy`` "coarse" by default, within 1.1 % of
    the "fine" solution on the demo's pads and 1.7 % on a pad overlapping the planes, a
    fraction of a femtofarad). Copper loss in
    the barrel is neglected.
    """

    kind = "via"

    def __init__(
        self,
        geometry,
        n: int = 1,
        name: str = "via",
        accuracy: str = "coarse",
        memo: dict | None = None,
    ) -> None:
        from losslane.xsection.round import mode_capacitances, opening_capacitance

        self.name = str(name)
        self.geometry = g = geometry
        self.n = conductors(f"via {self.name!r}", n)
        if (self.n == 2) != (g.pitch is not None):
            need = "a pair needs pitch (centre to centre)" if self.n == 2 else "pitch is for pairs"
            raise LossLaneError(f"via {self.name!r}: {need}")
        memo = {} if memo is None else memo
        key = ("opening", g.drill, g.antipad, g.pitch, g.shape)
        if key not in memo:
            memo[key] = mode_capacitances(opening_capacitance(g.drill, g.antipad, g.pitch, g.shape))
        self.modes = memo[key]
        self.length = g.barrel_length
        self.pad_capacitance = self._pads(accuracy, memo) if g.pad is not None else (0.0, 0.0)

    def _pads(self, accuracy: str, memo: dict) -> tuple[float, float]:
        from losslane.via_geometry import pad_window
        from losslane.xsection.fieldsolve.axisym import pad_capacitance

        out = []
        for layer in (self.geometry.entry, self.geometry.exit):
            window, band = pad_window(self.geometry, layer)
            key = ("pad", window, band, accuracy)
            if key not in memo:
                memo[key] = pad_capacitance(window, band, accuracy)
            out.append(memo[key])
        return out[0], out[1]

    def impedances(self, f_ref: float = 1e9) -> dict[str, float]:
        """Each mode's impedance in the barrel's first piece's dielectric at ``f_ref``
        (the single barrel's coaxial value; a pair's even and odd per line)."""
        d = self.geometry.barrel[0].dielectric
        dk = float(np.real(d.eps(np.array([f_ref]))[0]))
        return {m: 1.0 / (C0 * np.sqrt(dk) * c) for m, c in self.modes.items()}

    def _mode(self, f: np.ndarray, c_air: float) -> ScaledABCD:
        g = self.geometry
        w = 2 * np.pi * f
        parts = []
        if g.stub_above:
            parts.append(_open_stub(f, c_air, g.stub_above))
        if g.pad is not None:
            parts.append(_shunt(1j * w * self.pad_capacitance[0]))
        parts += [_tem_abcd(f, c_air, p.dielectric, p.length) for p in g.barrel]
        if g.pad is not None:
            parts.append(_shunt(1j * w * self.pad_capacitance[1]))
        if g.stub_below:
            parts.append(_open_stub(f, c_air, g.stub_below))
        out = parts[0]
        for p in parts[1:]:
            out = out @ p
        if g.upward:
            rev = out.reverse  # the flip of a reciprocal chain: exact, no arithmetic
            return ScaledABCD.reciprocal_stack(rev.stack, rev.log_scale)
        return out

    def stub_notch(self, which: str = "below") -> float:
        """The quarter-wave frequency c / (4 L sqrt(Dk)) of the stub ``which`` ("below" the
        exit or "above" the entry), with its length-weighted Dk (inf: no such stub)."""
        stub = self.geometry.stub_below if which == "below" else self.geometry.stub_above
        if not stub:
            return np.inf
        length = sum(p.length for p in stub)
        dk = sum(p.length * p.dielectric.dk for p in stub) / length
        return C0 / (4 * length * np.sqrt(dk))

    def scaled_abcd(self, f: np.ndarray) -> ScaledABCD:
        f = check_sweep(f)
        if self.n == 1:
            return self._mode(f, self.modes["single"])
        from losslane.xsection.base import PAIR_TRANSFORM

        ms = [self._mode(f, self.modes[m]) for m in ("even", "odd")]
        scale = np.maximum(ms[0].log_scale, ms[1].log_scale)
        t = PAIR_TRANSFORM
        out = np.zeros(f.shape + (4, 4), dtype=complex)
        for k, m in enumerate(ms):
            mat = m.matrix * np.exp(m.log_scale - scale)[:, None, None]
            outer = np.outer(t[:, k], t[:, k])
            for a in (0, 1):
                for b in (0, 1):
                    out[:, 2 * a : 2 * a + 2, 2 * b : 2 * b + 2] += mat[:, a, b, None, None] * outer
        return ScaledABCD.reciprocal(out, scale)

    def s(self, f: np.ndarray, z_ref: float = 50.0) -> np.ndarray:
        f = check_sweep(f)
        if self.n == 1:
            return abcd_to_s(self._mode(f, self.modes["single"]), z_ref)
        from losslane.xsection.base import PAIR_TRANSFORM

        t = PAIR_TRANSFORM
        out = np.zeros(f.shape + (4, 4), dtype=complex)
        for k, m in enumerate(("even", "odd")):
            s2 = abcd_to_s(self._mode(f, self.modes[m]), z_ref)
            outer = np.outer(t[:, k], t[:, k])
            for a in (0, 1):
                for b in (0, 1):
                    out[:, 2 * a : 2 * a + 2, 2 * b : 2 * b + 2] += s2[:, a, b, None, None] * outer
        return out

    def leg_dielectric(self):
        """The dielectric of the barrel's last piece (where a skewed leg's extra length is
        added, at the exit)."""
        return self.geometry.barrel[-1].dielectric

    def leg(self, f: np.ndarray, length: float) -> ScaledABCD:
        """``length`` of one barrel alone in a round antipad (the coaxial line), in the
        dielectric at the exit: a skewed pair's extra length."""
        from losslane.xsection.round import coax_capacitance

        c = coax_capacitance(self.geometry.drill, self.geometry.antipad)
        return _tem_abcd(check_sweep(f), c, self.leg_dielectric(), length)

    def leg_delay(self, f_ref: float) -> float:
        """Delay per metre (s/m) of the leg line at ``f_ref``: sqrt(Dk)/c0."""
        d = self.leg_dielectric()
        return float(np.sqrt(np.real(d.eps(np.array([f_ref]))[0])) / C0)

"""Channel blocks: transmission-line segments, vias, lumped parts and imported Touchstone
models, each giving its transfer (ABCD, chain) matrix over the frequency array.

Interface of every block
------------------------
``name`` (label), ``kind`` ("line", "via", "capacitor", "series-rl", "series-z",
"shunt-c", "touchstone"), ``n`` (signal conductors: 1 single-ended, 2 a pair), ``length``
(m: a line's length, a via's barrel length; 0 for lumped parts and files) and

* ``scaled_abcd(f) -> ScaledABCD``: the chain matrix as ``exp(log_scale) * matrix`` plus
  the reversed block (see :mod:`losslane.network.scaled`); what the cascade uses;
* ``abcd(f) -> (N, 2n, 2n)``: the plain matrix (overflows for very long lossy lines, and
  is infinite for a series capacitor at f = 0; fine for inspection and small cases).

Rows/columns 0..n-1 are the near-end voltages/currents of conductors 1..n, n..2n-1 the far
end; ``f`` is in Hz, (N,), and may contain 0 (exact DC results).

Lines use the exact solution of the telegrapher's equations for uniform lines:
``T = exp(H l)`` with ``H = [[0, Z], [Y, 0]]`` (Z = R + jwL, Y = G + jwC per metre), i.e.
A = cosh(sqrt(ZY) l), B = Z l sinhc(sqrt(YZ) l), C = Y l sinhc(sqrt(ZY) l),
D = cosh(sqrt(YZ) l) as matrix functions, sinhc(x) = sinh(x)/x. Both are even, entire
functions of sqrt(ZY), so no branch choice or characteristic impedance is needed and the
DC limit (Y = 0: A = D = I, B = Z l, C = 0) is exact. For n = 1 these are the textbook
closed forms (A = cosh gamma l, B = Zc sinh gamma l, C = sinh gamma l / Zc); for n > 1
the matrix functions come from the modal (eigen) decomposition of ZY (e.g. C. R. Paul,
*Analysis of Multiconductor Transmission Lines*, Wiley), with scipy's matrix exponential
as the fallback where the modes are degenerate. Valid for any uniform quasi-TEM line;
the RLGC model's own validity range applies.
"""

from __future__ import annotations

import os
from functools import lru_cache
from pathlib import Path

import numpy as np

from losslane.errors import LossLaneError, warn
from losslane.network.cascade import check_sweep
from losslane.network.ports import DEFAULT_ORDER, check_order, port_permutation
from losslane.network.scaled import (
    ScaledABCD,
    abcd_to_s,
    block_diagonal_legs,
    s_to_scaled_abcd,
)
from losslane.xsection.rlgc import C0, RLGC

__all__ = [
    "Block",
    "LineSegment",
    "SeriesCapacitor",
    "SeriesImpedance",
    "SeriesRL",
    "ShuntCapacitor",
    "TouchstoneBlock",
    "Via",
    "line_scaled_abcd",
    "modal_scaled_abcd",
    "single_scaled_abcd",
]

_SERIES_LIMIT = 0.05
"""|x| below which sinhc(x) is summed as a series (error < x^10/11! ~ 3e-21)."""


# ---------------------------------------------------------------- line mathematics


def scaled_cosh_sinhc(x: np.ndarray, shift: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """cosh(x) exp(-shift) and sinhc(x) exp(-shift) = sinh(x)/x exp(-shift), finite for any
    x when shift >= |Re x| (neither exponential can then overflow)."""
    x = np.asarray(x, complex)
    ep = np.exp(x - shift)
    em = np.exp(-x - shift)
    ch = 0.5 * (ep + em)
    small = np.abs(x) < _SERIES_LIMIT
    xs = np.where(small, 1.0, x)
    x2 = x * x
    series = 1 + x2 / 6 * (1 + x2 / 20 * (1 + x2 / 42 * (1 + x2 / 72)))
    shc = np.where(small, series * np.exp(-shift), (ep - em) / (2 * xs))
    return ch, shc


def single_scaled_abcd(
    z: np.ndarray, y: np.ndarray, length: float
) -> tuple[np.ndarray, np.ndarray]:
    """Closed-form chain matrix of a single uniform line, scaled: (matrix (N,2,2), log_scale).

    A = D = cosh(gamma l), B = Z l sinhc(gamma l), C = Y l sinhc(gamma l) with
    gamma = sqrt(Z Y) (per metre, (N,) complex), all times exp(-|Re gamma| l).
    """
    z = np.asarray(z, complex)
    y = np.asarray(y, complex)
    gl = np.sqrt(z * y) * length
    s = np.abs(gl.real)
    ch, shc = scaled_cosh_sinhc(gl, s)
    m = np.empty(z.shape + (2, 2), dtype=complex)
    m[:, 0, 0] = m[:, 1, 1] = ch
    m[:, 0, 1] = z * length * shc
    m[:, 1, 0] = y * length * shc
    return m, s


def modal_decomposition(z: np.ndarray, y: np.ndarray) -> tuple:
    """Eigen-decomposition Z Y = E diag(gamma_i^2) E^-1 of an (N, n, n) line, independent
    of its length (so one decomposition serves every segment of the same cross-section).

    ``z``, ``y`` are symmetrised first (they are symmetric for any reciprocal line, a
    numerical solver's rounding aside). At f = 0 (Z Y = 0) E = I. Returns
    (z, y, gamma^2 (N, n), E, E^-1, cond(E) (N,)).
    """
    z = np.asarray(z, complex)
    y = np.asarray(y, complex)
    z = 0.5 * (z + np.swapaxes(z, -1, -2))
    y = 0.5 * (y + np.swapaxes(y, -1, -2))
    n = z.shape[-1]
    zy = np.matmul(z, y)
    eye = np.eye(n)
    zero = np.all(zy == 0, axis=(-2, -1))
    zy_safe = np.where(zero[:, None, None], eye, zy)
    lam, vec = np.linalg.eig(zy_safe)
    lam = np.where(zero[:, None], 0.0, lam)
    vec = np.where(zero[:, None, None], eye, vec)
    vinv = np.linalg.inv(vec)
    cond = np.linalg.norm(vec, axis=(-2, -1)) * np.linalg.norm(vinv, axis=(-2, -1))
    return z, y, lam, vec, vinv, cond


def modal_scaled_abcd(
    z: np.ndarray,
    y: np.ndarray,
    length: float,
    cond_limit: float = 1e8,
    decomposition: tuple | None = None,
) -> tuple[np.ndarray, np.ndarray]:
    """Chain matrix of a uniform n-conductor line from the modal decomposition of Z Y.

    With Z Y = E diag(gamma_i^2) E^-1 and Y Z = (Z Y)^T:
    A = E diag(cosh gamma_i l) E^-1, C = Y l E diag(sinhc gamma_i l) E^-1,
    B = Z l (E diag(sinhc) E^-1)^T, D = A^T; all scaled by exp(-max_i |Re gamma_i| l).
    Where E is ill-conditioned (degenerate modes; cond > ``cond_limit``) the points use
    scipy's matrix exponential of the shifted 2n x 2n system instead. At f = 0 (Z Y = 0)
    E = I and the result is exactly A = D = I, B = Z l, C = 0. ``decomposition`` is a
    cached result of :func:`modal_decomposition` for the same z, y.
    Returns (matrix (N, 2n, 2n), log_scale (N,)).
    """
    z, y, lam, vec, vinv, cond = decomposition or modal_decomposition(z, y)
    npts, n = z.shape[0], z.shape[-1]
    gl = np.sqrt(lam) * length
    s = np.max(np.abs(gl.real), axis=-1)
    ch, shc = scaled_cosh_sinhc(gl, s[:, None])
    a = np.matmul(vec * ch[:, None, :], vinv)
    g = np.matmul(vec * shc[:, None, :], vinv)
    m = np.empty((npts, 2 * n, 2 * n), dtype=complex)
    m[:, :n, :n] = a
    m[:, :n, n:] = length * np.matmul(z, np.swapaxes(g, -1, -2))
    m[:, n:, :n] = length * np.matmul(y, g)
    m[:, n:, n:] = np.swapaxes(a, -1, -2)
    bad = ~(cond < cond_limit)
    if np.any(bad):
        import scipy.linalg

        h = np.zeros((int(bad.sum()), 2 * n, 2 * n), dtype=complex)
        h[:, :n, n:] = z[bad] * length
        h[:, n:, :n] = y[bad] * length
        h -= s[bad][:, None, None] * np.eye(2 * n)
        m[bad] = scipy.linalg.expm(h)
    return m, s


def line_scaled_abcd(rlgc: RLGC, length: float) -> ScaledABCD:
    """Scaled chain matrix (with its reverse) of ``length`` metres of a uniform line."""
    if rlgc.n == 1:
        z, y, gamma = _line_constants(rlgc)
        gl = gamma * length
        s = np.abs(gl.real)
        ch, shc = scaled_cosh_sinhc(gl, s)
        # built frequency-last, the layout the cascade multiplies in
        fl = np.empty((2, 2) + z.shape, dtype=complex)
        fl[0, 0] = fl[1, 1] = ch
        fl[0, 1] = z * (length * shc)
        fl[1, 0] = y * (length * shc)
        return ScaledABCD.reciprocal_fl(fl, s)
    z, y = rlgc.z(), rlgc.y()
    m, s = modal_scaled_abcd(z, y, length, decomposition=_line_constants(rlgc))
    return ScaledABCD.reciprocal(m, s)


# one channel reuses a cross-section in several segments: its RLGC and the length-
# independent line constants (Z, Y and gamma, or the modal decomposition) are computed
# once per sweep
_CONSTANTS: dict[int, tuple] = {}


def _line_constants(rlgc: RLGC) -> tuple:
    key = id(rlgc)
    hit = _CONSTANTS.get(key)
    if hit is None or hit[0] is not rlgc:
        if len(_CONSTANTS) > 16:
            _CONSTANTS.clear()
        if rlgc.n == 1:
            z, y = rlgc.z()[:, 0, 0], rlgc.y()[:, 0, 0]
            value = (z, y, np.sqrt(z * y))
        else:
            value = modal_decomposition(rlgc.z(), rlgc.y())
        hit = (rlgc, value)
        _CONSTANTS[key] = hit
    return hit[1]


@lru_cache(maxsize=32)
def _section_rlgc(section, f_bytes: bytes) -> RLGC:
    return section.rlgc(np.frombuffer(f_bytes, dtype=float))


# ---------------------------------------------------------------- blocks


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


def _length(owner: str, key: str, value: float) -> float:
    v = float(value)
    if not np.isfinite(v) or v < 0:
        raise LossLaneError(f"{owner}: {key} = {value!r} m is not a valid length; it must be >= 0")
    return v


def _nonneg(owner: str, key: str, value: float, unit: str, positive: bool = False) -> float:
    v = float(value)
    ok = np.isfinite(v) and (v > 0 if positive else v >= 0)
    if not ok:
        bound = "> 0" if positive else ">= 0"
        raise LossLaneError(f"{owner}: {key} = {value!r} {unit} is not valid; it must be {bound}")
    return v


def _conductors(owner: str, n: int) -> int:
    if int(n) != n or n < 1:
        raise LossLaneError(
            f"{owner}: n = {n!r} conductors is not valid; it must be a whole number >= 1 "
            "(1 single-ended, 2 a pair)"
        )
    return int(n)


class LineSegment(Block):
    """``length`` metres of a uniform line given by a cross-section or an RLGC.

    With a :class:`~losslane.xsection.base.CrossSection` the RLGC is computed on each
    sweep (``section.rlgc(f)``); with an :class:`~losslane.xsection.rlgc.RLGC` its
    frequencies must be the sweep's. n = 1 uses the closed form, n > 1 the modal
    decomposition (see the module docstring); DC is exact in both.
    """

    kind = "line"

    def __init__(self, section_or_rlgc, length: float, name: str = "line") -> None:
        self.name = str(name)
        self.length = _length(f"line {self.name!r}", "length", length)
        self.source = section_or_rlgc
        if isinstance(section_or_rlgc, RLGC):
            self.n = section_or_rlgc.n
        elif hasattr(section_or_rlgc, "rlgc"):
            self.n = int(getattr(section_or_rlgc, "n_conductors", 1))
        else:
            raise LossLaneError(
                f"line {self.name!r}: {type(section_or_rlgc).__name__} is neither a "
                "cross-section nor an RLGC"
            )

    def rlgc(self, f: np.ndarray) -> RLGC:
        f = check_sweep(f)
        src = self.source
        if isinstance(src, RLGC):
            same = src.f.shape == f.shape and np.allclose(src.f, f, rtol=1e-12, atol=0)
            if not same:
                raise LossLaneError(
                    f"line {self.name!r}: its RLGC holds {src.f.size} frequencies "
                    f"({src.f.min():g}..{src.f.max():g} Hz) but the sweep has {f.size} "
                    f"({f.min():g}..{f.max():g} Hz); compute the RLGC on the sweep"
                )
            return src
        try:
            return _section_rlgc(src, np.ascontiguousarray(f, dtype=float).tobytes())
        except TypeError:  # an unhashable section: no cache
            return src.rlgc(f)

    def scaled_abcd(self, f: np.ndarray) -> ScaledABCD:
        return line_scaled_abcd(self.rlgc(f), self.length)


class _Lumped(Block):
    """A single-conductor 2-port chain matrix applied in each of the n legs."""

    length = 0.0

    def _leg(self, f: np.ndarray) -> ScaledABCD:
        raise NotImplementedError

    def scaled_abcd(self, f: np.ndarray) -> ScaledABCD:
        leg = self._leg(check_sweep(f))
        if self.n == 1:
            return leg
        return ScaledABCD.reciprocal(block_diagonal_legs(leg.matrix, self.n), leg.log_scale)


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

    kind = "series-z"

    def __init__(self, impedance, n: int = 1, name: str = "series impedance") -> None:
        self.name = str(name)
        self.n = _conductors(f"series impedance {self.name!r}", n)
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

    kind = "series-rl"

    def __init__(self, r: float = 0.0, l: float = 0.0, n: int = 1, name: str = "series RL"):
        self.name = str(name)
        owner = f"series RL {self.name!r}"
        self.r = _nonneg(owner, "r", r, "ohm")
        self.l = _nonneg(owner, "l", l, "H")
        self.n = _conductors(owner, n)

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
        self.c = _nonneg(owner, "value", c, "F", positive=True)
        self.esl = _nonneg(owner, "esl", esl, "H")
        self.esr = _nonneg(owner, "esr", esr, "ohm")
        self.n = _conductors(owner, n)

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

    kind = "shunt-c"

    def __init__(self, c: float, n: int = 1, name: str = "shunt C") -> None:
        self.name = str(name)
        owner = f"shunt capacitor {self.name!r}"
        self.c = _nonneg(owner, "value", c, "F")
        self.n = _conductors(owner, n)

    def _leg(self, f: np.ndarray) -> ScaledABCD:
        m = np.zeros(f.shape + (2, 2), dtype=complex)
        m[:, 0, 0] = m[:, 1, 1] = 1.0
        m[:, 1, 0] = 2j * np.pi * f * self.c
        return ScaledABCD.reciprocal(m, np.zeros(f.shape))


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
        self.barrel_length = _length(owner, "barrel", barrel_length)
        self.stub_length = _length(owner, "stub", stub_length)
        self.impedance = _nonneg(owner, "impedance", impedance, "ohm", positive=True)
        zs = impedance if stub_impedance is None else stub_impedance
        self.stub_impedance = _nonneg(owner, "stub_impedance", zs, "ohm", positive=True)
        self.n = _conductors(owner, n)
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
        leg = self._leg(check_sweep(f))
        if self.n == 1:
            return leg
        return ScaledABCD.reciprocal(block_diagonal_legs(leg.matrix, self.n), leg.log_scale)


def linear_interpolation(x: np.ndarray, xq: np.ndarray, *arrays: np.ndarray) -> list[np.ndarray]:
    """Piecewise-linear interpolation along the first axis of each array (complex values:
    real and imaginary parts alike), from the increasing grid ``x`` to ``xq`` (within
    ``x[0]..x[-1]``). The same as scikit-rf's ``Network.interpolate(kind="linear")`` in its
    default Cartesian coordinates, vectorized over all entries without scipy.interpolate
    (whose import costs a command's start-up more than the interpolation itself)."""
    k = np.clip(np.searchsorted(x, xq, side="right") - 1, 0, x.size - 2)
    w = (xq - x[k]) / (x[k + 1] - x[k])
    out = []
    for a in arrays:
        wb = w.reshape(w.shape + (1,) * (a.ndim - 1))
        out.append(a[k] * (1.0 - wb) + a[k + 1] * wb)
    return out


class TouchstoneBlock(Block):
    """An S-parameter model from a Touchstone file (a connector, a package, a measured
    launch), read with scikit-rf.

    ``n`` is the channel's conductor count: the file must have 2n ports (2 for a
    single-ended channel, 4 for a pair), else a LossLaneError names the file and both
    counts. For 4-port files ``order`` says how the file numbers its ports
    ("in-in-out-out": 1, 2 near ends, 3, 4 far ends; "in-out-in-out": 1 -> 2 is line 1,
    3 -> 4 line 2).

    On a sweep the data are interpolated linearly in real/imaginary parts (what scikit-rf's
    linear interpolation does; a convex combination of passive matrices is passive, so
    interpolation cannot create a passivity violation). A sweep reaching outside the file's
    band is a LossLaneError -- S-parameters are never extrapolated silently -- except
    f = 0: when the sweep asks for DC and the file lacks it, the DC point is extrapolated
    with scikit-rf's ``extrapolate_to_dc`` from the first two points (its imaginary part,
    non-physical at DC, is dropped) and a LossLaneWarning says so; sweep points between 0
    and the file's first frequency are then interpolated towards that DC point. The chain
    matrix uses the file's own reference impedances and carries the file's reverse
    direction exactly (no reciprocity assumed). A file that is not passive (IEEE 370-2020:
    a singular value of S above 1) is accepted with a LossLaneWarning.
    """

    kind = "touchstone"
    length = 0.0

    def __init__(
        self,
        path: str | os.PathLike,
        name: str | None = None,
        n: int = 1,
        order: str = DEFAULT_ORDER,
    ) -> None:
        from losslane.network.touchstone import read_touchstone

        self.path = Path(path)
        self.name = str(name) if name else self.path.name
        self.n = _conductors(f"touchstone '{self.path}'", n)
        self.order = check_order(order, f"touchstone '{self.path}': order")
        net = read_touchstone(self.path)
        if net.nports != 2 * self.n:
            what = "single-ended (2-port)" if self.n == 1 else "differential (4-port)"
            raise LossLaneError(
                f"touchstone file '{self.path}' has {net.nports} ports but this {what} "
                f"channel needs {2 * self.n}"
            )
        if len(net.f) < 2:
            raise LossLaneError(
                f"touchstone file '{self.path}' has {len(net.f)} frequency point(s); "
                "at least 2 are needed"
            )
        self.network = net
        self._check_passive()

    def _check_passive(self) -> None:
        """Warn when the file itself is not passive (IEEE 370-2020: the largest singular
        value of S must not exceed 1); the cascade would carry the gain along."""
        sv = np.linalg.svd(np.asarray(self.network.s), compute_uv=False)[:, 0]
        k = int(np.argmax(sv))
        if sv[k] > 1 + 1e-6:
            from losslane.units import format_frequency

            warn(
                f"touchstone file '{self.path}' is not passive: the largest singular value "
                f"of S is {sv[k]:.6g} (> 1) at {format_frequency(float(self.network.f[k]))}"
            )

    @property
    def band(self) -> tuple[float, float]:
        f = self.network.f
        return float(f[0]), float(f[-1])

    def _with_dc(self):
        """The file's network with an extrapolated DC point prepended."""
        import skrf

        net = self.network
        two = net[0:2]
        dc = np.real(two.extrapolate_to_dc(points=3, kind="linear").s[0])
        freq = skrf.Frequency.from_f(np.r_[0.0, net.f], unit="Hz")
        return skrf.Network(
            frequency=freq,
            s=np.concatenate([dc[None].astype(complex), net.s]),
            z0=np.concatenate([net.z0[:1], net.z0]),
            name=net.name,
        )

    def sampled(self, f: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """S (N, 2n, 2n) in internal port order and reference impedances (N, 2n) on ``f``."""
        from losslane.units import format_frequency as fmt

        f = check_sweep(f)
        lo, hi = self.band
        sweep = f"{fmt(float(f.min()))}..{fmt(float(f.max()))}"
        band = f"{fmt(lo)}..{fmt(hi)}"
        tol = 1e-9 * hi
        if f.max() > hi + tol:
            raise LossLaneError(
                f"touchstone file '{self.path}' covers {band} but the sweep runs {sweep}; "
                f"end the sweep at or below {fmt(hi)} or supply a file covering it "
                "(S-parameters are not extrapolated)"
            )
        net = self.network
        if lo > 0 and np.any(f == 0):
            net = self._with_dc()
            below = f[(f > 0) & (f < lo - tol)]
            extra = (
                f"; sweep points up to {fmt(float(below.max()))} are interpolated towards it"
                if below.size
                else ""
            )
            warn(
                f"touchstone file '{self.path}' starts at {fmt(lo)}: its DC point is "
                f"extrapolated (scikit-rf extrapolate_to_dc){extra}"
            )
        elif f.min() < lo - tol:
            raise LossLaneError(
                f"touchstone file '{self.path}' covers {band} but the sweep runs {sweep}; "
                f"start the sweep at or above {fmt(lo)} (only f = 0 is extrapolated)"
            )
        fq = np.clip(f, net.f[0], net.f[-1])  # within tol of the band edges
        s, z0 = np.asarray(net.s), np.asarray(net.z0)
        same = fq.shape == net.f.shape and np.array_equal(fq, net.f)
        if not same:
            s, z0 = linear_interpolation(np.asarray(net.f), fq, s, z0)
        if np.any(z0.imag != 0):
            raise LossLaneError(
                f"touchstone file '{self.path}' has complex reference impedances; "
                "only real ones are supported"
            )
        inv = np.argsort(port_permutation(self.n, self.order))  # file port -> internal
        return s[:, inv][:, :, inv], z0.real[:, inv]

    def scaled_abcd(self, f: np.ndarray) -> ScaledABCD:
        s, z = self.sampled(f)
        return s_to_scaled_abcd(s, z)

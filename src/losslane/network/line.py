"""Uniform transmission lines as channel blocks: the chain matrix of a length of line.

Lines use the exact solution of the telegrapher's equations for uniform lines:
``T = exp(H l)`` with ``H = [[0, Z], [Y, 0]]`` (Z = R + jwL, Y = G + jwC per metre), i.e.
A = cosh(sqrt(ZY) l), B = Z l sinhc(sqrt(YZ) l), C = Y l sinhc(sqrt(ZY) l),
D = cosh(sqrt(YZ) l) as matrix functions, sinhc(x) = sinh(x)/x. Both are even, entire
functions of sqrt(ZY), so no branch choice or characteristic impedance is needed and the
DC limit (Y = 0: A = D = I, B = Z l, C = 0) is exact. For n = 1 these are the textbook
closed forms (A = cosh gamma l, B = Zc sinh gamma l, C = sinh gamma l / Zc); for n > 1
the matrix functions come from the modes of ZY (e.g. C. R. Paul, *Analysis of
Multiconductor Transmission Lines*, Wiley): the modes a section already knows (a
symmetric pair's even and odd modes, ``RLGC.transform``), else an eigen-decomposition,
with scipy's matrix exponential as the fallback where the modes are degenerate. Valid for
any uniform quasi-TEM line; the RLGC model's own validity range applies.

A line's length-independent constants (Z, Y and gamma, or its modes) are computed once
per sweep in a :class:`UniformLine`, which every segment of that cross-section shares.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError
from losslane.network.block import Block, length_value
from losslane.network.cascade import check_sweep
from losslane.network.scaled import ScaledABCD, abcd_to_s
from losslane.network.scatter import star
from losslane.xsection.rlgc import RLGC

__all__ = [
    "LineSegment",
    "UniformLine",
    "line_scaled_abcd",
    "modal_decomposition",
    "modal_scaled_abcd",
]

_SERIES_LIMIT = 0.05
"""|x| below which sinhc(x) is summed as a series (error < x^10/11! ~ 3e-21)."""

PIECE_NEPER = 4.0
"""Largest modal attenuation of one piece when a multiconductor line forms its S from
pieces: the weakest mode then sits at most exp(-4) below the strongest in the piece's
chain matrix, so rounding leaves it intact."""


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


def modal_decomposition(z: np.ndarray, y: np.ndarray, transform: np.ndarray | None = None) -> tuple:
    """Modes Z Y = E diag(gamma_i^2) E^-1 of an (N, n, n) line, independent of its length
    (so one decomposition serves every segment of the same cross-section).

    ``z``, ``y`` are symmetrised first (they are symmetric for any reciprocal line, a
    numerical solver's rounding aside). With a known real orthonormal ``transform`` T
    (T^T Z T and T^T Y T diagonal, as for a symmetric pair) E = T and the modal constants
    are those diagonals; otherwise an eigen-decomposition. At f = 0 (Z Y = 0) E = I.
    Returns (z, y, gamma^2 (N, n), E, E^-1, cond(E) (N,)).
    """
    z = np.asarray(z, complex)
    y = np.asarray(y, complex)
    z = 0.5 * (z + np.swapaxes(z, -1, -2))
    y = 0.5 * (y + np.swapaxes(y, -1, -2))
    n = z.shape[-1]
    zy = np.matmul(z, y)
    eye = np.eye(n)
    zero = np.all(zy == 0, axis=(-2, -1))
    if transform is not None:
        t = np.asarray(transform, float)
        z_modes = np.einsum("ik,fij,jk->fk", t, z, t)
        y_modes = np.einsum("ik,fij,jk->fk", t, y, t)
        lam = np.where(zero[:, None], 0.0, z_modes * y_modes)
        vec = np.where(zero[:, None, None], eye, t)
        vinv = np.where(zero[:, None, None], eye, t.T)
        return z, y, lam, vec, vinv, np.ones(z.shape[0])
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
    """Chain matrix of a uniform n-conductor line from the modes of Z Y.

    With Z Y = E diag(gamma_i^2) E^-1 and Y Z = (Z Y)^T:
    A = E diag(cosh gamma_i l) E^-1, C = Y l E diag(sinhc gamma_i l) E^-1,
    B = Z l (E diag(sinhc) E^-1)^T, D = A^T; all scaled by exp(-max_i |Re gamma_i| l).
    Where E is ill-conditioned (degenerate modes; cond > ``cond_limit``) the points use
    scipy's matrix exponential of the shifted 2n x 2n system instead. At f = 0 (Z Y = 0)
    E = I and the result is exactly A = D = I, B = Z l, C = 0. ``decomposition`` is a
    result of :func:`modal_decomposition` for the same z, y.
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


@dataclass(frozen=True, eq=False)
class UniformLine:
    """A uniform line's constants on one sweep, computed once from its RLGC: for one
    conductor Z, Y and gamma (N,); for n conductors its modes (``modal_decomposition``).
    Every segment of the same cross-section shares one."""

    rlgc: RLGC
    constants: tuple
    #: with known modes (``RLGC.transform``): each mode's series and shunt constants,
    #: (N, n) each
    mode_zy: tuple | None = None

    @classmethod
    def from_rlgc(cls, rlgc: RLGC) -> UniformLine:
        if rlgc.n == 1:
            z, y = rlgc.z()[:, 0, 0], rlgc.y()[:, 0, 0]
            return cls(rlgc, (z, y, np.sqrt(z * y)))
        constants = modal_decomposition(rlgc.z(), rlgc.y(), rlgc.transform)
        mode_zy = None
        if rlgc.transform is not None:
            t = rlgc.transform
            z, y = constants[0], constants[1]
            mode_zy = (np.einsum("ik,fij,jk->fk", t, z, t), np.einsum("ik,fij,jk->fk", t, y, t))
        return cls(rlgc, constants, mode_zy)

    @property
    def n(self) -> int:
        return self.rlgc.n

    def s(self, length: float, z_ref: float = 50.0) -> np.ndarray:
        """S (N, 2n, 2n), internal port order, of ``length`` metres between ``z_ref``.

        One conductor: from the chain matrix, exact for any loss. Known modes (a
        symmetric pair, ``RLGC.transform`` T): each mode is a single line, its 2-port S
        exact for any loss, and S = Q S_modes Q^T with Q = diag(T, T) (every port at the
        same real reference, so the orthonormal T carries power waves unchanged). Other
        lines: the chain matrix of 2^-k of the length, whose modes' attenuation is at most
        PIECE_NEPER, in S, then k star-product squarings (S of 2L = S(L) * S(L)); the modes
        keep their own accuracy whatever their loss (see :mod:`losslane.network.scatter`).
        """
        if self.n == 1:
            return abcd_to_s(self.scaled_abcd(length), z_ref)
        n = self.n
        if self.mode_zy is not None:
            # each n x n block of S is T diag(that entry of each mode's 2-port S) T^T
            t = self.rlgc.transform
            z_modes, y_modes = self.mode_zy
            out = np.zeros((z_modes.shape[0], 2 * n, 2 * n), dtype=complex)
            for m in range(n):
                zm, ym = z_modes[:, m], y_modes[:, m]
                s2 = abcd_to_s(single_line_abcd(zm, ym, np.sqrt(zm * ym), length), z_ref)
                outer = np.outer(t[:, m], t[:, m])
                for a in (0, 1):
                    for b in (0, 1):
                        out[:, a * n : (a + 1) * n, b * n : (b + 1) * n] += (
                            s2[:, a, b, None, None] * outer
                        )
            return out
        alpha = np.max(np.abs(np.sqrt(self.constants[2]).real)) * length
        k = int(np.ceil(np.log2(alpha / PIECE_NEPER))) if alpha > PIECE_NEPER else 0
        s = abcd_to_s(self.scaled_abcd(length / 2.0**k), z_ref)
        for _ in range(k):
            s = star(s, s)
        return s

    def scaled_abcd(self, length: float) -> ScaledABCD:
        """Scaled chain matrix (with its reverse) of ``length`` metres of this line."""
        if self.n == 1:
            return single_line_abcd(*self.constants, length)
        z, y = self.constants[0], self.constants[1]
        m, s = modal_scaled_abcd(z, y, length, decomposition=self.constants)
        return ScaledABCD.reciprocal(m, s)


def single_line_abcd(z: np.ndarray, y: np.ndarray, gamma: np.ndarray, length: float) -> ScaledABCD:
    """Scaled chain matrix of ``length`` of a single line of series ``z``, shunt ``y`` and
    propagation constant ``gamma`` per metre ((N,) each)."""
    gl = gamma * length
    s = np.abs(gl.real)
    ch, shc = scaled_cosh_sinhc(gl, s)
    # built frequency-last, the layout the cascade multiplies in
    stack = np.empty((2, 2) + z.shape, dtype=complex)
    stack[0, 0] = stack[1, 1] = ch
    stack[0, 1] = z * (length * shc)
    stack[1, 0] = y * (length * shc)
    return ScaledABCD.reciprocal_stack(stack, s)


def line_scaled_abcd(rlgc: RLGC, length: float) -> ScaledABCD:
    """Scaled chain matrix (with its reverse) of ``length`` metres of a uniform line."""
    return UniformLine.from_rlgc(rlgc).scaled_abcd(length)


class LineSegment(Block):
    """``length`` metres of a uniform line given by a :class:`UniformLine` (what a channel
    build passes: each cross-section evaluated once per sweep), an RLGC (its frequencies
    must be the sweep's) or a cross-section (evaluated on each call of ``scaled_abcd``).
    A line given on a sweep may also carry its ``section``, which serves other sweeps
    (a budget reading one segment at its check points). n = 1 uses the closed form,
    n > 1 the modes (see the module docstring); DC is exact in both.
    """

    kind = "line"

    def __init__(self, line, length: float, name: str = "line", section=None) -> None:
        self.name = str(name)
        self.length = length_value(f"line {self.name!r}", "length", length)
        if isinstance(line, RLGC):
            line = UniformLine.from_rlgc(line)
        if isinstance(line, UniformLine):
            self.n = line.n
        elif hasattr(line, "rlgc"):
            self.n = int(getattr(line, "n_conductors", 1))
            section = line
        else:
            raise LossLaneError(
                f"line {self.name!r}: {type(line).__name__} is neither a cross-section nor an RLGC"
            )
        self.source = line
        self.section = section

    def line(self, f: np.ndarray) -> UniformLine:
        """The line's constants on the sweep ``f``."""
        f = check_sweep(f)
        src = self.source
        if isinstance(src, UniformLine):
            have = src.rlgc.f
            if have.shape == f.shape and np.allclose(have, f, rtol=1e-12, atol=0):
                return src
        if self.section is None:
            have = src.rlgc.f
            raise LossLaneError(
                f"line {self.name!r}: its RLGC holds {have.size} frequencies "
                f"({have.min():g}..{have.max():g} Hz) but the sweep has {f.size} "
                f"({f.min():g}..{f.max():g} Hz); compute the RLGC on the sweep"
            )
        return UniformLine.from_rlgc(self.section.rlgc(f))

    def rlgc(self, f: np.ndarray) -> RLGC:
        return self.line(f).rlgc

    def scaled_abcd(self, f: np.ndarray) -> ScaledABCD:
        return self.line(f).scaled_abcd(self.length)

    def s(self, f: np.ndarray, z_ref: float = 50.0) -> np.ndarray:
        return self.line(f).s(self.length, z_ref)

"""The scaled transfer-matrix representation every block and the cascade share, and the
conversions between it and scattering parameters.

Representation
--------------
The transfer (ABCD, chain) matrix ``T`` of an n-conductor block relates the near-end
voltages and currents to the far-end ones, ``[V1; I1] = T [V2; I2]`` (``I1`` flows into
the block at the near end, ``I2`` out of it at the far end). Rows/columns ``0..n-1`` are
the near-end quantities of conductors 1..n, rows/columns ``n..2n-1`` the far end;
``T`` is (N, 2n, 2n) over the frequency axis.

For a long lossy line ``T`` grows like ``exp(alpha l)`` (cosh and sinh of gamma l): it
overflows for alpha l > ~700 Np and, long before that, any quantity obtained from it by
cancellation (the reverse transmission S12, which is of order ``exp(-alpha l)``) is lost
in rounding. losslane therefore carries

    T = exp(log_scale)[:, None, None] * matrix

with ``log_scale`` (N,) real (natural log, may be +inf where ``T`` itself is infinite,
e.g. a series capacitor at f = 0) and ``matrix`` normalised so that its largest entry
magnitude lies in [0.5, 1) (a power-of-two scaling, so normalising is exact). A cascade
multiplies the matrices and adds the log scales.

The reverse transmission cannot be taken from the forward matrix (it is of order
exp(-2 alpha l) relative to its entries), so a :class:`ScaledABCD` also knows the same
network seen from its far end (``reverse``): for a reciprocal block or cascade it is the
flip [[D^T, B^T], [C^T, A^T]] of the forward matrix (exact rearrangement, no arithmetic),
for a possibly non-reciprocal one (a measured file) it is carried explicitly and the
cascade forms the reverse product as well. S11 and S21 come from the forward chain, S22
and S12 from the reverse one, each as an input reflection and a forward transmission
computed without cancellation: a line of alpha l ~ 1000 Np gives S11 to full accuracy
and S21 = S12 tiny (underflowing to 0 below ~1e-308) instead of NaN.

Waves are power waves with real reference impedances per port (the Touchstone
convention): ``V = sqrt(z)(a + b)``, ``I_in = (a - b)/sqrt(z)``.
"""

from __future__ import annotations

import numpy as np

__all__ = [
    "ScaledABCD",
    "abcd_to_s",
    "block_diagonal_legs",
    "s_to_scaled_abcd",
    "transmission_db",
]


def stack_matmul(
    a: np.ndarray, b: np.ndarray, out: np.ndarray | None = None, tmp: np.ndarray | None = None
) -> np.ndarray:
    """Product of two frequency-last (m, m, N) stacks, written out entry by entry.

    For the small m of a channel (2 or 4) this is several times faster than
    ``np.matmul``'s generic loop over (N, m, m) stacks (benchmarks/bench_cascade.py). The
    optional ``out`` (must not alias ``a`` or ``b``) and ``tmp`` (N,) buffers avoid
    allocating large temporaries; matrices above 8 x 8 fall back to ``np.matmul``.
    """
    m = a.shape[0]
    if out is None:
        out = np.empty(a.shape, dtype=np.result_type(a, b))
    if m > 8:
        out[...] = np.moveaxis(np.matmul(np.moveaxis(a, -1, 0), np.moveaxis(b, -1, 0)), 0, -1)
        return out
    if tmp is None:
        tmp = np.empty(a.shape[2:], dtype=out.dtype)
    for i in range(m):
        for j in range(m):
            o = out[i, j]
            np.multiply(a[i, 0], b[0, j], out=o)
            for k in range(1, m):
                np.multiply(a[i, k], b[k, j], out=tmp)
                o += tmp
    return out


def normalise(matrix: np.ndarray, log_scale: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Rescale ``matrix`` (N, m, m) by a power of two per frequency so its largest entry
    magnitude is in [0.5, 1), moving the factor into ``log_scale``. Exact (no rounding)."""
    peak = np.max(np.abs(matrix), axis=(-2, -1))
    _, e = np.frexp(peak)
    return matrix * np.exp2(-e)[:, None, None], log_scale + e * np.log(2.0)


def normalise_stack(matrix: np.ndarray, log_scale: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """:func:`normalise` for a frequency-last (m, m, N) stack."""
    _, e = np.frexp(np.max(np.abs(matrix), axis=(0, 1)))
    return matrix * np.exp2(-e), log_scale + e * np.log(2.0)


def _flip_stack(stack: np.ndarray) -> np.ndarray:
    """The reverse-direction matrix of a reciprocal block: [[D^T, B^T], [C^T, A^T]]
    (frequency-last layout).

    Reciprocity of a multiport chain matrix means A B^T = B A^T, C D^T = D C^T and
    A D^T - B C^T = I, so T^-1 = [[D^T, -B^T], [-C^T, A^T]]; turning the block around
    (swap ends, reverse the current directions: P T^-1 P, P = diag(I, -I)) gives the
    matrix above. Since flip(T1 T2) = flip(T2) flip(T1), the reverse of a cascade of
    reciprocal blocks is the flip of the forward product: no second chain is needed.
    """
    n = stack.shape[0] // 2
    out = np.empty_like(stack)
    out[:n, :n] = np.swapaxes(stack[n:, n:], 0, 1)
    out[:n, n:] = np.swapaxes(stack[:n, n:], 0, 1)
    out[n:, :n] = np.swapaxes(stack[n:, :n], 0, 1)
    out[n:, n:] = np.swapaxes(stack[:n, :n], 0, 1)
    return out


RENORMALISE_EVERY = 8
"""Products between renormalisations: block matrices have entries below 1, so a product of
8 of them has entries below (2n)^7 (no overflow); a run of 8 nearly singular blocks (DC
blocks at f = 0, entries down to LIMIT_EPS) stays above ~1e-135 (no underflow)."""


def chain_product(stacks: list[np.ndarray], scales: list[np.ndarray]) -> tuple:
    """Product stacks[0] stacks[1] ... of frequency-last stacks and the sum of their log scales,
    renormalised by exact powers of two every RENORMALISE_EVERY products."""
    acc = stacks[0]
    s = np.array(scales[0], dtype=float)
    if len(stacks) > 1:
        bufs = (np.empty_like(acc), np.empty_like(acc))
        tmp = np.empty(acc.shape[2:], dtype=acc.dtype)
        for k in range(1, len(stacks)):
            out = bufs[k % 2]
            stack_matmul(acc, stacks[k], out, tmp)
            acc = out
            s += scales[k]
            if k % RENORMALISE_EVERY == 0:
                _, e = np.frexp(np.max(np.abs(acc), axis=(0, 1)))
                acc *= np.exp2(-e)
                s += e * np.log(2.0)
    return normalise_stack(acc, s)


LIMIT_EPS = 2.0**-64
"""Regularisation of an infinite chain matrix's limit direction (5.4e-20 of its peak):
small enough to move S11 of a DC block by ~1e-17 (below double rounding at S ~ 1), large
enough that a run of such blocks between two renormalisations cannot underflow."""


def _open_limit(matrix: np.ndarray, infinite: np.ndarray) -> np.ndarray:
    """Where the represented T is infinite (log_scale = +inf), add LIMIT_EPS * peak * I to
    its limit direction. The limit of a DC block is nilpotent ([[0, 1], [0, 0]]), and the
    product of two such is 0, which would lose two capacitors in series at f = 0; the
    tiny diagonal keeps every product non-degenerate and changes no result beyond
    rounding (S21 stays exactly exp(-inf) * x = 0; S11 moves by ~1e-17)."""
    if not np.any(infinite):
        return matrix
    m = matrix.shape[-1]
    peak = np.max(np.abs(matrix), axis=(-2, -1))
    bump = np.where(infinite, LIMIT_EPS * np.where(peak > 0, peak, 1.0), 0.0)
    return matrix + bump[:, None, None] * np.eye(m)


class ScaledABCD:
    """T = exp(log_scale) * matrix over frequency, and the network seen from its far end.

    ``matrix`` (N, 2n, 2n) complex (stored frequency-last as ``stack``, (2n, 2n, N), the
    layout the cascade multiplies), ``log_scale`` (N,) float (may be +inf). The reverse
    (turned-around) network is either given explicitly (``reverse``, for blocks that may
    not be reciprocal, such as measured files) or, for reciprocal blocks
    (``is_reciprocal``), the flip of the forward matrix. Build one with
    :meth:`reciprocal`, :meth:`from_ratio` or :meth:`from_abcd`; ``a @ b`` cascades
    (a's far end to b's near end).
    """

    __slots__ = ("stack", "log_scale", "_reverse", "is_reciprocal")

    def __init__(
        self,
        matrix: np.ndarray,
        log_scale: np.ndarray,
        reverse: ScaledABCD | None = None,
        reciprocal: bool = False,
        *,
        frequency_last: bool = False,
    ) -> None:
        arr = np.asarray(matrix, complex)
        self.stack = arr if frequency_last else np.ascontiguousarray(np.moveaxis(arr, 0, -1))
        self.log_scale = np.asarray(log_scale, float)
        self._reverse = reverse
        self.is_reciprocal = bool(reciprocal) and reverse is None

    @property
    def matrix(self) -> np.ndarray:
        """(N, 2n, 2n) view of the scaled matrix."""
        return np.moveaxis(self.stack, -1, 0)

    @property
    def n(self) -> int:
        """Number of conductors (the matrix is 2n x 2n)."""
        return self.stack.shape[0] // 2

    @property
    def npoints(self) -> int:
        return self.stack.shape[-1]

    @property
    def reverse(self) -> ScaledABCD:
        """The turned-around network (far end first), same representation."""
        if self._reverse is not None:
            return self._reverse
        if self.is_reciprocal:
            return ScaledABCD(_flip_stack(self.stack), self.log_scale, frequency_last=True)
        return ScaledABCD.from_abcd(self.abcd()).reverse

    @property
    def has_reverse(self) -> bool:
        """Whether the reverse is exact (given, or the flip of a reciprocal block)."""
        return self._reverse is not None or self.is_reciprocal

    @classmethod
    def reciprocal_stack(cls, stack: np.ndarray, log_scale: np.ndarray) -> ScaledABCD:
        m, s = normalise_stack(np.asarray(stack, complex), np.asarray(log_scale, float))
        return cls(m, s, reciprocal=True, frequency_last=True)

    @classmethod
    def reciprocal(cls, matrix: np.ndarray, log_scale: np.ndarray) -> ScaledABCD:
        """A reciprocal block from its (N, 2n, 2n) forward matrix, normalised."""
        m, s = normalise(np.asarray(matrix, complex), np.asarray(log_scale, float))
        return cls(m, s, reciprocal=True)

    @classmethod
    def from_ratio(cls, numerator: np.ndarray, denominator: np.ndarray) -> ScaledABCD:
        """T = numerator / denominator (scalar per frequency) of a reciprocal block, finite
        where the denominator is 0 (T infinite: log_scale = +inf, the matrix its limit
        direction). Used for a series capacitor at DC and a shunt stub at its notch."""
        numerator = np.asarray(numerator, complex)
        d = np.asarray(denominator, complex)
        mag = np.abs(d)
        phase = np.where(mag > 0, np.conj(d) / np.where(mag > 0, mag, 1.0), 1.0)
        with np.errstate(divide="ignore"):
            s = -np.log(mag)
        return cls.reciprocal(_open_limit(numerator, mag == 0) * phase[:, None, None], s)

    @classmethod
    def from_abcd(cls, abcd: np.ndarray) -> ScaledABCD:
        """Wrap a plain (unscaled) ABCD stack; the reverse comes from its exact inverse,
        so no reciprocity is assumed. Fine for moderate matrices; blocks use the scaled
        constructors."""
        t = np.asarray(abcd, complex)
        if not np.all(np.isfinite(t)):
            raise ValueError(
                "a plain ABCD matrix with non-finite entries (e.g. a series capacitor at "
                "f = 0) cannot be converted; use the ScaledABCD that cascade() returns"
            )
        zero = np.zeros(t.shape[0])
        m, s = normalise(t, zero)
        n = t.shape[-1] // 2
        p = np.concatenate([np.ones(n), -np.ones(n)])
        inv = np.linalg.inv(t) * p[None, :, None] * p[None, None, :]
        mr, sr = normalise(inv, zero)
        return cls(m, s, cls(mr, sr))

    def abcd(self) -> np.ndarray:
        """The plain ABCD matrix (N, 2n, 2n); overflows to inf for huge log scales."""
        m = self.matrix
        with np.errstate(over="ignore", invalid="ignore"):
            big = np.exp(self.log_scale)[:, None, None]
            return np.where(m == 0, 0.0, m * big)

    def __matmul__(self, other: ScaledABCD) -> ScaledABCD:
        return cascade_items([self, other])

    def __repr__(self) -> str:
        kind = "reciprocal" if self.is_reciprocal else "explicit reverse" if self._reverse else ""
        return f"ScaledABCD(n={self.n}, points={self.npoints}{', ' + kind if kind else ''})"


def cascade_items(items: list[ScaledABCD]) -> ScaledABCD:
    """Cascade scaled chain matrices, first item at the near end (no input checks).

    When every item is reciprocal only the forward product is formed and the result is
    reciprocal (its reverse the flip); otherwise the reverse product
    (last item's reverse first) is formed too.
    """
    fm, s = chain_product([it.stack for it in items], [it.log_scale for it in items])
    if all(it.is_reciprocal for it in items):
        return ScaledABCD(fm, s, reciprocal=True, frequency_last=True)
    revs = [it.reverse for it in reversed(items)]
    rm, rs = chain_product([r.stack for r in revs], [r.log_scale for r in revs])
    return ScaledABCD(fm, s, ScaledABCD(rm, rs, frequency_last=True), frequency_last=True)


def block_diagonal_legs(matrix: np.ndarray, n: int) -> np.ndarray:
    """Expand a single-conductor (N, 2, 2) chain matrix into the (N, 2n, 2n) matrix of n
    identical, uncoupled legs (a lumped part in each leg of a pair)."""
    if n == 1:
        return matrix
    k = np.arange(n)
    out = np.zeros((matrix.shape[0], 2 * n, 2 * n), dtype=complex)
    for i in (0, 1):
        for j in (0, 1):
            out[:, i * n + k, j * n + k] = matrix[:, i, j, None]
    return out


def _ref_array(z_ref, npoints: int, nports: int) -> np.ndarray:
    """Reference impedances as a real (N, 2n) array from a scalar, (2n,) or (N, 2n)."""
    z = np.asarray(z_ref)
    if np.iscomplexobj(z):
        if np.any(z.imag != 0):
            raise ValueError("reference impedances must be real")
        z = z.real
    z = np.broadcast_to(np.asarray(z, float), (npoints, nports)) if z.ndim < 2 else z
    if z.shape != (npoints, nports):
        raise ValueError(f"z_ref of shape {z.shape} does not fit {npoints} points x {nports} ports")
    if not np.all(np.isfinite(z)) or np.any(z <= 0):
        raise ValueError("reference impedances must be finite and > 0")
    return z


def _inv_fl(g: np.ndarray) -> np.ndarray:
    """Inverse of a frequency-last (n, n, N) stack; written out for n <= 2."""
    n = g.shape[0]
    if n == 1:
        return 1.0 / g
    if n == 2:
        a, b, c, d = g[0, 0], g[0, 1], g[1, 0], g[1, 1]
        rdet = 1.0 / (a * d - b * c)
        out = np.empty_like(g)
        out[0, 0], out[0, 1] = d * rdet, -b * rdet
        out[1, 0], out[1, 1] = -c * rdet, a * rdet
        return out
    return np.moveaxis(np.linalg.inv(np.moveaxis(g, -1, 0)), 0, -1)


def _forward_waves(sc: ScaledABCD, r1: np.ndarray, r2: np.ndarray) -> tuple:
    """Input reflection block and scaled transmission block of the forward chain,
    frequency-last (n, n, N); ``r1``, ``r2`` are sqrt(z_ref) of the near/far ports (n, N).

    With the far end terminated in its references and the near end driven, the chain
    relations give a2 = 0, b2 = (2 G^-1) a1 exp(-log_scale) and b1 = (2 R1^-1 P G^-1 - I) a1,
    where P = A R2 + B R2^-1, Q = C R2 + D R2^-1, G = R1^-1 P + R1 Q and R = diag(sqrt z)
    (only the n x n matrix G is inverted). Returns (S11, S21 / exp(-log_scale)).
    """
    n = sc.n
    m = sc.stack
    a, b, c, d = m[:n, :n], m[:n, n:], m[n:, :n], m[n:, n:]
    p = (a * r2[None] + b / r2[None]) / r1[:, None]
    q = (c * r2[None] + d / r2[None]) * r1[:, None]
    ginv = _inv_fl(p + q)
    x21 = 2.0 * ginv
    x11 = 2.0 * (p * ginv if n == 1 else stack_matmul(p, ginv))
    idx = np.arange(n)
    x11[idx, idx] -= 1.0
    return x11, x21


def _to_frequency_first(x: np.ndarray) -> np.ndarray:
    return np.moveaxis(x, -1, 0)


def abcd_to_s(abcd: np.ndarray | ScaledABCD, z_ref) -> np.ndarray:
    """Scattering matrix (N, 2n, 2n) of a chain matrix, ports in the internal order
    (near ends of conductors 1..n, then far ends), power waves on real references.

    ``abcd`` is a plain (N, 2n, 2n) ABCD stack or a :class:`ScaledABCD` (what the
    cascade returns); ``z_ref`` a real scalar, one value per port (2n,) or (N, 2n).
    With a ScaledABCD carrying its reverse, every entry is computed without cancellation
    (see the module docstring); the result is finite for any finite or infinite scale.
    """
    sc = abcd if isinstance(abcd, ScaledABCD) else ScaledABCD.from_abcd(abcd)
    n, npts = sc.n, sc.npoints
    r = np.sqrt(_ref_array(z_ref, npts, 2 * n)).T
    r1, r2 = r[:n], r[n:]
    rev = sc.reverse
    s11, x21 = _forward_waves(sc, r1, r2)
    s22, x12 = _forward_waves(rev, r2, r1)
    out = np.empty((2 * n, 2 * n, npts), dtype=complex)
    out[:n, :n] = s11
    out[n:, n:] = s22
    with np.errstate(over="ignore", under="ignore"):
        out[n:, :n] = np.exp(-sc.log_scale) * x21
        out[:n, n:] = np.exp(-rev.log_scale) * x12
    return np.ascontiguousarray(_to_frequency_first(out))


def forward_transmission(abcd: ScaledABCD, z_ref) -> tuple[np.ndarray, np.ndarray]:
    """The S21 block (far ends <- near ends) as (x21 (N, n, n), log_scale (N,)), with
    S21 = exp(-log_scale) x21: only the forward waves are solved, and the scale is kept
    apart so that a channel whose S21 underflows still has its dB."""
    n, npts = abcd.n, abcd.npoints
    r = np.sqrt(_ref_array(z_ref, npts, 2 * n)).T
    _, x21 = _forward_waves(abcd, r[:n], r[n:])
    return _to_frequency_first(x21), abcd.log_scale


def scaled_db(x: np.ndarray, log_scale: np.ndarray) -> np.ndarray:
    """20 log10 |exp(-log_scale) x| in the log domain (-inf only where x is exactly 0)."""
    ls = log_scale.reshape(log_scale.shape + (1,) * (np.ndim(x) - 1))
    with np.errstate(divide="ignore"):
        return 20.0 * (np.log10(np.abs(x)) - ls / np.log(10.0))


def transmission_db(abcd: ScaledABCD, z_ref) -> np.ndarray:
    """20 log10 |S21 block| (N, n, n) computed in the log domain, so that a channel whose
    S21 underflows (alpha l > ~700 Np) still reports its loss in dB (-inf only where the
    transmission is exactly zero, e.g. through a series capacitor at f = 0)."""
    return scaled_db(*forward_transmission(abcd, z_ref))


def _adjugate(m: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(adj(m), det(m)) of an (N, n, n) stack, n <= 2 (files are 2- or 4-ports)."""
    n = m.shape[-1]
    if n == 1:
        return np.ones_like(m), m[:, 0, 0]
    if n == 2:
        a, b, c, d = m[:, 0, 0], m[:, 0, 1], m[:, 1, 0], m[:, 1, 1]
        adj = np.empty_like(m)
        adj[:, 0, 0], adj[:, 0, 1], adj[:, 1, 0], adj[:, 1, 1] = d, -b, -c, a
        return adj, a * d - b * c
    raise ValueError("S -> ABCD is implemented for 2- and 4-port data")


SINGULAR_NUDGE = 1e-100


def _s_to_chain(s: np.ndarray, r1: np.ndarray, r2: np.ndarray) -> ScaledABCD:
    """Forward chain matrix of S (internal port order) as numerator / det(S21).

    From b = S a at both ends and V = R(a + b), I_in = R^-1 (a - b):
    det(S21) T = K [[-adj(S21) S22, adj(S21)], [det(S21) I, 0]] W, with
    K = [[R1 (I + S11), R1 S12], [R1^-1 (I - S11), -R1^-1 S12]] and
    W = 1/2 [[R2^-1, -R2], [R2^-1, R2]].
    """
    n = s.shape[-1] // 2
    s11, s12, s21, s22 = s[:, :n, :n], s[:, :n, n:], s[:, n:, :n], s[:, n:, n:]
    adj, det = _adjugate(s21)
    if n > 1:
        # A singular transmission block (both legs DC-blocked at f = 0) leaves adj(S21)
        # without the limit direction of T; adding SINGULAR_NUDGE * I to S21 there
        # restores it and changes the cascaded S by ~1e-100, far below any resolution.
        sing = np.abs(det) < SINGULAR_NUDGE**n
        if np.any(sing):
            s21 = np.where(sing[:, None, None], s21 + SINGULAR_NUDGE * np.eye(n), s21)
            adj, det = _adjugate(s21)
    eye = np.eye(n)
    k = np.concatenate(
        [
            np.concatenate([r1[:, :, None] * (eye + s11), r1[:, :, None] * s12], axis=2),
            np.concatenate([(eye - s11) / r1[:, :, None], -s12 / r1[:, :, None]], axis=2),
        ],
        axis=1,
    )
    mid = np.concatenate(
        [
            np.concatenate([-np.matmul(adj, s22), adj], axis=2),
            np.concatenate([det[:, None, None] * eye, np.zeros_like(adj)], axis=2),
        ],
        axis=1,
    )
    w = np.zeros((s.shape[0], 2 * n, 2 * n))
    idx = np.arange(n)
    w[:, idx, idx] = 0.5 / r2
    w[:, idx, n + idx] = -0.5 * r2
    w[:, n + idx, idx] = 0.5 / r2
    w[:, n + idx, n + idx] = 0.5 * r2
    num = np.matmul(np.matmul(k, mid), w)
    mag = np.abs(det)
    phase = np.where(mag > 0, np.conj(det) / np.where(mag > 0, mag, 1.0), 1.0)
    with np.errstate(divide="ignore"):
        m, ls = normalise(_open_limit(num, mag == 0) * phase[:, None, None], -np.log(mag))
    return ScaledABCD(m, ls)


def s_to_scaled_abcd(s: np.ndarray, z_ref) -> ScaledABCD:
    """Chain matrix (with its reverse) of a scattering matrix in the internal port order
    (near ends, then far ends) on real references ``z_ref``. Exact for any network,
    reciprocal or not; finite where S21 is singular (e.g. a DC block at f = 0)."""
    s = np.asarray(s, complex)
    n = s.shape[-1] // 2
    r = np.sqrt(_ref_array(z_ref, s.shape[0], 2 * n))
    fwd = _s_to_chain(s, r[:, :n], r[:, n:])
    perm = np.r_[np.arange(n, 2 * n), np.arange(n)]
    rev = _s_to_chain(s[:, perm][:, :, perm], r[:, n:], r[:, :n])
    return ScaledABCD(fwd.stack, fwd.log_scale, rev, frequency_last=True)

"""Cascading in scattering parameters: the Redheffer star product, and renormalising S to
other real reference impedances.

Why the cascade of a channel is formed in S and not by multiplying chain matrices: the
chain matrix of a lossy multiconductor network carries each mode with its own growth
exp(alpha_m l). When a block mixes the modes (an imported 4-port, an asymmetric line) the
product holds the least lossy mode only in components exp(-(alpha_max - alpha_min) l)
below the largest ones, which rounding destroys long before anything overflows; the S
computed from such a product can be non-passive or NaN. Every S entry of a passive block
is at most 1, and the star product of passive blocks inverts only I - A22 B11, whose
eigenvalues stay away from 0 for any lossy junction: the cascade is accurate whatever the
loss (R. Redheffer, "On a certain linear fractional transformation", J. Math. Phys. 39,
1960; the standard connection of scattering matrices, e.g. D. M. Pozar, *Microwave
Engineering*). A transmission below 1e-300 underflows to 0: losses beyond 6000 dB are
reported as 6000 dB.

Matrices are (N, 2n, 2n) in the internal port order (near ends 0..n-1, far ends
n..2n-1), every port referred to the same real impedance in a cascade.
"""

from __future__ import annotations

import numpy as np

from losslane.network.scaled import stack_matmul

#: the smallest |S21| kept: 6000 dB, the floor of every reported loss
TRANSMISSION_FLOOR = 1e-300
#: that floor in dB: a loss this large is unbounded (behind a DC block at 0 Hz, ...)
LOSS_FLOOR_DB = 6000.0

__all__ = [
    "LOSS_FLOOR_DB",
    "TRANSMISSION_FLOOR",
    "loss_db",
    "main_transmission",
    "renormalize",
    "star",
]


def _inverse_stack(m: np.ndarray) -> np.ndarray:
    """Inverse of a frequency-last (n, n, N) stack; written out for n <= 2. A point whose
    matrix is exactly singular (two ideal opens facing each other at f = 0, where the terms
    it multiplies are exactly 0) gets a regularised inverse."""
    n = m.shape[0]
    if n == 1:
        d = m[0, 0]
        return (1.0 / np.where(d == 0, 1e-300, d))[None, None]
    if n == 2:
        a, b, c, d = m[0, 0], m[0, 1], m[1, 0], m[1, 1]
        det = a * d - b * c
        r = 1.0 / np.where(det == 0, 1e-300, det)
        return np.array([[d * r, -b * r], [-c * r, a * r]])
    mf = np.moveaxis(m, -1, 0)
    det = np.linalg.det(mf)
    mf = mf + np.where(det == 0, 1e-300, 0.0)[:, None, None] * np.eye(n)
    return np.ascontiguousarray(np.moveaxis(np.linalg.inv(mf), 0, -1))


def star(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """The cascade of ``a`` then ``b`` (a's far end joined to b's near end), (N, 2n, 2n):

    K = (I - A22 B11)^-1, S11 = A11 + A12 B11 K A21, S21 = B21 K A21,
    S12 = A12 (I + B11 K A22) B12, S22 = B22 + B21 K A22 B12.

    Formed on frequency-last stacks with the products written out (the cascade's own
    small-matrix product), several times faster than np.matmul on (N, 2, 2) stacks.
    """
    n = a.shape[-1] // 2
    fa = np.ascontiguousarray(np.moveaxis(a, 0, -1))
    fb = np.ascontiguousarray(np.moveaxis(b, 0, -1))
    a11, a12, a21, a22 = fa[:n, :n], fa[:n, n:], fa[n:, :n], fa[n:, n:]
    b11, b12, b21, b22 = fb[:n, :n], fb[:n, n:], fb[n:, :n], fb[n:, n:]
    eye = np.eye(n)[:, :, None]
    mm = stack_matmul
    k = _inverse_stack(eye - mm(a22, b11))
    ka21 = mm(k, a21)
    ka22 = mm(k, a22)
    out = np.empty((2 * n, 2 * n, a.shape[0]), dtype=complex)
    out[:n, :n] = a11 + mm(a12, mm(b11, ka21))
    out[n:, :n] = mm(b21, ka21)
    out[:n, n:] = mm(a12, mm(eye + mm(b11, ka22), b12))
    out[n:, n:] = b22 + mm(b21, mm(ka22, b12))
    return np.moveaxis(out, -1, 0)


def renormalize(s: np.ndarray, z_from: np.ndarray, z_to: float | np.ndarray) -> np.ndarray:
    """S (N, P, P) referred to real impedances ``z_from`` ((N, P) or (P,)) as referred to
    ``z_to`` (power waves). With k = sqrt(z_from/z_to), p = (k + 1/k)/2, q = (k - 1/k)/2 per
    port, a' = p a + q b and b' = q a + p b, so S' = (Q + P S)(P + Q S)^-1; |q/p| < 1 keeps
    the inverse well conditioned for any passive S. Equal references return S unchanged."""
    s = np.asarray(s, complex)
    zf = np.broadcast_to(np.asarray(z_from, float), s.shape[:2])
    zt = np.broadcast_to(np.asarray(z_to, float), s.shape[:2])
    if np.array_equal(zf, zt):
        return s
    k = np.sqrt(zf / zt)
    p = 0.5 * (k + 1.0 / k)
    q = 0.5 * (k - 1.0 / k)
    num = q[:, :, None] * np.eye(s.shape[1]) + p[:, :, None] * s
    den = p[:, :, None] * np.eye(s.shape[1]) + q[:, :, None] * s
    # S' = num den^-1, i.e. solve S'^T from den^T S'^T = num^T
    return np.swapaxes(np.linalg.solve(np.swapaxes(den, 1, 2), np.swapaxes(num, 1, 2)), 1, 2)


def main_transmission(s: np.ndarray) -> np.ndarray:
    """The main mode's forward transmission (N,): S21 of a single line, the differential
    Sdd21 = (S31 - S32 - S41 + S42) / 2 of a pair (Bockelman-Eisenstadt)."""
    n = s.shape[-1] // 2
    x21 = s[:, n:, :n]
    if n == 1:
        return x21[:, 0, 0]
    return 0.5 * (x21[:, 0, 0] - x21[:, 0, 1] - x21[:, 1, 0] + x21[:, 1, 1])


def loss_db(s: np.ndarray) -> np.ndarray:
    """Insertion loss (positive dB) of the main mode, at most 6000 dB (the floor)."""
    return -20.0 * np.log10(np.maximum(np.abs(main_transmission(s)), TRANSMISSION_FLOOR))

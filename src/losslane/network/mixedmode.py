"""Mixed-mode (differential / common) S-parameters of channels with coupled pairs.

With the single-ended ports in the internal order (1..n the near ends of conductors
1..n, n+1..2n their far ends), the mixed-mode matrix is M S M^T, where each pair of
conductors (p, q) contributes the rows

    d = (port p - port q) / sqrt 2     at the near end and at the far end,
    c = (port p + port q) / sqrt 2     likewise,

and a conductor in no pair keeps its single-ended ports (D. E. Bockelman and
W. R. Eisenstadt, "Combined differential and common-mode scattering parameters", IEEE
Trans. MTT 43(7), 1995). The mode ports are ordered: differential near ends (one per
pair), differential far ends, common near ends, common far ends, then the single-ended
near and far ends. For one pair (a 4-port) that is

    M = (1/sqrt 2) [[1, -1, 0,  0],    differential, near end (d1)
                    [0,  0, 1, -1],    differential, far end  (d2)
                    [1,  1, 0,  0],    common, near end       (c1)
                    [0,  0, 1,  1]]    common, far end        (c2)

When every single-ended port has the same real reference Z_ref, the differential ports
are referred to 2 Z_ref and the common ports to Z_ref / 2 exactly, so no renormalisation
is needed.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError
from losslane.network.ports import DEFAULT_ORDER, from_order

#: the conductor pairs of a differential (4-port) channel
ONE_PAIR = ((0, 1),)


def mode_transform(n: int, pairs: Sequence[tuple[int, int]] = ONE_PAIR) -> np.ndarray:
    """M (2n, 2n) mapping internal single-ended ports to mode ports (see the module
    docstring for the order); orthonormal."""
    used = [c for p in pairs for c in p]
    if len(set(used)) != len(used) or any(not 0 <= c < n for c in used):
        raise LossLaneError(f"mixed mode: pairs {list(pairs)} do not partition {n} conductors")
    k = len(pairs)
    singles = [c for c in range(n) if c not in used]
    m = np.zeros((2 * n, 2 * n))
    r = 1.0 / np.sqrt(2.0)
    for i, (p, q) in enumerate(pairs):
        for end in (0, 1):  # near, far
            m[end * k + i, end * n + p] = r
            m[end * k + i, end * n + q] = -r
            m[2 * k + end * k + i, end * n + p] = r
            m[2 * k + end * k + i, end * n + q] = r
    for j, c in enumerate(singles):
        for end in (0, 1):
            m[4 * k + end * len(singles) + j, end * n + c] = 1.0
    return m


@dataclass(frozen=True)
class MixedMode:
    """Mixed-mode S of a channel with ``pairs`` (k of them): ``matrix`` (N, 2n, 2n) over
    the mode ports, and its blocks, each (N, 2k, 2k) indexed [out, in] over (near ends,
    far ends): ``dd`` differential-to-differential, ``cc`` common-to-common, ``cd``
    differential to common (Scd: common response to a differential stimulus), ``dc`` the
    reverse. For one pair, dd[:, 1, 0] is Sdd21."""

    matrix: np.ndarray
    pairs: tuple[tuple[int, int], ...]
    z_diff: float
    z_common: float

    @property
    def _k(self) -> int:
        return 2 * len(self.pairs)

    @property
    def dd(self) -> np.ndarray:
        k = self._k
        return self.matrix[:, :k, :k]

    @property
    def dc(self) -> np.ndarray:
        k = self._k
        return self.matrix[:, :k, k : 2 * k]

    @property
    def cd(self) -> np.ndarray:
        k = self._k
        return self.matrix[:, k : 2 * k, :k]

    @property
    def cc(self) -> np.ndarray:
        k = self._k
        return self.matrix[:, k : 2 * k, k : 2 * k]


def mixed_mode_internal(
    s: np.ndarray, z_ref: float = 50.0, pairs: Sequence[tuple[int, int]] = ONE_PAIR
) -> MixedMode:
    """Mixed-mode S of an (N, 2n, 2n) matrix in the internal port order."""
    s = np.asarray(s, complex)
    if s.ndim != 3 or s.shape[1] != s.shape[2] or s.shape[1] % 2:
        raise LossLaneError(f"mixed-mode conversion needs a 2n-port, got shape {s.shape}")
    m = mode_transform(s.shape[1] // 2, pairs)
    return MixedMode(m @ s @ m.T, tuple(tuple(p) for p in pairs), 2.0 * z_ref, z_ref / 2.0)


def mixed_mode(s: np.ndarray, z_ref: float = 50.0, order: str = DEFAULT_ORDER) -> MixedMode:
    """Mixed-mode S of a 4-port whose single-ended ports are numbered in ``order``."""
    s = np.asarray(s, complex)
    if s.ndim != 3 or s.shape[1:] != (4, 4):
        raise LossLaneError(f"mixed-mode conversion needs a 4-port, got shape {s.shape}")
    return mixed_mode_internal(from_order(s, 2, order), z_ref)

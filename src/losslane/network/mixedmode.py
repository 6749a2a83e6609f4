"""Mixed-mode (differential / common) S-parameters of a 4-port pair channel.

With the single-ended ports in the internal order (1, 2 = near ends of legs p and n;
3, 4 = far ends), the mixed-mode matrix is M S M^T with

    M = (1/sqrt 2) [[1, -1, 0,  0],    differential, near end (d1)
                    [0,  0, 1, -1],    differential, far end  (d2)
                    [1,  1, 0,  0],    common, near end       (c1)
                    [0,  0, 1,  1]]    common, far end        (c2)

(D. E. Bockelman and W. R. Eisenstadt, "Combined differential and common-mode
scattering parameters", IEEE Trans. MTT 43(7), 1995). When every single-ended port has
the same real reference Z_ref, the differential ports are referred to 2 Z_ref and the
common ports to Z_ref / 2 exactly, so no renormalisation is needed.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError
from losslane.network.ports import from_order

_M = np.array([[1, -1, 0, 0], [0, 0, 1, -1], [1, 1, 0, 0], [0, 0, 1, 1]], float) / np.sqrt(2)


@dataclass(frozen=True)
class MixedMode:
    """Mixed-mode blocks, each (N, 2, 2) indexed [out, in] over (near, far) ends:
    ``dd`` differential-to-differential, ``cc`` common-to-common, ``cd`` differential
    to common (Scd: common response to a differential stimulus), ``dc`` the reverse."""

    dd: np.ndarray
    dc: np.ndarray
    cd: np.ndarray
    cc: np.ndarray
    z_diff: float
    z_common: float


def mixed_mode(s: np.ndarray, z_ref: float = 50.0, order: str = "in-in-out-out") -> MixedMode:
    """Mixed-mode S of a 4-port whose single-ended ports are numbered in ``order``."""
    s = np.asarray(s, complex)
    if s.ndim != 3 or s.shape[1:] != (4, 4):
        raise LossLaneError(f"mixed-mode conversion needs a 4-port, got shape {s.shape}")
    si = from_order(s, 2, order)
    mm = _M @ si @ _M.T
    return MixedMode(
        mm[:, :2, :2], mm[:, :2, 2:], mm[:, 2:, :2], mm[:, 2:, 2:], 2.0 * z_ref, z_ref / 2.0
    )

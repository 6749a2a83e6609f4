"""Some conductors of a 2n-port: the ports of chosen conductors, and the network they form
with every other port terminated in its reference impedance.

Ports are in the internal order (near ends 0..n-1, far ends n..2n-1). Picking rows and
columns of S is exact for the sub-network whose other ports end in their (matched)
references: a_k = 0 there, so the remaining waves obey the picked sub-matrix.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from losslane.errors import LossLaneError

__all__ = ["conductor_ports", "sub_network"]


def conductor_ports(n: int, conductors: Sequence[int]) -> np.ndarray:
    """Internal port indices of ``conductors`` of an n-conductor network: their near ends,
    then their far ends (the internal order of the sub-network)."""
    c = np.asarray(conductors, dtype=int)
    if c.size == 0 or np.any(c < 0) or np.any(c >= n) or np.unique(c).size != c.size:
        raise LossLaneError(f"conductors {list(conductors)} are not distinct conductors of {n}")
    return np.concatenate([c, c + n])


def sub_network(s: np.ndarray, conductors: Sequence[int]) -> np.ndarray:
    """S (N, 2m, 2m) of ``conductors`` (m of them) of the (N, 2n, 2n) ``s``, every other
    port terminated in its reference, internal order."""
    n = s.shape[-1] // 2
    p = conductor_ports(n, conductors)
    return s[:, p][:, :, p]

"""Port numbering of n-conductor networks.

Internally every scattering and chain matrix uses the *in-in-out-out* order: ports
1..n are the near (transmitter) ends of conductors 1..n, ports n+1..2n their far ends.
A single-ended 2-port is therefore port 1 = in, port 2 = out in both orders.

Two orders are accepted for 4-port (n = 2) input and output, the ``[ports] order`` key
of a scenario:

* ``"in-in-out-out"``: ports 1, 2 = near ends of lines 1, 2; ports 3, 4 = far ends
  (so line 1 runs 1 -> 3, line 2 runs 2 -> 4);
* ``"in-out-in-out"``: line 1 runs 1 -> 2, line 2 runs 3 -> 4.
"""

from __future__ import annotations

import numpy as np

from losslane.errors import LossLaneError

ORDERS = ("in-in-out-out", "in-out-in-out")
DEFAULT_ORDER = "in-in-out-out"


def check_order(order: str, key: str = "order") -> str:
    if order not in ORDERS:
        raise LossLaneError(
            f"{key} = {order!r} is not a port order; valid orders are "
            + " and ".join(repr(o) for o in ORDERS)
        )
    return order


def port_permutation(n: int, order: str) -> np.ndarray:
    """Indices ``p`` such that ``s_out = s_internal[:, p][:, :, p]`` puts the internal
    (in-in-out-out) ports into ``order``; ``p[k]`` is the internal index of output port k.

    The in-out-in-out permutation interleaves near and far ends (0, n, 1, n+1, ...).
    """
    check_order(order)
    if order == "in-in-out-out" or n == 1:
        return np.arange(2 * n)
    return np.ravel(np.column_stack([np.arange(n), np.arange(n, 2 * n)]))


def to_order(s: np.ndarray, n: int, order: str) -> np.ndarray:
    """Internal-order (N, 2n, 2n) matrix -> the same matrix with ports in ``order``."""
    p = port_permutation(n, order)
    return s[:, p][:, :, p]


def from_order(s: np.ndarray, n: int, order: str) -> np.ndarray:
    """Matrix with ports in ``order`` -> internal (in-in-out-out) order."""
    inv = np.argsort(port_permutation(n, order))
    return s[:, inv][:, :, inv]


def port_names(n: int, order: str = DEFAULT_ORDER) -> list[str]:
    """Short names of the ports in ``order`` ("in", "out" for a 2-port; "in1".. else)."""
    if n == 1:
        return ["in", "out"]
    internal = [f"in{k + 1}" for k in range(n)] + [f"out{k + 1}" for k in range(n)]
    return [internal[i] for i in port_permutation(n, order)]


def describe_ports(nports: int, order: str = DEFAULT_ORDER) -> str:
    """One line stating the port numbering, for file headers."""
    if nports % 2:
        return f"{nports} ports"
    n = nports // 2
    if n == 1:
        return "port 1 = near end (in), port 2 = far end (out)"
    p = port_permutation(n, order)
    parts = []
    for k in range(n):
        near = int(np.flatnonzero(p == k)[0]) + 1
        far = int(np.flatnonzero(p == n + k)[0]) + 1
        parts.append(f"line {k + 1}: port {near} (in) -> port {far} (out)")
    return f"order {order}; " + ", ".join(parts)

"""The vectorized cascade of blocks, and the conversion of its result to S-parameters and
``skrf.Network`` objects.

Usage (what ``losslane build`` does)::

    f = np.linspace(0, 40e9, 4001)                 # Hz, f = 0 allowed
    blocks = [LineSegment(host, 0.03, "host"), Via(1.4e-3, 0.25e-3, 45, core), ...]
    chain = cascade(blocks, f)                     # ScaledABCD, with its reverse
    s = abcd_to_s(chain, 50.0)                     # (N, 2n, 2n), internal port order
    ntwk = build_network(blocks, f, 50.0, "lane", order="in-in-out-out")

``cascade`` multiplies the blocks' scaled chain matrices (see
:mod:`losslane.network.scaled`) as whole (N, 2n, 2n) stacks -- one vectorized product per
block and direction, no loop over frequency -- and adds their log scales. Products are
renormalised by exact powers of two every few blocks, so any number of blocks, of any
loss, stays finite. A cascade of reciprocal blocks (every built-in block) needs only the
forward product; with a measured file the reverse product is formed as well. Port
numbering of the results: internally in-in-out-out (ports 1..n
near ends, n+1..2n far ends); :func:`build_network` reorders to the requested order (see
:mod:`losslane.network.ports`).
"""

from __future__ import annotations

from collections.abc import Iterator, Sequence
from typing import TYPE_CHECKING, Protocol

import numpy as np

from losslane.errors import LossLaneError
from losslane.network.ports import DEFAULT_ORDER, port_names, port_permutation, to_order
from losslane.network.scaled import ScaledABCD, abcd_to_s, cascade_items, transmission_db
from losslane.network.scatter import renormalize, star

if TYPE_CHECKING:
    import skrf

__all__ = [
    "abcd_to_s",
    "block_network",
    "build_network",
    "cascade",
    "cascade_scaled",
    "cascade_steps",
    "check_sweep",
    "to_network",
    "transmission_db",
]


class BlockLike(Protocol):
    name: str
    kind: str
    n: int
    length: float

    def scaled_abcd(self, f: np.ndarray) -> ScaledABCD: ...

    def s(self, f: np.ndarray, z_ref: float = 50.0) -> np.ndarray: ...


def check_sweep(f, key: str = "sweep") -> np.ndarray:
    """The frequency array as (N,) float: finite, >= 0 Hz, at least one point."""
    arr = np.atleast_1d(np.asarray(f, dtype=float))
    if arr.ndim != 1 or arr.size == 0:
        raise LossLaneError(f"{key}: frequencies must be a non-empty 1-D list (Hz)")
    if not np.all(np.isfinite(arr)) or np.any(arr < 0):
        bad = arr[~np.isfinite(arr) | (arr < 0)][0]
        raise LossLaneError(f"{key}: frequency {bad!r} Hz is not valid; frequencies are >= 0 Hz")
    return arr


def cascade_scaled(items: Sequence[ScaledABCD]) -> ScaledABCD:
    """Cascade already-evaluated scaled chain matrices, first item at the near end."""
    if not items:
        raise LossLaneError("channel: there are no segments to cascade")
    n = items[0].n
    for k, it in enumerate(items):
        if it.n != n or it.npoints != items[0].npoints:
            raise LossLaneError(
                f"channel: item {k + 1} has {it.n} conductor(s) on {it.npoints} points, the "
                f"first has {n} on {items[0].npoints}; all must agree"
            )
    return cascade_items(list(items))


def cascade(blocks: Sequence[BlockLike | ScaledABCD], f) -> ScaledABCD:
    """The chain matrix (scaled, with its reverse) of ``blocks`` in order from the near end.

    Each block's ``scaled_abcd(f)`` is evaluated once on the sweep ``f`` (Hz, (N,));
    already-evaluated :class:`ScaledABCD` items are used as they are. All blocks must have
    the same number of conductors: a mix is a LossLaneError naming the odd one out.
    """
    f = check_sweep(f)
    if not blocks:
        raise LossLaneError("channel: there are no segments to cascade")
    first = blocks[0]
    n0 = first.n
    for k, b in enumerate(blocks):
        if b.n != n0:
            label = getattr(b, "name", "") or f"segment {k + 1}"
            raise LossLaneError(
                f"channel: segment {k + 1} ({label!r}) has {b.n} signal conductor(s) but "
                f"the first segment has {n0}; a channel is all single-ended (2-port) or "
                "all differential pairs (4-port)"
            )
    items = [b if isinstance(b, ScaledABCD) else b.scaled_abcd(f) for b in blocks]
    for k, it in enumerate(items):
        if it.npoints != f.size:
            raise LossLaneError(
                f"channel: segment {k + 1} gives {it.npoints} points, the sweep has {f.size}"
            )
    return cascade_scaled(items)


def to_network(
    s: np.ndarray,
    f,
    z_ref=50.0,
    name: str = "channel",
    port_names: Sequence[str] | None = None,
) -> skrf.Network:
    """Wrap an (N, P, P) scattering matrix on the sweep ``f`` (Hz) in a ``skrf.Network``.

    ``z_ref`` is a real scalar, one value per port (P,) or (N, P), in the port order of
    ``s``. Frequencies are kept in Hz exactly.
    """
    import skrf

    f = check_sweep(f)
    s = np.asarray(s, complex)
    if s.ndim != 3 or s.shape[0] != f.size or s.shape[1] != s.shape[2]:
        raise ValueError(f"s of shape {s.shape} does not fit {f.size} frequency points")
    z0 = np.broadcast_to(np.asarray(z_ref, float), (f.size, s.shape[1])).copy()
    freq = skrf.Frequency.from_f(f, unit="Hz")
    net = skrf.Network(frequency=freq, s=s, z0=z0, name=name)
    if port_names is not None:
        net.port_names = list(port_names)
    return net


def _port_refs(z_ref, n: int, order: str) -> np.ndarray:
    """Reference impedances given in the output ``order`` -> internal order."""
    z = np.asarray(z_ref, float)
    if z.ndim == 0:
        return z
    inv = np.argsort(port_permutation(n, order))
    return z[..., inv]


def cascade_steps(
    blocks: Sequence[BlockLike | ScaledABCD], f, z_ref: float = 50.0
) -> Iterator[tuple[np.ndarray, np.ndarray]]:
    """For each block in order from the near end: (its own S, the S of the cascade
    through it), (N, 2n, 2n) each in the internal port order, every port referred to the
    real ``z_ref``. The cascade is the star product of the blocks' S (see
    :mod:`losslane.network.scatter` for why), each block's S from its own ``s(f, z_ref)``
    (a line splits itself into pieces of bounded loss; an imported file renormalises its
    own S), so any loss stays passive and reciprocal to rounding.
    """
    f = check_sweep(f)
    if not blocks:
        raise LossLaneError("channel: there are no segments to cascade")
    n0 = blocks[0].n
    total = None
    for k, b in enumerate(blocks):
        if b.n != n0:
            label = getattr(b, "name", "") or f"segment {k + 1}"
            raise LossLaneError(
                f"channel: segment {k + 1} ({label!r}) has {b.n} signal conductor(s) but "
                f"the first segment has {n0}; a channel is all single-ended (2-port) or "
                "all differential pairs (4-port)"
            )
        sb = abcd_to_s(b, z_ref) if isinstance(b, ScaledABCD) else b.s(f, z_ref)
        if sb.shape[0] != f.size:
            raise LossLaneError(
                f"channel: segment {k + 1} gives {sb.shape[0]} points, the sweep has {f.size}"
            )
        total = sb if total is None else star(total, sb)
        yield sb, total


def build_network(
    blocks: Sequence[BlockLike | ScaledABCD],
    f,
    z_ref=50.0,
    name: str = "channel",
    order: str = DEFAULT_ORDER,
) -> skrf.Network:
    """Cascade ``blocks`` on ``f`` and return the channel as a ``skrf.Network``.

    ``z_ref``: the reference impedance of every single-ended port (real; a scalar, or
    per port in ``order``). Ports: for n = 1, 1 = near end, 2 = far end; for n = 2 as
    ``order`` says ("in-in-out-out" or "in-out-in-out"). The network's ``port_names``
    are "in"/"out" or "in1", "in2", "out1", "out2" in that order. The cascade is formed
    at one reference (the first port's) and the result renormalised to ``z_ref``.
    """
    z = np.asarray(z_ref, float)
    z_common = float(z.flat[0])
    for step in cascade_steps(blocks, f, z_common):
        s = step[1]
    n = s.shape[-1] // 2
    if z.ndim:
        s = renormalize(s, z_common, _port_refs(z, n, order))
    return to_network(to_order(s, n, order), f, z, name, port_names(n, order))


def block_network(
    block: BlockLike, f, z_ref=50.0, order: str = DEFAULT_ORDER, name: str | None = None
) -> skrf.Network:
    """One block alone as a ``skrf.Network`` (per-segment plots, comparisons)."""
    return build_network([block], f, z_ref, name or block.name, order)

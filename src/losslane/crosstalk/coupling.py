"""NEXT and FEXT transfer functions of a channel on group lines, from its 2n-port S.

Each trace of the group is one mode port at each end: a pair its differential port
(d = (P - N) / sqrt 2), a single-ended trace its own port; the mixed-mode matrix
M S M^T of ``network.mixedmode`` (D. E. Bockelman, W. R. Eisenstadt, IEEE Trans. MTT
43(7), 1995) holds every coupling between them. The channel runs from the victim's
transmitter (near ends, ports 1..n) to its receiver (far ends, ports n+1..2n); both
couplings are taken where they hurt, at the victim's receiver:

* NEXT = b(victim, far end) / a(aggressor, far end): an aggressor transmitting from the
  victim's receiving end (the near end seen from that aggressor);
* FEXT = b(victim, far end) / a(aggressor, near end): an aggressor transmitting from the
  victim's transmitting end, its coupling carried along the whole channel;

differential to differential for a pair into a pair, single-ended to differential for a
single trace into a pair (and the reverse, or single-ended to single-ended, for a single
victim). ``next_tx`` is the NEXT at the other end, b(victim, near end) / a(aggressor,
near end); a channel that is the same seen from both ends has next_tx = NEXT.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from losslane.network.mixedmode import mixed_mode_internal
from losslane.xsection.group import Member, member, pairs_of

__all__ = ["Coupling", "couplings", "mode_ports", "victim_through"]


def mode_ports(members: Sequence[Member]) -> dict[str, tuple[int, int]]:
    """Each trace's (near, far) port in the mixed-mode matrix of
    ``mixed_mode_internal(s, z, pairs_of(members))``: a pair's differential ports, a single
    trace's single-ended ports (``network.mixedmode`` orders the mode ports)."""
    k = sum(1 for m in members if m.pair)
    n_single = sum(1 for m in members if not m.pair)
    out: dict[str, tuple[int, int]] = {}
    i = j = 0
    for m in members:
        if m.pair:
            out[m.name] = (i, k + i)
            i += 1
        else:
            out[m.name] = (4 * k + j, 4 * k + n_single + j)
            j += 1
    return out


def mode_name(victim: Member, aggressor: Member) -> str:
    """'differential to differential', 'single-ended to differential', ..."""

    def kind(m: Member) -> str:
        return "differential" if m.pair else "single-ended"

    return f"{kind(aggressor)} to {kind(victim)}"


@dataclass(frozen=True)
class Coupling:
    """One aggressor's coupling into the victim over frequency, (N,) complex each."""

    aggressor: str
    mode: str
    next: np.ndarray
    fext: np.ndarray
    next_tx: np.ndarray


def _modal(s: np.ndarray, z_ref: float, members: Sequence[Member]) -> np.ndarray:
    pairs = pairs_of(tuple(members))
    return mixed_mode_internal(s, z_ref, pairs).matrix


def couplings(
    s: np.ndarray,
    z_ref: float,
    members: Sequence[Member],
    victim: str,
    aggressors: Sequence[str],
    modal: np.ndarray | None = None,
) -> list[Coupling]:
    """NEXT, FEXT and next_tx from each of ``aggressors`` into ``victim``, from the
    (N, 2n, 2n) S in the internal port order with every port referred to ``z_ref``
    (``modal``: its mixed-mode matrix if already formed)."""
    mm = _modal(s, z_ref, members) if modal is None else modal
    ports = mode_ports(members)
    v = member(tuple(members), victim)
    vn, vf = ports[victim]
    out = []
    for name in aggressors:
        a = member(tuple(members), name, "aggressor")
        an, af = ports[name]
        out.append(Coupling(name, mode_name(v, a), mm[:, vf, af], mm[:, vf, an], mm[:, vn, an]))
    return out


def victim_through(
    s: np.ndarray,
    z_ref: float,
    members: Sequence[Member],
    victim: str,
    modal: np.ndarray | None = None,
) -> np.ndarray:
    """The victim's own transmission near -> far end (Sdd21 of a pair, S21 of a single
    trace), every other port terminated in ``z_ref``, (N,)."""
    mm = _modal(s, z_ref, members) if modal is None else modal
    vn, vf = mode_ports(members)[victim]
    return mm[:, vf, vn]

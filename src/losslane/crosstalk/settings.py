"""The scenario's ``[crosstalk]`` table, and the trace layout of a channel on group lines.

A channel whose lines are groups of traces (``kind = "stripline-group"`` or
``"microstrip-group"``) is a 2n-port; ``[crosstalk] victim`` names the trace (or pair)
judged, ``aggressors`` (default: every other trace) the ones driven. The integrated
crosstalk noise needs the aggressors' transmitters and the victim's receiver:

* ``near_amplitude`` / ``far_amplitude``: peak amplitude (V) of the aggressors whose
  transmitters sit at the victim's receiving end (they make NEXT) and at its transmitting
  end (FEXT); differential for a pair, single-ended for a single trace;
* ``near_transition`` / ``far_transition``: their 20-80 % transition times;
* ``receiver_bandwidth``: the 3 dB frequency of the receiver's reference filter.

Defaults (IEEE 802.3 Annex 69B, the 10GBASE-KR backplane channel's informative
integrated crosstalk noise -- values recalled from memory, not checked against the
standard): 1200 mV near, 800 mV far, 24 ps both, and a receiver bandwidth of 0.75 x the
baud rate. The data rate (hence the baud rate) comes from ``[budget]``.

Every group line of one channel must have the same traces (names, and pair or single, in
order); plain lines and group lines do not mix.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from losslane.errors import LossLaneError
from losslane.spec import check_keys, quantity
from losslane.xsection.group import Member, is_group, member

#: defaults of the noise parameters (IEEE 802.3 Annex 69B, from memory; see the docstring)
NEAR_AMPLITUDE = 1.2
FAR_AMPLITUDE = 0.8
NEAR_TRANSITION = 24e-12
FAR_TRANSITION = 24e-12
RECEIVER_BANDWIDTH_BAUD = 0.75
KEYS = (
    "victim",
    "aggressors",
    "near_amplitude",
    "far_amplitude",
    "near_transition",
    "far_transition",
    "receiver_bandwidth",
)
WHERE = "[crosstalk]"


@dataclass(frozen=True)
class CrosstalkSettings:
    """The parsed ``[crosstalk]`` table (SI units). ``receiver_bandwidth`` None: 0.75 x the
    baud rate."""

    victim: str
    aggressors: tuple[str, ...]
    near_amplitude: float = NEAR_AMPLITUDE
    far_amplitude: float = FAR_AMPLITUDE
    near_transition: float = NEAR_TRANSITION
    far_transition: float = FAR_TRANSITION
    receiver_bandwidth: float | None = None

    def bandwidth(self, baud: float) -> float:
        """The receiver's reference 3 dB frequency for the baud rate ``baud``."""
        if self.receiver_bandwidth is not None:
            return self.receiver_bandwidth
        return RECEIVER_BANDWIDTH_BAUD * baud


def channel_members(channel: Sequence) -> tuple[Member, ...]:
    """The traces of a channel on group lines (``scenario.Segment`` list), () when its lines
    are plain. Group lines must agree on their traces; plain and group lines do not mix
    (a LossLaneError naming both segments)."""
    first = None
    plain = None
    for seg in channel:
        sec = getattr(seg, "section", None)
        if sec is None:
            continue
        if not is_group(sec):
            plain = plain or seg
            continue
        if first is None:
            first = seg
        elif sec.layout() != first.section.layout():
            raise LossLaneError(
                f"{seg.where}: line {seg.line!r} has the traces {_names(sec)} but "
                f"{first.where} ({first.line!r}) has {_names(first.section)}; every group line "
                "of a channel has the same traces (names, pairs and single traces) in order"
            )
    if first is None:
        return ()
    if plain is not None:
        raise LossLaneError(
            f"{plain.where}: line {plain.line!r} is a single line but {first.where} "
            f"({first.line!r}) is a group of traces; a channel on group lines is on group lines "
            "only (vias, lumped parts and files apply to each conductor)"
        )
    return first.section.members


def _names(section) -> str:
    return "[" + ", ".join(f"{n}{' (pair)' if p else ''}" for n, p in section.layout()) + "]"


def _time(spec: Mapping, key: str, default: float) -> float:
    v = quantity(WHERE, spec, key, "time", default=default)
    if not v > 0:
        raise LossLaneError(f"{WHERE}.{key} = {spec[key]!r}: a transition time is > 0 s")
    return v


def _volts(spec: Mapping, key: str, default: float) -> float:
    v = quantity(WHERE, spec, key, "voltage", default=default)
    if not v > 0:
        raise LossLaneError(f"{WHERE}.{key} = {spec[key]!r}: an amplitude is > 0 V")
    return v


def parse_crosstalk(spec: object, members: tuple[Member, ...]) -> CrosstalkSettings:
    """The ``[crosstalk]`` table of a channel whose traces are ``members``."""
    if not members:
        raise LossLaneError(
            f"{WHERE}: the channel has no group lines; crosstalk needs a channel on lines of "
            'kind "stripline-group" or "microstrip-group" (several traces in one [lines.*])'
        )
    if not isinstance(spec, Mapping):
        raise LossLaneError(f'{WHERE}: expected a table, e.g. victim = "{members[0].name}"')
    check_keys(WHERE, spec, KEYS, required=("victim",))
    names = [m.name for m in members]
    victim = spec["victim"]
    if not isinstance(victim, str):
        raise LossLaneError(f"{WHERE}.victim = {victim!r}: expected a trace name, one of {names}")
    member(members, victim, f"{WHERE}.victim")
    raw = spec.get("aggressors")
    if raw is None:
        aggressors = tuple(n for n in names if n != victim)
    else:
        if not isinstance(raw, list) or not all(isinstance(a, str) for a in raw) or not raw:
            raise LossLaneError(
                f"{WHERE}.aggressors = {raw!r}: expected a list of trace names, e.g. "
                f"{[n for n in names if n != victim][:2]}"
            )
        for a in raw:
            member(members, a, f"{WHERE}.aggressors")
            if a == victim:
                raise LossLaneError(
                    f"{WHERE}.aggressors: {a!r} is the victim; aggressors are the other traces"
                )
        if len(set(raw)) != len(raw):
            raise LossLaneError(f"{WHERE}.aggressors = {raw!r}: a trace is named twice")
        aggressors = tuple(raw)
    if not aggressors:
        raise LossLaneError(
            f"{WHERE}.victim = {victim!r}: the group has no other trace to couple from; "
            "crosstalk needs at least two traces"
        )
    bw = quantity(WHERE, spec, "receiver_bandwidth", "frequency")
    if bw is not None and not bw > 0:
        raise LossLaneError(
            f"{WHERE}.receiver_bandwidth = {spec['receiver_bandwidth']!r}: must be > 0 Hz"
        )
    return CrosstalkSettings(
        victim,
        aggressors,
        _volts(spec, "near_amplitude", NEAR_AMPLITUDE),
        _volts(spec, "far_amplitude", FAR_AMPLITUDE),
        _time(spec, "near_transition", NEAR_TRANSITION),
        _time(spec, "far_transition", FAR_TRANSITION),
        bw,
    )


__all__ = ["CrosstalkSettings", "channel_members", "parse_crosstalk"]

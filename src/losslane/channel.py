"""A scenario's channel: segments -> network blocks -> the cascaded result.

This is the layer between the network blocks and the outputs: it evaluates each
[lines.*] cross-section once on the sweep, turns each scenario segment into its block,
cascades them, and keeps what the outputs and the loss budget need besides the final
S-parameters -- each segment's own insertion loss, the cumulative loss after each
segment, and the mixed-mode view of pairs -- each computed once, when first asked for.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from losslane.errors import LossLaneError
from losslane.network.block import Block
from losslane.network.cascade import cascade_steps, to_network
from losslane.network.conductors import sub_network
from losslane.network.imported import TouchstoneBlock
from losslane.network.line import LineSegment, UniformLine
from losslane.network.lumped import SeriesCapacitor, SeriesRL, ShuntCapacitor
from losslane.network.mixedmode import ONE_PAIR, MixedMode, mixed_mode_internal
from losslane.network.ports import port_names, to_order
from losslane.network.scatter import loss_db
from losslane.network.skew import SkewedPair
from losslane.network.via import DrilledVia, Via
from losslane.scenario import Scenario, Segment
from losslane.xsection.group import member, pairs_of


def make_block(
    seg: Segment,
    n: int,
    default_order: str,
    lines: dict[str, UniformLine] | None = None,
    memo: dict | None = None,
) -> Block:
    """The network block of one scenario segment, for an n-conductor channel; a line
    segment takes its section's constants from ``lines`` (by [lines.*] name) when given;
    ``memo`` (a dict kept for one build) lets identical vias share their field solutions."""
    v = seg.values
    if seg.type == "line":
        line = lines[seg.line] if lines is not None else seg.section
        return LineSegment(line, v["length"], name=seg.name, section=seg.section)
    if seg.type == "via":
        if seg.drill is not None:
            return DrilledVia(seg.drill, n=n, name=seg.name, memo=memo)
        return Via(v["barrel"], v["stub"], v["impedance"], seg.dielectric, n=n, name=seg.name)
    if seg.type == "capacitor":
        return SeriesCapacitor(v["value"], v["esl"], v["esr"], n=n, name=seg.name)
    if seg.type == "series":
        return SeriesRL(v["resistance"], v["inductance"], n=n, name=seg.name)
    if seg.type == "shunt":
        return ShuntCapacitor(v["capacitance"], n=n, name=seg.name)
    if seg.type == "touchstone":
        try:
            return TouchstoneBlock(
                seg.path, name=seg.name, n=n, order=seg.order or default_order, as_is=seg.as_is
            )
        except LossLaneError as exc:
            raise LossLaneError(f"{seg.where}: {exc}") from None
    raise AssertionError(seg.type)


@dataclass
class ChannelResult:
    """The built channel.

    ``s``: the S-parameters (N, 2n, 2n) in the internal port order (near ends first);
    ``network``: the same as a skrf.Network with the ports in the scenario's order;
    ``pairs``: the conductors judged as differential pairs (none for a single-ended
    channel); ``mixed_mode``: their mixed-mode S; ``segment_loss_db``: each segment
    alone between matched references, insertion loss in dB (positive), (K, N);
    ``cumulative_loss_db``: loss from the input through segment k, (K, N);
    ``insertion_loss_db``: the whole channel's, (N,). For a differential channel the
    losses are the differential mode. Losses beyond 6000 dB read 6000 dB (|S21| below
    1e-300). What is derived from ``s`` is computed once, when first asked for.

    A channel on group lines (``members``: its traces) is a 2n-port judged on its
    ``victim`` trace: ``pairs`` are the group's pairs, and the losses, the return loss and
    ``main_s`` / ``main_mixed_mode`` are the victim's own (its 2- or 4-port with every
    other port terminated in the reference); ``differential`` says whether the main mode
    is a pair's differential mode.
    """

    scenario: Scenario
    f: np.ndarray
    blocks: list[Block]
    s: np.ndarray = field(repr=False)
    segment_loss_db: np.ndarray = field(repr=False)
    cumulative_loss_db: np.ndarray = field(repr=False)
    pairs: tuple[tuple[int, int], ...] = ()
    warnings: list[str] = field(default_factory=list)
    members: tuple = ()
    victim: str | None = None
    #: a differential channel's per-segment |Scd21| in dB, (K, N) (None: single-ended)
    segment_conversion_db: np.ndarray | None = field(default=None, repr=False)

    @property
    def conductors(self) -> int:
        return self.s.shape[1] // 2

    @property
    def nports(self) -> int:
        return self.s.shape[1]

    @property
    def victim_conductors(self) -> tuple[int, ...]:
        """The conductors of the main mode: the victim's, or every conductor of a plain
        channel."""
        if self.victim is None:
            return tuple(range(self.conductors))
        return member(self.members, self.victim).conductors

    @property
    def differential(self) -> bool:
        """Whether the main mode is a pair's differential mode."""
        return len(self.victim_conductors) == 2

    @cached_property
    def main_s(self) -> np.ndarray:
        """S of the main mode's conductors (the whole S of a plain channel; the victim's
        2- or 4-port of a group channel), internal port order."""
        if self.victim is None:
            return self.s
        return sub_network(self.s, self.victim_conductors)

    @cached_property
    def main_mixed_mode(self) -> MixedMode | None:
        """Mixed-mode S of the main mode's pair (None when it is single-ended)."""
        if self.victim is None:
            return self.mixed_mode
        if not self.differential:
            return None
        return mixed_mode_internal(self.main_s, self.scenario.ports.reference, ONE_PAIR)

    @cached_property
    def victim_network(self):
        """The victim's own 2- or 4-port as a skrf.Network (in-in-out-out; None for a plain
        channel)."""
        if self.victim is None:
            return None
        sc = self.scenario
        n = len(self.victim_conductors)
        name = f"{sc.name} {self.victim}"
        return to_network(self.main_s, self.f, sc.ports.reference, name, port_names(n))

    @property
    def insertion_loss_db(self) -> np.ndarray:
        """Cascaded insertion loss, dB, (N,) -- the last cumulative curve."""
        return self.cumulative_loss_db[-1]

    @property
    def imports(self) -> list:
        """The check of each imported file (``network.import_check.ImportCheck``)."""
        return [b.check for b in self.blocks if isinstance(b, TouchstoneBlock)]

    @property
    def guaranteed(self) -> bool:
        """Whether the outputs are passive and reciprocal to 1e-9 (every imported file
        checked or repaired; none accepted as it is)."""
        return all(c.guaranteed for c in self.imports)

    @cached_property
    def network(self):
        """The S-parameters as a skrf.Network, ports in the scenario's order."""
        sc = self.scenario
        n, order = self.conductors, sc.ports.order
        return to_network(
            to_order(self.s, n, order), self.f, sc.ports.reference, sc.name, port_names(n, order)
        )

    @cached_property
    def mixed_mode(self) -> MixedMode | None:
        """Mixed-mode S of the channel's pairs (None for a single-ended channel)."""
        if not self.pairs:
            return None
        return mixed_mode_internal(self.s, self.scenario.ports.reference, self.pairs)

    @cached_property
    def return_loss(self) -> tuple[np.ndarray, np.ndarray]:
        """Return loss (positive dB) of the main mode at the input and at the output, (N,)
        each: |S11|, |S22| of a single-ended channel, |Sdd11|, |Sdd22| of a pair."""
        mm = self.main_mixed_mode
        if mm is None:
            s11, s22 = self.main_s[:, 0, 0], self.main_s[:, 1, 1]
        else:
            s11, s22 = mm.dd[:, 0, 0], mm.dd[:, 1, 1]
        with np.errstate(divide="ignore"):
            return tuple(-20.0 * np.log10(np.maximum(np.abs(x), 1e-300)) for x in (s11, s22))


def build_channel(scenario: Scenario) -> ChannelResult:
    """Cascade the scenario's channel on its sweep: each [lines.*] section used by a
    segment is evaluated once and shared by its segments; each block's own loss and the
    loss through it are taken as the cascade goes, so no block's S is kept."""
    f = scenario.frequencies()
    n = scenario.conductors
    order = scenario.ports.order
    members = scenario.members
    victim = scenario.crosstalk.victim if scenario.crosstalk is not None else None
    picked = member(members, victim).conductors if victim is not None else None
    used = dict.fromkeys(seg.line for seg in scenario.channel if seg.type == "line")
    lines = {name: UniformLine.from_rlgc(scenario.lines[name].rlgc(f)) for name in used}
    f_skew = skew_frequency(scenario)
    memo: dict = {}  # this build's via field solutions, shared by identical vias
    blocks = [
        skewed(make_block(seg, n, order, lines, memo), seg, f_skew) for seg in scenario.channel
    ]
    seg_loss = np.empty((len(blocks), f.size))
    cum_loss = np.empty((len(blocks), f.size))
    # mode conversion of each segment: a pair channel's, or a pair victim's on group lines
    pair_view = member(members, victim).pair if victim is not None else (n == 2 and not members)
    seg_conv = np.empty((len(blocks), f.size)) if pair_view else None
    total = None
    for k, (s_block, total) in enumerate(cascade_steps(blocks, f, scenario.ports.reference)):
        through = total
        if picked is not None:  # the victim's own loss
            s_block, through = sub_network(s_block, picked), sub_network(total, picked)
        seg_loss[k] = loss_db(s_block)
        cum_loss[k] = loss_db(through)
        if seg_conv is not None:
            seg_conv[k] = conversion_db(s_block)
    pairs = pairs_of(members) if members else (ONE_PAIR if n == 2 else ())
    result = ChannelResult(
        scenario, f, blocks, total, seg_loss, cum_loss, pairs, members=members, victim=victim
    )
    result.segment_conversion_db = seg_conv
    return result


def conversion_db(s: np.ndarray) -> np.ndarray:
    """|Scd21| in dB (negative; -6000 dB floor) of a pair's (N, 4, 4) S in the internal port
    order: the common-mode wave leaving the far end for a differential wave entering the
    near end, (S31 + S41 - S32 - S42) / 2 (Bockelman-Eisenstadt)."""
    x = s[:, 2:, :2]
    scd = 0.5 * (x[:, 0, 0] + x[:, 1, 0] - x[:, 0, 1] - x[:, 1, 1])
    return 20.0 * np.log10(np.maximum(np.abs(scd), 1e-300))


def skew_frequency(scenario: Scenario) -> float:
    """Where a skew given as a time becomes a length (at the leg's phase velocity there):
    the budget's Nyquist frequency, else the middle of the sweep."""
    b = scenario.budget
    if b is not None and b.nyquist is not None:
        return float(b.nyquist)
    return 0.5 * (scenario.sweep.start + scenario.sweep.stop)


def skewed(block: Block, seg: Segment, f_ref: float) -> Block:
    """``block`` with the segment's skew (an extra uncoupled length on one leg; see
    ``network.skew``), or ``block`` itself without one."""
    if seg.skew is None:
        return block
    what, value = seg.skew
    if block.kind == "line":
        from losslane.network.line import line_scaled_abcd
        from losslane.xsection.leg import leg_section

        leg = leg_section(seg.section)

        def leg_abcd(fq: np.ndarray, length: float):
            return line_scaled_abcd(leg.rlgc(fq), length)

        def delay() -> float:
            return float(leg.line_values(np.array([f_ref])).main.delay[0])

    else:
        leg_abcd = block.leg

        def delay() -> float:
            return block.leg_delay(f_ref)

    if what == "time":
        return SkewedPair(block, value / delay(), leg_abcd, skew_time=value)
    return SkewedPair(block, value, leg_abcd)

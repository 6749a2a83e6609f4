"""A scenario's channel: segments -> network blocks -> the cascaded result.

This is the layer between the network blocks and the outputs: it turns each scenario
segment into its block, cascades them on the sweep, and keeps what the outputs and the
loss budget need besides the final S-parameters -- each segment's own insertion loss and
the cumulative loss after each segment.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from losslane.errors import LossLaneError
from losslane.network.blocks import (
    Block,
    LineSegment,
    SeriesCapacitor,
    SeriesRL,
    ShuntCapacitor,
    TouchstoneBlock,
    Via,
)
from losslane.network.cascade import build_network, cascade_scaled
from losslane.network.mixedmode import MixedMode, mixed_mode
from losslane.network.scaled import ScaledABCD, forward_transmission, scaled_db
from losslane.scenario import Scenario, Segment


def make_block(seg: Segment, n: int, default_order: str) -> Block:
    """The network block of one scenario segment, for an n-conductor channel."""
    v = seg.values
    if seg.type == "line":
        return LineSegment(seg.section, v["length"], name=seg.name)
    if seg.type == "via":
        return Via(v["barrel"], v["stub"], v["impedance"], seg.dielectric, n=n, name=seg.name)
    if seg.type == "capacitor":
        return SeriesCapacitor(v["value"], v["esl"], v["esr"], n=n, name=seg.name)
    if seg.type == "series":
        return SeriesRL(v["resistance"], v["inductance"], n=n, name=seg.name)
    if seg.type == "shunt":
        return ShuntCapacitor(v["capacitance"], n=n, name=seg.name)
    if seg.type == "touchstone":
        try:
            return TouchstoneBlock(seg.path, name=seg.name, n=n, order=seg.order or default_order)
        except LossLaneError as exc:
            raise LossLaneError(f"{seg.where}: {exc}") from None
    raise AssertionError(seg.type)


@dataclass
class ChannelResult:
    """The built channel.

    ``network``: the S-parameters (skrf.Network, ports in the scenario's order);
    ``items``: each block's scaled chain matrix on ``f``, ``chain`` their cascade;
    ``segment_loss_db``: each segment alone between matched references, insertion loss in
    dB (positive), (K, N); ``cumulative_loss_db``: loss from the input through segment k,
    (K, N); ``insertion_loss_db``: the whole channel's, (N,). For a differential channel
    they are the differential mode. The per-segment arrays are computed when first asked
    for (plots, budget), so a build that needs neither does not pay for them.
    """

    scenario: Scenario
    f: np.ndarray
    blocks: list[Block]
    network: object
    items: list[ScaledABCD] = field(repr=False)
    chain: ScaledABCD = field(repr=False)
    warnings: list[str] = field(default_factory=list)

    @property
    def nports(self) -> int:
        return int(self.network.nports)

    @cached_property
    def segment_loss_db(self) -> np.ndarray:
        z_ref = self.scenario.ports.reference
        return np.array([_loss_db(it, z_ref) for it in self.items])

    @cached_property
    def cumulative_loss_db(self) -> np.ndarray:
        z_ref = self.scenario.ports.reference
        cum = []
        acc = None
        for it in self.items[:-1]:
            acc = it if acc is None else acc @ it
            cum.append(_loss_db(acc, z_ref))
        cum.append(self.insertion_loss_db)  # through the last segment: the whole channel
        return np.array(cum)

    @cached_property
    def insertion_loss_db(self) -> np.ndarray:
        """Cascaded insertion loss, dB, (N,) -- the last cumulative curve."""
        return _loss_db(self.chain, self.scenario.ports.reference)

    def mixed_mode(self) -> MixedMode | None:
        """Mixed-mode blocks of a 4-port channel (None for a 2-port)."""
        if self.nports != 4:
            return None
        sc = self.scenario
        return mixed_mode(np.asarray(self.network.s), sc.ports.reference, sc.ports.order)

    def return_loss_db(self) -> tuple[np.ndarray, np.ndarray]:
        """Return loss (positive dB) of the main mode at the input and at the output, (N,)
        each: |S11|, |S22| of a single-ended channel, |Sdd11|, |Sdd22| of a pair."""
        mm = self.mixed_mode()
        if mm is None:
            s = np.asarray(self.network.s)
            s11, s22 = s[:, 0, 0], s[:, 1, 1]
        else:
            s11, s22 = mm.dd[:, 0, 0], mm.dd[:, 1, 1]
        with np.errstate(divide="ignore"):
            return tuple(-20.0 * np.log10(np.maximum(np.abs(x), 1e-300)) for x in (s11, s22))


def _loss_db(chain: ScaledABCD, z_ref: float) -> np.ndarray:
    """Insertion loss (positive dB) of the main mode between matched references: S21 of a
    single-ended channel, the differential-mode Sdd21 of a pair; in the log domain, so a
    channel whose transmission underflows still reports its dB."""
    x21, log_scale = forward_transmission(chain, z_ref)
    if chain.n == 1:
        return -scaled_db(x21[:, 0, 0], log_scale)
    # Sdd21 = (S31 - S32 - S41 + S42) / 2, the mixed-mode transform (see mixedmode.py)
    sdd21 = 0.5 * (x21[:, 0, 0] - x21[:, 0, 1] - x21[:, 1, 0] + x21[:, 1, 1])
    return -scaled_db(sdd21, log_scale)


def build_channel(scenario: Scenario) -> ChannelResult:
    """Cascade the scenario's channel on its sweep."""
    f = scenario.frequencies()
    n = scenario.conductors
    order = scenario.ports.order
    blocks = [make_block(seg, n, order) for seg in scenario.channel]
    z_ref = scenario.ports.reference
    # segments of one [lines.*] section share its RLGC (LineSegment caches it per sweep)
    items = [b.scaled_abcd(f) for b in blocks]
    chain = cascade_scaled(items)
    net = build_network([chain], f, z_ref=z_ref, name=scenario.name, order=order)
    return ChannelResult(scenario, f, blocks, net, items, chain)

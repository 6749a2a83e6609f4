"""A built channel's crosstalk: NEXT and FEXT of each aggressor into the victim over the
sweep and at the check points, the integrated crosstalk noise against its limit, the
insertion-loss-to-crosstalk ratio at Nyquist, and the victim's near- and far-end
waveforms for an aggressor step.

Check points: the budget's Nyquist frequency and [[budget.check]] points (those inside
the sweep), else four evenly spaced points up to the sweep's stop. Values there are read
from the sweep linearly in dB between the neighbouring points.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from losslane.crosstalk.coupling import Coupling, couplings, victim_through
from losslane.crosstalk.noise import NoiseResult, icn, icr_db, power_sum
from losslane.errors import warn
from losslane.network.mixedmode import mixed_mode_internal
from losslane.xsection.group import member, pairs_of

__all__ = ["CrosstalkResult", "evaluate_crosstalk", "to_isolation_db"]

#: 20-80 % -> 10-90 % rise time of a Gaussian edge: 2.5631 sigma / (2 x 0.8416 sigma)
GAUSSIAN_10_90_PER_20_80 = 2.5631 / 1.6832
#: isolation reported for an exactly zero coupling (dB)
ISOLATION_FLOOR_DB = 6000.0


def to_isolation_db(h: np.ndarray) -> np.ndarray:
    """-20 log10 |h|: isolation in positive dB (6000 dB for |h| <= 1e-300)."""
    return -20.0 * np.log10(np.maximum(np.abs(h), 1e-300))


def check_frequencies(scenario, f: np.ndarray) -> list[float]:
    """Nyquist and the budget's check points inside the sweep, else four even points."""
    out: list[float] = []
    b = scenario.budget
    if b is not None:
        if b.nyquist is not None:
            out.append(b.nyquist)
        out += [c.at for c in b.checks]
    out = [x for x in out if f[0] <= x <= f[-1]]
    if not out:
        out = [float(f[-1]) * k / 4 for k in (1, 2, 3, 4)]
    return sorted(set(out))


def _at(f: np.ndarray, y_db: np.ndarray, x: list[float]) -> list[float]:
    return [float(v) for v in np.interp(x, f, y_db)]


@dataclass
class CrosstalkResult:
    """Crosstalk of a channel's ``victim``: each aggressor's ``couplings`` over ``f``, the
    victim's ``through`` transmission, the ``noise`` (None without a data rate), and
    the budget's limit ``max_icn`` (V)."""

    victim: str
    differential: bool
    f: np.ndarray = field(repr=False)
    couplings: list[Coupling] = field(repr=False)
    through: np.ndarray = field(repr=False)
    points: list[float]
    noise: NoiseResult | None
    max_icn: float | None
    nyquist: float | None
    settings: object = field(repr=False)
    notes: list[str] = field(default_factory=list)

    @property
    def next_power(self) -> np.ndarray:
        """sum_i |NEXT_i|^2 over the aggressors, (N,)."""
        return power_sum([c.next for c in self.couplings])

    @property
    def fext_power(self) -> np.ndarray:
        return power_sum([c.fext for c in self.couplings])

    @property
    def insertion_loss_db(self) -> np.ndarray:
        return to_isolation_db(self.through)

    @property
    def icr_db(self) -> np.ndarray:
        """Insertion-loss-to-crosstalk ratio over the sweep (dB), NEXT and FEXT together."""
        return icr_db(self.insertion_loss_db, self.next_power + self.fext_power)

    @property
    def icr_at_nyquist_db(self) -> float | None:
        if self.nyquist is None:
            return None
        return _at(self.f, self.icr_db, [self.nyquist])[0]

    @property
    def icn(self) -> float | None:
        """The integrated crosstalk noise (V), None without a data rate."""
        return None if self.noise is None else self.noise.total

    @property
    def passed(self) -> bool | None:
        """Noise within ``max_icn`` (None when no limit is given)."""
        if self.max_icn is None or self.noise is None:
            return None
        return bool(self.noise.total <= self.max_icn)

    def step_waveforms(self, rise_time: float | None = None):
        """The victim's response at its receiver to a unit step on each aggressor
        (fractions of the step): ``network.timedomain`` Waveforms with values
        (T, aggressors, 2) -- [..., 0] NEXT, the aggressor stepped at the same end (the
        victim's near end as the aggressor sees it: the saturated plateau), [..., 1]
        FEXT, the aggressor stepped at the other end (the far-end pulse). ``rise_time``
        (10-90 %) defaults to the NEXT aggressor's transition time as a Gaussian edge, at
        least 0.75 / f_max (the helper's default) and at most half the sweep's time window
        1 / step (a slower edge would not finish rising in it)."""
        from losslane.network.timedomain import (
            default_rise_time,
            longest_rise_time,
            step_response,
        )

        f_max = float(self.f[-1])
        if rise_time is None:
            edge = self.settings.near_transition * GAUSSIAN_10_90_PER_20_80
            rise_time = min(max(edge, default_rise_time(f_max)), longest_rise_time(self.f))
        h = np.stack([np.stack([c.next, c.fext], axis=-1) for c in self.couplings], axis=1)
        return step_response(self.f, h, rise_time)

    def victim_delay(self, rise_time: float | None = None) -> float | None:
        """The victim's one-way delay (s): the 50 % point of its through step response
        (None when it never gets there)."""
        from losslane.network.timedomain import crossing, step_response

        w = step_response(self.f, self.through, rise_time)
        final = float(np.abs(self.through[0])) if self.f[0] == 0 else None
        level = 0.5 * (final if final else float(np.max(w.values)))
        return crossing(w.time_s, w.values, level)

    def to_json(self) -> dict:
        """The ``crosstalk`` object of ``losslane build --json``."""
        pts = self.points
        aggressors = []
        for c in self.couplings:
            aggressors.append(
                {
                    "name": c.aggressor,
                    "mode": c.mode,
                    "next_db": _at(self.f, to_isolation_db(c.next), pts),
                    "fext_db": _at(self.f, to_isolation_db(c.fext), pts),
                    "next_transmitter_end_db": _at(self.f, to_isolation_db(c.next_tx), pts),
                }
            )
        n = self.noise
        s = self.settings
        return {
            "victim": self.victim,
            "victim_mode": "differential" if self.differential else "single-ended",
            "points_hz": list(pts),
            "aggressors": aggressors,
            "power_sum_next_db": _at(self.f, _power_db(self.next_power), pts),
            "power_sum_fext_db": _at(self.f, _power_db(self.fext_power), pts),
            "icn_mv": None if n is None else 1e3 * n.total,
            "icn_near_mv": None if n is None else 1e3 * n.near,
            "icn_far_mv": None if n is None else 1e3 * n.far,
            "max_icn_mv": None if self.max_icn is None else 1e3 * self.max_icn,
            "passed": self.passed,
            "nyquist_hz": self.nyquist,
            "icr_at_nyquist_db": self.icr_at_nyquist_db,
            "parameters": {
                "baud_hz": None if n is None else n.baud,
                "near_amplitude_mv": 1e3 * s.near_amplitude,
                "far_amplitude_mv": 1e3 * s.far_amplitude,
                "near_transition_s": s.near_transition,
                "far_transition_s": s.far_transition,
                "receiver_bandwidth_hz": None if n is None else n.bandwidth,
                "frequency_step_hz": None if n is None else n.step,
                "band_hz": None if n is None else list(n.band),
                "method": "IEEE 802.3 integrated crosstalk noise (backplane/cable annexes; "
                "form and default parameters recalled from memory)",
            },
            "notes": list(self.notes),
        }


def _power_db(p: np.ndarray) -> np.ndarray:
    """A power sum as isolation in positive dB."""
    return -10.0 * np.log10(np.maximum(p, 1e-300))


def evaluate_crosstalk(channel) -> CrosstalkResult | None:
    """The crosstalk of a built channel (``channel.ChannelResult``); None when it is not
    on group lines."""
    sc = channel.scenario
    settings = sc.crosstalk
    if settings is None or not channel.members:
        return None
    members = channel.members
    z = sc.ports.reference
    f = channel.f
    modal = mixed_mode_internal(channel.s, z, pairs_of(members)).matrix
    cps = couplings(channel.s, z, members, settings.victim, settings.aggressors, modal)
    through = victim_through(channel.s, z, members, settings.victim, modal)
    budget = sc.budget
    notes: list[str] = []
    noise = None
    nyquist = None
    if budget is not None and budget.data_rate is not None:
        baud = budget.baud
        nyquist = budget.nyquist
        noise = icn(
            f,
            power_sum([c.next for c in cps]),
            power_sum([c.fext for c in cps]),
            baud,
            settings.near_amplitude,
            settings.far_amplitude,
            settings.near_transition,
            settings.far_transition,
            settings.bandwidth(baud),
        )
        if f[-1] < baud * (1 - 1e-9):
            msg = (
                f"integrated crosstalk noise: the sweep stops at {f[-1] / 1e9:g} GHz, below "
                f"the baud rate {baud / 1e9:g} GBd where the symbol spectrum has its first "
                "null; the noise beyond the sweep is left out"
            )
            warn(msg)
            notes.append(msg)
    else:
        notes.append(
            "no [budget] data_rate: the integrated crosstalk noise needs the baud rate and is "
            "not computed"
        )
    return CrosstalkResult(
        victim=settings.victim,
        differential=member(members, settings.victim).pair,
        f=f,
        couplings=cps,
        through=through,
        points=check_frequencies(sc, f),
        noise=noise,
        max_icn=None if budget is None else budget.max_icn,
        nyquist=nyquist,
        settings=settings,
        notes=notes,
    )

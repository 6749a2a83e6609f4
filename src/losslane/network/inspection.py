"""Inspecting one set of S-parameters: its IEEE 370-2020 quality (``network.quality``) and
its time-domain views (``network.timedomain``: impedance profiles, step and pulse
responses, skew), with the features of each profile (``network.profile_features``).

The data are judged as they are: nothing is repaired, symmetrised or refused for being
non-passive, non-reciprocal or non-causal -- that is what the quality metrics report.
(The channel build's import policy, ``network.import_check``, is about blocks put into a
channel; it does not apply here.) 1-ports get their impedance profile only; 2-ports and
differential 4-ports everything; other port counts are refused (the time-domain views
need to know which ports face each other).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError
from losslane.network.ports import DEFAULT_ORDER, check_order
from losslane.network.profile_features import ProfileFeature, profile_features
from losslane.network.quality import QualityReport, quality
from losslane.network.timedomain import TimeDomainReport, impedance_profile, time_domain

PORT_COUNTS = (1, 2, 4)


@dataclass(frozen=True)
class Inspection:
    """The quality and time-domain views of one S-parameter set.

    ``ports``, ``points``, ``start_hz``, ``stop_hz``: the data's size and span;
    ``reference_ohm`` the reference impedance of each port; ``order`` the 4-port numbering
    (None otherwise); ``quality`` the IEEE 370-2020 report; ``time`` every time-domain
    view (steps, pulse and skew empty or None for a 1-port); ``features`` the peaks and
    dips of each profile of ``time.tdr``, in the same order; ``data_rate_bps`` and
    ``modulation`` those of the pulse response (None without a data rate)."""

    ports: int
    points: int
    start_hz: float
    stop_hz: float
    reference_ohm: tuple[float, ...]
    order: str | None
    quality: QualityReport
    time: TimeDomainReport
    features: tuple[tuple[ProfileFeature, ...], ...]
    data_rate_bps: float | None
    modulation: str

    @property
    def notes(self) -> tuple[str, ...]:
        """What was done to the data for the time-domain views (DC point, resampling,
        the stimulus, a window too short), each once."""
        seen: list[str] = []
        for n in (
            *self.time.notes,
            *(n for p in self.time.tdr for n in p.notes),
            *(n for s in self.time.step for n in s.notes),
            *(() if self.time.pulse is None else self.time.pulse.notes),
        ):
            if n not in seen:
                seen.append(n)
        return tuple(seen)

    def to_json(self) -> dict:
        """Plain numbers, strings and lists; the keys of ``losslane inspect --json``."""
        refs = [float(z) for z in self.reference_ohm]
        tdr = []
        for p, feats in zip(self.time.tdr, self.features, strict=True):
            entry = p.to_json()
            entry["features"] = [x.to_json() for x in feats]
            tdr.append(entry)
        return {
            "ports": self.ports,
            "points": self.points,
            "start_hz": self.start_hz,
            "stop_hz": self.stop_hz,
            "reference_ohm": refs[0] if len(set(refs)) == 1 else refs,
            "order": self.order,
            "quality": self.quality.to_json(),
            "tdr": tdr,
            "step": [s.to_json() for s in self.time.step],
            "pulse": None if self.time.pulse is None else self.time.pulse.to_json(),
            "skew_s": self.time.skew_s,
            "rise_time_s": self.time.rise_time_s,
            "ringing": self.time.ringing,
            "data_rate_bps": self.data_rate_bps,
            "modulation": self.modulation,
            "notes": list(self.notes),
        }


def _references(z_ref, nports: int) -> tuple[float, ...]:
    z = np.asarray(z_ref, dtype=float)
    if z.ndim == 0:
        z = np.full(nports, float(z))
    if z.shape != (nports,) or not np.all(np.isfinite(z)) or np.any(z <= 0):
        raise LossLaneError(
            f"z_ref = {z_ref!r} ohm is not valid; give one value > 0 or one per port ({nports})"
        )
    return tuple(float(x) for x in z)


def inspect_network(
    f,
    s,
    z_ref: float | Sequence[float] = 50.0,
    order: str = DEFAULT_ORDER,
    rise_time: float | None = None,
    data_rate: float | None = None,
    modulation: str = "nrz",
    delay_per_m: float | None = None,
    mixed=None,
) -> Inspection:
    """The quality and every time-domain view of S (N, P, P) on ``f`` (Hz) for P = 1, 2 or
    4 (ports numbered as in the data, 4-ports in ``order``), against ``z_ref`` (ohm, one
    value or one per port): see :func:`losslane.network.timedomain.time_domain` for
    ``rise_time`` (s, default 0.75 / f_max), ``data_rate`` (b/s; None: no pulse
    response), ``modulation`` and ``delay_per_m`` (one-way s/m, for distances);
    ``mixed`` a 4-port's mixed-mode S when the caller has it (a build does)."""
    s = np.asarray(s)
    if s.ndim != 3 or s.shape[1] != s.shape[2]:
        raise LossLaneError(f"S-parameters: shape {s.shape} is not (frequencies, ports, ports)")
    p = int(s.shape[1])
    if p not in PORT_COUNTS:
        raise LossLaneError(
            f"the data have {p} ports; inspect takes 1-port, 2-port and differential 4-port "
            "data (.s1p, .s2p, .s4p)"
        )
    refs = _references(z_ref, p)
    if p == 4:
        check_order(order)
    q = quality(f, s)
    if p == 1:
        prof = impedance_profile(f, s[:, 0, 0], refs[0], 1, "single-ended", rise_time, delay_per_m)
        td = TimeDomainReport((prof,), (), None, None, prof.rise_time_s, prof.ringing, ())
    else:
        td = time_domain(
            f,
            s,
            refs,
            order,
            rise_time,
            data_rate,
            modulation,
            delay_per_m,
            mixed=mixed,
        )
    f = np.asarray(f, float)
    return Inspection(
        ports=p,
        points=int(f.size),
        start_hz=float(f[0]),
        stop_hz=float(f[-1]),
        reference_ohm=refs,
        order=order if p == 4 else None,
        quality=q,
        time=td,
        features=tuple(profile_features(prof) for prof in td.tdr),
        data_rate_bps=None if data_rate is None or p == 1 else float(data_rate),
        modulation=modulation,
    )


__all__ = ["PORT_COUNTS", "Inspection", "inspect_network"]

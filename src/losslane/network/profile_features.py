"""The features of an impedance profile: its peaks and dips, for the text and the report.

A discontinuity shows in an impedance profile (``timedomain.ImpedanceProfile``) as a local
extreme: a capacitive one (a pad, a via barrel, an open stub, a connector's pins over a
plane) as a dip below the line around it, an inductive one (a long via, a bond wire, a
narrowed trace, a gap in the return path) as a peak. A section of another impedance that
is long against the rise time shows as a plateau at that section's impedance. The size of
a feature is its *prominence*: how far it stands out from the profile on either side, so
that a dip in a 45-ohm section counts from 45 ohm, not from the reference. (Prominence
as topographers define it and as ``scipy.signal.find_peaks`` computes it: the height of
the extreme above the higher of the two lowest points between it and the nearest higher
point on each side, or the end of the profile; written here in numpy, because importing
``scipy.signal`` alone takes most of a second of a command's start.)

Features smaller than ``threshold`` (default 2 % of the reference impedance: 1 ohm at
50 ohm, 2 ohm differential) are left out (the stimulus' own ringing, about 0.6 % of the
step at the default rise time, moves the profile by less than 0.6 ohm at 50 ohm); so is
anything in the baseline before the edge (t < -rise time). At most ``limit`` features
(default 12), the most prominent, are kept, in time order.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError

#: a feature must stand out by this share of the reference impedance
THRESHOLD_SHARE = 0.02
#: at most this many features per profile (the most prominent)
LIMIT = 12


@dataclass(frozen=True)
class ProfileFeature:
    """One peak or dip of an impedance profile: ``kind`` "peak" (inductive, or a section of
    higher impedance) or "dip" (capacitive, or lower impedance); ``time_s`` the round-trip
    time of its extreme; ``distance_m`` the one-way distance (None without a delay per
    length); ``impedance_ohm`` the profile there; ``deviation_ohm`` that minus the
    reference; ``prominence_ohm`` how far it stands out from the profile around it;
    ``width_s`` its width at half its prominence (round-trip time): near the rise time for
    a lumped discontinuity, longer for a section."""

    kind: str
    time_s: float
    distance_m: float | None
    impedance_ohm: float
    deviation_ohm: float
    prominence_ohm: float
    width_s: float

    def to_json(self) -> dict:
        return {
            "kind": self.kind,
            "time_s": self.time_s,
            "distance_m": self.distance_m,
            "impedance_ohm": self.impedance_ohm,
            "deviation_ohm": self.deviation_ohm,
            "prominence_ohm": self.prominence_ohm,
            "width_s": self.width_s,
        }


def profile_features(
    profile, threshold: float | None = None, limit: int = LIMIT
) -> tuple[ProfileFeature, ...]:
    """The peaks and dips of ``profile`` (an ``ImpedanceProfile``) standing out by at least
    ``threshold`` ohm (default 2 % of its reference), at most ``limit``, in time order."""
    z_ref = float(profile.reference_ohm)
    thr = THRESHOLD_SHARE * z_ref if threshold is None else float(threshold)
    if not np.isfinite(thr) or thr <= 0:
        raise LossLaneError(f"threshold = {threshold!r} ohm is not valid; it must be > 0 ohm")
    if int(limit) < 1:
        raise LossLaneError(f"limit = {limit!r} is not valid; it must be >= 1")
    t = np.asarray(profile.time_s, float)
    z = np.asarray(profile.impedance_ohm, float)
    keep = t >= -float(profile.rise_time_s)
    t, z = t[keep], z[keep]
    dist = None if profile.distance_m is None else np.asarray(profile.distance_m, float)[keep]
    if t.size < 3:
        return ()
    dt = float(t[1] - t[0])
    found = []
    for kind, sign in (("peak", 1.0), ("dip", -1.0)):
        for i, prom, w in _prominent(sign * z, thr):
            found.append(
                ProfileFeature(
                    kind,
                    float(t[i]),
                    None if dist is None else float(dist[i]),
                    float(z[i]),
                    float(z[i] - z_ref),
                    float(prom),
                    float(w * dt),
                )
            )
    found.sort(key=lambda x: -x.prominence_ohm)
    return tuple(sorted(found[: int(limit)], key=lambda x: x.time_s))


def _nearest_higher(y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """For each sample, the index of the nearest strictly higher sample on its left and on
    its right (-1 and y.size where there is none): one pass of a monotonic stack each way."""
    n = y.size
    left = np.full(n, -1)
    right = np.full(n, n)
    stack: list[int] = []
    for i in range(n):
        while stack and y[stack[-1]] <= y[i]:
            right[stack.pop()] = i
        left[i] = stack[-1] if stack else -1
        stack.append(i)
    # samples equal to a later one were popped by it: their right neighbour must be higher
    for i in range(n - 2, -1, -1):
        j = right[i]
        while j < n and y[j] <= y[i]:
            j = right[j]
        right[i] = j
    return left, right


def _crossing(y: np.ndarray, i: int, stop: int, level: float) -> float:
    """Fractional index where ``y`` falls to ``level`` going from the peak ``i`` towards
    ``stop`` (the base, where y <= level), linear between samples."""
    step = 1 if stop > i else -1
    seg = y[i : stop + 1] if step == 1 else y[stop : i + 1][::-1]
    k = int(np.flatnonzero(seg <= level)[0])
    a, b = float(seg[k - 1]), float(seg[k])
    frac = (a - level) / (a - b) if a != b else 0.0
    return i + step * (k - 1 + frac)


def _prominent(y: np.ndarray, threshold: float) -> list[tuple[int, float, float]]:
    """The local maxima of ``y`` with a prominence >= ``threshold``: (index, prominence,
    width at half the prominence in samples)."""
    mid = y[1:-1]
    cand = np.flatnonzero((mid > y[:-2]) & (mid >= y[2:])) + 1
    if cand.size == 0:
        return []
    left, right = _nearest_higher(y)
    out = []
    for i in cand:
        lo = int(left[i]) + 1
        hi = int(right[i])
        lb = lo + int(np.argmin(y[lo : i + 1]))
        rb = i + int(np.argmin(y[i:hi]))
        prom = float(y[i] - max(y[lb], y[rb]))
        if prom < threshold:
            continue
        level = float(y[i]) - 0.5 * prom
        width = _crossing(y, i, rb, level) - _crossing(y, i, lb, level)
        out.append((int(i), prom, width))
    return out


__all__ = ["LIMIT", "THRESHOLD_SHARE", "ProfileFeature", "profile_features"]

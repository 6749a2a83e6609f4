"""S-parameter quality: the frequency-domain passivity, reciprocity and causality metrics of
IEEE Std 370-2020, each 0..100, with the standard's quality levels.

For a network of P ports sampled at N frequencies (S (N, P, P), frequency first):

* passivity (IEEE 370-2020): PM(f_n) = the largest singular value of S(f_n);
  PW(f_n) = (PM - A) / B where PM > A, else 0, with A = 1.00001 and B = 0.1;
  metric = max(N - sum PW, 0) / N x 100;
* reciprocity (IEEE 370-2020): RM(f_n) = sum over all k, m of |S_km - S_mk|, divided by
  P (P - 1) (each asymmetric pair counts twice, so a 2-port's RM is |S12 - S21|);
  RW = (RM - C) / B where RM > C, else 0, with C = 1e-6 and B = 0.1; metric as for
  passivity. A 1-port has no transfer terms and scores 100;
* causality (IEEE 370-2020): per entry S_ij, V_n = S(f_n+1) - S(f_n) and
  R_n = Re(V_n+1) Im(V_n) - Im(V_n+1) Re(V_n), positive when the curve in the complex
  plane turns clockwise with rising frequency, as a causal response does; the entry's
  metric is 100 x sum max(R_n, 0) / sum |R_n| (100 when the entry does not turn at all,
  sum |R_n| = 0, as in the standard's reference code); the network's metric is the
  minimum over the entries. An entry whose magnitude never exceeds 1e-6 (a matched line's
  reflection at rounding level, the cross terms of uncoupled legs) carries no phase
  information: it is reported as negligible and left out of the minimum (a losslane
  choice; on measured data it changes nothing). When every entry is negligible the
  causality metric is 100.

Quality levels (IEEE 370-2020's table, from memory; boundaries inclusive from below):
passivity and reciprocity good >= 99.9, acceptable >= 99, inconclusive >= 80, else poor;
causality good >= 80, acceptable >= 50, inconclusive >= 20, else poor.

The metrics depend on the frequency grid (a coarse grid under-samples a long delay and
makes the causality metric meaningless: the standard asks for a phase step well below
pi between points); they are computed on the data as given, without resampling.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError

__all__ = [
    "CAUSALITY_LEVELS",
    "NEGLIGIBLE",
    "PASSIVITY_A",
    "PASSIVITY_B",
    "PASSIVITY_LEVELS",
    "RECIPROCITY_B",
    "RECIPROCITY_C",
    "QualityReport",
    "causality_entries",
    "entry_name",
    "passivity_measure",
    "quality",
    "quality_level",
    "reciprocity_measure",
]

PASSIVITY_A = 1.00001
"""IEEE 370-2020: singular values up to A count as passive."""
PASSIVITY_B = 0.1
"""IEEE 370-2020: the weight's scale for passivity."""
RECIPROCITY_C = 1e-6
"""IEEE 370-2020: reciprocity measures up to C count as reciprocal."""
RECIPROCITY_B = 0.1
"""IEEE 370-2020: the weight's scale for reciprocity."""
NEGLIGIBLE = 1e-6
"""An entry whose magnitude never exceeds this is left out of the causality minimum."""

PASSIVITY_LEVELS = ((99.9, "good"), (99.0, "acceptable"), (80.0, "inconclusive"))
"""IEEE 370-2020 levels for passivity and reciprocity (from memory); below: "poor"."""
CAUSALITY_LEVELS = ((80.0, "good"), (50.0, "acceptable"), (20.0, "inconclusive"))
"""IEEE 370-2020 levels for causality (from memory); below: "poor"."""

_LEVELS = {
    "passivity": PASSIVITY_LEVELS,
    "reciprocity": PASSIVITY_LEVELS,
    "causality": CAUSALITY_LEVELS,
}


def quality_level(metric: float, kind: str) -> str:
    """The IEEE 370-2020 quality level ("good", "acceptable", "inconclusive", "poor") of a
    ``metric`` (0..100) of ``kind`` "passivity", "reciprocity" or "causality"."""
    if kind not in _LEVELS:
        raise LossLaneError(
            f"quality kind = {kind!r} is not known; valid kinds are "
            + ", ".join(repr(k) for k in _LEVELS)
        )
    for bound, name in _LEVELS[kind]:
        if metric >= bound:
            return name
    return "poor"


def entry_name(i: int, j: int, nports: int) -> str:
    """Name of the entry S[i, j] (0-based indices) in 1-based port numbers: "S21", or
    "S10,2" when the network has 10 or more ports."""
    sep = "," if nports >= 10 else ""
    return f"S{i + 1}{sep}{j + 1}"


def _check(f, s) -> tuple[np.ndarray, np.ndarray]:
    f = np.asarray(f, dtype=float)
    s = np.asarray(s)
    if f.ndim != 1 or f.size < 3:
        raise LossLaneError(
            f"frequencies: {f.size if f.ndim == 1 else f.shape} points given; the quality "
            "metrics need a 1-D list of at least 3 frequencies (causality needs two steps)"
        )
    if s.ndim != 3 or s.shape[0] != f.size or s.shape[1] != s.shape[2]:
        raise LossLaneError(
            f"S-parameters: shape {s.shape} does not fit {f.size} frequencies; "
            "expected (frequencies, ports, ports)"
        )
    bad_f = ~np.isfinite(f) | (f < 0)
    if np.any(bad_f):
        raise LossLaneError(
            f"frequencies: {f[bad_f][0]!r} Hz is not valid; frequencies are finite and >= 0 Hz"
        )
    if np.any(np.diff(f) <= 0):
        k = int(np.argmax(np.diff(f) <= 0))
        raise LossLaneError(
            f"frequencies: {f[k + 1]:g} Hz follows {f[k]:g} Hz; they must be strictly increasing"
        )
    s = s.astype(complex, copy=False)
    bad = ~np.isfinite(s)
    if np.any(bad):
        n, i, j = np.argwhere(bad)[0]
        raise LossLaneError(
            f"S-parameters: {entry_name(i, j, s.shape[1])} at {f[n]:g} Hz is {s[n, i, j]!r}; "
            "every value must be finite"
        )
    return f, s


def passivity_measure(s: np.ndarray) -> np.ndarray:
    """PM(f_n): the largest singular value of each S(f_n), (N,) (IEEE 370-2020)."""
    return np.linalg.svd(np.asarray(s, complex), compute_uv=False)[:, 0]


def reciprocity_measure(s: np.ndarray) -> np.ndarray:
    """RM(f_n) = sum_km |S_km - S_mk| / (P (P - 1)), (N,) (IEEE 370-2020); 0 for P = 1."""
    s = np.asarray(s, complex)
    p = s.shape[-1]
    if p < 2:
        return np.zeros(s.shape[0])
    return np.sum(np.abs(s - np.swapaxes(s, 1, 2)), axis=(1, 2)) / (p * (p - 1))


def _weighted_metric(measure: np.ndarray, threshold: float, scale: float) -> float:
    """max(N - sum W, 0) / N x 100 with W = (M - threshold) / scale where M > threshold."""
    w = np.where(measure > threshold, (measure - threshold) / scale, 0.0)
    n = measure.size
    return float(max(n - float(np.sum(w)), 0.0) / n * 100.0)


def causality_entries(s: np.ndarray) -> np.ndarray:
    """Each entry's causality metric (IEEE 370-2020), (P, P), 0..100 (100 for an entry
    that does not turn at all). Negligible entries are not treated specially here."""
    v = np.diff(np.asarray(s, complex), axis=0)
    a, b = v[:-1], v[1:]
    r = b.real * a.imag - b.imag * a.real
    total = np.sum(np.abs(r), axis=0)
    positive = np.sum(np.maximum(r, 0.0), axis=0)
    turns = total > 0
    return np.where(turns, 100.0 * positive / np.where(turns, total, 1.0), 100.0)


@dataclass(frozen=True)
class QualityReport:
    """The IEEE 370-2020 frequency-domain quality of one S-parameter set.

    ``passivity``, ``reciprocity``, ``causality``: metrics 0..100; ``*_level`` their
    levels; ``causality_by_entry`` (P, P) the per-entry metrics; ``worst_causality_entry``
    the entry with the lowest (e.g. "S21"; None when every entry is negligible);
    ``negligible_entries`` the entries left out; ``max_singular_value`` and
    ``max_singular_value_hz`` the worst passivity point; ``passivity_failures_hz`` the
    frequencies where PM > A; ``points`` and ``ports`` the data's size.
    """

    passivity: float
    reciprocity: float
    causality: float
    passivity_level: str
    reciprocity_level: str
    causality_level: str
    causality_by_entry: np.ndarray
    worst_causality_entry: str | None
    negligible_entries: tuple[str, ...]
    max_singular_value: float
    max_singular_value_hz: float
    passivity_failures_hz: np.ndarray
    points: int
    ports: int

    def to_json(self) -> dict:
        """The ``quality`` object of ``inspect --json`` (plain floats, strings, lists)."""
        return {
            "passivity": self.passivity,
            "reciprocity": self.reciprocity,
            "causality": self.causality,
            "passivity_level": self.passivity_level,
            "reciprocity_level": self.reciprocity_level,
            "causality_level": self.causality_level,
            "worst_causality_entry": self.worst_causality_entry,
            "negligible_entries": list(self.negligible_entries),
            "max_singular_value": self.max_singular_value,
            "max_singular_value_hz": self.max_singular_value_hz,
            "passivity_failures_hz": [float(x) for x in self.passivity_failures_hz],
        }


def quality(f, s) -> QualityReport:
    """The IEEE 370-2020 frequency-domain quality metrics of S (N, P, P) on ``f`` (Hz, (N,),
    increasing, N >= 3); see the module docstring for the formulas and constants."""
    f, s = _check(f, s)
    p = s.shape[1]

    pm = passivity_measure(s)
    passivity = _weighted_metric(pm, PASSIVITY_A, PASSIVITY_B)
    reciprocity = _weighted_metric(reciprocity_measure(s), RECIPROCITY_C, RECIPROCITY_B)

    per_entry = causality_entries(s)
    negligible = np.max(np.abs(s), axis=0) <= NEGLIGIBLE
    counted = np.where(negligible, np.inf, per_entry)
    if np.all(negligible):
        causality, worst = 100.0, None
    else:
        i, j = np.unravel_index(int(np.argmin(counted)), counted.shape)
        causality, worst = float(per_entry[i, j]), entry_name(int(i), int(j), p)
    k = int(np.argmax(pm))
    return QualityReport(
        passivity=passivity,
        reciprocity=reciprocity,
        causality=causality,
        passivity_level=quality_level(passivity, "passivity"),
        reciprocity_level=quality_level(reciprocity, "reciprocity"),
        causality_level=quality_level(causality, "causality"),
        causality_by_entry=per_entry,
        worst_causality_entry=worst,
        negligible_entries=tuple(entry_name(int(i), int(j), p) for i, j in np.argwhere(negligible)),
        max_singular_value=float(pm[k]),
        max_singular_value_hz=float(f[k]),
        passivity_failures_hz=f[pm > PASSIVITY_A],
        points=int(f.size),
        ports=int(p),
    )

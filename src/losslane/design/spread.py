"""Manufacturing-tolerance Monte Carlo: impedance and loss of a line whose dimensions and
Dk scatter within their tolerances.

Each tolerance is a +/- value. With the normal distribution the +/- value is 3 sigma (so
99.7 % of the samples fall inside it, common practice for fabrication tolerances); with
the uniform distribution the samples fill the +/- interval evenly. The parameters are
drawn independently, in a fixed order (the model's ``dimensions``, then Dk), from one
seeded numpy generator, so the same seed gives the same numbers. The samples are
evaluated in chunks, each chunk in one vectorized model call (closed-form kinds; others
fall back to one call per sample).
"""

from __future__ import annotations

import math
import re
import warnings
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np

from losslane.errors import LossLaneError, LossLaneWarning, warn
from losslane.spec import Where, python_where
from losslane.units import parse_length
from losslane.xsection.base import CrossSection
from losslane.xsection.batch import evaluate

DISTRIBUTIONS = ("normal", "uniform")
MAX_SAMPLES = 2_000_000


def tolerance_keys(section: CrossSection) -> tuple[str, ...]:
    """The keys ``section`` takes a tolerance on, in the order they are drawn."""
    return tuple(section.dimensions) + ("dk",)


def parse_tolerance(value: object, key: str, nominal: float, where: Where | None = None) -> float:
    """A +/- tolerance as an absolute value: a length with a unit ("0.5mil"), or a
    percentage of the nominal ("10%"); for ``dk`` a plain number ("0.1") or a percentage.
    """
    name = (where or python_where("spread")).tolerance(key)
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        if key != "dk":
            raise LossLaneError(
                f"{name} = {value!r}: a length tolerance needs a unit "
                '(e.g. "0.5mil") or a percentage ("10%")'
            )
        tol = float(value)
    elif isinstance(value, str):
        m = re.fullmatch(r"\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*%\s*", value)
        if m:
            tol = float(m.group(1)) / 100.0 * abs(nominal)
        elif key == "dk":
            try:
                tol = float(value.strip().lstrip("±"))
            except ValueError:
                raise LossLaneError(
                    f"{name} = {value!r}: expected a Dk deviation such as 0.1 "
                    'or a percentage such as "3%"'
                ) from None
        else:
            tol = parse_length(value.strip().lstrip("±"), name)
    else:
        raise LossLaneError(f"{name} = {value!r}: expected a tolerance such as 0.5mil or 10%")
    if not (math.isfinite(tol) and tol >= 0):
        raise LossLaneError(f"{name} = {value!r}: a +/- tolerance must be a finite number >= 0")
    return tol


@dataclass(frozen=True)
class SpreadResult:
    kind: str
    frequencies: list[float]
    samples: int
    seed: int
    distribution: str
    tolerances: dict[str, float]  # key -> +/- value (m, or Dk units)
    target: np.ndarray  # (F,) ohm
    band: np.ndarray  # (F,) ohm, half-width of the accepted band
    nominal_impedance: np.ndarray  # (F,)
    nominal_loss: np.ndarray  # (F,)
    impedance: np.ndarray = field(repr=False)  # (S, F)
    loss: np.ndarray = field(repr=False)  # (S, F) dB/in
    differential: bool = False
    section: CrossSection | None = field(default=None, repr=False)  # the nominal line

    @staticmethod
    def _stats(a: np.ndarray) -> dict[str, list[float]]:
        p01, p99 = np.percentile(a, [1.0, 99.0], axis=0)
        return {
            "mean": a.mean(axis=0).tolist(),
            "std": a.std(axis=0, ddof=1).tolist(),
            "p01": p01.tolist(),
            "p99": p99.tolist(),
        }

    @property
    def outside_share(self) -> np.ndarray:
        return np.mean(np.abs(self.impedance - self.target) > self.band, axis=0)

    def to_json(self) -> dict:
        imp = self._stats(self.impedance)
        imp["outside_share"] = self.outside_share.tolist()
        return {
            "samples": self.samples,
            "seed": self.seed,
            "impedance": imp,
            "loss_db_per_in": self._stats(self.loss),
            "kind": self.kind,
            "frequencies_hz": self.frequencies,
            "impedance_kind": "z_diff" if self.differential else "z0",
            "distribution": self.distribution,
            "tolerance_is": "3 sigma" if self.distribution == "normal" else "interval half-width",
            "tolerances": {(k if k == "dk" else f"{k}_m"): v for k, v in self.tolerances.items()},
            "target_ohm": self.target.tolist(),
            "band_ohm": self.band.tolist(),
            "nominal": {
                "impedance_ohm": self.nominal_impedance.tolist(),
                "loss_db_per_in": self.nominal_loss.tolist(),
            },
        }


def draw(
    section: CrossSection,
    tolerances: Mapping[str, float],
    samples: int,
    seed: int,
    distribution: str = "normal",
    where: Where | None = None,
) -> tuple[dict[str, np.ndarray], np.ndarray]:
    """The sampled geometry {key: (S,) metres} and Dk scale (S,) for ``tolerances``."""
    where = where or python_where("spread")
    if distribution not in DISTRIBUTIONS:
        raise LossLaneError(
            f"{where.key('distribution')} = {distribution!r}: valid values are "
            f"{', '.join(DISTRIBUTIONS)}"
        )
    if isinstance(seed, bool) or not isinstance(seed, (int, np.integer)) or seed < 0:
        raise LossLaneError(f"{where.key('seed')} = {seed!r}: expected a whole number >= 0")
    if (
        isinstance(samples, bool)
        or not isinstance(samples, (int, np.integer))
        or not (2 <= samples <= MAX_SAMPLES)
    ):
        raise LossLaneError(
            f"{where.key('samples')} = {samples!r}: expected a whole number from 2 to {MAX_SAMPLES}"
        )
    geo = section.dimension_values()
    valid = tolerance_keys(section)
    for key, tol in tolerances.items():
        name = where.tolerance(key)
        if key not in valid:
            hint = ""
            if key == "height" and "below" in geo:
                hint = (
                    f" (a stripline has {where.tolerance('below')} and "
                    f"{where.tolerance('above')} instead)"
                )
            raise LossLaneError(
                f"{name}: {section.kind} has no {key}{hint}; valid "
                f"tolerances: {', '.join(where.tolerance(k) for k in valid)}"
            )
        if not math.isfinite(tol) or tol < 0:
            raise LossLaneError(f"{name} = {tol!r}: a +/- tolerance must be >= 0")
        nominal = section.dielectric.dk - 1.0 if key == "dk" else geo[key]
        if tol > 0 and tol >= nominal:
            what = (
                "Dk - 1 (the laminate would reach air)"
                if key == "dk"
                else f"the nominal {key} ({nominal:.4g} m)"
            )
            raise LossLaneError(
                f"{name} = {tol:.4g}{'' if key == 'dk' else ' m'} is not "
                f"smaller than {what}; give a smaller tolerance"
            )
    if not any(v > 0 for v in tolerances.values()):
        examples = ", ".join(where.tolerance(k) for k in ("width", "height", "thickness", "dk"))
        raise LossLaneError(f"spread: give at least one non-zero tolerance ({examples}, ...)")
    rng = np.random.default_rng(seed)
    out: dict[str, np.ndarray] = {}
    scale = np.ones(samples)
    for key in valid:
        tol = tolerances.get(key, 0.0)
        if tol <= 0:
            continue
        if distribution == "normal":
            dev = rng.standard_normal(samples) * (tol / 3.0)
        else:
            dev = rng.uniform(-tol, tol, samples)
        if key == "dk":
            scale = 1.0 + dev / section.dielectric.dk
            bad = scale * section.dielectric.dk < 1.0
            floor = "Dk 1"
        else:
            out[key] = geo[key] + dev
            bad = out[key] < 0 if key == "thickness" else out[key] <= 0
            floor = "zero"
        if np.any(bad):
            raise LossLaneError(
                f"{where.tolerance(key)}: {int(bad.sum())} of {samples} normal samples "
                f"fall below {floor}; give a smaller tolerance or "
                f"{where.setting('distribution', 'uniform')}"
            )
    return out, scale


def spread(
    section: CrossSection,
    tolerances: Mapping[str, float],
    frequencies: Sequence[float],
    *,
    samples: int = 10_000,
    seed: int = 1,
    distribution: str = "normal",
    target: float | None = None,
    band: float = 0.10,
    band_ohm: float | None = None,
    chunk: int | None = None,
    progress: Callable[[int], None] | None = None,
    where: Where | None = None,
) -> SpreadResult:
    """Monte Carlo of ``section`` over ``tolerances`` (+/- values: m, Dk units for 'dk').

    ``target`` (ohm) defaults to the nominal impedance at each frequency; the accepted
    band is +/- ``band`` (a fraction of the target) or +/- ``band_ohm``.
    ``progress(n)`` is called with the number of samples done after each chunk; ``where``
    names the caller's vocabulary for messages.
    """
    where = where or python_where("spread")
    freqs = np.atleast_1d(np.asarray(frequencies, float))
    if freqs.size == 0:
        raise LossLaneError(f"{where.key('at')}: give at least one frequency")
    if band_ohm is None and not (math.isfinite(band) and 0 < band < 1):
        raise LossLaneError(
            f'{where.key("band")} = {band!r}: a fraction of the target between 0 and 1 (e.g. "10%")'
        )
    if band_ohm is not None and not (math.isfinite(band_ohm) and band_ohm > 0):
        raise LossLaneError(f"{where.key('band')} = {band_ohm!r} ohm: must be > 0")
    if target is not None and not (math.isfinite(target) and target > 0):
        raise LossLaneError(f"{where.key('target')} = {target!r}: must be > 0 ohm")
    geo, scale = draw(section, tolerances, samples, seed, distribution, where)
    with warnings.catch_warnings(record=True) as caught_nominal:
        warnings.simplefilter("always", LossLaneWarning)
        nominal = evaluate(section, freqs)
    nominal_z = nominal.impedance[0]
    nominal_loss = nominal.loss_db_per_in()[0][0]
    vector = type(section).vectorized()
    if chunk is None:
        chunk = max(1, 300_000 // freqs.size) if vector else 100
    z = np.empty((samples, freqs.size))
    loss = np.empty((samples, freqs.size))
    caught_all: list[warnings.WarningMessage] = []
    for start in range(0, samples, chunk):
        sl = slice(start, min(samples, start + chunk))
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", LossLaneWarning)
            res = evaluate(section, freqs, dk_scale=scale[sl], **{k: v[sl] for k, v in geo.items()})
        caught_all.extend(caught)
        z[sl] = res.impedance
        loss[sl] = res.loss_db_per_in()[0]
        if progress is not None:
            progress(sl.stop)
    _reissue(caught_all + caught_nominal)  # the samples' range first, the nominal's if alone
    tgt = np.full(freqs.shape, float(target)) if target is not None else nominal_z.copy()
    half = np.full(freqs.shape, float(band_ohm)) if band_ohm is not None else band * tgt
    return SpreadResult(
        section.kind,
        freqs.tolist(),
        int(samples),
        int(seed),
        distribution,
        {k: float(v) for k, v in tolerances.items() if v > 0},
        tgt,
        half,
        nominal_z,
        nominal_loss,
        z,
        loss,
        section.n_conductors == 2,
        section,
    )


def _reissue(caught: list[warnings.WarningMessage]) -> None:
    """One warning per model parameter across all chunks."""
    seen: set[str] = set()
    for w in caught:
        if issubclass(w.category, LossLaneWarning):
            msg = str(w.message)
            head = msg.split(" = ")[0]
            if head not in seen:
                seen.add(head)
                warn(msg + " (in some samples)" if "validity range" in msg else msg)

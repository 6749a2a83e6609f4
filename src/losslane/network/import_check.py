"""What an imported S-parameter model may bring into a channel: the passivity and
reciprocity check of a Touchstone block, and its repair.

Policy (the output of a build is passive and reciprocal to 1e-9 unless the user accepts a
file as it is):

* the file's IEEE 370-2020 quality metrics are computed and reported
  (``network.quality``);
* its worst violations are measured: the largest singular value of S above 1, and the
  largest |S_km - S_mk|;
* violations within the rounding of the file's printed digits plus 1e-6 (a file printed
  with 6 significant digits is non-reciprocal at about 1e-6 by rounding alone) are
  repaired: S is symmetrised to (S + S^T)/2 and singular values above 1 are clipped to 1
  (both common practice for model files), and the repair's size is reported;
* larger violations are refused, naming the file, the worst frequency and the violation,
  unless the file is accepted as it is (the scenario key ``as_is = true``); the channel's
  outputs then say that they are not guaranteed passive or reciprocal.

The printed precision is read from the file's own numbers: the median count of
significant digits d of its data gives a rounding of 5 x 10^-d relative to each entry;
for P ports that moves a singular value by at most P times that and a reciprocity
difference by twice that (the allowance added to 1e-6).
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from losslane.errors import LossLaneError

#: violations below this are rounding of our own arithmetic: nothing to repair
REPAIR_FLOOR = 1e-12
#: the part of a violation that is never rounding (IEEE 370's reciprocity constant)
TOLERANCE = 1e-6

_NUMBER = re.compile(r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?")


def printed_digits(text: str) -> int:
    """The median count of significant digits of the data numbers in Touchstone ``text``
    (comment, option and keyword lines skipped; exact zeros not counted)."""
    counts: list[int] = []
    for line in text.splitlines():
        body = line.split("!", 1)[0].strip()
        if not body or body.startswith("#") or body.startswith("["):
            continue
        for token in _NUMBER.findall(body):
            mantissa = re.split(r"[eE]", token)[0].lstrip("+-").replace(".", "").lstrip("0")
            if mantissa:
                counts.append(len(mantissa))
    if not counts:
        return 17
    return int(np.median(counts))


_METRICS = (
    "passivity",
    "reciprocity",
    "causality",
    "passivity_level",
    "reciprocity_level",
    "causality_level",
)


@dataclass(frozen=True)
class ImportCheck:
    """The check of one imported file: its quality metrics (``quality``, the IEEE 370
    report), the worst passivity excess (largest singular value - 1) and reciprocity
    error (largest |S_km - S_mk|) with their frequencies, the rounding allowance of its
    printed digits, and what was done: "none", "repaired" (with the largest change of
    any entry) or "as-is"."""

    path: Path
    quality: object
    passivity_excess: float
    passivity_hz: float
    reciprocity_error: float
    reciprocity_hz: float
    printed_digits: int
    allowance: tuple[float, float]
    action: str
    repair_size: float = 0.0

    @property
    def guaranteed(self) -> bool:
        """Whether the file, as used, keeps the 1e-9 passivity and reciprocity."""
        return self.action != "as-is"

    def to_json(self) -> dict:
        q = self.quality.to_json() if self.quality is not None else dict.fromkeys(_METRICS)
        return {
            "file": str(self.path),
            "passivity": q["passivity"],
            "reciprocity": q["reciprocity"],
            "causality": q["causality"],
            "passivity_level": q["passivity_level"],
            "reciprocity_level": q["reciprocity_level"],
            "causality_level": q["causality_level"],
            "largest_singular_value": 1.0 + self.passivity_excess,
            "largest_singular_value_hz": self.passivity_hz,
            "reciprocity_error": self.reciprocity_error,
            "reciprocity_error_hz": self.reciprocity_hz,
            "printed_digits": self.printed_digits,
            "action": self.action,
            "repair_size": self.repair_size,
        }

    def summary(self) -> str:
        """One line for the terminal and the report."""
        q = self.quality
        if q is None:
            head = f"{self.path.name}: too few points for the IEEE 370 metrics"
        else:
            head = (
                f"{self.path.name}: IEEE 370 passivity {q.passivity:.2f} ({q.passivity_level}), "
                f"reciprocity {q.reciprocity:.2f} ({q.reciprocity_level}), causality "
                f"{q.causality:.1f} ({q.causality_level})"
            )
        if self.action == "repaired":
            return (
                head
                + f"; repaired (symmetrised, clipped to passive), change {self.repair_size:.2g}"
            )
        if self.action == "as-is":
            return head + "; used as it is (as_is = true): NOT guaranteed passive or reciprocal"
        return head


def _violations(f: np.ndarray, s: np.ndarray) -> tuple[float, float, float, float]:
    sv = np.linalg.svd(s, compute_uv=False)[:, 0]
    asym = np.max(np.abs(s - np.swapaxes(s, 1, 2)), axis=(1, 2))
    kp, kr = int(np.argmax(sv)), int(np.argmax(asym))
    return float(sv[kp] - 1.0), float(f[kp]), float(asym[kr]), float(f[kr])


def repair(s: np.ndarray) -> np.ndarray:
    """S symmetrised and with singular values above 1 clipped to 1 (per frequency)."""
    s = 0.5 * (s + np.swapaxes(s, 1, 2))
    u, sv, vh = np.linalg.svd(s)
    over = sv > 1.0
    if np.any(over):
        clipped = np.minimum(sv, 1.0)
        s = s - np.einsum("fik,fk,fkj->fij", u, (sv - clipped), vh)
        s = 0.5 * (s + np.swapaxes(s, 1, 2))
        # the symmetrising step can lift a singular value by rounding: scale those points
        top = np.linalg.svd(s, compute_uv=False)[:, 0]
        s = s / np.maximum(top, 1.0)[:, None, None]
    return s


def check_import(
    path: Path, f: np.ndarray, s: np.ndarray, text: str, as_is: bool = False
) -> tuple[ImportCheck, np.ndarray]:
    """The check of the file ``path`` (its frequencies ``f``, S (N, P, P) and text) and the
    S to use: repaired when its violations are within the allowance, unchanged when it
    has none or is accepted ``as_is``; a LossLaneError for larger violations."""
    from losslane.network.quality import quality
    from losslane.units import format_frequency as fmt

    s = np.asarray(s, complex)
    nports = s.shape[1]
    digits = printed_digits(text)
    rounding = 5.0 * 10.0 ** (-digits)
    allow_p = TOLERANCE + nports * rounding
    allow_r = TOLERANCE + 2.0 * rounding * float(np.max(np.abs(s)))
    p_excess, p_hz, r_err, r_hz = _violations(f, s)
    # the metrics need two frequency steps (causality); a 2-point file is still checked
    report = quality(f, s) if f.size >= 3 else None

    def made(action: str, size: float = 0.0) -> ImportCheck:
        return ImportCheck(
            path, report, p_excess, p_hz, r_err, r_hz, digits, (allow_p, allow_r), action, size
        )

    if p_excess <= REPAIR_FLOOR and r_err <= REPAIR_FLOOR:
        return made("none"), s
    if as_is:
        return made("as-is"), s
    if p_excess > allow_p or r_err > allow_r:
        what = []
        if p_excess > allow_p:
            what.append(
                f"its largest singular value is {1 + p_excess:.9g} at {fmt(p_hz)} (not passive "
                f"beyond 1 + {allow_p:.2g})"
            )
        if r_err > allow_r:
            what.append(
                f"|S_km - S_mk| reaches {r_err:.3g} at {fmt(r_hz)} (not reciprocal beyond "
                f"{allow_r:.2g})"
            )
        raise LossLaneError(
            f"touchstone file '{path}': " + "; ".join(what) + f" -- more than the rounding of "
            f"its {digits} printed digits can explain, so it is not repaired; fix the model, "
            "or accept it as it is with as_is = true (the outputs are then not guaranteed "
            "passive or reciprocal)"
        )
    fixed = repair(s)
    return made("repaired", float(np.max(np.abs(fixed - s)))), fixed


__all__ = ["ImportCheck", "check_import", "printed_digits", "repair"]

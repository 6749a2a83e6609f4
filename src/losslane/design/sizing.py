"""Impedance synthesis: the trace width (or a pair's spacing) that meets a target impedance.

The impedance met is the one ``losslane line`` reports at the sizing frequency: the
lossless sqrt(L/C) of a single line (with the model's dispersion and the conductor's
internal inductance), or Z_diff = 2 Z_odd of a pair. The root is found by a 1-D bracketed
search (a grid over the model's validity range evaluated in one vectorized call, then
Brent's method, scipy.optimize.brentq, inside the bracketing cell). When the target lies
outside what the model covers in its validity range, the error says which way to move;
the search never clamps to the edge of the range.
"""

from __future__ import annotations

import dataclasses
import math
import warnings
from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError, LossLaneWarning
from losslane.units import MIL, parse_resistance
from losslane.xsection.base import CrossSection
from losslane.xsection.batch import evaluate, nominal_geometry

#: default sizing frequency: the impedance a fabricator's coupon measures is quoted near
#: 1 GHz (common practice), and dispersion is small there
DEFAULT_SIZE_AT = 1e9


@dataclass(frozen=True)
class SearchRange:
    """The interval searched for ``key``: ratio ``key/ref`` in [lo, hi], from ``source``."""

    key: str
    ratio: str
    ref: float
    lo: float
    hi: float
    source: str

    @property
    def bounds(self) -> tuple[float, float]:
        return self.lo * self.ref, self.hi * self.ref


def search_range(section: CrossSection, vary: str = "width") -> SearchRange:
    """The validity range of ``section``'s model for the dimension ``vary``.

    Ranges are those the models state (and warn on) at a frequency above DC:

    * microstrip: Hammerstad-Jensen 0.01 <= w/h <= 100, Kirschning-Jansen dispersion
      0.1 <= w/h <= 100 -> 0.1..100;
    * stripline: Wheeler's thickness correction w/(b - t) < 10; the offset combination
      w/(b - t) > 0.35; Cohn's exact zero-thickness solution holds for any width, so the
      centred search starts at 0.01 (a floor of the search, not of the model);
    * cpw / gcpw: Frankel's dispersion fit, 0.1 <= w/gap <= 5 and 0.1 <= w/h <= 5;
    * microstrip-pair: Kirschning-Jansen coupled lines, 0.1 <= w/h <= 10 and
      0.1 <= s/h <= 10 (from memory of the 1984 paper);
    * stripline-pair: Cohn's coupled stripline is exact at zero thickness; searched over
      0.01..10 of the dielectric height (search bounds);
    * other kinds: 0.01..100 of the first of height, below + above, gap.
    """
    geo = nominal_geometry(section)
    kind = section.kind
    if vary not in geo:
        raise LossLaneError(
            f"--vary {vary}: {kind} has no {vary}; it has "
            f"{', '.join(k for k in geo if k != 'thickness')}"
        )
    pair = section.n_conductors == 2
    if vary == "spacing" and not pair:
        raise LossLaneError(
            f"--vary spacing: {kind} is a single line; spacing is varied "
            "only for pairs (microstrip-pair, stripline-pair)"
        )
    if kind == "microstrip" and vary == "width":
        return SearchRange(
            "width",
            "width/height",
            geo["height"],
            0.1,
            100.0,
            "Hammerstad-Jensen with Kirschning-Jansen dispersion",
        )
    if kind == "stripline" and vary == "width":
        ref = geo["below"] + geo["above"]
        centred = abs(geo["below"] - geo["above"]) <= 1e-9 * (ref + geo["thickness"])
        if centred:
            return SearchRange(
                "width",
                "width/(below + above)",
                ref,
                0.01,
                10.0,
                "Cohn's exact solution with Wheeler's thickness correction",
            )
        return SearchRange(
            "width",
            "width/(below + above)",
            ref,
            0.35,
            10.0,
            "offset stripline (parallel combination), Wheeler's thickness correction",
        )
    if kind in ("cpw", "gcpw") and vary == "width":
        gap, h, t = geo["gap"], geo["height"], geo["thickness"]
        hi = min(5.0, 5.0 * h / gap)
        source = "Frankel dispersion fit (width/gap and width/height 0.1..5)"
        if t > 0:
            # Gupta's thickness widening D = (1.25 t/pi)(1 + ln(4 pi w/t)) must stay below
            # the gap: w < t/(4 pi) exp(pi gap/(1.25 t) - 1)
            w_max = t / (4 * np.pi) * np.exp(min(np.pi * gap / (1.25 * t) - 1.0, 700.0))
            if 0.999 * w_max / gap < hi:
                hi = 0.999 * w_max / gap
                source += "; Gupta thickness correction (widening below the gap)"
        return SearchRange("width", "width/gap", gap, max(0.1, 0.1 * h / gap), hi, source)
    if kind == "microstrip-pair":
        return SearchRange(
            vary, f"{vary}/height", geo["height"], 0.1, 10.0, "Kirschning-Jansen coupled microstrip"
        )
    if kind == "stripline-pair":
        ref = geo["below"] + geo["above"]
        return SearchRange(
            vary,
            f"{vary}/(below + above)",
            ref,
            0.01,
            10.0,
            "Cohn's coupled stripline (search bounds)",
        )
    for key, label in (("height", "height"), ("below", "below + above"), ("gap", "gap")):
        if key in geo:
            ref = geo["below"] + geo["above"] if key == "below" else geo[key]
            return SearchRange(vary, f"{vary}/{label}", ref, 0.01, 100.0, f"{kind} (search bounds)")
    raise LossLaneError(f"size: no search range is known for kind {kind!r}")


def parse_target(value: object, key: str = "--target") -> float:
    """An impedance such as "50ohm", "50 ohm" or a bare 50 (ohm is the only unit in use)."""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        z = float(value)
    elif isinstance(value, str):
        try:
            z = float(value)
        except ValueError:
            z = parse_resistance(value, key)
    else:
        raise LossLaneError(f"{key} = {value!r}: expected an impedance such as 50ohm")
    if not math.isfinite(z) or z <= 0:
        raise LossLaneError(f"{key} = {value!r}: the target impedance must be > 0 ohm")
    return z


def _quiet_impedance(section: CrossSection, f: float, **geometry) -> np.ndarray:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        return evaluate(section, [f], **geometry).impedance[:, 0]


def _hints(section: CrossSection, vary: str, lower: bool) -> str:
    """How to move the stackup so that a lower (``lower``) or higher impedance fits."""
    kind = section.kind
    if vary == "spacing":
        return (
            "wider traces (larger --width) or a thinner dielectric"
            if lower
            else "narrower traces (smaller --width) or a thicker dielectric"
        )
    if kind.startswith("stripline"):
        return (
            "thinner dielectric layers (smaller --below/--above) or a higher-Dk material"
            if lower
            else "thicker dielectric layers (larger --below/--above) or a lower-Dk material"
        )
    if kind == "cpw":
        return (
            "a narrower --gap or a higher-Dk material"
            if lower
            else "a wider --gap or a lower-Dk material"
        )
    if kind == "gcpw":
        return (
            "a narrower --gap, a thinner dielectric (smaller --height) or a higher-Dk material"
            if lower
            else "a wider --gap, a thicker dielectric (larger --height) or a lower-Dk material"
        )
    return (
        "a thinner dielectric (smaller --height) or a higher-Dk material"
        if lower
        else "a thicker dielectric (larger --height) or a lower-Dk material"
    )


def solve(
    section: CrossSection,
    target: float,
    at: float = DEFAULT_SIZE_AT,
    vary: str = "width",
    points: int = 33,
) -> tuple[float, SearchRange]:
    """The value of ``vary`` (m) at which ``section`` has impedance ``target`` at ``at`` Hz.

    Raises a LossLaneError naming the direction to move when no value inside the model's
    validity range reaches the target.
    """
    from scipy.optimize import brentq

    if not math.isfinite(target) or target <= 0:
        raise LossLaneError(f"target = {target!r} ohm: must be > 0")
    if not math.isfinite(at) or at <= 0:
        raise LossLaneError(
            f"--at = {at!r} Hz: size at a frequency above 0 Hz (e.g. 1GHz); "
            "at DC the impedance carries the full internal inductance"
        )
    rng = search_range(section, vary)
    lo, hi = rng.bounds
    if not lo < hi:
        raise LossLaneError(
            f"{section.kind}: the model's validity ranges leave no {vary} "
            f"to search ({rng.source}); change the other dimensions"
        )
    grid = np.geomspace(lo, hi, points)
    z = _quiet_impedance(section, at, **{vary: grid})
    d = z - target
    if not np.all(np.isfinite(d)):
        raise LossLaneError(
            f"{section.kind}: the model gives no finite impedance over "
            f"{rng.ratio} {rng.lo:g}..{rng.hi:g}"
        )
    hit = np.nonzero(np.sign(d[:-1]) * np.sign(d[1:]) <= 0)[0]
    if hit.size == 0:
        zmin, zmax = float(z.min()), float(z.max())
        lower = target < zmin  # the target is below everything the range reaches
        # which end of the range the target lies beyond
        at_lo = (z[0] < z[-1]) == lower
        bound = rng.lo if at_lo else rng.hi
        side = "<" if at_lo else ">"
        what = "Z_diff" if section.n_conductors == 2 else "Z0"
        raise LossLaneError(
            f"{section.kind}: {what} = {target:g} ohm needs {rng.ratio} {side} {bound:.3g}, "
            f"outside the model's validity range {rng.lo:.3g}..{rng.hi:.3g} ({rng.source}), "
            f"which spans {zmin:.1f}..{zmax:.1f} ohm here; use "
            f"{_hints(section, vary, lower)}, or a {'higher' if lower else 'lower'} target"
        )
    i = int(hit[0])
    if d[i] == 0:
        return float(grid[i]), rng
    if d[i + 1] == 0:
        return float(grid[i + 1]), rng

    def residual(x: float) -> float:
        return float(_quiet_impedance(section, at, **{vary: x})[0] - target)

    x = brentq(residual, float(grid[i]), float(grid[i + 1]), xtol=1e-12 * grid[i], rtol=1e-12)
    return float(x), rng


def sensitivity(section: CrossSection, at: float = DEFAULT_SIZE_AT) -> dict[str, float | None]:
    """d(impedance) per mil of each dimension and per 0.1 of Dk, by central differences
    (one vectorized call; steps 1e-3 of each dimension and 0.01 of Dk).

    Keys: ``ohm_per_mil_width``, ``ohm_per_mil_height`` (for stripline: the dielectric
    height below + above, each side taking half), ``ohm_per_0p1_dk``, and
    ``ohm_per_mil_<key>`` for every other dimension (thickness, gap, spacing, below,
    above); None for a zero thickness.
    """
    geo = nominal_geometry(section)
    cases: list[tuple[str, dict[str, float], float]] = []  # (name, deltas, step in mil)
    for key, v in geo.items():
        if v > 0:
            cases.append((f"ohm_per_mil_{key}", {key: 1e-3 * v}, 1e-3 * v / MIL))
    if "height" not in geo and "below" in geo:
        h = geo["below"] + geo["above"]
        cases.append(
            ("ohm_per_mil_height", {"below": 0.5e-3 * h, "above": 0.5e-3 * h}, 1e-3 * h / MIL)
        )
    dk = section.dielectric.dk
    rows = {k: [] for k in geo}
    scales = []
    for _, deltas, _ in cases:
        for sign in (1.0, -1.0):
            for k in geo:
                rows[k].append(geo[k] + sign * deltas.get(k, 0.0))
            scales.append(1.0)
    for sign in (1.0, -1.0):
        for k in geo:
            rows[k].append(geo[k])
        scales.append(1.0 + sign * 0.01 / dk)
    z = _quiet_impedance(
        section, at, dk_scale=np.array(scales), **{k: np.array(v) for k, v in rows.items()}
    )
    out: dict[str, float | None] = {}
    for i, (name, _, step) in enumerate(cases):
        out[name] = float((z[2 * i] - z[2 * i + 1]) / (2 * step))
    out["ohm_per_0p1_dk"] = float((z[-2] - z[-1]) / 0.02 * 0.1)
    if "thickness" in geo and geo["thickness"] == 0:
        out["ohm_per_mil_thickness"] = None
    order = ["ohm_per_mil_width", "ohm_per_mil_height", "ohm_per_0p1_dk"]
    return {k: out[k] for k in order if k in out} | {k: v for k, v in out.items() if k not in order}


@dataclass(frozen=True)
class SizeResult:
    """A sized line: the solved section and what ``losslane size`` reports."""

    section: CrossSection
    target: float
    achieved: float
    at: float
    vary: str
    range: SearchRange
    sensitivity: dict
    properties: dict  # section.properties at [at] + loss frequencies

    @property
    def value(self) -> float:
        return float(getattr(self.section, self.vary))

    @property
    def loss_frequencies(self) -> list[float]:
        return self.properties["frequencies_hz"][1:]

    def to_json(self) -> dict:
        p = self.properties
        geo = nominal_geometry(self.section)
        out = {
            "kind": self.section.kind,
            "target_ohm": self.target,
            "achieved_ohm": self.achieved,
            "width_m": geo["width"],
        }
        if self.section.n_conductors == 2:
            out["spacing_m"] = geo.get("spacing")
        out["sensitivity"] = self.sensitivity
        out.update(
            {
                "impedance": "z_diff" if self.section.n_conductors == 2 else "z0",
                "vary": self.vary,
                "frequency_hz": self.at,
                "ratio": {
                    "name": self.range.ratio,
                    "value": self.value / self.range.ref,
                    "valid_from": self.range.lo,
                    "valid_to": self.range.hi,
                    "source": self.range.source,
                },
                "geometry_m": geo,
                "eps_eff": p["eps_eff"][0]
                if self.section.n_conductors == 1
                else p["eps_eff_odd"][0],
                "loss_frequencies_hz": p["frequencies_hz"][1:],
                "loss_db_per_in": p["loss_db_per_in"][1:],
                "conductor_db_per_in": p["conductor_db_per_in"][1:],
                "dielectric_db_per_in": p["dielectric_db_per_in"][1:],
            }
        )
        return out


def impedance_of(props: dict, i: int = 0) -> float:
    """The reported impedance in ``properties`` output: Z_diff of a pair, else Z0."""
    return float(props["z_diff_ohm"][i] if "z_diff_ohm" in props else props["z0_ohm"][i])


def size(
    section: CrossSection,
    target: float,
    *,
    at: float = DEFAULT_SIZE_AT,
    vary: str = "width",
    loss_at: list[float] | None = None,
    with_sensitivity: bool = True,
) -> SizeResult:
    """Solve ``vary`` of ``section`` for ``target`` ohm at ``at`` Hz (see module docstring).

    ``section`` supplies every other dimension and the materials; its value of ``vary`` is
    only a placeholder. ``loss_at`` lists the frequencies of the reported loss (default:
    the sizing frequency).
    """
    x, rng = solve(section, target, at, vary)
    solved = dataclasses.replace(section, **{vary: x})
    freqs = [at] + list(loss_at if loss_at else [at])
    props = solved.properties(np.array(freqs))
    sens = sensitivity(solved, at) if with_sensitivity else {}
    return SizeResult(solved, target, impedance_of(props), at, vary, rng, sens, props)

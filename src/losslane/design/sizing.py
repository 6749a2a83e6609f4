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

import math
import warnings
from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError, LossLaneWarning
from losslane.spec import Where, python_where
from losslane.units import MIL, parse_resistance
from losslane.xsection.base import CrossSection, LineValues
from losslane.xsection.batch import evaluate
from losslane.xsection.validity import applies

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


def search_range(
    section: CrossSection, vary: str = "width", where: Where | None = None
) -> SearchRange:
    """The interval of dimension ``vary`` searched when sizing ``section``.

    The model class declares the interval searched (``search``: the ratio of ``vary`` to
    the sum of reference dimensions, e.g. width/height 0.01..100); it is narrowed to every
    validity range of the model (``limits``) that bounds ``vary`` with the other
    dimensions fixed -- so a sized line never sits where its own model warns -- and to
    any input bound of the model (``size_bounds``). A field-solved section searches its
    model's interval (the closed forms' ranges do not bound the solver).
    """
    where = where or python_where("size")
    geo = section.dimension_values()
    kind = section.kind
    if vary not in geo:
        raise LossLaneError(
            f"{where.setting('vary', vary)}: {kind} has no {vary}; it has "
            f"{', '.join(k for k in geo if k != 'thickness')}"
        )
    if vary == "spacing" and section.n_conductors != 2:
        raise LossLaneError(
            f"{where.setting('vary', 'spacing')}: {kind} is a single line; spacing is varied "
            "only for pairs (microstrip-pair, stripline-pair)"
        )
    if vary not in section.search:
        raise LossLaneError(f"size: {kind} declares no search interval for {vary}")
    den, lo_ratio, hi_ratio = section.search[vary]
    ref = sum(geo[k] for k in den)
    ratio = f"{vary}/{den[0]}" if len(den) == 1 else f"{vary}/({' + '.join(den)})"
    lo, lo_from = lo_ratio * ref, "search bounds"
    hi, hi_from = hi_ratio * ref, "search bounds"
    model = getattr(section, "source", None)
    closed_form = model is None
    if closed_form:
        dk = float(section.dielectric.dk)
        for lim in section.limits:
            b = lim.bounds_on(vary, geo) if applies(lim, geo, dk) else None
            if b is None:
                continue
            if b[0] >= lo:
                lo, lo_from = b[0], lim.method
            if b[1] <= hi:
                hi, hi_from = b[1], lim.method
        bound = type(section).size_bounds(vary, geo)
        if bound is not None and bound[0] < hi:
            hi, hi_from = bound
    if lo_from == hi_from:
        source = f"{kind} (search bounds)" if lo_from == "search bounds" else lo_from
    else:
        source = f"lower end: {lo_from}; upper end: {hi_from}"
    if not closed_form:
        source = "field solver, " + source
    return SearchRange(vary, ratio, ref, lo / ref, hi / ref, source)


def parse_target(value: object, key: str = "target") -> float:
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


def _hints(section: CrossSection, vary: str, lower: bool, where: Where) -> str:
    """How to move the stackup so that a lower (``lower``) or higher impedance fits."""
    kind = section.kind
    k = where.key
    if vary == "spacing":
        return (
            f"wider traces (larger {k('width')}) or a thinner dielectric"
            if lower
            else f"narrower traces (smaller {k('width')}) or a thicker dielectric"
        )
    if kind.startswith("stripline"):
        planes = f"{k('below')}/{k('above')}"
        return (
            f"thinner dielectric layers (smaller {planes}) or a higher-Dk material"
            if lower
            else f"thicker dielectric layers (larger {planes}) or a lower-Dk material"
        )
    if kind == "cpw":
        return (
            f"a narrower {k('gap')} or a higher-Dk material"
            if lower
            else f"a wider {k('gap')} or a lower-Dk material"
        )
    if kind == "gcpw":
        return (
            f"a narrower {k('gap')}, a thinner dielectric (smaller {k('height')}) or a "
            "higher-Dk material"
            if lower
            else f"a wider {k('gap')}, a thicker dielectric (larger {k('height')}) or a "
            "lower-Dk material"
        )
    return (
        f"a thinner dielectric (smaller {k('height')}) or a higher-Dk material"
        if lower
        else f"a thicker dielectric (larger {k('height')}) or a lower-Dk material"
    )


def solve(
    section: CrossSection,
    target: float,
    at: float = DEFAULT_SIZE_AT,
    vary: str = "width",
    points: int = 33,
    where: Where | None = None,
) -> tuple[float, SearchRange]:
    """The value of ``vary`` (m) at which ``section`` has impedance ``target`` at ``at`` Hz.

    Raises a LossLaneError naming the direction to move when no value inside the model's
    validity range reaches the target.
    """
    from scipy.optimize import brentq

    where = where or python_where("size")
    if not math.isfinite(target) or target <= 0:
        raise LossLaneError(f"{where.setting('target', target)} ohm: must be > 0")
    if not math.isfinite(at) or at <= 0:
        raise LossLaneError(
            f"{where.key('at')} = {at!r} Hz: size at a frequency above 0 Hz (e.g. 1GHz); "
            "at DC the impedance carries the full internal inductance"
        )
    rng = search_range(section, vary, where)
    lo, hi = rng.bounds
    if not lo < hi:
        raise LossLaneError(
            f"{section.kind}: the model's validity ranges leave no {vary} "
            f"to search ({rng.source}); change the other dimensions"
        )
    if getattr(section, "source", None) is not None:
        x = _seeded_root(section, target, at, vary, lo, hi)
        if x is not None:
            return x, rng
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
            f"{_hints(section, vary, lower, where)}, or a {'higher' if lower else 'lower'} "
            "target"
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


#: relative tolerance of a field-solved root (far below the solver's own discretisation)
FIELD_XTOL = 1e-7


def _seeded_root(
    section: CrossSection, target: float, at: float, vary: str, lo: float, hi: float
) -> float | None:
    """The root for a field-solved section in a few solves: the closed form of its kind
    (same dimensions and materials) gives the start and the slope, secant steps on the
    field solution follow, and a bracket, once found, is closed by Brent's method. None
    when the closed form has no root or the steps leave the search range (the caller
    then searches a grid)."""
    from scipy.optimize import brentq

    src = section.source
    closed = src.model(**dict(src.dims), dielectric=section.dielectric, metal=section.metal)
    try:
        x0, _ = solve(closed, target, at, vary)
    except LossLaneError:
        return None
    x0 = float(np.clip(x0, lo, hi))

    def miss(x: float) -> float:
        return float(_quiet_impedance(section, at, **{vary: x})[0] - target)

    z_cf = _quiet_impedance(closed, at, **{vary: np.array([0.99 * x0, 1.01 * x0])})
    slope = float(z_cf[1] - z_cf[0]) / (0.02 * x0)
    if not (np.isfinite(slope) and slope != 0):
        return None
    xa, da = x0, miss(x0)
    for _ in range(8):
        if da == 0:
            return xa
        xb = float(np.clip(xa - da / slope, lo, hi))
        if xb == xa:
            return None
        db = miss(xb)
        if np.sign(da) != np.sign(db):
            a, b = sorted((xa, xb))
            return float(brentq(miss, a, b, xtol=FIELD_XTOL * a, rtol=FIELD_XTOL))
        if abs(db) < 1e-9 * target:
            return xb
        slope = (db - da) / (xb - xa) if db != da else slope
        xa, da = xb, db
    return None


def sensitivity(section: CrossSection, at: float = DEFAULT_SIZE_AT) -> dict[str, float | None]:
    """d(impedance) per mil of each dimension and per 0.1 of Dk, by central differences
    (one vectorized call; steps 1e-3 of each dimension and 0.01 of Dk).

    Keys: ``ohm_per_mil_width``, ``ohm_per_mil_height`` (for stripline: the dielectric
    height below + above, each side taking half), ``ohm_per_0p1_dk``, and
    ``ohm_per_mil_<key>`` for every other dimension (thickness, gap, spacing, below,
    above); None for a zero thickness.
    """
    geo = section.dimension_values()
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
    """A sized line: the solved section and what ``losslane size`` reports (``values`` at
    the sizing frequency, then the loss frequencies)."""

    section: CrossSection
    target: float
    achieved: float
    at: float
    vary: str
    range: SearchRange
    sensitivity: dict
    values: LineValues

    @property
    def value(self) -> float:
        return float(getattr(self.section, self.vary))

    @property
    def loss_frequencies(self) -> list[float]:
        return self.values.f[1:].tolist()

    def to_json(self) -> dict:
        geo = self.section.dimension_values()
        main = self.values.main
        total, conductor, dielectric = main.db_per_in()
        pair = self.section.n_conductors == 2
        out = {
            "kind": self.section.kind,
            "target_ohm": self.target,
            "achieved_ohm": self.achieved,
            "width_m": geo["width"],
        }
        if pair:
            out["spacing_m"] = geo.get("spacing")
        out["sensitivity"] = self.sensitivity
        out.update(
            {
                "impedance": "z_diff" if pair else "z0",
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
                "eps_eff": float(main.eps_eff[0]),
                "loss_frequencies_hz": self.loss_frequencies,
                "loss_db_per_in": total[1:].tolist(),
                "conductor_db_per_in": conductor[1:].tolist(),
                "dielectric_db_per_in": dielectric[1:].tolist(),
            }
        )
        return out


def size(
    section: CrossSection,
    target: float,
    *,
    at: float = DEFAULT_SIZE_AT,
    vary: str = "width",
    loss_at: list[float] | None = None,
    with_sensitivity: bool = True,
    where: Where | None = None,
) -> SizeResult:
    """Solve ``vary`` of ``section`` for ``target`` ohm at ``at`` Hz (see module docstring).

    ``section`` supplies every other dimension and the materials; its value of ``vary`` is
    only a placeholder. ``loss_at`` lists the frequencies of the reported loss (default:
    the sizing frequency). ``where`` names the caller's vocabulary for messages.
    """
    x, rng = solve(section, target, at, vary, where=where)
    solved = section.replace(**{vary: x})
    freqs = [at] + list(loss_at if loss_at else [at])
    values = solved.line_values(np.array(freqs))
    sens = sensitivity(solved, at) if with_sensitivity else {}
    return SizeResult(solved, target, float(values.impedance[0]), at, vary, rng, sens, values)

"""Material parameters that make a cross-section model reproduce an extracted line.

Given the attenuation alpha(f) and effective permittivity eps_eff(f) of a line (from
:func:`losslane.measure.extract.extract_line`, or arrays), and the cross-section it was
built on, :func:`fit_materials` finds the dielectric's Dk and Df at a frequency (a causal
wideband Debye model: Djordjevic, Biljic, Likar-Smiljanic, Sarkar, IEEE Trans. EMC 43(4),
2001), the foil's roughness (Hammerstad or Groiss: rq; Huray: sphere radius and surface
ratio) and the conductivity, any subset held fixed, by bounded nonlinear least squares
(``scipy.optimize.least_squares``, trust-region reflective) over a band.

The model's alpha and eps_eff come from the section's R, L, G, C: gamma = sqrt(Z Y),
eps_eff = Re(-(gamma c0 / omega)^2) -- the same definitions the extraction uses, so the
internal inductance and the loss terms are compared like for like. For a pair the
differential (odd) mode uses the per-line R11 - R12 etc., the common (even) mode R11 + R12
(the modal quantities of a symmetric pair).

Residuals are alpha and eps_eff differences divided by the measurement's standard
uncertainty at each point (``weighting="uncertainty"``, from the extraction's noise model)
or by 1 % of alpha and 0.1 % of eps_eff (``"relative"``). Parameters are fitted in log
scale where they are positive by nature (Df, rq, radius, conductivity) and linearly
otherwise (Dk, surface ratio), within physical bounds (``BOUNDS``).

Uncertainty: the covariance (J^T J)^-1 s^2 from the Jacobian J of the weighted residuals
at the solution, scaled by the residual variance s^2 = sum r^2 / (m - n) (the usual
linearised least-squares estimate; with uncertainty weighting s^2 is not taken below 1, so
the result is never tighter than the data's stated noise). Where the residual rises more
slowly than that quadratic model along a principal direction (flat, curved valleys of
nearly interchangeable parameters), the direction is widened to where the residual has
actually risen by 9 s^2 (3 sigma); and the least determined direction is followed as a
profile (the other parameters re-fitted at each step) to the same rise, so that a curved
valley is not cut short: each parameter's uncertainty is at least a third of its
excursion there. Directions the data do not determine (a singular value
of J below 1e-10 of the largest) get an infinite uncertainty, never a pseudo-inverse's
zero. A parameter whose multiple correlation with the others exceeds ``SEPARABLE_LIMIT``
is reported as not separable (e.g. Df against roughness against conductivity over a
narrow band, or Huray radius against surface ratio where the skin depth is much larger
than the radius): the fit then says so and the uncertainties are large, rather than a
confident value. The fit starts from the section's values and from a few fixed points
spread over typical ranges (local minima exist: Hammerstad's roughness saturates); a
distinct start that ends as well as the best, within the noise, also marks the
parameters as not separable.

With uncertainty weighting a chi-square per degree of freedom above ``CHI2_LIMIT`` is
reported as a model that misses the data (a wrong fixed parameter, foil model or
geometry): the uncertainties then describe the noise, not that error.

Points used: those inside the band whose branch was resolved (no "branch" flag); with
uncertainty weighting the noisy ("ill-conditioned") points are kept, at their low weight;
with relative weighting only unflagged points are used. The default band is the
extraction's usable band.

The fitted materials can be written as a library TOML text (``[dielectrics.NAME]``,
``[foils.NAME]``) that :func:`losslane.materials.library.load_library` reads back.
"""

from __future__ import annotations

import json
import re
import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, replace

import numpy as np

from losslane.errors import LossLaneError, LossLaneWarning, warn
from losslane.materials.conductor import Conductor
from losslane.materials.dielectric import Dielectric, WidebandDebye
from losslane.materials.roughness import Groiss, Hammerstad, Huray, Roughness, Smooth
from losslane.measure.extract import BRANCH
from losslane.units import INCH
from losslane.xsection.base import CrossSection
from losslane.xsection.rlgc import C0, NP_TO_DB

__all__ = [
    "BOUNDS",
    "PARAMETERS",
    "MaterialFit",
    "fit_materials",
    "line_constants",
    "with_materials",
]

PARAMETERS = ("dk", "df", "rq", "radius", "surface_ratio", "conductivity")
BOUNDS = {
    "dk": (2.0, 20.0),
    "df": (1e-5, 0.05),
    "rq": (1e-9, 20e-6),
    "radius": (1e-8, 20e-6),
    "surface_ratio": (0.0, 20.0),
    "conductivity": (1e5, 1e9),
}
"""Search bounds (SI). Dk >= 2 and Df <= 0.05 keep the wideband Debye model's
high-frequency permittivity above 1 for any ``at`` between 1 MHz and 100 GHz."""
_LOG = {"df", "rq", "radius", "conductivity"}
_JSON_KEY = {
    "dk": "dk",
    "df": "df",
    "rq": "rq_m",
    "radius": "radius_m",
    "surface_ratio": "surface_ratio",
    "conductivity": "conductivity_s_per_m",
}
FOIL_PARAMETERS = {
    "none": (),
    "hammerstad": ("rq",),
    "groiss": ("rq",),
    "huray": ("radius", "surface_ratio"),
}
TYPICAL_START = {"rq": 1e-6, "radius": 0.5e-6, "surface_ratio": 1.5}
"""Starting roughness when the section's foil is of another model (typical values)."""
DEFAULT_AT = 10e9
SEPARABLE_LIMIT = 0.999
CHI2_LIMIT = 4.0
"""Chi-square per degree of freedom above which (uncertainty weighting) the model is said
to miss the data by more than their noise."""
_SINGULAR = 1e-10


# ---------------------------------------------------------------- model side


def with_materials(
    section: CrossSection,
    dielectric: Dielectric | None = None,
    foil: Roughness | None = None,
    conductor: Conductor | None = None,
) -> CrossSection:
    """``section`` rebuilt with another dielectric, signal foil and/or conductor (None:
    keep). The return planes keep their own foil when ``metal.plane_foil`` is set, else
    they follow the signal foil. The one place that knows how a section is rebuilt."""
    metal = section.metal
    changes = {}
    if foil is not None:
        changes["foil"] = foil
    if conductor is not None:
        changes["conductor"] = conductor
    if changes:
        metal = replace(metal, **changes)
    if dielectric is not None:
        return section.replace(dielectric=dielectric, metal=metal)
    return section.replace(metal=metal)


def line_constants(
    section: CrossSection, f: np.ndarray, mode: str = "single-ended"
) -> tuple[np.ndarray, np.ndarray]:
    """(alpha in Np/m, eps_eff = Re(-(gamma c0/omega)^2)) of ``section`` at ``f`` (Hz, > 0),
    from its R, L, G, C; ``mode`` "single-ended" for a single line, "differential" or
    "common" for a symmetric pair."""
    f = np.asarray(f, float)
    rl = section.rlgc(f)
    if rl.n == 1:
        if mode != "single-ended":
            raise LossLaneError(f"mode = {mode!r} needs a pair; this section has one strip")
        r, l, g, c = rl.scalar()
    elif rl.n == 2:
        signs = {"differential": -1.0, "common": 1.0}
        if mode not in signs:
            raise LossLaneError(
                f"mode = {mode!r} does not fit a pair; use 'differential' or 'common'"
            )
        sg = signs[mode]
        r, l, g, c = (m[:, 0, 0] + sg * m[:, 0, 1] for m in (rl.r, rl.l, rl.g, rl.c))
    else:
        raise LossLaneError(f"sections of {rl.n} conductors are not supported here")
    omega = 2 * np.pi * f
    gamma = np.sqrt((r + 1j * omega * l) * (g + 1j * omega * c))
    return gamma.real, (-((gamma * C0 / omega) ** 2)).real


def _foil_model(foil: Roughness) -> str:
    return getattr(foil, "model", "none")


def _make_foil(model: str, values: Mapping[str, float], matte: float) -> Roughness:
    if model == "hammerstad":
        return Hammerstad(values["rq"])
    if model == "groiss":
        return Groiss(values["rq"])
    if model == "huray":
        return Huray.from_surface_ratio(values["radius"], values["surface_ratio"], matte)
    return Smooth()


# ---------------------------------------------------------------- result


@dataclass(frozen=True, eq=False)
class MaterialFit:
    """The fitted materials and how well they are determined.

    ``section``: the cross-section rebuilt with them; ``dielectric``, ``foil``,
    ``conductivity`` (S/m); ``values`` every parameter of the model (fitted and fixed, SI);
    ``vary`` the fitted ones, ``uncertainty`` their standard uncertainties (inf where the
    data do not determine them), ``correlation`` (n x n) and ``multiple_correlation`` (each
    parameter against all the others); ``separable`` False when a multiple correlation
    exceeds ``SEPARABLE_LIMIT``, a parameter is undetermined, or a distinct start ends as
    well as the best;
    ``at_bound`` the fitted parameters that ended on a search bound. ``f`` and the
    measured/model curves are the band's points used; ``residual_db_per_in`` is the RMS
    of the loss difference there; ``chi2_per_dof`` the weighted residual per degree of
    freedom (about 1 when the model fits within the data's noise; with "relative"
    weighting only a relative figure).
    """

    section: CrossSection
    dielectric: Dielectric
    foil: Roughness
    conductivity: float
    values: dict
    vary: tuple[str, ...]
    uncertainty: dict
    correlation: np.ndarray
    multiple_correlation: np.ndarray
    separable: bool
    at_bound: tuple[str, ...]
    band_hz: tuple[float, float]
    mode: str
    f: np.ndarray
    alpha_measured: np.ndarray
    eps_measured: np.ndarray
    alpha_model: np.ndarray
    eps_model: np.ndarray
    at_hz: float
    weighting: str
    chi2_per_dof: float = float("nan")
    sources: tuple[str, ...] = ()

    @property
    def residual_db_per_in(self) -> float:
        d = (self.alpha_model - self.alpha_measured) * NP_TO_DB * INCH
        return float(np.sqrt(np.mean(d**2)))

    @property
    def residual_max_db_per_in(self) -> float:
        d = (self.alpha_model - self.alpha_measured) * NP_TO_DB * INCH
        return float(np.max(np.abs(d)))

    @property
    def residual_eps_eff(self) -> float:
        return float(np.sqrt(np.mean((self.eps_model - self.eps_measured) ** 2)))

    def foil_json(self) -> dict:
        model = _foil_model(self.foil)
        out: dict = {"model": model}
        if model in ("hammerstad", "groiss"):
            out["rq_m"] = float(self.foil.rq)
        elif model == "huray" and len(self.foil.spheres) == 1:
            (radius, ratio), *_ = self.foil.spheres
            out.update(
                radius_m=float(radius),
                surface_ratio=float(ratio),
                matte_ratio=float(self.foil.matte_ratio),
            )
        else:  # a foil held fixed: its own parameters (several sphere sizes, a finish)
            out.update(self.foil.parameters())
        return out

    def to_json(self) -> dict:
        dk, df = self.dielectric.dk_df(np.array([self.at_hz]))
        names = list(self.vary)
        return {
            "dielectric": {
                "dk": float(dk[0]),
                "df": float(df[0]),
                "at_hz": self.at_hz,
                "model": self.dielectric.model,
            },
            "foil": self.foil_json(),
            "conductivity_s_per_m": self.conductivity,
            "uncertainty": {
                _JSON_KEY[k]: (float(v) if np.isfinite(v) else None)
                for k, v in self.uncertainty.items()
            },
            "vary": names,
            "correlation": {
                "parameters": names,
                "matrix": [
                    [float(v) if np.isfinite(v) else None for v in row] for row in self.correlation
                ],
            },
            "separable": self.separable,
            "at_bound": list(self.at_bound),
            "residual_db_per_in": self.residual_db_per_in,
            "residual_max_db_per_in": self.residual_max_db_per_in,
            "residual_eps_eff": self.residual_eps_eff,
            "band_hz": list(self.band_hz),
            "points": int(self.f.size),
            "mode": self.mode,
            "weighting": self.weighting,
            "chi2_per_dof": _finite(self.chi2_per_dof),
            "curves": {
                "frequencies_hz": self.f.tolist(),
                "measured_loss_db_per_in": (self.alpha_measured * NP_TO_DB * INCH).tolist(),
                "model_loss_db_per_in": (self.alpha_model * NP_TO_DB * INCH).tolist(),
                "measured_eps_eff": self.eps_measured.tolist(),
                "model_eps_eff": self.eps_model.tolist(),
            },
        }

    def library_toml(
        self, dielectric_name: str = "fitted", foil_name: str = "fitted-foil", note: str = ""
    ) -> str:
        """The fitted dielectric and foil as a library TOML text ([dielectrics.NAME],
        [foils.NAME]); a fitted conductivity, which the library has no key for, is written
        as a comment. Read it with ``load_library([path])`` or a scenario's ``library``."""
        dk, df = self.dielectric.dk_df(np.array([self.at_hz]))
        band = f"{self.band_hz[0] / 1e9:g}-{self.band_hz[1] / 1e9:g} GHz"
        text_note = note or f"fitted to measured coupons over {band}"
        if self.sources:
            text_note += " (" + ", ".join(self.sources) + ")"
        lines = [
            "# Written by losslane (measure.fit): materials fitted to an extracted line.",
            f"# band {band}, {self.f.size} points, mode {self.mode}; RMS loss residual "
            f"{self.residual_db_per_in:.3g} dB/in, RMS eps_eff residual "
            f"{self.residual_eps_eff:.3g}",
        ]
        for k in self.vary:
            u = self.uncertainty[k]
            shown = f"{u:.3g}" if np.isfinite(u) else "undetermined"
            lines.append(f"# {k} = {self.values[k]:.6g} +- {shown} (1 sigma)")
        if not self.separable:
            lines.append("# WARNING: some fitted parameters could not be separated over the band")
        if "conductivity" in self.vary:
            lines.append(
                f"# conductivity = {self.conductivity:.6g} S/m (no library key: give it to the "
                "line's metal)"
            )
        lines += [
            "",
            f"[dielectrics.{_toml_key(dielectric_name)}]",
            f"dk = {float(dk[0])!r}",
            f"df = {float(df[0])!r}",
            f'at = "{_exact_text(self.at_hz, FREQUENCY_UNITS)}"',
            f'model = "{self.dielectric.model}"',
            f"note = {json.dumps(text_note)}",
        ]
        model = _foil_model(self.foil)
        if model in FOIL_PARAMETERS:
            lines += ["", f"[foils.{_toml_key(foil_name)}]", f'model = "{model}"']
            if model in ("hammerstad", "groiss"):
                lines.append(f'rq = "{_exact_text(self.foil.rq, LENGTH_UNITS)}"')
            elif model == "huray":
                spheres = [
                    f'{{ radius = "{_exact_text(a, LENGTH_UNITS)}", surface_ratio = {float(r)!r} }}'
                    for a, r in self.foil.spheres
                ]
                if len(spheres) == 1:
                    (radius, ratio), *_ = self.foil.spheres
                    lines.append(f'radius = "{_exact_text(radius, LENGTH_UNITS)}"')
                    lines.append(f"surface_ratio = {float(ratio)!r}")
                else:
                    lines.append("spheres = [" + ", ".join(spheres) + "]")
                if self.foil.matte_ratio != 1.0:
                    lines.append(f"matte_ratio = {float(self.foil.matte_ratio)!r}")
            lines.append(f"note = {json.dumps(text_note)}")
        else:
            lines.append(f"# the foil (model {model!r}) was held fixed and is not written")
        return "\n".join(lines) + "\n"


FREQUENCY_UNITS = (("GHz", 1e9), ("MHz", 1e6), ("kHz", 1e3), ("Hz", 1.0))
LENGTH_UNITS = (("um", 1e-6), ("m", 1.0))


def _exact_text(value: float, units) -> str:
    """``value`` written in the first unit whose number reads back to exactly ``value``
    (the unit parser multiplies the number by the unit's factor)."""
    for name, factor in units:
        number = float(repr(value / factor))
        if number * factor == value:
            return f"{number!r} {name}"
    return f"{value!r} {units[-1][0]}"


def _finite(v: float) -> float | None:
    return float(v) if np.isfinite(v) else None


def _toml_key(name: str) -> str:
    if not name:
        raise LossLaneError("library name = '' is not valid; give a non-empty name")
    return name if re.fullmatch(r"[A-Za-z0-9_-]+", name) else json.dumps(name)


# ---------------------------------------------------------------- fitting


def _measured(measured, band, mode):
    """(f, alpha, eps, sigma_alpha, sigma_eps, mode, band, weighting_ok, sources)."""
    from losslane.measure.extract import LineExtraction

    if isinstance(measured, LineExtraction):
        f, alpha, eps = measured.f, measured.alpha, measured.eps_eff
        ua, ue = measured.u_alpha, measured.u_eps_eff
        use = np.array([BRANCH not in q for q in measured.quality], dtype=bool)
        ok = measured.ok
        mode = mode or measured.mode
        default_band = measured.usable_band_hz
        sources = measured.sources
        if mode != measured.mode:
            raise LossLaneError(
                f"mode = {mode!r} differs from the extraction's mode {measured.mode!r}"
            )
    else:
        if not isinstance(measured, tuple | list) or len(measured) not in (3, 5):
            raise LossLaneError(
                "measured: give a LineExtraction or a tuple (f, alpha_np_per_m, eps_eff"
                "[, u_alpha, u_eps])"
            )
        arrs = [np.asarray(a, float).ravel() for a in measured]
        f, alpha, eps = arrs[:3]
        if not all(a.shape == f.shape for a in arrs):
            raise LossLaneError("measured: f, alpha, eps_eff (and uncertainties) differ in length")
        ua, ue = (arrs[3], arrs[4]) if len(arrs) == 5 else (None, None)
        use = np.ones(f.size, dtype=bool)
        ok = use
        mode = mode or "single-ended"
        default_band = None
        sources = ()
    if band is None:
        band = default_band if default_band is not None else (float(f[0]), float(f[-1]))
    lo, hi = (float(b) for b in band)
    if not (np.isfinite(lo) and np.isfinite(hi) and 0 < lo < hi):
        raise LossLaneError(f"band = {band!r} Hz is not valid; give start < stop, both > 0")
    sel = use & (f >= lo * (1 - 1e-12)) & (f <= hi * (1 + 1e-12))
    sel &= np.isfinite(alpha) & np.isfinite(eps)
    if ua is not None:
        sel &= np.isfinite(ua) & np.isfinite(ue) & (ua > 0) & (ue > 0)
    return f, alpha, eps, ua, ue, sel, ok, mode, (lo, hi), sources


def _own_foil_values(foil: Roughness) -> dict:
    model = _foil_model(foil)
    if model in ("hammerstad", "groiss"):
        return {"rq": float(foil.rq)}
    if model == "huray" and len(foil.spheres) == 1:
        return {"radius": float(foil.spheres[0][0]), "surface_ratio": float(foil.spheres[0][1])}
    return {}


def _start_values(section, at, foil_model, start):
    vals: dict[str, float] = {}
    dk, df = section.dielectric.dk_df(np.array([at]))
    vals["dk"], vals["df"] = float(dk[0]), float(df[0])
    if _foil_model(section.metal.foil) == foil_model:
        vals.update(_own_foil_values(section.metal.foil))
    for k in FOIL_PARAMETERS.get(foil_model, ()):
        vals.setdefault(k, TYPICAL_START[k])
    vals["conductivity"] = float(section.metal.conductor.sigma)
    for k, v in (start or {}).items():
        if k not in PARAMETERS:
            raise LossLaneError(f"start: unknown parameter {k!r}; valid: {', '.join(PARAMETERS)}")
        vals[k] = float(v)
    return vals


def fit_materials(
    measured,
    section: CrossSection,
    vary: Sequence[str] = ("dk", "df", "rq"),
    *,
    band: tuple[float, float] | None = None,
    at: float | None = None,
    foil_model: str | None = None,
    mode: str | None = None,
    start: Mapping[str, float] | None = None,
    weighting: str | None = None,
    restarts: int = 4,
) -> MaterialFit:
    """Fit the materials of ``section`` to ``measured`` (see the module docstring).

    ``measured``: a :class:`~losslane.measure.extract.LineExtraction` (its unflagged points
    inside ``band``, default its usable band) or a tuple ``(f, alpha [Np/m], eps_eff[,
    u_alpha, u_eps])``. ``vary``: any of "dk", "df" (the dielectric, at ``at`` Hz: default
    the section's wideband Debye frequency, else 10 GHz), "rq" (Hammerstad/Groiss),
    "radius", "surface_ratio" (Huray), "conductivity"; the rest stay as the section has
    them. ``foil_model`` ("none", "hammerstad", "groiss", "huray"; default the section's)
    chooses the roughness model to fit. ``start`` overrides starting values (SI).
    ``weighting``: "uncertainty" (default when uncertainties are given) or "relative".
    ``restarts``: extra starting points (a fixed Halton pattern over typical ranges) tried
    besides the given start; the lowest residual wins, and a distinct start ending as good
    as the best (within the noise) marks the parameters as not separable.
    """
    from scipy.optimize import least_squares

    vary = tuple(dict.fromkeys(vary))
    for k in vary:
        if k not in PARAMETERS:
            raise LossLaneError(f"vary: unknown parameter {k!r}; valid: {', '.join(PARAMETERS)}")
    if not vary:
        raise LossLaneError("vary: give at least one parameter to fit")
    foil_model = foil_model or _foil_model(section.metal.foil)
    if foil_model not in FOIL_PARAMETERS:
        raise LossLaneError(
            f"foil_model = {foil_model!r} cannot be fitted; valid: {', '.join(FOIL_PARAMETERS)}"
        )
    foil_keys = FOIL_PARAMETERS[foil_model]
    for k in vary:
        if k in ("rq", "radius", "surface_ratio") and k not in foil_keys:
            valid = ", ".join(foil_keys) or "none"
            raise LossLaneError(
                f"vary: {k!r} is not a parameter of the {foil_model!r} roughness model "
                f"(its parameters: {valid}); choose foil_model or another parameter"
            )
    foil = section.metal.foil
    if foil_model == "huray" and isinstance(foil, Huray) and len(foil.spheres) != 1:
        if set(foil_keys) & set(vary):
            raise LossLaneError(
                f"vary: the Huray fit takes one sphere size; the section's foil has "
                f"{len(foil.spheres)} (hold radius and surface_ratio fixed, or start from "
                "a one-size foil)"
            )
    replaced = foil_model != _foil_model(foil)
    if replaced and foil_keys and not (set(foil_keys) & (set(vary) | set(start or {}))):
        raise LossLaneError(
            f"foil_model = {foil_model!r} replaces the section's {_foil_model(foil)!r} foil: "
            f"vary its parameters ({', '.join(foil_keys)}) or give them in start"
        )
    if at is None:
        diel = section.dielectric
        at = float(diel.at) if isinstance(diel, WidebandDebye) else DEFAULT_AT
    at = float(at)

    f_all, alpha, eps, ua, ue, sel, ok, mode, band_hz, sources = _measured(measured, band, mode)
    if weighting is None:
        weighting = "uncertainty" if ua is not None else "relative"
    if weighting not in ("uncertainty", "relative"):
        raise LossLaneError(
            f"weighting = {weighting!r} is not valid; use 'uncertainty' or 'relative'"
        )
    if weighting == "uncertainty" and ua is None:
        raise LossLaneError("weighting = 'uncertainty' needs the measurement's uncertainties")
    if weighting == "relative":
        sel = sel & ok  # without uncertainties, noisy points would weigh as much as good ones
    f = f_all[sel]
    n_par = len(vary)
    if 2 * f.size <= n_par:
        raise LossLaneError(
            f"band = {band_hz[0]:g}..{band_hz[1]:g} Hz holds {f.size} usable point(s); "
            f"fitting {n_par} parameter(s) needs more"
        )
    a_meas, e_meas = alpha[sel], eps[sel]
    if weighting == "uncertainty":
        sa, se = ua[sel], ue[sel]
    else:
        sa, se = 0.01 * np.abs(a_meas) + 1e-12, 1e-3 * np.abs(e_meas)

    values = _start_values(section, at, foil_model, start)
    matte = float(getattr(section.metal.foil, "matte_ratio", 1.0))
    vary_diel = bool({"dk", "df"} & set(vary))
    vary_foil = bool(set(foil_keys) & set(vary)) or replaced
    vary_cond = "conductivity" in vary

    def build(vals: Mapping[str, float]) -> CrossSection:
        diel = WidebandDebye(vals["dk"], vals["df"], at, name="fitted") if vary_diel else None
        foil = _make_foil(foil_model, vals, matte) if vary_foil else None
        cond = replace(section.metal.conductor, sigma=vals["conductivity"]) if vary_cond else None
        return with_materials(section, diel, foil, cond)

    lower = np.array([_encode(k, BOUNDS[k][0]) for k in vary])
    upper = np.array([_encode(k, BOUNDS[k][1]) for k in vary])
    x0 = np.array([_encode(k, float(np.clip(values[k], *BOUNDS[k]))) for k in vary])
    x0 = np.clip(x0, lower + 1e-9 * (upper - lower), upper - 1e-9 * (upper - lower))

    def decode(x: np.ndarray) -> dict:
        vals = dict(values)
        vals.update({k: _decode(k, v) for k, v in zip(vary, x, strict=True)})
        return vals

    def residuals(x: np.ndarray) -> np.ndarray:
        am, em = line_constants(build(decode(x)), f, mode)
        return np.concatenate([(am - a_meas) / sa, (em - e_meas) / se])

    starts = [x0] + _restarts(vary, values, lower, upper, restarts)
    ends = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        for xs in starts:
            sol = least_squares(
                residuals,
                xs,
                bounds=(lower, upper),
                x_scale="jac",
                xtol=1e-12,
                ftol=1e-12,
                gtol=1e-12,
                max_nfev=100 * (n_par + 1),
            )
            ends.append((float(np.sum(sol.fun**2)), sol.x))
        ends.sort(key=lambda e: e[0])
        best_cost, x_best = ends[0]
        jac = _central_jacobian(residuals, x_best, lower, upper)
    final = decode(x_best)
    if not vary_foil:  # report only the parameters the section's own foil has
        for k in set(FOIL_PARAMETERS[foil_model]) - set(_own_foil_values(section.metal.foil)):
            final.pop(k, None)
    fitted = build(final)
    a_mod, e_mod = line_constants(fitted, f, mode)  # warnings of the fitted model, once

    m = 2 * f.size
    s2 = best_cost / max(m - n_par, 1)
    chi2 = s2
    if weighting == "uncertainty" and chi2 > CHI2_LIMIT:
        warn(
            f"fit over {band_hz[0]:g}..{band_hz[1]:g} Hz: the model misses the data by more "
            f"than their noise (chi-square per degree of freedom {chi2:.3g}); a parameter "
            "held fixed, the foil model or the cross-section may be wrong, and the "
            "uncertainties cover the noise only"
        )
    if weighting == "uncertainty":
        s2 = max(s2, 1.0)  # never tighter than the data's own stated noise
    cov_int = _covariance(jac, s2)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        cov_int = _widen(cov_int, residuals, x_best, best_cost, s2, lower, upper)
    sig_lin = np.sqrt(np.diag(cov_int))
    sig_int = sig_lin
    if n_par > 1 and np.all(np.isfinite(sig_int)):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", LossLaneWarning)
            reach = _profile_weakest(cov_int, residuals, x_best, best_cost, s2, lower, upper)
        sig_int = np.maximum(sig_int, reach / 3.0)
    unc = {}
    for i, k in enumerate(vary):
        scale = final[k] if k in _LOG else 1.0  # d value / d internal coordinate
        unc[k] = float(abs(scale) * sig_int[i])
    with np.errstate(invalid="ignore", divide="ignore"):
        corr = cov_int / np.outer(sig_lin, sig_lin)
    corr = np.where(np.isfinite(corr), corr, np.nan)
    np.fill_diagonal(corr, 1.0)
    multi = _multiple_correlation(corr)
    separable = bool(np.all(np.isfinite(sig_int)) and not np.any(multi > SEPARABLE_LIMIT))
    rivals = [
        x
        for cost, x in ends[1:]
        if (cost - best_cost) <= 4 * n_par * max(s2, 1e-300)
        and np.any(np.abs(x - x_best) > 3 * sig_int)
    ]
    if rivals:
        separable = False
    span = upper - lower
    at_bound = tuple(
        k
        for k, x, lo, hi, sp in zip(vary, x_best, lower, upper, span, strict=True)
        if min(x - lo, hi - x) < 1e-6 * sp
    )
    band_txt = f"{band_hz[0]:g}..{band_hz[1]:g} Hz"
    if not separable:
        pairs = []
        for i, k in enumerate(vary):
            if np.isfinite(unc[k]) and multi[i] > SEPARABLE_LIMIT:
                r = np.where(np.arange(n_par) == i, 0.0, np.abs(np.nan_to_num(corr[i])))
                j = int(np.argmax(r))
                pairs.append(
                    f"{k} (multiple correlation {multi[i]:.4f}; most with {vary[j]}, "
                    f"r = {corr[i, j]:.4f})"
                )
        undetermined = [k for k in vary if not np.isfinite(unc[k])]
        what = ", ".join(pairs + [f"{k} (undetermined)" for k in undetermined])
        if rivals:
            what = (what + "; " if what else "") + (
                f"{len(rivals)} distinct parameter set(s) fit as well as the best"
            )
        warn(
            f"fit over {band_txt}: the data cannot separate {what}; the uncertainties say "
            "how little is known -- widen the band or hold a parameter fixed"
        )
    if at_bound:
        warn(
            f"fit over {band_txt}: {', '.join(at_bound)} ended on a search bound "
            f"({', '.join(f'{k} in {BOUNDS[k]}' for k in at_bound)}); its uncertainty is "
            "not meaningful"
        )
    diel_out = fitted.dielectric
    return MaterialFit(
        section=fitted,
        dielectric=diel_out,
        foil=fitted.metal.foil,
        conductivity=float(fitted.metal.conductor.sigma),
        values=final,
        vary=vary,
        uncertainty=unc,
        correlation=corr,
        multiple_correlation=multi,
        separable=separable,
        at_bound=at_bound,
        band_hz=(float(f[0]), float(f[-1])),
        mode=mode,
        f=f,
        alpha_measured=a_meas,
        eps_measured=e_meas,
        alpha_model=a_mod,
        eps_model=e_mod,
        at_hz=at,
        weighting=weighting,
        chi2_per_dof=float(chi2),
        sources=tuple(sources),
    )


TYPICAL_RANGE = {
    "df": (1e-3, 0.03),
    "rq": (0.1e-6, 3e-6),
    "radius": (0.1e-6, 2e-6),
    "surface_ratio": (0.2, 4.0),
    "conductivity": (1e7, 6e7),
}
"""Where the restarts are spread (typical laminates and foils; Dk: the start +- 10 %)."""


def _restarts(vary, values, lower, upper, count: int) -> list[np.ndarray]:
    """``count`` deterministic starting points (Halton sequence, bases 2, 3, 5, ...)."""
    if count <= 0:
        return []
    primes = [2, 3, 5, 7, 11, 13]
    out = []
    for i in range(1, count + 1):
        x = []
        for d, k in enumerate(vary):
            u = _radical_inverse(i, primes[d % len(primes)])
            if k == "dk":
                lo, hi = 0.9 * values["dk"], 1.1 * values["dk"]
            else:
                lo, hi = TYPICAL_RANGE[k]
            x.append(_encode(k, lo) + u * (_encode(k, hi) - _encode(k, lo)))
        out.append(np.clip(np.array(x), lower, upper))
    return out


def _radical_inverse(i: int, base: int) -> float:
    r, inv = 0.0, 1.0 / base
    while i > 0:
        i, digit = divmod(i, base)
        r += digit * inv
        inv /= base
    return r


def _central_jacobian(fun, x: np.ndarray, lower, upper, step: float = 1e-6) -> np.ndarray:
    """Central differences of ``fun`` at ``x`` (one-sided at a bound)."""
    cols = []
    for i in range(x.size):
        h = step * max(1.0, abs(x[i]))
        xp, xm = x.copy(), x.copy()
        xp[i] = min(x[i] + h, upper[i])
        xm[i] = max(x[i] - h, lower[i])
        cols.append((fun(xp) - fun(xm)) / (xp[i] - xm[i]))
    return np.column_stack(cols)


def _widen(cov, fun, x0, cost0, s2, lower, upper) -> np.ndarray:
    """Widen the linearised covariance along each principal direction where the residual
    rises more slowly than its quadratic model: walking out from the solution, the
    distance where sum r^2 has risen by 9 s2 (3 sigma) sets that direction's sigma (never
    less than the linearised one). Catches flat, banana-shaped valleys."""
    if not np.all(np.isfinite(cov)):
        return cov
    lam, vecs = np.linalg.eigh(cov)
    target = 9.0 * s2
    new = lam.copy()

    def rise(v, t):
        x = np.clip(x0 + t * v, lower, upper)
        return float(np.sum(fun(x) ** 2)) - cost0, bool(np.any(x != x0 + t * v))

    for i in range(lam.size):
        if not lam[i] > 0:
            continue
        v = vecs[:, i]
        reach = 0.0
        for sign in (1.0, -1.0):
            lo, hi = 0.0, 3.0 * np.sqrt(lam[i]) * sign
            up, clipped = rise(v, hi)
            grown = 0
            while up < target and not clipped and grown < 6:
                lo, hi = hi, 2.0 * hi
                up, clipped = rise(v, hi)
                grown += 1
            if grown == 0:
                continue  # as steep as predicted, or steeper: keep the linearised sigma
            for _ in range(5):
                mid = 0.5 * (lo + hi)
                if rise(v, mid)[0] < target:
                    lo = mid
                else:
                    hi = mid
            reach = max(reach, abs(hi))
        new[i] = max(lam[i], (reach / 3.0) ** 2)
    return (vecs * new) @ vecs.T


def _profile_weakest(cov, fun, x0, cost0, s2, lower, upper) -> np.ndarray:
    """How far each parameter moves along the profile of the least determined direction:
    stepping along it, the other directions re-fitted at each step, out to where
    sum r^2 has risen by 9 s2 (3 sigma) on either side. Follows a curved valley that a
    straight line leaves. Returns the largest excursion per parameter (internal units)."""
    from scipy.optimize import least_squares

    lam, vecs = np.linalg.eigh(cov)
    k = int(np.argmax(lam))
    v = vecs[:, k]
    others = np.delete(vecs, k, axis=1)
    target = 9.0 * s2
    reach = np.zeros(x0.size)

    def profile(t: float, y0: np.ndarray) -> tuple[float, np.ndarray, np.ndarray]:
        def g(y):
            return fun(np.clip(x0 + t * v + others @ y, lower, upper))

        sol = least_squares(g, y0, x_scale="jac", max_nfev=50)
        x = np.clip(x0 + t * v + others @ sol.x, lower, upper)
        return float(np.sum(sol.fun**2)) - cost0, x, sol.x

    for sign in (1.0, -1.0):
        y = np.zeros(others.shape[1])
        lo, hi = 0.0, 3.0 * np.sqrt(lam[k]) * sign
        up, x_hi, y = profile(hi, y)
        grown = 0
        while up < target and grown < 6 and np.all((x_hi > lower) & (x_hi < upper)):
            lo, hi = hi, 2.0 * hi
            up, x_hi, y = profile(hi, y)
            grown += 1
        if grown:
            for _ in range(4):
                mid = 0.5 * (lo + hi)
                up_mid, x_mid, y_mid = profile(mid, y)
                if up_mid < target:
                    lo = mid
                else:
                    hi, x_hi, y = mid, x_mid, y_mid
        reach = np.maximum(reach, np.abs(x_hi - x0))
    return reach


def _multiple_correlation(corr: np.ndarray) -> np.ndarray:
    """R_i = sqrt(1 - 1 / (corr^-1)_ii): how well each parameter's estimate is explained by
    the others' (1 for an undetermined or linearly dependent one). Unlike the largest
    pairwise correlation it also catches a parameter traded against two others at once."""
    n = corr.shape[0]
    if n == 1:
        return np.zeros(1)
    out = np.ones(n)
    good = np.all(np.isfinite(corr), axis=1)
    if np.sum(good) >= 2:
        sub = corr[np.ix_(good, good)]
        try:
            inv_diag = np.diag(np.linalg.inv(sub))
        except np.linalg.LinAlgError:
            return out
        with np.errstate(divide="ignore", invalid="ignore"):
            r2 = np.where(inv_diag >= 1.0, 1.0 - 1.0 / inv_diag, 0.0)
        out[good] = np.sqrt(np.clip(r2, 0.0, 1.0))
    elif np.sum(good) == 1:
        out[good] = 0.0
    return out


def _encode(key: str, value: float) -> float:
    if key in _LOG:
        if not value > 0:
            raise LossLaneError(f"{key} = {value!r} must be > 0")
        return float(np.log(value))
    return float(value)


def _decode(key: str, x: float) -> float:
    return float(np.exp(x)) if key in _LOG else float(x)


def _covariance(jac: np.ndarray, s2: float) -> np.ndarray:
    """s2 (J^T J)^-1 from the SVD of J; directions with a singular value below _SINGULAR of
    the largest are undetermined (infinite variance), not dropped."""
    _, sv, vt = np.linalg.svd(np.asarray(jac, float), full_matrices=False)
    top = sv[0] if sv.size and sv[0] > 0 else 1.0
    with np.errstate(divide="ignore"):
        inv2 = np.where(sv > _SINGULAR * top, 1.0 / sv**2, np.inf)
    v = vt.T
    finite = np.isfinite(inv2)
    cov = (v * np.where(finite, inv2, 0.0)) @ v.T * s2
    if not np.all(finite):
        # every parameter that loads on an undetermined direction is undetermined
        bad = np.any(np.abs(v[:, ~finite]) > 1e-12, axis=1)
        cov[bad, :] = np.nan
        cov[:, bad] = np.nan
        cov[bad, bad] = np.inf
    return cov

"""Edge-coupled symmetric microstrip pair: two equal strips side by side over one plane.

A symmetric pair carries two quasi-TEM modes: the even mode (both strips at +V) and the
odd mode (+V, -V). Each has its own per-line impedance Z_e, Z_o and effective
permittivity; Z_diff = 2 Z_o, Z_common = Z_e / 2. Each mode is assembled like a single
line (``assemble_mode``), and the 2x2 R, L, G, C follow from the two modes
(``base.pair_rlgc``).

Methods and validity (the formulas below are written from memory of the published papers
and checked in tests/test_coupled*.py against independent numerical solutions and the
single-line limits -- see the tests for the measured agreement):

microstrip-pair
  * quasi-static even/odd eps_eff and Z0 (zero thickness): M. Kirschning and R. H. Jansen,
    "Accurate wide-range design equations for the frequency-dependent characteristic of
    parallel coupled microstrip lines", IEEE Trans. MTT 32(1), 1984, with the correction
    in IEEE Trans. MTT 33(3), 1985; built on the single strip's Hammerstad-Jensen Z0 and
    eps_eff. Stated (from memory) accurate to about 1 % for 0.1 <= w/h <= 10,
    0.1 <= s/h <= 10, 1 <= eps_r <= 18.
  * dispersion of both modes' eps_eff and Z0: the same paper; the single strip's
    Kirschning-Jansen eps_eff(f) and Jansen-Kirschning Z0(f) enter the even/odd impedance
    formulas. Range (from memory) f * h <= 15 GHz mm.
  * strip thickness: Hammerstad-Jensen's single-strip width increment, reduced for the
    coupled strip by the effective-width factor of R. H. Jansen, "High-speed computation
    of single and coupled microstrip parameters including dispersion, high-order modes,
    loss and finite strip thickness", IEEE Trans. MTT 26(2), 1978 (from memory), used in
    Hammerstad-Jensen's two-width form, plus the odd mode's side-wall capacitance
    2 eps0 t/s of the coupled-microstrip capacitance models (Garg and Bahl, IEEE Trans.
    MTT 27(7), 1979); see ``mode_capacitances``. For s -> infinity both modes become
    losslane's single ``Microstrip`` exactly. Checked against a finite-difference solution
    for t/h <= 0.35 (see the tests); meant for t/h <= 0.5.

Conductor loss of each mode follows Wheeler's incremental-inductance rule applied to that
mode's own air-filled impedance function (strip walls and plane walls receding); the strip
depth G * w * t makes the DC resistance of a strip 1/(sigma w t) in both modes.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, ClassVar

import numpy as np
from numpy.typing import ArrayLike

from losslane.materials.dielectric import Dielectric
from losslane.xsection.base import (
    PAIR_MODES,
    CrossSection,
    Metal,
    strip_and_planes,
    strip_loss_modelled,
)
from losslane.xsection.fitted import Axis, StaticCorrection
from losslane.xsection.microstrip import (
    Microstrip,
    dispersion_terms,
    eps_eff_dispersive,
    eps_eff_thin,
    widened_ratios,
    z0_dispersion_exponent,
    z0_dispersive,
    z_air_thin,
)
from losslane.xsection.rlgc import ETA0, ConductorGroup, Mode, assemble_mode
from losslane.xsection.validity import Limit, Quantities, dk

if TYPE_CHECKING:
    from losslane.xsection.fieldsolve.geometry import Geometry


def static_eps_thin(u: ArrayLike, g: ArrayLike, er: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """Kirschning-Jansen quasi-static (eps_e, eps_o) of a zero-thickness coupled pair,
    u = w/h, g = s/h (u, g and eps_r broadcast)."""
    u = np.asarray(u, float)
    er = np.asarray(er, float)
    eps0 = eps_eff_thin(u, er)
    # even mode: the single-strip formula at a coupling-dependent width v
    v = u * (20.0 + g * g) / (10.0 + g * g) + g * np.exp(-g)
    eps_e = eps_eff_thin(v, er)
    a_o = 0.7287 * (eps0 - (er + 1.0) / 2.0) * (1.0 - np.exp(-0.179 * u))
    b_o = 0.747 * er / (0.15 + er)
    c_o = b_o - (b_o - 0.207) * np.exp(-0.414 * u)
    d_o = 0.593 + 0.694 * np.exp(-0.562 * u)
    eps_o = ((er + 1.0) / 2.0 + a_o - eps0) * np.exp(-c_o * g**d_o) + eps0
    return eps_e, eps_o


def _log_ratio(g: ArrayLike, g0: float) -> np.ndarray:
    """ln(g^10 / (1 + (g/g0)^10)) without overflow for wide gaps."""
    lg = 10.0 * np.log(g)
    return lg - np.logaddexp(0.0, lg - 10.0 * np.log(g0))


def coupling_terms(u: ArrayLike, g: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """Kirschning-Jansen coupling terms (Q4, Q10) of the even and odd impedances."""
    u = np.asarray(u, float)
    g = np.asarray(g, float)
    q1 = 0.8695 * u**0.194
    q2 = 1.0 + 0.7519 * g + 0.189 * g**2.31
    q3 = 0.1975 + (16.6 + (8.4 / g) ** 6) ** -0.387 + _log_ratio(g, 3.4) / 241.0
    q4 = 2.0 * q1 / q2 / (np.exp(-g) * u**q3 + (2.0 - np.exp(-g)) * u**-q3)
    q5 = 1.794 + 1.14 * np.log(1.0 + 0.638 / (g + 0.517 * g**2.43))
    q6 = 0.2305 + _log_ratio(g, 5.8) / 281.3 + np.log(1.0 + 0.598 * g**1.154) / 5.1
    q7 = (10.0 + 190.0 * g * g) / (1.0 + 82.3 * g**3)
    q8 = np.exp(-6.5 - 0.95 * np.log(g) - (g / 0.15) ** 5)
    q9 = np.log(q7) * (q8 + 1.0 / 16.5)
    q10 = q4 - q5 / q2 * np.exp(q6 * np.log(u) * u**-q9)
    return q4, q10


def static_modes_thin(
    u: ArrayLike, g: ArrayLike, er: ArrayLike
) -> dict[str, tuple[np.ndarray, np.ndarray]]:
    """Kirschning-Jansen quasi-static {mode: (Z0, eps_eff)} of a zero-thickness pair."""
    u = np.asarray(u, float)
    er = np.asarray(er, float)
    eps_e, eps_o = static_eps_thin(u, g, er)
    z_air = z_air_thin(u)  # the single strip's Z_L(0) sqrt(eps_eff(0))
    q4, q10 = coupling_terms(u, g)
    # Z_m = Z_L(0) sqrt(eps_eff(0)/eps_m) / (1 - Z_L(0) sqrt(eps_eff(0)) Q / eta0): the
    # denominator depends on the geometry only, so Z_m sqrt(eps_m) is the mode's air
    # impedance, as a TEM-like mode requires.
    za_e = z_air / (1.0 - z_air / ETA0 * q4)
    za_o = z_air / (1.0 - z_air / ETA0 * q10)
    return {"even": (za_e / np.sqrt(eps_e), eps_e), "odd": (za_o / np.sqrt(eps_o), eps_o)}


def pair_widened_ratios(
    u: ArrayLike, g: ArrayLike, t_h: ArrayLike, er: ArrayLike
) -> tuple[np.ndarray, np.ndarray]:
    """Thickness-widened width ratios of a coupled strip: (air, dielectric).

    Hammerstad-Jensen's single-strip increments du (air: du_1, dielectric: du_r) reduced
    by Jansen's (1978) coupled-strip factor 1 - 0.5 exp(-0.69 du/dt): for a narrow gap
    the facing side walls no longer add fringing field of their own, so only the outer
    edge's half of the increment survives. dt is taken as t/s for both width sets (the
    form remembered from the paper, t/(eps_r s) for the dielectric set, overstates the
    widening by 1-3 % in Z against the finite-difference check in the tests). No widening
    where t_h <= 0.
    """
    u = np.asarray(u, float)
    t_h = np.asarray(t_h, float)
    u1, ur = widened_ratios(u, t_h, er)
    # du/dt = (du/t_h) * g, written so that tiny thicknesses stay finite (du = 0 at t = 0)
    th = np.where(t_h > 0, t_h, 1.0)
    k1 = (u1 - u) / th * g
    kr = (ur - u) / th * g
    return (
        u + (u1 - u) * (1.0 - 0.5 * np.exp(-0.69 * k1)),
        u + (ur - u) * (1.0 - 0.5 * np.exp(-0.69 * kr)),
    )


def mode_capacitances(
    mode: str, w: ArrayLike, s: ArrayLike, h: ArrayLike, t: ArrayLike, er: ArrayLike
) -> tuple[np.ndarray, np.ndarray]:
    """Normalised capacitances (C_air/eps0, C/eps0) of one mode of the thick pair.

    Kirschning-Jansen at the widened ratios (``pair_widened_ratios``) in Hammerstad-Jensen's two-
    width form -- the air widths give C_air, the dielectric widths the geometric mean
    sqrt(C C_air) -- plus, in the odd mode, the capacitance of the facing side walls to
    the symmetry plane, 2 eps0 t/s, which lies in air (the gap-capacitance term of
    R. Garg and I. J. Bahl, "Characteristics of coupled microstriplines", IEEE Trans.
    MTT 27(7), 1979; K. C. Gupta et al., *Microstrip Lines and Slotlines*, 2nd ed., 1996,
    from memory).
    """
    w, s, h, t, er = (np.asarray(v, float) for v in (w, s, h, t, er))
    u, g = w / h, s / h
    ua, ud = pair_widened_ratios(u, g, t / h, er)
    k_air = ETA0 / static_modes_thin(ua, g, 1.0)[mode][0]
    z, eps = static_modes_thin(ud, g, er)[mode]
    k_mean = ETA0 / z
    k_diel = k_mean**2 / k_air
    if mode == "odd":
        side = 2.0 * t / s  # nothing at t = 0
        k_air = k_air + side
        k_diel = k_diel + side
    return np.broadcast_to(k_air, k_diel.shape), k_diel


def mode_z_air(mode: str, w: ArrayLike, s: ArrayLike, h: ArrayLike, t: ArrayLike) -> np.ndarray:
    """Air-filled impedance of one mode of the microstrip pair (thickness included): the
    incremental-inductance base of the mode's conductor loss."""
    k_air, _ = mode_capacitances(mode, w, s, h, t, 1.0)
    return ETA0 / k_air


def static_modes(
    w: ArrayLike, s: ArrayLike, h: ArrayLike, t: ArrayLike, er: ArrayLike
) -> dict[str, tuple[np.ndarray, np.ndarray]]:
    """{mode: (Z0, eps_eff)} quasi-static with strip thickness (``mode_capacitances``);
    Z0 = eta0 / sqrt(k_air k), eps_eff = k / k_air."""
    out = {}
    for mode in PAIR_MODES:
        k_air, k = mode_capacitances(mode, w, s, h, t, er)
        out[mode] = (ETA0 / np.sqrt(k_air * k), k / k_air)
    return out


def dispersive_eps(
    u: ArrayLike, g: ArrayLike, er: ArrayLike, eps_e0: ArrayLike, eps_o0: ArrayLike, fn: ArrayLike
) -> tuple[np.ndarray, np.ndarray]:
    """Kirschning-Jansen eps_e(f), eps_o(f) from the quasi-static values; fn = f[GHz] h[mm]."""
    p1, p2, p3, p4 = dispersion_terms(u, er, fn)
    p5 = 0.334 * np.exp(-3.3 * (er / 15.0) ** 3) + 0.746
    p6 = p5 * np.exp(-((fn / 18.0) ** 0.368))
    p7 = 1.0 + 4.069 * p6 * g**0.479 * np.exp(-1.347 * g**0.595 - 0.17 * g**2.5)
    f_e = p1 * p2 * ((p3 * p4 + 0.1844 * p7) * fn) ** 1.5763
    p8 = 0.7168 * (1.0 + 1.076 / (1.0 + 0.0576 * (er - 1.0)))
    p9 = p8 - 0.7913 * (1.0 - np.exp(-((fn / 20.0) ** 1.424))) * np.arctan(
        2.481 * (er / 8.0) ** 0.946
    )
    p10 = 0.242 * np.maximum(er - 1.0, 0.0) ** 0.55
    p11 = 0.6366 * (np.exp(-0.3401 * fn) - 1.0) * np.arctan(1.263 * (u / 3.0) ** 1.629)
    p12 = p9 + (1.0 - p9) / (1.0 + 1.183 * u**1.376)
    p13 = 1.695 * p10 / (0.414 + 1.605 * p10)
    p14 = 0.8928 + 0.1072 * (1.0 - np.exp(-0.42 * (fn / 20.0) ** 3.215))
    p15 = np.abs(1.0 - 0.8928 * (1.0 + p11) * p12 * np.exp(-p13 * g**1.092) / p14)
    f_o = p1 * p2 * ((p3 * p4 + 0.1844) * fn * p15) ** 1.5763
    eps_e = er - (er - eps_e0) / (1.0 + f_e)
    eps_o = er - (er - eps_o0) / (1.0 + f_o)
    return eps_e, eps_o


def dispersive_z(
    u: ArrayLike,
    g: ArrayLike,
    er: ArrayLike,
    fn: ArrayLike,
    z_e0: ArrayLike,
    z_o0: ArrayLike,
    eps_o0: ArrayLike,
    eps_of: ArrayLike,
    single: tuple[ArrayLike, ArrayLike, ArrayLike, ArrayLike],
) -> tuple[np.ndarray, np.ndarray]:
    """Kirschning-Jansen Z_e(f), Z_o(f). ``single`` = (Z0(0), eps_eff(0), Z0(f), eps_eff(f))
    of the single strip of the same width (Hammerstad-Jensen, Kirschning-Jansen,
    Jansen-Kirschning)."""
    _, eps0, z0f, epsf = single
    em1 = np.maximum(er - 1.0, 0.0)
    # even mode: the single strip's Z0(f) law with coupling-dependent exponent C_e
    q11 = 0.893 * (1.0 - 0.3 / (1.0 + 0.7 * em1))
    x = (fn / 20.0) ** 4.91
    q12 = 2.121 * x / (1.0 + q11 * x) * np.exp(-2.87 * g) * g**0.902
    q13 = 1.0 + 0.038 * (er / 8.0) ** 5.1
    q14 = 1.0 + 1.203 * (er / 15.0) ** 4 / (1.0 + (er / 15.0) ** 4)
    q15 = (
        1.887
        * np.exp(-1.5 * g**0.84)
        * g**q14
        / (1.0 + 0.41 * (fn / 15.0) ** 3 * u ** (2.0 / q13) / (0.125 + u ** (1.626 / q13)))
    )
    q16 = q15 * (1.0 + 9.0 / (1.0 + 0.403 * em1**2))
    q17 = (
        0.394
        * (1.0 - np.exp(-1.47 * (u / 7.0) ** 0.672))
        * (1.0 - np.exp(-4.25 * (fn / 20.0) ** 1.87))
    )
    q18 = 0.61 * (1.0 - np.exp(-2.13 * (u / 8.0) ** 1.593)) / (1.0 + 6.544 * g**4.17)
    q19 = 0.21 * g**4 / ((1.0 + 0.18 * g**4.9) * (1.0 + 0.1 * u * u) * (1.0 + (fn / 24.0) ** 3))
    q20 = q19 * (0.09 + 1.0 / (1.0 + 0.1 * em1**2.7))
    q21 = np.abs(1.0 - 42.54 * g**0.133 * np.exp(-0.812 * g) * u**2.5 / (1.0 + 0.033 * u**2.5))
    re = (fn / 28.843) ** 12
    qe = 0.016 + (0.0514 * er * q21) ** 4.524
    pe = 4.766 * np.exp(-3.228 * u**0.641)
    de = (
        5.086
        * qe
        * re
        / (0.3838 + 0.386 * qe)
        * np.exp(-22.2 * u**1.92)
        / (1.0 + 1.2992 * re)
        * em1**6
        / (1.0 + 10.0 * em1**6)
    )
    ce = (
        1.0
        + 1.275 * (1.0 - np.exp(-0.004625 * pe * er**1.674 * (fn / 18.365) ** 2.745))
        - q12
        + q16
        - q17
        + q18
        + q20
    )
    q0 = z0_dispersion_exponent(u, er, fn)  # Q0 = the single strip's R17 (Kirschning-Jansen 1984)
    num = 0.9408 * epsf**ce - 0.9603
    den = (0.9408 - de) * eps0**ce - 0.9603
    with np.errstate(invalid="ignore", divide="ignore"):
        ratio = num / den
    # as in the single strip: near eps_r = 1 the ratio is 0/0 and the line TEM-like
    ok = np.isfinite(ratio) & (ratio > 0)
    z_e = z_e0 * np.where(ok, np.abs(ratio) ** q0, 1.0)
    # odd mode: pulled toward the single strip's Z0(f)
    q29 = 15.16 / (1.0 + 0.196 * em1**2)
    y = (em1 / 13.0) ** 12
    q26 = 30.0 - 22.2 * y / (1.0 + 3.0 * y) - q29
    q28 = 0.149 * em1**3 / (94.5 + 0.038 * em1**3)
    q27 = 0.4 * g**0.84 * (1.0 + 2.5 * em1**1.5 / (5.0 + em1**1.5))
    q25 = 0.3 * fn**2 / (10.0 + fn**2) * (1.0 + 2.333 * em1**2 / (5.0 + em1**2))
    q24 = 2.506 * q28 * u**0.894 / (3.575 + u**0.894) * ((1.0 + 1.3 * u) * fn / 99.25) ** 4.29
    q23 = 1.0 + 0.005 * fn * q27 / ((1.0 + 0.812 * (fn / 15.0) ** 1.9) * (1.0 + 0.025 * u * u))
    q22 = 0.925 * (fn / q26) ** 1.536 / (1.0 + 0.3 * (fn / 30.0) ** 1.536)
    z_o = z0f + (z_o0 * (eps_of / eps_o0) ** q22 - z0f * q23) / (
        1.0 + q24 + (0.46 * g) ** 2.2 * q25
    )
    return z_e, z_o


#: the parameters of the field-solver correction and the box it was fitted and verified in
AXES = (
    Axis("width/height", 0.1, 10.0, "log"),
    Axis("spacing/height", 0.1, 10.0, "log"),
    Axis("thickness/height", 0.0, 0.5, "sqrt"),
)
DK_AXIS = Axis("dk", 1.0, 18.0, "log")

# BEGIN fitted microstrip-pair (written by tools/fit_static_corrections.py; do not edit)
CORRECTION = StaticCorrection.none(AXES, DK_AXIS, PAIR_MODES)
# END fitted microstrip-pair

#: the validity table: the box of the field-solver correction (the Kirschning-Jansen
#: ranges of the 1984 paper, from memory; see DEVELOPERS.md), then the dispersion's
_FIT = "microstrip-pair (Kirschning-Jansen, field-solver correction)"
LIMITS = (
    Limit(_FIT, "width/height", 0.1, 10, ("width", ("height",))),
    Limit(_FIT, "spacing/height", 0.1, 10, ("spacing", ("height",))),
    Limit(_FIT, "dk", 1, 18, value=dk),
    Limit(_FIT, "thickness/height", 0, 0.5, ("thickness", ("height",))),
    Limit(
        "microstrip-pair dispersion (Kirschning-Jansen)",
        "frequency x height [GHz mm]",
        0,
        15,
        value=lambda q: q.f * 1e-9 * q.height * 1e3,
        above_dc=True,
    ),
)


#: what the zero-thickness warning of a pair names, and the thickness it suggests
_NO_THICKNESS = ("the strips' conductor loss", "'1.4 mil' or '1 oz'")


@dataclass(frozen=True)
class MicrostripPair(CrossSection):
    """Two strips of ``width`` and ``thickness``, ``spacing`` apart (edge to edge), at
    ``height`` (strip bottom to plane) above the return plane on ``dielectric``, air
    above. Lengths in metres. Kirschning-Jansen even/odd modes (see module docstring)."""

    width: float
    spacing: float
    height: float
    thickness: float
    dielectric: Dielectric
    metal: Metal = field(default_factory=Metal)
    kind: ClassVar[str] = "microstrip-pair"
    n_conductors: ClassVar[int] = 2
    dimensions: ClassVar[tuple[str, ...]] = ("width", "spacing", "height", "thickness")
    limits: ClassVar[tuple[Limit, ...]] = LIMITS
    search: ClassVar[dict] = {
        "width": (("height",), 0.01, 100.0),
        "spacing": (("height",), 0.01, 100.0),
    }
    outer_layer: ClassVar[bool] = True
    correction: ClassVar[StaticCorrection] = CORRECTION

    @classmethod
    def static_parameters(cls, dims: Mapping[str, ArrayLike]) -> tuple[np.ndarray, ...]:
        h = np.asarray(dims["height"], float)
        return tuple(np.asarray(dims[k], float) / h for k in ("width", "spacing", "thickness"))

    @classmethod
    def static_dimensions(cls, params: tuple[float, ...]) -> dict[str, float]:
        h = 100e-6
        u, g, th = params
        return {"width": u * h, "spacing": g * h, "height": h, "thickness": th * h}

    @classmethod
    def published_static(
        cls, dims: Mapping[str, ArrayLike], er: ArrayLike
    ) -> dict[str, tuple[np.ndarray, np.ndarray]]:
        """Kirschning-Jansen with the thickness terms (``static_modes``)."""
        keys = ("width", "spacing", "height", "thickness")
        qs = static_modes(*(dims[k] for k in keys), er)
        return {m: (z * np.sqrt(e), e) for m, (z, e) in qs.items()}

    def mode_arrays(
        self,
        f: np.ndarray,
        eps_r: np.ndarray,
        *,
        width: ArrayLike,
        spacing: ArrayLike,
        height: ArrayLike,
        thickness: ArrayLike,
    ) -> dict[str, Mode]:
        w, s, h, t = (np.asarray(x, float) for x in (width, spacing, height, thickness))
        er = eps_r.real
        dims = {"width": w, "spacing": s, "height": h, "thickness": t}
        self.check_validity(Quantities(dims, er, f))
        u, g = w / h, s / h
        fn = f * 1e-9 * h * 1e3
        qs = self.corrected_static(dims, er)
        (za_e, eps_e0), (za_o, eps_o0) = qs["even"], qs["odd"]
        z_e0, z_o0 = za_e / np.sqrt(eps_e0), za_o / np.sqrt(eps_o0)
        eps_ef, eps_of = dispersive_eps(u, g, er, eps_e0, eps_o0, fn)
        single = {"width": w, "height": h, "thickness": t}
        za_s, eps0 = Microstrip.corrected_static(single, er)["single"]
        z00 = za_s / np.sqrt(eps0)
        epsf = eps_eff_dispersive(u, er, eps0, fn)
        z0f = z0_dispersive(u, er, eps0, epsf, z00, fn)
        z_ef, z_of = dispersive_z(u, g, er, fn, z_e0, z_o0, eps_o0, eps_of, (z00, eps0, z0f, epsf))
        lossy = strip_loss_modelled(self.kind, t, *_NO_THICKNESS)
        return {
            "even": assemble_mode(
                "even", f, eps_r, eps_ef, z_ef, self._groups("even", w, s, h, t) if lossy else []
            ),
            "odd": assemble_mode(
                "odd", f, eps_r, eps_of, z_of, self._groups("odd", w, s, h, t) if lossy else []
            ),
        }

    def _groups(
        self, mode: str, w: np.ndarray, s: np.ndarray, h: np.ndarray, t: np.ndarray
    ) -> list[ConductorGroup]:
        keys = ("width", "spacing", "height", "thickness")
        return strip_and_planes(
            lambda p: self.corrected_z_air(mode, dict(zip(keys, p, strict=True))),
            (w, s, h, t),
            ("strips", lambda p, d: (p[0] - 2 * d, p[1] + 2 * d, p[2] + d, p[3] - 2 * d)),
            [("plane", lambda p, d: (p[0], p[1], p[2] + d, p[3]))],
            np.minimum(np.minimum(w, s), np.minimum(h, t)),
            w * t,
            self.metal,
            w / t,
            w / h,
        )

    @classmethod
    def field_geometry(cls, dims: Mapping[str, float], options) -> Geometry:
        """The cross-section for the field solver: the two strips on one layer over the plane."""
        from losslane.xsection.fieldsolve.layouts import over_plane

        return over_plane(dims, options, pair=True)

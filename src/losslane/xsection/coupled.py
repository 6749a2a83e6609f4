"""Edge-coupled symmetric pairs: two equal strips side by side, as microstrip or stripline.

A symmetric pair carries two quasi-TEM modes: the even mode (both strips at +V) and the
odd mode (+V, -V). Each has its own per-line impedance Z_e, Z_o and effective
permittivity; Z_diff = 2 Z_o, Z_common = Z_e / 2. Each mode is assembled like a single
line (``assemble_mode``), and the 2x2 R, L, G, C follow from the two modes
(``base.pair_rlgc``).

Methods and validity (the formulas below are written from memory of the published papers
and checked in tests/test_coupled*.py against an exact solution, independent numerical
solutions and the single-line limits -- see the tests for the measured agreement):

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
    MTT 27(7), 1979); see ``kj_mode_capacitances``. For s -> infinity both modes become
    losslane's single ``Microstrip`` exactly. Checked against a finite-difference solution
    for t/h <= 0.35 (see the tests); meant for t/h <= 0.5.

stripline-pair (centred: trace midway between the planes)
  * zero thickness, exact (conformal mapping): S. B. Cohn, "Shielded coupled-strip
    transmission line", IRE Trans. MTT 3, 1955:
    Z = (eta0 / 4 sqrt(eps_r)) K(k')/K(k), k_e = tanh(pi w/2b) tanh(pi (w+s)/2b),
    k_o = tanh(pi w/2b) coth(pi (w+s)/2b), b the plane-to-plane spacing. Any w/b, s/b.
  * thickness: Cohn's 1955 thick-strip corrections in admittance form on top of the exact
    zero-thickness values and of the single stripline of the same strip (losslane's
    Cohn x Wheeler model), so t = 0 stays exact and s -> infinity gives losslane's
    single ``Stripline``; see ``centred_pair_z_air``. Range (from memory) t/b <= 0.1;
    the finite-difference check in the tests finds them within 3 % for t/w <= 0.2.
  * offset trace (nearer one plane): the parallel combination of the two centred pairs of
    spacings 2 h1 + t and 2 h2 + t, as for the single offset stripline -- an
    approximation (common practice), best for w/(b - t) > 0.35.

Conductor loss of each mode follows Wheeler's incremental-inductance rule applied to that
mode's own air-filled impedance function (strip walls and plane walls receding); the strip
depth G * w * t makes the DC resistance of a strip 1/(sigma w t) in both modes.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from numpy.typing import ArrayLike

from losslane.errors import check_range
from losslane.materials.dielectric import Dielectric
from losslane.xsection.base import CrossSection, Metal, strip_and_planes, strip_loss_modelled
from losslane.xsection.microstrip import (
    hj_eps_eff,
    hj_quasi_static,
    hj_thickness,
    hj_z_air,
    jk_exponent,
    jk_z0,
    kj_eps_eff,
    kj_p1_p4,
)
from losslane.xsection.rlgc import ETA0, ConductorGroup, Mode, assemble_mode
from losslane.xsection.stripline import centred_z_air, cohn_z_air

MODES = ("even", "odd")

# ---------------------------------------------------------------------------------------
# microstrip pair: Kirschning & Jansen (1984/85)
# ---------------------------------------------------------------------------------------


def kj_static_eps(u: ArrayLike, g: ArrayLike, er: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """Kirschning-Jansen quasi-static (eps_e, eps_o) of a zero-thickness coupled pair,
    u = w/h, g = s/h (u, g and eps_r broadcast)."""
    u = np.asarray(u, float)
    er = np.asarray(er, float)
    eps0 = hj_eps_eff(u, er)
    # even mode: the single-strip formula at a coupling-dependent width v
    v = u * (20.0 + g * g) / (10.0 + g * g) + g * np.exp(-g)
    eps_e = hj_eps_eff(v, er)
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


def kj_static_q(u: ArrayLike, g: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
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


def kj_static(
    u: ArrayLike, g: ArrayLike, er: ArrayLike
) -> dict[str, tuple[np.ndarray, np.ndarray]]:
    """Kirschning-Jansen quasi-static {mode: (Z0, eps_eff)} of a zero-thickness pair."""
    u = np.asarray(u, float)
    er = np.asarray(er, float)
    eps_e, eps_o = kj_static_eps(u, g, er)
    z_air = hj_z_air(u)  # the single strip's Z_L(0) sqrt(eps_eff(0))
    q4, q10 = kj_static_q(u, g)
    # Z_m = Z_L(0) sqrt(eps_eff(0)/eps_m) / (1 - Z_L(0) sqrt(eps_eff(0)) Q / eta0): the
    # denominator depends on the geometry only, so Z_m sqrt(eps_m) is the mode's air
    # impedance, as a TEM-like mode requires.
    za_e = z_air / (1.0 - z_air / ETA0 * q4)
    za_o = z_air / (1.0 - z_air / ETA0 * q10)
    return {"even": (za_e / np.sqrt(eps_e), eps_e), "odd": (za_o / np.sqrt(eps_o), eps_o)}


def pair_widths(
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
    u1, ur = hj_thickness(u, t_h, er)
    # du/dt = (du/t_h) * g, written so that tiny thicknesses stay finite (du = 0 at t = 0)
    th = np.where(t_h > 0, t_h, 1.0)
    k1 = (u1 - u) / th * g
    kr = (ur - u) / th * g
    return (
        u + (u1 - u) * (1.0 - 0.5 * np.exp(-0.69 * k1)),
        u + (ur - u) * (1.0 - 0.5 * np.exp(-0.69 * kr)),
    )


def kj_mode_capacitances(
    mode: str, w: ArrayLike, s: ArrayLike, h: ArrayLike, t: ArrayLike, er: ArrayLike
) -> tuple[np.ndarray, np.ndarray]:
    """Normalised capacitances (C_air/eps0, C/eps0) of one mode of the thick pair.

    Kirschning-Jansen at the widened ratios (``pair_widths``) in Hammerstad-Jensen's two-
    width form -- the air widths give C_air, the dielectric widths the geometric mean
    sqrt(C C_air) -- plus, in the odd mode, the capacitance of the facing side walls to
    the symmetry plane, 2 eps0 t/s, which lies in air (the gap-capacitance term of
    R. Garg and I. J. Bahl, "Characteristics of coupled microstriplines", IEEE Trans.
    MTT 27(7), 1979; K. C. Gupta et al., *Microstrip Lines and Slotlines*, 2nd ed., 1996,
    from memory).
    """
    w, s, h, t, er = (np.asarray(v, float) for v in (w, s, h, t, er))
    u, g = w / h, s / h
    ua, ud = pair_widths(u, g, t / h, er)
    k_air = ETA0 / kj_static(ua, g, 1.0)[mode][0]
    z, eps = kj_static(ud, g, er)[mode]
    k_mean = ETA0 / z
    k_diel = k_mean**2 / k_air
    if mode == "odd":
        side = 2.0 * t / s  # nothing at t = 0
        k_air = k_air + side
        k_diel = k_diel + side
    return np.broadcast_to(k_air, k_diel.shape), k_diel


def kj_mode_z_air(mode: str, w: ArrayLike, s: ArrayLike, h: ArrayLike, t: ArrayLike) -> np.ndarray:
    """Air-filled impedance of one mode of the microstrip pair (thickness included): the
    incremental-inductance base of the mode's conductor loss."""
    k_air, _ = kj_mode_capacitances(mode, w, s, h, t, 1.0)
    return ETA0 / k_air


def kj_quasi_static(
    w: ArrayLike, s: ArrayLike, h: ArrayLike, t: ArrayLike, er: ArrayLike
) -> dict[str, tuple[np.ndarray, np.ndarray]]:
    """{mode: (Z0, eps_eff)} quasi-static with strip thickness (``kj_mode_capacitances``);
    Z0 = eta0 / sqrt(k_air k), eps_eff = k / k_air."""
    out = {}
    for mode in MODES:
        k_air, k = kj_mode_capacitances(mode, w, s, h, t, er)
        out[mode] = (ETA0 / np.sqrt(k_air * k), k / k_air)
    return out


def kj_dispersion_eps(
    u: ArrayLike, g: ArrayLike, er: ArrayLike, eps_e0: ArrayLike, eps_o0: ArrayLike, fn: ArrayLike
) -> tuple[np.ndarray, np.ndarray]:
    """Kirschning-Jansen eps_e(f), eps_o(f) from the quasi-static values; fn = f[GHz] h[mm]."""
    p1, p2, p3, p4 = kj_p1_p4(u, er, fn)
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


def kj_dispersion_z(
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
    q0 = jk_exponent(u, er, fn)  # Q0 = the single strip's R17 (Kirschning-Jansen 1984)
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


# ---------------------------------------------------------------------------------------
# stripline pair: Cohn (1955), exact for zero thickness
# ---------------------------------------------------------------------------------------


def _k_ratio(mp: ArrayLike) -> np.ndarray:
    """K(k')/K(k) for a modulus given by mp = 1 - k^2 (precise when k -> 1)."""
    from scipy.special import ellipk, ellipkm1  # here: scipy.special costs start-up time

    return ellipk(mp) / ellipkm1(mp)


def _sech2(x: ArrayLike) -> np.ndarray:
    """sech^2 x without overflow for large x."""
    e = np.exp(-2.0 * np.abs(x))
    return 4.0 * e / (1.0 + e) ** 2


def cohn_pair_z_air(w: ArrayLike, s: ArrayLike, b: ArrayLike) -> dict[str, np.ndarray]:
    """Cohn's exact air-filled even/odd impedances of zero-thickness centred coupled
    striplines of plane spacing b."""
    w, s, b = (np.asarray(v, float) for v in (w, s, b))
    a = np.pi * w / (2.0 * b)
    c = np.pi * (w + s) / (2.0 * b)
    sech2_a, sech2_c = _sech2(a), _sech2(c)
    # 1 - k^2 without cancellation: k_e = tanh a tanh c, k_o = tanh a / tanh c
    mp_e = sech2_a + np.tanh(a) ** 2 * sech2_c
    mp_o = (sech2_a - sech2_c) / np.tanh(c) ** 2
    return {"even": ETA0 / 4.0 * _k_ratio(mp_e), "odd": ETA0 / 4.0 * _k_ratio(mp_o)}


def cohn_fringe(x: ArrayLike) -> np.ndarray:
    """Cohn's fringing capacitance C_f'/eps of one corner of a thick semi-infinite strip
    centred between planes, x = t/b (S. B. Cohn, IRE Trans. MTT 2, 1954); 2 ln 2 / pi
    at x <= 0."""
    x = np.asarray(x, float)
    thick = x > 0
    xs = np.where(thick, x, 0.5)  # the x -> 0 limit holds an x ln x term
    # with r = 1/(1 - x): (2 r ln(r + 1) - (r - 1) ln(r^2 - 1)) / pi, written so that
    # r - 1 and r^2 - 1 keep their precision for thin strips
    r = 1.0 / (1.0 - xs)
    cf = (2.0 * r * np.log(r + 1.0) - xs * r * np.log(xs * (2.0 - xs) * r * r)) / np.pi
    return np.where(thick, cf, 2.0 * np.log(2.0) / np.pi)


def centred_pair_z_air(
    mode: str, w: ArrayLike, s: ArrayLike, b: ArrayLike, t: ArrayLike
) -> np.ndarray:
    """Air-filled impedance of one mode of a centred stripline pair with thickness t.

    Cohn's (1955) thick coupled-strip corrections on the exact zero-thickness values, in
    admittance form with Z_s the single stripline (losslane's Cohn x Wheeler model) and
    C_f' the corner fringing capacitance (``cohn_fringe``), eta0 = 376.7 ohm:

    * 1/Z_m = 1/Z_s(t) + [C_f'(t)/C_f'(0)] (1/Z_m(0) - 1/Z_s(0)) -- the zero-thickness
      coupling scaled by the growth of the edge fringing (Cohn's form for s/t >= 5);
    * odd mode, narrow gaps: 1/Z_o = 1/Z_o(0) + (1/Z_s(t) - 1/Z_s(0))
      - (2/eta0)(C_f'(t) - C_f'(0)) + 2 t/(eta0 s) -- the inner edges' fringing replaced
      by the parallel-plate field between the facing side walls (Cohn's form for s/t < 5).

    Cohn switches forms at s/t = 5; here the odd mode takes the larger of the two
    capacitances, which makes the switch continuous (the two cross near s/t = 5..20).
    At t <= 0 the value is Cohn's exact one.
    """
    w, s, b, t = (np.asarray(v, float) for v in (w, s, b, t))
    z0 = cohn_pair_z_air(w, s, b)[mode]
    zs_t = centred_z_air(w, b, t)
    zs_0 = cohn_z_air(w, b)
    cf_t, cf_0 = cohn_fringe(t / b), cohn_fringe(0.0)
    y = 1.0 / zs_t + cf_t / cf_0 * (1.0 / z0 - 1.0 / zs_0)
    if mode == "odd":
        y_gap = (
            1.0 / z0 + (1.0 / zs_t - 1.0 / zs_0) - 2.0 / ETA0 * (cf_t - cf_0) + 2.0 * t / (ETA0 * s)
        )
        y = np.maximum(y, y_gap)
    # the correction is not exactly 0 at t = 0 in floating point; keep the exact value
    return np.where(t > 0, 1.0 / y, z0)


def stripline_pair_z_air(
    mode: str, w: ArrayLike, s: ArrayLike, below: ArrayLike, above: ArrayLike, t: ArrayLike
) -> np.ndarray:
    """Air-filled impedance of one mode, centred or offset (parallel combination of the
    two centred pairs of spacings 2 below + t and 2 above + t)."""
    below, above, t = (np.asarray(v, float) for v in (below, above, t))
    centred = np.abs(below - above) <= 1e-12 * (below + above)
    z1 = centred_pair_z_air(mode, w, s, 2.0 * below + t, t)
    z2 = centred_pair_z_air(mode, w, s, 2.0 * above + t, t)
    zc = centred_pair_z_air(mode, w, s, below + above + t, t)
    return np.where(centred, zc, 2.0 * z1 * z2 / (z1 + z2))


# ---------------------------------------------------------------------------------------
# the cross-sections
# ---------------------------------------------------------------------------------------


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
    kind = "microstrip-pair"
    n_conductors = 2
    dimensions = ("width", "spacing", "height", "thickness")

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
        u, g = w / h, s / h
        fn = f * 1e-9 * h * 1e3
        self._check_validity(u, g, t / h, er, fn)
        qs = kj_quasi_static(w, s, h, t, er)
        (z_e0, eps_e0), (z_o0, eps_o0) = qs["even"], qs["odd"]
        eps_ef, eps_of = kj_dispersion_eps(u, g, er, eps_e0, eps_o0, fn)
        z00, eps0 = hj_quasi_static(w, h, t, er)
        epsf = kj_eps_eff(u, er, eps0, fn)
        z0f = jk_z0(u, er, eps0, epsf, z00, fn)
        z_ef, z_of = kj_dispersion_z(
            u, g, er, fn, z_e0, z_o0, eps_o0, eps_of, (z00, eps0, z0f, epsf)
        )
        lossy = strip_loss_modelled(self.kind, t, *_NO_THICKNESS)
        return {
            "even": assemble_mode(
                "even", f, eps_r, eps_ef, z_ef, self._groups("even", w, s, h, t) if lossy else []
            ),
            "odd": assemble_mode(
                "odd", f, eps_r, eps_of, z_of, self._groups("odd", w, s, h, t) if lossy else []
            ),
        }

    def _check_validity(
        self, u: np.ndarray, g: np.ndarray, t_h: np.ndarray, er: np.ndarray, fn: np.ndarray
    ) -> None:
        name = "microstrip-pair (Kirschning-Jansen)"
        check_range(name, "width/height", u, 0.1, 10)
        check_range(name, "spacing/height", g, 0.1, 10)
        check_range(name, "dk", er, 1, 18)
        check_range("microstrip-pair (Jansen thickness)", "thickness/height", t_h, 0, 0.5)
        if np.any(fn > 0):
            check_range(
                "microstrip-pair dispersion (Kirschning-Jansen)",
                "frequency x height [GHz mm]",
                fn,
                0,
                15,
            )

    def _groups(
        self, mode: str, w: np.ndarray, s: np.ndarray, h: np.ndarray, t: np.ndarray
    ) -> list[ConductorGroup]:
        return strip_and_planes(
            lambda p: kj_mode_z_air(mode, *p),
            (w, s, h, t),
            ("strips", lambda p, d: (p[0] - 2 * d, p[1] + 2 * d, p[2] + d, p[3] - 2 * d)),
            [("plane", lambda p, d: (p[0], p[1], p[2] + d, p[3]))],
            np.minimum(np.minimum(w, s), np.minimum(h, t)),
            w * t,
            self.metal,
        )


@dataclass(frozen=True)
class StriplinePair(CrossSection):
    """Two strips of ``width`` and ``thickness``, ``spacing`` apart (edge to edge), with
    ``below`` and ``above`` the distances from their lower and upper faces to the lower and
    upper planes (equal: centred), in a homogeneous ``dielectric``. Lengths in metres."""

    width: float
    spacing: float
    below: float
    above: float
    thickness: float
    dielectric: Dielectric
    metal: Metal = field(default_factory=Metal)
    kind = "stripline-pair"
    n_conductors = 2
    dimensions = ("width", "spacing", "below", "above", "thickness")

    def mode_arrays(
        self,
        f: np.ndarray,
        eps_r: np.ndarray,
        *,
        width: ArrayLike,
        spacing: ArrayLike,
        below: ArrayLike,
        above: ArrayLike,
        thickness: ArrayLike,
    ) -> dict[str, Mode]:
        p0 = tuple(np.asarray(x, float) for x in (width, spacing, below, above, thickness))
        self._check_validity(*p0)
        er = eps_r.real
        lossy = strip_loss_modelled(self.kind, p0[4], *_NO_THICKNESS)
        out = {}
        for mode in MODES:
            z_air = stripline_pair_z_air(mode, *p0)
            out[mode] = assemble_mode(
                mode,
                f,
                eps_r,
                er,
                z_air / np.sqrt(er),
                self._groups(mode, *p0) if lossy else [],
                q=np.ones(er.shape),
            )
        return out

    @staticmethod
    def _check_validity(
        w: np.ndarray, s: np.ndarray, lo: np.ndarray, hi: np.ndarray, t: np.ndarray
    ) -> None:
        b = lo + hi + t
        name = "stripline-pair (Cohn thickness correction)"
        check_range(name, "thickness/plane spacing", t / b, 0, 0.1)
        check_range(name, "thickness/width", t / w, 0, 0.2)
        check_range(
            "offset stripline-pair",
            "width/(plane spacing - thickness)",
            w / (b - t),
            0.35,
            None,
            where=np.abs(lo - hi) > 1e-9 * b,
        )

    def _groups(
        self,
        mode: str,
        w: np.ndarray,
        s: np.ndarray,
        lo: np.ndarray,
        hi: np.ndarray,
        t: np.ndarray,
    ) -> list[ConductorGroup]:
        return strip_and_planes(
            lambda p: stripline_pair_z_air(mode, *p),
            (w, s, lo, hi, t),
            ("strips", lambda p, d: (p[0] - 2 * d, p[1] + 2 * d, p[2] + d, p[3] + d, p[4] - 2 * d)),
            [
                ("lower plane", lambda p, d: (p[0], p[1], p[2] + d, p[3], p[4])),
                ("upper plane", lambda p, d: (p[0], p[1], p[2], p[3] + d, p[4])),
            ],
            np.minimum(np.minimum(np.minimum(w, s), np.minimum(lo, hi)), t),
            w * t,
            self.metal,
        )

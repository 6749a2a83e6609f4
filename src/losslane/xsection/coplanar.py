"""Coplanar waveguide on a finite substrate (CPW) and grounded coplanar waveguide (GCPW).

Methods and validity (ranges from memory):

* quasi-static, conformal mapping: C. P. Wen, IEEE Trans. MTT 17, 1969 (CPW);
  G. Ghione and C. Naldi, Electronics Letters 20, 1984 and 19, 1983 (finite substrate and
  lower ground plane). With k0 = a/b (a = w/2, b = w/2 + gap, h the substrate):
  CPW  eps_eff = 1 + (eps_r - 1)/2 * [K(k1)/K(k1')]/[K(k0)/K(k0')],
       k1 = sinh(pi a/2h)/sinh(pi b/2h),
       Z0 = 30 pi / sqrt(eps_eff) * K(k0')/K(k0);
  GCPW k3 = tanh(pi a/2h)/tanh(pi b/2h), q = [K(k3)/K(k3')]/[K(k0)/K(k0') + K(k3)/K(k3')],
       eps_eff = 1 + q (eps_r - 1), Z0 = 60 pi / sqrt(eps_eff) / [K(k0)/K(k0') + K(k3)/K(k3')].
  Semi-infinite coplanar grounds are assumed (ground width >> gap).
* strip thickness: the parallel-plate capacitance of the strip's side walls facing the
  grounds' across both gaps, 2 eps0 t/gap, added in air to the zero-thickness capacitances
  (common practice; it keeps the gap open at any thickness, where the widening of
  Gupta, Garg, Bahl, Bhartia, *Microstrip Lines and Slotlines*, 1996, closes it near
  t/gap = 0.4 and is 25-40 % off the field solution at t/gap = 0.5);
* the field-solver correction (``xsection.fitted``): the air-filled capacitance and the
  filling factor of the formulas above times fitted functions of w/gap, h/gap, t/gap and
  Dk, so that Z0 and eps_eff agree with the 2-D field solver within the box of
  ``coplanar_limits`` (the conformal mapping's partial capacitances alone are 2-4 % off
  on thin substrates, h/gap < 1);
* dispersion: M. Y. Frankel et al., IEEE Trans. MTT 39(6), 1991:
  sqrt(eps_eff(f)) = sqrt(eps_q) + (sqrt(eps_r) - sqrt(eps_q)) / (1 + a (f/f_TE)^-1.8),
  f_TE = c/(4 h sqrt(eps_r - 1)), a = exp(u ln(w/gap) + v), u = 0.54 - 0.64 p + 0.015 p^2,
  v = 0.43 - 0.86 p + 0.54 p^2, p = ln(w/h); fitted for 0.1 <= w/h <= 5,
  0.1 <= w/gap <= 5, 1.5 <= eps_r <= 50, f <= 10 f_TE. Applied to GCPW as well (an
  approximation: the grounded line has the same surface-wave mechanism). The impedance
  follows with constant inductance, Z0(f) = Z0 sqrt(eps_q / eps_eff(f)).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, ClassVar

import numpy as np
from numpy.typing import ArrayLike

from losslane.materials.dielectric import Dielectric
from losslane.xsection.base import CrossSection, Metal, strip_loss_modelled
from losslane.xsection.elliptic import k_ratio, k_ratio_of_modulus
from losslane.xsection.fitted import Axis, StaticCorrection
from losslane.xsection.rlgc import C0, ETA0, ConductorGroup, Mode, assemble_mode, wheeler_factor
from losslane.xsection.validity import Limit, Quantities, dk

if TYPE_CHECKING:
    from losslane.xsection.fieldsolve.geometry import Geometry


def _log_sinh(y: np.ndarray) -> np.ndarray:
    y = np.asarray(y, float)
    return y + np.log(-np.expm1(-2.0 * y)) - np.log(2.0)


def _log_cosh(y: np.ndarray) -> np.ndarray:
    y = np.asarray(y, float)
    return y + np.log1p(np.exp(-2.0 * y)) - np.log(2.0)


def ratio_tanh(a: ArrayLike, b: ArrayLike, h: ArrayLike) -> np.ndarray:
    """K(k)/K(k') for k = tanh(pi a/2h)/tanh(pi b/2h) (the lower-plane term of GCPW), in
    log form so that a strip many times wider than the substrate (k -> 1) stays exact."""
    x1, x2 = np.pi * np.asarray(a) / (2 * h), np.pi * np.asarray(b) / (2 * h)
    log_m = 2.0 * (_log_sinh(x1) - _log_cosh(x1) - _log_sinh(x2) + _log_cosh(x2))
    # 1 - k^2 = sinh(x2 - x1) sinh(x2 + x1) / (cosh^2 x1 sinh^2 x2)
    log_m1 = _log_sinh(x2 - x1) + _log_sinh(x2 + x1) - 2.0 * _log_cosh(x1) - 2.0 * _log_sinh(x2)
    return k_ratio(np.exp(log_m), np.exp(log_m1))


def ratio_sinh(a: ArrayLike, b: ArrayLike, h: ArrayLike) -> np.ndarray:
    """K(k)/K(k') for k = sinh(pi a/2h)/sinh(pi b/2h) (the finite substrate of CPW)."""
    x1, x2 = np.pi * np.asarray(a) / (2 * h), np.pi * np.asarray(b) / (2 * h)
    log_m = 2.0 * (_log_sinh(x1) - _log_sinh(x2))
    # 1 - k^2 = sinh(x2 - x1) sinh(x2 + x1) / sinh^2 x2
    log_m1 = _log_sinh(x2 - x1) + _log_sinh(x2 + x1) - 2.0 * _log_sinh(x2)
    return k_ratio(np.exp(log_m), np.exp(log_m1))


def wall(t: ArrayLike, gap: ArrayLike) -> np.ndarray:
    """The side walls' capacitance across both gaps over eps0, 2 t/gap (in air)."""
    return 2.0 * np.asarray(t, float) / np.asarray(gap, float)


def cpw_z_air(
    w: ArrayLike, gap: ArrayLike, t: ArrayLike, h: ArrayLike, grounded: bool
) -> np.ndarray:
    """Air-filled impedance of CPW or GCPW: the conformal mapping of the zero-thickness
    line plus the side walls' capacitance."""
    w = np.asarray(w, float)
    r0 = k_ratio_of_modulus(w / (w + 2 * gap))
    if grounded:
        a, b = w / 2.0, w / 2.0 + gap
        k_air = 2.0 * (r0 + ratio_tanh(a, b, h))
    else:
        k_air = 4.0 * r0
    return ETA0 / (k_air + wall(t, gap))


def cpw_eps_quasi_static(
    w: ArrayLike, gap: ArrayLike, t: ArrayLike, h: ArrayLike, er: ArrayLike, grounded: bool
) -> np.ndarray:
    """Quasi-static eps_eff: the zero-thickness partial capacitances, with the side walls'
    capacitance in air (exactly the zero-thickness value at t = 0)."""
    w, gap, er = (np.asarray(v, float) for v in (w, gap, er))
    a, b = w / 2.0, w / 2.0 + gap
    r0 = k_ratio_of_modulus(a / b)
    if grounded:
        r3 = ratio_tanh(a, b, h)
        eps = 1.0 + r3 / (r0 + r3) * (er - 1.0)
        k_air = 2.0 * (r0 + r3)
    else:
        r1 = ratio_sinh(a, b, h)
        eps = 1.0 + (er - 1.0) / 2.0 * r1 / r0
        k_air = 4.0 * r0
    x = wall(t, gap)
    return (k_air * eps + x) / (k_air + x)


def frankel_eps(
    w: ArrayLike, gap: ArrayLike, h: ArrayLike, er: ArrayLike, eps_q: ArrayLike, f: ArrayLike
) -> np.ndarray:
    """Frankel et al. (1991) dispersive eps_eff(f) of a coplanar line."""
    p = np.log(w / h)
    u = 0.54 - 0.64 * p + 0.015 * p * p
    v = 0.43 - 0.86 * p + 0.54 * p * p
    a = np.exp(u * np.log(w / gap) + v)
    f_te = C0 / (4.0 * h * np.sqrt(np.maximum(er - 1.0, 1e-12)))
    ratio = f / f_te
    with np.errstate(divide="ignore"):
        denom = 1.0 + a * np.where(ratio > 0, ratio, 1.0) ** -1.8
    frac = np.where(ratio > 0, 1.0 / denom, 0.0)
    root = np.sqrt(eps_q) + (np.sqrt(er) - np.sqrt(eps_q)) * frac
    return root * root


def _f_te(q: Quantities) -> np.ndarray:
    """Cut-off of the first surface-wave mode, c / (4 h sqrt(eps_r - 1)) (Frankel et al.)."""
    return C0 / (4.0 * q.height * np.sqrt(np.maximum(q.dk - 1.0, 1e-12)))


#: the parameters of the field-solver correction and the box it was fitted and verified in
AXES = (
    Axis("width/gap", 0.1, 10.0, "log"),
    Axis("height/gap", 0.2, 20.0, "log"),
    Axis("thickness/gap", 0.0, 0.5, "sqrt"),
)
DK_AXIS = Axis("dk", 1.0, 20.0, "log")

# BEGIN fitted cpw (written by tools/fit_static_corrections.py; do not edit)
CPW_CORRECTION = StaticCorrection.none(AXES, DK_AXIS, ("single",))
# END fitted cpw

# BEGIN fitted gcpw (written by tools/fit_static_corrections.py; do not edit)
GCPW_CORRECTION = StaticCorrection.none(AXES, DK_AXIS, ("single",))
# END fitted gcpw


def coplanar_limits(kind: str) -> tuple[Limit, ...]:
    """The validity table of CPW or GCPW: the box of the field-solver correction and
    Frankel's fitted range (from memory; see DEVELOPERS.md)."""
    name = f"{kind} (field-solver correction)"
    disp = f"{kind} dispersion (Frankel)"
    return (
        Limit(name, "width/gap", 0.1, 10.0, ("width", ("gap",))),
        Limit(name, "height/gap", 0.2, 20.0, ("height", ("gap",))),
        Limit(name, "thickness/gap", 0, 0.5, ("thickness", ("gap",))),
        Limit(name, "dk", 1, 20, value=dk),
        Limit(disp, "width/height", 0.1, 5, ("width", ("height",)), above_dc=True),
        Limit(disp, "width/gap", 0.1, 5, ("width", ("gap",)), above_dc=True),
        Limit(disp, "dk", 1.5, 50, value=dk, above_dc=True),
        Limit(disp, "f/f_TE", 0, 10, value=lambda q: q.f / _f_te(q), above_dc=True),
    )


@dataclass(frozen=True)
class Coplanar(CrossSection):
    """Centre strip of ``width``, ``gap`` to the coplanar grounds on each side, on a
    substrate of ``height``; :class:`Gcpw` adds the lower return plane. Lengths in m."""

    width: float
    gap: float
    height: float
    thickness: float
    dielectric: Dielectric
    metal: Metal = field(default_factory=Metal)
    #: a return plane under the substrate (GCPW)
    grounded: ClassVar[bool] = False
    # the order in which the spread draws tolerances (height before gap)
    dimensions: ClassVar[tuple[str, ...]] = ("width", "height", "gap", "thickness")
    search: ClassVar[dict] = {"width": (("gap",), 0.01, 100.0)}
    outer_layer: ClassVar[bool] = True

    @classmethod
    def static_parameters(cls, dims: Mapping[str, ArrayLike]) -> tuple[np.ndarray, ...]:
        gap = np.asarray(dims["gap"], float)
        return tuple(np.asarray(dims[k], float) / gap for k in ("width", "height", "thickness"))

    @classmethod
    def static_dimensions(cls, params: tuple[float, ...]) -> dict[str, float]:
        gap = 100e-6
        wg, hg, tg = params
        return {"width": wg * gap, "height": hg * gap, "gap": gap, "thickness": tg * gap}

    @classmethod
    def published_static(
        cls, dims: Mapping[str, ArrayLike], er: ArrayLike
    ) -> dict[str, tuple[np.ndarray, np.ndarray]]:
        """Conformal mapping (Wen; Ghione-Naldi) with the side walls' capacitance."""
        w, s, h, t = (dims[k] for k in ("width", "gap", "height", "thickness"))
        z = cpw_z_air(w, s, t, h, cls.grounded)
        return {"single": (z, cpw_eps_quasi_static(w, s, t, h, er, cls.grounded))}

    def mode_arrays(
        self,
        f: np.ndarray,
        eps_r: np.ndarray,
        *,
        width: ArrayLike,
        gap: ArrayLike,
        height: ArrayLike,
        thickness: ArrayLike,
    ) -> dict[str, Mode]:
        w, s, t, h = (np.asarray(x, float) for x in (width, gap, thickness, height))
        er = eps_r.real
        dims = {"width": w, "gap": s, "height": h, "thickness": t}
        self.check_validity(Quantities(dims, er, f))
        z_air, eps_q = self.corrected_static(dims, er)["single"]
        eps_f = frankel_eps(w, s, h, er, eps_q, f)
        z0 = z_air / np.sqrt(eps_f)
        return {"single": assemble_mode("single", f, eps_r, eps_f, z0, self._groups(w, s, t, h))}

    def _groups(
        self, w: np.ndarray, s: np.ndarray, t: np.ndarray, h: np.ndarray
    ) -> list[ConductorGroup]:
        if not strip_loss_modelled(self.kind, t, "conductor loss", "'1.4 mil' or '1 oz'"):
            return []
        scale = np.minimum(np.minimum(w, s), t)
        keys = ("width", "gap", "thickness", "height")
        za = lambda p: self.corrected_z_air("single", dict(zip(keys, p, strict=True)))  # noqa: E731
        p0 = (w, s, t, h)
        # one thickness parameter serves strip and grounds: each gets half its recession
        g_sig = wheeler_factor(za, p0, lambda p, d: (p[0] - 2 * d, p[1] + d, p[2] - d, p[3]), scale)
        g_cop = wheeler_factor(za, p0, lambda p, d: (p[0], p[1] + d, p[2] - d, p[3]), scale)
        m = self.metal
        groups = [
            ConductorGroup(
                "strip",
                g_sig,
                g_sig * w * t,
                m.conductor,
                m.foil,
                aspect=w / t,
                proximity=w / (np.minimum(s, h) if self.grounded else s),
            ),
            ConductorGroup("coplanar grounds", g_cop, t, m.conductor, m.foil, wide=True),
        ]
        if self.grounded:
            g_pl = wheeler_factor(
                za, p0, lambda p, d: (p[0], p[1], p[2], p[3] + d), np.minimum(scale, h)
            )
            groups.append(
                ConductorGroup(
                    "plane", g_pl, m.plane_thickness, m.conductor, m.plane_roughness, wide=True
                )
            )
        return groups

    @classmethod
    def field_geometry(cls, dims: Mapping[str, float], options) -> Geometry:
        """The cross-section for the field solver: the strip between semi-infinite
        coplanar grounds on the substrate, over the lower plane for GCPW (air below
        the substrate for CPW)."""
        from losslane.xsection.fieldsolve.layouts import coplanar

        return coplanar(dims, options, grounded=cls.grounded)


@dataclass(frozen=True)
class Cpw(Coplanar):
    """Coplanar waveguide on a finite substrate with air below (see :class:`Coplanar`)."""

    kind: ClassVar[str] = "cpw"
    limits: ClassVar[tuple[Limit, ...]] = coplanar_limits("cpw")
    correction: ClassVar[StaticCorrection] = CPW_CORRECTION


@dataclass(frozen=True)
class Gcpw(Coplanar):
    """Grounded coplanar waveguide: a return plane under the substrate (see
    :class:`Coplanar`)."""

    kind: ClassVar[str] = "gcpw"
    grounded: ClassVar[bool] = True
    limits: ClassVar[tuple[Limit, ...]] = coplanar_limits("gcpw")
    correction: ClassVar[StaticCorrection] = GCPW_CORRECTION

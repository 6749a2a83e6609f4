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
* strip thickness: Gupta, Garg, Bahl, Bhartia, *Microstrip Lines and Slotlines*, 2nd ed.,
  1996: Delta = (1.25 t/pi)(1 + ln(4 pi w/t)), k_e = (w + Delta)/(w + 2 gap - Delta),
  eps_eff,t = eps_eff - 0.7 (eps_eff - 1) t/gap / (K(k0)/K(k0') + 0.7 t/gap); for t well
  below the gap.
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

from losslane.errors import LossLaneError
from losslane.materials.dielectric import Dielectric
from losslane.xsection.base import CrossSection, Metal, strip_loss_modelled
from losslane.xsection.elliptic import k_ratio, k_ratio_of_modulus
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


def thickness_delta(w: ArrayLike, t: ArrayLike) -> np.ndarray:
    """Gupta et al.'s widening Delta of a strip of thickness t (0 where t <= 0)."""
    t = np.asarray(t, float)
    thick = t > 0
    tt = np.where(thick, t, 1.0)  # the t -> 0 limit is t log(1/t) -> 0
    return np.where(thick, 1.25 * tt / np.pi * (1.0 + np.log(4.0 * np.pi * w / tt)), 0.0)


def check_gap(kind: str, w: ArrayLike, gap: ArrayLike, t: ArrayLike) -> None:
    """A LossLaneError where the thickness-widened strip closes the gap: Gupta's
    k_e = (w + Delta)/(w + 2 gap - Delta) reaches 1 at Delta = gap (names the first such
    sample)."""
    closed = np.asarray(gap, float) - thickness_delta(w, t) <= 0
    if np.any(closed):
        t_bad, gap_bad = (float(np.broadcast_to(v, closed.shape)[closed][0]) for v in (t, gap))
        raise LossLaneError(
            f"{kind}: thickness = {t_bad:g} m is too large for gap = "
            f"{gap_bad:g} m (the thickness-widened strip would close the gap); use a "
            "wider gap or the field solver"
        )


def cpw_z_air(
    w: ArrayLike, gap: ArrayLike, t: ArrayLike, h: ArrayLike, grounded: bool
) -> np.ndarray:
    """Air-filled impedance (thickness-corrected) of CPW or GCPW."""
    w = np.asarray(w, float)
    d = thickness_delta(w, t)
    r0 = k_ratio_of_modulus((w + d) / (w + 2 * gap - d))
    if not grounded:
        return ETA0 / (4.0 * r0)
    a, b = w / 2.0, w / 2.0 + gap
    r3 = ratio_tanh(a, b, h)
    return ETA0 / (2.0 * (r0 + r3))


def cpw_eps_quasi_static(
    w: ArrayLike, gap: ArrayLike, t: ArrayLike, h: ArrayLike, er: ArrayLike, grounded: bool
) -> np.ndarray:
    """Quasi-static eps_eff with the thickness correction."""
    w, gap, er = (np.asarray(v, float) for v in (w, gap, er))
    a, b = w / 2.0, w / 2.0 + gap
    r0z = k_ratio_of_modulus(a / b)  # zero-thickness modulus in the filling factor
    if grounded:
        r3 = ratio_tanh(a, b, h)
        eps = 1.0 + r3 / (r0z + r3) * (er - 1.0)
    else:
        r1 = ratio_sinh(a, b, h)
        eps = 1.0 + (er - 1.0) / 2.0 * r1 / r0z
    x = 0.7 * np.asarray(t, float) / gap
    return eps - (eps - 1.0) * x / (r0z + x)  # exactly eps at t = 0


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


def coplanar_limits(kind: str) -> tuple[Limit, ...]:
    """The validity table of CPW or GCPW (ranges from memory; see DEVELOPERS.md)."""
    name = f"{kind} (conformal mapping)"
    disp = f"{kind} dispersion (Frankel)"
    return (
        Limit(name, "thickness/gap", 0, 0.5, ("thickness", ("gap",))),
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

    def __post_init__(self) -> None:
        super().__post_init__()
        check_gap(self.kind, self.width, self.gap, self.thickness)

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
        check_gap(self.kind, w, s, t)
        er = eps_r.real
        dims = {"width": w, "gap": s, "height": h, "thickness": t}
        self.check_validity(Quantities(dims, er, f))
        eps_q = cpw_eps_quasi_static(w, s, t, h, er, self.grounded)
        eps_f = frankel_eps(w, s, h, er, eps_q, f)
        z0 = cpw_z_air(w, s, t, h, self.grounded) / np.sqrt(eps_f)
        return {"single": assemble_mode("single", f, eps_r, eps_f, z0, self._groups(w, s, t, h))}

    def _groups(
        self, w: np.ndarray, s: np.ndarray, t: np.ndarray, h: np.ndarray
    ) -> list[ConductorGroup]:
        if not strip_loss_modelled(self.kind, t, "conductor loss", "'1.4 mil' or '1 oz'"):
            return []
        scale = np.minimum(np.minimum(w, s), t)
        za = lambda p: cpw_z_air(*p, self.grounded)  # noqa: E731
        p0 = (w, s, t, h)
        # one thickness parameter serves strip and grounds: each gets half its recession
        g_sig = wheeler_factor(za, p0, lambda p, d: (p[0] - 2 * d, p[1] + d, p[2] - d, p[3]), scale)
        g_cop = wheeler_factor(za, p0, lambda p, d: (p[0], p[1] + d, p[2] - d, p[3]), scale)
        m = self.metal
        groups = [
            ConductorGroup("strip", g_sig, g_sig * w * t, m.conductor, m.foil),
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
    def size_bounds(cls, vary: str, dims: Mapping[str, float]) -> tuple[float, str] | None:
        """The widest strip before Gupta's thickness widening closes the gap (an input
        error, not a validity range): D = (1.25 t/pi)(1 + ln(4 pi w/t)) < gap, i.e.
        w < t/(4 pi) exp(pi gap/(1.25 t) - 1). None without thickness."""
        t, gap = dims["thickness"], dims["gap"]
        if vary != "width" or t <= 0:
            return None
        w_max = t / (4 * np.pi) * np.exp(min(np.pi * gap / (1.25 * t) - 1.0, 700.0))
        return 0.999 * w_max, "Gupta thickness correction (widening below the gap)"

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


@dataclass(frozen=True)
class Gcpw(Coplanar):
    """Grounded coplanar waveguide: a return plane under the substrate (see
    :class:`Coplanar`)."""

    kind: ClassVar[str] = "gcpw"
    grounded: ClassVar[bool] = True
    limits: ClassVar[tuple[Limit, ...]] = coplanar_limits("gcpw")

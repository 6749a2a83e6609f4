"""Microstrip: a strip on a dielectric sheet over one return plane, air above.

Methods and validity (coefficients as published; ranges from the papers, from memory):

* quasi-static Z0 and eps_eff: Hammerstad & Jensen, "Accurate models for microstrip
  computer-aided design", IEEE MTT-S Digest 1980 -- Z0 within 0.03 % for
  0.01 <= w/h <= 1000 (air line), eps_eff within 0.2 % for 0.01 <= w/h <= 100 and
  1 <= eps_r <= 128; with their strip-thickness correction, meant for thin strips
  (t/h up to about 0.5 is taken as its range here);
* eps_eff dispersion: Kirschning & Jansen, Electronics Letters 18(6), 1982 -- within
  0.6 % for 0.1 <= w/h <= 100, 1 <= eps_r <= 20, h/lambda0 <= 0.13;
* Z0 dispersion: Jansen & Kirschning, AEU 37, 1983 -- for 0.1 <= w/h <= 10,
  1 <= eps_r <= 18, h/lambda0 <= 0.13.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, ClassVar

import numpy as np
from numpy.typing import ArrayLike

from losslane.materials.dielectric import Dielectric
from losslane.xsection.base import CrossSection, Metal, strip_and_planes, strip_loss_modelled
from losslane.xsection.rlgc import C0, ETA0, ConductorGroup, Mode, assemble_mode
from losslane.xsection.validity import Limit, Quantities, dk

if TYPE_CHECKING:
    from losslane.xsection.fieldsolve.geometry import Geometry


def z_air_thin(u: np.ndarray) -> np.ndarray:
    """Hammerstad-Jensen impedance of the air-filled microstrip of width ratio u = w/h."""
    u = np.asarray(u, float)
    fu = 6.0 + (2 * np.pi - 6.0) * np.exp(-((30.666 / u) ** 0.7528))
    return ETA0 / (2 * np.pi) * np.log(fu / u + np.sqrt(1.0 + (2.0 / u) ** 2))


def eps_eff_thin(u: np.ndarray, er: np.ndarray) -> np.ndarray:
    """Hammerstad-Jensen quasi-static effective permittivity (zero thickness)."""
    u = np.asarray(u, float)
    er = np.asarray(er, float)
    a = (
        1.0
        + np.log((u**4 + (u / 52.0) ** 2) / (u**4 + 0.432)) / 49.0
        + np.log(1.0 + (u / 18.1) ** 3) / 18.7
    )
    b = 0.564 * ((er - 0.9) / (er + 3.0)) ** 0.053
    return (er + 1.0) / 2.0 + (er - 1.0) / 2.0 * (1.0 + 10.0 / u) ** (-a * b)


def widened_ratios(u: ArrayLike, t_h: ArrayLike, er: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """Hammerstad-Jensen strip-thickness correction: widened ratios (u1 in air, ur in the
    dielectric) of a strip of thickness ratio t_h = t/h (arrays broadcast; no widening
    where t_h <= 0)."""
    u = np.asarray(u, float)
    t_h = np.asarray(t_h, float)
    er = np.asarray(er, float)
    thick = t_h > 0
    th = np.where(thick, t_h, 1.0)  # the formula's t_h -> 0 limit is 0 * log(inf)
    du1 = th / np.pi * np.log(1.0 + 4.0 * np.e / (th / np.tanh(np.sqrt(6.517 * u)) ** 2))
    du1 = np.where(thick, du1, 0.0)
    dur = 0.5 * (1.0 + 1.0 / np.cosh(np.sqrt(np.maximum(er - 1.0, 0.0)))) * du1
    return u + du1, u + dur


def quasi_static(
    w: ArrayLike, h: ArrayLike, t: ArrayLike, er: ArrayLike
) -> tuple[np.ndarray, np.ndarray]:
    """(Z0, eps_eff) of the Hammerstad-Jensen model with thickness correction."""
    u = np.asarray(w, float) / h
    u1, ur = widened_ratios(u, np.asarray(t, float) / h, er)
    e_r = eps_eff_thin(ur, er)
    z_r = z_air_thin(ur)
    z0 = z_r / np.sqrt(e_r)
    eps_eff = e_r * (z_air_thin(u1) / z_r) ** 2
    return z0, eps_eff


def z_air_thick(w: ArrayLike, h: ArrayLike, t: ArrayLike) -> np.ndarray:
    """Air-filled impedance with thickness correction (the incremental-inductance base)."""
    u = np.asarray(w, float) / h
    u1, _ = widened_ratios(u, np.asarray(t, float) / h, 1.0)
    return z_air_thin(u1)


def dispersion_terms(u: ArrayLike, er: ArrayLike, fn: ArrayLike) -> tuple[np.ndarray, ...]:
    """Kirschning-Jansen's dispersion terms P1..P4 of the single strip, which their coupled-
    line eps_e(f), eps_o(f) use as well; fn = f[GHz] * h[mm]."""
    p1 = 0.27488 + (0.6315 + 0.525 / (1.0 + 0.0157 * fn) ** 20) * u - 0.065683 * np.exp(-8.7513 * u)
    p2 = 0.33622 * (1.0 - np.exp(-0.03442 * er))
    p3 = 0.0363 * np.exp(-4.6 * u) * (1.0 - np.exp(-((fn / 38.7) ** 4.97)))
    p4 = 1.0 + 2.751 * (1.0 - np.exp(-((er / 15.916) ** 8)))
    return p1, p2, p3, p4


def eps_eff_dispersive(u: ArrayLike, er: ArrayLike, eps0: ArrayLike, fn: ArrayLike) -> np.ndarray:
    """Kirschning-Jansen dispersive eps_eff(f); fn = f[GHz] * h[mm]."""
    p1, p2, p3, p4 = dispersion_terms(u, er, fn)
    p = p1 * p2 * ((0.1844 + p3 * p4) * fn) ** 1.5763
    return er - (er - eps0) / (1.0 + p)


def z0_dispersion_exponent(u: ArrayLike, er: ArrayLike, fn: ArrayLike) -> np.ndarray:
    """The exponent R17 of Jansen-Kirschning's Z0(f) (``z0_dispersive``), which Kirschning-Jansen's
    coupled-line even-mode Z_e(f) uses as Q0; fn = f[GHz] * h[mm]."""
    r1 = 0.03891 * er**1.4
    r2 = 0.2671 * u**7  # 0.2671 as published (from memory; matches scikit-rf)
    r7 = 1.206 - 0.3144 * np.exp(-r1) * (1.0 - np.exp(-r2))
    r10 = 0.00044 * er**2.136 + 0.0184
    r11 = (fn / 19.47) ** 6 / (1.0 + 0.0962 * (fn / 19.47) ** 6)
    r12 = 1.0 / (1.0 + 0.00245 * u**2)
    r15 = 0.707 * r10 * (fn / 12.3) ** 1.097
    r16 = 1.0 + 0.0503 * er**2 * r11 * (1.0 - np.exp(-((u / 15.0) ** 6)))
    return r7 * (1.0 - 1.1241 * r12 / r16 * np.exp(-0.026 * fn**1.15656 - r15))


def z0_dispersive(
    u: ArrayLike, er: ArrayLike, eps0: ArrayLike, eps_f: ArrayLike, z00: ArrayLike, fn: ArrayLike
) -> np.ndarray:
    """Jansen-Kirschning dispersive Z0(f); fn = f[GHz] * h[mm]."""
    r3 = 4.766 * np.exp(-3.228 * u**0.641)
    r4 = 0.016 + (0.0514 * er) ** 4.524
    r5 = (fn / 28.843) ** 12
    r6 = 22.2 * u**1.92
    r8 = 1.0 + 1.275 * (1.0 - np.exp(-0.004625 * r3 * er**1.674 * (fn / 18.365) ** 2.745))
    r9 = (
        5.086
        * r4
        * r5
        / (0.3838 + 0.386 * r4)
        * np.exp(-r6)
        / (1.0 + 1.2992 * r5)
        * (er - 1.0) ** 6
        / (1.0 + 10.0 * (er - 1.0) ** 6)
    )
    r13 = 0.9408 * eps_f**r8 - 0.9603
    r14 = (0.9408 - r9) * eps0**r8 - 0.9603
    r17 = z0_dispersion_exponent(u, er, fn)
    with np.errstate(invalid="ignore", divide="ignore"):
        ratio = r13 / r14
    # Near eps_r = 1 both terms approach -0.0195 and the ratio loses meaning; the line is
    # then TEM-like and has no impedance dispersion.
    ok = np.isfinite(ratio) & (ratio > 0)
    return z00 * np.where(ok, np.abs(ratio) ** r17, 1.0)


#: the validity table (ranges as the papers state them, from memory; see DEVELOPERS.md)
LIMITS = (
    Limit("microstrip (Hammerstad-Jensen)", "width/height", 0.01, 100, ("width", ("height",))),
    Limit("microstrip (Hammerstad-Jensen)", "dk", 1, 128, value=dk),
    Limit(
        "microstrip (Hammerstad-Jensen thickness)",
        "thickness/height",
        0,
        0.5,
        ("thickness", ("height",)),
    ),
    Limit(
        "microstrip dispersion (Kirschning-Jansen)",
        "width/height",
        0.1,
        100,
        ("width", ("height",)),
        above_dc=True,
    ),
    Limit("microstrip dispersion (Kirschning-Jansen)", "dk", 1, 20, value=dk, above_dc=True),
    Limit(
        "microstrip dispersion (Kirschning-Jansen)",
        "height/wavelength",
        0,
        0.13,
        value=lambda q: q.f * q.height / C0,
        above_dc=True,
    ),
)


@dataclass(frozen=True)
class Microstrip(CrossSection):
    """A strip of ``width`` and ``thickness`` at ``height`` (strip bottom to plane) above
    the return plane, on ``dielectric``, air above. Lengths in metres.
    """

    width: float
    height: float
    thickness: float
    dielectric: Dielectric
    metal: Metal = field(default_factory=Metal)
    kind: ClassVar[str] = "microstrip"
    dimensions: ClassVar[tuple[str, ...]] = ("width", "height", "thickness")
    limits: ClassVar[tuple[Limit, ...]] = LIMITS
    search: ClassVar[dict] = {"width": (("height",), 0.01, 100.0)}
    outer_layer: ClassVar[bool] = True

    def mode_arrays(
        self,
        f: np.ndarray,
        eps_r: np.ndarray,
        *,
        width: ArrayLike,
        height: ArrayLike,
        thickness: ArrayLike,
    ) -> dict[str, Mode]:
        w, h, t = (np.asarray(x, float) for x in (width, height, thickness))
        er = eps_r.real
        self.check_validity(Quantities({"width": w, "height": h, "thickness": t}, er, f))
        u = w / h
        fn = f * 1e-9 * h * 1e3
        z00, eps0 = quasi_static(w, h, t, er)
        eps_f = eps_eff_dispersive(u, er, eps0, fn)
        z0 = z0_dispersive(u, er, eps0, eps_f, z00, fn)
        return {"single": assemble_mode("single", f, eps_r, eps_f, z0, self._groups(w, h, t))}

    def _groups(self, w: np.ndarray, h: np.ndarray, t: np.ndarray) -> list[ConductorGroup]:
        if not strip_loss_modelled(
            self.kind, t, "the strip's conductor loss", "'1.4 mil' or '1 oz'"
        ):
            return []
        return strip_and_planes(
            lambda p: z_air_thick(*p),
            (w, h, t),
            ("strip", lambda p, d: (p[0] - 2 * d, p[1] + d, p[2] - 2 * d)),
            [("plane", lambda p, d: (p[0], p[1] + d, p[2]))],
            np.minimum(np.minimum(w, h), t),
            w * t,
            self.metal,
        )

    @classmethod
    def field_geometry(cls, dims: Mapping[str, float], options) -> Geometry:
        """The cross-section for the field solver: the strip(s) on one layer over the plane."""
        from losslane.xsection.fieldsolve.layouts import over_plane

        return over_plane(dims, options, pair=cls.n_conductors == 2)

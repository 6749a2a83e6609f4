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
  1 <= eps_r <= 18, h/lambda0 <= 0.13;
* the field-solver correction (``xsection.fitted``): the quasi-static air-filled
  capacitance and filling factor of Hammerstad-Jensen times fitted functions of w/h, t/h
  and Dk, so that Z0 and eps_eff agree with the 2-D field solver within 0.1 % over
  0.05 <= w/h <= 50, t/h <= 0.5, Dk <= 20 (Hammerstad-Jensen's thickness correction alone
  is up to 4 % off in Z0 and 9 % in eps_eff for narrow strips with t/h = 0.5). The
  dispersion laws start from the corrected values.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, ClassVar

import numpy as np
from numpy.typing import ArrayLike

from losslane.materials.dielectric import Dielectric
from losslane.xsection.base import CrossSection, Metal, strip_and_planes, strip_loss_modelled
from losslane.xsection.fitted import Axis, StaticCorrection
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


#: the parameters of the field-solver correction and the box it was fitted and verified in
AXES = (
    Axis("width/height", 0.05, 50.0, "log"),
    Axis("thickness/height", 0.0, 0.5, "sqrt"),
)
DK_AXIS = Axis("dk", 1.0, 20.0, "log")

# BEGIN fitted microstrip (written by tools/fit_static_corrections.py; do not edit)
CORRECTION = StaticCorrection.of(
    AXES,
    DK_AXIS,
    air={
        "single": (
            (11, 7),
            """
            0.0063995 0.010191 0.0037835 -0.00054016 -0.00019654 0.00016319 -6.5852e-05
            -0.013393 -0.020624 -0.007021 0.0010814 0.00031589 -0.00028774 0.00012199
            0.0097483 0.014655 0.0043744 -0.00092186 -0.00012886 0.00019143 -9.5972e-05
            -0.0049772 -0.0070236 -0.0015143 0.00062608 -4.4516e-05 -8.4926e-05
            6.198e-05 0.002265 0.0026666 5.0549e-05 -0.00032786 0.00011309 1.0082e-05
            -3.0091e-05 -0.00065132 -0.00051779 0.0003107 9.2941e-05 -8.5708e-05
            2.0218e-05 7.6506e-06 -0.00017734 -0.00036439 -0.00019679 3.1668e-05
            2.8965e-05 -1.9387e-05 2.9459e-06 0.00024228 0.00028799 1.5178e-05
            -4.5193e-05 4.9392e-06 8.064e-06 -4.4324e-06 -3.0917e-05 2.4276e-06
            4.4116e-05 1.2624e-05 -9.0771e-06 2.573e-09 1.9511e-06 -6.722e-05
            -7.2318e-05 -1.6629e-05 6.8209e-06 2.4878e-06 -1.9674e-06 1.2204e-07
            1.9124e-05 1.7066e-05 -5.3997e-06 -5.1251e-06 8.3243e-07 8.7126e-07
            -4.0398e-07
            """,
        ),
    },
    fill={
        "single": (
            (11, 7, 5),
            """
            -0.011317 -0.0075949 -0.0034918 0.0019323 -0.0010921 -0.017146 -0.01152
            -0.0013745 0.00031506 -4.4271e-05 -0.0060213 -0.0017015 0.00018762
            4.1407e-05 -9.7423e-08 0.0011069 0.00070212 1.2846e-05 -1.8357e-05
            4.9448e-06 0.00019136 -2.3835e-05 -4.1199e-05 -6.4301e-07 -4.7124e-07
            -0.0002696 -4.5499e-05 2.5288e-05 8.5047e-07 -2.3671e-07 0.00014036
            1.868e-05 -1.0575e-05 2.0141e-07 9.4052e-08 0.019432 0.017382 0.002053
            -0.0014119 0.00072321 0.030511 0.021102 0.00090007 -0.00064391 0.00014851
            0.0095993 0.0032107 -0.00050263 -9.4025e-05 1.3343e-05 -0.0022504 -0.0012216
            3.3749e-05 3.1979e-05 -9.6545e-06 -0.00021197 5.077e-05 5.8363e-05 1.388e-06
            1.1047e-06 0.00046015 7.9888e-05 -4.203e-05 -1.6233e-06 3.5194e-07
            -0.00025523 -3.4006e-05 1.863e-05 -4.35e-07 -1.5552e-07 -0.01296 -0.0097078
            0.00081099 -0.0001571 0.0002114 -0.018358 -0.012439 0.00082929 0.00041229
            -0.00012216 -0.0041749 -0.0017347 0.00042783 6.2774e-05 -1.4164e-05
            0.0019426 0.00077453 -9.1972e-05 -1.9623e-05 6.0011e-06 -0.00011263
            -6.5983e-05 -1.5911e-05 -1.2836e-06 -1.0223e-06 -0.0002739 -5.172e-05
            2.4475e-05 1.6137e-06 -2.2009e-07 0.00019116 2.6573e-05 -1.3302e-05
            2.8117e-07 1.3981e-07 0.0059579 0.0023318 -0.00033789 -3.2542e-05
            -3.4338e-05 0.0075015 0.0036514 -0.00066454 -0.00010213 1.9352e-05 0.0002955
            0.00013703 -0.00013571 -9.2211e-06 -8.6962e-08 -0.0011988 -0.00035296
            7.3575e-05 9.613e-06 -1.5888e-06 0.00031285 7.9824e-05 -1.1494e-05
            6.5518e-07 7.2689e-07 8.1421e-05 2.0556e-05 -8.6287e-06 -1.6043e-06
            1.5778e-07 -0.00011277 -1.8118e-05 7.862e-06 7.3095e-08 -1.4996e-07
            -0.0020752 -0.00063027 2.8264e-05 0.0001182 -6.3713e-05 -0.0018957
            -0.00017944 8.9109e-05 -4.3798e-06 1.8495e-05 0.00085257 0.00036879
            -4.7043e-05 -9.3359e-06 5.8018e-06 0.0004173 0.00011388 -2.7289e-05
            -6.0049e-06 1.5998e-07 -0.00029415 -7.0655e-05 1.7936e-05 9.598e-08
            -5.5581e-07 3.7838e-05 -3.2652e-07 -6.596e-07 1.3243e-06 -7.9503e-08
            4.4896e-05 1.09e-05 -3.574e-06 -3.6719e-07 1.3304e-07 0.00043571 0.00025066
            -2.4185e-05 6.6736e-07 -4.136e-06 -0.0005488 -0.00017884 9.8035e-05
            -1.045e-05 -5.3319e-06 -0.00063648 -0.0002259 6.493e-05 3.4752e-06
            -3.0567e-06 5.8507e-05 -1.659e-05 -2.4771e-07 4.0898e-06 -3.5628e-07
            0.00015087 4.2816e-05 -1.2093e-05 -5.4759e-07 3.9801e-07 -6.7759e-05
            -6.7783e-06 3.5117e-06 -7.4156e-07 -1.3615e-08 -2.9833e-06 -5.7583e-06
            8.6261e-07 4.4934e-07 -8.4157e-08 0.00092409 0.0001795 -3.7968e-05
            -1.5281e-05 1.5061e-05 0.00094147 9.2804e-05 -5.934e-05 1.1375e-05
            -1.9738e-06 0.00017033 6.0785e-05 -2.5145e-05 3.7255e-07 4.4189e-07
            -0.00017024 -1.3509e-05 6.0349e-06 -1.2074e-06 1.6203e-07 -2.259e-05
            -1.5535e-05 3.6964e-06 6.6458e-07 -1.5406e-07 4.4816e-05 6.9276e-06
            -2.6598e-06 1.1333e-07 7.4743e-08 -1.2299e-05 2.0999e-06 3.9106e-07
            -3.4099e-07 3.041e-08 -0.00047689 -0.00010378 2.6557e-05 -5.2254e-06
            2.532e-06 -0.00029383 -2.8577e-05 1.2929e-06 2.0119e-06 1.6206e-07
            7.7087e-05 1.3422e-05 -4.9352e-06 1.1844e-07 4.7153e-07 8.3612e-05
            1.5528e-05 -3.3128e-06 -9.0174e-07 2.5962e-07 -2.723e-05 -8.0566e-07
            1.4673e-06 -5.365e-07 -2.7333e-08 -1.3839e-05 -5.1096e-06 1.024e-06
            2.4874e-07 -8.43e-08 1.1067e-05 4.7146e-07 -6.5779e-07 1.5323e-07 6.0315e-09
            -0.00053634 -6.422e-05 1.6163e-05 -1.7461e-07 -2.4194e-06 -0.00019913
            -1.8355e-05 1.5399e-05 -5.2659e-06 6.2356e-07 -7.4977e-05 -3.1642e-05
            1.1774e-05 -5.974e-07 -5.1765e-07 9.5275e-06 -8.8429e-06 1.0259e-06
            1.0138e-06 -3.2335e-07 2.1267e-05 6.0784e-06 -2.3023e-06 2.539e-07
            5.1727e-08 -2.5679e-06 2.8212e-06 -8.9462e-08 -2.4655e-07 4.9441e-08
            -4.9843e-06 -1.6416e-06 4.4068e-07 8.5229e-10 -1.7171e-08 8.7265e-05
            3.8678e-06 -3.846e-06 2.3171e-06 -6.6442e-07 0.00019524 4.9782e-07
            -3.7995e-06 1.9246e-06 -2.7475e-07 1.0441e-05 1.1631e-05 -4.6766e-06
            6.1711e-07 7.0228e-08 -3.0996e-05 1.962e-06 -5.5168e-07 -8.9872e-08
            1.036e-07 -5.4346e-06 -3.8067e-06 7.7718e-07 2.0124e-08 2.0487e-09
            5.2199e-06 -5.6465e-07 -1.1729e-07 6.0914e-08 -2.6056e-09 7.008e-07
            1.2934e-06 -1.1227e-07 -6.6245e-08 1.2004e-08 0.00028432 3.1818e-05
            -7.4492e-06 4.5569e-07 4.4671e-07 7.9736e-06 1.6118e-05 -5.2083e-06
            9.6243e-07 -2.3283e-08 8.8747e-06 1.1217e-05 -2.5433e-06 -3.2163e-07
            2.5199e-07 8.2835e-06 2.7201e-06 1.9768e-07 -4.6261e-07 8.7517e-08
            -7.7307e-07 -6.2006e-07 5.8107e-07 -1.3351e-07 -2.4715e-08 -2.9019e-06
            -1.0328e-06 9.0067e-08 7.1905e-08 -2.1569e-08 7.7216e-07 -2.1926e-07
            -9.0019e-08 5.2585e-08 -4.5376e-09
            """,
        ),
    },
    note=(
        "160 solves at accuracy 'normal'; worst deviation on them: single Z0 0.042 %, eps_eff "
        "0.089 %"
    ),
)
# END fitted microstrip

#: the validity table (ranges as the papers state them, from memory; see DEVELOPERS.md)
_FIT = "microstrip (Hammerstad-Jensen, field-solver correction)"
LIMITS = (
    Limit(_FIT, "width/height", 0.05, 50, ("width", ("height",))),
    Limit(_FIT, "dk", 1, 20, value=dk),
    Limit(_FIT, "thickness/height", 0, 0.5, ("thickness", ("height",))),
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
    correction: ClassVar[StaticCorrection] = CORRECTION

    @classmethod
    def static_parameters(cls, dims: Mapping[str, ArrayLike]) -> tuple[np.ndarray, ...]:
        h = np.asarray(dims["height"], float)
        return np.asarray(dims["width"], float) / h, np.asarray(dims["thickness"], float) / h

    @classmethod
    def static_dimensions(cls, params: tuple[float, ...]) -> dict[str, float]:
        h = 100e-6
        return {"width": params[0] * h, "height": h, "thickness": params[1] * h}

    @classmethod
    def published_static(
        cls, dims: Mapping[str, ArrayLike], er: ArrayLike
    ) -> dict[str, tuple[np.ndarray, np.ndarray]]:
        """Hammerstad-Jensen with their thickness correction."""
        z0, eps = quasi_static(dims["width"], dims["height"], dims["thickness"], er)
        return {"single": (z0 * np.sqrt(eps), eps)}

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
        z_air, eps0 = self.corrected_static({"width": w, "height": h, "thickness": t}, er)["single"]
        z00 = z_air / np.sqrt(eps0)
        eps_f = eps_eff_dispersive(u, er, eps0, fn)
        z0 = z0_dispersive(u, er, eps0, eps_f, z00, fn)
        return {"single": assemble_mode("single", f, eps_r, eps_f, z0, self._groups(w, h, t))}

    def _groups(self, w: np.ndarray, h: np.ndarray, t: np.ndarray) -> list[ConductorGroup]:
        if not strip_loss_modelled(
            self.kind, t, "the strip's conductor loss", "'1.4 mil' or '1 oz'"
        ):
            return []
        return strip_and_planes(
            lambda p: self.corrected_z_air(
                "single", {"width": p[0], "height": p[1], "thickness": p[2]}
            ),
            (w, h, t),
            ("strip", lambda p, d: (p[0] - 2 * d, p[1] + d, p[2] - 2 * d)),
            [("plane", lambda p, d: (p[0], p[1] + d, p[2]))],
            np.minimum(np.minimum(w, h), t),
            w * t,
            self.metal,
            w / t,
            w / h,
        )

    @classmethod
    def field_geometry(cls, dims: Mapping[str, float], options) -> Geometry:
        """The cross-section for the field solver: the strip(s) on one layer over the plane."""
        from losslane.xsection.fieldsolve.layouts import over_plane

        return over_plane(dims, options, pair=cls.n_conductors == 2)

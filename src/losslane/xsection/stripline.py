"""Stripline: a strip between two return planes in a homogeneous dielectric (TEM).

Methods and validity:

* zero-thickness centred strip: S. B. Cohn, IRE Trans. MTT 2, 1954 (exact, conformal
  mapping): Z0 = (30 pi / sqrt(eps_r)) K(k)/K(k'), k = sech(pi w / 2b), k' = tanh(pi w / 2b),
  b the plane-to-plane spacing; any w/b;
* strip thickness: H. A. Wheeler, IEEE Trans. MTT 26(11), 1978, used as a ratio on top of
  Cohn's exact value, Z0 = Z_Cohn(w, b) * Z_W(w, b, t) / Z_W(w, b, 0), so the zero-
  thickness limit stays exact; Wheeler's formula is within 0.5 % for w'/(b - t) < 10 and
  t/b < 0.25 (from memory);
* offset strip: the parallel combination of two centred striplines of spacings
  2 h1 + t and 2 h2 + t (common practice; B. C. Wadell, *Transmission Line Design
  Handbook*, 1991), good for w/(b - t) > 0.35 and t/b < 0.25;
* the field-solver correction (``xsection.fitted``): the air-filled capacitance of the
  above times a fitted function of w/b, t/b and the offset, so that Z0 agrees with the 2-D
  field solver within 0.2 % over 0.02 <= w/b <= 10, t/b <= 0.25 and the nearer plane at
  least 5 % of below + above away (the formulas alone: up to 5 % for offset strips). It
  vanishes for a zero-thickness centred strip, where Cohn's solution is exact.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, ClassVar

import numpy as np
from numpy.typing import ArrayLike

from losslane.materials.dielectric import Dielectric
from losslane.xsection.base import CrossSection, Metal, strip_and_planes, strip_loss_modelled
from losslane.xsection.elliptic import k_ratio
from losslane.xsection.fitted import Axis, StaticCorrection
from losslane.xsection.rlgc import ETA0, ConductorGroup, Mode, assemble_mode
from losslane.xsection.validity import Limit, Quantities

if TYPE_CHECKING:
    from losslane.xsection.fieldsolve.geometry import Geometry


def k_ratio_sech(x: np.ndarray) -> np.ndarray:
    """K(k)/K(k') for k = sech(x), k' = tanh(x), accurate for any x > 0."""
    x = np.asarray(x, float)
    # m = k^2 = sech^2 x, 1 - m = tanh^2 x, each computed without cancellation
    return k_ratio(1.0 / np.cosh(x) ** 2, np.tanh(x) ** 2)


def cohn_z_air(w: ArrayLike, b: ArrayLike) -> np.ndarray:
    """Cohn's exact air-filled impedance of a zero-thickness centred stripline."""
    return ETA0 / 4.0 * k_ratio_sech(np.pi * np.asarray(w, float) / (2.0 * np.asarray(b, float)))


def wheeler_z_air(w: ArrayLike, b: ArrayLike, t: ArrayLike) -> np.ndarray:
    """Wheeler's (1978) air-filled impedance of a centred stripline with a thick strip."""
    w, b, t = (np.asarray(v, float) for v in (w, b, t))
    thick = t / b > 0
    x = np.where(thick, t / b, 0.5)  # the widening's x -> 0 limit is 0 * log(0)
    m = 6.0 / (3.0 + 2.0 * x / (1.0 - x))
    dw = (
        x
        / (np.pi * (1.0 - x))
        * (1.0 - 0.5 * np.log((x / (2.0 - x)) ** 2 + (0.0796 * x / (w / b + 1.1 * x)) ** m))
    ) * (b - t)
    dw = np.where(thick, dw, 0.0)
    wp = (w + dw) / (b - t)
    a = 8.0 / (np.pi * wp)
    return ETA0 / (4 * np.pi) * np.log(1.0 + 4.0 / (np.pi * wp) * (a + np.sqrt(a * a + 6.27)))


def centred_z_air(w: ArrayLike, b: ArrayLike, t: ArrayLike) -> np.ndarray:
    """Cohn's exact zero-thickness value scaled by Wheeler's thickness ratio (exactly 1 at
    t = 0)."""
    return cohn_z_air(w, b) * (wheeler_z_air(w, b, t) / wheeler_z_air(w, b, 0.0))


def stripline_z_air(w: ArrayLike, below: ArrayLike, above: ArrayLike, t: ArrayLike) -> np.ndarray:
    """Air-filled impedance of a centred or offset stripline (distances strip to planes)."""
    below, above, t = (np.asarray(v, float) for v in (below, above, t))
    centred = np.abs(below - above) <= 1e-12 * (below + above)
    z1 = centred_z_air(w, 2 * below + t, t)
    z2 = centred_z_air(w, 2 * above + t, t)
    return np.where(centred, centred_z_air(w, below + above + t, t), 2 * z1 * z2 / (z1 + z2))


def offset(q: Quantities) -> np.ndarray:
    """Where the trace is nearer one plane than the other (an offset stripline)."""
    b = q.below + q.above + q.thickness
    return np.abs(q.below - q.above) > 1e-9 * b


def centring(below: ArrayLike, above: ArrayLike) -> np.ndarray:
    """4 below above / (below + above)^2: 1 for a centred trace, toward 0 as it nears a
    plane; symmetric in the two distances and smooth at the centre (the correction's
    offset parameter)."""
    below, above = np.asarray(below, float), np.asarray(above, float)
    return 4.0 * below * above / (below + above) ** 2


def exactness_weight(dims: Mapping[str, ArrayLike]) -> np.ndarray:
    """The weight of a stripline correction: sqrt(t/b) + 1 - ``centring``, zero where
    Cohn's zero-thickness centred solutions are exact (S. B. Cohn, 1954 and 1955)."""
    lo, hi, t = (np.asarray(dims[k], float) for k in ("below", "above", "thickness"))
    return np.sqrt(t / (lo + hi + t)) + 1.0 - centring(lo, hi)


def nearer_plane(q: Quantities) -> np.ndarray:
    """The distance to the nearer plane over below + above (0.5: centred)."""
    return np.minimum(q.below, q.above) / (q.below + q.above)


#: the parameters of the field-solver correction and the box it was fitted and verified in
AXES = (
    Axis("width/spacing", 0.02, 10.0, "log"),
    Axis("thickness/spacing", 0.0, 0.25, "sqrt"),
    Axis("4 below above/(below + above)^2", 0.19, 1.0, "linear"),
)

# BEGIN fitted stripline (written by tools/fit_static_corrections.py; do not edit)
CORRECTION = StaticCorrection.of(
    AXES,
    None,
    air={
        "single": (
            (9, 6, 5),
            """
            0.039296 -0.019063 -0.010639 -0.0018272 -0.0013899 -0.041101 0.0088619
            -0.0015198 0.0025643 0.00035705 0.0040962 0.011103 0.0028207 0.00098882
            0.00025126 -0.0020661 -0.0039085 -0.0020318 -0.0011451 -0.00035819
            0.00092935 0.0015845 0.0011548 0.00066753 0.00021266 -0.00046506 -0.00065638
            -0.00045275 -0.00022299 -7.4652e-05 -0.033296 0.026668 0.0078103 0.0013519
            0.0012523 0.040473 -0.013838 0.0056694 -0.0027117 0.00019516 -0.0023322
            -0.010619 -0.0022118 -0.0009282 -0.00026076 0.00070152 0.0019977 0.00099183
            0.00079686 0.00022619 -0.00037428 -0.00054822 -0.0005391 -0.00039145
            -9.5633e-05 0.00039926 0.00037356 0.00025621 0.00010578 3.2055e-05
            -0.0086517 -0.0065488 0.0036575 0.00025562 0.00026271 0.0048591 0.0020932
            -0.0052016 0.00028445 -0.00079423 -0.0021728 -0.00021603 -0.00068136
            -9.2708e-06 4.6731e-05 0.0018528 0.0027734 0.0013365 0.00042197 0.00017369
            -0.0007933 -0.001518 -0.00080291 -0.00037563 -0.00015659 7.9584e-05
            0.00039415 0.00027052 0.00016459 5.9257e-05 0.0086009 -0.0015817 -0.0015809
            0.00019612 -0.0002779 -0.0060273 0.0062214 0.00071523 0.00014473 0.00033391
            0.00076393 0.00019092 0.00035506 -5.6442e-05 -2.9358e-05 -0.00097813
            -0.0014728 -0.00048848 -0.00017067 -8.2256e-05 0.00049331 0.00088504
            0.00033157 0.00019912 7.0238e-05 -7.8681e-05 -0.00024179 -0.00014335
            -9.3456e-05 -2.828e-05 0.000427 0.0014853 -0.0010696 -0.00025846 -1.1743e-05
            -0.0024069 -0.0029889 0.0017108 -9.4149e-05 0.00011301 0.00079766 0.0010245
            0.00010438 0.00016702 -7.5053e-06 -2.9036e-05 -0.00034337 -0.00031218
            -0.00011113 -2.5194e-05 -0.00011498 -5.6305e-05 0.00012701 2.1201e-05
            2.0345e-05 2.3488e-05 3.0348e-05 -1.5466e-05 6.2113e-06 -5.948e-06
            -0.0017046 -0.00037314 0.00049642 -9.6561e-05 4.4181e-05 0.0013275
            -0.0017589 -0.00071801 0.00014933 -0.00013102 -0.00052548 -0.00013937
            -5.3794e-05 -6.1748e-05 4.2645e-05 0.00013756 0.00039629 0.0001361
            3.4061e-05 1.0616e-05 6.8651e-05 -5.9243e-05 -4.4979e-05 -9.4016e-06
            -1.4341e-05 -4.3931e-05 -2.6669e-05 3.5701e-06 -1.5252e-06 5.4294e-06
            -6.3019e-05 -0.00041625 0.00011164 0.00011924 -1.6605e-05 0.00085084
            0.0012334 -0.00047891 -6.0853e-05 2.4777e-05 -3.5618e-05 -0.00034109
            8.8119e-05 -2.5877e-05 -1.3297e-05 -6.0507e-05 -2.1264e-05 5.0508e-05
            1.918e-05 2.3128e-06 -3.0712e-05 1.9303e-05 -4.2505e-05 -5.7892e-06
            -4.5603e-07 3.9045e-05 2.5188e-05 1.5442e-05 6.5923e-07 -7.2119e-07
            0.00036589 0.00032086 -0.00011033 1.5339e-05 1.2602e-05 -0.00030363
            0.00041966 0.00031346 -8.2348e-05 1.2823e-05 0.00011351 1.9208e-05
            -6.8974e-05 3.899e-05 -2.1103e-05 5.1431e-05 -2.4273e-05 1.0261e-05
            7.3029e-06 7.7294e-06 -4.2618e-05 -4.5437e-05 -8.8891e-06 -1.7792e-05
            -1.6831e-06 -2.744e-06 1.4275e-05 5.063e-06 1.0134e-05 8.288e-07 7.6913e-05
            0.00014868 5.3666e-05 -4.5758e-05 -1.1053e-06 -0.00026032 -0.00036431
            0.00012249 6.6666e-05 -1.2911e-05 -1.4698e-05 0.00012908 -3.6932e-05
            -9.8875e-06 1.7377e-05 -1.6582e-05 -2.1227e-05 -3.653e-05 -9.7778e-06
            -6.9973e-06 4.3143e-05 3.2813e-05 3.301e-05 1.3278e-05 1.722e-06 -1.4208e-05
            -2.2268e-05 -1.2773e-05 -7.5292e-06 -3.0271e-07
            """,
        ),
    },
    note=(
        "462 solves at accuracy 'coarse'; worst deviation on them: single Z0 0.131 %, eps_eff "
        "0.000 %"
    ),
)
# END fitted stripline

#: the validity table: the box of the field-solver correction (Wheeler's thickness range
#: t/b <= 0.25 from memory; see DEVELOPERS.md)
LIMITS = (
    Limit(
        "stripline (field-solver correction)",
        "width/spacing",
        0.02,
        10.0,
        ("width", ("below", "above", "thickness")),
    ),
    Limit(
        "stripline (Wheeler thickness, field-solver correction)",
        "thickness/spacing",
        0,
        0.25,
        ("thickness", ("below", "above", "thickness")),
    ),
    Limit(
        "offset stripline (field-solver correction)",
        "nearer plane/(below + above)",
        0.05,
        None,
        value=nearer_plane,
    ),
)


@dataclass(frozen=True)
class Stripline(CrossSection):
    """A strip of ``width`` and ``thickness`` with ``below`` and ``above`` the distances
    from its lower and upper faces to the lower and upper planes (equal: centred)."""

    width: float
    below: float
    above: float
    thickness: float
    dielectric: Dielectric
    metal: Metal = field(default_factory=Metal)
    kind: ClassVar[str] = "stripline"
    dimensions: ClassVar[tuple[str, ...]] = ("width", "below", "above", "thickness")
    limits: ClassVar[tuple[Limit, ...]] = LIMITS
    # the floor 0.01 is the search's, not the model's: Cohn's solution holds at any width
    search: ClassVar[dict] = {"width": (("below", "above"), 0.01, 10.0)}
    outer_layer: ClassVar[bool] = False
    correction: ClassVar[StaticCorrection] = CORRECTION

    @property
    def spacing(self) -> float:
        """Plane-to-plane spacing b."""
        return self.below + self.above + self.thickness

    @classmethod
    def static_parameters(cls, dims: Mapping[str, ArrayLike]) -> tuple[np.ndarray, ...]:
        w, lo, hi, t = (np.asarray(dims[k], float) for k in cls.dimensions)
        b = lo + hi + t
        return w / b, t / b, centring(lo, hi)

    @classmethod
    def static_dimensions(cls, params: tuple[float, ...]) -> dict[str, float]:
        b = 100e-6
        wb, tb, c = params
        t = tb * b
        lo = 0.5 * (1.0 - np.sqrt(max(0.0, 1.0 - c))) * (b - t)
        return {"width": wb * b, "below": lo, "above": b - t - lo, "thickness": t}

    @classmethod
    def correction_weight(
        cls, dims: Mapping[str, ArrayLike], base_air: Mapping[str, np.ndarray] | None = None
    ) -> np.ndarray:
        """sqrt(t/b) + 1 - 4 below above/(below + above)^2: 0 for a zero-thickness centred
        strip, where Cohn's solution is exact and stays so."""
        return exactness_weight(dims)

    @classmethod
    def published_static(
        cls, dims: Mapping[str, ArrayLike], er: ArrayLike
    ) -> dict[str, tuple[np.ndarray, np.ndarray]]:
        """Cohn x Wheeler, offset by the parallel combination; eps_eff = eps_r."""
        z = stripline_z_air(*(dims[k] for k in cls.dimensions))
        return {"single": (z, np.asarray(er, float))}

    def mode_arrays(
        self,
        f: np.ndarray,
        eps_r: np.ndarray,
        *,
        width: ArrayLike,
        below: ArrayLike,
        above: ArrayLike,
        thickness: ArrayLike,
    ) -> dict[str, Mode]:
        w, lo, hi, t = (np.asarray(x, float) for x in (width, below, above, thickness))
        er = eps_r.real
        dims = {"width": w, "below": lo, "above": hi, "thickness": t}
        self.check_validity(Quantities(dims, er, f))
        z0 = self.corrected_z_air("single", dims) / np.sqrt(er)
        groups = self._groups(w, lo, hi, t)
        return {"single": assemble_mode("single", f, eps_r, er, z0, groups, q=np.ones(er.shape))}

    def _groups(
        self, w: np.ndarray, lo: np.ndarray, hi: np.ndarray, t: np.ndarray
    ) -> list[ConductorGroup]:
        if not strip_loss_modelled(
            self.kind, t, "the strip's conductor loss", "'0.6 mil' or '0.5 oz'"
        ):
            return []
        return strip_and_planes(
            lambda p: self.corrected_z_air("single", dict(zip(self.dimensions, p, strict=True))),
            (w, lo, hi, t),
            ("strip", lambda p, d: (p[0] - 2 * d, p[1] + d, p[2] + d, p[3] - 2 * d)),
            [
                ("lower plane", lambda p, d: (p[0], p[1] + d, p[2], p[3])),
                ("upper plane", lambda p, d: (p[0], p[1], p[2] + d, p[3])),
            ],
            np.minimum(np.minimum(w, lo), np.minimum(hi, t)),
            w * t,
            self.metal,
            w / t,
            w / np.minimum(lo, hi),
            np.minimum(lo, hi) / np.maximum(lo, hi),
        )

    @classmethod
    def field_geometry(cls, dims: Mapping[str, float], options) -> Geometry:
        """The cross-section for the field solver: the strip(s) between two planes, in the
        core below and the prepreg (``dielectric_above``) that embeds them."""
        from losslane.xsection.fieldsolve.layouts import between_planes

        return between_planes(dims, options, pair=cls.n_conductors == 2)

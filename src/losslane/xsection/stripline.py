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
  Handbook*, 1991), good for w/(b - t) > 0.35 and t/b < 0.25.
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
CORRECTION = StaticCorrection.none(AXES, None, ("single",))
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
        )

    @classmethod
    def field_geometry(cls, dims: Mapping[str, float], options) -> Geometry:
        """The cross-section for the field solver: the strip(s) between two planes, in the
        core below and the prepreg (``dielectric_above``) that embeds them."""
        from losslane.xsection.fieldsolve.layouts import between_planes

        return between_planes(dims, options, pair=cls.n_conductors == 2)

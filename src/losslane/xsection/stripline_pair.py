"""Edge-coupled symmetric stripline pair: two equal strips side by side between two planes.

A symmetric pair carries two quasi-TEM modes: the even mode (both strips at +V) and the
odd mode (+V, -V). Each has its own per-line impedance Z_e, Z_o and effective
permittivity; Z_diff = 2 Z_o, Z_common = Z_e / 2. Each mode is assembled like a single
line (``assemble_mode``), and the 2x2 R, L, G, C follow from the two modes
(``base.pair_rlgc``).

Methods and validity (written from memory of the published paper and checked in
tests/test_coupled*.py against an exact solution, independent numerical solutions and the
single-line limits):

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
    pair_base,
    pair_coupling,
    strip_and_planes,
    strip_loss_modelled,
)
from losslane.xsection.elliptic import k_ratio
from losslane.xsection.fitted import Axis, StaticCorrection
from losslane.xsection.rlgc import ETA0, ConductorGroup, Mode, assemble_mode
from losslane.xsection.stripline import (
    Stripline,
    centred_z_air,
    centring,
    cohn_z_air,
    exactness_weight,
    nearer_plane,
)
from losslane.xsection.validity import Limit, Quantities

if TYPE_CHECKING:
    from losslane.xsection.fieldsolve.geometry import Geometry


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
    # Z = (eta0/4) K(k')/K(k), the reciprocal of k_ratio(k^2, 1 - k^2)
    return {
        "even": ETA0 / 4.0 / k_ratio(1.0 - mp_e, mp_e),
        "odd": ETA0 / 4.0 / k_ratio(1.0 - mp_o, mp_o),
    }


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


#: the parameters of the field-solver correction and the box it was fitted and verified in
AXES = (
    Axis("width/plane spacing", 0.04, 5.0, "log"),
    Axis("spacing/plane spacing", 0.03, 5.0, "log"),
    Axis("thickness/plane spacing", 0.0, 0.25, "sqrt"),
    Axis("4 below above/(below + above)^2", 0.19, 1.0, "linear"),
)

# BEGIN fitted stripline-pair (written by tools/fit_static_corrections.py; do not edit)
CORRECTION = StaticCorrection.none(AXES, None, PAIR_MODES)
# END fitted stripline-pair

_PLANES = ("below", "above", "thickness")
_FIT = "stripline-pair (field-solver correction)"

#: the validity table: the box of the field-solver correction
LIMITS = (
    Limit(_FIT, "width/plane spacing", 0.04, 5.0, ("width", _PLANES)),
    Limit(_FIT, "spacing/plane spacing", 0.03, 5.0, ("spacing", _PLANES)),
    Limit(_FIT, "thickness/plane spacing", 0, 0.25, ("thickness", _PLANES)),
    Limit(_FIT, "nearer plane/(below + above)", 0.05, None, value=nearer_plane),
)


#: what the zero-thickness warning of a pair names, and the thickness it suggests
_NO_THICKNESS = ("the strips' conductor loss", "'1.4 mil' or '1 oz'")


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
    kind: ClassVar[str] = "stripline-pair"
    n_conductors: ClassVar[int] = 2
    dimensions: ClassVar[tuple[str, ...]] = ("width", "spacing", "below", "above", "thickness")
    limits: ClassVar[tuple[Limit, ...]] = LIMITS
    # search bounds: Cohn's zero-thickness solution is exact at any width and spacing
    search: ClassVar[dict] = {
        "width": (("below", "above"), 0.01, 10.0),
        "spacing": (("below", "above"), 0.01, 10.0),
    }
    outer_layer: ClassVar[bool] = False
    correction: ClassVar[StaticCorrection] = CORRECTION

    @classmethod
    def static_parameters(cls, dims: Mapping[str, ArrayLike]) -> tuple[np.ndarray, ...]:
        w, s, lo, hi, t = (np.asarray(dims[k], float) for k in cls.dimensions)
        b = lo + hi + t
        return w / b, s / b, t / b, centring(lo, hi)

    @classmethod
    def static_dimensions(cls, params: tuple[float, ...]) -> dict[str, float]:
        b = 100e-6
        wb, sb, tb, c = params
        t = tb * b
        lo = 0.5 * (1.0 - np.sqrt(max(0.0, 1.0 - c))) * (b - t)
        return {
            "width": wb * b,
            "spacing": sb * b,
            "below": lo,
            "above": b - t - lo,
            "thickness": t,
        }

    @classmethod
    def published_static(
        cls, dims: Mapping[str, ArrayLike], er: ArrayLike
    ) -> dict[str, tuple[np.ndarray, np.ndarray]]:
        """Cohn's coupled striplines with his thickness corrections, offset by the parallel
        combination; eps_eff = eps_r in both modes."""
        p = tuple(dims[k] for k in cls.dimensions)
        er = np.asarray(er, float)
        return {m: (stripline_pair_z_air(m, *p), er) for m in PAIR_MODES}

    @classmethod
    def base_static(
        cls, dims: Mapping[str, ArrayLike], er: ArrayLike
    ) -> dict[str, tuple[np.ndarray, np.ndarray]]:
        single = {k: dims[k] for k in ("width", "below", "above", "thickness")}
        return pair_base(cls, Stripline, single, dims, er)

    @classmethod
    def correction_weight(cls, dims: Mapping[str, ArrayLike]) -> np.ndarray:
        """The coupling ln(Z_even/Z_odd) times the single stripline's weight: zero where
        Cohn's zero-thickness centred pair is exact, and for lines far apart."""
        return pair_coupling(cls, dims) * exactness_weight(dims)

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
        er = eps_r.real
        self.check_validity(Quantities(dict(zip(self.dimensions, p0, strict=True)), er, f))
        lossy = strip_loss_modelled(self.kind, p0[4], *_NO_THICKNESS)
        out = {}
        for mode in PAIR_MODES:
            z_air = self.corrected_z_air(mode, dict(zip(self.dimensions, p0, strict=True)))
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

    def _groups(
        self,
        mode: str,
        w: np.ndarray,
        s: np.ndarray,
        lo: np.ndarray,
        hi: np.ndarray,
        t: np.ndarray,
    ) -> list[ConductorGroup]:
        keys = self.dimensions
        return strip_and_planes(
            lambda p: self.corrected_z_air(mode, dict(zip(keys, p, strict=True))),
            (w, s, lo, hi, t),
            ("strips", lambda p, d: (p[0] - 2 * d, p[1] + 2 * d, p[2] + d, p[3] + d, p[4] - 2 * d)),
            [
                ("lower plane", lambda p, d: (p[0], p[1], p[2] + d, p[3], p[4])),
                ("upper plane", lambda p, d: (p[0], p[1], p[2], p[3] + d, p[4])),
            ],
            np.minimum(np.minimum(np.minimum(w, s), np.minimum(lo, hi)), t),
            w * t,
            self.metal,
            w / t,
            w / np.minimum(lo, hi),
        )

    @classmethod
    def field_geometry(cls, dims: Mapping[str, float], options) -> Geometry:
        """The cross-section for the field solver: the two strips between two planes, in
        the core below and the prepreg (``dielectric_above``) that embeds them."""
        from losslane.xsection.fieldsolve.layouts import between_planes

        return between_planes(dims, options, pair=True)

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

from dataclasses import dataclass, field

import numpy as np

from losslane.errors import check_range, warn
from losslane.materials.dielectric import Dielectric
from losslane.xsection.base import CrossSection, Metal, positive
from losslane.xsection.rlgc import ETA0, ConductorGroup, Mode, assemble_mode, wheeler_factor


def k_ratio_sech(x: np.ndarray) -> np.ndarray:
    """K(k)/K(k') for k = sech(x), k' = tanh(x), accurate for any x > 0."""
    from scipy.special import ellipkm1  # here, not at import: scipy.special costs start-up time

    x = np.asarray(x, float)
    th2 = np.tanh(x) ** 2
    sech2 = 1.0 / np.cosh(x) ** 2
    # m = k^2 = sech^2 x, 1 - m = tanh^2 x; ellipkm1 keeps precision when m -> 1
    return ellipkm1(th2) / ellipkm1(sech2)


def cohn_z_air(w: float, b: float) -> float:
    """Cohn's exact air-filled impedance of a zero-thickness centred stripline."""
    return float(ETA0 / 4.0 * k_ratio_sech(np.pi * w / (2.0 * b)))


def wheeler_z_air(w: float, b: float, t: float) -> float:
    """Wheeler's (1978) air-filled impedance of a centred stripline with a thick strip."""
    x = t / b
    if x > 0:
        m = 6.0 / (3.0 + 2.0 * x / (1.0 - x))
        dw = (
            x
            / (np.pi * (1.0 - x))
            * (1.0 - 0.5 * np.log((x / (2.0 - x)) ** 2 + (0.0796 * x / (w / b + 1.1 * x)) ** m))
        ) * (b - t)
    else:
        dw = 0.0
    wp = (w + dw) / (b - t)
    a = 8.0 / (np.pi * wp)
    return float(
        ETA0 / (4 * np.pi) * np.log(1.0 + 4.0 / (np.pi * wp) * (a + np.sqrt(a * a + 6.27)))
    )


def centred_z_air(w: float, b: float, t: float) -> float:
    """Cohn's exact zero-thickness value scaled by Wheeler's thickness ratio."""
    z = cohn_z_air(w, b)
    if t > 0:
        z *= wheeler_z_air(w, b, t) / wheeler_z_air(w, b, 0.0)
    return z


def stripline_z_air(w: float, below: float, above: float, t: float) -> float:
    """Air-filled impedance of a centred or offset stripline (distances strip to planes)."""
    if abs(below - above) <= 1e-12 * (below + above):
        return centred_z_air(w, below + above + t, t)
    z1 = centred_z_air(w, 2 * below + t, t)
    z2 = centred_z_air(w, 2 * above + t, t)
    return 2 * z1 * z2 / (z1 + z2)


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
    kind = "stripline"

    def __post_init__(self) -> None:
        positive(self.kind, "width", self.width)
        positive(self.kind, "below", self.below)
        positive(self.kind, "above", self.above)
        positive(self.kind, "thickness", self.thickness, allow_zero=True)

    @property
    def spacing(self) -> float:
        """Plane-to-plane spacing b."""
        return self.below + self.above + self.thickness

    def check_validity(self) -> None:
        b, t = self.spacing, self.thickness
        if t > 0:
            check_range("stripline (Wheeler thickness)", "thickness/spacing", t / b, 0, 0.25)
        if abs(self.below - self.above) > 1e-9 * b:
            check_range(
                "offset stripline", "width/(spacing - thickness)", self.width / (b - t), 0.35, None
            )

    def z_air(self, w: float, below: float, above: float, t: float) -> float:
        return stripline_z_air(w, below, above, t)

    def _groups(self) -> list[ConductorGroup]:
        w, lo, hi, t = self.width, self.below, self.above, self.thickness
        if t == 0:
            warn(
                "stripline: thickness = 0, so the strip's conductor loss is not modelled "
                "(give the copper thickness, e.g. '0.6 mil' or '0.5 oz')"
            )
            return []
        scale = min(w, lo, hi, t)
        za = lambda p: self.z_air(*p)  # noqa: E731
        p0 = (w, lo, hi, t)
        g_strip = wheeler_factor(
            za, p0, lambda p, d: (p[0] - 2 * d, p[1] + d, p[2] + d, p[3] - 2 * d), scale
        )
        g_low = wheeler_factor(za, p0, lambda p, d: (p[0], p[1] + d, p[2], p[3]), scale)
        g_high = wheeler_factor(za, p0, lambda p, d: (p[0], p[1], p[2] + d, p[3]), scale)
        m = self.metal
        return [
            ConductorGroup("strip", g_strip, g_strip * w * t, m.conductor, m.foil),
            ConductorGroup("lower plane", g_low, m.plane_thickness, m.conductor, m.planes),
            ConductorGroup("upper plane", g_high, m.plane_thickness, m.conductor, m.planes),
        ]

    def modes(self, f: np.ndarray) -> dict[str, Mode]:
        f = np.atleast_1d(np.asarray(f, float))
        self.check_validity()
        eps_r = self.dielectric.eps(f)
        er = eps_r.real
        z_air = self.z_air(self.width, self.below, self.above, self.thickness)
        z0 = z_air / np.sqrt(er)
        return {
            "single": assemble_mode("single", f, eps_r, er, z0, self._groups(), q=np.ones(f.shape))
        }

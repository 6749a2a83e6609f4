"""Conductors: conductivity, skin depth, surface impedance, and the internal impedance of a
conductor group that joins the exact DC resistance to the skin-effect regime."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from losslane.errors import LossLaneError

MU0 = 4e-7 * np.pi * (1 + 5.5e-10)  # CODATA 2018 value of the vacuum permeability


@dataclass(frozen=True)
class Conductor:
    """A good conductor of conductivity ``sigma`` (S/m) and relative permeability ``mu_r``.

    The default is annealed copper, 5.8e7 S/m (100 % IACS, handbook value).
    """

    sigma: float = 5.8e7
    mu_r: float = 1.0
    name: str = "copper"

    def __post_init__(self) -> None:
        if not np.isfinite(self.sigma) or self.sigma <= 0:
            raise LossLaneError(
                f"conductor {self.name!r}: conductivity = {self.sigma!r} S/m; "
                "valid values are > 0 (copper 5.8e7 S/m)"
            )
        if not np.isfinite(self.mu_r) or self.mu_r < 1:
            raise LossLaneError(
                f"conductor {self.name!r}: mu_r = {self.mu_r!r}; valid values are >= 1"
            )

    def skin_depth(self, f: np.ndarray) -> np.ndarray:
        """delta = 1/sqrt(pi f mu sigma); infinite at DC."""
        f = np.asarray(f, dtype=float)
        with np.errstate(divide="ignore"):
            return 1.0 / np.sqrt(np.pi * f * MU0 * self.mu_r * self.sigma)

    def surface_resistance(self, f: np.ndarray) -> np.ndarray:
        """R_s = 1/(sigma delta) = sqrt(pi f mu / sigma), in ohm per square."""
        f = np.asarray(f, dtype=float)
        return np.sqrt(np.pi * f * MU0 * self.mu_r / self.sigma)

    def surface_impedance(self, f: np.ndarray) -> np.ndarray:
        """Z_s = (1 + j) R_s of a smooth, thick conductor."""
        return (1 + 1j) * self.surface_resistance(f)


COPPER = Conductor()


def _coth_excess(x2: np.ndarray) -> np.ndarray:
    """h = (x coth x - 1) / x^2 as a function of x^2 (complex), exact at x = 0, no overflow."""
    x2 = np.asarray(x2, dtype=complex)
    out = np.empty_like(x2)
    small = np.abs(x2) < 2.5e-3
    xs = x2[small]
    out[small] = 1 / 3 - xs / 45 + 2 * xs**2 / 945
    x = np.sqrt(x2[~small])
    out[~small] = (x / np.tanh(x) - 1) / x2[~small]
    return out


def _tanh_ratio(x2: np.ndarray) -> np.ndarray:
    """tanh(x)/x as a function of x^2 (complex), exact at x = 0, no overflow."""
    x2 = np.asarray(x2, dtype=complex)
    out = np.empty_like(x2)
    small = np.abs(x2) < 2.5e-3
    xs = x2[small]
    out[small] = 1 - xs / 3 + 2 * xs**2 / 15 - 17 * xs**3 / 315
    x = np.sqrt(x2[~small])
    out[~small] = np.tanh(x) / x
    return out


def internal_impedance(
    f: np.ndarray,
    conductor: Conductor,
    geometry_factor: ArrayLike,
    depth: ArrayLike,
    roughness: ArrayLike = 1.0,
    wide: bool = False,
) -> tuple[np.ndarray, np.ndarray]:
    """Internal resistance and inductance per unit length of one conductor group.

    Returns ``(R, L_int)`` in ohm/m and H/m. ``geometry_factor`` G (1/m) is Wheeler's
    incremental-inductance factor of the group, so that at high frequency both forms below
    tend to Z_int = (1 + j) R_s G, Wheeler's skin-effect result (Proc. IRE 30, 1942);
    k = (1 + j)/delta.

    * A signal conductor (``wide=False``): Z_int = (k / sigma) G coth(k tau), the exact
      internal impedance of a conducting slab of half-thickness tau carrying current on
      its faces. The caller picks tau so that the DC limit G/(sigma tau) is the exact DC
      resistance (tau = G * area for a strip). The internal inductance at DC is
      mu G tau / 3.
    * A return plane or a wide coplanar ground (``wide=True``), tau its thickness:
      Z_int = (k / sigma) G tanh(k tau), the slab whose far face rests on a lossless
      path. A plane many times wider than the trace has a DC resistance per unit length
      that is negligible beside the strip's (a 1 oz plane 25 mm wide: 0.02 ohm/m against
      3 ohm/m for a 6 x 1.4 mil trace), and this form gives it exactly 0 at DC while the
      current is still confined under the strip at high frequency; the internal
      inductance at DC is mu G tau.

    In both the internal inductance is finite at DC and falls toward 0 as the frequency
    rises, so the total inductance falls toward the external one.

    ``roughness`` K(f) scales the part of the impedance above the DC resistance, so the
    DC value stays exact whatever the roughness model: for a signal conductor
    Z = R_dc (1 + K (k tau coth(k tau) - 1)); for a wide plane Z = K (k/sigma) G tanh(k tau).

    ``geometry_factor`` and ``depth`` may be arrays (e.g. one value per geometry sample,
    shape (S, 1)) that broadcast against ``f``; where G = 0 the group carries no loss.
    """
    f = np.asarray(f, dtype=float)
    gf = np.asarray(geometry_factor, dtype=float)
    depth = np.asarray(depth, dtype=float)
    live = gf != 0.0
    bad = live & ~(np.isfinite(depth) & (depth > 0))
    if np.any(bad):
        shown = depth if depth.ndim == 0 else np.broadcast_to(depth, bad.shape)[bad][0]
        raise LossLaneError(f"conductor depth {float(shown)!r} m must be > 0")
    if not np.any(live):
        shape = np.broadcast_shapes(f.shape, gf.shape, depth.shape)
        return np.zeros(shape), np.zeros(shape)
    tau = np.where(live, depth, 1.0)
    mu = MU0 * conductor.mu_r
    omega = 2 * np.pi * f
    x2 = 1j * omega * mu * conductor.sigma * tau**2
    if wide:
        # Z = K j w mu G tau tanh(x)/x with x^2 = j w mu sigma tau^2: R(0) = 0 exactly
        kt = np.asarray(roughness) * _tanh_ratio(x2)
        g_live = np.where(live, gf, 0.0)
        return -omega * mu * g_live * tau * kt.imag, mu * g_live * tau * kt.real
    kh = np.asarray(roughness) * _coth_excess(x2)
    r_dc = np.where(live, gf, 0.0) / (conductor.sigma * tau)
    # Z = r_dc (1 + K x^2 h(x^2)) and x^2 = j w mu sigma tau^2, so both parts stay finite at DC
    resistance = r_dc * (1.0 - omega * mu * conductor.sigma * tau**2 * kh.imag)
    inductance = r_dc * mu * conductor.sigma * tau**2 * kh.real
    return resistance, inductance

"""Per-unit-length RLGC: the container, Wheeler's incremental-inductance rule, and the
assembly of R, L, G, C from a model's quasi-static (or dispersive) results.

Every cross-section model reduces to the same few numbers per propagation mode:

* its lossless impedance Z0(f) and effective permittivity eps_eff(f) (from the model's
  own formulas, dispersion included), which give the external inductance and the
  capacitance: L_ext = Z0 sqrt(eps_eff) / c0, C = sqrt(eps_eff) / (Z0 c0);
* its dielectric filling factor q = (eps_eff - 1)/(eps_r' - 1), which turns the
  laminate's complex permittivity into the line's: eps_eff'' = q eps_r''. With the
  quasi-static q (constant in frequency) G and C form a Kramers-Kronig pair whenever
  the laminate model is causal;
* Wheeler's geometry factor per conductor group, G_k = (1/eta0) dZ0_air/dn, the change
  of the air-filled impedance when that group's walls recede by dn (H. A. Wheeler,
  "Formulas for the skin effect", Proc. IRE 30, 1942). It is computed numerically from
  the model's own impedance function -- one routine for every geometry.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import TypeVar

import numpy as np
from numpy.typing import ArrayLike

from losslane.materials.conductor import MU0, Conductor, return_impedance, strip_impedance
from losslane.materials.roughness import Roughness, Smooth

C0 = 299_792_458.0
EPS0 = 1.0 / (MU0 * C0**2)
ETA0 = MU0 * C0

P = TypeVar("P")


@dataclass(frozen=True)
class RLGC:
    """Per-unit-length matrices over frequency: ``f`` (N,), ``r l g c`` (N, n, n), SI units.

    ``transform``: for a line whose modes are known in advance (a symmetric pair), the real
    orthonormal (n, n) matrix T whose columns are the modes, so that T^T Z T and T^T Y T
    are diagonal at every frequency; line blocks then use the modes directly instead of
    an eigen-decomposition. None for a general line.
    """

    f: np.ndarray
    r: np.ndarray
    l: np.ndarray
    g: np.ndarray
    c: np.ndarray
    transform: np.ndarray | None = None

    @property
    def n(self) -> int:
        return self.r.shape[-1]

    @property
    def omega(self) -> np.ndarray:
        return 2 * np.pi * self.f

    def z(self) -> np.ndarray:
        """Series impedance per metre, R + j w L, (N, n, n)."""
        return self.r + 1j * self.omega[:, None, None] * self.l

    def y(self) -> np.ndarray:
        """Shunt admittance per metre, G + j w C, (N, n, n)."""
        return self.g + 1j * self.omega[:, None, None] * self.c

    def scalar(self) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """(r, l, g, c) as (N,) arrays of a single-conductor line."""
        if self.n != 1:
            raise ValueError("scalar() needs a single-conductor line")
        return self.r[:, 0, 0], self.l[:, 0, 0], self.g[:, 0, 0], self.c[:, 0, 0]

    def gamma(self) -> np.ndarray:
        """Propagation constant alpha + j beta of a single line, (N,)."""
        z, y = self.z()[:, 0, 0], self.y()[:, 0, 0]
        return np.sqrt(z * y)

    def zc(self) -> np.ndarray:
        """Complex characteristic impedance sqrt(Z/Y) of a single line, (N,).

        Infinite at f = 0 (no shunt admittance at DC); callers that need a finite
        value there use the lossless sqrt(L/C) instead.
        """
        z, y = self.z()[:, 0, 0], self.y()[:, 0, 0]
        with np.errstate(divide="ignore", invalid="ignore"):
            return np.where(np.abs(y) > 0, np.sqrt(z / np.where(y == 0, 1, y)), np.inf)

    @classmethod
    def single(
        cls, f: np.ndarray, r: np.ndarray, l: np.ndarray, g: np.ndarray, c: np.ndarray
    ) -> RLGC:
        return cls(
            np.asarray(f, float), *(np.asarray(a, float)[:, None, None] for a in (r, l, g, c))
        )


@dataclass(frozen=True)
class ConductorGroup:
    """The walls of one conductor (or set of conductors) that share a current path.

    ``geometry_factor`` is Wheeler's G (1/m): R_ac = R_s * G. For a signal conductor
    ``depth`` tau is chosen so that G / (sigma tau) is its DC resistance, and ``aspect``
    (width/thickness) and ``proximity`` (width over the distance to the nearest return)
    select the shape of its DC-to-skin transition (``materials.conductor.strip_impedance``);
    ``wide`` marks a return plane or wide coplanar ground (``depth`` its thickness), whose
    DC resistance is negligible (``materials.conductor.return_impedance``). G, tau and the
    ratios are scalars, or arrays of one value per geometry sample (shape (S, 1)).
    """

    name: str
    geometry_factor: float | np.ndarray
    depth: float | np.ndarray
    conductor: Conductor
    roughness: Roughness = Smooth()
    wide: bool = False
    aspect: float | np.ndarray = 4.0
    proximity: float | np.ndarray = 1.5
    #: the nearer plane's distance over the farther's (0: one plane)
    balance: float | np.ndarray = 0.0
    #: a return group of one mode of a symmetric pair: (h, d, sign) of the two line
    #: currents its return sees (``materials.conductor.pair_return_shape``)
    pair: tuple | None = None
    #: a return plane of a line between two planes (a stripline's; their coupling while
    #: the current spreads, ``materials.conductor.two_plane_excess``)
    between: bool = False
    #: whether the strip's transition carries the fitted correction
    #: (``materials.conductor.transition_correction``; fitted on strips over planes)
    corrected: bool = True


@dataclass(frozen=True)
class Mode:
    """One propagation mode of a line: its field quantities and its per-line RLGC, (N,)
    over frequency, or (S, N) for S geometry samples."""

    name: str
    eps_eff: np.ndarray
    z0: np.ndarray
    r: np.ndarray
    l: np.ndarray
    g: np.ndarray
    c: np.ndarray


def wheeler_factor(
    z_air: Callable[[P], ArrayLike],
    params: P,
    recede: Callable[[P, ArrayLike], P],
    scale: ArrayLike,
) -> np.ndarray:
    """Wheeler's geometry factor G = (1/eta0) dZ0_air/dn for one conductor group.

    ``recede(params, dn)`` returns the geometry with that group's walls moved by ``dn``
    into the metal (dn < 0: out of it); ``scale`` is the smallest dimension involved,
    which sets the finite-difference step (central difference, step 1e-4 of it). The
    parameters may be arrays of geometry samples (elementwise ``z_air``); G then has
    their shape.
    """
    dn = 1e-4 * np.asarray(scale, float)
    dz = z_air(recede(params, dn)) - z_air(recede(params, -dn))
    return dz / (2 * dn) / ETA0


def filling_factor(eps_eff: np.ndarray, eps_r_real: np.ndarray) -> np.ndarray:
    """q = (eps_eff - 1)/(eps_r - 1); 1 where the dielectric is air-like."""
    eps_eff = np.asarray(eps_eff, float)
    den = np.asarray(eps_r_real, float) - 1.0
    safe = np.abs(den) > 1e-9
    return np.where(safe, (eps_eff - 1.0) / np.where(safe, den, 1.0), 1.0)


def assemble_mode(
    name: str,
    f: np.ndarray,
    eps_r: np.ndarray,
    eps_eff: np.ndarray,
    z0: np.ndarray,
    groups: list[ConductorGroup],
    q: np.ndarray | None = None,
) -> Mode:
    """R, L, G, C of one mode from its model results.

    ``eps_r`` is the laminate's complex permittivity eps' - j eps'' (N,); ``eps_eff`` the
    mode's real effective permittivity and ``z0`` its lossless impedance (N,), both with
    the model's dispersion; ``q`` the filling factor (default from eps_eff and eps_r').
    For S geometry samples at once every input may carry a leading sample axis ((S, N),
    or (S, 1) for the groups' factors): the mode's arrays are then (S, N).
    """
    f = np.asarray(f, float)
    omega = 2 * np.pi * f
    shape = np.broadcast_shapes(f.shape, np.shape(eps_eff), np.shape(z0))
    eps_eff = np.broadcast_to(np.asarray(eps_eff, float), shape)
    z0 = np.broadcast_to(np.asarray(z0, float), shape)
    root = np.sqrt(eps_eff)
    l_ext = z0 * root / C0
    c = root / (z0 * C0)
    if q is None:
        q = filling_factor(eps_eff, eps_r.real)
    eps_eff_loss = q * (-np.asarray(eps_r).imag)
    g = omega * c * eps_eff_loss / eps_eff
    r = np.zeros(shape)
    l_int = np.zeros(shape)
    for dr, dl in group_impedances(f, groups):
        r = r + dr
        l_int = l_int + dl
    return Mode(name, np.array(eps_eff), np.array(z0), r, l_ext + l_int, g, c)


def group_impedances(
    f: np.ndarray, groups: list[ConductorGroup]
) -> list[tuple[np.ndarray, np.ndarray]]:
    """(R, L_int) of each conductor group, in order: a signal conductor by its own
    internal impedance (``materials.conductor.strip_impedance``), the wide groups (planes,
    coplanar grounds) as the parts of one return path
    (``materials.conductor.return_impedance``). One conductor for them all."""
    out: list = [None] * len(groups)
    returns = [i for i, g in enumerate(groups) if g.wide]
    for i, grp in enumerate(groups):
        if not grp.wide:
            k = grp.roughness.factor(f, grp.conductor)
            out[i] = strip_impedance(
                f,
                grp.conductor,
                grp.geometry_factor,
                grp.depth,
                k,
                grp.aspect,
                grp.proximity,
                grp.corrected,
                grp.balance,
            )
    if returns:
        cond = groups[returns[0]].conductor
        parts = [
            (
                groups[i].geometry_factor,
                groups[i].depth,
                groups[i].roughness.factor(f, cond),
            )
            for i in returns
        ]
        pair = groups[returns[0]].pair
        two = len(returns) == 2 and all(groups[i].between for i in returns)
        zs = return_impedance(f, cond, parts, pair=pair, two_planes=two)
        for i, z in zip(returns, zs, strict=True):
            out[i] = z
    return out


def attenuation_split(
    r: np.ndarray, l: np.ndarray, g: np.ndarray, c: np.ndarray, f: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Total, conductor and dielectric attenuation (Np/m) of a single line.

    The dielectric part is the attenuation with R = 0; the conductor part is the rest,
    so the two always add up to the total.
    """
    omega = 2 * np.pi * np.asarray(f, float)
    y = g + 1j * omega * c
    total = np.sqrt((r + 1j * omega * l) * y).real
    dielectric = np.sqrt(1j * omega * l * y).real
    return total, total - dielectric, dielectric


NP_TO_DB = 20.0 / np.log(10.0)

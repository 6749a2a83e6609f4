"""What every cross-section model shares: its metal description, the mode interface, and
the derived line properties (impedance, delay, loss per inch) that the outputs report."""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import ArrayLike

from losslane.errors import LossLaneError, warn
from losslane.materials.conductor import COPPER, Conductor
from losslane.materials.dielectric import Dielectric
from losslane.materials.roughness import Roughness, Smooth
from losslane.units import INCH, OZ_COPPER
from losslane.xsection.rlgc import (
    NP_TO_DB,
    RLGC,
    ConductorGroup,
    Mode,
    attenuation_split,
    wheeler_factor,
)


@dataclass(frozen=True)
class Metal:
    """Conductors of a line: the metal, the foil roughness of the signal conductor(s), and
    the return planes' roughness and thickness (1 oz copper by default, common practice)."""

    conductor: Conductor = COPPER
    foil: Roughness = field(default_factory=Smooth)
    plane_foil: Roughness | None = None
    plane_thickness: float = OZ_COPPER

    def __post_init__(self) -> None:
        if not np.isfinite(self.plane_thickness) or self.plane_thickness <= 0:
            raise LossLaneError(f"plane_thickness = {self.plane_thickness!r} m must be > 0")

    @property
    def planes(self) -> Roughness:
        return self.foil if self.plane_foil is None else self.plane_foil


def positive(kind: str, key: str, value: ArrayLike, allow_zero: bool = False) -> None:
    """A LossLaneError unless the length ``value`` (a scalar, or an array of geometry
    samples: the first bad one is named) is finite and > 0 (>= 0 with ``allow_zero``)."""
    v = np.asarray(value, dtype=float)
    bad = ~np.isfinite(v) | ((v < 0) if allow_zero else (v <= 0))
    if np.any(bad):
        shown = value if v.ndim == 0 else float(v[bad][0])
        bound = ">= 0" if allow_zero else "> 0"
        raise LossLaneError(
            f"{kind}: {key} = {shown!r} m is not a valid length; it must be {bound}"
        )


#: dimensions for which 0 is a valid limit (a zero-thickness strip); every other is > 0
MAY_BE_ZERO = ("thickness",)


def check_dimensions(kind: str, dimensions: Mapping[str, ArrayLike]) -> None:
    """``positive`` for each {key: length or samples}, in order (0 allowed in ``MAY_BE_ZERO``)."""
    for key, value in dimensions.items():
        positive(kind, key, value, allow_zero=key in MAY_BE_ZERO)


def strip_loss_modelled(kind: str, thickness: ArrayLike, what: str, example: str) -> bool:
    """Whether the closed-form conductor loss applies: not for a strip of zero thickness
    (Wheeler's rule needs the strip's walls; the edge current of a zero-thickness strip
    makes its factor diverge), which is said in a warning. Geometry samples must agree.
    """
    t = np.asarray(thickness, dtype=float)
    if np.all(t == 0):
        warn(
            f"{kind}: thickness = 0, so {what} is not modelled "
            f"(give the copper thickness, e.g. {example})"
        )
        return False
    if np.any(t == 0):
        raise LossLaneError(
            f"{kind}: thickness samples mix zero and non-zero values; evaluate the "
            "zero-thickness samples separately"
        )
    return True


#: how a conductor's walls recede by dn into the metal: (geometry params, dn) -> params
Recede = Callable[[tuple, np.ndarray], tuple]


def strip_and_planes(
    z_air: Callable[[tuple], np.ndarray],
    p0: tuple,
    strip: tuple[str, Recede],
    planes: list[tuple[str, Recede]],
    scale: np.ndarray,
    area: np.ndarray,
    metal: Metal,
) -> list[ConductorGroup]:
    """Wheeler's conductor groups of one mode: the strip(s), then each return plane.

    The strips' depth is G * ``area`` (their exact DC resistance); a plane's is
    ``metal.plane_thickness`` with the planes' foil, marked wide.
    """
    name, recede = strip
    g_strip = wheeler_factor(z_air, p0, recede, scale)
    groups = [ConductorGroup(name, g_strip, g_strip * area, metal.conductor, metal.foil)]
    for name, recede in planes:
        g = wheeler_factor(z_air, p0, recede, scale)
        groups.append(
            ConductorGroup(name, g, metal.plane_thickness, metal.conductor, metal.planes, True)
        )
    return groups


class CrossSection:
    """A transmission-line cross-section.

    Subclasses set ``kind`` and ``n_conductors`` and implement ``modes(f)``, which returns
    the propagation modes ('single' for one signal conductor; 'even' and 'odd' for a
    symmetric pair) with their per-line R, L, G, C over the frequency array ``f`` (Hz,
    f = 0 allowed).

    The closed-form models instead implement ``mode_arrays`` and name their length fields
    in ``dimensions``; their ``modes(f)`` is then ``mode_arrays`` at the section's own
    dimensions, so one code path serves a single line and a batch of geometry samples
    (``xsection.batch``), and each dimension is checked on construction
    (``check_dimensions``).
    """

    kind: str = ""
    n_conductors: int = 1
    dielectric: Dielectric
    #: the length fields that ``mode_arrays`` takes as keyword arguments
    dimensions: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        # run by the dataclass __init__ of the closed-form models
        check_dimensions(self.kind, self._dimension_values())

    def _dimension_values(self) -> dict[str, float]:
        return {k: getattr(self, k) for k in self.dimensions}

    def modes(self, f: np.ndarray) -> dict[str, Mode]:
        f = np.atleast_1d(np.asarray(f, dtype=float))
        return self.mode_arrays(f, self.dielectric.eps(f), **self._dimension_values())

    def mode_arrays(
        self, f: np.ndarray, eps_r: np.ndarray, **dimensions: ArrayLike
    ) -> dict[str, Mode]:
        """The modes with the ``dimensions`` given as arrays of geometry samples that
        broadcast against ``f`` (F,), e.g. (S, 1), and the laminate's permittivity
        ``eps_r`` ((F,), or (S, F) with a Dk per sample); the modes' arrays are then
        (S, F). The section supplies everything else (metal, grounded...). Validity
        warnings and input errors fire when any sample triggers them."""
        raise NotImplementedError

    def rlgc(self, f: np.ndarray) -> RLGC:
        f = np.atleast_1d(np.asarray(f, dtype=float))
        return self._rlgc(f, self.modes(f))

    def _rlgc(self, f: np.ndarray, modes: dict[str, Mode]) -> RLGC:
        """The per-unit-length matrices at ``f`` from the section's ``modes`` there."""
        if self.n_conductors == 1:
            m = modes["single"]
            return RLGC.single(f, m.r, m.l, m.g, m.c)
        return pair_rlgc(f, modes["even"], modes["odd"])

    def properties(self, f: np.ndarray) -> dict:
        """The line's reported quantities at ``f`` (the keys of ``losslane line --json``)."""
        f = np.atleast_1d(np.asarray(f, dtype=float))
        modes = self.modes(f)
        main = modes["single"] if self.n_conductors == 1 else modes["odd"]
        out: dict = {"kind": self.kind, "frequencies_hz": f.tolist()}
        out.update(_mode_numbers(main, f))
        rl = self._rlgc(f, modes)
        out["rlgc"] = {
            "r_ohm_per_m": _matrix_list(rl.r),
            "l_h_per_m": _matrix_list(rl.l),
            "g_s_per_m": _matrix_list(rl.g),
            "c_f_per_m": _matrix_list(rl.c),
        }
        if self.n_conductors == 2:
            even = _mode_numbers(modes["even"], f)
            odd = out
            out["z_odd_ohm"] = odd["z0_ohm"]
            out["z_even_ohm"] = even["z0_ohm"]
            out["z_diff_ohm"] = [2 * z for z in odd["z0_ohm"]]
            out["z_common_ohm"] = [z / 2 for z in even["z0_ohm"]]
            out["eps_eff_odd"] = odd["eps_eff"]
            out["eps_eff_even"] = even["eps_eff"]
            # differential-mode loss equals the odd-mode loss of one line (same dB)
        return out


def _matrix_list(a: np.ndarray) -> list:
    if a.shape[-1] == 1:
        return a[:, 0, 0].tolist()
    return a.tolist()


def _mode_numbers(m: Mode, f: np.ndarray) -> dict:
    omega = 2 * np.pi * f
    z = m.r + 1j * omega * m.l
    y = m.g + 1j * omega * m.c
    with np.errstate(divide="ignore", invalid="ignore"):
        zc = np.sqrt(z / y)
    total, cond, diel = attenuation_split(m.r, m.l, m.g, m.c, f)
    gamma = np.sqrt(z * y)
    with np.errstate(divide="ignore", invalid="ignore"):
        delay = np.where(omega > 0, gamma.imag / np.where(omega > 0, omega, 1), np.sqrt(m.l * m.c))

    def finite(a: np.ndarray) -> list:
        return [float(v) if np.isfinite(v) else None for v in a]

    per_in = NP_TO_DB * INCH
    return {
        "z0_ohm": np.sqrt(m.l / m.c).tolist(),
        "zc_real_ohm": finite(zc.real),
        "zc_imag_ohm": finite(zc.imag),
        "eps_eff": m.eps_eff.tolist(),
        "delay_ps_per_in": (delay * INCH * 1e12).tolist(),
        "loss_db_per_in": (total * per_in).tolist(),
        "conductor_db_per_in": (cond * per_in).tolist(),
        "dielectric_db_per_in": (diel * per_in).tolist(),
    }


def pair_rlgc(f: np.ndarray, even: Mode, odd: Mode) -> RLGC:
    """2x2 per-unit-length matrices of a symmetric pair from its even and odd modes.

    For a symmetric pair the modal transform is fixed ([1, 1], [1, -1]); self terms are
    the mean of the modes and mutual terms half their difference (per-line quantities),
    e.g. L11 = (Le + Lo)/2, L12 = (Le - Lo)/2, C12 = (Ce - Co)/2 < 0 (Maxwell form).
    """

    def mat(e: np.ndarray, o: np.ndarray) -> np.ndarray:
        out = np.empty(f.shape + (2, 2))
        out[:, 0, 0] = out[:, 1, 1] = (e + o) / 2
        out[:, 0, 1] = out[:, 1, 0] = (e - o) / 2
        return out

    return RLGC(f, mat(even.r, odd.r), mat(even.l, odd.l), mat(even.g, odd.g), mat(even.c, odd.c))

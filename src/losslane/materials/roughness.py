"""Copper roughness: the factor K(f) = (loss of the rough surface) / (loss of a smooth one).

Models (each tends to 1 at low frequency, where the skin depth dwarfs the roughness):

* :class:`Smooth` -- K = 1.
* :class:`Hammerstad` -- K = 1 + (2/pi) atan(1.4 (Rq/delta)^2) (E. Hammerstad,
  F. Bekkadal, *Microstrip Handbook*, 1975); saturates at 2. Fitted for Rq below about
  2 um; it under-predicts loss of very rough foils above ~5 GHz.
* :class:`Groiss` -- K = 1 + exp(-(delta/(2 Rq))^1.6) (S. Groiss et al., EMC Zurich 1996);
  saturates at 2.
* :class:`Huray` -- the "snowball" model (P. G. Huray, *The Foundations of Signal
  Integrity*, Wiley 2009): K = A_matte/A_flat + (3/2) sum_i SR_i / (1 + delta/a_i +
  delta^2/(2 a_i^2)), with SR_i = N_i 4 pi a_i^2 / A_flat the surface ratio of the
  spheres of radius a_i; saturates at A_matte/A_flat + (3/2) sum SR_i. The 3/2 factor is
  the high-frequency absorption cross-section of a conducting sphere over its surface
  (written from memory of Huray's derivation).
* :class:`Graded` -- a rough, possibly plated surface (e.g. a gold flash on nickel on
  copper) as a graded stack whose complex surface impedance comes from scikit-rf's
  ``tlineFunctions.surface_impedance`` (Tegowski et al., IEEE T-MTT 71(2), 2023; Gold and
  Helmreich, EuMC 2016); K = Z_s(stack) / Z_s(smooth base copper), complex, both taken at
  the mean plane of the outermost boundary (where the line's dimensions are measured).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np

from losslane.errors import LossLaneError
from losslane.materials.conductor import MU0, Conductor

C0 = 299_792_458.0
ETA0 = MU0 * C0


def _positive(model: str, key: str, value: float) -> float:
    if not np.isfinite(value) or value <= 0:
        raise LossLaneError(f"roughness model {model!r}: {key} = {value!r} must be a length > 0")
    return value


class Roughness:
    """Base class. ``factor(f, conductor)`` returns K(f), real or complex, K(0) = 1."""

    model: str = "none"

    def factor(self, f: np.ndarray, conductor: Conductor) -> np.ndarray:
        raise NotImplementedError

    def saturation(self) -> float:
        """The high-frequency limit of |K|."""
        raise NotImplementedError

    def parameters(self) -> dict:
        return {}


@dataclass(frozen=True)
class Smooth(Roughness):
    model = "none"

    def factor(self, f: np.ndarray, conductor: Conductor) -> np.ndarray:
        return np.ones(np.shape(f))

    def saturation(self) -> float:
        return 1.0


@dataclass(frozen=True)
class Hammerstad(Roughness):
    """Hammerstad-Bekkadal roughness factor; ``rq`` is the RMS roughness in metres."""

    rq: float
    model = "hammerstad"

    def __post_init__(self) -> None:
        _positive(self.model, "rq", self.rq)

    def factor(self, f: np.ndarray, conductor: Conductor) -> np.ndarray:
        delta = conductor.skin_depth(f)
        with np.errstate(divide="ignore"):
            ratio = np.where(np.isfinite(delta), self.rq / delta, 0.0)
        return 1.0 + (2.0 / np.pi) * np.arctan(1.4 * ratio**2)

    def saturation(self) -> float:
        return 2.0

    def parameters(self) -> dict:
        return {"rq_m": self.rq}


@dataclass(frozen=True)
class Groiss(Roughness):
    """Groiss roughness factor; ``rq`` is the RMS roughness in metres."""

    rq: float
    model = "groiss"

    def __post_init__(self) -> None:
        _positive(self.model, "rq", self.rq)

    def factor(self, f: np.ndarray, conductor: Conductor) -> np.ndarray:
        delta = conductor.skin_depth(f)
        with np.errstate(over="ignore", invalid="ignore"):
            k = 1.0 + np.exp(-((delta / (2.0 * self.rq)) ** 1.6))
        return np.where(np.isfinite(delta), k, 1.0)

    def saturation(self) -> float:
        return 2.0

    def parameters(self) -> dict:
        return {"rq_m": self.rq}


@dataclass(frozen=True)
class Huray(Roughness):
    """Huray snowball model.

    ``spheres`` is a tuple of (radius a_i in m, surface ratio SR_i); ``matte_ratio`` is
    A_matte/A_flat (1 for a flat base under the spheres).
    """

    spheres: tuple[tuple[float, float], ...]
    matte_ratio: float = 1.0
    model = "huray"

    def __post_init__(self) -> None:
        if not self.spheres:
            raise LossLaneError("roughness model 'huray': give at least one sphere size")
        for radius, ratio in self.spheres:
            _positive(self.model, "radius", radius)
            if not np.isfinite(ratio) or ratio < 0:
                raise LossLaneError(
                    f"roughness model 'huray': surface_ratio = {ratio!r} must "
                    "be >= 0 (typical 0.5..4)"
                )
        if not np.isfinite(self.matte_ratio) or self.matte_ratio < 1:
            raise LossLaneError(
                f"roughness model 'huray': matte_ratio = {self.matte_ratio!r} "
                "must be >= 1 (1 for a flat base)"
            )

    @classmethod
    def from_surface_ratio(
        cls, radius: float, surface_ratio: float, matte_ratio: float = 1.0
    ) -> Huray:
        return cls(((radius, surface_ratio),), matte_ratio)

    @classmethod
    def from_counts(
        cls, radius: float, count: float, tile_area: float, matte_ratio: float = 1.0
    ) -> Huray:
        """``count`` spheres of ``radius`` on a flat tile of ``tile_area`` (m^2)."""
        _positive("huray", "tile_area", tile_area)
        return cls(((radius, count * 4 * np.pi * radius**2 / tile_area),), matte_ratio)

    def factor(self, f: np.ndarray, conductor: Conductor) -> np.ndarray:
        delta = np.asarray(conductor.skin_depth(f), dtype=float)
        finite = np.isfinite(delta)
        d = np.where(finite, delta, 0.0)
        k = np.full(delta.shape, float(self.matte_ratio))
        for radius, ratio in self.spheres:
            k = k + np.where(finite, 1.5 * ratio / (1.0 + d / radius + d**2 / (2 * radius**2)), 0.0)
        # K(0) is the matte ratio; the internal-impedance routine applies K only above the
        # DC resistance, so DC stays exact.
        return k

    def saturation(self) -> float:
        return self.matte_ratio + 1.5 * sum(r for _, r in self.spheres)

    def parameters(self) -> dict:
        return {
            "spheres": [{"radius_m": a, "surface_ratio": r} for a, r in self.spheres],
            "matte_ratio": self.matte_ratio,
        }


@dataclass(frozen=True)
class FinishLayer:
    """One layer of a surface finish, outermost first: conductivity (S/m), mu_r, thickness (m)."""

    sigma: float
    thickness: float
    mu_r: float = 1.0
    name: str = "finish"


@dataclass(frozen=True)
class Graded(Roughness):
    """A rough and/or plated surface from scikit-rf's graded-stack surface impedance.

    ``layers`` are finish layers over the base conductor, outermost first (may be empty:
    bare rough copper). ``rq`` is the RMS roughness of every boundary (m); ``outside_dk``
    the permittivity of the medium the wave comes from (1 for air, the laminate's Dk for
    the treated side of a foil).
    """

    rq: float
    layers: tuple[FinishLayer, ...] = field(default_factory=tuple)
    outside_dk: float = 1.0
    model = "graded"

    def __post_init__(self) -> None:
        if not np.isfinite(self.rq) or self.rq < 0:
            raise LossLaneError(f"roughness model 'graded': rq = {self.rq!r} must be >= 0")
        for layer in self.layers:
            _positive(self.model, f"layer {layer.name!r} thickness", layer.thickness)
            if layer.sigma <= 0:
                raise LossLaneError(
                    f"roughness model 'graded': layer {layer.name!r} "
                    f"conductivity = {layer.sigma!r} must be > 0"
                )

    def factor(self, f: np.ndarray, conductor: Conductor) -> np.ndarray:
        f = np.asarray(f, dtype=float)
        out = np.ones(f.shape, dtype=complex)
        pos = f > 0
        if not np.any(pos):
            return out
        lo, hi = float(f[pos].min()), float(f[pos].max())
        grid, k = _graded_factor_table(self, conductor, lo, hi)
        # K varies smoothly with log f: a cubic spline through 16 points per decade stays
        # within about 1e-6 of scikit-rf's direct result (its own refinement tolerance);
        # straight-line interpolation of the same table was off by up to 1e-3.
        lf = np.log(f[pos])
        if grid.size < 4:
            out[pos] = np.interp(lf, grid, k.real) + 1j * np.interp(lf, grid, k.imag)
        else:
            from scipy.interpolate import CubicSpline

            out[pos] = CubicSpline(grid, k)(lf)
        return out

    def saturation(self) -> float:
        k = _graded_factor_table(self, Conductor(), 1e11, 1e12)[1]
        return float(abs(k[-1]))

    def parameters(self) -> dict:
        return {
            "rq_m": self.rq,
            "outside_dk": self.outside_dk,
            "layers": [
                {
                    "name": x.name,
                    "conductivity_s_per_m": x.sigma,
                    "mu_r": x.mu_r,
                    "thickness_m": x.thickness,
                }
                for x in self.layers
            ],
        }


@lru_cache(maxsize=64)
def _graded_factor_table(
    model: Graded, conductor: Conductor, lo: float, hi: float
) -> tuple[np.ndarray, np.ndarray]:
    import warnings

    from skrf.tlineFunctions import surface_impedance

    n = 2 if lo == hi else int(np.clip(np.ceil(16 * np.log10(hi / lo)) + 1, 8, 400))
    fgrid = np.geomspace(lo, hi if hi > lo else lo * 1.0001, n)
    mats = [{"ep_r": model.outside_dk}]
    mats += [{"sigma": x.sigma, "mu_r": x.mu_r} for x in model.layers]
    mats += [{"sigma": conductor.sigma, "mu_r": conductor.mu_r}]
    locs = np.concatenate([[0.0], np.cumsum([x.thickness for x in model.layers])])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)
        zs = surface_impedance(fgrid, mats, rms_roughness=max(model.rq, 0.0), boundary_loc=locs)
    # scikit-rf refers Zs to the start of its computation span, 5 rms heights out in the
    # outside medium (x_start in its source); move it back to the mean plane through that
    # lossless slab, or the slab's reactance j w mu0 5 rq would be added to the line's
    # inductance (and shift Z0 and delay) for no physical reason.
    reach = 5.0 * max(model.rq, 1e-14)
    eta = ETA0 / np.sqrt(model.outside_dk)
    t = 1j * np.tan(2 * np.pi * fgrid * np.sqrt(model.outside_dk) / C0 * reach)
    zs = eta * (zs - eta * t) / (eta - zs * t)
    k = zs / conductor.surface_impedance(fgrid)
    return np.log(fgrid), k

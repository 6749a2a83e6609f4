"""Vectorized evaluation of a cross-section over many geometry samples at once.

Sizing and tolerance Monte Carlo need the same model at thousands of geometries.
:func:`evaluate` takes a nominal section plus geometry arrays of shape (S,) (and a Dk
scale of shape (S,)) and a frequency array (F,), and returns the main mode's R, L, G, C,
impedance and loss as (S, F) arrays in one numpy call -- no Python loop over samples.

The closed-form models are array-native: their ``mode_arrays`` takes the dimensions as
(S, 1) arrays against the frequency axis, and their own ``modes(f)`` is that same
function at scalar dimensions, so there is one implementation of every formula. Their
validity warnings and input errors fire when any sample triggers them.

Sections without an array path (the field solver, or a model that implements ``modes``
itself) fall back to one model call per sample (``section.replace``), with the same result
shape; ``type(section).vectorized()`` tells which path a section takes.

A Dk variation scales the laminate's complex permittivity: eps(f) -> s * eps(f). For
both dielectric models this is exactly a refit at Dk' = s Dk with the same Df and the
same frequency (the wideband Debye fit is linear in Dk at fixed Df), so the Df curve
and causality are kept.
"""

from __future__ import annotations

import dataclasses
import warnings
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError, LossLaneWarning, warn
from losslane.materials.dielectric import Dielectric
from losslane.units import INCH
from losslane.xsection.base import CrossSection, check_dimensions
from losslane.xsection.rlgc import NP_TO_DB, Mode, attenuation_split


@dataclass(frozen=True)
class LineArrays:
    """The main mode of S geometry samples over F frequencies; every array is (S, F).

    ``impedance`` is what ``losslane line`` reports as the line's impedance: the lossless
    sqrt(L/C) (internal inductance and dispersion included) of a single-ended line, or
    the differential impedance 2 sqrt(L_odd/C_odd) of a pair. The losses are those of
    the same mode (the differential mode of a pair), in Np/m.
    """

    f: np.ndarray
    impedance: np.ndarray
    eps_eff: np.ndarray
    r: np.ndarray
    l: np.ndarray
    g: np.ndarray
    c: np.ndarray
    differential: bool = False

    @property
    def samples(self) -> int:
        return self.impedance.shape[0]

    def attenuation(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Total, conductor and dielectric attenuation, Np/m, (S, F) each."""
        return attenuation_split(self.r, self.l, self.g, self.c, self.f[None, :])

    def loss_db_per_in(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Total, conductor and dielectric loss in dB per inch, (S, F) each."""
        k = NP_TO_DB * INCH
        total, cond, diel = self.attenuation()
        return total * k, cond * k, diel * k


def scaled_dielectric(d: Dielectric, scale: float) -> Dielectric:
    """``d`` with its permittivity scaled by ``scale`` (Dk -> scale Dk, same Df curve)."""
    if scale == 1.0:
        return d
    if not dataclasses.is_dataclass(d) or "dk" not in {x.name for x in dataclasses.fields(d)}:
        raise LossLaneError(f"dielectric {getattr(d, 'name', d)!r} cannot be rescaled in Dk")
    return dataclasses.replace(d, dk=d.dk * scale)


def evaluate(
    section: CrossSection,
    f: np.ndarray | float,
    *,
    dk_scale: np.ndarray | float | None = None,
    progress: Callable[[int], None] | None = None,
    **geometry: np.ndarray | float,
) -> LineArrays:
    """The main mode of ``section`` with geometry overrides, over frequency ``f`` (Hz).

    ``geometry`` overrides the section's dimensions by key (``width``, ``height``,
    ``below``, ``above``, ``gap``, ``spacing``, ``thickness``; metres), each a scalar or
    an array of shape (S,); ``dk_scale`` scales the laminate's permittivity (S,).
    Arrays broadcast to one sample axis. ``progress(n)`` is called with the number of
    samples done, on the per-sample fallback path only.
    """
    f = np.atleast_1d(np.asarray(f, float))
    nominal = section.dimension_values()
    for key in geometry:
        if key not in nominal:
            raise LossLaneError(
                f"{section.kind}: {key!r} is not a dimension of this line; its dimensions "
                f"are {', '.join(nominal)}"
            )
    arrays = {k: np.atleast_1d(np.asarray(v, float)) for k, v in geometry.items()}
    scale = np.atleast_1d(np.asarray(1.0 if dk_scale is None else dk_scale, float))
    try:
        n = np.broadcast_shapes(scale.shape, *(a.shape for a in arrays.values()))
    except ValueError:
        raise LossLaneError("geometry sample arrays must all have the same length") from None
    if len(n) != 1:
        raise LossLaneError("geometry samples must be one-dimensional arrays")
    geo = {
        k: np.broadcast_to(arrays.get(k, np.asarray([v])), n).astype(float)
        for k, v in nominal.items()
    }
    scale = np.broadcast_to(scale, n).astype(float)
    check_dimensions(section.kind, geo)
    if np.any(~np.isfinite(scale) | (scale * section.dielectric.dk < 1.0)):
        raise LossLaneError(
            f"{section.kind}: a Dk sample falls below 1 (air); use a smaller Dk tolerance"
        )
    if type(section).vectorized():
        eps_r = section.dielectric.eps(f)[None, :] * scale[:, None]
        modes = section.mode_arrays(f, eps_r, **{k: v[:, None] for k, v in geo.items()})
        return _line_arrays(section, f, modes)
    return _per_sample(section, f, geo, scale, progress)


def _line_arrays(section: CrossSection, f: np.ndarray, modes: dict[str, Mode]) -> LineArrays:
    """The main mode (a pair's odd mode, whose doubled impedance is Z_diff) as LineArrays."""
    pair = section.n_conductors == 2
    m = modes["odd" if pair else "single"]
    z = np.sqrt(m.l / m.c) * (2.0 if pair else 1.0)
    return LineArrays(f, z, m.eps_eff, m.r, m.l, m.g, m.c, pair)


# --- the per-sample fallback -------------------------------------------------------------


def _per_sample(
    section: CrossSection,
    f: np.ndarray,
    geo: dict[str, np.ndarray],
    scale: np.ndarray,
    progress: Callable[[int], None] | None,
) -> LineArrays:
    s = scale.shape[0]
    pair = section.n_conductors == 2
    names = ("eps_eff", "z0", "r", "l", "g", "c")
    out = {k: np.empty((s, f.size)) for k in names}
    nominal = section.dimension_values()
    caught_all: list[warnings.WarningMessage] = []
    step = max(1, s // 100)
    for i in range(s):
        changes = {k: float(v[i]) for k, v in geo.items() if float(v[i]) != nominal[k]}
        d = scaled_dielectric(section.dielectric, float(scale[i]))
        if d is not section.dielectric:
            changes["dielectric"] = d
        sec = section.replace(**changes) if changes else section
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", LossLaneWarning)
            mode = sec.modes(f)["odd" if pair else "single"]
        caught_all.extend(caught)
        for k in names:
            out[k][i] = getattr(mode, k)
        if progress is not None and ((i + 1) % step == 0 or i + 1 == s):
            progress(i + 1)
    _reissue(caught_all, s)
    name = "odd" if pair else "single"
    return _line_arrays(section, f, {name: Mode(name, **out)})


def _reissue(caught: list[warnings.WarningMessage], samples: int) -> None:
    """One warning per model parameter, not one per sample."""
    groups: dict[str, list[str]] = {}
    for w in caught:
        if issubclass(w.category, LossLaneWarning):
            msg = str(w.message)
            groups.setdefault(msg.split(" = ")[0], []).append(msg)
    for msgs in groups.values():
        extra = f" ({len(msgs)} of {samples} samples)" if samples > 1 else ""
        warn(msgs[0] + extra)

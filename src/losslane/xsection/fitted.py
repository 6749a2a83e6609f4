"""Corrections fitted to the field solver: smooth functions of a cross-section's
dimensionless parameters, stored as tensor-product Chebyshev series.

A closed-form model keeps its published formulas and multiplies their quasi-static results
by a correction that makes them agree with the 2-D field solver
(``xsection.fieldsolve``) over a stated box of parameters. Each model module holds its
own series (written by ``tools/fit_static_corrections.py``, which runs the field solves,
fits the coefficients and rewrites the block between the module's ``BEGIN fitted`` and
``END fitted`` markers), and its ``limits`` table states the box in which the fit was
verified; outside it the parameters are clamped to the box and the model warns.

A series is sum_k c_k prod_i T_{k_i}(x_i), with T_n the Chebyshev polynomials and x_i in
[-1, 1] the parameter mapped from its axis ``low .. high`` (linearly, logarithmically or
by its square root, which resolves a t ln t behaviour near a zero thickness).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from numpy.typing import ArrayLike


@dataclass(frozen=True)
class Axis:
    """One parameter of a series: its name (a ratio of the model's quantities, as the
    validity table names it), the fitted box ``low .. high`` and its mapping to [-1, 1]:
    'log', 'linear' or 'sqrt' (x = sqrt(v / high) scaled to [-1, 1]; low must be 0)."""

    name: str
    low: float
    high: float
    scale: str = "linear"

    def unit(self, value: ArrayLike) -> np.ndarray:
        """The parameter mapped to [-1, 1], clamped to the box."""
        v = np.clip(np.asarray(value, float), self.low, self.high)
        if self.scale == "log":
            lo, hi = np.log(self.low), np.log(self.high)
            v = np.log(v)
        elif self.scale == "sqrt":
            lo, hi = 0.0, 1.0
            v = np.sqrt(v / self.high)
        else:
            lo, hi = self.low, self.high
        return (2.0 * v - (lo + hi)) / (hi - lo)


def chebyshev(x: np.ndarray, degree: int) -> np.ndarray:
    """T_0(x) .. T_degree(x) along a new last axis."""
    out = np.empty(np.shape(x) + (degree + 1,))
    out[..., 0] = 1.0
    if degree > 0:
        out[..., 1] = x
    for n in range(2, degree + 1):
        out[..., n] = 2.0 * x * out[..., n - 1] - out[..., n - 2]
    return out


@dataclass(frozen=True)
class Series:
    """A tensor-product Chebyshev series over ``axes``; ``coef`` has one dimension per
    axis (its length is that axis's degree + 1). The parameters broadcast; evaluation
    contracts the axes in order, each at the broadcast shape of the parameters so far, so
    geometry axes given per sample (S, 1) are summed once per sample before a last axis
    given per frequency (S, N)."""

    axes: tuple[Axis, ...]
    coef: np.ndarray = field(repr=False, compare=False)

    @classmethod
    def of(cls, axes: tuple[Axis, ...], coef: ArrayLike | tuple[tuple[int, ...], str]) -> Series:
        """A series from its coefficients: an array, or (shape, text of the numbers in C
        order separated by white space), the form the fitting tool writes."""
        if isinstance(coef, tuple) and len(coef) == 2 and isinstance(coef[1], str):
            shape, text = coef
            c = np.array(text.split(), dtype=float).reshape(shape)
        else:
            c = np.asarray(coef, float)
        if c.ndim != len(axes):
            raise ValueError(f"{c.ndim}-dimensional coefficients for {len(axes)} axes")
        return cls(tuple(axes), c)

    def __call__(self, *values: ArrayLike) -> np.ndarray:
        if len(values) != len(self.axes):
            raise ValueError(f"{len(self.axes)} parameters expected, got {len(values)}")
        res = self.coef
        shape: tuple[int, ...] = ()
        for ax, v in zip(self.axes, values, strict=True):
            v = np.asarray(v, float)
            new = np.broadcast_shapes(shape, v.shape)
            d = res.shape[len(shape)]
            rest = res.shape[len(shape) + 1 :]
            t = chebyshev(ax.unit(v), d - 1)
            res = _contract(t, res.reshape(shape + (d, -1)), shape, new).reshape(new + rest)
            shape = new
        return res


def _contract(t: np.ndarray, head: np.ndarray, shape: tuple, new: tuple) -> np.ndarray:
    """sum_k t[..., k] head[..., k, r] over the broadcast shape ``new`` -> (new..., r):
    one matrix product where ``head`` has no sample axes yet, a per-sample contraction
    otherwise (in blocks of samples, which bounds the temporaries of large batches)."""
    d, r = head.shape[-2:]
    count = int(np.prod(new, dtype=int))
    if not shape:
        return np.broadcast_to(t, new + (d,)).reshape(count, d) @ head
    if t.shape[:-1] != new or shape != new:
        # sample axes added here (a per-frequency axis): broadcast, no copies
        return np.einsum("...k,...kr->...r", t, head).reshape(count, r)
    tt, hh = t.reshape(count, d), head.reshape(count, d, r)
    out = np.empty((count, r))
    step = max(1, _BLOCK // max(d * r, 1))
    for lo in range(0, count, step):
        out[lo : lo + step] = np.einsum("pk,pkr->pr", tt[lo : lo + step], hh[lo : lo + step])
    return out


#: values per block of an evaluation (bounds the temporary arrays of large sample batches)
_BLOCK = 1 << 21


@dataclass(frozen=True)
class StaticCorrection:
    """The field-solver correction of a model's quasi-static results, per mode:

    * ``air[mode]``: ln(C0_field / C0_model) over the geometry ``axes`` -- the air-filled
      capacitance, so Z_air = Z_air,model exp(-air);
    * ``fill[mode]``: ln(q_field / q_model) over the geometry axes and the laminate's
      ``dk`` axis, q = (eps_eff - 1)/(eps_r - 1) the dielectric filling factor, so
      eps_eff = 1 + (eps_eff,model - 1) exp(fill) (exactly 1 in air). Absent for a kind
      in one homogeneous dielectric (eps_eff = eps_r);
    * ``loss[group]`` (optional): ln(G_field * length) of a conductor group's Wheeler
      factor over the geometry axes (length: the kind's ``loss_length``), for a kind whose
      own split of the conductor loss between its conductors is poor (the coplanar lines'
      strip and grounds); the model then takes G from it.

    ``note`` records how the coefficients were made and what they achieved.
    """

    axes: tuple[Axis, ...]
    dk: Axis | None
    air: dict[str, Series]
    fill: dict[str, Series]
    note: str = ""
    loss: dict[str, Series] = field(default_factory=dict)

    @classmethod
    def of(
        cls,
        axes: tuple[Axis, ...],
        dk: Axis | None,
        air: dict,
        fill: dict | None = None,
        note: str = "",
        loss: dict | None = None,
    ) -> StaticCorrection:
        fill_axes = axes + ((dk,) if dk is not None else ())
        return cls(
            tuple(axes),
            dk,
            {m: Series.of(axes, c) for m, c in air.items()},
            {m: Series.of(fill_axes, c) for m, c in (fill or {}).items()},
            note,
            {g: Series.of(axes, c) for g, c in (loss or {}).items()},
        )

    @classmethod
    def none(cls, axes: tuple[Axis, ...], dk: Axis | None, modes: tuple[str, ...]):
        """No correction (zero series): what a model carries before its first fit."""
        zero = np.zeros((1,) * len(axes))
        fill = {m: np.zeros((1,) * (len(axes) + 1)) for m in modes} if dk is not None else {}
        return cls.of(axes, dk, {m: zero for m in modes}, fill, "not fitted")

    def z_air(
        self, mode: str, params: tuple[ArrayLike, ...], z_air: ArrayLike, weight: ArrayLike = 1.0
    ) -> np.ndarray:
        """The corrected air-filled impedance of ``mode`` at the geometry ``params``; the
        series is multiplied by ``weight`` (a pair's coupling, see ``CrossSection``)."""
        return np.asarray(z_air, float) * np.exp(-np.asarray(weight) * self.air[mode](*params))

    def loss_value(self, group: str, params: tuple[ArrayLike, ...]) -> np.ndarray:
        """G * length of conductor group ``group``: the fitted field-solver value."""
        return np.exp(self.loss[group](*params))

    def eps_eff(
        self,
        mode: str,
        params: tuple[ArrayLike, ...],
        eps_eff: ArrayLike,
        er: ArrayLike,
        weight: ArrayLike = 1.0,
    ) -> np.ndarray:
        """The corrected quasi-static effective permittivity of ``mode``."""
        eps_eff = np.asarray(eps_eff, float)
        if mode not in self.fill:
            return eps_eff
        return 1.0 + (eps_eff - 1.0) * np.exp(np.asarray(weight) * self.fill[mode](*params, er))


__all__ = ["Axis", "Series", "StaticCorrection", "chebyshev"]

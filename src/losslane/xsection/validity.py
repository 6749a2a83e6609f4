"""Validity ranges of the closed-form models: one table per model class (``limits``), read
both by the model's warnings and by the sizing search.

A :class:`Limit` names the published method and the quantity it bounds. Most quantities
are ratios of the cross-section's own dimensions (``ratio``: a numerator dimension over
the sum of denominator dimensions); the rest (the laminate's Dk, a frequency-dependent
quantity) are computed by ``value`` from the evaluation's :class:`Quantities`. A limit
marked ``above_dc`` belongs to a dispersion model and is checked only when the sweep holds
a frequency above DC; ``when`` restricts a limit to part of the samples (an offset
stripline's combination rule, say).

Outside a range the result is still returned, with a :class:`~losslane.errors.LossLaneWarning`
naming the method, the quantity and the range (``check_limits``). The sizing search
(``design.sizing``) keeps inside every range that bounds the dimension it varies
(``bounds``), so a sized line never sits where its own model warns.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from losslane.errors import check_range


class Quantities:
    """What a limit may read: each dimension by its key (arrays of geometry samples or
    scalars), ``dk`` (the laminate's real permittivity) and ``f`` (Hz), all broadcasting."""

    def __init__(self, dimensions: Mapping[str, ArrayLike], dk: ArrayLike, f: ArrayLike):
        self.dimensions = {k: np.asarray(v, float) for k, v in dimensions.items()}
        self.dk = np.asarray(dk, float)
        self.f = np.asarray(f, float)

    def __getattr__(self, name: str) -> np.ndarray:
        dims = self.__dict__.get("dimensions", {})
        if name in dims:
            return dims[name]
        raise AttributeError(name)


@dataclass(frozen=True)
class Limit:
    """One stated validity range: ``low <= quantity <= high`` (None: unbounded)."""

    method: str
    quantity: str
    low: float | None
    high: float | None
    ratio: tuple[str, tuple[str, ...]] | None = None
    value: Callable[[Quantities], ArrayLike] | None = None
    above_dc: bool = False
    when: Callable[[Quantities], ArrayLike] | None = None

    def evaluate(self, q: Quantities) -> np.ndarray:
        if self.ratio is not None:
            num, den = self.ratio
            return q.dimensions[num] / sum(q.dimensions[k] for k in den)
        assert self.value is not None, f"limit {self.quantity!r} has neither ratio nor value"
        return np.asarray(self.value(q), float)

    def bounds_on(self, vary: str, dims: Mapping[str, float]) -> tuple[float, float] | None:
        """The interval of dimension ``vary`` (m) this limit allows with every other
        dimension at ``dims``; None when the limit does not bound ``vary`` alone."""
        if self.ratio is None:
            return None
        num, den = self.ratio
        lo, hi = self.low, self.high
        if num == vary and vary not in den:
            ref = sum(dims[k] for k in den)
            return (
                -np.inf if lo is None else lo * ref,
                np.inf if hi is None else hi * ref,
            )
        if num != vary and vary in den:
            # num / (vary + rest) falls as vary grows
            rest = sum(dims[k] for k in den if k != vary)
            top = np.inf if lo is None or lo <= 0 else dims[num] / lo - rest
            bottom = -np.inf if hi is None else dims[num] / hi - rest
            return bottom, top
        return None


def dk(q: Quantities) -> np.ndarray:
    """The laminate's Dk (real relative permittivity) as a limit quantity."""
    return q.dk


def check_limits(limits: Sequence[Limit], q: Quantities) -> None:
    """Warn for every limit that some sample (or frequency) leaves."""
    above_dc = bool(np.any(q.f > 0))
    for lim in limits:
        if lim.above_dc and not above_dc:
            continue
        mask = None if lim.when is None else lim.when(q)
        check_range(lim.method, lim.quantity, lim.evaluate(q), lim.low, lim.high, where=mask)


def applies(lim: Limit, dims: Mapping[str, float], dk_value: float) -> bool:
    """Whether ``lim`` applies at the nominal dimensions (its ``when`` condition)."""
    if lim.when is None:
        return True
    q = Quantities(dims, dk_value, np.array([1.0]))
    return bool(np.all(lim.when(q)))


__all__ = ["Limit", "Quantities", "applies", "check_limits", "dk"]

"""The project's error and warning types, and the validity-range warning helper."""

from __future__ import annotations

import warnings


class LossLaneError(ValueError):
    """Bad input: the message names the key, the value and what would be valid.

    The command line turns it into one line on stderr and exit code 2.
    """


class LossLaneWarning(UserWarning):
    """A result is returned, but an input lies outside a model's stated validity range."""


def warn(message: str) -> None:
    warnings.warn(message, LossLaneWarning, stacklevel=3)


def check_range(
    model: str, name: str, value, low: float | None, high: float | None, where=None
) -> None:
    """Warn when ``value`` (scalar or array) leaves ``[low, high]`` of ``model``; with
    ``where`` (a mask that broadcasts against ``value``) only those entries are checked."""
    import numpy as np

    v = np.asarray(value, dtype=float)
    if where is not None:
        v, mask = np.broadcast_arrays(v, np.asarray(where, dtype=bool))
        v = v[mask]
    if v.size == 0:
        return
    vmin, vmax = float(np.nanmin(v)), float(np.nanmax(v))
    below = low is not None and vmin < low * (1 - 1e-12)
    above = high is not None and vmax > high * (1 + 1e-12)
    if below or above:
        lo = "-inf" if low is None else f"{low:g}"
        hi = "inf" if high is None else f"{high:g}"
        shown = f"{vmin:.4g}" if vmin == vmax else f"{vmin:.4g}..{vmax:.4g}"
        warn(
            f"{model}: {name} = {shown} is outside the model's validity range [{lo}, {hi}]; "
            "the result is an extrapolation"
        )

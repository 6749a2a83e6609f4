"""The scenario's ``[plots]`` section: what the build's charts focus on.

```toml
[plots]
focus = ["5.5 GHz", "7.5 GHz"]   # frequency range of the focused chart (default: automatic)
loss_range = ["0 dB", "3 dB"]    # insertion-loss axis of that chart, positive dB
auto_focus = true                # focus on the limits when they all sit in a narrow band
delay_aperture = "50 MHz"        # group-delay aperture of a 2-port (default: automatic)
rf_views = true                  # a 2-port's phase / group delay, VSWR and Smith charts
```
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError
from losslane.spec import check_keys, flag, quantity
from losslane.units import parse_quantity

PLOT_KEYS = ("focus", "loss_range", "auto_focus", "delay_aperture", "rf_views")


@dataclass(frozen=True)
class PlotOptions:
    """What ``[plots]`` asks for (every field optional)."""

    focus: tuple[float, float] | None = None
    loss_range: tuple[float, float] | None = None
    auto_focus: bool = True
    delay_aperture: float | None = None
    rf_views: bool = True


def _pair(where: str, spec: Mapping, key: str, kind: str, example: str) -> tuple[float, float]:
    raw = spec[key]
    if not isinstance(raw, list) or len(raw) != 2:
        raise LossLaneError(f"{where}.{key} = {raw!r}: expected two values, e.g. {example}")
    lo, hi = (parse_quantity(v, kind, f"{where}.{key}[{j}]") for j, v in enumerate(raw))
    if not (np.isfinite(lo) and np.isfinite(hi) and hi > lo):
        raise LossLaneError(
            f"{where}.{key} = {raw!r}: the second value must lie above the first, e.g. {example}"
        )
    return lo, hi


def parse_plots(spec: object) -> PlotOptions:
    """``[plots]`` -> PlotOptions; every error names the key."""
    where = "[plots]"
    if not isinstance(spec, Mapping):
        raise LossLaneError(f"{where}: expected a table")
    check_keys(where, spec, PLOT_KEYS)
    focus = None
    if "focus" in spec:
        focus = _pair(where, spec, "focus", "frequency", '["5.5 GHz", "7.5 GHz"]')
        if focus[0] < 0:
            raise LossLaneError(f"{where}.focus = {spec['focus']!r}: frequencies are >= 0 Hz")
    loss_range = None
    if "loss_range" in spec:
        loss_range = _pair(where, spec, "loss_range", "decibel", '["0 dB", "3 dB"]')
    aperture = quantity(where, spec, "delay_aperture", "frequency")
    if aperture is not None and not (np.isfinite(aperture) and aperture > 0):
        raise LossLaneError(
            f"{where}.delay_aperture = {spec['delay_aperture']!r}: must be above 0 Hz "
            '(e.g. "50 MHz")'
        )
    return PlotOptions(
        focus,
        loss_range,
        flag(where, spec, "auto_focus", True),
        aperture,
        flag(where, spec, "rf_views", True),
    )


def check_plots(options: PlotOptions, f: np.ndarray) -> None:
    """Check ``[plots]`` against the sweep ``f`` before any work is done."""
    f = np.asarray(f, dtype=float)
    tol = 1e-9 * max(float(f[-1]), 1.0)
    span = f"{f[0] / 1e9:g}..{f[-1] / 1e9:g} GHz"
    if options.focus is not None:
        lo, hi = options.focus
        if lo < f[0] - tol or hi > f[-1] + tol:
            raise LossLaneError(
                f"[plots].focus = {lo / 1e9:g}..{hi / 1e9:g} GHz reaches outside the sweep "
                f"({span}); choose a range inside [sweep] start..stop"
            )
        inside = np.count_nonzero((f >= lo - tol) & (f <= hi + tol))
        if inside < 2:
            raise LossLaneError(
                f"[plots].focus = {lo / 1e9:g}..{hi / 1e9:g} GHz holds {inside} sweep point(s); "
                "a chart needs at least 2: widen the range or use a finer [sweep] step"
            )
    if options.delay_aperture is not None and f.size > 1:
        step = float(f[1] - f[0])
        if options.delay_aperture < step * (1 - 1e-9):
            raise LossLaneError(
                f"[plots].delay_aperture = {options.delay_aperture / 1e6:g} MHz is finer than "
                f"the sweep step ({step / 1e6:g} MHz); the group delay is a phase difference "
                "between sweep points: use at least one step"
            )
        if options.delay_aperture > (f[-1] - f[0]) / 2:
            raise LossLaneError(
                f"[plots].delay_aperture = {options.delay_aperture / 1e6:g} MHz is more than "
                f"half the sweep ({span}); use a smaller aperture"
            )


__all__ = ["PLOT_KEYS", "PlotOptions", "check_plots", "parse_plots"]

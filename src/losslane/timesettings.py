"""The ``[time]`` section of a scenario: the stimulus of the build's time-domain views.

```toml
[time]
rise_time = "30 ps"      # 10-90 % rise time of the stimulus edge (default 0.75 / sweep stop)
data_rate = "32 Gb/s"    # the pulse response's symbol rate (default: [budget] data_rate)
modulation = "pam4"      # nrz | pam4, with data_rate (default: [budget] modulation)
```

Every key is optional and so is the section. The rise time must be at least 0.5 / sweep
stop (the shortest edge the sweep can carry; the default 0.75 / stop keeps the stimulus'
truncation ringing below 1 %, see ``network.timedomain``). Without a data rate here or in
``[budget]`` the build shows the step response instead of the pulse response.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from losslane.errors import LossLaneError
from losslane.signalling import MODULATIONS
from losslane.spec import check_keys, quantity, text

KEYS = ("rise_time", "data_rate", "modulation")
#: shortest accepted rise time x sweep stop (network.timedomain.MIN_RISE_FACTOR)
MIN_RISE_FACTOR = 0.5


@dataclass(frozen=True)
class TimeSettings:
    """``rise_time`` (s) and ``data_rate`` (b/s) as written, None when left out (the
    defaults are applied by :func:`stimulus`); ``modulation`` None unless given."""

    rise_time: float | None = None
    data_rate: float | None = None
    modulation: str | None = None


def parse_time(
    spec: object, sweep_stop: float, where: str = "[time]", frequencies=None
) -> TimeSettings:
    """The ``[time]`` table of a scenario, checked against the sweep's top frequency and,
    with ``frequencies`` (the sweep, Hz), against its time window 1/step: the rise time
    must fit half of it, and the pulse's span of unit intervals all of it."""
    if not isinstance(spec, Mapping):
        raise LossLaneError(f"{where}: expected a table with rise_time, data_rate, modulation")
    check_keys(where, spec, KEYS)
    rise = quantity(where, spec, "rise_time", "time")
    if rise is not None:
        shortest = MIN_RISE_FACTOR / sweep_stop
        if not rise >= shortest * (1 - 1e-9):
            raise LossLaneError(
                f"{where}.rise_time = {spec['rise_time']!r}: the sweep stops at "
                f"{sweep_stop / 1e9:g} GHz, so the rise time must be >= {shortest * 1e12:.4g} ps "
                f"(0.5 / stop); the default is {0.75 / sweep_stop * 1e12:.4g} ps (0.75 / stop)"
            )
    rate = quantity(where, spec, "data_rate", "data rate")
    if rate is not None and not rate > 0:
        raise LossLaneError(f"{where}.data_rate = {spec['data_rate']!r}: must be > 0")
    modulation = text(where, spec, "modulation", MODULATIONS)
    if modulation is not None and rate is None:
        raise LossLaneError(
            f"{where}.modulation = {modulation!r} goes with {where}.data_rate (e.g. "
            '"32 Gb/s"); without it the pulse uses [budget] data_rate and modulation'
        )
    if frequencies is not None and len(frequencies) > 1:
        from losslane.network.timedomain import longest_rise_time, lowest_data_rate, time_window

        window = time_window(frequencies)
        if rise is not None and rise > longest_rise_time(frequencies):
            raise LossLaneError(
                f"{where}.rise_time = {spec['rise_time']!r}: the sweep's time window (1 / step) "
                f"is {window * 1e9:.4g} ns, and a rise time may fill at most half of it "
                f"({longest_rise_time(frequencies) * 1e9:.4g} ns); use a shorter rise time or "
                "a finer [sweep] step"
            )
        if rate is not None and rate < lowest_data_rate(frequencies, modulation or "nrz"):
            raise LossLaneError(
                f"{where}.data_rate = {spec['data_rate']!r}: {pulse_span(window)}; use a rate of "
                f"at least {lowest_data_rate(frequencies, modulation or 'nrz') / 1e9:.4g} Gb/s "
                "or a finer [sweep] step"
            )
    return TimeSettings(rise, rate, modulation)


def pulse_span(window: float) -> str:
    """Why a data rate is too low for the pulse response on a time window (s)."""
    return (
        "the pulse response and its cursors span 7 unit intervals (the pulse, one "
        f"pre-cursor, five post-cursors), more than the time window 1 / step of "
        f"{window * 1e9:.4g} ns the frequency grid gives"
    )


def stimulus(settings: TimeSettings, budget) -> tuple[float | None, float | None, str]:
    """(rise time or None for the default, data rate or None, modulation) of a scenario:
    ``[time]`` first, then ``[budget]`` (``budget`` a scenario Budget or None)."""
    if settings.data_rate is not None:
        return settings.rise_time, settings.data_rate, settings.modulation or "nrz"
    if budget is not None and budget.data_rate is not None:
        return settings.rise_time, budget.data_rate, budget.modulation
    return settings.rise_time, None, "nrz"


__all__ = ["KEYS", "TimeSettings", "parse_time", "pulse_span", "stimulus"]

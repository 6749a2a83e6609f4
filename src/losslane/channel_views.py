"""The quality and time-domain views of a built channel: its S-parameters, as written to
the Touchstone file (ports in the scenario's order), inspected like any other file
(``network.inspection``) with the stimulus of the scenario's ``[time]`` section
(``timesettings``): rise time, and the data rate and modulation of the pulse response
(default ``[budget]``)."""

from __future__ import annotations

from typing import TYPE_CHECKING

from losslane.timesettings import stimulus

if TYPE_CHECKING:
    from losslane.channel import ChannelResult
    from losslane.network.inspection import Inspection

#: the quality metrics need two frequency steps
MIN_POINTS = 3


def channel_inspection(channel: ChannelResult) -> Inspection | None:
    """The inspection of ``channel``'s S-parameters (None for a sweep of fewer than 3
    points, on which the quality metrics are not defined, and for channels of other than
    2 or 4 ports, whose time-domain views are not defined here)."""
    from losslane.network.inspection import PORT_COUNTS, inspect_network
    from losslane.network.ports import to_order

    sc = channel.scenario
    if channel.f.size < MIN_POINTS or channel.nports not in PORT_COUNTS:
        return None
    rise, rate, modulation = stimulus(sc.time, sc.budget)
    if rate is not None and sc.time.data_rate is None:  # [time] data_rate is checked on reading
        from losslane.errors import warn
        from losslane.network.timedomain import lowest_data_rate, time_window
        from losslane.timesettings import pulse_span

        if rate < lowest_data_rate(channel.f, modulation):
            warn(
                f"no pulse response at [budget] data_rate = {rate / 1e9:g} Gb/s: "
                f"{pulse_span(time_window(channel.f))}; the step response is shown instead "
                "(a finer [sweep] step, or [time] data_rate, gives one)"
            )
            rate = None
    s = to_order(channel.s, channel.conductors, sc.ports.order)
    return inspect_network(
        channel.f,
        s,
        sc.ports.reference,
        sc.ports.order,
        rise_time=rise,
        data_rate=rate,
        modulation=modulation,
        mixed=channel.mixed_mode,  # converted once per build
    )


__all__ = ["MIN_POINTS", "channel_inspection"]

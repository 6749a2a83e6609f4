"""Judging a built channel over whole bands, against limit masks, and around its point checks.

* A band (:class:`losslane.bandspec.Band`) is judged at every sweep point inside it, both
  ends included: the worst insertion loss and the worst return loss (the worse of the two
  ends, which one is named) with the frequency where each occurs. For a differential
  channel it also reports the worst common-mode loss and the largest mode conversion
  (Scd21, Scd11, Scd22) in the band.
* A mask (:class:`losslane.bandspec.Mask`) is judged at every sweep point inside its span:
  the margin (limit - value for a maximum, value - limit for a minimum) and its worst point.
  A value within ``ON_LIMIT_DB`` of the line counts as on it (the rounding of the dB
  conversion), so a channel exactly on its mask passes.
* A point check is read between sweep points; a rippling curve can put it on a peak while
  the band around it is worse. :func:`point_ripples` looks at +/- ``RIPPLE_WINDOW`` around
  each point and says when the point sits on a ripple.

Values come straight from the channel's sweep (no interpolation), so a band's worst return
loss is the smallest -20 log10 |S11| (or |S22|) over the same points that any other tool
reading the Touchstone file finds. Pure numpy; nothing here draws.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from losslane.bandspec import QUANTITIES, Band, Mask, default_band
from losslane.errors import LossLaneError

#: a mask value within this of its limit line is on the line (rounding of 20 log10)
ON_LIMIT_DB = 1e-9
#: half-width of the window around a point check, as a fraction of its frequency
RIPPLE_WINDOW = 0.05
#: a return loss this much below the point's inside the window: the point sits on a ripple
RIPPLE_RL_DB = 1.0
#: an insertion loss this much above the window's straight trend, beyond the point's own
RIPPLE_IL_DB = 0.25
#: the magnitude floor of every dB value (|S| below 1e-300 reads 6000 dB)
MAG_FLOOR = 1e-300


def _finite(v: float | None) -> float | None:
    """JSON-safe: a finite float or None."""
    return None if v is None or not np.isfinite(v) else float(v)


def _loss(x: np.ndarray) -> np.ndarray:
    """-20 log10 |x|, positive dB, at most 6000 dB."""
    return -20.0 * np.log10(np.maximum(np.abs(x), MAG_FLOOR))


def _ghz(x: float) -> str:
    return f"{x / 1e9:.10g} GHz"


def _tol(f: np.ndarray) -> float:
    return 1e-9 * max(float(f[-1]), 1.0)


def in_range(f: np.ndarray, start: float, stop: float) -> np.ndarray:
    """The sweep points of [start, stop], both ends included (to 1e-9 of the sweep stop)."""
    t = _tol(f)
    return (f >= start - t) & (f <= stop + t)


class ChannelCurves:
    """The judged quantities of a built channel (``ChannelResult``) as positive dB over its
    sweep, per end, each computed once when first asked for."""

    def __init__(self, result) -> None:
        self.result = result
        self.f = np.asarray(result.f, dtype=float)
        self.differential = result.mixed_mode is not None

    @cached_property
    def _mm(self):
        return self.result.mixed_mode

    def ends(self, quantity: str) -> list[tuple[str, np.ndarray]]:
        """``[(end, values)]``: one curve for a through quantity ('' as its end), the input
        and the output for a reflection."""
        if quantity == "insertion-loss":
            return [("", self.result.insertion_loss_db)]
        if quantity == "return-loss":
            rin, rout = self.result.return_loss
            return [("input", rin), ("output", rout)]
        if not self.differential:
            raise LossLaneError(f"{quantity} exists only for a differential channel")
        if quantity == "common-mode-loss":
            return [("", self._cc21)]
        if quantity == "far-end-conversion":
            return [("", self._cd21)]
        if quantity == "near-end-conversion":
            return [("input", self._cd11), ("output", self._cd22)]
        raise AssertionError(quantity)

    @cached_property
    def _cc21(self) -> np.ndarray:
        return _loss(self._mm.cc[:, 1, 0])

    @cached_property
    def _cd21(self) -> np.ndarray:
        return _loss(self._mm.cd[:, 1, 0])

    @cached_property
    def _cd11(self) -> np.ndarray:
        return _loss(self._mm.cd[:, 0, 0])

    @cached_property
    def _cd22(self) -> np.ndarray:
        return _loss(self._mm.cd[:, 1, 1])


@dataclass(frozen=True)
class Worst:
    """The worst value of a quantity over a set of sweep points: ``value_db`` (positive dB),
    where (``at_hz``) and at which end ('' for a through quantity)."""

    value_db: float
    at_hz: float
    end: str = ""


def worst(curves: ChannelCurves, quantity: str, sel: np.ndarray, kind: str) -> Worst:
    """The largest (``kind`` 'max') or smallest ('min') value of ``quantity`` over the sweep
    points ``sel`` (a boolean mask), over every end; the first such point on a tie."""
    f = curves.f[sel]
    best = None
    for end, values in curves.ends(quantity):
        v = values[sel]
        i = int(np.argmax(v) if kind == "max" else np.argmin(v))
        cand = Worst(float(v[i]), float(f[i]), end)
        if best is None or (
            cand.value_db > best.value_db if kind == "max" else cand.value_db < best.value_db
        ):
            best = cand
    return best


# --------------------------------------------------------------------------------- bands


@dataclass(frozen=True)
class BandResult:
    """A band judged at its sweep points."""

    band: Band
    points: int
    loss: Worst
    return_loss: Worst
    common_mode_loss: Worst | None = None  # pairs: the largest Scc21 loss
    far_conversion: Worst | None = None  # pairs: the smallest -20 log10 |Scd21|
    near_conversion: Worst | None = None  # pairs: the smallest -20 log10 |Scd11|, |Scd22|

    @property
    def loss_margin_db(self) -> float | None:
        m = self.band.max_loss
        return None if m is None else m - self.loss.value_db

    @property
    def return_loss_margin_db(self) -> float | None:
        m = self.band.min_return_loss
        return None if m is None else self.return_loss.value_db - m

    @property
    def loss_passed(self) -> bool | None:
        m = self.band.max_loss
        return None if m is None else bool(self.loss.value_db <= m)

    @property
    def return_loss_passed(self) -> bool | None:
        m = self.band.min_return_loss
        return None if m is None else bool(self.return_loss.value_db >= m)

    @property
    def passed(self) -> bool:
        return self.loss_passed is not False and self.return_loss_passed is not False

    def to_json(self) -> dict:
        b = self.band
        out = {
            "name": b.name,
            "key": b.key,
            "start_hz": b.start,
            "stop_hz": b.stop,
            "points": self.points,
            "worst_loss_db": _finite(self.loss.value_db),
            "worst_loss_hz": self.loss.at_hz,
            "max_loss_db": b.max_loss,
            "loss_margin_db": _finite(self.loss_margin_db),
            "worst_return_loss_db": _finite(self.return_loss.value_db),
            "worst_return_loss_hz": self.return_loss.at_hz,
            "worst_return_loss_end": self.return_loss.end,
            "min_return_loss_db": b.min_return_loss,
            "return_loss_margin_db": _finite(self.return_loss_margin_db),
            "passed": self.passed,
        }
        if self.common_mode_loss is not None:
            out.update(
                {
                    "worst_common_mode_loss_db": _finite(self.common_mode_loss.value_db),
                    "worst_common_mode_loss_hz": self.common_mode_loss.at_hz,
                    # mode conversion as the S-parameter in dB (negative), like the summary
                    "max_scd21_db": _finite(-self.far_conversion.value_db),
                    "max_scd21_hz": self.far_conversion.at_hz,
                    "max_scd11_scd22_db": _finite(-self.near_conversion.value_db),
                    "max_scd11_scd22_hz": self.near_conversion.at_hz,
                    "max_scd11_scd22_end": self.near_conversion.end,
                }
            )
        return out


def band_list(budget, f: np.ndarray) -> list[Band]:
    """The bands of a ``[budget]``: its ``[[budget.band]]`` entries, then the default band of
    ``[budget] min_return_loss`` when given."""
    if budget is None:
        return []
    out = list(getattr(budget, "bands", ()))
    rl = getattr(budget, "min_return_loss", None)
    if rl is not None:
        out.append(default_band(rl, f, budget.nyquist))
    return out


def _sweep_text(f: np.ndarray) -> str:
    return f"{float(f[0]) / 1e9:g}..{float(f[-1]) / 1e9:g} GHz"


def check_span(key: str, start: float, stop: float, f: np.ndarray) -> int:
    """A band or mask span must lie inside the sweep and hold at least one sweep point;
    returns the number of points it holds."""
    t = _tol(f)
    if start < f[0] - t or stop > f[-1] + t:
        raise LossLaneError(
            f"{key}: {_ghz(start)}..{_ghz(stop)} reaches outside the sweep ({_sweep_text(f)}); "
            "keep it inside [sweep] start..stop, or widen the sweep"
        )
    n = int(np.count_nonzero(in_range(f, start, stop)))
    if n == 0:
        step = float(f[1] - f[0]) if f.size > 1 else 0.0
        raise LossLaneError(
            f"{key}: {_ghz(start)}..{_ghz(stop)} holds no sweep point (the step is "
            f"{step / 1e6:g} MHz); widen it or use a finer [sweep] step"
        )
    return n


def judge_band(curves: ChannelCurves, band: Band) -> BandResult:
    sel = in_range(curves.f, band.start, band.stop)
    n = int(np.count_nonzero(sel))
    if n == 0:  # validate() refuses this before the build; a direct call gets the message
        check_span(band.key, band.start, band.stop, curves.f)
    extra = {}
    if curves.differential:
        extra = {
            "common_mode_loss": worst(curves, "common-mode-loss", sel, "max"),
            "far_conversion": worst(curves, "far-end-conversion", sel, "min"),
            "near_conversion": worst(curves, "near-end-conversion", sel, "min"),
        }
    return BandResult(
        band,
        n,
        worst(curves, "insertion-loss", sel, "max"),
        worst(curves, "return-loss", sel, "min"),
        **extra,
    )


# --------------------------------------------------------------------------------- masks


@dataclass(frozen=True)
class MaskResult:
    """A mask judged at the sweep points of its span: the worst margin (dB; negative fails)
    with the value and the limit there."""

    mask: Mask
    points: int
    worst_margin_db: float
    worst_margin_hz: float
    value_db: float
    limit_db: float
    end: str = ""

    @property
    def passed(self) -> bool:
        return bool(self.worst_margin_db >= -ON_LIMIT_DB)

    def to_json(self) -> dict:
        m = self.mask
        return {
            "name": m.name,
            "key": m.key,
            "quantity": m.quantity,
            "limit": "maximum" if m.kind == "max" else "minimum",
            "interpolation": "log-frequency" if m.log_frequency else "linear",
            "start_hz": m.start,
            "stop_hz": m.stop,
            "points": self.points,
            "worst_margin_db": _finite(self.worst_margin_db),
            "worst_margin_hz": self.worst_margin_hz,
            "value_db": _finite(self.value_db),
            "limit_db": self.limit_db,
            "end": self.end,
            "passed": self.passed,
        }


def judge_mask(curves: ChannelCurves, mask: Mask) -> MaskResult:
    sel = in_range(curves.f, mask.start, mask.stop)
    n = int(np.count_nonzero(sel))
    if n == 0:
        check_span(mask.key, mask.start, mask.stop, curves.f)
    f = curves.f[sel]
    limit = mask.limit_at(np.clip(f, mask.start, mask.stop))
    best = None
    for end, values in curves.ends(mask.quantity):
        v = values[sel]
        margin = limit - v if mask.kind == "max" else v - limit
        i = int(np.argmin(margin))
        if best is None or margin[i] < best[0]:
            best = (float(margin[i]), float(f[i]), float(v[i]), float(limit[i]), end)
    return MaskResult(mask, n, *best)


# ---------------------------------------------------------------------- point checks


@dataclass(frozen=True)
class RippleNote:
    """What the +/- RIPPLE_WINDOW around a point check holds.

    ``rl_dip_db``: the point's return loss minus the worst inside the window (at
    ``rl_worst_hz``, value ``rl_worst_db``); ``il_bump_db``: how far the insertion loss
    inside the window rises above the window's straight trend, beyond the point's own
    (at ``il_worst_hz``, value ``il_worst_db``); ``would_fail``: the point passes, but a
    value inside the window breaks its limit."""

    label: str
    at: float
    start: float
    stop: float
    rl_dip_db: float
    rl_worst_db: float
    rl_worst_hz: float
    il_bump_db: float
    il_worst_db: float
    il_worst_hz: float
    on_rl_ripple: bool
    on_il_ripple: bool
    would_fail: bool

    @property
    def on_ripple(self) -> bool:
        return self.on_rl_ripple or self.on_il_ripple

    def text(self) -> str:
        """One line for the terminal and the report ('' when the point is not on a
        ripple)."""
        if not self.on_ripple:
            return ""
        window = f"{_ghz(self.start)}..{_ghz(self.stop)}"
        parts = []
        if self.on_rl_ripple:
            parts.append(
                f"the return loss falls to {self.rl_worst_db:.2f} dB at "
                f"{_ghz(self.rl_worst_hz)} ({self.rl_dip_db:.2f} dB below the point's)"
            )
        if self.on_il_ripple:
            parts.append(
                f"the insertion loss peaks at {self.il_worst_db:.2f} dB at "
                f"{_ghz(self.il_worst_hz)} ({self.il_bump_db:.2f} dB above the trend)"
            )
        s = f"{self.label} at {_ghz(self.at)} sits on a ripple: within {window} " + "; ".join(parts)
        if self.would_fail:
            s += ". Its limit FAILS there although the point passes: judge a band"
        return s

    def to_json(self) -> dict:
        return {
            "window_start_hz": self.start,
            "window_stop_hz": self.stop,
            "on_ripple": self.on_ripple,
            "return_loss_dip_db": _finite(self.rl_dip_db),
            "worst_return_loss_db": _finite(self.rl_worst_db),
            "worst_return_loss_hz": self.rl_worst_hz,
            "loss_bump_db": _finite(self.il_bump_db),
            "worst_loss_db": _finite(self.il_worst_db),
            "worst_loss_hz": self.il_worst_hz,
            "fails_nearby": self.would_fail,
        }


def ripple_note(curves: ChannelCurves, pb) -> RippleNote:
    """The ripple note of one judged point (a ``budget.PointBudget``)."""
    f = curves.f
    at = pb.at
    step = float(f[1] - f[0]) if f.size > 1 else 0.0
    half = max(RIPPLE_WINDOW * at, 2.0 * step)
    lo = max(at - half, float(f[0]))
    hi = min(at + half, float(f[-1]))
    sel = in_range(f, lo, hi) & (f > 0)  # the DC point of a DC-blocked channel says nothing
    fw = f[sel]
    rin, rout = curves.result.return_loss
    rl_w = np.minimum(rin[sel], rout[sel])
    il_w = curves.result.insertion_loss_db[sel]
    rl_at, il_at = pb.return_loss_db, pb.total_db
    if fw.size == 0:
        return RippleNote(pb.point.label, at, lo, hi, 0.0, rl_at, at, 0.0, il_at, at, *[False] * 3)
    i = int(np.argmin(rl_w))
    rl_dip = rl_at - float(rl_w[i])
    # the insertion loss above the straight line through the window's ends, beyond the point's
    if fw.size > 1 and fw[-1] > fw[0]:
        slope = (il_w[-1] - il_w[0]) / (fw[-1] - fw[0])
        trend = il_w[0] + slope * (fw - fw[0])
        trend_at = il_w[0] + slope * (at - fw[0])
    else:
        trend, trend_at = il_w, il_at
    excess = il_w - trend
    j = int(np.argmax(excess))
    il_bump = float(excess[j]) - (il_at - trend_at)
    p = pb.point
    # only what the point judges: a point without a return-loss limit is not on an RL ripple
    rl_fails = bool(p.min_return_loss is not None and pb.return_loss_passed)
    rl_fails = rl_fails and bool(rl_w[i] < p.min_return_loss)
    il_fails = bool(p.max_loss is not None and pb.loss_passed and il_bump > 0)
    il_fails = il_fails and bool(il_w[j] > p.max_loss)
    on_rl = p.min_return_loss is not None and (bool(rl_dip > RIPPLE_RL_DB) or rl_fails)
    on_il = p.max_loss is not None and (bool(il_bump > RIPPLE_IL_DB) or il_fails)
    fails = rl_fails or il_fails
    return RippleNote(
        p.label,
        at,
        float(fw[0]),
        float(fw[-1]),
        float(rl_dip),
        float(rl_w[i]),
        float(fw[i]),
        float(il_bump),
        float(il_w[j]),
        float(fw[j]),
        on_rl,
        on_il,
        fails,
    )


# --------------------------------------------------------------------------- the whole


def judge(result, budget, points) -> tuple[tuple, tuple, tuple]:
    """(bands, masks, ripple notes) of a built channel: every band of ``budget``, every
    mask, and a note for each judged point in ``points`` (PointBudget objects)."""
    curves = ChannelCurves(result)
    bands = tuple(judge_band(curves, b) for b in band_list(budget, curves.f))
    masks = tuple(judge_mask(curves, m) for m in getattr(budget, "masks", ()))
    notes = tuple(ripple_note(curves, pb) for pb in points)
    return bands, masks, notes


def validate_limits(scenario) -> None:
    """Check the bands and masks against the sweep and the channel before any work: each
    lies inside the sweep and holds a sweep point; a mask on a mode quantity needs a
    differential channel."""
    budget = scenario.budget
    if budget is None:
        return
    f = scenario.frequencies()
    for band in band_list(budget, f):
        check_span(band.key, band.start, band.stop, f)
    for m in budget.masks:
        check_span(m.key, m.start, m.stop, f)
        if m.differential and scenario.conductors != 2:
            valid = ", ".join(repr(q) for q, (_, diff) in QUANTITIES.items() if not diff)
            raise LossLaneError(
                f"{m.key}.quantity = {m.quantity!r} needs a differential channel (every line "
                f"a pair); this channel is single-ended: valid quantities are {valid}"
            )


__all__ = [
    "ON_LIMIT_DB",
    "RIPPLE_IL_DB",
    "RIPPLE_RL_DB",
    "RIPPLE_WINDOW",
    "BandResult",
    "ChannelCurves",
    "MaskResult",
    "RippleNote",
    "Worst",
    "band_list",
    "check_span",
    "in_range",
    "judge",
    "judge_band",
    "judge_mask",
    "ripple_note",
    "validate_limits",
]

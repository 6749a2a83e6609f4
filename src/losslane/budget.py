"""The loss budget of a built channel: check points, where the loss goes, and the fitted
insertion loss with its deviation (ILD).

* Check points: the Nyquist frequency of the data rate (baud rate / 2; NRZ carries one bit
  per symbol, PAM4 two -- common practice) with the allowance ``[budget] max_loss``, and
  every ``[[budget.check]]`` with its maximum insertion loss and/or minimum return loss.
* The table at each point: every segment's own insertion loss (that block alone between
  matched references, from :class:`~losslane.channel.ChannelResult`), the attenuation per
  inch of each line, each row's share of the allowance, and one row for what the sum of
  the parts misses -- reflections between the blocks and their interaction -- defined as
  the cascaded total minus the sum of the parts, so parts + that row = total exactly.
* The fitted insertion loss: a least-squares fit of a0 + a1*sqrt(f) + a2*f + a4*f^2 (f in
  GHz), the form of the fitted attenuation in IEEE 802.3's backplane annexes (from
  memory), over a fit band; the insertion-loss deviation ILD(f) = IL(f) - IL_fit(f) and
  its peak.

Values at a check point are read from the sweep (linear interpolation in dB between the
two nearest sweep points, exact when the point is on the grid), so the budget agrees with
the Touchstone file and the plots. The budget works on the main mode whatever the
channel: S21 of a single-ended channel, the differential mode of a pair.

Pure numpy; nothing here draws or writes files (that is ``losslane.report``).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from losslane.bands import judge
from losslane.errors import LossLaneError, warn
from losslane.fit_check import assess
from losslane.signalling import baud_rate, nyquist_frequency

# low edge of the default fit band: 50 MHz, IEEE 802.3's f_min for the fitted insertion
# loss of its backplane and cable channels (from memory)
FIT_LOW_EDGE_HZ = 50e6
# default top of the fit band, as a multiple of the Nyquist frequency: 2 x Nyquist is the
# baud rate, the first null of an NRZ/PAM4 symbol's spectrum, so the band holds the whole
# main lobe the receiver's equaliser has to deal with (IEEE 802.3 fits its backplane
# channels up to a similar multiple of the Nyquist frequency -- from memory)
FIT_STOP_NYQUIST_MULTIPLE = 2.0
MIN_FIT_POINTS = 8
REFLECTIONS_ROW = "reflections and interaction"


def _ghz(x: float) -> str:
    return f"{x / 1e9:.10g} GHz"


# ----------------------------------------------------------------------------- check points


@dataclass(frozen=True)
class CheckPoint:
    """One frequency the budget is judged at.

    ``label``: "Nyquist" or "check k"; ``key``: where it comes from in the scenario (for
    messages); ``max_loss`` / ``min_return_loss``: the limits in dB (None: not checked).
    """

    label: str
    key: str
    at: float
    max_loss: float | None = None
    min_return_loss: float | None = None
    nyquist: bool = False


def _sweep_text(f: np.ndarray) -> str:
    return f"{float(f[0]) / 1e9:g}..{float(f[-1]) / 1e9:g} GHz"


def _inside(x: float, f: np.ndarray) -> bool:
    tol = 1e-9 * max(float(f[-1]), 1.0)
    return float(f[0]) - tol <= x <= float(f[-1]) + tol


def _in_sweep(where: str, x: float, f: np.ndarray) -> None:
    if not _inside(x, f):
        raise LossLaneError(
            f"{where} = {_ghz(x)} lies outside the sweep ({_sweep_text(f)}); choose a "
            "frequency inside [sweep] start..stop, or widen the sweep"
        )


def _positive_limit(where: str, value: float | None) -> None:
    if value is not None and not value > 0:
        raise LossLaneError(
            f'{where} = {value:g} dB: losses are given as positive dB (e.g. "16 dB" for '
            "|S21| = -16 dB); use a value > 0"
        )


def check_points(budget, f: np.ndarray) -> list[CheckPoint]:
    """The budget's check points, Nyquist first, each checked to lie inside the sweep ``f``.

    ``budget`` is a :class:`losslane.scenario.Budget` (or None: no points).
    """
    if budget is None:
        return []
    f = np.asarray(f, dtype=float)
    _positive_limit("[budget].max_loss", budget.max_loss)
    for i, c in enumerate(budget.checks):
        _positive_limit(f"[[budget.check]] #{i + 1}.max_loss", c.max_loss)
        _positive_limit(f"[[budget.check]] #{i + 1}.min_return_loss", c.min_return_loss)
    out = []
    if budget.data_rate is not None:
        fn = nyquist_frequency(budget.data_rate, budget.modulation)
        if not _inside(fn, f):
            raise LossLaneError(
                f"[budget].data_rate = {budget.data_rate / 1e9:g} Gb/s "
                f"({budget.modulation.upper()}) puts the Nyquist frequency at {_ghz(fn)}, "
                f"outside the sweep ({_sweep_text(f)}); extend [sweep] stop to at least "
                f"{_ghz(fn)} or correct data_rate / modulation"
            )
        out.append(CheckPoint("Nyquist", "[budget]", fn, budget.max_loss, None, nyquist=True))
    for i, c in enumerate(budget.checks):
        key = f"[[budget.check]] #{i + 1}"
        _in_sweep(f"{key}.at", c.at, f)
        out.append(CheckPoint(f"check {i + 1}", key, c.at, c.max_loss, c.min_return_loss))
    return out


# ------------------------------------------------------------------------------ the table


@dataclass(frozen=True)
class SegmentRow:
    """One segment at one check point: its own insertion loss (dB, that block alone between
    matched references) and, for a line, its length and attenuation per inch (matched
    line, from the line model)."""

    name: str
    kind: str
    loss_db: float
    db_per_in: float | None = None
    length_m: float | None = None
    #: a pair segment's own mode conversion |Scd21| in dB (negative; None: single-ended)
    conversion_db: float | None = None


@dataclass(frozen=True)
class PointBudget:
    """The budget at one check point."""

    point: CheckPoint
    segments: tuple[SegmentRow, ...]
    total_db: float
    return_loss_in_db: float
    return_loss_out_db: float
    #: a differential channel's mode conversion at the point, dB (negative): |Scd21|
    #: (common mode out for differential in) and |Sdc21| (the reverse); None: single-ended
    scd21_db: float | None = None
    sdc21_db: float | None = None

    @property
    def at(self) -> float:
        return self.point.at

    @property
    def allowance_db(self) -> float | None:
        return self.point.max_loss

    @property
    def parts_db(self) -> float:
        return float(sum(r.loss_db for r in self.segments))

    @property
    def reflections_db(self) -> float:
        """Cascaded total minus the sum of the parts: what mismatch between the blocks
        (multiple reflections, resonances between discontinuities) adds or, when
        reflections happen to cancel, takes away."""
        return self.total_db - self.parts_db

    @property
    def margin_db(self) -> float | None:
        return None if self.allowance_db is None else self.allowance_db - self.total_db

    @property
    def loss_passed(self) -> bool | None:
        return None if self.allowance_db is None else bool(self.total_db <= self.allowance_db)

    @property
    def return_loss_db(self) -> float:
        """The worse of the two ends."""
        return min(self.return_loss_in_db, self.return_loss_out_db)

    @property
    def return_loss_margin_db(self) -> float | None:
        lim = self.point.min_return_loss
        return None if lim is None else self.return_loss_db - lim

    @property
    def return_loss_passed(self) -> bool | None:
        lim = self.point.min_return_loss
        return None if lim is None else bool(self.return_loss_db >= lim)

    @property
    def passed(self) -> bool:
        """Every limit given at this point holds (True when none is given)."""
        return self.loss_passed is not False and self.return_loss_passed is not False

    def share(self, loss_db: float) -> float | None:
        """A loss as a fraction of the allowance (None without an allowance)."""
        a = self.allowance_db
        return None if a is None or a <= 0 else loss_db / a

    def to_json(self) -> dict:
        return {
            "label": self.point.label,
            "at_hz": self.at,
            "loss_db": self.total_db,
            "max_loss_db": self.allowance_db,
            "margin_db": self.margin_db,
            "return_loss_db": self.return_loss_db,
            "return_loss_in_db": self.return_loss_in_db,
            "return_loss_out_db": self.return_loss_out_db,
            "min_return_loss_db": self.point.min_return_loss,
            "return_loss_margin_db": self.return_loss_margin_db,
            "passed": self.passed,
            "segments": [_segment_json(r, self) for r in self.segments],
            "reflections_db": self.reflections_db,
            "mode_conversion_db": self.scd21_db,
            "sdc21_db": self.sdc21_db,
        }


def _segment_json(r: SegmentRow, pb: PointBudget) -> dict:
    return {
        "name": r.name,
        "kind": r.kind,
        "loss_db": r.loss_db,
        "db_per_in": r.db_per_in,
        "length_m": r.length_m,
        "share_of_allowance": pb.share(r.loss_db),
        "mode_conversion_db": r.conversion_db,
    }


@dataclass(frozen=True)
class ChannelBudget:
    """The budget of a channel: the Nyquist point (if a data rate is given) and the
    extra check points, all judged; ``mode`` names what is budgeted. ``bands``, ``masks``
    (``losslane.bands`` results) are judged at every sweep point they cover; ``ripples``
    holds one ``bands.RippleNote`` per point, in the order of ``points``."""

    data_rate: float | None
    modulation: str
    points: tuple[PointBudget, ...]
    mode: str = "single-ended"
    bands: tuple = ()
    masks: tuple = ()
    ripples: tuple = ()

    @property
    def nyquist(self) -> PointBudget | None:
        return next((p for p in self.points if p.point.nyquist), None)

    @property
    def checks(self) -> tuple[PointBudget, ...]:
        return tuple(p for p in self.points if not p.point.nyquist)

    @property
    def baud(self) -> float | None:
        return None if self.data_rate is None else baud_rate(self.data_rate, self.modulation)

    @property
    def judged(self) -> bool:
        """Whether anything is judged (a point, a band or a mask)."""
        return bool(self.points or self.bands or self.masks)

    @property
    def passed(self) -> bool:
        """Every limit at every point, band and mask holds (True when no limit is given)."""
        return (
            all(p.passed for p in self.points)
            and all(b.passed for b in self.bands)
            and all(m.passed for m in self.masks)
        )

    def ripple_of(self, pb: PointBudget):
        """The ripple note of a point (None when not evaluated)."""
        for p, note in zip(self.points, self.ripples, strict=False):
            if p is pb:
                return note
        return None

    def _point_json(self, pb: PointBudget) -> dict:
        out = pb.to_json()
        note = self.ripple_of(pb)
        out["ripple"] = None if note is None else note.to_json()
        return out

    def to_json(self) -> dict:
        """The ``budget`` object of ``losslane build --json`` (DESIGN.md keys first)."""
        ny = self.nyquist
        return {
            "nyquist_hz": None if ny is None else ny.at,
            "allowance_db": None if ny is None else ny.allowance_db,
            "total_db": None if ny is None else ny.total_db,
            "margin_db": None if ny is None else ny.margin_db,
            "passed": self.passed,
            "segments": [] if ny is None else [_segment_json(r, ny) for r in ny.segments],
            "reflections_db": None if ny is None else ny.reflections_db,
            "checks": [self._point_json(p) for p in self.checks],
            "bands": [b.to_json() for b in self.bands],
            "masks": [m.to_json() for m in self.masks],
            "data_rate_bps": self.data_rate,
            "modulation": self.modulation if self.data_rate is not None else None,
            "baud_hz": self.baud,
            "mode": self.mode,
            "nyquist": None if ny is None else self._point_json(ny),
        }


def _at(f: np.ndarray, y: np.ndarray, x: np.ndarray) -> np.ndarray:
    """``y`` (…, N) read at ``x`` (M,): linear in dB between the neighbouring sweep points."""
    y = np.atleast_2d(y)
    idx = np.clip(np.searchsorted(f, x), 1, f.size - 1)
    f0, f1 = f[idx - 1], f[idx]
    w = np.where(f1 > f0, (x - f0) / np.where(f1 > f0, f1 - f0, 1.0), 0.0)
    w = np.clip(w, 0.0, 1.0)
    return y[:, idx - 1] * (1.0 - w) + y[:, idx] * w


def _line_db_per_in(segment, fx: np.ndarray, victim: str | None = None) -> np.ndarray | None:
    """A line segment's own attenuation (its main mode) at ``fx``, what a laminate
    comparison quotes -- on a group line the ``victim`` trace's, its neighbours quiet;
    None for other segments."""
    section = getattr(segment, "section", None)
    if segment.type != "line" or section is None:
        return None
    if victim is not None and hasattr(section, "trace_db_per_in"):
        return section.trace_db_per_in(fx, victim)
    return section.attenuation_db_per_in(fx)


def evaluate_budget(
    result, budget=None, points: list[CheckPoint] | None = None
) -> ChannelBudget | None:
    """The budget of a built channel (:class:`losslane.channel.ChannelResult`).

    ``budget`` defaults to the scenario's ``[budget]``; None when there is none.
    ``points``: its check points when already found (``validate``).
    """
    budget = result.scenario.budget if budget is None else budget
    if budget is None:
        return None
    f = np.asarray(result.f, dtype=float)
    pts = check_points(budget, f) if points is None else points
    mode = "differential" if result.differential else "single-ended"
    if not pts:
        bands, masks, _ = judge(result, budget, ())
        return ChannelBudget(budget.data_rate, budget.modulation, (), mode, bands, masks)
    fx = np.array([p.at for p in pts])
    seg = _at(f, result.segment_loss_db, fx)  # (K, M)
    total = _at(f, result.insertion_loss_db, fx)[0]
    rl_in, rl_out = result.return_loss
    rin, rout = _at(f, np.vstack([rl_in, rl_out]), fx)
    victim = getattr(result, "victim", None)
    per_in = [_line_db_per_in(s, fx, victim) for s in result.scenario.channel]
    conv = getattr(result, "segment_conversion_db", None)
    seg_conv = None if conv is None else _at(f, conv, fx)  # (K, M)
    mm = result.mixed_mode
    scd = sdc = None
    if mm is not None:
        floor = 1e-300
        scd = _at(f, 20 * np.log10(np.maximum(np.abs(mm.cd[:, 1, 0]), floor)), fx)[0]
        sdc = _at(f, 20 * np.log10(np.maximum(np.abs(mm.dc[:, 1, 0]), floor)), fx)[0]
    out = []
    for m, p in enumerate(pts):
        rows = tuple(
            SegmentRow(
                blk.name,
                blk.kind,
                float(seg[k, m]),
                None if per_in[k] is None else float(per_in[k][m]),
                getattr(blk, "length", None) if per_in[k] is not None else None,
                None if seg_conv is None else float(seg_conv[k, m]),
            )
            for k, blk in enumerate(result.blocks)
        )
        out.append(
            PointBudget(
                p,
                rows,
                float(total[m]),
                float(rin[m]),
                float(rout[m]),
                None if scd is None else float(scd[m]),
                None if sdc is None else float(sdc[m]),
            )
        )
    bands, masks, notes = judge(result, budget, out)
    return ChannelBudget(budget.data_rate, budget.modulation, tuple(out), mode, bands, masks, notes)


# ----------------------------------------------------------------- fitted insertion loss


@dataclass(frozen=True)
class FitBand:
    start: float
    stop: float
    rule: str  # how the band was chosen, for the outputs


def fit_band(budget, f: np.ndarray) -> FitBand:
    """The band of the insertion-loss fit.

    ``[budget] fit_start`` / ``fit_stop`` when given (each must lie in the sweep).
    Default: from 50 MHz (or the first sweep point above DC, if higher) to
    2 x Nyquist (= the baud rate), capped at the sweep stop; the whole sweep above DC
    without a data rate.
    """
    f = np.asarray(f, dtype=float)
    lo, hi = float(f[0]), float(f[-1])
    start = getattr(budget, "fit_start", None)
    stop = getattr(budget, "fit_stop", None)
    rules = []
    if start is not None:
        _in_sweep("[budget].fit_start", start, f)
        rules.append("start from [budget] fit_start")
    if stop is not None:
        _in_sweep("[budget].fit_stop", stop, f)
        rules.append("stop from [budget] fit_stop")
    if start is None:
        above_dc = f[f > 0]
        first = float(above_dc[0]) if above_dc.size else lo
        start = max(FIT_LOW_EDGE_HZ, first)
        rules.append(
            "start at 50 MHz"
            if start == FIT_LOW_EDGE_HZ
            else "start at the first sweep point above DC"
        )
    if stop is None:
        rate = getattr(budget, "data_rate", None)
        if rate is not None:
            want = FIT_STOP_NYQUIST_MULTIPLE * nyquist_frequency(rate, budget.modulation)
            if want <= hi * (1 + 1e-12):
                stop = want
                rules.append(f"stop at {FIT_STOP_NYQUIST_MULTIPLE:g} x Nyquist (the baud rate)")
            else:
                stop = hi
                rules.append(
                    f"stop at the sweep stop ({FIT_STOP_NYQUIST_MULTIPLE:g} x Nyquist = "
                    f"{_ghz(want)} lies above it)"
                )
        else:
            stop = hi
            rules.append("stop at the sweep stop (no data rate)")
    if stop <= start:
        keys = "[budget] fit_start / fit_stop"
        raise LossLaneError(
            f"{keys}: the fit band {_ghz(start)}..{_ghz(stop)} is empty; fit_stop must lie "
            f"above fit_start, both inside the sweep ({_sweep_text(f)})"
        )
    n = int(np.count_nonzero(_band_mask(f, start, stop)))
    if n < MIN_FIT_POINTS:
        raise LossLaneError(
            f"[budget] fit_start / fit_stop: the fit band {_ghz(start)}..{_ghz(stop)} holds "
            f"{n} sweep points; the four-term fit needs at least {MIN_FIT_POINTS}; widen the "
            "band or use a finer [sweep] step"
        )
    return FitBand(float(start), float(stop), "; ".join(rules))


def _band_mask(f: np.ndarray, start: float, stop: float) -> np.ndarray:
    tol = 1e-9 * max(float(f[-1]), 1.0)
    return (f >= start - tol) & (f <= stop + tol)


FIT_TERMS = ("a0", "a1", "a2", "a4")


def fit_basis(f_hz: np.ndarray) -> np.ndarray:
    """Columns 1, sqrt(f), f, f^2 with f in GHz (the IEEE 802.3 fitted-attenuation form,
    from memory), (N, 4)."""
    x = np.asarray(f_hz, dtype=float) / 1e9
    return np.column_stack([np.ones_like(x), np.sqrt(x), x, x * x])


@dataclass(frozen=True)
class LossFit:
    """Fitted insertion loss IL_fit(f) = a0 + a1*sqrt(f) + a2*f + a4*f^2 (dB, f in GHz)
    and the deviation ILD = IL - IL_fit on the fit band's sweep points."""

    band: FitBand
    coefficients: tuple[float, float, float, float]  # a0 dB, a1 dB/sqrt(GHz), a2, a4
    f: np.ndarray  # sweep points in the band (Hz)
    il_db: np.ndarray  # channel insertion loss there (positive dB)
    # whether the four-term form describes the channel (losslane.fit_check); when it does
    # not, the coefficients are kept for a Python caller but no output quotes them
    applies: bool = True
    reason: str | None = None

    def fitted_db(self, f_hz) -> np.ndarray:
        return fit_basis(np.atleast_1d(f_hz)) @ np.asarray(self.coefficients)

    @property
    def ild_db(self) -> np.ndarray:
        return self.il_db - self.fitted_db(self.f)

    @property
    def peak_index(self) -> int:
        return int(np.argmax(np.abs(self.ild_db)))

    @property
    def ild_peak_db(self) -> float:
        """The ILD of largest magnitude, with its sign."""
        return float(self.ild_db[self.peak_index])

    @property
    def ild_peak_hz(self) -> float:
        return float(self.f[self.peak_index])

    @property
    def ild_rms_db(self) -> float:
        return float(np.sqrt(np.mean(self.ild_db**2)))

    def to_json(self, nyquist_hz: float | None = None) -> dict:
        a = self.coefficients
        out = {
            "applies": self.applies,
            "reason": self.reason,
            "start_hz": self.band.start,
            "stop_hz": self.band.stop,
            "band_rule": self.band.rule,
            "form": "a0 + a1*sqrt(f) + a2*f + a4*f^2, f in GHz, dB",
            "a0_db": a[0],
            "a1_db_per_sqrt_ghz": a[1],
            "a2_db_per_ghz": a[2],
            "a4_db_per_ghz2": a[3],
            "points": int(self.f.size),
            "ild_peak_db": self.ild_peak_db,
            "ild_peak_hz": self.ild_peak_hz,
            "ild_rms_db": self.ild_rms_db,
            "fitted_loss_at_nyquist_db": None,
            "nyquist_in_band": None,
        }
        if nyquist_hz is not None:
            out["fitted_loss_at_nyquist_db"] = float(self.fitted_db(nyquist_hz)[0])
            out["nyquist_in_band"] = bool(self.band.start <= nyquist_hz <= self.band.stop)
        if not self.applies:  # the numbers would describe a notch or a band edge: not quoted
            for key in FIT_NUMBERS:
                out[key] = None
        return out


#: the keys of a fit's JSON that are left null when the fit does not apply
FIT_NUMBERS = (
    "a0_db",
    "a1_db_per_sqrt_ghz",
    "a2_db_per_ghz",
    "a4_db_per_ghz2",
    "ild_peak_db",
    "ild_peak_hz",
    "ild_rms_db",
    "fitted_loss_at_nyquist_db",
)


@dataclass(frozen=True)
class FitOff:
    """No fitted insertion loss for this build, and why (turned off, or a sweep too coarse
    for it)."""

    reason: str
    applies: bool = False

    def to_json(self, nyquist_hz: float | None = None) -> dict:
        return {"applies": False, "reason": self.reason}


def fit_insertion_loss(f: np.ndarray, il_db: np.ndarray, start: float, stop: float) -> LossFit:
    """Least-squares fit of a0 + a1*sqrt(f) + a2*f + a4*f^2 to ``il_db`` on the sweep points
    of [start, stop], equal weights (the fitted-attenuation form of IEEE 802.3's backplane
    annexes, from memory). Valid for a smooth loss of a matched-ish channel; sharp
    resonances show up as ILD, which is the point."""
    f = np.asarray(f, dtype=float)
    il = np.asarray(il_db, dtype=float)
    m = _band_mask(f, start, stop)
    if np.count_nonzero(m) < len(FIT_TERMS):
        raise LossLaneError(
            f"fit band {_ghz(start)}..{_ghz(stop)} holds {np.count_nonzero(m)} sweep points; "
            f"the fit needs at least {len(FIT_TERMS)}"
        )
    a = fit_basis(f[m])
    # columns of very different size (1 vs f^2 up to ~1e4): scale them for conditioning
    scale = np.linalg.norm(a, axis=0)
    coef, *_ = np.linalg.lstsq(a / scale, il[m], rcond=None)
    coef = coef / scale
    return LossFit(FitBand(start, stop, ""), tuple(float(c) for c in coef), f[m], il[m])


def fit_channel(result, budget=None, enabled: bool = True) -> LossFit | FitOff | None:
    """The fitted insertion loss of a built channel over its fit band (see ``fit_band``),
    with whether it applies (``fit_check.assess``).

    None (with a warning) when the default band is too narrow for a fit; an explicit
    ``fit_start``/``fit_stop`` that does not work is an error. A ``FitOff`` when turned off
    by ``[budget] fit = false`` or by ``enabled`` = False (the build's ``skip_fit``).
    """
    budget = result.scenario.budget if budget is None else budget
    if budget is not None and not getattr(budget, "fit", True):
        return FitOff("turned off by [budget] fit = false")
    if not enabled:
        return FitOff("turned off by the build option skip_fit (--skip-fit)")
    f = np.asarray(result.f, dtype=float)
    try:
        band = fit_band(budget, f)
    except LossLaneError:
        if budget is not None and (budget.fit_start is not None or budget.fit_stop is not None):
            raise
        warn(
            f"fitted insertion loss skipped: the sweep ({f.size} points, "
            f"{f[0] / 1e9:g}..{f[-1] / 1e9:g} GHz) is too coarse for the four-term fit"
        )
        return None
    fit = fit_insertion_loss(f, result.insertion_loss_db, band.start, band.stop)
    applies, reason = assess(fit.f, fit.il_db, fit.ild_db)
    return LossFit(band, fit.coefficients, fit.f, fit.il_db, applies, reason)


def validate(scenario) -> list[CheckPoint]:
    """Check the budget's frequencies against the sweep before any work is done: check
    points and an explicit fit band must lie inside it (LossLaneError naming the key).
    Returns the check points (for ``evaluate_budget``)."""
    f = scenario.frequencies()
    budget = scenario.budget
    points = check_points(budget, f)
    if budget is not None and (budget.fit_start is not None or budget.fit_stop is not None):
        fit_band(budget, f)
    return points


__all__ = [
    "ChannelBudget",
    "CheckPoint",
    "FitBand",
    "FitOff",
    "LossFit",
    "PointBudget",
    "SegmentRow",
    "check_points",
    "evaluate_budget",
    "fit_band",
    "fit_basis",
    "fit_channel",
    "fit_insertion_loss",
    "validate",
]

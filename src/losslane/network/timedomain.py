"""Time-domain views of S-parameters: impedance profile (TDR), step and pulse responses.

The reusable steps, frequency first, vectorized over any number of transfer functions:

1. :func:`uniform_spectrum` -- a uniform grid that starts at 0 Hz. Data without a 0 Hz
   point get a DC value extrapolated from the first two points, linearly in magnitude and
   unwrapped phase with the imaginary part dropped (the estimate of scikit-rf's
   ``Network.extrapolate_to_dc``); a non-uniform grid, or one whose start is not a whole
   number of steps, is resampled to a uniform grid (step: the median step of the data)
   linearly in real and imaginary parts. Both are said in the returned ``notes``.
2. :func:`rise_filter` -- the stimulus edge: a zero-phase Gaussian filter (a Gaussian
   edge of sigma has a 10-90 % rise time of 2.5631 sigma, from the normal distribution's
   10 % and 90 % quantiles at -+1.2816 sigma). Being zero-phase it adds no delay: the
   stimulus' own 50 % point is at t = 0. Its spectrum is cut off at the top frequency
   f_max of the data, which lengthens the edge a little and makes it ring; sigma is
   therefore solved for (:func:`stimulus_sigma`) so that the cut-off edge has exactly the
   requested 10-90 % rise time t_r. The ringing (largest excursion of the stimulus step
   below 0 or above 1, as a fraction of the step) is measured on the same transform and
   returned with every result: about 0.6 % with the default t_r = 0.75 / f_max, 1 % near
   0.72 / f_max, 8 % at the shortest accepted, 0.5 / f_max (a warning above 1 %).
3. :func:`step_response`, :func:`impulse_response`, :func:`pulse_response` -- the inverse
   real FFT of H(f) G(f) (times the pulse spectrum for a pulse), zero-padded so that
   there are ``samples_per_rise`` (default 8) samples per rise time; the step is the
   exact running integral of the band-limited impulse response, formed in the frequency
   domain (H / (j 2 pi f) plus the 0 Hz ramp). The responses are periodic in 1 / df (the
   time window): anything that lasts longer wraps around, which a note then says.

On top of these: the impedance profile of a reflection, Z(t) = Z_ref (1 + rho)/(1 - rho)
with rho(t) the reflected filtered step, against the round-trip time of the reflection
(a feature at one-way delay tau appears at 2 tau), optionally against one-way distance;
the step response of a through path with its 50 % delay and 10-90 % rise time; the skew
between two legs; the pulse response for a data rate and modulation with its cursors; and
:func:`time_domain`, all of these for a 2-port or a differential 4-port.

Each waveform is returned from -3 t_r (the edge's baseline) to an end chosen to show the
whole response without its slow tail (a ``duration`` overrides it); the measurements
use the whole time window. A reflection ends after its last feature, the last time it
changes by more than 2e-4 of the unit stimulus within one rise time (plus
max(10 t_r, 10 %)), or, in :func:`time_domain`, after
1.25 round trips of the longest through delay plus 10 t_r; a step at twice its 50 % delay
plus 10 t_r; a pulse once it stays within 1e-3 of its main cursor, but no later than
30 unit intervals after the main cursor.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError, warn
from losslane.network.imported import linear_interpolation
from losslane.network.ports import DEFAULT_ORDER, check_order, from_order, port_permutation

__all__ = [
    "longest_rise_time",
    "lowest_data_rate",
    "time_window",
    "DEFAULT_RISE_FACTOR",
    "GAUSSIAN_RISE",
    "MODULATIONS",
    "ImpedanceProfile",
    "PulseResponse",
    "Spectrum",
    "StepResponse",
    "TimeDomainReport",
    "Waveforms",
    "crossing",
    "dc_value",
    "default_rise_time",
    "impedance_profile",
    "impulse_response",
    "pulse_response",
    "rise_filter",
    "step_response",
    "stimulus_sigma",
    "through_pulse",
    "through_step",
    "time_domain",
    "uniform_spectrum",
]

GAUSSIAN_RISE = 2.0 * math.sqrt(2.0) * 0.9061938024368232
"""10-90 % rise time of a Gaussian edge in units of its sigma, 2 sqrt(2) erfinv(0.8)
= 2.5631 (the normal distribution's 90 % quantile is 1.2816 sigma)."""
DEFAULT_RISE_FACTOR = 0.75
"""Default rise time x f_max (stimulus ringing about 0.6 %, below the 1 % limit)."""
MIN_RISE_FACTOR = 0.5
"""Shortest accepted rise time x f_max (the cut-off edge alone rises in 0.45 / f_max)."""
RINGING_LIMIT = 0.01
"""Stimulus ringing (fraction of the step) above which a warning is given."""
SAMPLES_PER_RISE = 8
PRE_RISES = 3.0
"""Waveforms start this many rise times before t = 0."""
SETTLE = 2e-4
"""Smallest change (times the stimulus) within one rise time that counts as a feature of
a reflection; also how close to its final value a step counts as settled."""
WRAP = 1e-3
"""A tail farther than this (times the stimulus) from its final value wraps around."""
PULSE_SETTLE = 1e-3
"""A pulse response is cut once it stays within this share of its main cursor of zero..."""
PULSE_UIS = 30
"""... or this many unit intervals after its main cursor, whichever comes first."""
ROUND_TRIPS = 1.25
"""A network's impedance profiles run to this many round trips of its longest through
delay (plus 10 rise times): every feature of the channel, and its far end, lies within."""
MODULATIONS = {"nrz": 1, "pam4": 2}
"""Bits per symbol of each modulation (common practice)."""
_RHO_LIMIT = 1.0 - 1e-9


# ---------------------------------------------------------------- grid


@dataclass(frozen=True)
class Spectrum:
    """Samples on the uniform grid ``f`` (K,) = 0, df, ..., f_max; ``values`` (K, ...)."""

    f: np.ndarray
    values: np.ndarray
    notes: tuple[str, ...]

    @property
    def step(self) -> float:
        return float(self.f[1] - self.f[0])

    @property
    def f_max(self) -> float:
        return float(self.f[-1])


def _check_grid(f, values, key: str) -> tuple[np.ndarray, np.ndarray]:
    f = np.asarray(f, dtype=float)
    values = np.asarray(values)
    if f.ndim != 1 or f.size < 2:
        raise LossLaneError(f"{key}: a 1-D list of at least 2 frequencies is needed (Hz)")
    bad = ~np.isfinite(f) | (f < 0)
    if np.any(bad):
        raise LossLaneError(
            f"{key}: {f[bad][0]!r} Hz is not valid; frequencies are finite and >= 0 Hz"
        )
    if np.any(np.diff(f) <= 0):
        k = int(np.argmax(np.diff(f) <= 0))
        raise LossLaneError(
            f"{key}: {f[k + 1]:g} Hz follows {f[k]:g} Hz; frequencies must be strictly increasing"
        )
    if values.ndim < 1 or values.shape[0] != f.size:
        raise LossLaneError(
            f"{key}: values of shape {values.shape} do not fit {f.size} frequencies "
            "(frequency is the first axis)"
        )
    values = values.astype(complex, copy=False)
    if not np.all(np.isfinite(values)):
        k = int(np.argwhere(~np.isfinite(values))[0][0])
        raise LossLaneError(f"{key}: a value at {f[k]:g} Hz is not finite; all must be finite")
    return f, values


def dc_value(f, values) -> np.ndarray:
    """The 0 Hz value (real) estimated from the first two points: magnitude and unwrapped
    phase extrapolated linearly to 0 Hz, imaginary part dropped (the estimate of
    scikit-rf's ``Network.extrapolate_to_dc``). ``values`` (N, ...) -> (...)."""
    f = np.asarray(f, dtype=float)
    x = np.asarray(values, complex)[:2]
    w = f[0] / (f[1] - f[0])  # extrapolation weight: v(0) = v0 + w (v0 - v1)
    mag = np.abs(x)
    rad = np.unwrap(np.angle(x), axis=0)
    m0 = mag[0] + w * (mag[0] - mag[1])
    p0 = rad[0] + w * (rad[0] - rad[1])
    return (m0 * np.cos(p0)).real


def uniform_spectrum(f, values, key: str = "frequencies") -> Spectrum:
    """``values`` (N, ...) on ``f`` (Hz) as a :class:`Spectrum` on a uniform grid from 0 Hz
    (see the module docstring: DC extrapolation and resampling are said in ``notes``)."""
    f, values = _check_grid(f, values, key)
    notes: list[str] = []
    steps = np.diff(f)
    span_step = (f[-1] - f[0]) / (f.size - 1)
    uniform = bool(np.all(np.abs(steps - span_step) <= 1e-6 * span_step))
    if f[0] > 0:
        dc = dc_value(f, values)
        notes.append(
            f"the data start at {f[0]:.6g} Hz: the 0 Hz value is extrapolated from the first "
            "two points (linear in magnitude and phase, real part kept)"
        )
        base_f = np.concatenate([[0.0], f])
        base_v = np.concatenate([dc[None].astype(complex), values])
    else:
        base_f, base_v = f, values
    m = f[0] / span_step
    whole = uniform and round(m) >= 1 and abs(m - round(m)) <= 1e-6 * max(1.0, m)
    if uniform and f[0] == 0:
        grid = span_step * np.arange(f.size)
        return Spectrum(grid, values, tuple(notes))
    if whole:
        start = round(m)
        grid = span_step * np.arange(start + f.size)
        if start == 1:
            return Spectrum(grid, base_v, tuple(notes))
        (gap,) = linear_interpolation(base_f[:2], grid[1:start], base_v[:2])
        notes.append(
            f"the {start - 1} grid point(s) between 0 Hz and the first frequency are "
            "interpolated linearly towards the 0 Hz value"
        )
        return Spectrum(grid, np.concatenate([base_v[:1], gap, base_v[1:]]), tuple(notes))
    step = float(np.median(steps))
    n = max(1, int(round(f[-1] / step)))
    grid = np.linspace(0.0, f[-1], n + 1)
    (res,) = linear_interpolation(base_f, grid, base_v)
    why = "non-uniform" if not uniform else "uniform but not starting at a whole step"
    notes.append(
        f"the frequency grid is {why}: resampled to {n + 1} points, step {grid[1]:.6g} Hz, "
        "linearly in real and imaginary parts"
    )
    return Spectrum(grid, res, tuple(notes))


# ---------------------------------------------------------------- filter and transform


def default_rise_time(f_max: float) -> float:
    """The default stimulus rise time (10-90 %), 0.75 / f_max (see the module docstring)."""
    return DEFAULT_RISE_FACTOR / float(f_max)


def rise_filter(f, rise_time: float) -> np.ndarray:
    """The zero-phase Gaussian with 10-90 % step rise time ``rise_time`` (s):
    G(f) = exp(-2 pi^2 sigma^2 f^2), sigma = rise_time / 2.5631; (N,) real, G(0) = 1."""
    sigma = float(rise_time) / GAUSSIAN_RISE
    f = np.asarray(f, dtype=float)
    return np.exp(-2.0 * (np.pi * sigma * f) ** 2)


def _rise_time(rise_time: float | None, f_max: float) -> float:
    if rise_time is None:
        return default_rise_time(f_max)
    v = float(rise_time)
    shortest = MIN_RISE_FACTOR / f_max
    if not np.isfinite(v) or v < shortest * (1 - 1e-9):
        raise LossLaneError(
            f"rise_time = {rise_time!r} s is not valid for data ending at {f_max:.6g} Hz; it "
            f"must be >= {shortest:.4g} s (0.5 / f_max)"
        )
    return v


def fast_length(n: int) -> int:
    """The smallest 5-smooth number (2^a 3^b 5^c) >= ``n``: a length the FFT factors into
    small radices. (numpy's FFT is used rather than scipy's: importing ``scipy.fft`` costs
    about half a second of a command's start, numpy's comes with numpy.)"""
    n = max(int(n), 1)
    best = 1 << (n - 1).bit_length()  # a power of two always qualifies
    p5 = 1
    while p5 < best:
        p35 = p5
        while p35 < best:
            m = p35 * (1 << max(0, math.ceil(math.log2(n / p35))))
            while m // 2 >= n and m % 2 == 0:
                m //= 2
            if n <= m < best:
                best = m
            p35 *= 3
        p5 *= 5
    return best


def _inverse(
    f: np.ndarray, spectra: np.ndarray, n: int, pre: int, is_step: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Inverse real FFT of ``spectra`` (K, M) on the uniform grid ``f`` from 0 Hz to ``n``
    time samples, the time axis starting ``pre`` samples before t = 0.

    Impulse columns: h(t_m) = df sum_k H_k e^{j 2 pi f_k t_m} (1/s). Step columns (where
    ``is_step``): the exact running integral of that band-limited, 1/df-periodic h from the
    window's start, H_0 df (t - t_0) + sum_k>0 of H_k / (j 2 pi f_k) e^{j 2 pi f_k t}
    (a running sum of samples would be off by dt^2 h'/12: 0.7 % of a rise time sampled
    8 times). Returns (t (n,), values (n, M))."""
    df = float(f[1] - f[0])
    work = np.array(spectra, dtype=complex)
    dc = work[0, is_step].real
    work[1:, is_step] /= (2j * np.pi * f[1:])[:, None]
    work[0, is_step] = 0.0
    out = np.roll(np.fft.irfft(work, n, axis=0) * (n * df), pre, axis=0)
    t = (np.arange(n) - pre) / (n * df)
    if np.any(is_step):
        out[:, is_step] += dc * (df * (t - t[0]))[:, None] - out[0, is_step]
    return t, out


def _cut_rise(x: float) -> float:
    """10-90 % rise time x f_max of the Gaussian edge of nominal rise ``x`` / f_max (that is,
    sigma = x / (2.5631 f_max)) cut off at f_max."""
    f = np.linspace(0.0, 1.0, 401)
    n = 2 * math.ceil(8.0 / (max(x, 0.3) * f[1]))
    t, step = _inverse(f, rise_filter(f, x)[:, None], n, n // 4, np.array([True]))
    return crossing(t, step[:, 0], 0.9) - crossing(t, step[:, 0], 0.1)


def stimulus_sigma(rise_time: float, f_max: float) -> float:
    """The sigma (s) of the Gaussian filter whose edge, cut off at ``f_max`` (Hz), has the
    10-90 % rise time ``rise_time`` (s), >= 0.5 / f_max: solved by the secant method on the
    cut-off edge's rise time (the cut lengthens a nominal 0.7 / f_max edge by 4 %)."""
    f_max = _positive("f_max", f_max, "Hz")
    x = _rise_time(rise_time, f_max) * f_max
    a = x
    if rise_filter(1.0, a) > 1e-9:  # else the cut-off changes nothing
        ra = _cut_rise(a)
        b = a * x / ra
        for _ in range(12):
            rb = _cut_rise(b)
            if abs(rb - x) <= 1e-6 * x or rb == ra:
                break
            a, ra, b = b, rb, b + (x - rb) * (b - a) / (rb - ra)
        a = b
    return a / (GAUSSIAN_RISE * f_max)


def _positive(key: str, value, unit: str) -> float:
    v = float(value)
    if not np.isfinite(v) or v <= 0:
        raise LossLaneError(f"{key} = {value!r} {unit} is not valid; it must be > 0 {unit}")
    return v


@dataclass(frozen=True)
class _Transform:
    t: np.ndarray  # (T,)
    values: np.ndarray  # (T, M): step responses, or impulse responses (1/s)
    dt: float
    rise_time: float  # the stimulus' 10-90 % rise time, measured on this transform
    ringing: float
    period: float


def _transform(
    spec: Spectrum,
    columns: np.ndarray,
    rise_time: float | None,
    samples_per_rise: int,
    is_step: np.ndarray | bool = True,
) -> _Transform:
    """Filtered inverse transform of ``columns`` (K, M) on ``spec``'s grid: step responses
    where ``is_step`` (per column, or one flag), impulse responses elsewhere."""
    tr = _rise_time(rise_time, spec.f_max)
    sigma = stimulus_sigma(tr, spec.f_max)
    spr = int(samples_per_rise)
    if spr < 2:
        raise LossLaneError(
            f"samples_per_rise = {samples_per_rise!r} is not valid; it must be >= 2"
        )
    df = spec.step
    k = spec.f.size
    m = columns.shape[1]
    n = fast_length(max(2 * k, math.ceil(spr / (tr * df))))
    n += n % 2
    dt = 1.0 / (n * df)
    g = rise_filter(spec.f, sigma * GAUSSIAN_RISE)
    spectra = np.empty((k, m + 1), complex)
    spectra[:, :-1] = columns * g[:, None]
    spectra[:, -1] = g  # the stimulus alone: its rise time and ringing
    steps = np.ones(m + 1, bool)
    steps[:-1] = np.broadcast_to(np.asarray(is_step, bool), (m,))
    pre = min(math.ceil(PRE_RISES * tr / dt), n // 4)
    t, out = _inverse(spec.f, spectra, n, pre, steps)
    stim = out[:, -1]
    ringing = float(max(stim.max() - 1.0, -stim.min(), 0.0))
    if ringing > RINGING_LIMIT:
        warn(
            f"rise_time = {tr:.4g} s is short for data ending at {spec.f_max:.6g} Hz: the "
            f"stimulus rings by {100 * ringing:.2g} % (the default "
            f"{default_rise_time(spec.f_max):.4g} s keeps it below {100 * RINGING_LIMIT:g} %)"
        )
    t90, t10 = crossing(t, stim, 0.9), crossing(t, stim, 0.1)
    if t90 is None or t10 is None:  # callers check against longest_rise_time first
        raise LossLaneError(
            f"rise_time = {tr:.4g} s: the stimulus does not rise within the time window "
            f"1/df = {1.0 / df:.4g} s of the data; the longest rise time they carry is "
            f"{longest_rise_time(spec.f):.4g} s"
        )
    return _Transform(t, out[:, :-1], dt, t90 - t10, ringing, 1.0 / df)


def time_window(f) -> float:
    """The time window 1/df (s) of the transform of data on ``f`` (Hz): every response is
    periodic in it (``uniform_spectrum``'s grid step df)."""
    f = np.asarray(f, dtype=float)
    return 1.0 / uniform_spectrum(f, np.zeros(f.size)).step


def longest_rise_time(f) -> float:
    """The longest stimulus rise time (s) that data on ``f`` carry: half the time window
    (a longer edge has not finished rising before the period repeats it)."""
    return 0.5 * time_window(f)


def lowest_data_rate(f, modulation: str = "nrz", post: int = 5) -> float:
    """The lowest data rate (b/s) whose pulse response on ``f`` fits the time window: the
    pulse and its cursors (one pre-cursor, the main one and ``post`` post-cursors) span
    ``post + 2`` unit intervals; a longer span wraps around the window."""
    return (post + 2) * MODULATIONS[modulation] / time_window(f)


def _sample(t: np.ndarray, v: np.ndarray, tq: np.ndarray) -> np.ndarray:
    """``v`` at the times ``tq`` on the parabola through the three samples nearest each
    (error of order dt^3; a chord would miss a peak by dt^2 v''/8). ``v`` is one period of
    a periodic response (an impulse-type column over the whole window): a time outside the
    window is read where the period puts it, never extrapolated."""
    dt = t[1] - t[0]
    n = t.size
    x = np.mod((np.asarray(tq, float) - t[0]) / dt, n)
    j = np.rint(x).astype(int)
    s = x - j
    a, b, c = v[(j - 1) % n], v[j % n], v[(j + 1) % n]
    return b + 0.5 * s * (c - a) + 0.5 * s * s * (a - 2 * b + c)


def _settle_time(t: np.ndarray, v: np.ndarray, final: float, tol: float) -> float:
    """The last time ``v`` is farther than ``tol`` from ``final`` (the window's start if never)."""
    off = np.flatnonzero(np.abs(v - final) > tol)
    return float(t[off[-1]]) if off.size else float(t[0])


def _last_change(t: np.ndarray, v: np.ndarray, span: float, tol: float) -> float:
    """The last time ``v`` changes by more than ``tol`` within ``span`` (s): the last
    feature of a profile; a slow creep (a lossy line's reflection approaching its DC
    value over microseconds) changes far less than that within one rise time. The last
    10 % of the window is not searched: there the next period's edge rings ahead of it."""
    m = max(1, int(round(span / (t[1] - t[0]))))
    v = v[: max(m + 1, int(0.9 * v.size))]
    moving = np.flatnonzero(np.abs(v[m:] - v[:-m]) > tol)
    return float(t[moving[-1] + m]) if moving.size else float(t[0])


def _stop(t: np.ndarray, end: float) -> int:
    """Index one past the last sample at or before ``end``."""
    return min(int(np.searchsorted(t, end, side="right")), t.size)


def _duration(duration) -> float | None:
    return None if duration is None else _positive("duration", duration, "s")


def _window_note(v: np.ndarray, final: float, period: float, scale: float = 1.0):
    """A note when the response is still moving in the last 5 % of the time window, so that
    its tail wraps around onto the start (the transform is periodic in 1/df)."""
    tail = v[-max(2, v.size // 20) :]
    if np.max(np.abs(tail - final)) <= WRAP * abs(scale):
        return ()
    return (
        f"the response has not settled within the time window 1/df = {period:.4g} s: its "
        "tail wraps around onto the start; a finer frequency step lengthens the window",
    )


def _filter_note(tr: float, ringing: float) -> str:
    return (
        f"stimulus: Gaussian edge, 10-90 % rise time {tr:.4g} s, zero phase (its 50 % point "
        f"at t = 0); truncation ringing {100 * ringing:.2g} % of the step"
    )


def crossing(t: np.ndarray, v: np.ndarray, level: float, rising: bool = True) -> float | None:
    """The first time ``v`` reaches ``level`` (upwards, or downwards with ``rising`` False)
    on the uniform time axis ``t``: between the two samples that bracket it, on the
    parabola through them and the next sample (linear where that has no root there; the
    error of a chord on a curved edge would be 0.75 % of a rise time sampled 8 times);
    None if it never does."""
    d = (v - level) if rising else (level - v)
    hit = np.flatnonzero(d >= 0)
    if hit.size == 0:
        return None
    i = int(hit[0])
    if i == 0:
        return float(t[0])
    dt = float(t[1] - t[0])
    y0, y1 = float(d[i - 1]), float(d[i])
    s = -y0 / (y1 - y0)  # linear estimate, 0..1 from sample i - 1
    if i + 1 < d.size:
        y2 = float(d[i + 1])
        a = 0.5 * (y0 - 2 * y1 + y2)
        b = y1 - y0 - a
        if a != 0:
            disc = b * b - 4 * a * y0
            if disc >= 0:
                q = -0.5 * (b + math.copysign(math.sqrt(disc), b))
                roots = [r for r in (q / a, y0 / q if q != 0 else -1.0) if 0 <= r <= 1]
                if roots:
                    s = min(roots, key=lambda r: abs(r - s))
    return float(t[i - 1] + s * dt)


# ---------------------------------------------------------------- generic waveforms


@dataclass(frozen=True)
class Waveforms:
    """Time responses of one or more transfer functions: ``values`` (T, ...) on ``time_s``
    (T,), for a stimulus of 10-90 % rise time ``rise_time_s`` whose truncation ringing is
    ``ringing`` (fraction of the step); ``period_s`` = 1/df is the time window."""

    time_s: np.ndarray
    values: np.ndarray
    rise_time_s: float
    ringing: float
    time_step_s: float
    period_s: float
    notes: tuple[str, ...]


def _columns(values: np.ndarray) -> tuple[np.ndarray, tuple[int, ...]]:
    return values.reshape(values.shape[0], -1), values.shape[1:]


def _waveforms(
    f, h, rise_time, samples_per_rise: int, kind: str, extra=None, amplitude: float = 1.0
) -> Waveforms:
    spec = uniform_spectrum(f, h)
    cols, tail = _columns(spec.values)
    if extra is not None:
        cols = cols * extra(spec.f)[:, None]
    tf = _transform(spec, cols, rise_time, samples_per_rise, kind == "step")
    out = amplitude * tf.values
    notes = (*spec.notes, _filter_note(tf.rise_time, tf.ringing))
    return Waveforms(
        tf.t, out.reshape((tf.t.size, *tail)), tf.rise_time, tf.ringing, tf.dt, tf.period, notes
    )


def step_response(
    f, h, rise_time: float | None = None, samples_per_rise: int = SAMPLES_PER_RISE
) -> Waveforms:
    """Step responses of the transfer functions ``h`` (N, ...) on ``f`` (Hz): the response
    to a unit step with a Gaussian edge of 10-90 % ``rise_time`` (default 0.75/f_max) whose
    50 % point is at t = 0. Values (T, ...), the whole time window."""
    return _waveforms(f, h, rise_time, samples_per_rise, "step")


def impulse_response(
    f, h, rise_time: float | None = None, samples_per_rise: int = SAMPLES_PER_RISE
) -> Waveforms:
    """Impulse responses (1/s) of ``h`` (N, ...) band-limited by the Gaussian rise-time
    filter: the time derivative of :func:`step_response`."""
    return _waveforms(f, h, rise_time, samples_per_rise, "impulse")


def _rect(width: float):
    """Spectrum of a unit pulse from t = 0 to ``width``: width sinc(f width) e^{-j pi f width}."""

    def spectrum(f: np.ndarray) -> np.ndarray:
        return width * np.sinc(f * width) * np.exp(-1j * np.pi * f * width)

    return spectrum


def pulse_response(
    f,
    h,
    width: float,
    rise_time: float | None = None,
    amplitude: float = 1.0,
    samples_per_rise: int = SAMPLES_PER_RISE,
) -> Waveforms:
    """Responses of ``h`` (N, ...) to a pulse of ``amplitude`` (V) from t = 0 to ``width``
    (s) (50 % points), its edges shaped by the Gaussian rise-time filter."""
    w = _positive("pulse width", width, "s")
    return _waveforms(f, h, rise_time, samples_per_rise, "impulse", _rect(w), amplitude)


# ---------------------------------------------------------------- impedance profile


@dataclass(frozen=True)
class ImpedanceProfile:
    """The impedance profile seen at one port: ``impedance_ohm`` and the reflected step
    ``reflection`` (rho) against the round-trip time ``time_s``; ``distance_m`` the one-way
    distance when a delay per metre was given. ``port``: the port number (for the
    differential mode, 1 = near-end pair, 2 = far-end pair); ``mode`` "single-ended" or
    "differential"; ``reference_ohm`` Z_ref (2 Z_ref for the differential mode)."""

    port: int
    mode: str
    reference_ohm: float
    time_s: np.ndarray
    impedance_ohm: np.ndarray
    reflection: np.ndarray
    distance_m: np.ndarray | None
    rise_time_s: float
    ringing: float
    notes: tuple[str, ...]

    def to_json(self) -> dict:
        out = {
            "port": self.port,
            "mode": self.mode,
            "time_s": self.time_s.tolist(),
            "impedance_ohm": self.impedance_ohm.tolist(),
            "reference_ohm": self.reference_ohm,
            "rise_time_s": self.rise_time_s,
        }
        if self.distance_m is not None:
            out["distance_m"] = self.distance_m.tolist()
        return out


def _profile(
    tf: _Transform,
    col: int,
    z_ref: float,
    port: int,
    mode: str,
    delay_per_m: float | None,
    duration,
    notes: tuple[str, ...],
) -> ImpedanceProfile:
    rho_all = tf.values[:, col]
    final = float(rho_all[-1])
    end = _duration(duration)
    if end is None:
        last = _last_change(tf.t, rho_all, tf.rise_time, SETTLE)
        end = last + max(10 * tf.rise_time, 0.1 * last)
    stop = _stop(tf.t, end)
    t = tf.t[:stop]
    rho = rho_all[:stop]
    clipped = np.clip(rho, -_RHO_LIMIT, _RHO_LIMIT)
    z = z_ref * (1.0 + clipped) / (1.0 - clipped)
    extra = _window_note(rho_all, final, tf.period)
    if np.any(clipped != rho):
        extra += (
            "the reflection reaches +-1 (an open or a short): the impedance there is "
            f"bounded by rho = +-{_RHO_LIMIT}",
        )
    dist = None if delay_per_m is None else t / (2.0 * delay_per_m)
    return ImpedanceProfile(
        port, mode, z_ref, t, z, rho, dist, tf.rise_time, tf.ringing, notes + extra
    )


def impedance_profile(
    f,
    reflection,
    z_ref: float = 50.0,
    port: int = 1,
    mode: str = "single-ended",
    rise_time: float | None = None,
    delay_per_m: float | None = None,
    duration: float | None = None,
    samples_per_rise: int = SAMPLES_PER_RISE,
) -> ImpedanceProfile:
    """The impedance profile (TDR) of one reflection coefficient ``reflection`` (N,) on
    ``f`` (Hz) referred to ``z_ref`` (ohm): rho(t) the reflected step of 10-90 %
    ``rise_time`` (default 0.75/f_max), Z = z_ref (1 + rho)/(1 - rho) against the
    round-trip time; with ``delay_per_m`` (one-way s/m) also against distance
    t / (2 delay_per_m). The profile ends where rho has settled (see the module docstring)
    or at ``duration`` (s, round-trip time)."""
    z_ref = _positive("z_ref", z_ref, "ohm")
    dpm = None if delay_per_m is None else _positive("delay_per_m", delay_per_m, "s/m")
    r = np.asarray(reflection)
    if r.ndim != 1:
        raise LossLaneError(
            f"reflection: shape {r.shape} is not one coefficient per frequency, (N,)"
        )
    spec = uniform_spectrum(f, r[:, None])
    tf = _transform(spec, spec.values, rise_time, samples_per_rise)
    notes = (*spec.notes, _filter_note(tf.rise_time, tf.ringing))
    return _profile(tf, 0, z_ref, int(port), mode, dpm, duration, notes)


# ---------------------------------------------------------------- step and pulse


@dataclass(frozen=True)
class StepResponse:
    """The step response of a through path: ``volts`` against ``time_s`` for a unit step
    (1 V incident) whose 50 % point is at t = 0, so ``delay_s`` (the 50 % crossing of the
    final level) is the propagation delay; ``rise_time_s`` the output's 10-90 % rise time
    (None if a level is never reached in the window); ``final`` the level used (the 0 Hz
    value, or the peak for a path that blocks DC); ``stimulus_rise_time_s``."""

    path: str
    time_s: np.ndarray
    volts: np.ndarray
    delay_s: float | None
    rise_time_s: float | None
    final: float
    stimulus_rise_time_s: float
    ringing: float
    notes: tuple[str, ...]

    def to_json(self, waveform: bool = False) -> dict:
        out = {
            "path": self.path,
            "delay_s": self.delay_s,
            "rise_time_s": self.rise_time_s,
            "final": self.final,
            "stimulus_rise_time_s": self.stimulus_rise_time_s,
        }
        if waveform:
            out["time_s"] = self.time_s.tolist()
            out["volts"] = self.volts.tolist()
        return out


def _step(
    tf: _Transform, col: int, dc: float, path: str, duration, notes: tuple[str, ...]
) -> StepResponse:
    v_all = tf.values[:, col]
    peak = float(v_all[np.argmax(np.abs(v_all))])
    extra: tuple[str, ...] = ()
    level = dc
    if abs(dc) < 0.5 * abs(peak):
        level = peak
        extra += (
            f"{path}: the 0 Hz level {dc:.3g} is below half the peak (the path blocks DC); "
            "delay and rise time refer to the peak",
        )
    rising = level >= 0
    t50 = t10 = t90 = None
    if level != 0:
        t50 = crossing(tf.t, v_all, 0.5 * level, rising)
        t10 = crossing(tf.t, v_all, 0.1 * level, rising)
        t90 = crossing(tf.t, v_all, 0.9 * level, rising)
    rise = None if t10 is None or t90 is None else t90 - t10
    if t50 is None or rise is None:
        extra += (f"{path}: the step never reaches the levels it is measured at",)
    end = _duration(duration)
    if end is None:
        if t50 is None:
            last = _settle_time(tf.t, v_all, float(v_all[-1]), SETTLE)
            end = last + max(10 * tf.rise_time, 0.1 * last)
        else:
            end = 2.0 * t50 + 10 * tf.rise_time
        if t90 is not None:
            end = max(end, t90 + 2 * tf.rise_time)
    stop = _stop(tf.t, end)
    return StepResponse(
        path,
        tf.t[:stop],
        v_all[:stop],
        t50,
        rise,
        level,
        tf.rise_time,
        tf.ringing,
        notes + extra + _window_note(v_all, float(v_all[-1]), tf.period),
    )


def through_step(
    f,
    transfer,
    path: str = "S21",
    rise_time: float | None = None,
    duration: float | None = None,
    samples_per_rise: int = SAMPLES_PER_RISE,
) -> StepResponse:
    """Step response of one through path ``transfer`` (N,) on ``f`` (Hz), with its 50 %
    delay and 10-90 % rise time (see :class:`StepResponse`)."""
    h = np.asarray(transfer)
    if h.ndim != 1:
        raise LossLaneError(f"transfer: shape {h.shape} is not one value per frequency, (N,)")
    spec = uniform_spectrum(f, h[:, None])
    tf = _transform(spec, spec.values, rise_time, samples_per_rise)
    notes = (*spec.notes, _filter_note(tf.rise_time, tf.ringing))
    return _step(tf, 0, float(spec.values[0, 0].real), path, duration, notes)


@dataclass(frozen=True)
class PulseResponse:
    """The response of a through path to one symbol: a pulse one unit interval ``ui_s``
    wide (50 % points at 0 and UI) of ``amplitude`` V. ``main_cursor`` is the peak and
    ``main_cursor_time_s`` its time; ``pre_cursor`` the value one UI before it;
    ``post_cursors`` the values 1, 2, ... UI after it."""

    path: str
    data_rate_bps: float
    modulation: str
    ui_s: float
    amplitude: float
    time_s: np.ndarray
    volts: np.ndarray
    main_cursor: float
    main_cursor_time_s: float
    pre_cursor: float
    post_cursors: tuple[float, ...]
    rise_time_s: float
    ringing: float
    notes: tuple[str, ...]

    def to_json(self) -> dict:
        return {
            "path": self.path,
            "data_rate_bps": self.data_rate_bps,
            "modulation": self.modulation,
            "ui_s": self.ui_s,
            "time_s": self.time_s.tolist(),
            "volts": self.volts.tolist(),
            "main_cursor": self.main_cursor,
            "main_cursor_time_s": self.main_cursor_time_s,
            "pre_cursor": self.pre_cursor,
            "post_cursors": list(self.post_cursors),
        }


def _unit_interval(data_rate: float, modulation: str) -> float:
    rate = _positive("data_rate", data_rate, "b/s")
    if modulation not in MODULATIONS:
        raise LossLaneError(
            f"modulation = {modulation!r} is not known; valid modulations are "
            + ", ".join(repr(m) for m in MODULATIONS)
        )
    return MODULATIONS[modulation] / rate


def _pulse(
    tf: _Transform,
    col: int,
    path: str,
    data_rate: float,
    modulation: str,
    ui: float,
    amplitude: float,
    post: int,
    duration,
    notes: tuple[str, ...],
) -> PulseResponse:
    v_all = amplitude * tf.values[:, col]
    k = int(np.argmax(v_all if amplitude >= 0 else -v_all))
    tm = float(tf.t[k])
    if k > 0 and k < v_all.size - 1:  # parabola through the three samples at the peak
        a, b, c = v_all[k - 1], v_all[k], v_all[k + 1]
        den = a - 2 * b + c
        if den != 0:
            tm += 0.5 * tf.dt * (a - c) / den
    cursor_t = tm + ui * np.arange(-1, post + 1)
    cursors = _sample(tf.t, v_all, cursor_t)
    main = float(cursors[1])
    end = _duration(duration)
    if end is None:
        last = _settle_time(tf.t, v_all, 0.0, PULSE_SETTLE * abs(main))
        end = last + max(10 * tf.rise_time, ui)
        end = min(max(end, float(cursor_t[-1]) + ui), tm + PULSE_UIS * ui)
    stop = _stop(tf.t, end)
    extra: tuple[str, ...] = ()
    if ui < tf.rise_time:
        extra += (
            f"the unit interval {ui:.4g} s is shorter than the stimulus rise time "
            f"{tf.rise_time:.4g} s: the data do not reach high enough in frequency",
        )
    return PulseResponse(
        path,
        float(data_rate),
        modulation,
        ui,
        float(amplitude),
        tf.t[:stop],
        v_all[:stop],
        main,
        tm,
        float(cursors[0]),
        tuple(float(x) for x in cursors[2:]),
        tf.rise_time,
        tf.ringing,
        notes + extra + _window_note(v_all, 0.0, tf.period, amplitude),
    )


def through_pulse(
    f,
    transfer,
    data_rate: float,
    modulation: str = "nrz",
    path: str = "S21",
    amplitude: float = 1.0,
    post: int = 5,
    rise_time: float | None = None,
    duration: float | None = None,
    samples_per_rise: int = SAMPLES_PER_RISE,
) -> PulseResponse:
    """Pulse response of one through path ``transfer`` (N,) on ``f`` (Hz) for ``data_rate``
    (b/s) and ``modulation`` ("nrz": 1 bit per symbol, "pam4": 2), with the main cursor,
    the first pre-cursor and ``post`` post-cursors (see :class:`PulseResponse`)."""
    ui = _unit_interval(data_rate, modulation)
    h = np.asarray(transfer)
    if h.ndim != 1:
        raise LossLaneError(f"transfer: shape {h.shape} is not one value per frequency, (N,)")
    spec = uniform_spectrum(f, h[:, None])
    cols = spec.values * _rect(ui)(spec.f)[:, None]
    tf = _transform(spec, cols, rise_time, samples_per_rise, False)
    notes = (*spec.notes, _filter_note(tf.rise_time, tf.ringing))
    return _pulse(tf, 0, path, data_rate, modulation, ui, amplitude, int(post), duration, notes)


# ---------------------------------------------------------------- whole networks


@dataclass(frozen=True)
class TimeDomainReport:
    """All time-domain views of a 2-port or a differential 4-port: ``tdr`` each port's
    profile (and the differential ones), ``step`` the through paths, ``pulse`` the main
    path's pulse response (None without a data rate), ``skew_s`` the second leg's delay
    minus the first's (4-ports; None otherwise)."""

    tdr: tuple[ImpedanceProfile, ...]
    step: tuple[StepResponse, ...]
    pulse: PulseResponse | None
    skew_s: float | None
    rise_time_s: float
    ringing: float
    notes: tuple[str, ...]

    def to_json(self) -> dict:
        return {
            "tdr": [p.to_json() for p in self.tdr],
            "step": [s.to_json() for s in self.step],
            "pulse": None if self.pulse is None else self.pulse.to_json(),
            "skew_s": self.skew_s,
            "rise_time_s": self.rise_time_s,
            "ringing": self.ringing,
            "notes": list(self.notes),
        }


def _port_refs(z_ref, nports: int) -> np.ndarray:
    z = np.broadcast_to(np.asarray(z_ref, dtype=float), (nports,)).copy()
    if z.shape != (nports,) or not np.all(np.isfinite(z)) or np.any(z <= 0):
        raise LossLaneError(
            f"z_ref = {z_ref!r} ohm is not valid; give one value > 0 or one per port ({nports})"
        )
    return z


def _network_columns(s: np.ndarray, z: np.ndarray, order: str, mixed=None):
    """The reflections and through paths of a 2- or 4-port as columns, with labels
    (``mixed``: the 4-port's mixed-mode S if already known, else converted here)."""
    p = s.shape[1]
    cols, refl, thru = [], [], []
    for k in range(p):
        cols.append(s[:, k, k])
        refl.append((k + 1, "single-ended", float(z[k])))
    if p == 2:
        cols.append(s[:, 1, 0])
        thru.append("S21")
        return cols, refl, thru, None
    from losslane.network.mixedmode import mixed_mode

    if not np.allclose(z, z[0], rtol=1e-12):
        raise LossLaneError(
            f"z_ref = {z.tolist()} ohm: the differential views need one reference impedance "
            "for all four ports"
        )
    mm = mixed if mixed is not None else mixed_mode(s, float(z[0]), order)
    for k in range(2):
        cols.append(mm.dd[:, k, k])
        refl.append((k + 1, "differential", 2.0 * float(z[0])))
    cols.append(mm.dd[:, 1, 0])
    thru.append("Sdd21")
    si = from_order(s, 2, order)
    perm = port_permutation(2, order)
    number = {int(perm[i]): i + 1 for i in range(4)}  # internal index -> file port
    for leg in range(2):
        cols.append(si[:, 2 + leg, leg])
        thru.append(f"S{number[2 + leg]}{number[leg]}")
    return cols, refl, thru, (len(thru) - 2, len(thru) - 1)


def time_domain(
    f,
    s,
    z_ref: float | Sequence[float] = 50.0,
    order: str = DEFAULT_ORDER,
    rise_time: float | None = None,
    data_rate: float | None = None,
    modulation: str = "nrz",
    delay_per_m: float | None = None,
    amplitude: float = 1.0,
    duration: float | None = None,
    samples_per_rise: int = SAMPLES_PER_RISE,
    mixed=None,
) -> TimeDomainReport:
    """Every time-domain view of a 2-port or differential 4-port S (N, P, P) on ``f`` (Hz),
    ports numbered as in the data (4-ports in ``order``), from one inverse transform:

    * impedance profiles at each port against ``z_ref`` (one value or one per port), and for
      a 4-port the differential ones (Sdd11, Sdd22 against 2 z_ref);
    * step responses of the through paths: S21; for a 4-port Sdd21 and each leg, whose
      delay difference is ``skew_s``;
    * with ``data_rate`` (b/s), the pulse response of S21 (Sdd21) for ``modulation``, its
      pulse ``amplitude`` V.

    The profiles run to 1.25 round trips of the longest through delay plus 10 rise times
    (every feature of the channel and its far end lie within), or to ``duration`` (s,
    round-trip time). ``mixed``: the 4-port's ``MixedMode`` (pair 1 = the near ends,
    differential reference 2 z_ref) when the caller has it already.
    """
    check_order(order)
    s = np.asarray(s)
    if s.ndim != 3 or s.shape[1] != s.shape[2] or s.shape[1] not in (2, 4):
        raise LossLaneError(
            f"S-parameters: shape {s.shape} is not a 2-port or 4-port (frequencies, P, P)"
        )
    z = _port_refs(z_ref, s.shape[1])
    dpm = None if delay_per_m is None else _positive("delay_per_m", delay_per_m, "s/m")
    ui = None if data_rate is None else _unit_interval(data_rate, modulation)
    cols, refl, thru, legs = _network_columns(np.asarray(s, complex), z, order, mixed)
    n_refl = len(refl)
    spec = uniform_spectrum(f, np.stack(cols, axis=1), "frequencies")
    values = spec.values
    if ui is not None:
        main = values[:, n_refl]
        values = np.concatenate([values, (main * _rect(ui)(spec.f))[:, None]], axis=1)
    is_step = np.ones(values.shape[1], bool)
    if ui is not None:
        is_step[-1] = False
    tf = _transform(spec, values, rise_time, samples_per_rise, is_step)
    notes = (*spec.notes, _filter_note(tf.rise_time, tf.ringing))
    steps = tuple(
        _step(tf, n_refl + i, float(values[0, n_refl + i].real), name, None, notes)
        for i, name in enumerate(thru)
    )
    delays = [st.delay_s for st in steps if st.delay_s is not None]
    span = duration
    if span is None and delays:
        span = 2.0 * ROUND_TRIPS * max(max(delays), 0.0) + 10 * tf.rise_time
    tdr = tuple(
        _profile(tf, i, zr, port, mode, dpm, span, notes) for i, (port, mode, zr) in enumerate(refl)
    )
    skew = None
    if legs is not None:
        a, b = steps[legs[0]].delay_s, steps[legs[1]].delay_s
        skew = None if a is None or b is None else b - a
    pulse = None
    if ui is not None:
        pulse = _pulse(
            tf, values.shape[1] - 1, thru[0], data_rate, modulation, ui, amplitude, 5, None, notes
        )
    return TimeDomainReport(tdr, steps, pulse, skew, tf.rise_time, tf.ringing, notes)

"""The propagation constant of a line from coupons of two or more lengths, with the
launches removed: the two-line / multiline eigenvalue method.

Method
------
Coupon k is a launch X, a line of length l_k and a launch Y, the same X and Y on every
coupon (they may differ from each other: the two ends need not be alike). With chain
(ABCD) matrices M_k = X T(l_k) Y, so for two coupons

    P = M_B M_A^-1 = X T(l_B - l_A) X^-1,

a similarity transform of the chain matrix of a line of length dL = l_B - l_A, whose
eigenvalues are exp(-gamma dL) and exp(+gamma dL) whatever the line's impedance, the
launches or the reference impedance (R. B. Marks, "A multiline method of network analyzer
calibration", IEEE Trans. MTT 39(7), 1991; the same difference-of-lengths idea underlies
the Delta-L practice of PCB loss testing, IPC-TM-650 2.5.5.14; both from memory). The
eigenvalues enter through z = tr(P) / (2 sqrt(det P)) = cosh(gamma dL), which needs no
choice of which eigenvalue is which (det P = 1 for reciprocal data; the square root
normalises measured data that are not quite reciprocal).

Branch: gamma dL is one of +-arccosh(z) + 2 pi j k. Two resolutions are made:

* *continuation* along frequency from the low end (each point's candidate nearest the
  linear extrapolation of the two before it), anchored so that the phase extrapolates to
  0 at f = 0 (beta(0) = 0) with a positive slope; it needs a frequency step that turns
  beta dL by less than pi;
* *prediction*, point by point, from a smooth model: the candidate nearest to
  (dL / dL_ref) times the estimate of the pair with the shortest length difference
  (fewest phase turns), whose own phase is predicted by a robust fit of its delay per
  metre as a quadratic in log f.

The pair with the shortest difference uses its continuation, every other pair the
prediction (the multiline way: the short pair resolves the long pairs' turns). Where the
two resolutions disagree for any pair, or the combined loss comes out negative (the
passive-sign choice of eigenvalue disagrees), the point is flagged ``branch``.

Several lengths: every pair (i, j) gives an estimate gamma_ij. Their first-order errors
are propagated from an assumed measurement noise (relative ``noise_relative`` plus a
floor ``noise_floor`` on every S-parameter, circular complex) by differentiating z with
respect to each S-parameter of each file (central differences) and
d gamma = dz / (dL sinh(gamma dL)); the covariance of all pairs at one frequency (pairs
that share a coupon are correlated) gives the best linear unbiased (Gauss-Markov)
combination, as in Marks' multiline method. Short differences are weak at low frequency
(sinh(gamma dL) -> 0), long ones where their transmission drowns in the floor, and near
every half-wave turn of a nearly lossless pair (sinh -> 0 again); the weights follow. The
same propagation gives each point's standard uncertainty; a point whose loss or eps_eff
uncertainty exceeds its limit is flagged ``ill-conditioned``. The usable band is the
longest run of unflagged points. The noise model only sets weights, uncertainties and
flags; it never changes a two-line result.

Outputs: alpha (Np/m), beta (rad/m), loss (dB per inch and per metre), eps_eff = the real
part of -(gamma c0 / omega)^2 (exactly Dk(f) for a TEM line with perfect conductors: its
imaginary part is then eps''), phase delay beta / omega per inch.

4-port coupons of a pair are converted to mixed-mode S (D. E. Bockelman,
W. R. Eisenstadt, IEEE Trans. MTT 43(7), 1995) and the differential (or common) 2-port is
treated as above. This assumes the launches convert little between the modes (symmetric
legs); each file's mode conversion is reported. f = 0 carries no phase and is dropped.

Input files must share one frequency grid exactly: resampling is refused rather than done,
because interpolating the S21 of a long line in real/imaginary parts between points that
differ by a sizeable phase turn lowers its magnitude (a bias in the loss). Measurements are
checked (passivity: largest singular value of S; reciprocity: largest |S - S^T|; mode
conversion) and reported, with a warning when a check fails, never repaired or refused.
"""

from __future__ import annotations

import math
import os
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from losslane.errors import LossLaneError, warn
from losslane.network.ports import DEFAULT_ORDER, check_order
from losslane.units import INCH
from losslane.xsection.rlgc import C0, NP_TO_DB

__all__ = [
    "MODES",
    "CouponCheck",
    "LineExtraction",
    "extract_line",
    "propagation_constant_pair",
]

MODES = ("single-ended", "differential", "common")
OK = "ok"
ILL = "ill-conditioned"
BRANCH = "branch"

NOISE_RELATIVE = 1e-3
"""Default relative noise of a measured S-parameter: connector repeatability of about
0.01 dB (common practice for coupon measurements; from memory)."""
NOISE_FLOOR = 1e-5
"""Default absolute noise floor of a measured S-parameter (-100 dB; common practice)."""
MAX_LOSS_UNCERTAINTY = 0.05
"""Default limit of the loss's relative standard uncertainty for an unflagged point."""
MAX_EPS_UNCERTAINTY = 0.005
"""Default limit of eps_eff's relative standard uncertainty for an unflagged point."""

PASSIVITY_LIMIT = 1.0 + 1e-6
RECIPROCITY_LIMIT = 1e-3
MODE_CONVERSION_LIMIT_DB = -20.0
_ANCHOR_POINTS = 10
_STEP = 1e-5


# ---------------------------------------------------------------- inputs


@dataclass(frozen=True, eq=False)
class _Coupon:
    name: str
    f: np.ndarray
    s: np.ndarray  # (N, P, P) single-ended, file port order
    z0: np.ndarray  # (N, P) real


@dataclass(frozen=True)
class CouponCheck:
    """Checks of one measured file (reported, never repaired).

    ``passivity``: the largest singular value of S over frequency (> 1: not passive;
    IEEE Std 370-2020 passivity criterion) and where; ``reciprocity``: the largest
    |S_ij - S_ji|; ``mode_conversion_db``: for 4-ports, the largest mixed-mode conversion
    term |Scd|, |Sdc| in dB (None for 2-ports).
    """

    name: str
    ports: int
    passivity: float
    passivity_at_hz: float
    reciprocity: float
    mode_conversion_db: float | None

    def to_json(self) -> dict:
        return {
            "name": self.name,
            "ports": self.ports,
            "max_singular_value": self.passivity,
            "max_singular_value_at_hz": self.passivity_at_hz,
            "passive": self.passivity <= PASSIVITY_LIMIT,
            "reciprocity_error": self.reciprocity,
            "mode_conversion_db": _finite_or_none(self.mode_conversion_db),
        }


def _read(item, index: int, z_ref) -> _Coupon:
    """One coupon from a path, an object with f, s, z0 (skrf.Network) or (f, s[, z0])."""
    if isinstance(item, str | os.PathLike):
        from losslane.network.touchstone import read_touchstone

        net = read_touchstone(item)
        name = Path(item).name
        f, s, z0 = np.asarray(net.f), np.asarray(net.s), np.asarray(net.z0)
    elif hasattr(item, "s") and hasattr(item, "f"):
        name = str(getattr(item, "name", None) or f"coupon {index + 1}")
        f, s = np.asarray(item.f), np.asarray(item.s)
        z0 = np.asarray(getattr(item, "z0", z_ref))
    elif isinstance(item, tuple | list) and len(item) in (2, 3):
        name = f"coupon {index + 1}"
        f, s = np.asarray(item[0]), np.asarray(item[1])
        z0 = np.asarray(item[2] if len(item) == 3 else z_ref)
    else:
        raise LossLaneError(
            f"coupons[{index}] = {type(item).__name__}: give a Touchstone path, a network "
            "(f, s, z0) or a tuple (f, S[, z_ref])"
        )
    f = np.asarray(f, float)
    s = np.asarray(s, complex)
    if f.ndim != 1 or s.ndim != 3 or s.shape[0] != f.size or s.shape[1] != s.shape[2]:
        raise LossLaneError(
            f"coupon {name!r}: S of shape {s.shape} does not fit {f.size} frequencies; "
            "expected (N, P, P)"
        )
    if not (np.all(np.isfinite(f)) and np.all(np.isfinite(s))):
        raise LossLaneError(f"coupon {name!r}: frequencies and S must be finite numbers")
    if f.size > 1 and np.any(np.diff(f) <= 0):
        raise LossLaneError(f"coupon {name!r}: frequencies must increase strictly")
    if np.iscomplexobj(z0) and np.any(np.asarray(z0).imag != 0):
        raise LossLaneError(f"coupon {name!r}: complex reference impedances are not supported")
    z0 = np.broadcast_to(np.asarray(z0).real.astype(float), (f.size, s.shape[1])).copy()
    if not np.all(np.isfinite(z0)) or np.any(z0 <= 0):
        raise LossLaneError(f"coupon {name!r}: reference impedances must be finite and > 0")
    return _Coupon(name, f, s, z0)


def _check_set(coupons: list[_Coupon], lengths: np.ndarray) -> None:
    if len(coupons) < 2:
        raise LossLaneError(
            f"coupons: {len(coupons)} given; the method needs at least 2 of different lengths"
        )
    if lengths.size != len(coupons):
        raise LossLaneError(
            f"lengths: {lengths.size} given for {len(coupons)} coupons; give one length each"
        )
    for c, ln in zip(coupons, lengths, strict=True):
        if not np.isfinite(ln) or ln < 0:
            raise LossLaneError(f"lengths: {ln!r} m for {c.name!r} is not a length >= 0")
    first = coupons[0]
    for c in coupons[1:]:
        if c.s.shape[1] != first.s.shape[1]:
            raise LossLaneError(
                f"coupon {c.name!r} has {c.s.shape[1]} ports but {first.name!r} has "
                f"{first.s.shape[1]}; all coupons must have the same port count"
            )
        same = c.f.shape == first.f.shape and np.allclose(c.f, first.f, rtol=1e-9, atol=0)
        if not same:
            detail = f"{c.f.size} points {c.f[0]:g}..{c.f[-1]:g} Hz against {first.f.size} "
            detail += f"points {first.f[0]:g}..{first.f[-1]:g} Hz"
            if c.f.shape == first.f.shape:
                k = int(np.flatnonzero(~np.isclose(c.f, first.f, rtol=1e-9, atol=0))[0])
                detail = f"point {k + 1} is {c.f[k]:g} Hz against {first.f[k]:g} Hz"
            raise LossLaneError(
                f"coupon {c.name!r}: its frequency grid differs from {first.name!r} "
                f"({detail}); measure every coupon on the same grid (resampling S21 of long "
                "lines biases the loss, so it is not done)"
            )
    if first.s.shape[1] not in (2, 4):
        raise LossLaneError(
            f"coupon {first.name!r} has {first.s.shape[1]} ports; 2 (a single line) or 4 "
            "(a pair) are supported"
        )
    order = np.argsort(lengths)
    ls = lengths[order]
    gaps = np.diff(ls)
    tol = 1e-6 * max(float(ls[-1]), 1e-3)
    if np.any(gaps <= tol):
        k = int(np.flatnonzero(gaps <= tol)[0])
        a, b = coupons[order[k]].name, coupons[order[k + 1]].name
        raise LossLaneError(
            f"lengths: {a!r} and {b!r} both have length {ls[k]:g} m; the lengths must differ"
        )


def _checks(c: _Coupon, order: str) -> CouponCheck:
    sv = np.linalg.svd(c.s, compute_uv=False)[:, 0]
    k = int(np.argmax(sv))
    recip = float(np.max(np.abs(c.s - np.swapaxes(c.s, 1, 2))))
    conv = None
    if c.s.shape[1] == 4:
        from losslane.network.mixedmode import mixed_mode

        mm = mixed_mode(c.s, float(c.z0[0, 0]), order)
        peak = max(float(np.max(np.abs(mm.cd))), float(np.max(np.abs(mm.dc))))
        conv = 20 * math.log10(peak) if peak > 0 else -math.inf
    check = CouponCheck(c.name, c.s.shape[1], float(sv[k]), float(c.f[k]), recip, conv)
    if check.passivity > PASSIVITY_LIMIT:
        warn(
            f"coupon {c.name!r} is not passive: the largest singular value of S is "
            f"{check.passivity:.6g} at {check.passivity_at_hz:g} Hz (IEEE 370 passivity)"
        )
    if recip > RECIPROCITY_LIMIT:
        warn(f"coupon {c.name!r} is not reciprocal: max |S_ij - S_ji| = {recip:.3g}")
    if conv is not None and conv > MODE_CONVERSION_LIMIT_DB:
        warn(
            f"coupon {c.name!r}: mode conversion reaches {conv:.1f} dB; the mixed-mode "
            "extraction assumes launches that convert little between the modes"
        )
    return check


def _modal(c: _Coupon, mode: str, order: str) -> tuple[np.ndarray, np.ndarray]:
    """The 2-port S (N, 2, 2) and its references (N, 2) of the requested mode."""
    if c.s.shape[1] == 2:
        return c.s, c.z0
    from losslane.network.mixedmode import mixed_mode

    z = c.z0
    if np.any(z != z[0, 0]):
        raise LossLaneError(
            f"coupon {c.name!r}: mixed-mode conversion needs the same real reference at every "
            f"port; the file has {np.unique(z).tolist()} ohm"
        )
    mm = mixed_mode(c.s, float(z[0, 0]), order)
    if mode == "differential":
        return mm.dd, np.full((c.f.size, 2), mm.z_diff)
    return mm.cc, np.full((c.f.size, 2), mm.z_common)


# ---------------------------------------------------------------- core


def _chain(s: np.ndarray, z) -> np.ndarray:
    """Chain (ABCD) matrix (N, 2, 2) of a 2-port's S on real references z (N, 2):
    A = ((1 + S11)(1 - S22) + S12 S21) sqrt(z1/z2) / (2 S21), and B, C, D likewise
    (D. M. Pozar, *Microwave Engineering*, the S -> ABCD table, with unequal real
    references as in D. A. Frickey, IEEE Trans. MTT 42(2), 1994). A coupon's S21 is never
    exactly 0 (it is measured through a line), so the division is safe."""
    s11, s12, s21, s22 = s[:, 0, 0], s[:, 0, 1], s[:, 1, 0], s[:, 1, 1]
    z = np.broadcast_to(np.asarray(z, float), (s.shape[0], 2))
    r1, r2 = np.sqrt(z[:, 0]), np.sqrt(z[:, 1])
    if np.any(s21 == 0):
        raise LossLaneError("a coupon's S21 is exactly 0 at some frequency; it cannot be used")
    t = s12 * s21
    h = 0.5 / s21
    m = np.empty(s.shape, dtype=complex)
    m[:, 0, 0] = ((1 + s11) * (1 - s22) + t) * h * r1 / r2
    m[:, 0, 1] = ((1 + s11) * (1 + s22) - t) * h * r1 * r2
    m[:, 1, 0] = ((1 - s11) * (1 - s22) - t) * h / (r1 * r2)
    m[:, 1, 1] = ((1 - s11) * (1 + s22) + t) * h * r2 / r1
    return m


def _cosh_of_pair(ma: np.ndarray, mb: np.ndarray) -> np.ndarray:
    """z = tr(P) / (2 sqrt(det P)) with P = M_B M_A^-1 = M_B adj(M_A) / det(M_A).

    det P = det M_B / det M_A is ~1 (exactly 1 for reciprocal data), so its principal
    square root has the right sign."""
    a, b, c, d = ma[:, 0, 0], ma[:, 0, 1], ma[:, 1, 0], ma[:, 1, 1]
    det_a = a * d - b * c
    tr = mb[:, 0, 0] * d - mb[:, 0, 1] * c - mb[:, 1, 0] * b + mb[:, 1, 1] * a
    det_b = mb[:, 0, 0] * mb[:, 1, 1] - mb[:, 0, 1] * mb[:, 1, 0]
    return (tr / det_a) / (2.0 * np.sqrt(det_b / det_a))


def propagation_constant_pair(
    f: np.ndarray, s_a: np.ndarray, s_b: np.ndarray, delta_length: float, z_ref=50.0
) -> np.ndarray:
    """gamma (1/m, complex, (N,)) from two 2-port measurements (N, 2, 2) of the same line
    whose lengths differ by ``delta_length`` (B longer), with the branch resolved by
    continuation from the low end (f > 0 only). The plain two-line method, for checks;
    :func:`extract_line` adds the uncertainty, flags and the multiline combination."""
    f = np.asarray(f, float)
    ma = _chain(np.asarray(s_a, complex), z_ref)
    mb = _chain(np.asarray(s_b, complex), z_ref)
    w = np.arccosh(_cosh_of_pair(ma, mb))
    return _anchor(_continuation(w, f), f) / delta_length


def _continuation(w: np.ndarray, f: np.ndarray) -> np.ndarray:
    """Path-following branch of +-w + 2 pi j k along frequency (see the module docstring).

    A plain loop over frequency: the choice at each point depends on the previous ones.
    """
    two_pi = 2.0 * math.pi
    out: list[complex] = []
    fl = f.tolist()
    for n, wn in enumerate(w.tolist()):
        if n == 0:
            out.append(wn if wn.imag >= 0 else -wn)
            continue
        if n == 1:
            pred = out[0]
        else:
            x1, x2 = out[-1], out[-2]
            pred = x1 + (x1 - x2) * (fl[n] - fl[n - 1]) / (fl[n - 1] - fl[n - 2])
        best, best_d = 0j, math.inf
        for c in (wn, -wn):
            k = round((pred.imag - c.imag) / two_pi)
            cand = c + 1j * two_pi * k
            d = abs(cand - pred)
            if d < best_d:
                best, best_d = cand, d
        out.append(best)
    x = np.array(out, dtype=complex)
    if x.size >= 3:
        # the first point had no history: choose it again from the two after it
        back = x[1] - (x[2] - x[1]) * (fl[1] - fl[0]) / (fl[2] - fl[1])
        x[0] = _nearest(w[:1], np.array([back]))[0]
    return x


def _anchor(x: np.ndarray, f: np.ndarray) -> np.ndarray:
    """Shift/negate a continued branch so that its phase rises from 0 at f = 0."""
    m = min(f.size, _ANCHOR_POINTS)
    if m < 2:
        return x if x[0].imag >= 0 else -x
    design = np.column_stack([np.ones(m), f[:m]])
    c0, c1 = np.linalg.lstsq(design, x[:m].imag, rcond=None)[0]
    if c1 < 0:
        x = -x
        c0 = -c0
    return x - 2j * np.pi * np.round(c0 / (2 * np.pi))


def _nearest(w: np.ndarray, pred: np.ndarray) -> np.ndarray:
    """Per point, the candidate +-w + 2 pi j k nearest to ``pred``."""
    best = None
    for c in (w, -w):
        k = np.round((pred.imag - c.imag) / (2 * np.pi))
        cand = c + 2j * np.pi * k
        if best is None:
            best = cand
        else:
            best = np.where(np.abs(cand - pred) < np.abs(best - pred), cand, best)
    return best


def _differ(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    return np.abs(a - b) > 1e-6 * (1 + np.abs(a))


def _smooth_phase(theta: np.ndarray, f: np.ndarray, dl: float) -> np.ndarray:
    """Robust fit of theta = dL omega (a + b u + c u^2), u = ln(f / f_mid) (Huber IRLS)."""
    omega = 2 * np.pi * f
    u = np.log(f / np.sqrt(f[0] * f[-1]))
    deg = min(2, f.size - 1)
    basis = np.column_stack([u**k for k in range(deg + 1)]) * (dl * omega)[:, None]
    weights = np.ones(f.size)
    coef = np.zeros(deg + 1)
    for _ in range(12):
        sw = np.sqrt(weights)
        coef = np.linalg.lstsq(basis * sw[:, None], theta * sw, rcond=None)[0]
        r = theta - basis @ coef
        scale = 1.4826 * np.median(np.abs(r - np.median(r)))
        if not scale > 0:
            break
        a = np.abs(r) / (1.5 * scale)
        weights = np.where(a > 1, 1.0 / np.maximum(a, 1e-300), 1.0)
    return basis @ coef


# ---------------------------------------------------------------- result


@dataclass(frozen=True, eq=False)
class LineExtraction:
    """The line extracted from coupons: ``gamma`` (1/m, complex) over ``f`` (Hz, > 0),
    standard uncertainties ``u_alpha`` (Np/m) and ``u_beta`` (rad/m) under the noise model,
    a ``quality`` word per point ("ok", "ill-conditioned", "branch" or both joined by
    "+"), the ``usable_band_hz`` (longest run of "ok" points; None if there is none), the
    requested ``at_hz`` frequencies, the ``mode`` ("single-ended", "differential",
    "common"), the coupons' ``sources``, ``lengths_m`` and ``checks``, and the per-pair
    estimates (``pair_lengths_m`` (P,) length differences, ``pair_gamma`` (P, N))."""

    f: np.ndarray
    gamma: np.ndarray
    u_alpha: np.ndarray
    u_beta: np.ndarray
    quality: tuple[str, ...]
    usable_band_hz: tuple[float, float] | None
    at_hz: tuple[float, ...]
    mode: str
    sources: tuple[str, ...]
    lengths_m: tuple[float, ...]
    checks: tuple[CouponCheck, ...]
    pair_lengths_m: np.ndarray
    pair_gamma: np.ndarray
    noise: tuple[float, float]
    dropped_dc: bool = False

    @property
    def alpha(self) -> np.ndarray:
        """Attenuation, Np/m."""
        return self.gamma.real

    @property
    def beta(self) -> np.ndarray:
        """Phase constant, rad/m."""
        return self.gamma.imag

    @property
    def loss_db_per_m(self) -> np.ndarray:
        return NP_TO_DB * self.alpha

    @property
    def loss_db_per_in(self) -> np.ndarray:
        return NP_TO_DB * INCH * self.alpha

    @property
    def eps_eff_complex(self) -> np.ndarray:
        """-(gamma c0 / omega)^2 = eps_eff' - j eps_eff''."""
        return -((self.gamma * C0 / (2 * np.pi * self.f)) ** 2)

    @property
    def eps_eff(self) -> np.ndarray:
        """Real part of -(gamma c0 / omega)^2."""
        return self.eps_eff_complex.real

    @property
    def delay_ps_per_in(self) -> np.ndarray:
        """Phase delay beta / omega per inch, ps."""
        return self.beta / (2 * np.pi * self.f) * INCH * 1e12

    @property
    def u_loss_db_per_in(self) -> np.ndarray:
        return NP_TO_DB * INCH * self.u_alpha

    @property
    def u_eps_eff(self) -> np.ndarray:
        """Standard uncertainty of eps_eff: |d eps / d gamma| u (circular errors)."""
        k = 2 * np.abs(self.gamma) * (C0 / (2 * np.pi * self.f)) ** 2
        return k * self.u_alpha

    @property
    def ok(self) -> np.ndarray:
        """Mask of the unflagged points."""
        return np.array([q == OK for q in self.quality], dtype=bool)

    def at(self, frequencies) -> dict:
        """Loss, eps_eff and delay at ``frequencies`` (Hz, inside the curves' range),
        linearly interpolated; and the quality of the nearest point."""
        fq = np.atleast_1d(np.asarray(frequencies, float))
        lo, hi = float(self.f[0]), float(self.f[-1])
        bad = (fq < lo * (1 - 1e-12)) | (fq > hi * (1 + 1e-12)) | ~np.isfinite(fq)
        if np.any(bad):
            raise LossLaneError(
                f"at = {float(fq[bad][0]):g} Hz is outside the extracted curves "
                f"({lo:g}..{hi:g} Hz); choose frequencies inside the measured band"
            )
        near = np.clip(np.searchsorted(self.f, fq), 0, self.f.size - 1)
        left = np.clip(near - 1, 0, self.f.size - 1)
        near = np.where(np.abs(self.f[left] - fq) < np.abs(self.f[near] - fq), left, near)
        return {
            "frequencies_hz": fq.tolist(),
            "loss_db_per_in": np.interp(fq, self.f, self.loss_db_per_in).tolist(),
            "loss_db_per_m": np.interp(fq, self.f, self.loss_db_per_m).tolist(),
            "eps_eff": np.interp(fq, self.f, self.eps_eff).tolist(),
            "delay_ps_per_in": np.interp(fq, self.f, self.delay_ps_per_in).tolist(),
            "quality": [self.quality[k] for k in near],
        }

    def to_json(self) -> dict:
        """The contract's keys: the values at ``at_hz`` (lists), ``curves`` over every
        frequency, ``mode``; plus the band, the coupons and their checks."""
        out = self.at(self.at_hz) if self.at_hz else self.at(np.empty(0))
        out["curves"] = {
            "frequencies_hz": self.f.tolist(),
            "loss_db_per_in": _list(self.loss_db_per_in),
            "loss_db_per_m": _list(self.loss_db_per_m),
            "eps_eff": _list(self.eps_eff),
            "delay_ps_per_in": _list(self.delay_ps_per_in),
            "loss_uncertainty_db_per_in": _list(self.u_loss_db_per_in),
            "eps_eff_uncertainty": _list(self.u_eps_eff),
            "quality": list(self.quality),
        }
        out["mode"] = self.mode
        out["usable_band_hz"] = list(self.usable_band_hz) if self.usable_band_hz else None
        out["coupons"] = [
            {"name": n, "length_m": ln} for n, ln in zip(self.sources, self.lengths_m, strict=True)
        ]
        out["checks"] = [c.to_json() for c in self.checks]
        out["noise_model"] = {"relative": self.noise[0], "floor": self.noise[1]}
        out["dropped_dc"] = self.dropped_dc
        return out

    def curves_csv(self) -> str:
        """The curves as CSV text (one row per frequency)."""
        head = (
            "frequency_hz,loss_db_per_in,loss_db_per_m,eps_eff,delay_ps_per_in,"
            "loss_uncertainty_db_per_in,eps_eff_uncertainty,quality"
        )
        cols = (
            self.f,
            self.loss_db_per_in,
            self.loss_db_per_m,
            self.eps_eff,
            self.delay_ps_per_in,
            self.u_loss_db_per_in,
            self.u_eps_eff,
        )
        rows = [head]
        for k in range(self.f.size):
            rows.append(",".join(f"{float(c[k])!r}" for c in cols) + f",{self.quality[k]}")
        return "\n".join(rows) + "\n"


def _finite_or_none(v):
    return float(v) if v is not None and np.isfinite(v) else None


def _list(a: np.ndarray) -> list:
    return [float(v) if np.isfinite(v) else None for v in np.asarray(a, float)]


# ---------------------------------------------------------------- main entry


def extract_line(
    coupons: Sequence,
    lengths: Sequence[float],
    *,
    mode: str | None = None,
    order: str = DEFAULT_ORDER,
    z_ref: float = 50.0,
    at: Sequence[float] = (),
    noise_relative: float = NOISE_RELATIVE,
    noise_floor: float = NOISE_FLOOR,
    max_loss_uncertainty: float = MAX_LOSS_UNCERTAINTY,
    max_eps_uncertainty: float = MAX_EPS_UNCERTAINTY,
) -> LineExtraction:
    """The propagation constant of the line common to ``coupons`` (see module docstring).

    ``coupons``: Touchstone paths (read with ``read_touchstone``), networks (objects with
    ``f``, ``s``, ``z0``, e.g. ``skrf.Network``) or tuples ``(f, S[, z_ref])`` with S
    (N, P, P) in file port order; ``lengths`` (m) one per coupon, all different (0 is a
    thru). ``mode``: "single-ended" (2-ports; the default for them), "differential" (the
    default for 4-ports) or "common"; ``order`` the 4-port numbering ("in-in-out-out" or
    "in-out-in-out"); ``z_ref`` the reference of array input without one. ``at``:
    frequencies (Hz) for the headline values. The noise model and the two limits set the
    weights, uncertainties and quality flags.
    """
    check_order(order, "order")
    for key, value in (
        ("noise_relative", noise_relative),
        ("noise_floor", noise_floor),
        ("max_loss_uncertainty", max_loss_uncertainty),
        ("max_eps_uncertainty", max_eps_uncertainty),
    ):
        if not np.isfinite(value) or value < 0:
            raise LossLaneError(f"{key} = {value!r} must be a number >= 0")
    if noise_relative == 0 and noise_floor == 0:
        raise LossLaneError("noise_relative and noise_floor are both 0; give at least one > 0")
    items = [_read(c, k, z_ref) for k, c in enumerate(coupons)]
    lens = np.asarray(lengths, float).ravel()
    _check_set(items, lens)
    ports = items[0].s.shape[1]
    if mode is None:
        mode = "single-ended" if ports == 2 else "differential"
    if mode not in MODES:
        raise LossLaneError(f"mode = {mode!r} is not valid; valid modes: {', '.join(MODES)}")
    if (ports == 2) != (mode == "single-ended"):
        valid = "'single-ended'" if ports == 2 else "'differential' or 'common'"
        raise LossLaneError(f"mode = {mode!r} does not fit {ports}-port coupons; use {valid}")
    checks = tuple(_checks(c, order) for c in items)

    f_all = items[0].f
    keep = f_all > 0
    if keep.sum() < 2:
        raise LossLaneError(
            f"coupons: {int(keep.sum())} frequency point(s) above 0 Hz; at least 2 are needed"
        )
    f = f_all[keep]
    modal = [_modal(c, mode, order) for c in items]
    s_list = [m[0][keep] for m in modal]
    z_list = [m[1][keep] for m in modal]
    for c, s in zip(items, s_list, strict=True):
        zero = np.flatnonzero(s[:, 1, 0] == 0)
        if zero.size:
            hint = f" (are its ports numbered {order!r}?)" if ports == 4 else ""
            raise LossLaneError(
                f"coupon {c.name!r}: its {mode} transmission is exactly 0 at {f[zero[0]]:g} Hz"
                f"{hint}; a coupon is measured through its line, so it cannot be used"
            )

    result = _solve(f, s_list, z_list, lens, noise_relative, noise_floor)
    gamma, var, pair_dl, pair_gamma, branch_bad = result
    u = np.sqrt(np.maximum(var, 0.0) / 2.0)
    alpha = gamma.real
    eps = (-((gamma * C0 / (2 * np.pi * f)) ** 2)).real
    u_eps = 2 * np.abs(gamma) * (C0 / (2 * np.pi * f)) ** 2 * u
    ill = (u > max_loss_uncertainty * np.abs(alpha)) | (u_eps > max_eps_uncertainty * np.abs(eps))
    ill |= ~np.isfinite(u)
    branch_bad = branch_bad | (alpha < 0)
    quality = tuple(
        "+".join([w for w, b in ((ILL, i), (BRANCH, br)) if b]) or OK
        for i, br in zip(ill.tolist(), branch_bad.tolist(), strict=True)
    )
    band = _longest_run(f, ~ill & ~branch_bad)
    if band is None:
        warn(
            "extraction: no frequency point meets the uncertainty limits; the curves are "
            "returned but none is flagged usable"
        )
    at_hz = tuple(float(x) for x in np.atleast_1d(np.asarray(at, float)))
    ext = LineExtraction(
        f=f,
        gamma=gamma,
        u_alpha=u,
        u_beta=u,
        quality=quality,
        usable_band_hz=band,
        at_hz=at_hz,
        mode=mode,
        sources=tuple(c.name for c in items),
        lengths_m=tuple(float(x) for x in lens),
        checks=checks,
        pair_lengths_m=pair_dl,
        pair_gamma=pair_gamma,
        noise=(float(noise_relative), float(noise_floor)),
        dropped_dc=bool(np.any(~keep)),
    )
    if at_hz:
        ext.at(at_hz)  # raises for frequencies outside the curves
    return ext


def _longest_run(f: np.ndarray, good: np.ndarray) -> tuple[float, float] | None:
    if not np.any(good):
        return None
    padded = np.concatenate([[False], good, [False]])
    edges = np.flatnonzero(np.diff(padded.astype(int)))
    starts, stops = edges[::2], edges[1::2]
    k = int(np.argmax(stops - starts))
    return float(f[starts[k]]), float(f[stops[k] - 1])


def _solve(f, s_list, z_list, lens, noise_rel, noise_floor):
    """Pair estimates, their branches, covariance and the Gauss-Markov combination."""
    n_files = len(s_list)
    chains = [_chain(s, z) for s, z in zip(s_list, z_list, strict=True)]
    pairs = [
        (i, j) if lens[j] > lens[i] else (j, i)
        for i in range(n_files)
        for j in range(i + 1, n_files)
    ]
    dl = np.array([lens[j] - lens[i] for i, j in pairs])
    z = np.array([_cosh_of_pair(chains[i], chains[j]) for i, j in pairs])  # (P, N)
    w = np.arccosh(z)

    # branch resolution: continuation per pair; prediction from the shortest pair
    cont = np.array([_anchor(_continuation(w[p], f), f) for p in range(len(pairs))])
    r = int(np.argmin(dl))
    smooth = _smooth_phase(cont[r].imag, f, dl[r])
    ref_pred = cont[r].real + 1j * smooth
    chosen = np.empty_like(cont)
    branch_bad = np.zeros(f.size, dtype=bool)
    for p in range(len(pairs)):
        if p == r:
            chosen[p] = cont[p]
            branch_bad |= _differ(chosen[p], _nearest(w[p], ref_pred))
            continue
        pred = cont[r] * (dl[p] / dl[r])
        chosen[p] = _nearest(w[p], pred)
        # the prediction is ambiguous where it falls far from every candidate's phase
        branch_bad |= np.abs((chosen[p] - pred).imag) > np.pi / 2
        # the pair's own continuation counts where its phase steps have stayed small
        steps = np.abs(np.diff(chosen[p].imag, prepend=0.0))
        trusted = np.cumsum(steps > np.pi / 2) == 0
        branch_bad |= trusted & _differ(chosen[p], cont[p])
    pair_gamma = chosen / dl[:, None]

    # first-order error propagation: d gamma_p = dz_p / (dL_p sinh(x_p))
    sinh = np.sinh(chosen) * dl[:, None]  # (P, N)
    sens = []  # columns of G (P, N) and the sources' variances (N,)
    for k in range(n_files):
        s = s_list[k]
        for a in range(2):
            for b in range(2):
                mag = np.abs(s[:, a, b])
                h = _STEP * mag + 1e-12
                sp, sm = s.copy(), s.copy()
                sp[:, a, b] += h
                sm[:, a, b] -= h
                cp, cm = _chain(sp, z_list[k]), _chain(sm, z_list[k])
                col = np.zeros((len(pairs), f.size), dtype=complex)
                for p, (i, j) in enumerate(pairs):
                    if k == i:
                        dz = _cosh_of_pair(cp, chains[j]) - _cosh_of_pair(cm, chains[j])
                    elif k == j:
                        dz = _cosh_of_pair(chains[i], cp) - _cosh_of_pair(chains[i], cm)
                    else:
                        continue
                    col[p] = dz / (2 * h) / sinh[p]
                sigma2 = (noise_rel * mag) ** 2 + noise_floor**2
                sens.append(col * np.sqrt(sigma2))
    g = np.moveaxis(np.array(sens), [0, 1, 2], [2, 1, 0])  # (N, P, K)
    cov = np.matmul(g, np.conj(np.swapaxes(g, 1, 2)))  # (N, P, P) complex Hermitian
    npairs = len(pairs)
    if npairs == 1:
        return pair_gamma[0], cov[:, 0, 0].real, dl, pair_gamma, branch_bad
    scale = np.trace(cov, axis1=1, axis2=2).real / npairs
    cov = cov + (1e-12 * scale)[:, None, None] * np.eye(npairs)
    ones = np.ones((f.size, npairs, 1), dtype=complex)
    with np.errstate(invalid="ignore", over="ignore"):
        cinv_one = np.linalg.solve(cov, ones)[:, :, 0]  # (N, P)
        denom = np.sum(cinv_one, axis=1).real  # 1^H C^-1 1 (real for Hermitian C)
        weights = np.conj(cinv_one) / denom[:, None]
        gamma = np.sum(weights * pair_gamma.T, axis=1)
        var = 1.0 / denom
    bad = ~(np.isfinite(gamma) & np.isfinite(var) & (var > 0))
    if np.any(bad):  # a singular covariance: the best single pair there
        diag = np.real(np.diagonal(cov, axis1=1, axis2=2))  # (N, P)
        best = np.argmin(np.where(np.isfinite(diag), diag, np.inf), axis=1)
        idx = np.arange(f.size)
        gamma = np.where(bad, pair_gamma[best, idx], gamma)
        var = np.where(bad, diag[idx, best], var)
    return gamma, var, dl, pair_gamma, branch_bad

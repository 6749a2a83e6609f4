"""Integrated crosstalk noise (ICN) and the insertion-loss-to-crosstalk ratio (ICR).

The method of IEEE 802.3's backplane and cable annexes (Annex 69B for 10GBASE-KR
backplane channels; the cable-assembly annexes use the same form -- recalled from
memory, not checked against the standard's text): the rms crosstalk noise at the
victim's receiver is the power sum of the aggressors' crosstalk weighted by the
transmitted symbol spectrum, the aggressor's edge and the receiver's reference filter,

    W(f) = (A^2 / f_b) sinc^2(f / f_b) / (1 + (f / f_t)^4) / (1 + (f / f_r)^8),
    f_t = 0.2365 / T_t,

    sigma_nx^2 = 2 df sum_n W_nt(f_n) 10^(-MDNEXT(f_n) / 10),
    sigma_fx^2 = 2 df sum_n W_ft(f_n) 10^(-MDFEXT(f_n) / 10),
    ICN = sigma_x = sqrt(sigma_nx^2 + sigma_fx^2),

with A the aggressor's peak amplitude (A_nt near end, A_ft far end), f_b the baud rate,
T_t the aggressor's 20-80 % transition time, f_r the receiver's 3 dB reference
frequency, and 10^(-MDNEXT/10) = sum_i |NEXT_i|^2 the multi-disturber power sum
(likewise FEXT). sinc(x) = sin(pi x) / (pi x).

Checks of the form (second derivations, in the tests): A^2 T sinc^2(f T) is the
two-sided power spectral density of a random +-A symbol stream (its integral is A^2, so
a flat crosstalk |X| gives sigma = A |X| without the filters); 1 / (1 + (f/f_t)^4) is
|H|^2 of a second-order Butterworth low-pass with 3 dB frequency f_t, whose step response
rises from 20 % to 80 % in 0.2365 / f_t -- the constant of f_t.

The sum runs over the sweep points above 0 Hz (the sweep's step is df; the grid must be
uniform). The standard sums on its own grid (a step of at most 10 MHz, from memory); a
coarser sweep is a coarser rectangle rule of the same integral.

ICR(f) = PSXT(f) - IL(f) in dB: the power-sum crosstalk loss of NEXT and FEXT together,
-10 log10 sum_i (|NEXT_i|^2 + |FEXT_i|^2), minus the victim's insertion loss; positive
when the signal arrives above the crosstalk.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError

__all__ = [
    "BUTTERWORTH_RISE",
    "NoiseResult",
    "icn",
    "icr_db",
    "integrated_noise",
    "power_sum",
    "weighting",
]

#: 20-80 % rise time x 3 dB frequency of a second-order Butterworth low-pass
BUTTERWORTH_RISE = 0.2365


def weighting(
    f: np.ndarray,
    amplitude: float,
    baud: float,
    transition: float | None,
    bandwidth: float | None,
) -> np.ndarray:
    """W(f) (V^2/Hz) of the module docstring; ``transition`` (20-80 %, s) or
    ``bandwidth`` (Hz) None leaves that filter out."""
    f = np.asarray(f, float)
    w = amplitude**2 / baud * np.sinc(f / baud) ** 2
    if transition is not None:
        w = w / (1.0 + (f * transition / BUTTERWORTH_RISE) ** 4)
    if bandwidth is not None:
        w = w / (1.0 + (f / bandwidth) ** 8)
    return w


def power_sum(transfers: Sequence[np.ndarray]) -> np.ndarray:
    """sum_i |H_i|^2 over the aggressors' transfer functions, (N,)."""
    out = np.zeros(np.shape(transfers[0]))
    for h in transfers:
        out = out + np.abs(h) ** 2
    return out


def _step(f: np.ndarray) -> float:
    """The sweep's step; a LossLaneError when the sweep is not uniform."""
    if f.size < 2:
        raise LossLaneError("integrated crosstalk noise: the sweep needs at least 2 points")
    d = np.diff(f)
    df = float(np.mean(d))
    if not np.allclose(d, df, rtol=1e-6, atol=0):
        raise LossLaneError(
            "integrated crosstalk noise: the sum needs a uniform frequency step; "
            "use [sweep] step or points"
        )
    return df


def integrated_noise(f: np.ndarray, weight: np.ndarray, power: np.ndarray) -> float:
    """sqrt(2 df sum_{f_n > 0} W(f_n) P(f_n)) (V) over the uniform sweep ``f``."""
    f = np.asarray(f, float)
    df = _step(f)
    above = f > 0
    return float(np.sqrt(2.0 * df * np.sum(weight[above] * power[above])))


@dataclass(frozen=True)
class NoiseResult:
    """The integrated crosstalk noise (V) at the near and far end and their root sum
    square, with the parameters used."""

    near: float
    far: float
    baud: float
    near_amplitude: float
    far_amplitude: float
    near_transition: float
    far_transition: float
    bandwidth: float
    step: float
    band: tuple[float, float]

    @property
    def total(self) -> float:
        return float(np.hypot(self.near, self.far))


def icn(
    f: np.ndarray,
    next_power: np.ndarray,
    fext_power: np.ndarray,
    baud: float,
    near_amplitude: float,
    far_amplitude: float,
    near_transition: float,
    far_transition: float,
    bandwidth: float,
) -> NoiseResult:
    """The integrated crosstalk noise of the power sums ``next_power`` and ``fext_power``
    (sum_i |X_i|^2, (N,)) on the uniform sweep ``f``."""
    f = np.asarray(f, float)
    wn = weighting(f, near_amplitude, baud, near_transition, bandwidth)
    wf = weighting(f, far_amplitude, baud, far_transition, bandwidth)
    above = f[f > 0]
    band = (float(above[0]), float(above[-1])) if above.size else (0.0, 0.0)
    return NoiseResult(
        integrated_noise(f, wn, next_power),
        integrated_noise(f, wf, fext_power),
        baud,
        near_amplitude,
        far_amplitude,
        near_transition,
        far_transition,
        bandwidth,
        _step(f),
        band,
    )


def icr_db(il_db: np.ndarray, crosstalk_power: np.ndarray) -> np.ndarray:
    """ICR = power-sum crosstalk loss - insertion loss (dB), (N,); ``crosstalk_power`` the
    sum of |NEXT_i|^2 + |FEXT_i|^2."""
    psxt = -10.0 * np.log10(np.maximum(crosstalk_power, 1e-300))
    return psxt - np.asarray(il_db, float)

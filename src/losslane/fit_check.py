"""Whether the fitted insertion loss means anything for a channel.

The fitted loss a0 + a1*sqrt(f) + a2*f + a4*f^2 describes a low-pass channel whose loss
rises smoothly with frequency, with a small ripple from reflections on top (the ILD). A
channel with a notch (an open via stub's quarter-wave resonance) or a pass band (a filter,
a small DC block) in the fit band is not that: the least-squares coefficients then follow
the notch or the band edges (a0 of 100 dB and more, negative slopes) and the "ILD" is the
notch itself. Two tests, each with a reason stated in words:

* the loss falls back: after rising, the loss drops by more than ``FALL_BACK_DB`` before the
  band's end (a smooth channel's ripple recovers a fraction of a dB; a notch or a pass band
  recovers its depth);
* the residual is comparable to the loss: the rms deviation from the fit exceeds
  ``RESIDUAL_SHARE`` of the largest loss in the band.

Both thresholds are our own choice, not from a standard: a board channel with reflections
within the usual return-loss limits stays far below them (the bundled demo lane: falls back
by less than 1 dB, rms residual about 1 % of its loss).
"""

from __future__ import annotations

import numpy as np

#: a fall of the loss by more than this after it has risen: a notch or a pass band (dB)
FALL_BACK_DB = 3.0
#: an rms residual above this share of the largest loss in the band: the fit does not apply
RESIDUAL_SHARE = 0.1


def fall_back(f: np.ndarray, il_db: np.ndarray) -> tuple[float, float, float]:
    """The largest drop of ``il_db`` below its running maximum: (drop in dB, frequency of
    the maximum before it, frequency of the bottom)."""
    il = np.asarray(il_db, dtype=float)
    peak = np.maximum.accumulate(il)
    drop = peak - il
    k = int(np.argmax(drop))
    top = int(np.argmax(il[: k + 1]))
    return float(drop[k]), float(f[top]), float(f[k])


def assess(f: np.ndarray, il_db: np.ndarray, ild_db: np.ndarray) -> tuple[bool, str | None]:
    """(applies, reason) for a fit of ``il_db`` on the sweep points ``f`` of its band, whose
    deviation from the fitted curve is ``ild_db``; the reason is None when it applies."""
    f = np.asarray(f, dtype=float)
    il = np.asarray(il_db, dtype=float)
    if not np.all(np.isfinite(il)):
        return False, "the loss is unbounded at a point of the fit band"
    drop, top, bottom = fall_back(f, il)
    if drop > FALL_BACK_DB:
        i_top = int(np.argmin(np.abs(f - top)))
        i_bot = int(np.argmin(np.abs(f - bottom)))
        return False, (
            f"the loss is not a smoothly rising low-pass loss: it falls back by {drop:.1f} dB "
            f"(from {il[i_top]:.1f} dB at {top / 1e9:.4g} GHz to {il[i_bot]:.1f} dB at "
            f"{bottom / 1e9:.4g} GHz), a notch or a pass band in the fit band; the fitted "
            "coefficients and the ILD would describe that, not a channel's loss"
        )
    largest = float(np.max(np.abs(il)))
    rms = float(np.sqrt(np.mean(np.asarray(ild_db) ** 2)))
    if largest > 0 and rms > RESIDUAL_SHARE * largest:
        return False, (
            f"the fit residual is comparable to the loss (rms {rms:.2f} dB against a largest "
            f"loss of {largest:.2f} dB in the band): the four-term form does not describe "
            "this channel"
        )
    return True, None


__all__ = ["FALL_BACK_DB", "RESIDUAL_SHARE", "assess", "fall_back"]

"""What an RF engineer reads off a 2-port besides its loss: VSWR from a reflection, the
transmission phase and the group delay.

* VSWR = (1 + |Gamma|) / (1 - |Gamma|) (the textbook identity, e.g. D. M. Pozar,
  *Microwave Engineering*, ch. 2); a total reflection gives an infinite VSWR, returned as
  ``inf`` here and left to the caller to show as "off the scale".
* Group delay tau = -d(phase)/d(omega), taken as the phase difference between two sweep
  points an *aperture* apart: tau = -(phi(f + A) - phi(f)) / (2 pi A), reported at the
  midpoint f + A/2. A finite aperture is what a network analyser does too: it keeps the
  delay meaningful near DC and across a notch, where the phase of a small |S21| turns
  quickly, at the price of averaging over A (common practice). The phase is followed
  from sweep point to sweep point (the angle of S21(f_i+1) / S21(f_i), summed), which is
  unambiguous while |tau| times the sweep step stays below 1/2.
"""

from __future__ import annotations

import numpy as np


def vswr(gamma) -> np.ndarray:
    """(1 + |gamma|) / (1 - |gamma|) for reflection coefficients ``gamma`` (any shape);
    ``inf`` where |gamma| >= 1."""
    g = np.abs(np.asarray(gamma))
    with np.errstate(divide="ignore", invalid="ignore"):
        out = (1.0 + g) / (1.0 - g)
    return np.where(g < 1.0, out, np.inf)


def unwrapped_phase_deg(s21) -> np.ndarray:
    """The transmission phase in degrees, unwrapped along the frequency axis."""
    return np.degrees(np.unwrap(np.angle(np.asarray(s21))))


def aperture_steps(f: np.ndarray, aperture: float) -> int:
    """The aperture as a whole number of sweep steps (at least one)."""
    f = np.asarray(f, dtype=float)
    step = float(f[1] - f[0])
    return max(1, int(round(aperture / step)))


def default_aperture(f: np.ndarray, start: float, stop: float) -> float:
    """About 1 % of the span start..stop, as a whole number of sweep steps (at least one):
    fine enough to follow a band's delay ripple, coarse enough to average the phase noise
    of a small |S21| (our own default)."""
    f = np.asarray(f, dtype=float)
    step = float(f[1] - f[0])
    return max(1, int(round(0.01 * (stop - start) / step))) * step


def group_delay(f: np.ndarray, s21, aperture: float) -> tuple[np.ndarray, np.ndarray]:
    """(midpoint frequencies, group delay in seconds) of the transmission ``s21`` (N,) on
    the uniform sweep ``f``, over ``aperture`` (rounded to whole sweep steps)."""
    f = np.asarray(f, dtype=float)
    s = np.asarray(s21, dtype=complex)
    k = aperture_steps(f, aperture)
    if f.size <= k:
        return np.empty(0), np.empty(0)
    a = f[k:] - f[:-k]
    # the phase followed step by step: each step's change is the angle of the ratio
    phase = np.concatenate([[0.0], np.cumsum(np.angle(s[1:] * np.conj(s[:-1])))])
    tau = -(phase[k:] - phase[:-k]) / (2.0 * np.pi * a)
    return 0.5 * (f[k:] + f[:-k]), tau


__all__ = ["aperture_steps", "default_aperture", "group_delay", "unwrapped_phase_deg", "vswr"]

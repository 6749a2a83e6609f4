"""Board dielectrics as complex relative permittivity eps(f) = eps' - j eps''.

Two models:

* :class:`WidebandDebye` -- the causal wideband (multipole) Debye model of
  Djordjevic, Biljic, Likar-Smiljanic and Sarkar (IEEE Trans. EMC 43(4), 2001),
  fitted so that Dk and Df equal the given values at the given frequency. Its
  real and imaginary parts are a Kramers-Kronig pair, so a line built on it has a
  causal impulse response. Valid between its two corner frequencies (default
  1 kHz and 1 THz), where Df is almost flat; it tends to finite limits outside.
* :class:`ConstantDielectric` -- Dk and Df the same at every frequency. Accepted
  because datasheets are written that way, but it is not causal: time-domain
  results from it show a non-physical precursor.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError, check_range

_LN10 = np.log(10.0)


def _check_dk_df(name: str, dk: float, df: float) -> None:
    if not np.isfinite(dk) or dk < 1.0:
        raise LossLaneError(
            f"dielectric {name!r}: dk = {dk!r} is not a relative permittivity; "
            "valid values are >= 1 (air is 1, board laminates 2.5..5)"
        )
    if not np.isfinite(df) or not (0.0 <= df < 1.0):
        raise LossLaneError(
            f"dielectric {name!r}: df = {df!r} is not a loss tangent; "
            "valid values are 0 <= df < 1 (laminates 0.001..0.03)"
        )


class Dielectric:
    """Base class: a dielectric knows its complex permittivity at any frequency (f >= 0)."""

    name: str
    dk: float
    df: float
    at: float
    causal: bool
    model: str

    def eps(self, f: np.ndarray) -> np.ndarray:
        raise NotImplementedError

    def dk_df(self, f: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Dk = eps' and Df = eps''/eps' at ``f``."""
        e = self.eps(np.asarray(f, dtype=float))
        return e.real, -e.imag / e.real


@dataclass(frozen=True)
class ConstantDielectric(Dielectric):
    """Frequency-independent Dk and Df (non-causal; see module docstring)."""

    dk: float
    df: float = 0.0
    name: str = "constant"
    at: float = 0.0
    causal = False
    model = "constant"

    def __post_init__(self) -> None:
        _check_dk_df(self.name, self.dk, self.df)

    def eps(self, f: np.ndarray) -> np.ndarray:
        f = np.asarray(f, dtype=float)
        return np.full(f.shape, self.dk * (1.0 - 1j * self.df), dtype=complex)


@dataclass(frozen=True)
class WidebandDebye(Dielectric):
    """Djordjevic-Sarkar wideband Debye permittivity, fitted to (dk, df) at ``at`` Hz.

    eps(f) = eps_inf + d_eps / (m2 - m1) * log10((w2 + j w) / (w1 + j w)),
    with w1 = 2 pi f_low, w2 = 2 pi f_high and m = log10(w) (Djordjevic et al. 2001,
    eq. for the wideband Debye model). At f = 0 it gives eps_inf + d_eps (finite).
    """

    dk: float
    df: float
    at: float
    name: str = "wideband-debye"
    f_low: float = 1e3
    f_high: float = 1e12
    causal = True
    model = "wideband-debye"

    def __post_init__(self) -> None:
        _check_dk_df(self.name, self.dk, self.df)
        if not (0.0 < self.f_low < self.f_high):
            raise LossLaneError(
                f"dielectric {self.name!r}: corner frequencies f_low = "
                f"{self.f_low!r} Hz and f_high = {self.f_high!r} Hz must satisfy "
                "0 < f_low < f_high"
            )
        if not (self.f_low < self.at < self.f_high):
            raise LossLaneError(
                f"dielectric {self.name!r}: at = {self.at:g} Hz must lie between "
                f"the model's corners {self.f_low:g} Hz and {self.f_high:g} Hz"
            )
        g = self._shape(np.array([self.at]))[0]
        d_eps = self.dk * self.df / -g.imag
        eps_inf = self.dk - d_eps * g.real
        if eps_inf < 1.0:
            raise LossLaneError(
                f"dielectric {self.name!r}: dk = {self.dk:g} with df = {self.df:g} at "
                f"{self.at:g} Hz needs a high-frequency permittivity below 1 in the wideband "
                "Debye model; lower df or raise dk"
            )
        object.__setattr__(self, "_d_eps", float(d_eps))
        object.__setattr__(self, "_eps_inf", float(eps_inf))

    def _shape(self, f: np.ndarray) -> np.ndarray:
        w = 2 * np.pi * f
        w1, w2 = 2 * np.pi * self.f_low, 2 * np.pi * self.f_high
        return np.log((w2 + 1j * w) / (w1 + 1j * w)) / np.log(w2 / w1)

    @property
    def eps_inf(self) -> float:
        return self._eps_inf  # type: ignore[attr-defined]

    @property
    def delta_eps(self) -> float:
        return self._d_eps  # type: ignore[attr-defined]

    @property
    def eps_static(self) -> float:
        return self.eps_inf + self.delta_eps

    def eps(self, f: np.ndarray) -> np.ndarray:
        f = np.asarray(f, dtype=float)
        check_range(
            f"wideband Debye dielectric {self.name!r}",
            "frequency [Hz]",
            f[f > 0],
            self.f_low,
            self.f_high,
        )
        return self.eps_inf + self.delta_eps * self._shape(f)


def make_dielectric(
    dk: float, df: float, at: float | None, model: str = "wideband-debye", name: str | None = None
) -> Dielectric:
    """A dielectric from datasheet values; ``model`` is 'wideband-debye' or 'constant'."""
    if model == "wideband-debye":
        if at is None:
            raise LossLaneError(
                f"dielectric {name or 'dielectric'!r}: the wideband-debye model "
                "needs the frequency of the dk/df values ('at', e.g. \"10 GHz\")"
            )
        return WidebandDebye(dk=dk, df=df, at=at, name=name or "wideband-debye")
    if model == "constant":
        return ConstantDielectric(dk=dk, df=df, name=name or "constant", at=at or 0.0)
    raise LossLaneError(
        f"dielectric {name or ''!r}: model = {model!r} is unknown; valid models: "
        "'wideband-debye', 'constant'"
    )

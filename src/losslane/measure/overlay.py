"""A measurement of a built channel beside its model: the measured insertion and return
loss, the measurement's quality, and the difference model - measured.

The measured file is a Touchstone file of the same channel, named by the scenario's
``[compare]`` section. It is data: its IEEE Std 370-2020 passivity and reciprocity (and
causality) metrics are computed and reported (:func:`losslane.network.quality.quality`),
with a warning when a level is below "acceptable", but it is never repaired or refused
(the import policy of :mod:`losslane.network.import_check` is for channel blocks, whose
faults would spread into the built model; a comparison only shows the data).

Ports are numbered as for imported files: a 4-port's order is ``[compare] order``, else
the scenario's ``[ports] order``. The measured S is referred to the scenario's reference
impedance (power waves, :func:`losslane.network.scatter.renormalize`; an exact change of
reference, nothing when the file already uses it). The compared quantities are those of
the build: the main mode's insertion loss (S21, or Sdd21 of a pair) and the return loss
at both ends (S11/S22, or Sdd11/Sdd22), mixed-mode after D. E. Bockelman and
W. R. Eisenstadt, IEEE Trans. MTT 43(7), 1995.

The difference curves (model - measured, dB; positive: the model predicts more loss) are
taken at the measured frequencies inside the sweep, with the model's dB curves
interpolated linearly between sweep points. The measured S is never interpolated as
complex numbers (between points whose phase differs by a sizeable turn that lowers the
magnitude of a long line's S21). At the check points both curves are interpolated in dB;
a point outside the measured band has no measured value (None).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from losslane.errors import LossLaneError, warn
from losslane.network.quality import QualityReport

if TYPE_CHECKING:
    from losslane.channel import ChannelResult

__all__ = ["MeasuredOverlay", "measured_overlay"]

#: quality levels at which the measurement is only reported, without a warning
FINE_LEVELS = ("good", "acceptable")


@dataclass(frozen=True, eq=False)
class MeasuredOverlay:
    """A measured file beside the built channel.

    ``f`` (M,) the measured frequencies; ``insertion_loss_db``, ``return_loss_in_db``,
    ``return_loss_out_db`` (M,) the measured main mode (positive dB); ``quality`` the
    file's IEEE 370 report as read (None with fewer than 3 points); ``common`` (M,) the
    measured points inside the sweep, where ``difference_*_db`` (model - measured, over
    ``f[common]``) are given; ``rows`` the values at the check points.
    """

    path: Path
    label: str
    nports: int
    order: str | None
    reference_ohm: float
    f: np.ndarray
    insertion_loss_db: np.ndarray
    return_loss_in_db: np.ndarray
    return_loss_out_db: np.ndarray
    quality: QualityReport | None
    common: np.ndarray
    difference_il_db: np.ndarray
    difference_rl_in_db: np.ndarray
    difference_rl_out_db: np.ndarray
    rows: tuple[dict, ...]

    @property
    def f_common(self) -> np.ndarray:
        return self.f[self.common]

    @property
    def mode(self) -> str:
        return "single-ended" if self.nports == 2 else "differential"

    def difference_summary(self) -> dict:
        """Largest |model - measured| insertion loss and where, and its RMS, over the common
        band; the largest return-loss differences."""
        d = self.difference_il_db
        k = int(np.argmax(np.abs(d)))
        return {
            "insertion_loss_max_abs_db": float(abs(d[k])),
            "insertion_loss_max_at_hz": float(self.f_common[k]),
            "insertion_loss_rms_db": float(np.sqrt(np.mean(d**2))),
            "return_loss_in_max_abs_db": float(np.max(np.abs(self.difference_rl_in_db))),
            "return_loss_out_max_abs_db": float(np.max(np.abs(self.difference_rl_out_db))),
        }

    def to_json(self) -> dict:
        fc = self.f_common
        return {
            "file": str(self.path),
            "label": self.label,
            "ports": self.nports,
            "port_order": self.order,
            "mode": self.mode,
            "reference_ohm": self.reference_ohm,
            "points": int(self.f.size),
            "band_hz": [float(self.f[0]), float(self.f[-1])],
            "common_band_hz": [float(fc[0]), float(fc[-1])],
            "quality": None if self.quality is None else self.quality.to_json(),
            "difference": self.difference_summary(),
            "checks": [dict(r) for r in self.rows],
        }

    def curves_csv(self) -> str:
        """The measured curves and the differences over the common band, as CSV text."""
        head = (
            "frequency_hz,measured_insertion_loss_db,model_insertion_loss_db,"
            "insertion_loss_difference_db,measured_return_loss_in_db,"
            "return_loss_in_difference_db,measured_return_loss_out_db,"
            "return_loss_out_difference_db"
        )
        c = self.common
        il, rin, rout = (
            a[c] for a in (self.insertion_loss_db, self.return_loss_in_db, self.return_loss_out_db)
        )
        rows = [head]
        for k, fk in enumerate(self.f_common):
            vals = (
                fk,
                il[k],
                il[k] + self.difference_il_db[k],
                self.difference_il_db[k],
                rin[k],
                self.difference_rl_in_db[k],
                rout[k],
                self.difference_rl_out_db[k],
            )
            rows.append(",".join(repr(float(v)) for v in vals))
        return "\n".join(rows) + "\n"


def _main_mode(s: np.ndarray, reference: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(insertion loss, return loss in, return loss out), positive dB, of S (N, 2n, 2n) in
    the internal port order: the definitions of the built channel's losses."""
    from losslane.network.mixedmode import ONE_PAIR, mixed_mode_internal
    from losslane.network.scatter import loss_db

    il = loss_db(s)
    if s.shape[1] == 2:
        s11, s22 = s[:, 0, 0], s[:, 1, 1]
    else:
        dd = mixed_mode_internal(s, reference, ONE_PAIR).dd
        s11, s22 = dd[:, 0, 0], dd[:, 1, 1]
    with np.errstate(divide="ignore"):
        rl = [-20.0 * np.log10(np.maximum(np.abs(x), 1e-300)) for x in (s11, s22)]
    return il, rl[0], rl[1]


def _at(f: np.ndarray, y: np.ndarray, x: float) -> float | None:
    if x < f[0] * (1 - 1e-12) or x > f[-1] * (1 + 1e-12):
        return None
    return float(np.interp(x, f, y))


def _diff(a: float | None, b: float | None) -> float | None:
    return None if a is None or b is None else a - b


def measured_overlay(result: ChannelResult, at_hz: Sequence[float] = ()) -> MeasuredOverlay | None:
    """The measurement named by ``result.scenario.compare`` (None without one) beside the
    built channel ``result`` (a :class:`losslane.channel.ChannelResult`), with the values
    at the check points ``at_hz`` (Hz)."""
    from losslane.network.ports import from_order
    from losslane.network.quality import quality
    from losslane.network.scatter import renormalize
    from losslane.network.touchstone import read_touchstone
    from losslane.units import format_frequency as fmt

    sc = result.scenario
    spec = getattr(sc, "compare", None)
    if spec is None:
        return None
    key = "[compare].measured"
    name = spec.path.name
    net = read_touchstone(spec.path)
    n = result.conductors
    if net.nports != 2 * n:
        what = "single-ended (2-port)" if n == 1 else "differential (4-port)"
        raise LossLaneError(
            f"{key} = {name!r} has {net.nports} ports but this {what} channel has "
            f"{2 * n}; compare a file of the same channel"
        )
    f = np.asarray(net.f, float)
    if f.size < 2:
        raise LossLaneError(f"{key} = {name!r} has {f.size} frequency point(s); 2 are needed")
    z0 = np.asarray(net.z0)
    if np.any(np.asarray(z0).imag != 0):
        raise LossLaneError(
            f"{key} = {name!r} has complex reference impedances; only real ones are supported"
        )
    sweep = result.f
    common = (f >= sweep[0] * (1 - 1e-12)) & (f <= sweep[-1] * (1 + 1e-12))
    if not np.any(common):
        raise LossLaneError(
            f"{key} = {name!r} covers {fmt(f[0])}..{fmt(f[-1])} but the sweep runs "
            f"{fmt(sweep[0])}..{fmt(sweep[-1])}: no frequency in common to compare"
        )
    s_file = np.asarray(net.s, complex)
    report = None
    if f.size >= 3:
        report = quality(f, s_file)
        poor = [
            f"{kind} {value:.4g} ({level})"
            for kind, value, level in (
                ("passivity", report.passivity, report.passivity_level),
                ("reciprocity", report.reciprocity, report.reciprocity_level),
            )
            if level not in FINE_LEVELS
        ]
        if poor:
            warn(
                f"{key} = {name!r}: IEEE 370 quality {', '.join(poor)}; the measurement is "
                "shown as it is (measurements are reported, never repaired)"
            )
    ref = float(sc.ports.reference)
    order = (spec.order or sc.ports.order) if n == 2 else None
    s = renormalize(s_file, z0.real, ref)
    if n == 2:
        s = from_order(s, n, order)
    il, rl_in, rl_out = _main_mode(s, ref)

    model_il = result.insertion_loss_db
    model_in, model_out = result.return_loss
    fc = f[common]
    d_il = np.interp(fc, sweep, model_il) - il[common]
    d_in = np.interp(fc, sweep, model_in) - rl_in[common]
    d_out = np.interp(fc, sweep, model_out) - rl_out[common]

    rows = []
    for x in at_hz:
        m_il, m_in, m_out = (_at(sweep, y, x) for y in (model_il, model_in, model_out))
        x_il, x_in, x_out = (_at(f, y, x) for y in (il, rl_in, rl_out))
        rows.append(
            {
                "at_hz": float(x),
                "model_insertion_loss_db": m_il,
                "measured_insertion_loss_db": x_il,
                "insertion_loss_difference_db": _diff(m_il, x_il),
                "model_return_loss_in_db": m_in,
                "measured_return_loss_in_db": x_in,
                "return_loss_in_difference_db": _diff(m_in, x_in),
                "model_return_loss_out_db": m_out,
                "measured_return_loss_out_db": x_out,
                "return_loss_out_difference_db": _diff(m_out, x_out),
            }
        )
    return MeasuredOverlay(
        path=spec.path,
        label=spec.label or spec.path.name,
        nports=int(net.nports),
        order=order,
        reference_ohm=ref,
        f=f,
        insertion_loss_db=il,
        return_loss_in_db=rl_in,
        return_loss_out_db=rl_out,
        quality=report,
        common=common,
        difference_il_db=d_il,
        difference_rl_in_db=d_in,
        difference_rl_out_db=d_out,
        rows=tuple(rows),
    )

"""Material and foil comparison at equal impedance.

Engineers compare laminates at the same target impedance, not at the same width: a
lower-Dk laminate needs a wider trace for the same Z0, and the wider trace has less
conductor loss. So every candidate (dielectric x foil) is re-sized to the target first,
then its loss per inch is split into the conductor and the dielectric part.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from losslane.design.sizing import DEFAULT_SIZE_AT, size
from losslane.errors import LossLaneError
from losslane.materials.dielectric import Dielectric
from losslane.materials.roughness import Roughness
from losslane.spec import Where, python_where
from losslane.xsection.base import CrossSection
from losslane.xsection.batch import evaluate


@dataclass(frozen=True)
class Candidate:
    """One re-sized candidate: names, the sized section, its loss at the compare points and
    its loss curve for the chart."""

    material: str
    foil: str
    section: CrossSection
    achieved: float
    loss: list[float]
    conductor: list[float]
    dielectric: list[float]
    curve_f: np.ndarray
    curve_db_per_in: np.ndarray

    def row(self) -> dict:
        geo = self.section
        out = {
            "material": self.material,
            "foil": self.foil,
            "width_m": float(geo.width),
            "loss_db_per_in": self.loss,
            "conductor_db_per_in": self.conductor,
            "dielectric_db_per_in": self.dielectric,
            "achieved_ohm": self.achieved,
            "dk": float(geo.dielectric.dk),
            "df": float(geo.dielectric.df),
            "dk_at_hz": float(geo.dielectric.at),
        }
        if geo.n_conductors == 2:
            out["spacing_m"] = geo.dimension_values().get("spacing")
        return out


@dataclass(frozen=True)
class CompareResult:
    kind: str
    target: float
    size_at: float
    frequencies: list[float]
    candidates: list[Candidate]  # sorted by loss at the highest frequency, lowest first

    def to_json(self) -> dict:
        return {
            "frequencies_hz": self.frequencies,
            "rows": [c.row() for c in self.candidates],
            "kind": self.kind,
            "target_ohm": self.target,
            "size_at_hz": self.size_at,
            "impedance": "z_diff" if self.candidates[0].section.n_conductors == 2 else "z0",
        }


def compare(
    section: CrossSection,
    materials: Mapping[str, Dielectric],
    foils: Mapping[str, Roughness] | None,
    target: float,
    frequencies: Sequence[float],
    *,
    size_at: float = DEFAULT_SIZE_AT,
    curve_points: int = 121,
    where: Where | None = None,
) -> CompareResult:
    """Re-size ``section`` to ``target`` ohm for every material x foil and tabulate loss.

    ``section`` gives the stackup dimensions (its width is a placeholder); ``foils`` None
    keeps the section's own foil (reported under its model name). The loss curves run
    from 1 % of the highest frequency to the highest, ``curve_points`` points.
    """
    where = where or python_where("compare")
    if not materials:
        raise LossLaneError(f"{where.key('materials')}: give at least one dielectric name")
    freqs = [float(x) for x in frequencies]
    if not freqs:
        raise LossLaneError(f"{where.key('at')}: give at least one frequency")
    if foils is None:
        foils = {getattr(section.metal.foil, "model", "foil"): section.metal.foil}
    fmax = max(freqs)
    curve_f = np.linspace(fmax / 100.0, fmax, curve_points) if fmax > 0 else np.array([0.0])
    out: list[Candidate] = []
    for mname, diel in materials.items():
        for fname, foil in foils.items():
            metal = dataclasses.replace(section.metal, foil=foil)
            sec = section.replace(dielectric=diel, metal=metal)
            try:
                res = size(
                    sec, target, at=size_at, loss_at=freqs, with_sensitivity=False, where=where
                )
            except LossLaneError as exc:
                raise LossLaneError(f"material {mname!r} with foil {fname!r}: {exc}") from None
            total, conductor, dielectric = res.values.main.db_per_in()
            curve = evaluate(res.section, curve_f).loss_db_per_in()[0][0]
            out.append(
                Candidate(
                    mname,
                    fname,
                    res.section,
                    res.achieved,
                    total[1:].tolist(),
                    conductor[1:].tolist(),
                    dielectric[1:].tolist(),
                    curve_f,
                    curve,
                )
            )
    top = int(np.argmax(freqs))
    out.sort(key=lambda c: c.loss[top])
    return CompareResult(section.kind, target, size_at, freqs, out)

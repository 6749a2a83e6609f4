"""Python entry points that mirror the command-line commands (same inputs, same results)."""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from pathlib import Path

from losslane.materials.dielectric import Dielectric, make_dielectric
from losslane.materials.library import Library, load_library
from losslane.materials.roughness import Roughness
from losslane.spec import Where
from losslane.units import parse_frequency_list
from losslane.xsection.base import CrossSection
from losslane.xsection.factory import section_from_spec


def make_section(
    spec: Mapping, where: str = "line", library: Library | None = None
) -> CrossSection:
    """A cross-section from scenario-style keys, names resolved in the material library."""
    lib = library or load_library()
    return section_from_spec(spec, where, lib.dielectric, lib.foil)


def line(
    kind: str,
    *,
    at: str | Iterable[str] = "1GHz,10GHz,28GHz",
    dk: float | None = None,
    df: float = 0.0,
    dk_at: str | None = None,
    dielectric: str | Dielectric | None = None,
    dielectric_model: str = "wideband-debye",
    foil: str | Roughness | None = None,
    library_files: Iterable[Path | str] = (),
    where: str | Where = "line",
    **geometry: str,
) -> dict:
    """Properties of one line (the result of ``losslane line --json``).

    ``geometry`` takes the scenario keys with units, e.g. ``width="6 mil"``.
    """
    from losslane.errors import LossLaneError
    from losslane.units import parse_frequency

    lib = load_library(library_files)
    spec: dict = {"kind": kind, **geometry}
    if dielectric is not None and dk is not None:
        raise LossLaneError("give either a dielectric name or dk/df values, not both")
    if dk is not None:
        at_hz = parse_frequency(dk_at, "dk_at") if dk_at is not None else None
        spec["dielectric"] = make_dielectric(dk, df, at_hz, dielectric_model, "dielectric")
    elif dielectric is not None:
        spec["dielectric"] = dielectric
    if foil is not None:
        spec["foil"] = foil
    section = section_from_spec(spec, where, lib.dielectric, lib.foil)
    freqs = parse_frequency_list(at, "at")
    return section.properties(freqs)

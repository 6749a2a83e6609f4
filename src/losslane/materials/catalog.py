"""The material library as a listing (``losslane materials``): every dielectric with its
class, Dk, Df and their frequency, every foil with its model and parameters, and where
each entry comes from (the bundled library of typical values, or a user file)."""

from __future__ import annotations

from collections.abc import Iterable
from pathlib import Path

from losslane.materials.library import Library, load_library, read_toml

BUNDLED = "bundled (typical values of a generic class)"


def _scenario_materials(path: Path) -> dict:
    """The [dielectrics.*] and [foils.*] sections of a scenario file (the rest is ignored
    here; the scenario reader checks it)."""
    data = read_toml(path, "scenario file")
    return {k: data[k] for k in ("dielectrics", "foils") if k in data}


def catalog(
    library_files: Iterable[Path | str] = (), scenario_files: Iterable[Path | str] = ()
) -> dict:
    """The listing as the ``losslane materials --json`` object.

    Keys: ``dielectrics`` [{name, dk, df, at_hz, model, note, class, causal, source}],
    ``foils`` [{name, model, note, source, ...the model's parameters}]. Later files
    override earlier entries of the same name (their ``source`` says so).
    """
    lib = load_library()
    source = {f"dielectric:{n}": BUNDLED for n in lib.dielectrics}
    source.update({f"foil:{n}": BUNDLED for n in lib.foils})
    for p in library_files:
        p = Path(p)
        data = read_toml(p, "library file")  # read once: entries and their source
        lib._load(data, str(p))
        _mark(lib, source, str(p), data)
    for p in scenario_files:
        p = Path(p)
        data = _scenario_materials(p)
        lib._load(data, str(p))
        _mark(lib, source, str(p), data)
    return _listing(lib, source)


def _mark(lib: Library, source: dict, where: str, data: dict) -> None:
    for n in data.get("dielectrics", {}):
        source[f"dielectric:{n}"] = where
    for n in data.get("foils", {}):
        source[f"foil:{n}"] = where


def _listing(lib: Library, source: dict) -> dict:
    diels = []
    for name, d in lib.dielectrics.items():
        diels.append(
            {
                "name": name,
                "dk": float(d.dk),
                "df": float(d.df),
                "at_hz": float(d.at) if d.at else None,
                "model": d.model,
                "note": lib.notes.get(f"dielectric:{name}", ""),
                "class": lib.classes.get(name, ""),
                "causal": bool(d.causal),
                "source": source.get(f"dielectric:{name}", ""),
            }
        )
    foils = []
    for name, r in lib.foils.items():
        foils.append(
            {
                "name": name,
                "model": r.model,
                **r.parameters(),
                "note": lib.notes.get(f"foil:{name}", ""),
                "source": source.get(f"foil:{name}", ""),
            }
        )
    return {"dielectrics": diels, "foils": foils}

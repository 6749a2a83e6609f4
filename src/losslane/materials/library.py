"""The material and foil library: generic classes with typical values (data/*.toml), plus
the parsers that turn a library entry or a scenario section into model objects."""

from __future__ import annotations

import tomllib
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path

from losslane.errors import LossLaneError
from losslane.limits import DF, DIMENSION, DK
from losslane.materials.dielectric import Dielectric, make_dielectric
from losslane.materials.roughness import (
    FinishLayer,
    Graded,
    Groiss,
    Hammerstad,
    Huray,
    Roughness,
    Smooth,
)
from losslane.spec import check_keys, dimension, number, quantity, suggest, text

DIELECTRIC_KEYS = ("dk", "df", "at", "model", "class", "note")
#: upper bounds of a foil's plain numbers (far above typical values, finite)
MAX_RATIO = 1e3  # Huray surface ratio (typical 0.5..4) and matte ratio (1..2)
MAX_COUNT = 1e12  # spheres per tile
MAX_MU_R = 1e5  # relative permeability of a plating layer (nickel: a few hundred)
SPHERE_EXAMPLE = '{ radius = "0.5 um", surface_ratio = 2.0 }'
LAYER_EXAMPLE = '{ name = "nickel", conductivity = "1.4e7 S/m", thickness = "3 um" }'
FOIL_MODELS = ("none", "hammerstad", "groiss", "huray", "graded")
FOIL_KEYS = (
    "model",
    "rq",
    "radius",
    "surface_ratio",
    "count",
    "tile_area",
    "matte_ratio",
    "spheres",
    "layers",
    "outside_dk",
    "note",
)


def dielectric_from_spec(name: str, spec: Mapping, where: str) -> Dielectric:
    check_keys(where, spec, DIELECTRIC_KEYS, required=("dk",))
    dk = number(where, spec, "dk", required=True, low=DK[0], high=DK[1])
    df = number(where, spec, "df", default=0.0, low=DF[0], high=DF[1], high_open=True)
    model = text(where, spec, "model", ("wideband-debye", "constant"), "wideband-debye")
    at = quantity(where, spec, "at", "frequency")
    if model == "wideband-debye" and at is None:
        raise LossLaneError(
            f"{where}: missing key 'at' (the frequency of dk and df, e.g. "
            '"10 GHz"); or set model = "constant"'
        )
    try:
        return make_dielectric(dk, df, at, model, name)
    except LossLaneError as exc:
        raise LossLaneError(f"{where}: {exc}") from None


def foil_from_spec(name: str, spec: Mapping, where: str) -> Roughness:
    check_keys(where, spec, FOIL_KEYS, required=("model",))
    model = text(where, spec, "model", FOIL_MODELS, required=True)
    allowed = {
        "none": ("model", "note"),
        "hammerstad": ("model", "rq", "note"),
        "groiss": ("model", "rq", "note"),
        "huray": (
            "model",
            "radius",
            "surface_ratio",
            "count",
            "tile_area",
            "matte_ratio",
            "spheres",
            "note",
        ),
        "graded": ("model", "rq", "layers", "outside_dk", "note"),
    }[model]
    check_keys(f"{where} (model {model!r})", spec, allowed)
    if model == "none":
        return Smooth()
    if model in ("hammerstad", "groiss"):
        rq = dimension(where, spec, "rq", required=True)
        return Hammerstad(rq) if model == "hammerstad" else Groiss(rq)
    if model == "huray":
        matte = number(where, spec, "matte_ratio", default=1.0, low=1.0, high=MAX_RATIO)
        if "spheres" in spec:
            spheres = []
            for i, item in enumerate(_entries(where, spec, "spheres", SPHERE_EXAMPLE)):
                w = f"{where}.spheres[{i}]"
                if not isinstance(item, Mapping):
                    raise LossLaneError(
                        f"{w}: expected a table {{radius = ..., surface_ratio = ...}}}}"
                    )
                check_keys(
                    w, item, ("radius", "surface_ratio"), required=("radius", "surface_ratio")
                )
                spheres.append(
                    (
                        dimension(w, item, "radius", required=True),
                        number(w, item, "surface_ratio", required=True, low=0.0, high=MAX_RATIO),
                    )
                )
            return Huray(tuple(spheres), matte)
        radius = dimension(where, spec, "radius", required=True)
        if "count" in spec:
            count = number(where, spec, "count", required=True, low=0.0, high=MAX_COUNT)
            tile = spec.get("tile_area")
            if not isinstance(tile, str):
                raise LossLaneError(
                    f"{where}.tile_area = {tile!r}: give the flat tile area "
                    "that holds 'count' spheres, e.g. \"100 um^2\""
                )
            return Huray.from_counts(radius, count, parse_area(tile, f"{where}.tile_area"), matte)
        ratio = number(where, spec, "surface_ratio", required=True, low=0.0, high=MAX_RATIO)
        return Huray.from_surface_ratio(radius, ratio, matte)
    rq = dimension(where, spec, "rq", default=0.0, zero_ok=True)
    layers = []
    for i, item in enumerate(_entries(where, spec, "layers", LAYER_EXAMPLE)):
        w = f"{where}.layers[{i}]"
        if not isinstance(item, Mapping):
            raise LossLaneError(f"{w}: expected a table {{name, conductivity, thickness, mu_r}}}}")
        check_keys(
            w,
            item,
            ("name", "conductivity", "thickness", "mu_r"),
            required=("conductivity", "thickness"),
        )
        from losslane.units import parse_conductivity

        layers.append(
            FinishLayer(
                sigma=parse_conductivity(item["conductivity"], f"{w}.conductivity"),
                thickness=dimension(w, item, "thickness", required=True),
                mu_r=number(w, item, "mu_r", default=1.0, low=1.0, high=MAX_MU_R),
                name=_layer_name(w, item, i),
            )
        )
    outside = number(where, spec, "outside_dk", default=1.0, low=DK[0], high=DK[1])
    return Graded(rq, tuple(layers), outside)


def _entries(where: str, spec: Mapping, key: str, example: str) -> list:
    """``spec[key]``, which must be a list of tables (TOML array of inline tables)."""
    value = spec.get(key, [])
    if not isinstance(value, list):
        raise LossLaneError(
            f"{where}.{key} = {value!r}: expected a list of tables, e.g. {key} = [{example}]"
        )
    return value


def _layer_name(where: str, item: Mapping, i: int) -> str:
    name = item.get("name", f"layer {i + 1}")
    if not isinstance(name, str):
        raise LossLaneError(f"{where}.name = {name!r}: expected text")
    return name


def parse_area(value: str, key: str) -> float:
    """An area written as a length unit squared: "100 um^2", "1e-10 m^2"; between
    (1 nm)^2 and (1 m)^2 (the board-dimension range squared)."""
    import re

    from losslane.units import parse_length, parse_number

    m = re.match(r"^\s*(\S+?)\s*([^\s^²0-9.+-][^\s^²]*)\s*(\^2|²)\s*$", value)
    if not m:
        raise LossLaneError(f'{key} = {value!r}: expected an area such as "100 um^2"')
    try:
        number = parse_number(m.group(1), key)
    except LossLaneError:
        raise LossLaneError(
            f"{key} = {value!r}: {m.group(1)!r} is not a number; expected an area such as "
            '"100 um^2"'
        ) from None
    unit = parse_length(f"1 {m.group(2)}", key)
    area = number * unit * unit
    lo, hi = DIMENSION
    if not lo * lo <= area <= hi * hi:
        raise LossLaneError(
            f"{key} = {value!r} ({area:.6g} m^2): an area is between (1 nm)^2 and (1 m)^2"
        )
    return area


def read_toml(path: Path, what: str) -> dict:
    """The parsed TOML file at ``path``; a LossLaneError naming ``what`` and the path if it
    is missing or not valid TOML."""
    from losslane.userfiles import read_text

    source = read_text(path, what)
    try:
        return tomllib.loads(source)
    except tomllib.TOMLDecodeError as exc:
        raise LossLaneError(f"{what} {str(path)!r}: not valid TOML ({exc})") from None


@dataclass
class Library:
    """Named dielectrics and foils, with their notes and source (bundled or user file)."""

    dielectrics: dict[str, Dielectric] = field(default_factory=dict)
    foils: dict[str, Roughness] = field(default_factory=dict)
    notes: dict[str, str] = field(default_factory=dict)
    classes: dict[str, str] = field(default_factory=dict)
    #: a library file's ``[stackup]`` / ``[stackups.*]`` tables as written, with the file
    #: they came from; ``losslane.stackup`` reads them when a scenario uses them
    stackups: dict[str, tuple[Mapping, str]] = field(default_factory=dict)

    def dielectric(self, name: str, where: str = "dielectric") -> Dielectric:
        if name not in self.dielectrics:
            raise LossLaneError(
                f"{where} = {name!r}: unknown dielectric; {suggest(name, self.dielectrics)}"
            )
        return self.dielectrics[name]

    def foil(self, name: str, where: str = "foil") -> Roughness:
        if name not in self.foils:
            raise LossLaneError(f"{where} = {name!r}: unknown foil; {suggest(name, self.foils)}")
        return self.foils[name]

    def extend(self, path: Path | str) -> None:
        """Add (or override) entries from a user TOML file with [dielectrics.*] / [foils.*]."""
        path = Path(path)
        self._load(read_toml(path, "library file"), str(path))

    def _load(self, data: Mapping, source: str) -> None:
        check_keys(source, data, ("dielectrics", "foils", "stackup", "stackups"))
        if "stackup" in data:
            self.stackups[""] = (data["stackup"], source)
        named = data.get("stackups", {})
        if not isinstance(named, Mapping):
            raise LossLaneError(f"{source}: [stackups] expects named tables, e.g. [stackups.host]")
        for name, spec in named.items():
            self.stackups[name] = (spec, source)
        for name, spec in _named_tables(data, "dielectrics", source).items():
            where = f"{source} [dielectrics.{name}]"
            self.dielectrics[name] = dielectric_from_spec(name, spec, where)
            self.notes[f"dielectric:{name}"] = str(spec.get("note", ""))
            self.classes[name] = str(spec.get("class", ""))
        for name, spec in _named_tables(data, "foils", source).items():
            where = f"{source} [foils.{name}]"
            self.foils[name] = foil_from_spec(name, spec, where)
            self.notes[f"foil:{name}"] = str(spec.get("note", ""))


def _named_tables(data: Mapping, key: str, source: str) -> dict[str, Mapping]:
    """``data[key]``: a table of named tables ([dielectrics.NAME], [foils.NAME])."""
    value = data.get(key, {})
    if not isinstance(value, Mapping):
        raise LossLaneError(
            f"{source}: {key} = {value!r}: expected a table of named entries, e.g. [{key}.NAME]"
        )
    for name, spec in value.items():
        if not isinstance(spec, Mapping):
            raise LossLaneError(f"{source} [{key}.{name}]: expected a table of keys, got {spec!r}")
    return dict(value)


def load_library(extra: Iterable[Path | str] = ()) -> Library:
    """The bundled library (data/materials.toml, data/foils.toml), extended by ``extra``."""
    lib = Library()
    for fname in ("materials.toml", "foils.toml"):
        text_ = resources.files("losslane").joinpath("data", fname).read_text(encoding="utf-8")
        lib._load(tomllib.loads(text_), f"bundled {fname}")
    for path in extra:
        lib.extend(path)
    return lib

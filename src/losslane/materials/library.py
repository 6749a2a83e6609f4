"""The material and foil library: generic classes with typical values (data/*.toml), plus
the parsers that turn a library entry or a scenario section into model objects."""

from __future__ import annotations

import tomllib
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path

from losslane.errors import LossLaneError
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
from losslane.spec import check_keys, number, quantity, suggest, text

DIELECTRIC_KEYS = ("dk", "df", "at", "model", "class", "note")
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
    dk = number(where, spec, "dk", required=True, low=1.0)
    df = number(where, spec, "df", default=0.0, low=0.0, high=1.0, high_open=True)
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
        rq = quantity(where, spec, "rq", "length", required=True)
        return Hammerstad(rq) if model == "hammerstad" else Groiss(rq)
    if model == "huray":
        matte = number(where, spec, "matte_ratio", default=1.0, low=1.0)
        if "spheres" in spec:
            spheres = []
            for i, item in enumerate(spec["spheres"]):
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
                        quantity(w, item, "radius", "length", required=True),
                        number(w, item, "surface_ratio", required=True, low=0.0),
                    )
                )
            return Huray(tuple(spheres), matte)
        radius = quantity(where, spec, "radius", "length", required=True)
        if "count" in spec:
            count = number(where, spec, "count", required=True, low=0.0)
            tile = spec.get("tile_area")
            if not isinstance(tile, str):
                raise LossLaneError(
                    f"{where}.tile_area = {tile!r}: give the flat tile area "
                    "that holds 'count' spheres, e.g. \"100 um^2\""
                )
            return Huray.from_counts(radius, count, parse_area(tile, f"{where}.tile_area"), matte)
        ratio = number(where, spec, "surface_ratio", required=True, low=0.0)
        return Huray.from_surface_ratio(radius, ratio, matte)
    rq = quantity(where, spec, "rq", "length", default=0.0)
    layers = []
    for i, item in enumerate(spec.get("layers", [])):
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
                thickness=quantity(w, item, "thickness", "length", required=True),
                mu_r=number(w, item, "mu_r", default=1.0, low=1.0),
                name=str(item.get("name", f"layer {i + 1}")),
            )
        )
    outside = number(where, spec, "outside_dk", default=1.0, low=1.0)
    return Graded(rq, tuple(layers), outside)


def parse_area(value: str, key: str) -> float:
    """An area written as a length unit squared: "100 um^2", "1e-10 m^2"."""
    import re

    from losslane.units import parse_length

    m = re.match(r"^\s*([0-9.eE+-]+)\s*([^\s^²]+)\s*(\^2|²)\s*$", value)
    if not m:
        raise LossLaneError(f'{key} = {value!r}: expected an area such as "100 um^2"')
    unit = parse_length(f"1 {m.group(2)}", key)
    return float(m.group(1)) * unit * unit


def read_toml(path: Path, what: str) -> dict:
    """The parsed TOML file at ``path``; a LossLaneError naming ``what`` and the path if it
    is missing or not valid TOML."""
    try:
        return tomllib.loads(path.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise LossLaneError(f"{what} {str(path)!r} does not exist") from None
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
        for name, spec in data.get("dielectrics", {}).items():
            where = f"{source} [dielectrics.{name}]"
            self.dielectrics[name] = dielectric_from_spec(name, spec, where)
            self.notes[f"dielectric:{name}"] = str(spec.get("note", ""))
            self.classes[name] = str(spec.get("class", ""))
        for name, spec in data.get("foils", {}).items():
            where = f"{source} [foils.{name}]"
            self.foils[name] = foil_from_spec(name, spec, where)
            self.notes[f"foil:{name}"] = str(spec.get("note", ""))


def load_library(extra: Iterable[Path | str] = ()) -> Library:
    """The bundled library (data/materials.toml, data/foils.toml), extended by ``extra``."""
    lib = Library()
    for fname in ("materials.toml", "foils.toml"):
        text_ = resources.files("losslane").joinpath("data", fname).read_text(encoding="utf-8")
        lib._load(tomllib.loads(text_), f"bundled {fname}")
    for path in extra:
        lib.extend(path)
    return lib

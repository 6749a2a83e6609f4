"""Cross-sections from user-written specs (scenario [lines.*] sections or `losslane line`
options): key checking, units, material lookup, then the model constructor.

New models register here: a kind, its geometry keys, and a constructor taking the parsed
lengths (metres), the dielectric and the metal.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass

from losslane.errors import LossLaneError
from losslane.materials.conductor import Conductor
from losslane.materials.dielectric import Dielectric
from losslane.materials.roughness import Roughness
from losslane.spec import check_keys, key_name, quantity, suggest, text
from losslane.units import OZ_COPPER, parse_conductivity
from losslane.xsection.base import CrossSection, Metal
from losslane.xsection.coplanar import Coplanar
from losslane.xsection.coupled import MicrostripPair, StriplinePair
from losslane.xsection.microstrip import Microstrip
from losslane.xsection.stripline import Stripline

#: keys every line spec may carry besides its geometry
COMMON_KEYS = (
    "kind",
    "thickness",
    "dielectric",
    "foil",
    "plane_foil",
    "plane_thickness",
    "conductivity",
    "solver",
    "note",
)
SOLVERS = ("closed-form", "field")


@dataclass(frozen=True)
class KindSpec:
    """A cross-section kind: required and optional geometry keys and its constructor."""

    required: tuple[str, ...]
    optional: tuple[str, ...]
    build: Callable[[dict[str, float], Dielectric, Metal], CrossSection]
    conductors: int = 1


KINDS: dict[str, KindSpec] = {
    "microstrip": KindSpec(
        ("width", "height"),
        (),
        lambda g, d, m: Microstrip(g["width"], g["height"], g["thickness"], d, m),
    ),
    "stripline": KindSpec(
        ("width", "below", "above"),
        (),
        lambda g, d, m: Stripline(g["width"], g["below"], g["above"], g["thickness"], d, m),
    ),
    "cpw": KindSpec(
        ("width", "gap", "height"),
        (),
        lambda g, d, m: Coplanar(g["width"], g["gap"], g["height"], g["thickness"], d, False, m),
    ),
    "gcpw": KindSpec(
        ("width", "gap", "height"),
        (),
        lambda g, d, m: Coplanar(g["width"], g["gap"], g["height"], g["thickness"], d, True, m),
    ),
    "microstrip-pair": KindSpec(
        ("width", "spacing", "height"),
        (),
        lambda g, d, m: MicrostripPair(g["width"], g["spacing"], g["height"], g["thickness"], d, m),
        conductors=2,
    ),
    "stripline-pair": KindSpec(
        ("width", "spacing", "below", "above"),
        (),
        lambda g, d, m: StriplinePair(
            g["width"], g["spacing"], g["below"], g["above"], g["thickness"], d, m
        ),
        conductors=2,
    ),
}

#: builders for ``solver = "field"``: kind -> same signature as KindSpec.build
FIELD_BUILDERS: dict[str, Callable[..., CrossSection]] = {}
#: extra keys the field solver accepts (registered by the field-solver package)
FIELD_KEYS: tuple[str, ...] = ()


def section_from_spec(
    spec: Mapping,
    where: str,
    dielectric: Callable[[str, str], Dielectric],
    foil: Callable[[str, str], Roughness],
) -> CrossSection:
    """Build a cross-section from ``spec``.

    ``dielectric(name, where)`` and ``foil(name, where)`` resolve material names (scenario
    sections first, then the library); a Dielectric or Roughness object may also be given
    directly in ``spec`` (the command line builds one from --dk/--df).
    """
    kind = text(where, spec, "kind", required=True)
    if kind not in KINDS:
        raise LossLaneError(
            f"{key_name(where, 'kind')} = {kind!r}: unknown line kind; {suggest(kind, KINDS)}"
        )
    ks = KINDS[kind]
    solver = text(where, spec, "solver", SOLVERS, "closed-form")
    extra = FIELD_KEYS if solver == "field" else ()
    check_keys(
        where,
        spec,
        COMMON_KEYS + ks.required + ks.optional + extra,
        required=ks.required + ("thickness", "dielectric"),
    )
    geometry: dict[str, float] = {}
    for key in ks.required + ks.optional + ("thickness",):
        if key in spec:
            geometry[key] = quantity(where, spec, key, "length")
            bad = geometry[key] < 0 if key == "thickness" else geometry[key] <= 0
            if bad:
                bound = ">= 0" if key == "thickness" else "> 0"
                raise LossLaneError(
                    f"{key_name(where, key)} = {spec[key]!r}: a {kind} needs {key} {bound}"
                )
    diel = spec["dielectric"]
    d = (
        diel
        if isinstance(diel, Dielectric)
        else dielectric(_name(where, spec, "dielectric"), key_name(where, "dielectric"))
    )
    metal = metal_from_spec(spec, where, foil)
    if solver == "field":
        if kind not in FIELD_BUILDERS:
            raise LossLaneError(
                f"{key_name(where, 'solver')} = 'field': the field solver is "
                f"not available for kind {kind!r}"
            )
        return FIELD_BUILDERS[kind](
            geometry, d, metal, _field_dielectrics(spec, where, dielectric), where
        )
    return ks.build(geometry, d, metal)


def metal_from_spec(spec: Mapping, where: str, foil: Callable[[str, str], Roughness]) -> Metal:
    def rough(key: str) -> Roughness | None:
        if key not in spec:
            return None
        v = spec[key]
        return (
            v if isinstance(v, Roughness) else foil(_name(where, spec, key), key_name(where, key))
        )

    sigma = 5.8e7
    if "conductivity" in spec:
        sigma = parse_conductivity(spec["conductivity"], key_name(where, "conductivity"))
    foil_ = rough("foil")
    kwargs = {
        "conductor": Conductor(sigma=sigma),
        "plane_foil": rough("plane_foil"),
        "plane_thickness": quantity(where, spec, "plane_thickness", "length", default=OZ_COPPER),
    }
    if foil_ is not None:
        kwargs["foil"] = foil_
    try:
        return Metal(**kwargs)
    except LossLaneError as exc:
        raise LossLaneError(f"{where}: {exc}") from None


def _name(where: str, spec: Mapping, key: str) -> str:
    v = spec[key]
    if not isinstance(v, str):
        raise LossLaneError(f"{key_name(where, key)} = {v!r}: expected a name")
    return v


#: extra keys of the field solver whose values name dielectrics (resolved like "dielectric")
FIELD_DIELECTRIC_KEYS: tuple[str, ...] = ()


def _field_dielectrics(
    spec: Mapping, where: str, dielectric: Callable[[str, str], Dielectric]
) -> dict:
    out = dict(spec)
    for key in FIELD_DIELECTRIC_KEYS:
        if key in out and not isinstance(out[key], Dielectric):
            out[key] = dielectric(_name(where, spec, key), key_name(where, key))
    return out


def _field_builder(kind: str) -> Callable[..., CrossSection]:
    """The field solver's builder for ``kind``, imported on first use (start-up time)."""

    def build(*args):
        from losslane.xsection.fieldsolve.builders import BUILDERS

        return BUILDERS[kind](*args)

    return build


def _register_field_solver() -> None:
    """Builders and extra keys of the 2-D field solver (xsection/fieldsolve/)."""
    global FIELD_KEYS, FIELD_DIELECTRIC_KEYS
    from losslane.xsection.fieldsolve import keys

    FIELD_BUILDERS.update({kind: _field_builder(kind) for kind in keys.KINDS})
    FIELD_KEYS = tuple(dict.fromkeys(FIELD_KEYS + keys.EXTRA_KEYS))
    FIELD_DIELECTRIC_KEYS = tuple(dict.fromkeys(FIELD_DIELECTRIC_KEYS + keys.DIELECTRIC_KEYS))


_register_field_solver()

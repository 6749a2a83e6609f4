"""Cross-sections from user-written specs (scenario [lines.*] sections, `losslane line`
options, api keywords): key checking, units, material lookup, then the model class the
registry names. Nothing here is specific to a kind: the class says which keys it takes.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping

from losslane.errors import LossLaneError
from losslane.materials.conductor import Conductor
from losslane.materials.dielectric import Dielectric
from losslane.materials.roughness import Roughness
from losslane.spec import Where, check_keys, key_name, quantity, text
from losslane.units import OZ_COPPER, parse_conductivity
from losslane.xsection import registry
from losslane.xsection.base import CrossSection, Metal
from losslane.xsection.fieldsolve.keys import DIELECTRIC_KEYS, EXTRA_KEYS

#: keys every line spec may carry besides its kind and dimensions
MATERIAL_KEYS = (
    "dielectric",
    "foil",
    "plane_foil",
    "plane_thickness",
    "conductivity",
    "solver",
)
#: a free-text remark, accepted in files (not a command-line option)
NOTE_KEY = "note"
SOLVERS = ("closed-form", "field")


def spec_keys(cls: type[CrossSection], solver: str = "closed-form") -> tuple[str, ...]:
    """The keys a spec of kind ``cls`` accepts (without the note)."""
    extra = EXTRA_KEYS if solver == "field" else ()
    return ("kind",) + cls.spec_keys() + MATERIAL_KEYS + extra


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
    cls = registry.model(kind, key_name(where, "kind"))
    solver = text(where, spec, "solver", SOLVERS, getattr(cls, "default_solver", "closed-form"))
    cli = isinstance(where, Where) and where.cli
    if cli and not getattr(cls, "command_line", True):
        raise LossLaneError(
            f"{where}: kind {kind!r} is described in a scenario file ([lines.NAME]); its "
            "keys have no command-line options"
        )
    allowed = spec_keys(cls, solver) + (() if cli else (NOTE_KEY,))
    check_keys(where, spec, allowed, required=cls.spec_keys() + ("dielectric",))
    geometry = cls.dimensions_from_spec(spec, where)
    diel = spec["dielectric"]
    d = (
        diel
        if isinstance(diel, Dielectric)
        else dielectric(_name(where, spec, "dielectric"), key_name(where, "dielectric"))
    )
    metal = metal_from_spec(spec, where, foil)
    own = getattr(cls, "from_spec_parts", None)
    if own is not None:  # kinds that make their own section (groups of traces)
        return own(geometry, d, metal, _field_dielectrics(spec, where, dielectric), where, solver)
    if solver == "field":
        if not cls.solvable():
            raise LossLaneError(
                f"{key_name(where, 'solver')} = 'field': the field solver is "
                f"not available for kind {kind!r}"
            )
        from losslane.xsection.fieldsolve.options import field_section

        return field_section(
            cls, geometry, d, metal, _field_dielectrics(spec, where, dielectric), where
        )
    return cls(**geometry, dielectric=d, metal=metal)


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


def _field_dielectrics(
    spec: Mapping, where: str, dielectric: Callable[[str, str], Dielectric]
) -> dict:
    """``spec`` with the field solver's dielectric names resolved to objects."""
    out = dict(spec)
    for key in DIELECTRIC_KEYS:
        if key in out and not isinstance(out[key], Dielectric):
            out[key] = dielectric(_name(where, spec, key), key_name(where, key))
    return out


__all__ = ["MATERIAL_KEYS", "SOLVERS", "metal_from_spec", "section_from_spec", "spec_keys"]

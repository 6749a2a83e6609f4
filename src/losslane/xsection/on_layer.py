"""A line placed on a stackup layer -> its cross-section, and which model it used.

``[lines.x]`` with ``layer = "L3"`` (and ``stackup = "NAME"`` when the scenario has
several) takes its vertical dimensions from the stackup instead of ``height`` /
``below`` / ``above``: the kind the user writes must agree with the layer's place -- a
kind routed on an outer layer (``outer_layer`` of its class: microstrip, gcpw and their
pairs) over the nearest plane under an outer copper layer (or over it, for the bottom
layer), a kind between two planes (stripline and its pair) on an inner layer between the
nearest plane above and below (offset when the two distances differ). Distances are face
to face (``stackup.Placement``); the trace's ``thickness``, its ``foil``, the planes'
foil and thickness (the thinner of two planes) and the dielectric(s) come from the stackup
unless the line gives them; a given ``dielectric`` replaces the stackup's laminate
around this line. Mixing ``layer`` with explicit heights is an error.

The model: where one laminate fills everything between the trace and its plane(s) and
no mask covers it, the kind's closed form, built exactly as from the explicit keys (the
same object, so the same S-parameters). Where several dielectrics lie there (core and
prepreg of different Dk, sheets of different laminates), or a solder mask covers an
outer layer, the line goes to the 2-D field solver with the stackup's layers
(``fieldsolve.layouts.LayerStack``), and :class:`LineModel` says so and why. Another
copper layer between the trace and its plane (a signal layer the line's field passes)
is taken as filled with the dielectric its ``fill`` names (the copper of other nets is
not modelled), and the notes say so.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Callable, Mapping
from dataclasses import dataclass

from losslane.errors import LossLaneError
from losslane.limits import check_dimension
from losslane.materials.dielectric import Dielectric
from losslane.materials.roughness import Roughness
from losslane.spec import check_keys, key_name, quantity, text
from losslane.stackup import Placement, StackLayer, Stackup, choose
from losslane.units import MIL
from losslane.xsection import registry
from losslane.xsection.base import MAY_BE_ZERO, CrossSection
from losslane.xsection.factory import MATERIAL_KEYS, NOTE_KEY, SOLVERS, metal_from_spec
from losslane.xsection.fieldsolve.keys import EXTRA_KEYS

#: the keys a stackup layer replaces
VERTICAL = ("height", "below", "above")
#: keys of a line on a layer
LAYER_KEYS = ("layer", "stackup")
#: field-solver keys the stackup supplies (a line on a layer may not give them)
FROM_STACKUP = ("coating_thickness", "coating_dielectric", "dielectric_above")
#: field-solver keys a line on a layer may give (they take the field solver)
FIELD_ONLY = tuple(k for k in EXTRA_KEYS if k not in FROM_STACKUP)

SOLVER_NAMES = {"closed-form": "closed form", "field": "2-D field solver"}


@dataclass(frozen=True)
class LineModel:
    """What a build reports about one ``[lines.*]`` section: its kind, the model used
    (``solver``: "closed-form" or "field"), the stackup layer it sits on (None: written
    with explicit heights) and notes (where it sits, why the field solver, which copper
    layers were taken as filled)."""

    name: str
    kind: str
    solver: str
    stackup: str | None = None
    layer: str | None = None
    notes: tuple[str, ...] = ()

    def to_json(self) -> dict:
        return {
            "name": self.name,
            "kind": self.kind,
            "solver": self.solver,
            "stackup": self.stackup,
            "layer": self.layer,
            "notes": list(self.notes),
        }

    def text(self) -> str:
        where = "" if self.layer is None else f" on {self.layer}"
        head = f"{self.name}: {self.kind}{where}, {SOLVER_NAMES[self.solver]}"
        return "; ".join([head, *self.notes])


def solver_of(section: CrossSection) -> str:
    """ "field" for a field-solved section, else "closed-form"."""
    return "field" if hasattr(section, "solver_report") else "closed-form"


def line_model(name: str, section: CrossSection) -> LineModel:
    """The report of a line written with explicit heights."""
    return LineModel(name, section.kind, solver_of(section))


def on_layer(spec: Mapping) -> bool:
    """Whether a ``[lines.*]`` spec places its line on a stackup layer."""
    return any(k in spec for k in LAYER_KEYS)


def section_on_layer(
    name: str,
    spec: Mapping,
    where: str,
    stackups: Mapping[str, Stackup],
    dielectric: Callable[[str, str], Dielectric],
    foil: Callable[[str, str], Roughness],
) -> tuple[CrossSection, LineModel]:
    """The cross-section of the line ``name`` whose ``spec`` names a stackup ``layer``,
    and its report (see the module docstring)."""
    kind = text(where, spec, "kind", required=True)
    cls = registry.model(kind, key_name(where, "kind"))
    mixed = [k for k in VERTICAL if k in spec]
    if mixed:
        raise LossLaneError(
            f"{key_name(where, mixed[0])}: a line with layer = ... takes its heights from the "
            f"stackup; give either layer or {', '.join(k for k in VERTICAL if k in cls.dimensions)}"
            ", not both"
        )
    given = [k for k in FROM_STACKUP if k in spec]
    if given:
        raise LossLaneError(
            f"{key_name(where, given[0])}: on a stackup layer the solder mask and the "
            "dielectrics above and below come from the stackup's layers; change the stackup"
        )
    if "layer" not in spec:
        raise LossLaneError(
            f"{key_name(where, 'stackup')}: a line on a stackup also needs layer = "
            '"NAME" (the signal layer it is routed on)'
        )
    in_plane = tuple(k for k in cls.spec_keys() if k not in VERTICAL)
    allowed = ("kind",) + in_plane + LAYER_KEYS + MATERIAL_KEYS + FIELD_ONLY + (NOTE_KEY,)
    check_keys(where, spec, allowed, required=tuple(k for k in in_plane if k != "thickness"))
    st = choose(stackups, spec.get("stackup"), key_name(where, "stackup"), where)
    pl = st.place(spec["layer"], key_name(where, "layer"))
    _check_family(cls, pl, where)

    dims: dict[str, float] = {}
    for key in cls.dimensions:
        if key in VERTICAL:
            continue
        if key == "thickness" and key not in spec:
            dims[key] = pl.layer.thickness
            continue
        v = quantity(where, spec, key, "length", required=True)
        if v < 0 if key in MAY_BE_ZERO else v <= 0:
            bound = ">= 0" if key in MAY_BE_ZERO else "> 0"
            raise LossLaneError(f"{key_name(where, key)} = {spec[key]!r}: {key} must be {bound}")
        check_dimension(v, key_name(where, key), spec[key], key in MAY_BE_ZERO)
        dims[key] = v
    if cls.outer_layer:
        dims["height"] = pl.distance_below if pl.outer == "top" else pl.distance_above
    else:
        dims["below"], dims["above"] = pl.distance_below, pl.distance_above
    dims = {k: dims[k] for k in cls.dimensions}

    own = None
    if "dielectric" in spec:
        d = spec["dielectric"]
        if not isinstance(d, str):
            raise LossLaneError(f"{key_name(where, 'dielectric')} = {d!r}: expected a name")
        own = dielectric(d, key_name(where, "dielectric"))
    notes: list[str] = [_where_text(cls, pl)]
    below, above = _sheets(pl, own, notes)
    side = below if (not cls.outer_layer or pl.outer == "top") else above
    main = side[0].dielectric
    metal = _metal(spec, where, foil, pl)

    reasons = []
    if pl.mask is not None:
        reasons.append(
            f"solder mask {pl.mask.name!r} ({pl.mask.dielectric.name}) covers the outer layer"
        )
    sheets = list(side) if cls.outer_layer else list(below) + list(above)
    kinds = list(dict.fromkeys(s.dielectric for s in sheets))
    if len(kinds) > 1:
        listed = ", ".join(f"{s.name} {s.dielectric.name}" for s in sheets)
        reasons.append(f"different dielectrics between the trace and its plane(s): {listed}")
    wanted = text(where, spec, "solver", SOLVERS, None)
    if getattr(cls, "default_solver", "closed-form") == "field":  # no closed form (groups)
        if wanted == "closed-form":
            raise LossLaneError(
                f"{key_name(where, 'solver')} = 'closed-form': kind {kind!r} has no closed "
                "form; it is solved by the field solver (leave solver out)"
            )
        reasons.append(f"kind {kind!r} has no closed form")
    if wanted == "closed-form" and reasons:
        raise LossLaneError(
            f"{key_name(where, 'solver')} = 'closed-form': no closed form models this line "
            f"({'; '.join(reasons)}); leave solver out (the field solver is used), or give "
            "dielectric = NAME to treat the laminate around it as one material"
        )
    use_field = bool(reasons) or wanted == "field"
    if not use_field:
        extra = [k for k in FIELD_ONLY if k in spec]
        if extra:
            raise LossLaneError(
                f"{key_name(where, extra[0])}: a key of the field solver, but this line "
                'uses its closed form; add solver = "field" to use it'
            )
        section = cls(**dims, dielectric=main, metal=metal)
        model = LineModel(name, cls.kind, "closed-form", st.name, pl.layer.name, tuple(notes))
        return section, model
    if not cls.solvable():
        raise LossLaneError(
            f"{key_name(where, 'kind')} = {kind!r}: the field solver has no layout for this "
            f"kind, which this line needs ({'; '.join(reasons)})"
        )
    section = _field_section(cls, dims, main, metal, spec, where, pl, below, above)
    why = reasons or ['solver = "field" given']
    notes.append("field solver: " + "; ".join(why))
    model = LineModel(name, cls.kind, "field", st.name, pl.layer.name, tuple(notes))
    return section, model


def _check_family(cls: type[CrossSection], pl: Placement, where: str) -> None:
    """The kind must fit the layer's place; an error naming both otherwise."""
    st, ly = pl.stackup, pl.layer
    grounded = getattr(cls, "grounded", True)
    if cls.outer_layer and not grounded:
        raise LossLaneError(
            f"{key_name(where, 'kind')} = {cls.kind!r}: this kind has no plane under it; on "
            f"a stackup layer ({ly.name!r} of {st.label}) the coplanar line over a plane is "
            "'gcpw'"
        )
    fits = cls.outer_layer == (pl.outer is not None)
    vertical = ("height",) if cls.outer_layer else ("below", "above")
    if fits and all(k in cls.dimensions for k in vertical):
        return
    if pl.outer:
        place = (
            f"an outer ({pl.outer}) layer of {st.label} over plane "
            f"{(pl.plane_below or pl.plane_above).name!r}"
        )
    else:
        place = (
            f"an inner layer of {st.label} between planes {pl.plane_above.name!r} and "
            f"{pl.plane_below.name!r}"
        )
    family = [
        m.kind
        for m in registry.MODELS
        if m.n_conductors == cls.n_conductors
        and m.outer_layer == (pl.outer is not None)
        and getattr(m, "grounded", True)
    ]
    hint = f"; kinds that fit there: {', '.join(family)}" if family else ""
    routed = "on an outer layer over one plane" if cls.outer_layer else "between two planes"
    raise LossLaneError(
        f"{key_name(where, 'kind')} = {cls.kind!r} is routed {routed}, but "
        f"{key_name(where, 'layer')} = {ly.name!r} is {place}{hint}"
    )


def _where_text(cls: type[CrossSection], pl: Placement) -> str:
    st = f"{pl.layer.name} of {pl.stackup.label}"
    if pl.outer == "top":
        return f"{st}: over plane {pl.plane_below.name} ({pl.distance_below / MIL:.4g} mil)"
    if pl.outer == "bottom":
        return f"{st}: under plane {pl.plane_above.name} ({pl.distance_above / MIL:.4g} mil)"
    lo, hi = pl.distance_below, pl.distance_above
    off = "centred" if abs(lo - hi) <= 1e-9 * (lo + hi) else "offset"
    return (
        f"{st}: {off} between planes {pl.plane_above.name} "
        f"({hi / MIL:.4g} mil above) and {pl.plane_below.name} ({lo / MIL:.4g} mil below)"
    )


def _sheets(pl: Placement, own: Dielectric | None, notes: list[str]) -> tuple:
    """The field solver's layers below and above the trace (nearest first), copper layers
    in between filled with their adjacent dielectric (said in ``notes``); ``own`` replaces
    every laminate."""
    from losslane.xsection.fieldsolve.geometry import Layer

    st = pl.stackup

    def sheet(ly: StackLayer) -> Layer:
        if ly.copper:
            fill = st.fill_dielectric(ly)
            d = own or fill.dielectric
            notes.append(
                f"copper layer {ly.name} between the trace and its plane is taken as filled "
                f"with {fill.name}'s dielectric ({d.name})"
            )
            return Layer(ly.thickness, d, ly.name)
        return Layer(ly.thickness, own or ly.dielectric, ly.name)

    return tuple(sheet(x) for x in pl.below), tuple(sheet(x) for x in pl.above)


def _metal(spec: Mapping, where: str, foil, pl: Placement):
    """The metal of the line: the user's keys, else the stackup's copper."""
    metal = metal_from_spec(spec, where, foil)
    planes = [p for p in (pl.plane_below, pl.plane_above) if p is not None]
    dist = {id(pl.plane_below): pl.distance_below, id(pl.plane_above): pl.distance_above}
    nearest = min(planes, key=lambda p: dist[id(p)])
    changes: dict = {}
    if "foil" not in spec and pl.layer.foil is not None:
        changes["foil"] = pl.layer.foil
    if "plane_foil" not in spec and nearest.foil is not None:
        changes["plane_foil"] = nearest.foil
    if "plane_thickness" not in spec:
        changes["plane_thickness"] = min(p.thickness for p in planes)
    return dataclasses.replace(metal, **changes) if changes else metal


def _field_section(cls, dims, main, metal, spec, where, pl: Placement, below, above):
    from losslane.xsection.fieldsolve.geometry import Coating
    from losslane.xsection.fieldsolve.layouts import LayerStack
    from losslane.xsection.fieldsolve.options import field_options
    from losslane.xsection.fieldsolve.section import FieldSection

    if cls.outer_layer:
        stack = LayerStack(below if pl.outer == "top" else above)
    else:
        stack = LayerStack(below, above, pl.layer.fill == "below")
    coating = None if pl.mask is None else Coating(pl.mask.thickness, pl.mask.dielectric)
    own = getattr(cls, "from_spec_parts", None)
    if own is not None:  # a kind that makes its own section (groups of traces)
        # the kind's own keys (a list of traces) read from the spec, its lengths the layer's
        written = {**spec, **{k: f"{v!r} m" for k, v in dims.items()}}
        parts = {**cls.dimensions_from_spec(written, where), **dims}
        section = own(parts, main, metal, spec, where, "field")
        options = dataclasses.replace(section.options, stack=stack, coating=coating)
        section = dataclasses.replace(section, options=options)
        try:
            _ = section.geometry  # overlapping or misplaced traces are input errors now
        except LossLaneError as exc:
            raise LossLaneError(f"{where}: {exc}") from None
        return section
    options, accuracy = field_options(cls, dims, main, spec, where)
    options = dataclasses.replace(options, stack=stack, coating=coating)
    return FieldSection.from_model(cls, dims, options, metal, accuracy)


__all__ = ["LineModel", "line_model", "on_layer", "section_on_layer", "solver_of"]

"""A board's stackup: its layers from top to bottom, checked, and "where is layer X".

A scenario (or a library file, so several scenarios share one board) describes a board as
``[stackup]``, or several boards as ``[stackups.NAME]``, each a list of ``layers`` from the
top face down. Every layer is a table with a ``name`` (the user's: "L1", "core3", ...)
and exactly one of

* ``conductor = "signal" | "plane"``: a copper layer with ``thickness`` (a length, or a
  copper weight such as "1 oz", which is a length too) or ``weight`` (the same in oz,
  e.g. "0.5 oz"), an optional ``foil`` (its roughness; default smooth) and ``fill`` =
  "above" | "below" (default "above"): which adjacent dielectric flows around this
  layer's traces (inner layers; the traces of an outer layer have air or the mask around
  them);
* ``dielectric = NAME``: a core or prepreg of ``thickness``, measured face to face
  between the adjacent copper layers;
* ``mask = NAME``: a solder mask on the outside (the first or the last layer, next to an
  outer copper layer) of ``thickness`` over the laminate, NAME its dielectric (e.g.
  "solder-mask").

Any layer may carry a free-text ``note``. The checks (each error names the stackup and
the layer): names unique and non-empty, thicknesses > 0, copper layers never adjacent
(a dielectric between every two), the copper stack begins and ends with copper, masks
only on the outside, at least one plane. Several dielectric layers in a row are allowed
(two prepreg plies of different resin content).

Positions: ``depth`` runs down from the top face of the top copper layer (a top mask
has negative depths). A line on a layer is placed by :meth:`Stackup.place`, which finds
its reference plane(s) and the layers between (see :class:`Placement`).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass

from losslane.errors import LossLaneError
from losslane.materials.dielectric import Dielectric
from losslane.materials.roughness import Roughness
from losslane.spec import check_keys, dimension, suggest, text
from losslane.units import OZ_COPPER

#: the name of the unnamed ``[stackup]`` (named ones are ``[stackups.NAME]``)
DEFAULT = ""
CONDUCTORS = ("signal", "plane")
FILLS = ("above", "below")
ROLES = ("conductor", "dielectric", "mask")
_KEYS = {
    "conductor": ("name", "conductor", "thickness", "weight", "foil", "fill", "note"),
    "dielectric": ("name", "dielectric", "thickness", "note"),
    "mask": ("name", "mask", "thickness", "note"),
}


def section_name(name: str) -> str:
    """How a stackup is written in the scenario: ``[stackup]`` or ``[stackups.NAME]``."""
    return "[stackup]" if name == DEFAULT else f"[stackups.{name}]"


@dataclass(frozen=True)
class StackLayer:
    """One layer: ``role`` is "signal", "plane", "dielectric" or "mask"; ``dielectric``
    the material of a dielectric or mask layer; ``foil`` a copper layer's roughness (None:
    not given); ``fill`` which adjacent dielectric fills a copper layer's gaps."""

    name: str
    role: str
    thickness: float
    index: int
    dielectric: Dielectric | None = None
    foil: Roughness | None = None
    fill: str = "above"

    @property
    def copper(self) -> bool:
        return self.role in CONDUCTORS

    def describe(self) -> str:
        if self.copper:
            return f"{self.name!r} ({self.role} copper)"
        what = "solder mask" if self.role == "mask" else "dielectric"
        return f"{self.name!r} ({what} {self.dielectric.name!r})" if self.dielectric else self.name


@dataclass(frozen=True)
class Placement:
    """Where a trace on copper layer ``layer`` sits and what surrounds it.

    ``outer``: "top" or "bottom" for an outer copper layer, None for an inner one.
    ``plane_below`` / ``plane_above``: the nearest plane on each side (None: none there).
    ``below`` / ``above``: the layers between the trace's layer and that plane, nearest
    first (dielectrics, and any other copper layers in between); for an outer layer the
    side facing away from the board is empty. ``mask``: the solder mask over an outer
    layer's traces. Distances are face to face: ``distance_below`` from the layer's
    lower face to the plane's upper face, ``distance_above`` likewise upward.
    """

    stackup: Stackup
    layer: StackLayer
    outer: str | None
    plane_below: StackLayer | None
    plane_above: StackLayer | None
    below: tuple[StackLayer, ...]
    above: tuple[StackLayer, ...]
    mask: StackLayer | None

    @property
    def distance_below(self) -> float:
        return float(sum(ly.thickness for ly in self.below))

    @property
    def distance_above(self) -> float:
        return float(sum(ly.thickness for ly in self.above))


@dataclass(frozen=True)
class Stackup:
    """A checked stackup (see the module docstring); ``layers`` top to bottom."""

    name: str
    layers: tuple[StackLayer, ...]
    source: str = ""

    @property
    def label(self) -> str:
        """``[stackup]`` or ``[stackups.NAME]``, with the library file it came from."""
        return section_name(self.name) + (f" of {self.source}" if self.source else "")

    @property
    def copper(self) -> tuple[StackLayer, ...]:
        return tuple(ly for ly in self.layers if ly.copper)

    @property
    def thickness(self) -> float:
        """The board from the top copper's top face to the bottom copper's bottom face
        (masks excluded)."""
        cu = self.copper
        return self.depth_bottom(cu[-1].name) - self.depth_top(cu[0].name)

    def layer(self, name: object, key: str) -> StackLayer:
        """The layer called ``name``; an error naming ``key`` and the known layers."""
        for ly in self.layers:
            if ly.name == name:
                return ly
        raise LossLaneError(
            f"{key} = {name!r}: {self.label} has no such layer; "
            f"{suggest(str(name), [ly.name for ly in self.layers])}"
        )

    def depth_top(self, name: str) -> float:
        """Depth of the layer's top face below the top copper's top face (m)."""
        first = next(i for i, ly in enumerate(self.layers) if ly.copper)
        i = next(i for i, ly in enumerate(self.layers) if ly.name == name)
        if i < first:
            return -float(sum(ly.thickness for ly in self.layers[i:first]))
        return float(sum(ly.thickness for ly in self.layers[first:i]))

    def depth_bottom(self, name: str) -> float:
        return self.depth_top(name) + self.layer(name, "layer").thickness

    def depth_centre(self, name: str) -> float:
        return self.depth_top(name) + 0.5 * self.layer(name, "layer").thickness

    def neighbour(self, ly: StackLayer, side: str) -> StackLayer | None:
        """The layer directly above (``side`` = "above") or below ``ly``."""
        i = ly.index + (-1 if side == "above" else 1)
        return self.layers[i] if 0 <= i < len(self.layers) else None

    def fill_dielectric(self, ly: StackLayer) -> StackLayer:
        """The dielectric layer that fills copper layer ``ly``'s gaps: its ``fill`` side,
        or the other side where that is outside the laminate (an outer layer)."""
        for side in (ly.fill, "below" if ly.fill == "above" else "above"):
            nb = self.neighbour(ly, side)
            if nb is not None and nb.role == "dielectric":
                return nb
        raise AssertionError(ly)  # a checked stackup has a dielectric next to every copper

    def place(self, name: object, key: str) -> Placement:
        """Where a trace on layer ``name`` sits: an error naming ``key`` unless it is a
        signal layer with a reference plane on each inner side."""
        ly = self.layer(name, key)
        if ly.role != "signal":
            signals = ", ".join(x.name for x in self.layers if x.role == "signal")
            what = "a plane" if ly.role == "plane" else f"a {ly.role} layer"
            raise LossLaneError(
                f"{key} = {ly.name!r}: in {self.label} {ly.name!r} is {what}; a line "
                f"is routed on a signal layer ({signals})"
            )
        cu = self.copper
        outer = "top" if ly is cu[0] else "bottom" if ly is cu[-1] else None
        below, plane_below = self._walk(ly, +1)
        above, plane_above = self._walk(ly, -1)
        mask = None
        if outer == "top":
            above, plane_above = (), None
            mask = self.layers[0] if self.layers[0].role == "mask" else None
        elif outer == "bottom":
            below, plane_below = (), None
            mask = self.layers[-1] if self.layers[-1].role == "mask" else None
        missing = [
            side
            for side, plane in (("below", plane_below), ("above", plane_above))
            if plane is None
            and not (outer == "top" and side == "above")
            and not (outer == "bottom" and side == "below")
        ]
        if missing:
            side = missing[0]
            where = "an outer layer" if outer else "an inner layer"
            raise LossLaneError(
                f"{key} = {ly.name!r}: {ly.name!r} is {where} of {self.label} with no plane "
                f"{side} it; a line needs a reference plane on each side facing the board "
                "(microstrip: the nearest plane under an outer layer; stripline: a plane "
                "above and below)"
            )
        return Placement(self, ly, outer, plane_below, plane_above, below, above, mask)

    def _walk(self, ly: StackLayer, step: int) -> tuple[tuple[StackLayer, ...], StackLayer | None]:
        """The layers from ``ly`` toward the next plane (down: step +1), and that plane."""
        out = []
        i = ly.index + step
        while 0 <= i < len(self.layers):
            nxt = self.layers[i]
            if nxt.role == "plane":
                return tuple(out), nxt
            if nxt.role == "mask":
                break
            out.append(nxt)
            i += step
        return tuple(out), None


Resolver = Callable[[str, str], object]


def parse_stackup(
    name: str, spec: object, resolve_dielectric: Resolver, resolve_foil: Resolver, source: str = ""
) -> Stackup:
    """One ``[stackup]`` / ``[stackups.NAME]`` table -> a checked :class:`Stackup`.

    ``resolve_dielectric(name, where)`` and ``resolve_foil(name, where)`` turn material
    names into objects (the scenario's own sections first, then the library)."""
    where = (f"{source} " if source else "") + section_name(name)
    if not isinstance(spec, Mapping):
        raise LossLaneError(f"{where}: expected a table with layers = [ ... ]")
    check_keys(where, spec, ("layers", "note"), required=("layers",))
    raw = spec["layers"]
    if not isinstance(raw, list) or not raw:
        raise LossLaneError(
            f"{where}.layers: expected a list of layer tables, top to bottom, e.g. "
            '[{ name = "L1", conductor = "signal", thickness = "1.4 mil" }, ...]'
        )
    layers: list[StackLayer] = []
    seen: dict[str, int] = {}
    for i, entry in enumerate(raw):
        lw = f"{where} layer #{i + 1}"
        if not isinstance(entry, Mapping):
            raise LossLaneError(f"{lw}: expected a table, e.g. {{ name = ..., ... }}")
        if "name" not in entry:
            raise LossLaneError(f'{lw}: missing name (every layer needs one, e.g. name = "L1")')
        lname = entry["name"]
        if not isinstance(lname, str) or not lname.strip():
            raise LossLaneError(f"{lw}.name = {lname!r}: every layer needs a name (text)")
        lw = f"{where} layer {lname!r}"
        if lname in seen:
            raise LossLaneError(
                f"{lw}: the name is used twice (layers #{seen[lname] + 1} and #{i + 1}); "
                "layer names must be unique"
            )
        seen[lname] = i
        roles = [r for r in ROLES if r in entry]
        if len(roles) != 1:
            raise LossLaneError(
                f'{lw}: give exactly one of conductor ("signal" | "plane"), dielectric '
                "(a dielectric name) or mask (a dielectric name); found "
                f"{', '.join(roles) or 'none'}"
            )
        role = roles[0]
        check_keys(lw, entry, _KEYS[role])
        layers.append(_layer(lw, lname, role, entry, i, resolve_dielectric, resolve_foil))
    st = Stackup(name, tuple(layers), source)
    _check_order(st, where)
    return st


def _layer(
    lw: str,
    lname: str,
    role: str,
    entry: Mapping,
    i: int,
    resolve_dielectric: Resolver,
    resolve_foil: Resolver,
) -> StackLayer:
    if role == "conductor":
        kind = text(lw, entry, "conductor", CONDUCTORS, required=True)
        if ("thickness" in entry) == ("weight" in entry):
            raise LossLaneError(
                f'{lw}: give one of thickness (e.g. "1.4 mil") or weight (copper weight, '
                'e.g. "1 oz")'
            )
        if "weight" in entry:
            w = entry["weight"]
            if not (isinstance(w, str) and w.strip().endswith("oz")):
                raise LossLaneError(
                    f'{lw}.weight = {w!r}: expected a copper weight in oz, e.g. "0.5 oz" '
                    f"(1 oz = {OZ_COPPER * 1e6:g} um, common practice)"
                )
        key = "thickness" if "thickness" in entry else "weight"
        # a board dimension (1 nm .. 1 m); zero passes here so that its message says > 0
        t = dimension(lw, entry, key, required=True, zero_ok=True)
        _positive(lw, key, entry[key], t)
        foil = None
        if "foil" in entry:
            f = entry["foil"]
            if not isinstance(f, str):
                raise LossLaneError(f"{lw}.foil = {f!r}: expected a foil name")
            foil = resolve_foil(f, f"{lw}.foil")
        fill = text(lw, entry, "fill", FILLS, "above")
        return StackLayer(lname, kind, t, i, foil=foil, fill=fill)
    d = entry[role]
    if not isinstance(d, str):
        raise LossLaneError(f"{lw}.{role} = {d!r}: expected a dielectric name")
    diel = resolve_dielectric(d, f"{lw}.{role}")
    if "thickness" not in entry:
        raise LossLaneError(f'{lw}: missing thickness (a length, e.g. "3.5 mil")')
    t = dimension(lw, entry, "thickness", required=True, zero_ok=True)
    _positive(lw, "thickness", entry["thickness"], t)
    return StackLayer(lname, role, t, i, dielectric=diel)


def _positive(lw: str, key: str, raw: object, value: float) -> None:
    if not value > 0:
        raise LossLaneError(f"{lw}.{key} = {raw!r}: a layer's thickness must be > 0")


def _check_order(st: Stackup, where: str) -> None:
    layers = st.layers
    for k, ly in enumerate(layers):
        if ly.role != "mask":
            continue
        if 0 < k < len(layers) - 1:
            raise LossLaneError(
                f"{where} layer {ly.name!r}: a solder mask goes on the outside, as the first "
                f"(top) or the last (bottom) layer; it is layer #{k + 1} of {len(layers)}"
            )
        nb = layers[1] if k == 0 else layers[-2] if len(layers) > 1 else None
        if nb is None or not nb.copper:
            shown = "nothing" if nb is None else nb.describe()
            raise LossLaneError(
                f"{where} layer {ly.name!r}: a solder mask covers an outer copper layer, but "
                f"next to it is {shown}"
            )
    inner = [ly for ly in layers if ly.role != "mask"]
    if not inner or not inner[0].copper or not inner[-1].copper:
        end = "top" if not inner or not inner[0].copper else "bottom"
        shown = inner[0] if end == "top" and inner else inner[-1] if inner else None
        raise LossLaneError(
            f"{where}: the {end} of the laminate must be a copper layer (a signal or plane), "
            f"found {shown.describe() if shown else 'no layer'}; the stack runs copper, "
            "dielectric, copper, ... from top to bottom (masks outside)"
        )
    for a, b in zip(inner[:-1], inner[1:], strict=True):
        if a.copper and b.copper:
            raise LossLaneError(
                f"{where} layers {a.name!r} and {b.name!r}: two copper layers are adjacent; "
                "put a dielectric layer (core or prepreg) between them"
            )
    if not any(ly.role == "plane" for ly in layers):
        raise LossLaneError(
            f"{where}: no plane layer; a line needs a reference plane (give at least one "
            'conductor = "plane")'
        )


def parse_stackups(
    data: Mapping,
    where: str,
    resolve_dielectric: Resolver,
    resolve_foil: Resolver,
    source: str = "",
) -> dict[str, Stackup]:
    """The ``stackup`` and ``stackups`` tables of a scenario or a library file."""
    out: dict[str, Stackup] = {}
    if "stackup" in data:
        out[DEFAULT] = parse_stackup(
            DEFAULT, data["stackup"], resolve_dielectric, resolve_foil, source
        )
    named = data.get("stackups", {})
    if not isinstance(named, Mapping):
        raise LossLaneError(f"{where}: [stackups] expects named tables, e.g. [stackups.host]")
    for name, spec in named.items():
        out[name] = parse_stackup(name, spec, resolve_dielectric, resolve_foil, source)
    return out


def board_stackups(
    data: Mapping, library, resolve_dielectric: Resolver, resolve_foil: Resolver
) -> dict[str, Stackup]:
    """The stackups a scenario (or a sweep plan) ``data`` sees: its library files' (``library``:
    a ``materials.library.Library``), overridden by its own of the same name."""
    out = {
        name: parse_stackup(name, spec, resolve_dielectric, resolve_foil, source)
        for name, (spec, source) in library.stackups.items()
    }
    out.update(parse_stackups(data, "scenario", resolve_dielectric, resolve_foil))
    return out


def choose(stackups: Mapping[str, Stackup], name: object, key: str, user: str) -> Stackup:
    """The stackup a line or via uses: ``name`` (its ``stackup`` key; None: not given) ->
    the named one, else the unnamed ``[stackup]``, else the only one. ``user`` names what
    asks (for messages)."""
    if name is not None:
        if not isinstance(name, str) or name not in stackups:
            known = [section_name(n) for n in stackups]
            raise LossLaneError(
                f"{key} = {name!r}: no such stackup; "
                + (f"known: {', '.join(known)}" if known else "the scenario has none")
            )
        return stackups[name]
    if DEFAULT in stackups:
        return stackups[DEFAULT]
    if len(stackups) == 1:
        return next(iter(stackups.values()))
    if not stackups:
        raise LossLaneError(
            f"{user}: uses stackup layers but the scenario has no [stackup] (nor a library "
            "file with one); add a [stackup] with layers = [ ... ]"
        )
    raise LossLaneError(
        f"{user}: several stackups ({', '.join(section_name(n) for n in stackups)}); name "
        f"one with {key}"
    )


__all__ = [
    "board_stackups",
    "DEFAULT",
    "Placement",
    "StackLayer",
    "Stackup",
    "choose",
    "parse_stackup",
    "parse_stackups",
    "section_name",
]

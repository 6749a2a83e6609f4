"""The closed-form line kinds mapped onto the field solver (``solver = "field"``).

Each builder takes the kind's parsed geometry (metres), its dielectric and metal, the raw
spec (for the extra keys below) and the spec's location for messages, and returns a
:class:`FieldSection`. Conventions:

* ``width`` is the bottom (base) width of an etched trace; ``top_width`` or
  ``etch_factor`` = 2 thickness / (width - top_width) (common practice: the etch depth
  over the undercut of one side) give the narrower top;
* ``coating_thickness`` / ``coating_dielectric``: a conformal solder mask over the top
  face and the traces on it (microstrip, cpw, gcpw and their pairs);
* ``dielectric_above``: stripline between a core (``dielectric``, under the trace, of
  ``below``) and a prepreg that embeds the trace (``thickness + above``);
* ``accuracy``: 'coarse' | 'normal' (default) | 'fine'.

Kinds: microstrip, stripline, cpw (no lower plane, semi-infinite coplanar grounds, air
below the substrate), gcpw (with the lower plane), microstrip-pair and stripline-pair
(``spacing`` edge to edge at the base).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping

from losslane.errors import LossLaneError
from losslane.materials.dielectric import Dielectric
from losslane.spec import key_name, number, quantity, text
from losslane.xsection.base import Metal
from losslane.xsection.fieldsolve.geometry import Coating, Geometry, Layer, Trace
from losslane.xsection.fieldsolve.keys import DIELECTRIC_KEYS, EXTRA_KEYS, KINDS
from losslane.xsection.fieldsolve.section import FieldSection
from losslane.xsection.fieldsolve.solve import LEVELS

_COATED = ("microstrip", "cpw", "gcpw", "microstrip-pair")
_BURIED = ("stripline", "stripline-pair")


def _dielectric(spec: Mapping, where: str, key: str) -> Dielectric | None:
    if key not in spec:
        return None
    v = spec[key]
    if not isinstance(v, Dielectric):
        raise LossLaneError(
            f"{key_name(where, key)} = {v!r}: expected a dielectric name from the library "
            "or the scenario's [dielectrics.*] sections"
        )
    return v


def _top_width(g: dict[str, float], spec: Mapping, where: str) -> float | None:
    w, t = g["width"], g["thickness"]
    top = quantity(where, spec, "top_width", "length")
    ef = number(where, spec, "etch_factor", low=0.0, low_open=True)
    if top is not None and ef is not None:
        raise LossLaneError(
            f"{key_name(where, 'top_width')} and {key_name(where, 'etch_factor')}: give one "
            "of them, not both"
        )
    if ef is not None:
        top = w - 2.0 * t / ef
        if top <= 0:
            raise LossLaneError(
                f"{key_name(where, 'etch_factor')} = {ef:g}: with thickness {t:g} m and width "
                f"{w:g} m the top width would be {top:g} m; valid etch factors are > "
                f"{2 * t / w:g}"
            )
    if top is not None and not (0 < top):
        raise LossLaneError(f"{key_name(where, 'top_width')} = {top!r} m: it must be > 0")
    return top


def _common(kind: str, g: dict[str, float], spec: Mapping, where: str):
    accuracy = text(where, spec, "accuracy", tuple(LEVELS), "normal")
    top = _top_width(g, spec, where)
    coating = None
    c = quantity(where, spec, "coating_thickness", "length")
    cd = _dielectric(spec, where, "coating_dielectric")
    if (c is None) != (cd is None):
        missing = "coating_dielectric" if cd is None else "coating_thickness"
        raise LossLaneError(
            f"{where}: {key_name(where, missing)} is missing; a coating needs both "
            'coating_thickness and coating_dielectric (e.g. "solder-mask")'
        )
    if c is not None:
        if kind not in _COATED:
            raise LossLaneError(
                f"{key_name(where, 'coating_thickness')}: kind {kind!r} has no outer face to "
                f"coat; coatings go on {', '.join(_COATED)}"
            )
        if not c > 0:
            raise LossLaneError(f"{key_name(where, 'coating_thickness')} = {c!r} m: it must be > 0")
        coating = Coating(c, cd)
    above = _dielectric(spec, where, "dielectric_above")
    if above is not None and kind not in _BURIED:
        raise LossLaneError(
            f"{key_name(where, 'dielectric_above')}: only {', '.join(_BURIED)} have a layer "
            "above the trace"
        )
    return accuracy, top, coating, above


def _labels(g: dict[str, float], top: float | None) -> tuple[tuple[str, float], ...]:
    out = [(k, float(v)) for k, v in g.items()]
    if top is not None:
        out.append(("top_width", float(top)))
    return tuple(out)


def _section(kind: str, geom: Geometry, metal: Metal, accuracy: str, labels) -> FieldSection:
    return FieldSection(geom, metal, accuracy, kind, labels)


def _strips(
    kind: str, g: dict[str, float], y: float, t: float, top: float | None
) -> tuple[Trace, ...]:
    """The signal strip at height ``y``, or a pair's two strips ``spacing`` apart."""
    w = g["width"]
    if not kind.endswith("-pair"):
        return (Trace.centred(0.0, w, y, t, top, "strip"),)
    off = (g["spacing"] + w) / 2
    return (
        Trace.centred(-off, w, y, t, top, "line 1"),
        Trace.centred(off, w, y, t, top, "line 2"),
    )


def microstrip(
    g: dict[str, float],
    d: Dielectric,
    metal: Metal,
    spec: Mapping,
    where: str,
    kind: str = "microstrip",
) -> FieldSection:
    acc, top, coat, _ = _common(kind, g, spec, where)
    h, t = g["height"], g["thickness"]
    geom = Geometry((Layer(h, d),), _strips(kind, g, h, t, top), True, False, coat)
    return _section(kind, geom, metal, acc, _labels(g, top))


def stripline(
    g: dict[str, float],
    d: Dielectric,
    metal: Metal,
    spec: Mapping,
    where: str,
    kind: str = "stripline",
) -> FieldSection:
    acc, top, _, above = _common(kind, g, spec, where)
    lo, hi, t = g["below"], g["above"], g["thickness"]
    layers = (Layer(lo, d, "core"), Layer(t + hi, above or d, "prepreg"))
    geom = Geometry(layers, _strips(kind, g, lo, t, top), True, True)
    return _section(kind, geom, metal, acc, _labels(g, top))


def coplanar(
    g: dict[str, float], d: Dielectric, metal: Metal, spec: Mapping, where: str, grounded: bool
) -> FieldSection:
    kind = "gcpw" if grounded else "cpw"
    acc, top, coat, _ = _common(kind, g, spec, where)
    h, t, w, gap = g["height"], g["thickness"], g["width"], g["gap"]
    inset = 0.0 if top is None else (w - top) / 2
    edge = w / 2 + gap
    traces = (
        Trace.centred(0.0, w, h, t, top, "strip"),
        Trace(-float("inf"), -edge, h, t, inset, False, "left ground"),
        Trace(edge, float("inf"), h, t, inset, False, "right ground"),
    )
    geom = Geometry((Layer(h, d),), traces, grounded, False, coat)
    return _section(kind, geom, metal, acc, _labels(g, top))


BUILDERS: dict[str, Callable[..., FieldSection]] = {
    "microstrip": microstrip,
    "stripline": stripline,
    "cpw": lambda g, d, m, s, w: coplanar(g, d, m, s, w, False),
    "gcpw": lambda g, d, m, s, w: coplanar(g, d, m, s, w, True),
    "microstrip-pair": lambda g, d, m, s, w: microstrip(g, d, m, s, w, "microstrip-pair"),
    "stripline-pair": lambda g, d, m, s, w: stripline(g, d, m, s, w, "stripline-pair"),
}

assert tuple(BUILDERS) == KINDS, "fieldsolve.keys.KINDS must list every builder"
__all__ = ["BUILDERS", "DIELECTRIC_KEYS", "EXTRA_KEYS", "KINDS"]

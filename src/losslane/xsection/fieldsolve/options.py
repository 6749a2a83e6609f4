"""The field solver's scenario keys -> :class:`~losslane.xsection.fieldsolve.layouts.FieldOptions`,
and a :class:`FieldSection` from a model class, its dimensions and those options
(``solver = "field"``).

Keys (see ``layouts`` for their meaning): ``top_width`` or ``etch_factor``,
``coating_thickness`` with ``coating_dielectric`` (kinds with an outer face),
``dielectric_above`` (buried kinds), ``accuracy`` ('coarse' | 'normal' (default) | 'fine').
"""

from __future__ import annotations

from collections.abc import Mapping

from losslane.errors import LossLaneError
from losslane.materials.dielectric import Dielectric
from losslane.spec import dimension, key_name, number, text
from losslane.xsection.base import Metal
from losslane.xsection.fieldsolve.geometry import Coating
from losslane.xsection.fieldsolve.keys import ACCURACIES
from losslane.xsection.fieldsolve.layouts import FieldOptions
from losslane.xsection.fieldsolve.section import FieldSection


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


def _etch(dims: Mapping[str, float], spec: Mapping, where: str) -> tuple:
    """(top_width, etch_factor) as given, checked against the trace's width."""
    w, t = dims["width"], dims["thickness"]
    top = dimension(where, spec, "top_width")
    ef = number(where, spec, "etch_factor", low=0.0, low_open=True)
    if top is not None and ef is not None:
        raise LossLaneError(
            f"{key_name(where, 'top_width')} and {key_name(where, 'etch_factor')}: give one "
            "of them, not both"
        )
    if ef is not None and not w - 2.0 * t / ef > 0:
        raise LossLaneError(
            f"{key_name(where, 'etch_factor')} = {ef:g}: with thickness {t:g} m and width "
            f"{w:g} m the top width would be {w - 2.0 * t / ef:g} m; valid etch factors are > "
            f"{2 * t / w:g}"
        )
    if top is not None and not (0 < top):
        raise LossLaneError(f"{key_name(where, 'top_width')} = {top!r} m: it must be > 0")
    return top, ef


def field_options(
    model: type, dims: Mapping[str, float], dielectric: Dielectric, spec: Mapping, where: str
) -> tuple[FieldOptions, str]:
    """The solver's options of a ``model`` section from ``spec`` (dielectric names already
    resolved to objects), and its accuracy setting."""
    kind = model.kind
    accuracy = text(where, spec, "accuracy", ACCURACIES, "normal")
    top, ef = _etch(dims, spec, where)
    coating = None
    c = dimension(where, spec, "coating_thickness")
    cd = _dielectric(spec, where, "coating_dielectric")
    if (c is None) != (cd is None):
        missing = "coating_dielectric" if cd is None else "coating_thickness"
        raise LossLaneError(
            f"{where}: {key_name(where, missing)} is missing; a coating needs both "
            'coating_thickness and coating_dielectric (e.g. "solder-mask")'
        )
    if c is not None:
        if not model.outer_layer:
            raise LossLaneError(
                f"{key_name(where, 'coating_thickness')}: kind {kind!r} has no outer face to "
                "coat; coatings go on the kinds routed on an outer layer"
            )
        if not c > 0:
            raise LossLaneError(f"{key_name(where, 'coating_thickness')} = {c!r} m: it must be > 0")
        coating = Coating(c, cd)
    above = _dielectric(spec, where, "dielectric_above")
    if above is not None and model.outer_layer:
        raise LossLaneError(
            f"{key_name(where, 'dielectric_above')}: kind {kind!r} has air (or a coating) "
            "above the trace; only kinds between two planes have a layer above it"
        )
    return FieldOptions(dielectric, top, ef, coating, above), accuracy


def field_section(
    model: type,
    dims: Mapping[str, float],
    dielectric: Dielectric,
    metal: Metal,
    spec: Mapping,
    where: str,
) -> FieldSection:
    """The field-solved section of kind ``model`` with dimensions ``dims`` (metres)."""
    options, accuracy = field_options(model, dims, dielectric, spec, where)
    return FieldSection.from_model(model, dims, options, metal, accuracy)


__all__ = ["field_options", "field_section"]

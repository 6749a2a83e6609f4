"""One leg of a pair alone: the single-line cross-section of a pair's conductor.

A pair class names its single-leg model in ``leg_model`` (``MicrostripPair`` ->
``Microstrip``, ``StriplinePair`` -> ``Stripline``); a pair class without one gets the
registered single-line kind routed the same way (``outer_layer``) whose dimensions are the
pair's without ``spacing``. The leg keeps the pair's dimensions, materials and, for a
field-solved pair, the solver's options (layers, coating, etch) and accuracy.
"""

from __future__ import annotations

from losslane.errors import LossLaneError
from losslane.xsection.base import CrossSection


def leg_model(cls: type[CrossSection]) -> type[CrossSection]:
    """The single-line model of the pair class ``cls``."""
    named = getattr(cls, "leg_model", None)
    if named is not None:
        return named
    from losslane.xsection import registry

    wanted = tuple(k for k in cls.dimensions if k != "spacing")
    for m in registry.MODELS:
        if (
            m.n_conductors == 1
            and getattr(m, "outer_layer", None) == getattr(cls, "outer_layer", None)
            and m.dimensions == wanted
        ):
            return m
    raise LossLaneError(
        f"{cls.kind}: no single-line model of one leg is known (give the class a leg_model)"
    )


def leg_section(section: CrossSection) -> CrossSection:
    """The cross-section of one leg of the pair ``section`` alone (no neighbour)."""
    if section.n_conductors != 2:
        raise LossLaneError(f"{section.kind}: only a pair has legs (this line has one conductor)")
    source = getattr(section, "source", None)
    if source is not None:  # field-solved: the same layout, one strip
        from losslane.xsection.fieldsolve.section import FieldSection

        model = leg_model(source.model)
        dims = {k: v for k, v in source.dims if k in model.dimensions}
        return FieldSection.from_model(model, dims, source.options, section.metal, section.accuracy)
    model = leg_model(type(section))
    dims = {k: v for k, v in section.dimension_values().items() if k in model.dimensions}
    return model(**dims, dielectric=section.dielectric, metal=section.metal)


__all__ = ["leg_model", "leg_section"]

"""How a model's dimensions become a field-solver cross-section.

Each closed-form model class names its layout in its ``field_geometry`` classmethod: the
strip(s) on a layer over one plane (microstrip and its pair), between two planes
(stripline and its pair), or between semi-infinite coplanar grounds (CPW, GCPW). The
solver's own options travel in :class:`FieldOptions`:

* ``width`` is the bottom (base) width of an etched trace; ``top_width`` or
  ``etch_factor`` = 2 thickness / (width - top_width) (common practice: the etch depth
  over the undercut of one side) give the narrower top. An etch factor is a property of
  the process, so the top follows the width when a design helper varies it; a top width
  stays as given;
* ``coating``: a conformal solder mask over the top face and the traces on it (layouts
  with an outer face);
* ``dielectric_above``: stripline between a core (``dielectric``, under the trace, of
  ``below``) and a prepreg that embeds the trace (``thickness + above``).

Light module (numpy and the geometry description only): the model classes import it
inside ``field_geometry``, the solver is not imported.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from losslane.errors import LossLaneError
from losslane.materials.dielectric import Dielectric
from losslane.xsection.fieldsolve.geometry import Coating, Geometry, Layer, Trace


@dataclass(frozen=True)
class FieldOptions:
    """The field solver's options of one cross-section (see the module docstring)."""

    dielectric: Dielectric
    top_width: float | None = None
    etch_factor: float | None = None
    coating: Coating | None = None
    dielectric_above: Dielectric | None = None

    def top(self, dims: Mapping[str, float], key: str = "etch_factor") -> float | None:
        """The top width of a trace of ``dims`` (None: rectangular)."""
        if self.etch_factor is None:
            return self.top_width
        w, t = dims["width"], dims["thickness"]
        top = w - 2.0 * t / self.etch_factor
        if not top > 0:
            raise LossLaneError(
                f"{key} = {self.etch_factor:g}: with thickness {t:g} m and width {w:g} m the "
                f"top width would be {top:g} m; valid etch factors are > {2 * t / w:g}"
            )
        return top


def strips(dims: Mapping[str, float], y: float, top: float | None, pair: bool) -> tuple:
    """The signal strip at height ``y``, or a pair's two strips ``spacing`` apart."""
    w, t = dims["width"], dims["thickness"]
    if not pair:
        return (Trace.centred(0.0, w, y, t, top, "strip"),)
    off = (dims["spacing"] + w) / 2
    return (
        Trace.centred(-off, w, y, t, top, "line 1"),
        Trace.centred(off, w, y, t, top, "line 2"),
    )


def over_plane(dims: Mapping[str, float], options: FieldOptions, pair: bool) -> Geometry:
    """Microstrip (pair): the strip(s) on one layer of ``height`` over the plane, air or a
    coating above."""
    h = dims["height"]
    traces = strips(dims, h, options.top(dims), pair)
    return Geometry((Layer(h, options.dielectric),), traces, True, False, options.coating)


def between_planes(dims: Mapping[str, float], options: FieldOptions, pair: bool) -> Geometry:
    """Stripline (pair): the core of ``below`` under the strip(s), the prepreg of
    ``thickness + above`` embedding them, a plane under and over the stack."""
    lo, hi, t = dims["below"], dims["above"], dims["thickness"]
    above = options.dielectric_above or options.dielectric
    layers = (Layer(lo, options.dielectric, "core"), Layer(t + hi, above, "prepreg"))
    return Geometry(layers, strips(dims, lo, options.top(dims), pair), True, True)


def coplanar(dims: Mapping[str, float], options: FieldOptions, grounded: bool) -> Geometry:
    """CPW / GCPW: the strip between semi-infinite coplanar grounds on the substrate."""
    h, t, w, gap = dims["height"], dims["thickness"], dims["width"], dims["gap"]
    top = options.top(dims)
    inset = 0.0 if top is None else (w - top) / 2
    edge = w / 2 + gap
    traces = (
        Trace.centred(0.0, w, h, t, top, "strip"),
        Trace(-float("inf"), -edge, h, t, inset, False, "left ground"),
        Trace(edge, float("inf"), h, t, inset, False, "right ground"),
    )
    return Geometry((Layer(h, options.dielectric),), traces, grounded, False, options.coating)


__all__ = ["FieldOptions", "between_planes", "coplanar", "over_plane", "strips"]

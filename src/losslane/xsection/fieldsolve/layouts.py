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
  ``below``) and a prepreg that embeds the trace (``thickness + above``);
* ``stack``: a :class:`LayerStack`, the list of dielectric layers between the trace and
  its plane(s) when a line is placed on a stackup layer (several sheets of different
  laminates; another copper layer in between, filled with its adjacent dielectric). It
  replaces ``dielectric`` and ``dielectric_above`` in the layout; the layers are scaled to
  the dimensions' ``height`` (or ``below`` and ``above``), so a design helper that varies
  a height scales every sheet alike.

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
class LayerStack:
    """The layers between a trace and its reference plane(s), nearest the trace first:
    ``below`` down to the lower plane, ``above`` up to the upper plane (empty over an
    outer layer: air or the coating). The trace's own thickness sits in the nearest layer
    above (``fill_below`` False: the trace lies on the sheet below and the one above
    flows around it) or in the nearest layer below."""

    below: tuple[Layer, ...]
    above: tuple[Layer, ...] = ()
    fill_below: bool = False


@dataclass(frozen=True)
class FieldOptions:
    """The field solver's options of one cross-section (see the module docstring)."""

    dielectric: Dielectric
    top_width: float | None = None
    etch_factor: float | None = None
    coating: Coating | None = None
    dielectric_above: Dielectric | None = None
    stack: LayerStack | None = None

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
    return Geometry(layers_over_plane(h, options), traces, True, False, options.coating)


def between_planes(dims: Mapping[str, float], options: FieldOptions, pair: bool) -> Geometry:
    """Stripline (pair): the core of ``below`` under the strip(s), the prepreg of
    ``thickness + above`` embedding them, a plane under and over the stack."""
    lo, hi, t = dims["below"], dims["above"], dims["thickness"]
    traces = strips(dims, lo, options.top(dims), pair)
    return Geometry(layers_between_planes(lo, hi, t, options), traces, True, True)


def layers_over_plane(height: float, options: FieldOptions) -> tuple[Layer, ...]:
    """The dielectric layers (bottom first) under traces ``height`` over their plane: one
    layer of ``options.dielectric``, or the stackup's sheets (``options.stack``)."""
    if options.stack is not None:
        return merged(scaled(options.stack.below, height)[::-1])
    return (Layer(height, options.dielectric),)


def layers_between_planes(
    below: float, above: float, thickness: float, options: FieldOptions
) -> tuple[Layer, ...]:
    """The dielectric layers (bottom first) around traces of ``thickness`` between two
    planes, ``below`` over the lower one and ``above`` under the upper one: a core and a
    prepreg embedding the traces, or the stackup's sheets (``options.stack``)."""
    if options.stack is not None:
        st = options.stack
        down, up = list(scaled(st.below, below)), list(scaled(st.above, above))
        near = down if st.fill_below else up
        near[0] = Layer(near[0].thickness + thickness, near[0].dielectric, near[0].name)
        return merged(tuple(down[::-1] + up))
    upper = options.dielectric_above or options.dielectric
    return (Layer(below, options.dielectric, "core"), Layer(thickness + above, upper, "prepreg"))


def scaled(layers: tuple[Layer, ...], total: float) -> tuple[Layer, ...]:
    """``layers`` with their thicknesses scaled to sum to ``total`` (unchanged when they
    already do, up to rounding)."""
    s = sum(ly.thickness for ly in layers)
    if not layers or not s > 0:
        raise LossLaneError(f"field solver: no layers to fill a height of {total:g} m")
    k = total / s
    if abs(k - 1.0) < 1e-12:
        return tuple(layers)
    return tuple(Layer(ly.thickness * k, ly.dielectric, ly.name) for ly in layers)


def merged(layers: tuple[Layer, ...]) -> tuple[Layer, ...]:
    """Adjacent layers of the same dielectric joined into one (bottom first), named by
    their names joined with '+'."""
    out: list[Layer] = []
    for ly in layers:
        if out and out[-1].dielectric == ly.dielectric:
            prev = out[-1]
            name = "+".join(n for n in (prev.name, ly.name) if n)
            out[-1] = Layer(prev.thickness + ly.thickness, ly.dielectric, name)
        else:
            out.append(ly)
    return tuple(out)


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


__all__ = [
    "FieldOptions",
    "LayerStack",
    "between_planes",
    "coplanar",
    "merged",
    "over_plane",
    "scaled",
    "strips",
]

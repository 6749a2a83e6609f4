"""The cross-section a field solve works on: stacked dielectric layers, reference planes,
trapezoidal conductors and an optional conformal coating.

Coordinates: x across the board, y up; y = 0 is the bottom face of the lowest layer (the
surface of the lower reference plane when there is one). Layer i spans
``[Y_i, Y_{i+1}]``; above the stack is air (or the upper plane), below it air when there
is no lower plane. Lengths are in metres.

A conductor is a trapezoid given by its bottom corners, its thickness and the inset of
each top corner (positive inset: narrower top, as etched). A coplanar ground is a
conductor that reaches the side of the (truncated) domain: its outer corner is at
``-inf`` or ``+inf``. A conductor of zero thickness is a strip of zero thickness (its
edges then carry the knife-edge singularity of the exact conformal-mapping solutions).

The coating (a solder mask) covers the top face of the stack with ``thickness`` and every
conductor that sits on that face: its top by ``thickness`` and its sides by ``thickness``
measured normal to the (slanted) side walls. The outer corners of the coating are kept
sharp (common practice for field-solver models of liquid masks, which round them in
reality).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from losslane.errors import LossLaneError
from losslane.materials.dielectric import Dielectric

#: Frequency at which the layers' permittivities enter the electrostatic solve; C(f) and
#: G(f) at other frequencies follow from the energy partition (see ``section.py``).
F_REF = 5e9


@dataclass(frozen=True)
class Layer:
    """A dielectric layer of ``thickness`` (m)."""

    thickness: float
    dielectric: Dielectric
    name: str = ""


@dataclass(frozen=True)
class Trace:
    """A conductor: bottom corners at ``x_left``/``x_right`` (m; +-inf for a coplanar
    ground that reaches the side of the domain), bottom face at ``y``, ``thickness`` >= 0,
    each top corner moved inward by ``inset`` (m). ``signal`` conductors carry the line's
    currents; the others are grounds (held at the planes' potential)."""

    x_left: float
    x_right: float
    y: float
    thickness: float
    inset: float = 0.0
    signal: bool = True
    name: str = ""

    @classmethod
    def centred(
        cls,
        x: float,
        width: float,
        y: float,
        thickness: float,
        top_width: float | None = None,
        name: str = "",
    ) -> Trace:
        """A signal trace of bottom ``width`` centred at ``x`` (top width default equal)."""
        top = width if top_width is None else top_width
        return cls(x - width / 2, x + width / 2, y, thickness, (width - top) / 2, True, name)

    @property
    def top(self) -> float:
        return self.y + self.thickness

    @property
    def corners_x(self) -> tuple[float, float, float, float]:
        """(bottom-left, bottom-right, top-left, top-right) x; infinite ends stay infinite."""
        xl, xr = self.x_left, self.x_right
        tl = xl + self.inset if math.isfinite(xl) else xl
        tr = xr - self.inset if math.isfinite(xr) else xr
        return xl, xr, tl, tr

    @property
    def area(self) -> float:
        xl, xr, tl, tr = self.corners_x
        return 0.5 * self.thickness * ((xr - xl) + (tr - tl))

    def left_at(self, y: np.ndarray) -> np.ndarray:
        """x of the left wall at height(s) ``y`` within the conductor's band."""
        xl, _, tl, _ = self.corners_x
        if not math.isfinite(xl) or self.thickness == 0:
            return np.full(np.shape(y), xl)
        return xl + (tl - xl) * (np.asarray(y) - self.y) / self.thickness

    def right_at(self, y: np.ndarray) -> np.ndarray:
        _, xr, _, tr = self.corners_x
        if not math.isfinite(xr) or self.thickness == 0:
            return np.full(np.shape(y), xr)
        return xr + (tr - xr) * (np.asarray(y) - self.y) / self.thickness


@dataclass(frozen=True)
class Coating:
    """A conformal coating (solder mask) of ``thickness`` over the top face of the stack."""

    thickness: float
    dielectric: Dielectric


@dataclass(frozen=True)
class Geometry:
    """The full cross-section. ``layers`` run from the bottom up."""

    layers: tuple[Layer, ...]
    traces: tuple[Trace, ...]
    plane_below: bool = True
    plane_above: bool = False
    coating: Coating | None = None
    name: str = field(default="", compare=False)

    def __post_init__(self) -> None:
        self.validate()

    # -- derived numbers -------------------------------------------------------------
    @property
    def interfaces(self) -> np.ndarray:
        """Y_0 = 0, ..., Y_L: the faces of the layers."""
        return np.concatenate([[0.0], np.cumsum([ly.thickness for ly in self.layers])])

    @property
    def stack_top(self) -> float:
        return float(self.interfaces[-1])

    @property
    def signals(self) -> tuple[Trace, ...]:
        return tuple(t for t in self.traces if t.signal)

    @property
    def n_conductors(self) -> int:
        return len(self.signals)

    def coated(self, trace: Trace) -> bool:
        """True when ``trace`` sits on the top face and a coating is present."""
        return self.coating is not None and abs(trace.y - self.stack_top) <= self.tol

    @property
    def tol(self) -> float:
        return 1e-9 * self.scale

    @property
    def scale(self) -> float:
        """The structure's size: the larger of its finite width and its height."""
        xs = [x for t in self.traces for x in t.corners_x if math.isfinite(x)]
        width = (max(xs) - min(xs)) if xs else 0.0
        top = max([self.stack_top] + [t.top for t in self.traces])
        return max(width, top, min(ly.thickness for ly in self.layers))

    def regions(self) -> list[tuple[str, Dielectric | None]]:
        """The dielectric regions in mesh order: the layers, the coating, then air."""
        out: list[tuple[str, Dielectric | None]] = [
            (ly.name or f"layer {i + 1}", ly.dielectric) for i, ly in enumerate(self.layers)
        ]
        if self.coating is not None:
            out.append(("coating", self.coating.dielectric))
        out.append(("air", None))
        return out

    def electrostatic_key(self) -> tuple:
        """Everything the electrostatic solve depends on (hashable): the shapes and each
        region's permittivity at ``F_REF``. Metals and loss tangents do not enter."""
        eps = tuple(
            1.0 if d is None else float(d.eps(np.array([F_REF]))[0].real) for _, d in self.regions()
        )
        layers = tuple(ly.thickness for ly in self.layers)
        traces = tuple(
            (t.x_left, t.x_right, t.y, t.thickness, t.inset, t.signal) for t in self.traces
        )
        coat = None if self.coating is None else self.coating.thickness
        return (layers, traces, self.plane_below, self.plane_above, coat, eps)

    # -- checks ---------------------------------------------------------------------
    def validate(self) -> None:
        if not self.layers:
            raise LossLaneError("field solver: the cross-section needs at least one layer")
        for i, ly in enumerate(self.layers):
            if not (math.isfinite(ly.thickness) and ly.thickness > 0):
                raise LossLaneError(
                    f"field solver: layer {i + 1} thickness = {ly.thickness!r} m; it must be > 0"
                )
        if not self.signals:
            raise LossLaneError("field solver: the cross-section needs a signal conductor")
        if not (self.plane_below or self.plane_above or any(not t.signal for t in self.traces)):
            raise LossLaneError(
                "field solver: the cross-section needs a return conductor (a reference "
                "plane or a coplanar ground)"
            )
        if self.coating is not None:
            c = self.coating.thickness
            if not (math.isfinite(c) and c > 0):
                raise LossLaneError(f"field solver: coating_thickness = {c!r} m; it must be > 0")
            if self.plane_above:
                raise LossLaneError(
                    "field solver: a coating needs an open top face (no upper plane)"
                )
        top = self.stack_top
        for k, t in enumerate(self.traces):
            what = t.name or f"conductor {k + 1}"
            xl, xr, tl, tr = t.corners_x
            if not (math.isfinite(t.thickness) and t.thickness >= 0):
                raise LossLaneError(
                    f"field solver: {what}: thickness = {t.thickness!r} m; it must be >= 0"
                )
            if not xl < xr:
                raise LossLaneError(f"field solver: {what}: its width must be > 0")
            if math.isinf(xl) and math.isinf(xr):
                raise LossLaneError(f"field solver: {what}: a conductor needs a finite edge")
            if t.thickness > 0 and not tl < tr:
                raise LossLaneError(
                    f"field solver: {what}: top width = {tr - tl:g} m; it must be > 0 "
                    "(etch factor too small or top width too narrow)"
                )
            lo = 0.0 if self.plane_below else -math.inf
            hi = top if self.plane_above else math.inf
            if not (t.y > lo + self.tol and t.top < hi - self.tol):
                raise LossLaneError(
                    f"field solver: {what} (y = {t.y:g} m .. {t.top:g} m) touches or crosses "
                    "a reference plane"
                )
        # conductors must not touch each other
        for a in range(len(self.traces)):
            for b in range(a + 1, len(self.traces)):
                ta, tb = self.traces[a], self.traces[b]
                y_overlap = min(ta.top, tb.top) - max(ta.y, tb.y)
                if y_overlap < -self.tol:
                    continue
                if ta.thickness == 0 and tb.thickness == 0 and abs(ta.y - tb.y) > self.tol:
                    continue
                lo_a, hi_a = (
                    min(ta.corners_x[0], ta.corners_x[2]),
                    max(ta.corners_x[1], ta.corners_x[3]),
                )
                lo_b, hi_b = (
                    min(tb.corners_x[0], tb.corners_x[2]),
                    max(tb.corners_x[1], tb.corners_x[3]),
                )
                if lo_a < hi_b + self.tol and lo_b < hi_a + self.tol:
                    raise LossLaneError(
                        f"field solver: conductors {ta.name or a + 1} and {tb.name or b + 1} "
                        "touch or overlap; give them a gap (spacing, gap) > 0"
                    )
        if self.coating is not None:
            self._check_coating_gaps()

    def coating_walls(self, trace: Trace) -> tuple[tuple[float, float], tuple[float, float]]:
        """Outer faces of the coating on a coated trace's left and right walls: for each,
        (x at the coating's bottom y_b + c, x at its top y_t + c), the wall moved out by c
        along its normal."""
        assert self.coating is not None
        c = self.coating.thickness
        xl, xr, tl, tr = trace.corners_x
        t = trace.thickness
        out = []
        for xb, xt, sign in ((xl, tl, -1.0), (xr, tr, 1.0)):
            if not math.isfinite(xb):
                out.append((xb, xb))
                continue
            slope = (xt - xb) / t if t > 0 else 0.0  # dx/dy of the wall
            shift = sign * c * math.sqrt(1.0 + slope * slope)
            out.append((xb + slope * c + shift, xt + slope * c + shift))
        return out[0], out[1]

    def _check_coating_gaps(self) -> None:
        coated = sorted((t for t in self.traces if self.coated(t)), key=lambda t: t.x_left)
        for a, b in zip(coated[:-1], coated[1:], strict=False):
            (_, (ra_bot, ra_top)) = self.coating_walls(a)
            ((lb_bot, lb_top), _) = self.coating_walls(b)
            if not (ra_bot < lb_bot - self.tol and ra_top < lb_top - self.tol):
                raise LossLaneError(
                    "field solver: the coating is thicker than half the gap between "
                    f"conductors {a.name or '?'} and {b.name or '?'}; the model keeps a "
                    "coating-free gap between coated walls (use a thinner coating_thickness "
                    "or a wider gap)"
                )

"""The conductor-filled mesh of the eddy-current solve: every conductor's cross-section,
the return planes included, is meshed (its current is an unknown), graded into the
conductor surfaces so that the smallest skin depth of the sweep is resolved.

Conductors are trapezoids with horizontal faces (``Block``). A :class:`Geometry` maps
onto blocks with ``conductor_blocks``: each trace of non-zero thickness is a block; a
coplanar ground that reaches the side of the electrostatic domain (an infinite edge) is
cut at the edge of the planes; a lower (upper) reference plane becomes a slab of finite
``plane_thickness`` and ``plane_width`` under (over) the stack, centred on the traces.

Mesh (``build_conductor_mesh``): a tensor-product grid whose lines pass through every
face and wall of every block, graded geometrically toward each (first element size h0,
growing linearly with the distance, h(d) = h0 + g d, ``mesh.grade``). At a conductor
face h0 is the smaller of ``skin`` times the smallest skin depth and ``feature`` times
the block's smallest dimension, so every skin depth from the smallest up is resolved
by about 1/g elements (the current density decays like exp(-d/delta) under a face);
the outer edges of planes and cut grounds, where little current flows once it crowds
under the signals, start at the ``feature`` size. Slanted walls bend their vertical
grid lines; the others are interpolated between them. Each quadrilateral is split into
two triangles along its shorter diagonal (ties alternate at x = 0 so that a structure
symmetric about x = 0 gets a mirror-symmetric mesh). Nothing is removed: each triangle
is labelled with the conductor it lies in, or -1 (air and dielectrics: the solve is
magneto-quasi-static, mu0 everywhere, and the permittivity does not enter).

Outer boundary: with ``open_boundary`` the grid extends ``far`` structure sizes beyond
the conductors on every side and the vector potential is 0 on that box (the currents
sum to zero, so the far field is that of a line dipole, A ~ 1/r, and the truncation
changes the inductance by O((size/distance)^2)); without it the grid ends at the
conductors' bounding box and its sides are magnetic walls (natural condition, the
tangential H is 0).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError
from losslane.xsection.fieldsolve.geometry import Geometry
from losslane.xsection.fieldsolve.mesh import grade


@dataclass(frozen=True)
class Block:
    """A conductor: bottom face at ``y0`` from ``xb0`` to ``xb1``, top face at ``y1`` from
    ``xt0`` to ``xt1`` (m). ``signal`` is its index among the signal conductors, or -1 for
    a return conductor (planes and grounds share one longitudinal voltage drop).
    ``outer`` marks a (left, right) wall and ``back`` a (bottom, top) face as facing away
    from the signals (outer edges of planes and cut grounds, a plane's far face): graded
    coarser."""

    name: str
    signal: int
    y0: float
    y1: float
    xb0: float
    xb1: float
    xt0: float
    xt1: float
    outer: tuple[bool, bool] = (False, False)
    back: tuple[bool, bool] = (False, False)

    @classmethod
    def rectangle(
        cls,
        name: str,
        signal: int,
        x0: float,
        x1: float,
        y0: float,
        y1: float,
        outer: tuple[bool, bool] = (False, False),
        back: tuple[bool, bool] = (False, False),
    ) -> Block:
        return cls(name, signal, y0, y1, x0, x1, x0, x1, outer, back)

    @property
    def thickness(self) -> float:
        return self.y1 - self.y0

    @property
    def area(self) -> float:
        return 0.5 * self.thickness * ((self.xb1 - self.xb0) + (self.xt1 - self.xt0))

    @property
    def x_range(self) -> tuple[float, float]:
        return min(self.xb0, self.xt0), max(self.xb1, self.xt1)

    def left_at(self, y: np.ndarray) -> np.ndarray:
        return self.xb0 + (self.xt0 - self.xb0) * (np.asarray(y) - self.y0) / self.thickness

    def right_at(self, y: np.ndarray) -> np.ndarray:
        return self.xb1 + (self.xt1 - self.xb1) * (np.asarray(y) - self.y0) / self.thickness

    def contains(self, x: np.ndarray, y: np.ndarray) -> np.ndarray:
        yy = np.clip(y, self.y0, self.y1)
        return (y > self.y0) & (y < self.y1) & (x > self.left_at(yy)) & (x < self.right_at(yy))


@dataclass(frozen=True)
class EddyMeshParams:
    """First element size at a conductor face: ``skin`` smallest skin depths, at most
    ``feature`` times the conductor's smallest dimension; ``growth`` the relative size
    increase per unit distance inside the conductors (``growth_out`` outside them, where
    the field varies on the scale of the geometry); ``far`` the truncation distance in
    structure sizes."""

    skin: float
    feature: float
    growth: float
    growth_out: float
    far: float


@dataclass
class ConductorMesh:
    """A mesh with its conductors: ``mesh`` a scikit-fem triangle mesh (straight or
    curved), ``conductor`` (elements,) the conductor index of each element or -1,
    and per conductor its ``signal`` index (-1: return), ``sigma`` (S/m) and name.
    ``open_boundary``: A = 0 on the mesh boundary (else a magnetic wall)."""

    mesh: object
    conductor: np.ndarray
    signal: tuple[int, ...]
    sigma: tuple[float, ...]
    names: tuple[str, ...]
    open_boundary: bool = True

    @property
    def n_signals(self) -> int:
        return max(self.signal) + 1


def conductor_blocks(
    geom: Geometry, plane_thickness: float, plane_width: float
) -> tuple[Block, ...]:
    """The conductors of ``geom`` as blocks: its traces (signals first in their order,
    then grounds), and the lower and upper planes as slabs of ``plane_thickness`` and
    ``plane_width`` centred on the traces. Grounds reaching the side of the domain end at
    the planes' edges."""
    for key, value in (("plane_thickness", plane_thickness), ("plane_width", plane_width)):
        if not (math.isfinite(value) and value > 0):
            raise LossLaneError(f"eddy-current solver: {key} = {value!r} m; it must be > 0")
    finite = [x for tr in geom.traces for x in tr.corners_x if math.isfinite(x)]
    lo, hi = min(finite), max(finite)
    xc = 0.5 * (lo + hi)
    x0, x1 = xc - plane_width / 2, xc + plane_width / 2
    if not (x0 < lo and hi < x1):
        raise LossLaneError(
            f"eddy-current solver: plane_width = {plane_width:g} m; it must exceed the "
            f"traces' span, {hi - lo:g} m"
        )
    blocks: list[Block] = []
    sig = 0
    for k, tr in enumerate(geom.traces):
        what = tr.name or f"conductor {k + 1}"
        if tr.thickness <= 0:
            raise LossLaneError(
                f"eddy-current solver: {what} has thickness = {tr.thickness!r} m; the "
                "current inside a conductor needs a thickness > 0"
            )
        xl, xr, tl, tr_ = tr.corners_x
        cut_l, cut_r = not math.isfinite(xl), not math.isfinite(xr)
        xl, tl = (x0, x0) if cut_l else (xl, tl)
        xr, tr_ = (x1, x1) if cut_r else (xr, tr_)
        if not (xl < xr and tl < tr_):
            raise LossLaneError(
                f"eddy-current solver: {what} ends beyond the planes' edges; plane_width = "
                f"{plane_width:g} m is too narrow"
            )
        blocks.append(
            Block(what, sig if tr.signal else -1, tr.y, tr.top, xl, xr, tl, tr_, (cut_l, cut_r))
        )
        sig += tr.signal
    if geom.plane_below:
        blocks.append(
            Block.rectangle(
                "lower plane", -1, x0, x1, -plane_thickness, 0.0, (True, True), (True, False)
            )
        )
    if geom.plane_above:
        top = geom.stack_top
        blocks.append(
            Block.rectangle(
                "upper plane", -1, x0, x1, top, top + plane_thickness, (True, True), (False, True)
            )
        )
    return tuple(sorted(blocks, key=lambda b: (b.signal < 0, b.signal)))


def _feature(blocks: tuple[Block, ...], k: int, tol: float) -> float:
    """The smallest dimension around block ``k``: its thickness and widths, and its gaps
    to the other blocks."""
    b = blocks[k]
    sizes = [b.thickness, b.xb1 - b.xb0, b.xt1 - b.xt0]
    lo, hi = b.x_range
    for j, o in enumerate(blocks):
        if j == k:
            continue
        olo, ohi = o.x_range
        if min(o.y1, b.y1) - max(o.y0, b.y0) > -tol:  # side by side
            sizes.append(max(olo - hi, lo - ohi))
        if min(ohi, hi) - max(olo, lo) > -tol:  # one above the other
            sizes.append(max(o.y0 - b.y1, b.y0 - o.y1))
    return float(min(s for s in sizes if s > tol))


def _grade(
    keys: np.ndarray, sizes: np.ndarray, prm: EddyMeshParams, metal: list[tuple[float, float]]
) -> np.ndarray:
    """``mesh.grade`` segment by segment: ``prm.growth`` inside the ``metal`` intervals
    (where the current decays over the skin depth), ``prm.growth_out`` elsewhere."""
    out = [keys[:1]]
    for a, b, ha, hb in zip(keys[:-1], keys[1:], sizes[:-1], sizes[1:], strict=True):
        mid = 0.5 * (a + b)
        inside = any(lo < mid < hi for lo, hi in metal)
        g = prm.growth if inside else prm.growth_out
        out.append(grade(np.array([a, b]), np.array([ha, hb]), g)[1:])
    return np.concatenate(out)


class _Keys:
    """Key coordinates on one axis with their first element size (smallest wins)."""

    def __init__(self, tol: float) -> None:
        self.tol = tol
        self.items: list[list[float]] = []

    def add(self, coord: float, size: float) -> None:
        for item in self.items:
            if abs(item[0] - coord) <= self.tol:
                item[1] = min(item[1], size)
                return
        self.items.append([coord, size])

    def arrays(self) -> tuple[np.ndarray, np.ndarray]:
        items = sorted(self.items)
        return np.array([c for c, _ in items]), np.array([s for _, s in items])


def build_conductor_mesh(
    blocks: tuple[Block, ...],
    sigma: float,
    delta_min: float,
    prm: EddyMeshParams,
    open_boundary: bool = True,
) -> ConductorMesh:
    """The graded triangle mesh of ``blocks`` of conductivity ``sigma`` (S/m), resolving
    skin depths down to ``delta_min`` (m; ``inf`` for a DC-only solve)."""
    from skfem import MeshTri

    if not blocks or all(b.signal < 0 for b in blocks):
        raise LossLaneError("eddy-current solver: the cross-section needs a signal conductor")
    if all(b.signal >= 0 for b in blocks):
        raise LossLaneError("eddy-current solver: the cross-section needs a return conductor")
    xs = [x for b in blocks for x in (b.xb0, b.xb1, b.xt0, b.xt1)]
    ys = [y for b in blocks for y in (b.y0, b.y1)]
    xmin, xmax, ymin, ymax = min(xs), max(xs), min(ys), max(ys)
    size = max(xmax - xmin, ymax - ymin)
    tol = 1e-9 * size
    margin = prm.far * size if open_boundary else 0.0
    x0, x1, y0, y1 = xmin - margin, xmax + margin, ymin - margin, ymax + margin

    ykeys, xkeys = _Keys(tol), _Keys(tol)
    for coord, keys in ((y0, ykeys), (y1, ykeys), (x0, xkeys), (x1, xkeys)):
        keys.add(coord, math.inf)
    walls: list[tuple[float, float, float, float, float]] = []  # (xb, xt, yb, yt, size)
    for k, b in enumerate(blocks):
        feat = prm.feature * _feature(blocks, k, tol)
        h = min(prm.skin * delta_min, feat)
        ykeys.add(b.y0, feat if b.back[0] else h)
        ykeys.add(b.y1, feat if b.back[1] else h)
        for xb, xt, outer in ((b.xb0, b.xt0, b.outer[0]), (b.xb1, b.xt1, b.outer[1])):
            walls.append((xb, xt, b.y0, b.y1, feat if outer else h))

    yk, ysz = ykeys.arrays()
    y = _grade(yk, ysz, prm, [(b.y0, b.y1) for b in blocks])

    # vertical key lines: a wall is straight at its bottom x outside its band and follows
    # the (slanted) wall inside it; walls with the same bottom x must agree
    lines: dict[float, list] = {x0: [[], math.inf], x1: [[], math.inf]}
    for xb, xt, yb, yt, h in walls:
        ref = next((r for r in lines if abs(r - xb) <= tol), xb)
        knots = [(yb, xb), (yt, xt)] if abs(xt - xb) > tol else []
        entry = lines.setdefault(ref, [[], math.inf])
        for yy, xx in knots:
            for y2, x2 in entry[0]:
                if abs(yy - y2) <= tol and abs(xx - x2) > tol:
                    raise LossLaneError(
                        "eddy-current solver: two slanted walls share a vertical grid line "
                        "with different shapes; shift one conductor slightly"
                    )
        entry[0].extend(knots)
        entry[1] = min(entry[1], h)
    for ref, (_, h) in lines.items():
        xkeys.add(ref, h)
    xk, xsz = xkeys.arrays()
    xi = _grade(xk, xsz, prm, [b.x_range for b in blocks if not all(b.outer)])

    refs = np.array(sorted(lines))
    at = np.empty((y.size, refs.size))
    for k, ref in enumerate(refs):
        knots = sorted(lines[ref][0])
        at[:, k] = np.interp(y, [a for a, _ in knots], [c for _, c in knots]) if knots else ref
    if np.any(np.diff(at, axis=1) <= tol):
        raise LossLaneError(
            "eddy-current solver: slanted walls of conductors on different heights cross "
            "each other's grid lines; the mesh cannot be built for this geometry"
        )
    nx, ny = xi.size, y.size
    X = np.empty((ny, nx))
    for j in range(ny):
        X[j] = np.interp(xi, refs, at[j])
    p = np.vstack([X.ravel(), np.repeat(y, nx)])

    jj, ii = np.meshgrid(np.arange(ny - 1), np.arange(nx - 1), indexing="ij")
    a = (jj * nx + ii).ravel()
    b_, d = a + 1, a + nx
    c = d + 1
    cx = 0.25 * (p[0, a] + p[0, b_] + p[0, c] + p[0, d])
    cy = 0.25 * (p[1, a] + p[1, b_] + p[1, c] + p[1, d])
    label = np.full(a.shape, -1, dtype=np.int64)
    for k, blk in enumerate(blocks):
        label[blk.contains(cx, cy)] = k
    ac = np.hypot(*(p[:, a] - p[:, c]))
    bd = np.hypot(*(p[:, b_] - p[:, d]))
    tie = np.abs(ac - bd) <= 1e-9 * (ac + bd)
    use_ac = np.where(tie, cx < 0, ac < bd)
    t1 = np.where(use_ac, [a, b_, c], [a, b_, d])
    t2 = np.where(use_ac, [a, c, d], [b_, c, d])
    t = np.hstack([t1, t2])
    mesh = MeshTri(np.ascontiguousarray(p), np.ascontiguousarray(t))
    for k, blk in enumerate(blocks):
        if not np.any(label == k):
            raise LossLaneError(f"eddy-current solver: {blk.name} is not resolved by the mesh")
    return ConductorMesh(
        mesh,
        np.concatenate([label, label]),
        tuple(b.signal for b in blocks),
        tuple(float(sigma) for _ in blocks),
        tuple(b.name for b in blocks),
        open_boundary,
    )


__all__ = [
    "Block",
    "ConductorMesh",
    "EddyMeshParams",
    "build_conductor_mesh",
    "conductor_blocks",
]

"""A graded, boundary-fitted triangle mesh of a layered cross-section (pure numpy).

Method: a tensor-product grid whose lines pass through every corner, face and interface
of the geometry, graded geometrically toward each of them ("geometric mesh": the element
size grows linearly with the distance from the nearest key line, h(d) = h_k + g d), so
the field singularities at conductor corners and strip edges are resolved with a
logarithmic number of extra lines. Slanted walls (etched trapezoids, the coating on
them) are fitted by moving the vertical grid lines: each wall is a "key line" x(y) that
is piecewise linear between horizontal grid lines, and every other vertical line is
interpolated between its neighbouring key lines. Each quadrilateral is split into two
triangles along its shorter diagonal; cells inside conductors are removed.

The domain is a box truncated far from the structure: ``far`` structure sizes on the
open sides (the potential of a line over a plane decays like a line dipole, so the
truncation changes the capacitance by O((size/distance)^2)); 5 plane spacings when the
line sits between two planes (the field decays like exp(-pi x / b) there).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError
from losslane.xsection.fieldsolve.geometry import Geometry, Trace


@dataclass(frozen=True)
class MeshParams:
    """Grading: ``corner`` and ``face`` are the first element sizes at conductor corners
    and at other key lines, relative to the local feature size; ``growth`` the relative
    size increase per unit distance; ``far`` the truncation distance in structure sizes."""

    corner: float
    face: float
    growth: float
    far: float


@dataclass
class GridMesh:
    p: np.ndarray  # (2, N) node coordinates
    t: np.ndarray  # (3, M) triangles
    region: np.ndarray  # (M,) region index into Geometry.regions()
    box: tuple[float, float, float, float]  # x0, x1, y0, y1
    xi: np.ndarray  # (nx,) reference x of the vertical grid lines
    y: np.ndarray  # (ny,) the horizontal grid lines
    x_keys: np.ndarray  # reference x of the key lines (walls) and the box sides, sorted
    y_keys: np.ndarray  # y of the key lines, sorted
    node_i: np.ndarray  # (N,) vertical-line index of each node
    node_j: np.ndarray  # (N,) horizontal-line index of each node

    @property
    def x_lines(self) -> int:
        return self.xi.size

    @property
    def y_lines(self) -> int:
        return self.y.size


def grade(keys: np.ndarray, sizes: np.ndarray, growth: float) -> np.ndarray:
    """Graded nodes on [keys[0], keys[-1]] containing every key.

    Inside each segment [a, b] the wanted size is s(x) = min(h_a + g (x - a), h_b + g (b - x));
    nodes sit at equal steps of the integral of 1/s, so the element count is the smallest
    that honours s and the sizes vary smoothly.
    """
    out = [float(keys[0])]
    for a, b, ha, hb in zip(keys[:-1], keys[1:], sizes[:-1], sizes[1:], strict=True):
        length = b - a
        h0 = min(ha, hb, length)
        off = np.geomspace(h0 * 1e-3, length, 200)
        aux = np.unique(np.concatenate([[a, b], a + off, b - off]))
        aux = aux[(aux >= a) & (aux <= b)]
        s = np.minimum(ha + growth * (aux - a), hb + growth * (b - aux))
        phi = np.concatenate([[0.0], np.cumsum(np.diff(aux) * 0.5 * (1 / s[1:] + 1 / s[:-1]))])
        n = max(1, int(math.ceil(phi[-1] - 1e-6)))
        xs = np.interp(np.linspace(0.0, phi[-1], n + 1), phi, aux)
        out.extend(xs[1:-1].tolist())
        out.append(float(b))
    return np.asarray(out)


class _Keys:
    """Key coordinates on one axis with their first element size (smallest wins)."""

    def __init__(self, tol: float) -> None:
        self.tol = tol
        self.items: list[list[float]] = []  # [coord, size]

    def add(self, coord: float, size: float) -> None:
        if not math.isfinite(coord):
            return
        for item in self.items:
            if abs(item[0] - coord) <= self.tol:
                item[1] = min(item[1], size)
                return
        self.items.append([coord, size])

    def arrays(self) -> tuple[np.ndarray, np.ndarray]:
        items = sorted(self.items)
        return np.array([c for c, _ in items]), np.array([s for _, s in items])


@dataclass
class _KeyLine:
    ref: float
    knots: list[tuple[float, float]]  # (y, x)
    size: float

    def at(self, y: np.ndarray) -> np.ndarray:
        if not self.knots:
            return np.full(np.shape(y), self.ref)
        k = sorted(self.knots)
        return np.interp(y, [a for a, _ in k], [b for _, b in k])


def _feature_size(geom: Geometry, tr: Trace) -> float:
    """The smallest dimension around a conductor: its widths and thickness, the gaps to
    planes, interfaces, other conductors, and the coating on it."""
    xl, xr, tl, tr_ = tr.corners_x
    sizes = [xr - xl]
    if tr.thickness > 0:
        sizes += [tr.thickness, tr_ - tl]
    ys = list(geom.interfaces)
    if not geom.plane_below:
        ys = ys[1:] if tr.y > 0 else ys
    if not geom.plane_above:
        ys = ys[:-1] if tr.top < geom.stack_top - geom.tol else ys
    for y in ys:
        for d in (abs(y - tr.y), abs(y - tr.top)):
            if d > geom.tol:
                sizes.append(d)
    for other in geom.traces:
        if other is tr:
            continue
        if min(other.top, tr.top) - max(other.y, tr.y) >= -geom.tol:
            for a in (other.x_left, other.x_right):
                for b in (xl, xr):
                    if math.isfinite(a) and math.isfinite(b):
                        sizes.append(abs(a - b))
        else:
            sizes.append(max(other.y - tr.top, tr.y - other.top))
    if geom.coated(tr):
        sizes.append(geom.coating.thickness)  # type: ignore[union-attr]
    return float(min(s for s in sizes if s > geom.tol))


def build_mesh(geom: Geometry, prm: MeshParams) -> GridMesh:
    """The graded triangle mesh of ``geom`` with region labels."""
    tol = geom.tol
    scale = geom.scale
    top = geom.stack_top
    finite_x = [x for tr in geom.traces for x in tr.corners_x if math.isfinite(x)]
    if geom.coating is not None:
        for tr in geom.traces:
            if geom.coated(tr):
                (lb, lt), (rb, rt) = geom.coating_walls(tr)
                finite_x += [x for x in (lb, lt, rb, rt) if math.isfinite(x)]
    xmin, xmax = min(finite_x), max(finite_x)
    if geom.plane_below and geom.plane_above:
        margin_x = 5.0 * top + scale
    else:
        margin_x = prm.far * scale
    x0, x1 = xmin - margin_x, xmax + margin_x
    y0 = 0.0 if geom.plane_below else -prm.far * scale
    struct_top = max(
        [top + (geom.coating.thickness if geom.coating else 0.0)]
        + [tr.top + (geom.coating.thickness if geom.coated(tr) else 0.0) for tr in geom.traces]
    )
    y1 = top if geom.plane_above else struct_top + prm.far * scale

    ykeys = _Keys(tol)
    ykeys.add(y0, math.inf)
    ykeys.add(y1, math.inf)
    xkeys = _Keys(tol)
    xkeys.add(x0, math.inf)
    xkeys.add(x1, math.inf)
    lines: list[_KeyLine] = []

    def key_line(ref: float, knots: list[tuple[float, float]], size: float) -> None:
        if not math.isfinite(ref):
            return
        for ln in lines:
            if abs(ln.ref - ref) <= tol:
                for y, x in knots:
                    for y2, x2 in ln.knots:
                        if abs(y - y2) <= tol and abs(x - x2) > tol:
                            raise LossLaneError(
                                "field solver: two slanted walls share a vertical grid line "
                                "with different shapes; shift one conductor slightly"
                            )
                ln.knots.extend(knots)
                ln.size = min(ln.size, size)
                xkeys.add(ref, size)
                return
        lines.append(_KeyLine(ref, list(knots), size))
        xkeys.add(ref, size)

    # interfaces and faces: first size relative to the spacing of the layers there
    faces = list(geom.interfaces)
    gaps = np.diff(geom.interfaces)
    for i, y in enumerate(faces):
        near = [
            g
            for g in (gaps[i - 1] if i > 0 else None, gaps[i] if i < len(gaps) else None)
            if g is not None
        ]
        ykeys.add(float(y), prm.face * min(near))
    for tr in geom.traces:
        feat = _feature_size(geom, tr)
        h = prm.corner * feat
        ykeys.add(tr.y, h)
        if tr.thickness > 0:
            ykeys.add(tr.top, h)
        xl, xr, tl, tr_ = tr.corners_x
        for xb, xt in ((xl, tl), (xr, tr_)):
            knots = [(tr.y, xb), (tr.top, xt)] if (tr.thickness > 0 and xb != xt) else []
            key_line(xb, knots, h)
        if geom.coated(tr):
            c = geom.coating.thickness  # type: ignore[union-attr]
            hc = prm.face * c
            ykeys.add(tr.top + c, hc)
            for xb, xt in geom.coating_walls(tr):
                knots = [(tr.y + c, xb), (tr.top + c, xt)] if abs(xb - xt) > tol else []
                key_line(xb, knots, hc)
    if geom.coating is not None:
        ykeys.add(top + geom.coating.thickness, prm.face * geom.coating.thickness)

    yk, ys = ykeys.arrays()
    y = grade(yk, ys, prm.growth)
    xk, xs = xkeys.arrays()
    xi = grade(xk, xs, prm.growth)  # reference positions of the vertical lines

    # actual x of every vertical line at every horizontal line
    refs = np.array([x0] + [ln.ref for ln in sorted(lines, key=lambda a: a.ref)] + [x1])
    keyed = sorted(lines, key=lambda a: a.ref)
    xk_at = np.empty((len(y), len(refs)))
    xk_at[:, 0], xk_at[:, -1] = x0, x1
    for k, ln in enumerate(keyed):
        xk_at[:, k + 1] = ln.at(y)
    if np.any(np.diff(xk_at, axis=1) <= tol):
        raise LossLaneError(
            "field solver: slanted walls of conductors on different heights cross each "
            "other's grid lines; the mesh cannot be built for this geometry"
        )
    X = np.empty((len(y), len(xi)))
    for j in range(len(y)):
        X[j] = np.interp(xi, refs, xk_at[j])
    nx, ny = len(xi), len(y)
    Y = np.broadcast_to(y[:, None], (ny, nx))
    p = np.vstack([X.ravel(), Y.ravel()])

    # quads (j, i): corners a=(j,i) b=(j,i+1) c=(j+1,i+1) d=(j+1,i)
    jj, ii = np.meshgrid(np.arange(ny - 1), np.arange(nx - 1), indexing="ij")
    a = (jj * nx + ii).ravel()
    b = a + 1
    d = a + nx
    c = d + 1
    cx = 0.25 * (p[0, a] + p[0, b] + p[0, c] + p[0, d])
    cy = 0.25 * (p[1, a] + p[1, b] + p[1, c] + p[1, d])
    region, inside = classify(geom, cx, cy)
    keep = ~inside
    a, b, c, d, region = a[keep], b[keep], c[keep], d[keep], region[keep]
    # split along the shorter diagonal (keeps the largest angle small)
    ac = np.hypot(*(p[:, a] - p[:, c]))
    bd = np.hypot(*(p[:, b] - p[:, d]))
    # ties (rectangles) alternate with the side of x = 0, so a structure symmetric about
    # x = 0 gets a mirror-symmetric mesh and exactly equal self terms
    tie = np.abs(ac - bd) <= 1e-9 * (ac + bd)
    use_ac = np.where(tie, cx[keep] < 0, ac < bd)
    t1 = np.where(use_ac, [a, b, c], [a, b, d])
    t2 = np.where(use_ac, [a, c, d], [b, c, d])
    t = np.hstack([t1, t2])
    reg = np.concatenate([region, region])
    used = np.unique(t)
    remap = -np.ones(p.shape[1], dtype=np.int64)
    remap[used] = np.arange(used.size)
    return GridMesh(
        p[:, used], remap[t], reg, (x0, x1, y0, y1), xi, y, refs, yk, used % nx, used // nx
    )


def classify(geom: Geometry, x: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Region index of each point (``Geometry.regions()`` order) and whether it lies
    inside a conductor."""
    names = geom.regions()
    air = len(names) - 1
    coat = len(names) - 2 if geom.coating is not None else -1
    faces = geom.interfaces
    top = geom.stack_top
    region = np.full(x.shape, air, dtype=np.int64)
    for i in range(len(geom.layers)):
        sel = (y > faces[i]) & (y < faces[i + 1])
        region[sel] = i
    inside = np.zeros(x.shape, dtype=bool)
    for tr in geom.traces:
        if tr.thickness == 0:
            continue
        band = (y > tr.y) & (y < tr.top)
        yy = np.clip(y, tr.y, tr.top)
        inside |= band & (x > tr.left_at(yy)) & (x < tr.right_at(yy))
    if geom.coating is not None:
        c = geom.coating.thickness
        sel = (y > top) & (y < top + c)
        for tr in geom.traces:
            if not geom.coated(tr):
                continue
            (lb, lt), (rb, rt) = geom.coating_walls(tr)
            band = (y > tr.y) & (y < tr.top + c)
            frac = np.clip((y - tr.y - c) / tr.thickness, 0, 1) if tr.thickness > 0 else 0.0
            left = lb + (lt - lb) * frac if math.isfinite(lb) else -np.inf
            right = rb + (rt - rb) * frac if math.isfinite(rb) else np.inf
            sel |= band & (x > left) & (x < right)
        region[sel & (y > top)] = coat
    return region, inside

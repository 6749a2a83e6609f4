"""Quasi-static field solution of a cross-section with scikit-fem.

Method (2-D quasi-TEM analysis by finite elements):

* the electrostatic potential solves div(eps grad phi) = 0 with piecewise-constant
  permittivity, each conductor held at its potential (Dirichlet), the truncation box
  grounded; quadratic (P2) Lagrange triangles on the graded mesh of ``mesh.py``;
* the Maxwell capacitance matrix comes from the field energy,
  C_ij = eps0 int eps grad phi_i . grad phi_j (variational, so its error is the square of
  the potential's); C0 is the same with every region vacuum and L_ext = mu0 eps0 C0^-1;
* the energy partition F_r,ij = eps0 int_r grad phi_i . grad phi_j of region r gives
  C = sum_r eps_r F_r exactly at the solve's permittivities, and dC/d eps_r = F_r (the
  energy is stationary in the potential); ``section.py`` uses it for C(f) and G(f);
* conductor loss: in the TEM limit the surface current follows the surface charge of the
  vacuum problem (J_s = c0 sigma_s for the charges q = C0 V), and the skin-effect
  resistance of conductor group g is R_s G^g with G^g_ij the closed integral of j_i j_j
  over its surface per unit currents: Wheeler's incremental-inductance rule
  (H. A. Wheeler, Proc. IRE 30, 1942), G = (1/mu0) dL/dn. By Hadamard's formula that
  integral equals -eps0 C0^-1 (dC0/dn) C0^-1 for the walls receding by dn, and dC0/dn is
  evaluated exactly for the discrete solution as a domain integral over the elements
  near the conductor (the virtual-work form), with a mesh velocity that moves the
  neighbourhood of each corner rigidly. Being variational it converges like C0 (0.01 %
  changes between mesh settings), where the direct integral of the squared charge
  density (``charge_factor``, kept as a cross-check) converges slowly because
  |sigma|^2 is singular at the corners (about 1 % per setting);

Accuracy control: ``LEVELS`` name three mesh settings; every result carries the solution
at the next coarser setting too, and the change between the two is the reported
discretisation error estimate (conservative: the error of the finer solution is
smaller when the solutions converge).
"""

from __future__ import annotations

import math
from collections import OrderedDict
from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError
from losslane.xsection.fieldsolve.geometry import F_REF, Geometry
from losslane.xsection.fieldsolve.keys import ACCURACIES
from losslane.xsection.fieldsolve.mesh import GridMesh, MeshParams, build_mesh
from losslane.xsection.rlgc import EPS0

#: accuracy setting -> mesh level; level -1 only serves the error estimate of "coarse"
LEVELS = {name: level for level, name in enumerate(ACCURACIES)}
PARAMS = {
    -1: MeshParams(corner=0.08, face=0.4, growth=0.7, far=25.0),
    0: MeshParams(corner=0.03, face=0.25, growth=0.5, far=40.0),
    1: MeshParams(corner=0.01, face=0.15, growth=0.35, far=60.0),
    2: MeshParams(corner=0.003, face=0.1, growth=0.25, far=100.0),
}


@dataclass(frozen=True)
class GroupFactor:
    """Wheeler-type geometry factor matrix (1/m) of one conductor group.

    ``kind`` is 'signal' (one signal conductor, ``index`` its number), 'ground' (the
    coplanar grounds) or 'plane'; ``area`` the cross-section area of a signal conductor
    and ``thickness`` that of a ground conductor (for its DC resistance).
    """

    name: str
    kind: str
    index: int
    matrix: np.ndarray
    area: float = 0.0
    thickness: float = 0.0


@dataclass(frozen=True)
class Solution:
    """Electrostatic results of one mesh level (n = number of signal conductors)."""

    level: int
    partition: np.ndarray  # (regions, n, n) F/m per unit relative permittivity
    reduced_q: np.ndarray  # (regions, m, n) reduced model of C(eps), see solve_level
    reduced_r: np.ndarray  # (regions, m, m)
    eps_ref: np.ndarray  # (regions,) the permittivities of the solve
    c_ref: np.ndarray  # (n, n) at the reference permittivities
    c0: np.ndarray  # (n, n) vacuum
    groups: tuple[GroupFactor, ...]
    lossless: tuple[str, ...]  # conductors whose loss is not modelled (zero thickness)
    elements: int
    unknowns: int


@dataclass
class Fields:
    """Mesh, basis and potentials of one solve (for pictures and checks)."""

    mesh: object
    basis: object
    grid: GridMesh
    potential: np.ndarray  # (dofs, n) with the reference permittivities
    potential0: np.ndarray  # (dofs, n) vacuum
    eps: np.ndarray  # (regions,)


def reference_permittivities(geom: Geometry) -> np.ndarray:
    return np.array(
        [1.0 if d is None else float(d.eps(np.array([F_REF]))[0].real) for _, d in geom.regions()]
    )


def _facet_sets(geom: Geometry, mesh, box) -> dict:
    """Facets on each conductor, plane and the truncation box."""
    tol = 1e-7 * geom.scale
    f = mesh.facets
    mx = 0.5 * (mesh.p[0, f[0]] + mesh.p[0, f[1]])
    my = 0.5 * (mesh.p[1, f[0]] + mesh.p[1, f[1]])
    boundary = np.zeros(f.shape[1], dtype=bool)
    boundary[mesh.boundary_facets()] = True
    used = np.zeros(f.shape[1], dtype=bool)
    traces = []
    for tr in geom.traces:
        if tr.thickness == 0:
            on = (np.abs(my - tr.y) <= tol) & (mx >= tr.x_left - tol) & (mx <= tr.x_right + tol)
        else:
            yy = np.clip(my, tr.y, tr.top)
            on = (
                boundary
                & (my >= tr.y - tol)
                & (my <= tr.top + tol)
                & (mx >= tr.left_at(yy) - tol)
                & (mx <= tr.right_at(yy) + tol)
            )
        traces.append(np.nonzero(on & ~used)[0])
        used |= on
    planes = {}
    if geom.plane_below:
        on = boundary & ~used & (np.abs(my) <= tol)
        planes["lower plane"] = np.nonzero(on)[0]
        used |= on
    if geom.plane_above:
        on = boundary & ~used & (np.abs(my - geom.stack_top) <= tol)
        planes["upper plane"] = np.nonzero(on)[0]
        used |= on
    box_f = np.nonzero(boundary & ~used)[0]
    return {"traces": traces, "planes": planes, "box": box_f}


@dataclass
class _Solved:
    grid: GridMesh
    mesh: object
    basis: object
    k_regions: list  # per region: its stiffness matrix (None when the region is empty)
    k_eps: object
    k_0: object
    sets: dict
    u: np.ndarray
    u0: np.ndarray
    lu_eps: object
    free: np.ndarray


def _solve_fields(geom: Geometry, level: int, eps: np.ndarray) -> _Solved:
    from scipy.sparse.linalg import splu
    from skfem import BilinearForm, CellBasis, ElementTriP2, MeshTri, asm
    from skfem.helpers import dot, grad

    grid = build_mesh(geom, PARAMS[level])
    mesh = MeshTri(np.ascontiguousarray(grid.p), np.ascontiguousarray(grid.t))
    elem = ElementTriP2()
    basis = CellBasis(mesh, elem)

    @BilinearForm
    def laplace(u, v, w):
        return dot(grad(u), grad(v))

    k_regions = []
    for r in range(len(eps)):
        idx = np.nonzero(grid.region == r)[0]
        k_regions.append(
            asm(laplace, CellBasis(mesh, elem, elements=idx)).tocsr() if idx.size else None
        )
    present = [k for k in k_regions if k is not None]
    k_0 = sum(present[1:], present[0])
    k_eps = sum(
        (e * k for e, k in zip(eps, k_regions, strict=True) if k is not None), 0 * present[0]
    )

    sets = _facet_sets(geom, mesh, grid.box)
    sig_dofs: list[np.ndarray] = []
    ground_parts = [basis.get_dofs(facets=sets["box"]).all()]
    for tr, fac in zip(geom.traces, sets["traces"], strict=True):
        if fac.size == 0:
            raise LossLaneError(
                f"field solver: conductor {tr.name or '?'} is not resolved by the mesh"
            )
        (sig_dofs if tr.signal else ground_parts).append(basis.get_dofs(facets=fac).all())
    for fac in sets["planes"].values():
        ground_parts.append(basis.get_dofs(facets=fac).all())
    fixed = np.unique(np.concatenate(sig_dofs + ground_parts))
    n = len(sig_dofs)
    ndof = basis.N
    free = np.setdiff1d(np.arange(ndof), fixed)

    def solve(k):
        u = np.zeros((ndof, n))
        for i, d in enumerate(sig_dofs):
            u[d, i] = 1.0
        a = k[free][:, free].tocsc()
        rhs = -(k[free][:, fixed] @ u[fixed])
        lu = splu(a, permc_spec="MMD_AT_PLUS_A")
        u[free] = lu.solve(np.ascontiguousarray(rhs)).reshape(-1, n)
        return u, lu

    u, lu_eps = solve(k_eps)
    u0, _ = solve(k_0)
    return _Solved(grid, mesh, basis, k_regions, k_eps, k_0, sets, u, u0, lu_eps, free)


def fields(geom: Geometry, level: int = 1) -> Fields:
    """Potentials of a solve (not cached): for pictures and checks."""
    eps = reference_permittivities(geom)
    sv = _solve_fields(geom, level, eps)
    return Fields(sv.mesh, sv.basis, sv.grid, sv.u, sv.u0, eps)


def solve_level(geom: Geometry, level: int, eps: np.ndarray | None = None) -> Solution:
    """The electrostatic results of ``geom`` at mesh ``level`` (no cache)."""
    if eps is None:
        eps = reference_permittivities(geom)
    eps = np.asarray(eps, float)
    sv = _solve_fields(geom, level, eps)
    grid, mesh, basis, sets, u, u0 = sv.grid, sv.mesh, sv.basis, sv.sets, sv.u, sv.u0
    n = u.shape[1]
    c_ref = EPS0 * (u.T @ (sv.k_eps @ u))
    c0 = EPS0 * (u0.T @ (sv.k_0 @ u0))
    c_ref = 0.5 * (c_ref + c_ref.T)
    c0 = 0.5 * (c0 + c0.T)

    # energy partition F_r = eps0 u^T K_r u = dC/d eps_r, and a reduced model of C(eps)
    # for any (complex) region permittivities: Galerkin on u + span(W), W = the
    # sensitivities du/d eps_s (K du = -K_s u: one back-substitution each) and the
    # change to the vacuum solution; C = P - Q^T R^-1 Q is stationary, so its error is
    # the square of that of the reduced potential (fourth order in the changes of eps)
    nreg = len(eps)
    ku = [None if k is None else k @ u for k in sv.k_regions]
    cols = [u0 - u]
    for s_ in range(nreg):
        if ku[s_] is not None:
            d = np.zeros_like(u)
            d[sv.free] = sv.lu_eps.solve(np.ascontiguousarray(-ku[s_][sv.free])).reshape(-1, n)
            cols.append(d)
    w = np.hstack(cols)
    gram = w.T @ (sv.k_0 @ w)
    lam, vec = np.linalg.eigh(0.5 * (gram + gram.T))
    keep = lam > 1e-11 * lam.max()
    w = w @ (vec[:, keep] / np.sqrt(lam[keep]))
    m = w.shape[1]
    part = np.zeros((nreg, n, n))
    red_q = np.zeros((nreg, m, n))
    red_r = np.zeros((nreg, m, m))
    for r in range(nreg):
        k = sv.k_regions[r]
        if k is None:
            continue
        kw = k @ w
        part[r] = EPS0 * (u.T @ ku[r])
        red_q[r] = EPS0 * (w.T @ ku[r])
        red_r[r] = EPS0 * (w.T @ kw)
    part = 0.5 * (part + np.swapaxes(part, 1, 2))
    red_r = 0.5 * (red_r + np.swapaxes(red_r, 1, 2))

    # conductor-loss factors: Wheeler's rule G = (1/mu0) dL/dn = -eps0 C0^-1 (dC0/dn) C0^-1,
    # the closed integral of the squared vacuum surface current, through the shape
    # derivative of the vacuum energy (variational, so it converges like C0 itself)
    c0_inv = np.linalg.inv(c0)

    def factor(vel: np.ndarray) -> np.ndarray:
        dc0 = EPS0 * shape_derivative(mesh, basis, u0, vel)
        g = -EPS0 * c0_inv @ dc0 @ c0_inv
        return 0.5 * (g + g.T)

    groups: list[GroupFactor] = []
    lossless: list[str] = []
    sig_index = 0
    ground_vel = np.zeros((2, mesh.p.shape[1]))
    ground_t: list[float] = []
    for tr in geom.traces:
        label = tr.name or (f"conductor {sig_index + 1}" if tr.signal else "coplanar ground")
        if tr.signal:
            if tr.thickness > 0:
                vel = trace_velocity(geom, grid, tr)
                groups.append(GroupFactor(label, "signal", sig_index, factor(vel), area=tr.area))
            else:
                lossless.append(label)
            sig_index += 1
        elif tr.thickness > 0:
            ground_vel += trace_velocity(geom, grid, tr)
            ground_t.append(tr.thickness)
        elif label not in lossless:
            lossless.append(label)
    if ground_t:
        groups.append(
            GroupFactor(
                "coplanar grounds", "ground", -1, factor(ground_vel), thickness=float(min(ground_t))
            )
        )
    for name in sets["planes"]:
        groups.append(GroupFactor(name, "plane", -1, factor(plane_velocity(geom, grid, name))))
    return Solution(
        level,
        part,
        red_q,
        red_r,
        eps,
        c_ref,
        c0,
        tuple(groups),
        tuple(lossless),
        mesh.t.shape[1],
        sv.free.size,
    )


# -- conductor-loss factors -------------------------------------------------------------
def _neighbours(keys: np.ndarray, lo: float, hi: float, tol: float) -> tuple[float, float]:
    """The key coordinates just below ``lo`` and just above ``hi``."""
    below = keys[keys < lo - tol]
    above = keys[keys > hi + tol]
    return float(below[-1]) if below.size else float(keys[0]), (
        float(above[0]) if above.size else float(keys[-1])
    )


def _ramp(v: np.ndarray, pts: list[float], vals: list[float]) -> np.ndarray:
    """Piecewise-linear profile through (pts, vals), zero outside; tolerates repeats."""
    out = np.zeros(v.shape)
    for (a, fa), (b, fb) in zip(
        zip(pts[:-1], vals[:-1], strict=True), zip(pts[1:], vals[1:], strict=True), strict=True
    ):
        if b <= a:
            continue
        sel = (v >= a) & (v <= b)
        out[sel] = fa + (fb - fa) * (v[sel] - a) / (b - a)
    return out


def trace_velocity(geom: Geometry, grid: GridMesh, tr) -> np.ndarray:
    """Nodal velocity (2, N) that recedes every wall of conductor ``tr`` into the metal at
    unit normal speed, blended to zero at the neighbouring grid key lines.

    Near the conductor the mesh moves almost rigidly (the velocity changes only over the
    distance to the neighbouring key lines), so the derivative of the discrete energy is
    the shape derivative of the true one to the solver's accuracy.
    """
    tol = geom.tol
    xi = grid.xi[grid.node_i]
    eta = grid.y[grid.node_j]
    xl, xr, tl, trr = tr.corners_x
    t = tr.thickness
    x0, x1 = grid.x_keys[0], grid.x_keys[-1]
    lw, rw = math.isfinite(xl), math.isfinite(xr)
    e_l = xl if lw else x0
    e_r = xr if rw else x1
    p_l, _ = _neighbours(grid.x_keys, e_l, e_l, tol) if lw else (x0, x0)
    _, p_r = _neighbours(grid.x_keys, e_r, e_r, tol) if rw else (x1, x1)
    q_b, q_t = _neighbours(grid.y_keys, tr.y, tr.top, tol)
    ys = [q_b, tr.y, tr.top, q_t]
    q = _ramp(eta, ys, [0.0, 1.0, -1.0, 0.0])
    band = _ramp(eta, ys, [0.0, 1.0, 1.0, 0.0])
    ml = (tl - xl) / t if lw else 0.0
    mr = (trr - xr) / t if rw else 0.0
    a_l = (math.sqrt(1 + ml * ml) + ml * q) if lw else np.zeros(q.shape)
    a_r = (mr * q - math.sqrt(1 + mr * mr)) if rw else np.zeros(q.shape)
    vx = np.zeros(xi.shape)
    if lw:
        s = (xi >= p_l) & (xi < e_l)
        vx[s] = a_l[s] * (xi[s] - p_l) / (e_l - p_l)
    s = (xi >= e_l) & (xi <= e_r)
    vx[s] = a_l[s] + (a_r[s] - a_l[s]) * (xi[s] - e_l) / (e_r - e_l)
    if rw:
        s = (xi > e_r) & (xi <= p_r)
        vx[s] = a_r[s] * (p_r - xi[s]) / (p_r - e_r)
    vx *= band
    vy = q * _ramp(xi, [p_l, e_l, e_r, p_r], [0.0 if lw else 1.0, 1.0, 1.0, 0.0 if rw else 1.0])
    return np.vstack([vx, vy])


def plane_velocity(geom: Geometry, grid: GridMesh, which: str) -> np.ndarray:
    """Nodal velocity receding the lower or upper plane into its metal (unit speed)."""
    tol = geom.tol
    eta = grid.y[grid.node_j]
    v = np.zeros((2, eta.size))
    if which == "lower plane":
        _, nxt = _neighbours(grid.y_keys, 0.0, 0.0, tol)
        v[1] = -_ramp(eta, [0.0, nxt], [1.0, 0.0])
    else:
        top = geom.stack_top
        prv, _ = _neighbours(grid.y_keys, top, top, tol)
        v[1] = _ramp(eta, [prv, top], [0.0, 1.0])
    return v


def shape_derivative(mesh, basis, u: np.ndarray, vel: np.ndarray) -> np.ndarray:
    """d/dt of int grad u_i . grad u_j when the mesh nodes move with ``vel`` (2, N) and the
    nodal values ride along: int grad u_i^T [(div V) I - grad V - grad V^T] grad u_j
    (exact for the discrete energy; the virtual-work form of Hadamard's formula)."""
    p, t = mesh.p, mesh.t
    x, y = p[0, t], p[1, t]
    det = (x[1] - x[0]) * (y[2] - y[0]) - (x[2] - x[0]) * (y[1] - y[0])
    # gradients of the barycentric coordinates, (3, nel) each
    gx = np.array([y[1] - y[2], y[2] - y[0], y[0] - y[1]]) / det
    gy = np.array([x[2] - x[1], x[0] - x[2], x[1] - x[0]]) / det
    vx, vy = vel[0, t], vel[1, t]
    dvx_dx, dvx_dy = (vx * gx).sum(0), (vx * gy).sum(0)
    dvy_dx, dvy_dy = (vy * gx).sum(0), (vy * gy).sum(0)
    div = dvx_dx + dvy_dy
    mxx = (div - 2 * dvx_dx)[:, None]
    myy = (div - 2 * dvy_dy)[:, None]
    mxy = (-(dvx_dy + dvy_dx))[:, None]
    n = u.shape[1]
    grads = [basis.interpolate(u[:, i]).grad for i in range(n)]
    dx = basis.dx
    out = np.zeros((n, n))
    for i in range(n):
        gi = grads[i]
        for j in range(i, n):
            gj = grads[j]
            dens = mxx * gi[0] * gj[0] + myy * gi[1] * gj[1] + mxy * (gi[0] * gj[1] + gi[1] * gj[0])
            out[i, j] = out[j, i] = float(np.sum(dens * dx))
    return out


def charge_factor(
    mesh, basis, reaction: np.ndarray, facets: np.ndarray, c0_inv: np.ndarray
) -> np.ndarray:
    """The same factor from the surface charge directly: the L2 projection of the
    finite-element reactions on the conductor's surface, closed integral of sigma_i
    sigma_j, converted to unit currents (a cross-check; it converges slowly because
    |sigma|^2 is singular at the corners)."""
    from scipy.sparse.linalg import spsolve
    from skfem import BilinearForm, ElementTriP2, FacetBasis, asm

    @BilinearForm
    def mass(a, b, w):
        return a * b

    fb = FacetBasis(mesh, ElementTriP2(), facets=facets)
    m = asm(mass, fb).tocsr()
    d = basis.get_dofs(facets=facets).all()
    mg = m[d][:, d].tocsc()
    n = reaction.shape[1]
    sigma = spsolve(mg, reaction[d]).reshape(len(d), n)
    q = sigma.T @ (mg @ sigma)
    g = c0_inv @ q @ c0_inv
    return 0.5 * (g + g.T)


# -- cache ---------------------------------------------------------------------------
class SolutionCache:
    """Solved cross-sections, keyed by the electrostatic problem (shapes and reference
    permittivities, ``Geometry.electrostatic_key``) and the mesh level, so that a
    channel, a sizing search or a sweep that meets one cross-section again solves it
    once. Bounded: beyond ``size`` entries the least recently used goes. ``solves`` and
    ``hits`` count what happened since the last ``clear``.

    A cache belongs to one process: pickling it (to ship work to another process) keeps
    only its size, so solutions are never sent between processes; each worker fills its
    own.
    """

    def __init__(self, size: int = 64) -> None:
        self.size = int(size)
        self._items: OrderedDict = OrderedDict()
        self.solves = 0
        self.hits = 0

    def solve(self, geom: Geometry, level: int) -> Solution:
        key = (geom.electrostatic_key(), level)
        hit = self._items.get(key)
        if hit is not None:
            self._items.move_to_end(key)
            self.hits += 1
            return hit
        sol = solve_level(geom, level)
        self.solves += 1
        self._items[key] = sol
        while len(self._items) > self.size:
            self._items.popitem(last=False)
        return sol

    def clear(self) -> None:
        self._items.clear()
        self.solves = self.hits = 0

    def __len__(self) -> int:
        return len(self._items)

    def __getstate__(self) -> dict:
        return {"size": self.size}

    def __setstate__(self, state: dict) -> None:
        self.__init__(state["size"])


#: this process's cache (what ``solve`` uses)
CACHE = SolutionCache(64)


def solve(geom: Geometry, level: int) -> Solution:
    """The electrostatic results of ``geom`` at mesh ``level``, through ``CACHE``."""
    return CACHE.solve(geom, level)


def level_of(accuracy: str) -> int:
    if accuracy not in LEVELS:
        raise LossLaneError(
            f"accuracy = {accuracy!r}: valid settings are " + ", ".join(repr(k) for k in LEVELS)
        )
    return LEVELS[accuracy]


def relative_change(a: np.ndarray, b: np.ndarray) -> float:
    """Largest change of a matrix, each entry scaled by sqrt(|a_ii a_jj|)."""
    d = np.sqrt(np.abs(np.outer(np.diag(b), np.diag(b))))
    with np.errstate(divide="ignore", invalid="ignore"):
        r = np.abs(a - b) / np.where(d > 0, d, 1.0)
    return float(np.max(r)) if r.size else 0.0


__all__ = [
    "CACHE",
    "LEVELS",
    "PARAMS",
    "Fields",
    "GroupFactor",
    "Solution",
    "SolutionCache",
    "fields",
    "level_of",
    "reference_permittivities",
    "solve",
    "solve_level",
]

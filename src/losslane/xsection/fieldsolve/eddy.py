"""Eddy-current (magneto-quasi-static) mode of the 2-D field solver: the series impedance
per unit length Z(f) = R(f) + j omega L(f) of a cross-section whose conductors, return
planes included, are meshed with their conductivity.

Method. The longitudinal magnetic vector potential A (A_z) solves

    -div((1/mu0) grad A) + j omega sigma A = sigma V_k   inside conductor k,
    -div((1/mu0) grad A)                   = 0           outside the conductors,

where V_k is the longitudinal voltage drop per unit length of conductor k (-dphi/dz,
constant over its cross-section), so that the current density is
J = sigma (V_k - j omega A). The signal conductors have one unknown V each; all return
conductors (planes, coplanar grounds) are joined at the line's ends and share one. The
currents are constrained: I_k = integral of J over conductor k. With quadratic (P2)
Lagrange triangles, K the stiffness matrix, M the conductivity-weighted mass matrix and
B the conductivity-weighted load of each voltage drop (all scaled by mu0), the potential
is A = (K + j omega M)^-1 B V (one sparse factorisation per frequency, one
back-substitution per conductor group) and the currents are I = Y V with the small
matrix Y = G - (j omega / mu0) B^T A, G = diag(sigma area). For signal j carrying +1 A
and the returns -1 A, Z_ij = V_i - V_return.

DC (f = 0): the current is uniform, R = 1/(sigma area) per conductor plus that of the
returns in parallel (exact), and L(0) is the magnetostatic inductance of the uniform
currents, (1/mu0) V^T B^T K^-1 B V with V = G^-1 I, the limit of Im Z / omega.

Far boundary: A = 0 on a box ``far`` structure sizes beyond the conductors (the returns
carry the signals' current back, so the far field is that of a line dipole and the
truncation changes L by O((size/distance)^2); measured in the tests). Meshes of other
shapes (``ConductorMesh``) may instead end on a magnetic wall (natural condition).

Mesh: ``eddy_mesh`` grades the grid into every conductor face down to a fraction of the
smallest skin depth of the requested frequencies; the mesh is built once per call and
reused at every frequency. ``LEVELS`` name three settings; the result carries the
change from the next coarser setting as its discretisation error estimate.

Accuracy at the default setting (measured, see tests/test_eddy.py and
docs/eddy-current.md): the exact two-slab and coaxial solutions within 7.5e-4 in R (the
largest at the highest frequency) and 1e-5 in L from DC to 10 GHz; a 6 mil microstrip
within 0.1 % (R) and 0.05 % (L) of a solve with 6.5 times the unknowns. The reported
estimate (0.5 % and 0.1 % there) is conservative by about five times.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from losslane.errors import LossLaneError
from losslane.materials.conductor import MU0
from losslane.units import OZ_COPPER
from losslane.xsection.fieldsolve.eddy_mesh import (
    ConductorMesh,
    EddyMeshParams,
    build_conductor_mesh,
    conductor_blocks,
)
from losslane.xsection.fieldsolve.geometry import Geometry

#: accuracy setting -> mesh level; level -1 only serves the error estimate of "coarse"
LEVELS = {"coarse": 0, "normal": 1, "fine": 2}
PARAMS = {
    -1: EddyMeshParams(skin=1.6, feature=0.4, growth=0.7, growth_out=1.0, far=3.0),
    0: EddyMeshParams(skin=1.0, feature=0.25, growth=0.5, growth_out=0.8, far=4.0),
    1: EddyMeshParams(skin=0.6, feature=0.15, growth=0.35, growth_out=0.6, far=6.0),
    2: EddyMeshParams(skin=0.35, feature=0.08, growth=0.25, growth_out=0.4, far=9.0),
}
#: default plane width, in structure sizes (``Geometry.scale``)
PLANE_WIDTH_SCALES = 100.0


@dataclass(frozen=True)
class EddyResult:
    """Series impedance per unit length of ``n`` signal conductors with a common return:
    ``f`` (N,), ``r`` (N, n, n) ohm/m, ``l`` (N, n, n) H/m. ``losses`` maps each
    conductor (signals by name, "lower plane", "upper plane", grounds) to its share of
    ``r`` (N, n, n), the power dissipated in it; the shares sum to ``r``. ``error_r`` and
    ``error_l`` (N,) are the largest changes from the next coarser mesh setting, each
    entry scaled by sqrt(X_ii X_jj) (None when not estimated)."""

    f: np.ndarray
    r: np.ndarray
    l: np.ndarray
    losses: dict[str, np.ndarray]
    error_r: np.ndarray | None
    error_l: np.ndarray | None
    names: tuple[str, ...]
    accuracy: str
    plane_width: float
    plane_thickness: float
    elements: int
    unknowns: int

    @property
    def z(self) -> np.ndarray:
        """R + j omega L, (N, n, n)."""
        return self.r + 2j * np.pi * self.f[:, None, None] * self.l


@dataclass
class _Assembled:
    k: object  # stiffness on the free dofs (csc)
    m: object  # mu0 sigma mass on the free dofs (csc)
    b: np.ndarray  # (free, groups) mu0 sigma loads of the groups
    g: np.ndarray  # (groups,) sigma area
    n: int  # signal groups; the last group is the return
    open_boundary: bool
    conductors: list  # per conductor: (its group, its mu0 sigma mass on the free dofs)


@dataclass(frozen=True)
class MeshImpedance:
    """``r``, ``l`` (N, n, n) of a solve on a given mesh; ``losses`` (N, conductors, n, n)
    the part of R dissipated in each conductor of the mesh (they sum to R); ``unknowns``
    the size of the sparse system."""

    r: np.ndarray
    l: np.ndarray
    losses: np.ndarray
    unknowns: int


def _assemble(cm: ConductorMesh) -> _Assembled:
    from skfem import BilinearForm, CellBasis, ElementTriP2, asm
    from skfem.helpers import dot, grad

    @BilinearForm
    def laplace(u, v, w):
        return dot(grad(u), grad(v))

    @BilinearForm
    def mass(u, v, w):
        return u * v

    mesh = cm.mesh
    elem = ElementTriP2()
    basis = CellBasis(mesh, elem)
    k_all = asm(laplace, basis).tocsr()
    n = cm.n_signals
    if sorted(set(s for s in cm.signal if s >= 0)) != list(range(n)):
        raise LossLaneError("eddy-current solver: signal indices must run 0..n-1")
    if all(s >= 0 for s in cm.signal):
        raise LossLaneError("eddy-current solver: the cross-section needs a return conductor")
    ndof = basis.N
    m_all = None
    parts = []
    b = np.zeros((ndof, n + 1))
    g = np.zeros(n + 1)
    ones = np.ones(ndof)
    for k, (sig, sg) in enumerate(zip(cm.signal, cm.sigma, strict=True)):
        idx = np.nonzero(cm.conductor == k)[0]
        if idx.size == 0:
            raise LossLaneError(f"eddy-current solver: {cm.names[k]} has no elements")
        mk = asm(mass, CellBasis(mesh, elem, elements=idx)).tocsr() * (MU0 * sg)
        m_all = mk if m_all is None else m_all + mk
        col = sig if sig >= 0 else n
        b[:, col] += mk @ ones  # P2 functions sum to one: the load of a uniform V
        g[col] += float(mk.sum()) / MU0  # sigma times the area
        parts.append((col, mk))
    if cm.open_boundary:
        fixed = basis.get_dofs(mesh.boundary_facets()).all()
    else:
        fixed = np.zeros(0, dtype=np.int64)
    free = np.setdiff1d(np.arange(ndof), fixed)
    kf = k_all[free][:, free].tocsc()
    mf = m_all[free][:, free].tocsc()
    parts = [(col, mk[free][:, free].tocsr()) for col, mk in parts]
    return _Assembled(kf, mf, b[free], g, n, cm.open_boundary, parts)


def _factor(a):
    """Sparse LU of K + j omega M in its own order (minimum degree on A + A^T), pivoting
    on the diagonal: the matrix is complex symmetric with a positive definite real part
    K, for which elimination without pivoting is stable (G. H. Golub, C. F. Van Loan,
    *Matrix Computations*, on matrices with a positive definite symmetric part)."""
    from scipy.sparse.linalg import splu

    return splu(
        a, permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0, options={"SymmetricMode": True}
    )


def _one_blas_thread():
    """A context limiting BLAS to one thread: the factorisation's many small dense kernels
    run several times slower with threaded BLAS on a busy machine (measured: 0.3 s against
    2-4 s per frequency on two loaded cores). Without threadpoolctl, a no-op."""
    try:
        from threadpoolctl import threadpool_limits
    except ImportError:  # pragma: no cover - optional speed-up
        from contextlib import nullcontext

        return nullcontext()
    return threadpool_limits(limits=1, user_api="blas")


def _losses(asm_: _Assembled, v: np.ndarray, e_a: np.ndarray | None) -> np.ndarray:
    """(conductors, n, n): Re of the integral of J_i^* J_j / sigma over each conductor,
    for the voltage drops ``v`` (groups, n) and the induced field ``e_a`` = -j omega A
    (free dofs, n; None at DC): the share of R dissipated there. With E = V - j omega A
    in nodal form (P2 functions sum to one), it is E^H M_k E / mu0."""
    out = np.zeros((len(asm_.conductors), asm_.n, asm_.n))
    for k, (col, mk) in enumerate(asm_.conductors):
        ones = np.ones(mk.shape[0])
        e = np.outer(ones, v[col]) if e_a is None else np.outer(ones, v[col]) + e_a
        out[k] = (e.conj().T @ (mk @ e)).real / MU0
    return 0.5 * (out + np.swapaxes(out, 1, 2))


def _dc(asm_: _Assembled) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """R, L (n, n) and the losses of uniform currents."""
    n = asm_.n
    p = np.vstack([np.eye(n), -np.ones((1, n))])  # unit signal currents, return -sum
    v = p / asm_.g[:, None]  # (groups, n) voltage drops of the uniform currents
    k = asm_.k
    rhs = asm_.b @ v
    if not asm_.open_boundary:
        # magnetic walls all round: A is defined up to a constant; the currents sum to
        # zero, so pinning one value removes only that constant
        k = k.tolil()
        k[0, :] = 0
        k[:, 0] = 0
        k[0, 0] = 1.0
        k = k.tocsc()
        rhs[0] = 0.0
    a = _factor(k).solve(np.ascontiguousarray(rhs))
    lmat = (v.T @ (asm_.b.T @ a)) / MU0
    r = p.T @ v
    return r, 0.5 * (lmat + lmat.T), _losses(asm_, v, None)


def _ac(asm_: _Assembled, f: float) -> tuple[np.ndarray, np.ndarray]:
    """Z (n, n) and the losses at frequency f > 0."""
    omega = 2 * math.pi * f
    n = asm_.n
    lu = _factor((asm_.k + (1j * omega) * asm_.m).tocsc())
    x = lu.solve(np.ascontiguousarray(asm_.b, dtype=complex))
    y = np.diag(asm_.g).astype(complex) - (1j * omega / MU0) * (asm_.b.T @ x)
    y = 0.5 * (y + y.T)
    if asm_.open_boundary:
        p = np.vstack([np.eye(n), -np.ones((1, n))])
        v = np.linalg.solve(y, p)  # voltage drops of unit signal currents
    else:
        # no flux leaves a magnetically walled domain: the currents always sum to zero
        # (Y has the null vector 1), so reference the return's voltage drop to 0
        v = np.vstack([np.linalg.inv(y[:n, :n]), np.zeros((1, n))])
    z = v[:n] - v[n]
    return 0.5 * (z + z.T), _losses(asm_, v, -1j * omega * (x @ v))


def mesh_impedance(cm: ConductorMesh, f: ArrayLike) -> MeshImpedance:
    """R and L (N, n, n) of the conductors of ``cm`` at frequencies ``f`` (Hz, >= 0),
    with each conductor's share of R. The mesh must resolve the skin depth at the highest
    frequency (``build_conductor_mesh`` grades it so)."""
    f = _frequencies(f)
    asm_ = _assemble(cm)
    n = asm_.n
    r = np.zeros(f.shape + (n, n))
    l = np.zeros(f.shape + (n, n))
    losses = np.zeros(f.shape + (len(asm_.conductors), n, n))
    with _one_blas_thread():
        for i, fi in enumerate(f):
            if fi == 0:
                r[i], l[i], losses[i] = _dc(asm_)
            else:
                z, losses[i] = _ac(asm_, float(fi))
                r[i] = z.real
                l[i] = z.imag / (2 * math.pi * fi)
    return MeshImpedance(r, l, losses, asm_.k.shape[0] + n + 1)


def _frequencies(f: ArrayLike) -> np.ndarray:
    f = np.atleast_1d(np.asarray(f, dtype=float))
    if f.ndim != 1 or f.size == 0:
        raise LossLaneError("eddy-current solver: f must be a non-empty 1-D list of frequencies")
    bad = ~np.isfinite(f) | (f < 0)
    if np.any(bad):
        raise LossLaneError(
            f"eddy-current solver: frequency {f[bad][0]!r} Hz; frequencies must be finite and >= 0"
        )
    return f


def level_of(accuracy: str) -> int:
    if accuracy not in LEVELS:
        raise LossLaneError(
            f"eddy-current solver: accuracy = {accuracy!r}; valid settings are "
            + ", ".join(repr(k) for k in LEVELS)
        )
    return LEVELS[accuracy]


def skin_depth(f: float, sigma: float) -> float:
    """1/sqrt(pi f mu0 sigma); infinite at DC."""
    return math.inf if f == 0 else 1.0 / math.sqrt(math.pi * f * MU0 * sigma)


def eddy_mesh(
    geometry: Geometry,
    f_max: float,
    *,
    conductivity: float = 5.8e7,
    plane_thickness: float = OZ_COPPER,
    plane_width: float | None = None,
    level: int = 1,
) -> ConductorMesh:
    """The conductor mesh of ``geometry`` at mesh ``level``, graded for ``f_max``."""
    if not (math.isfinite(conductivity) and conductivity > 0):
        raise LossLaneError(
            f"eddy-current solver: conductivity = {conductivity!r} S/m; valid values are "
            "> 0 (copper 5.8e7 S/m)"
        )
    width = PLANE_WIDTH_SCALES * geometry.scale if plane_width is None else plane_width
    blocks = conductor_blocks(geometry, plane_thickness, width)
    return build_conductor_mesh(
        blocks, conductivity, skin_depth(f_max, conductivity), PARAMS[level]
    )


def eddy_impedance(
    geometry: Geometry,
    f: ArrayLike,
    *,
    conductivity: float = 5.8e7,
    plane_thickness: float = OZ_COPPER,
    plane_width: float | None = None,
    accuracy: str = "normal",
    estimate: bool = True,
) -> EddyResult:
    """Series R(f) and L(f) per unit length of the signal conductors of ``geometry`` with
    a common return (its planes and grounds), by the eddy-current solve.

    ``f``: frequencies (Hz, >= 0; 0 gives the exact DC resistance and the DC inductance).
    ``conductivity``: of every conductor (S/m; copper by default). The reference planes
    become slabs of ``plane_thickness`` (m; 1 oz by default) and ``plane_width`` (m;
    default ``PLANE_WIDTH_SCALES`` times ``geometry.scale``) centred on the traces;
    coplanar grounds that reach the side end at the planes' edges. The dielectrics do
    not enter. ``accuracy``: 'coarse' | 'normal' | 'fine'; with ``estimate`` the solve
    is repeated on the next coarser mesh and the changes are the error estimate.
    """
    level = level_of(accuracy)
    f = _frequencies(f)
    width = PLANE_WIDTH_SCALES * geometry.scale if plane_width is None else float(plane_width)
    kw = dict(conductivity=conductivity, plane_thickness=plane_thickness, plane_width=width)
    fmax = float(f.max())
    cm = eddy_mesh(geometry, fmax, level=level, **kw)
    sol = mesh_impedance(cm, f)
    r, l = sol.r, sol.l
    err_r = err_l = None
    if estimate:
        coarse = mesh_impedance(eddy_mesh(geometry, fmax, level=level - 1, **kw), f)
        err_r, err_l = _change(r, coarse.r), _change(l, coarse.l)
    return EddyResult(
        f,
        r,
        l,
        {name: sol.losses[:, k] for k, name in enumerate(cm.names)},
        err_r,
        err_l,
        tuple(name for name, s in zip(cm.names, cm.signal, strict=True) if s >= 0),
        accuracy,
        width,
        float(plane_thickness),
        int(cm.mesh.t.shape[1]),
        sol.unknowns,
    )


def _change(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Per frequency: the largest |a - b| entry, scaled by sqrt(|a_ii a_jj|)."""
    d = np.abs(np.einsum("fii->fi", a))
    scale = np.sqrt(d[:, :, None] * d[:, None, :])
    return np.max(np.abs(a - b) / np.where(scale > 0, scale, 1.0), axis=(1, 2))


__all__ = [
    "LEVELS",
    "PARAMS",
    "EddyResult",
    "MeshImpedance",
    "eddy_impedance",
    "eddy_mesh",
    "mesh_impedance",
]

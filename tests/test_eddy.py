"""The eddy-current mode of the field solver against exact solutions and physical limits.

Each check names its source. The reference formulas are written out here from the
sources, independently of the solver and of losslane's closed-form conductor model.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from scipy.special import ive, kve

from losslane.errors import LossLaneError
from losslane.materials.dielectric import ConstantDielectric
from losslane.xsection.fieldsolve import Geometry, Layer, Trace, eddy
from losslane.xsection.fieldsolve import solve as fsolve
from losslane.xsection.fieldsolve.eddy_mesh import Block, ConductorMesh, build_conductor_mesh
from losslane.xsection.fieldsolve.mesh import grade

MU0 = 4e-7 * np.pi * (1 + 5.5e-10)  # CODATA 2018
C_LIGHT = 299_792_458.0  # exact (SI definition)
SIGMA = 5.8e7  # copper, handbook value
MIL = 25.4e-6
OZ = 34.8e-6  # 1 oz copper (common practice)
AIR = ConstantDielectric(1.0)
NORMAL = eddy.PARAMS[eddy.LEVELS["normal"]]


def gamma(f: np.ndarray) -> np.ndarray:
    """k = (1 + j)/delta = sqrt(j omega mu0 sigma)."""
    return np.sqrt(2j * np.pi * f * MU0 * SIGMA)


def skin(f: float) -> float:
    return 1.0 / np.sqrt(np.pi * f * MU0 * SIGMA)


def microstrip(w=6 * MIL, h=3.5 * MIL, t=1.4 * MIL, inset=0.0) -> Geometry:
    return Geometry((Layer(h, AIR),), (Trace(-w / 2, w / 2, h, t, inset),))


def stripline(w=5 * MIL, lo=5 * MIL, hi=6 * MIL, t=1.4 * MIL) -> Geometry:
    return Geometry(
        (Layer(lo, AIR), Layer(t + hi, AIR)), (Trace.centred(0.0, w, lo, t),), True, True
    )


def pair(w=5 * MIL, s=6 * MIL, h=4 * MIL, t=1.4 * MIL) -> Geometry:
    off = (w + s) / 2
    traces = (Trace.centred(-off, w, h, t), Trace.centred(off, w, h, t))
    return Geometry((Layer(h, AIR),), traces)


# -- exact 1-D solution: two slabs between magnetic side walls ------------------------
def test_parallel_plate_slabs_between_magnetic_walls_exact():
    # Two slabs of width W and thickness t, separated by d, carrying +I and -I between
    # magnetic walls (natural boundary: the field is 1-D and zero outside the slabs).
    # Exact: Z = 2 (k/(sigma W)) coth(k t) + j omega mu0 d / W per metre, the internal
    # impedance of a slab fed from one face (S. Ramo, J. R. Whinnery, T. Van Duzer,
    # *Fields and Waves in Communication Electronics*; H. A. Wheeler, Proc. IRE 30, 1942)
    # plus the gap's inductance; at DC R = 2/(sigma W t), L = mu0 d/W + 2 mu0 t/(3 W).
    w, t, d = 1e-3, 35e-6, 100e-6
    blocks = (
        Block.rectangle("lower", 0, 0.0, w, -t, 0.0, outer=(True, True)),
        Block.rectangle("upper", -1, 0.0, w, d, d + t, outer=(True, True)),
    )
    f = np.array([0.0, 1e3, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10])
    cm = build_conductor_mesh(blocks, SIGMA, skin(f.max()), NORMAL, open_boundary=False)
    sol = eddy.mesh_impedance(cm, f)
    r, l = sol.r, sol.l
    fa = f[1:]
    k = gamma(fa)
    z = 2 * k / (SIGMA * w) / np.tanh(k * t) + 2j * np.pi * fa * MU0 * d / w
    r_ex = np.concatenate([[2 / (SIGMA * w * t)], z.real])
    l_ex = np.concatenate([[MU0 * d / w + 2 * MU0 * t / (3 * w)], z.imag / (2 * np.pi * fa)])
    np.testing.assert_allclose(r[:, 0, 0], r_ex, rtol=2e-3)  # measured <= 7e-4 (10 GHz)
    np.testing.assert_allclose(l[:, 0, 0], l_ex, rtol=1e-5)  # measured <= 1e-6
    # each slab dissipates half (same exact solution, one slab's internal impedance)
    np.testing.assert_allclose(sol.losses[:, :, 0, 0], 0.5 * r_ex[:, None] * [1, 1], rtol=2e-3)


# -- exact axisymmetric solution: coaxial line ----------------------------------------
def coax_mesh(a: float, b: float, c: float, delta: float, sectors: int = 32) -> ConductorMesh:
    """A polar mesh of a solid wire (radius a) in a tube (b..c), graded radially into
    r = a, b, c like the solver's default setting, with curved (quadratic) elements so
    the circles are exact to the element order. The outer face r = c is a magnetic wall:
    the currents cancel, so no field leaves the tube."""
    from skfem import MeshTri, MeshTri2

    h = min(NORMAL.skin * delta, NORMAL.feature * (c - b))
    r = grade(np.array([0.0, a, b, c]), np.array([np.inf, h, h, h]), NORMAL.growth)
    th = np.linspace(0.0, 2 * np.pi, sectors, endpoint=False)
    rr, tt = np.meshgrid(r[1:], th, indexing="ij")
    rings = np.vstack([(rr * np.cos(tt)).ravel(), (rr * np.sin(tt)).ravel()])
    p = np.hstack([[[0.0], [0.0]], rings])
    j = np.arange(sectors)

    def node(i, jj):
        return 1 + i * sectors + jj % sectors

    tris = [np.vstack([np.zeros(sectors, dtype=int), node(0, j), node(0, j + 1)])]
    for i in range(r.size - 2):
        q = node(i, j), node(i, j + 1), node(i + 1, j + 1), node(i + 1, j)
        tris += [np.vstack([q[0], q[1], q[2]]), np.vstack([q[0], q[2], q[3]])]
    m1 = MeshTri(p, np.hstack(tris))
    m2 = MeshTri2.from_mesh(m1)
    # edge midpoints onto the polar midpoints (arcs stay arcs)
    e = m1.facets
    rad, ang = np.hypot(*m1.p), np.arctan2(m1.p[1], m1.p[0])
    r0, r1, t0, t1 = rad[e[0]], rad[e[1]], ang[e[0]], ang[e[1]]
    t0, t1 = np.where(r0 == 0, t1, t0), np.where(r1 == 0, t0, t1)
    tm = t0 + 0.5 * ((t1 - t0 + np.pi) % (2 * np.pi) - np.pi)
    rm = 0.5 * (r0 + r1)
    loc = m2.doflocs.copy()
    loc[:, m1.p.shape[1] :] = np.vstack([rm * np.cos(tm), rm * np.sin(tm)])
    mesh = replace(m2, doflocs=loc)
    rc = rad[m1.t].mean(axis=0)
    label = np.where(rc < a, 0, np.where((rc > b) & (rc < c), 1, -1))
    return ConductorMesh(mesh, label, (0, -1), (SIGMA, SIGMA), ("wire", "tube"), False)


def coax_exact(f: np.ndarray, a: float, b: float, c: float) -> np.ndarray:
    """Series impedance per metre of a coaxial line (S. Ramo, J. R. Whinnery, T. Van
    Duzer, *Fields and Waves in Communication Electronics*, internal impedance of round
    conductors), g = sqrt(j omega mu0 sigma):
    inner wire  Z_a = g/(2 pi a sigma) I0(g a)/I1(g a);
    outer tube  Z_b = g/(2 pi b sigma) [I0(gb) K1(gc) + K0(gb) I1(gc)]
                                     / [I1(gc) K1(gb) - I1(gb) K1(gc)];
    external    j omega mu0/(2 pi) ln(b/a).
    Written with the exponentially scaled Bessel functions (ive, kve) to avoid overflow."""
    za, zb = coax_internal(f, a, b, c)
    return za + zb + 2j * np.pi * f * MU0 / (2 * np.pi) * np.log(b / a)


def coax_internal(f: np.ndarray, a: float, b: float, c: float) -> tuple[np.ndarray, np.ndarray]:
    """The internal impedances (Z_a, Z_b) of the wire and the tube (see ``coax_exact``)."""
    g = gamma(f)
    za = g / (2 * np.pi * a * SIGMA) * ive(0, g * a) / ive(1, g * a)
    gr = g.real

    def i_(n, x):  # I_n(g x) = ive * exp(Re(g x))
        return ive(n, g * x), gr * x

    def k_(n, x):  # K_n(g x) = kve * exp(-g x)
        return kve(n, g * x), -g * x

    def prod(u, v):
        return u[0] * v[0], u[1] + v[1]

    terms = [
        prod(i_(0, b), k_(1, c)),
        prod(k_(0, b), i_(1, c)),
        prod(i_(1, c), k_(1, b)),
        prod(i_(1, b), k_(1, c)),
    ]
    ref = terms[1][1]  # the largest exponent: K0(gb) I1(gc) ~ exp(g (c - b))
    v = [m * np.exp(e - ref) for m, e in terms]
    zb = g / (2 * np.pi * b * SIGMA) * (v[0] + v[1]) / (v[2] - v[3])
    return za, zb


def test_coaxial_line_bessel_exact():
    a, b, c = 0.25e-3, 0.8e-3, 0.9e-3
    f = np.array([0.0, 1e3, 1e5, 1e6, 1e7, 1e8, 1e9])
    sol = eddy.mesh_impedance(coax_mesh(a, b, c, skin(f.max())), f)
    r, l = sol.r, sol.l
    z = coax_exact(f[1:], a, b, c)
    # DC: 1/(sigma area) of each conductor, summed for the loop (exact)
    r_dc = 1 / (SIGMA * np.pi * a * a) + 1 / (SIGMA * np.pi * (c * c - b * b))
    # DC inductance of uniform currents: mu0/(2 pi) [1/4 + ln(b/a) + tube term]
    # (the tube term from integrating H^2 over the tube; Ramo et al., as above)
    tube = (c**4 * np.log(c / b) / (c * c - b * b) ** 2) - (3 * c * c - b * b) / (
        4 * (c * c - b * b)
    )
    l_dc = MU0 / (2 * np.pi) * (0.25 + np.log(b / a) + tube)
    np.testing.assert_allclose(r[0, 0, 0], r_dc, rtol=1e-4)  # measured 3e-6 (curved area)
    np.testing.assert_allclose(l[0, 0, 0], l_dc, rtol=1e-4)
    np.testing.assert_allclose(r[1:, 0, 0], z.real, rtol=2e-3)  # measured <= 8e-4 (1 GHz)
    np.testing.assert_allclose(l[1:, 0, 0], z.imag / (2 * np.pi * f[1:]), rtol=1e-4)
    # each conductor's loss is the real part of its own internal impedance
    za, zb = coax_internal(f[1:], a, b, c)
    np.testing.assert_allclose(sol.losses[1:, 0, 0, 0], za.real, rtol=2e-3)
    np.testing.assert_allclose(sol.losses[1:, 1, 0, 0], zb.real, rtol=2e-3)


# -- DC resistance: exact ----------------------------------------------------------
def test_dc_resistance_exact_for_trapezoid_and_plane():
    # R = 1/(sigma area) of each conductor, summed for the loop (Ohm's law, exact)
    w, h, t, inset = 6 * MIL, 3.5 * MIL, 1.4 * MIL, 0.4 * MIL
    geom = microstrip(w, h, t, inset)
    res = eddy.eddy_impedance(geom, [0.0], plane_thickness=0.5 * OZ, estimate=False)
    area = t * (w - inset)
    ref = 1 / (SIGMA * area) + 1 / (SIGMA * res.plane_width * 0.5 * OZ)
    assert res.r[0, 0, 0] == pytest.approx(ref, rel=1e-12)


def test_dc_resistance_matrix_of_a_pair_and_grounds():
    # two signals over a plane with two coplanar grounds cut at the plane's edges: the
    # returns are in parallel, so R_ij = delta_ij/(sigma A_i) + 1/(sigma sum A_returns)
    w, s, h, t, gap = 5 * MIL, 6 * MIL, 4 * MIL, 1.4 * MIL, 8 * MIL
    off = (w + s) / 2
    edge = off + w / 2 + gap
    traces = (
        Trace.centred(-off, w, h, t),
        Trace.centred(off, w, h, t),
        Trace(-np.inf, -edge, h, t, 0.0, False),
        Trace(edge, np.inf, h, t, 0.0, False),
    )
    geom = Geometry((Layer(h, AIR),), traces)
    pw = 4e-3
    res = eddy.eddy_impedance(geom, [0.0], plane_width=pw, plane_thickness=OZ, estimate=False)
    a_ret = 2 * t * (pw / 2 - edge) + pw * OZ
    ref = np.eye(2) / (SIGMA * w * t) + 1 / (SIGMA * a_ret)
    np.testing.assert_allclose(res.r[0], ref, rtol=1e-12)


def test_dc_limit_is_continuous():
    # Z(f) = R_dc + j omega L_dc + O(omega^2): the DC solve (uniform currents, energy
    # form) and the AC solve at a low frequency must agree (Taylor expansion, exact)
    res = eddy.eddy_impedance(microstrip(), [0.0, 1.0], estimate=False)
    np.testing.assert_allclose(res.r[1], res.r[0], rtol=1e-9)
    np.testing.assert_allclose(res.l[1], res.l[0], rtol=1e-6)


# -- high-frequency limits ---------------------------------------------------------
@pytest.mark.parametrize("geom", [microstrip(), stripline(), pair()], ids=["ms", "sl", "pair"])
def test_high_frequency_inductance_tends_to_electrostatic(geom):
    # At high frequency L -> L_ext = mu0 eps0 C0^-1 (TEM: the current flows on the
    # surfaces and the field outside the metal is the electrostatic one) and the
    # internal reactance equals the resistance (Wheeler, Proc. IRE 30, 1942), so
    # L - R/omega -> L_ext. L_ext from the electrostatic solver (fine setting).
    sol = fsolve.solve_level(geom, fsolve.LEVELS["fine"])
    l_ext = np.linalg.inv(sol.c0) / C_LIGHT**2
    f = np.array([1e9, 1e10])
    res = eddy.eddy_impedance(geom, f, estimate=False)
    omega = 2 * np.pi * f[:, None, None]
    approx = res.l - res.r / omega
    scale = np.sqrt(np.outer(np.diag(l_ext), np.diag(l_ext)))
    assert np.max(np.abs(approx - l_ext) / scale) < 1e-3  # measured <= 3.6e-4


def test_internal_reactance_equals_resistance_at_high_frequency():
    # Wheeler (Proc. IRE 30, 1942): Z_int -> (1 + j) R_s G, so omega L_int -> R. With
    # L = L_ext + R/omega the external part cancels between two frequencies:
    # L(f1) - L(f2) = R(f1)/omega1 - R(f2)/omega2.
    f = np.array([1e9, 1e10, 1e11])
    res = eddy.eddy_impedance(microstrip(), f, estimate=False)
    r, l = res.r[:, 0, 0], res.l[:, 0, 0]
    w = 2 * np.pi * f
    ratio = (l[:-1] - l[1:]) / (r[:-1] / w[:-1] - r[1:] / w[1:])
    np.testing.assert_allclose(ratio, 1.0, atol=0.01)  # measured 0.996, 1.004


def test_resistance_tends_to_wheeler_rule():
    # R -> R_s G with G Wheeler's incremental-inductance factor of the perfectly
    # conducting solution (Proc. IRE 30, 1942; G from the electrostatic solver). Near an
    # exterior right-angle corner that solution's surface current grows like r^(-1/3)
    # (the edge condition), so the region within a skin depth of each corner adds a
    # correction of relative order (delta/t)^(1/3): the ratio approaches 1 slowly, and a
    # tenfold frequency step shrinks the gap by about 10^(1/6) = 1.47.
    geom = microstrip()
    sol = fsolve.solve_level(geom, fsolve.LEVELS["fine"])
    g = sum(grp.matrix for grp in sol.groups)[0, 0]
    f = np.array([1e10, 1e11])
    res = eddy.eddy_impedance(geom, f, estimate=False)
    rs = np.sqrt(np.pi * f * MU0 / SIGMA)
    gap = np.abs(res.r[:, 0, 0] / (rs * g) - 1)
    assert np.all(gap < 0.02)  # measured 1.5 %, 1.0 %
    assert 1.2 < gap[0] / gap[1] < 1.8  # measured 1.41


# -- structure of the result -------------------------------------------------------
def test_pair_matrices_reciprocal_symmetric_and_passive():
    f = np.array([0.0, 1e6, 1e8, 1e10])
    res = eddy.eddy_impedance(pair(), f, estimate=False)
    for m in (res.r, res.l):
        np.testing.assert_allclose(m, np.swapaxes(m, 1, 2), rtol=1e-12, atol=0)  # reciprocity
        np.testing.assert_allclose(m[:, 0, 0], m[:, 1, 1], rtol=1e-9)  # mirror symmetry
        assert np.all(np.linalg.eigvalsh(m) > 0)  # loss and stored energy are positive
    assert np.all(res.r[:, 0, 1] > 0)  # the shared return's resistance couples them


def test_losses_of_the_conductors_sum_to_the_resistance():
    # Poynting's theorem: the real part of the complex power fed in, I^T R I, is the
    # power dissipated in the conductors (exact also for the Galerkin solution)
    f = np.array([0.0, 1e5, 1e7, 1e9])
    res = eddy.eddy_impedance(pair(), f, estimate=False)
    assert set(res.losses) == {"conductor 1", "conductor 2", "lower plane"}
    total = sum(res.losses.values())
    np.testing.assert_allclose(total, res.r, rtol=1e-9, atol=1e-12 * res.r.max())
    # at high frequency the plane carries a real share, at DC (wide plane) almost none
    plane = res.losses["lower plane"][:, 0, 0] / res.r[:, 0, 0]
    assert plane[0] < 0.01 and 0.1 < plane[-1] < 0.5


def test_resistance_rises_and_inductance_falls_with_frequency():
    # skin effect: the current crowds into a smaller area as f rises (R up) and the
    # internal flux shrinks (L down) -- monotone for a single line (Wheeler 1942)
    f = np.geomspace(1e3, 1e10, 8)
    res = eddy.eddy_impedance(microstrip(), f, accuracy="coarse", estimate=False)
    assert np.all(np.diff(res.r[:, 0, 0]) > 0)
    assert np.all(np.diff(res.l[:, 0, 0]) < 0)


def test_error_estimate_bounds_the_actual_error():
    # the estimate is the change from the next coarser mesh; the actual error of the
    # default setting is taken against the fine setting
    f = np.array([1e5, 1e7, 1e9, 1e10])
    normal = eddy.eddy_impedance(microstrip(), f)
    fine = eddy.eddy_impedance(microstrip(), f, accuracy="fine", estimate=False)
    err_r = np.abs(normal.r[:, 0, 0] / fine.r[:, 0, 0] - 1)
    err_l = np.abs(normal.l[:, 0, 0] / fine.l[:, 0, 0] - 1)
    assert np.all(err_r <= normal.error_r)
    assert np.all(err_l <= normal.error_l)
    assert np.all(normal.error_r < 0.01) and np.all(normal.error_l < 0.002)


def test_far_boundary_effect_below_stated_accuracy(monkeypatch):
    # doubling the distance of the A = 0 box changes L by less than the default
    # setting's error (the returns carry the current back: a dipole far field)
    f = np.array([1e3, 1e9])
    base = eddy.eddy_impedance(microstrip(), f, estimate=False)
    level = eddy.LEVELS["normal"]
    prm = eddy.PARAMS[level]
    monkeypatch.setitem(eddy.PARAMS, level, replace(prm, far=2 * prm.far))
    far = eddy.eddy_impedance(microstrip(), f, estimate=False)
    np.testing.assert_allclose(far.l, base.l, rtol=2e-4)
    np.testing.assert_allclose(far.r, base.r, rtol=2e-4)


# -- bad input -----------------------------------------------------------------------
@pytest.mark.parametrize(
    ("kwargs", "words"),
    [
        ({"f": [-1.0]}, "frequency"),
        ({"f": [np.nan]}, "frequency"),
        ({"conductivity": 0.0}, "conductivity"),
        ({"plane_thickness": -1e-6}, "plane_thickness"),
        ({"plane_width": 100e-6}, "plane_width"),
        ({"accuracy": "best"}, "accuracy"),
    ],
)
def test_bad_input_names_the_key(kwargs, words):
    args = {"f": [1e9]} | kwargs
    f = args.pop("f")
    with pytest.raises(LossLaneError, match=words):
        eddy.eddy_impedance(microstrip(), f, estimate=False, **args)


def test_zero_thickness_trace_is_refused():
    with pytest.raises(LossLaneError, match="thickness"):
        eddy.eddy_impedance(microstrip(t=0.0), [1e9], estimate=False)

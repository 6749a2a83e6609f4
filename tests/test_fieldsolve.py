"""The 2-D field solver against exact solutions, published formulas and physical laws.

Each check names its source. Reference formulas are written out here from the sources
(independently of the closed-form models in losslane.xsection), except where a check
compares the solver with those models on purpose.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from reported import properties
from scipy.special import ellipk, ellipkm1

from losslane.errors import LossLaneWarning
from losslane.materials.conductor import Conductor
from losslane.materials.dielectric import ConstantDielectric, WidebandDebye
from losslane.xsection.base import Metal
from losslane.xsection.fieldsolve import Coating, Geometry, Layer, Trace
from losslane.xsection.fieldsolve import solve as fsolve
from losslane.xsection.fieldsolve.mesh import MeshParams
from losslane.xsection.fieldsolve.section import FieldSection

C_LIGHT = 299_792_458.0  # exact (SI definition)
ETA_0 = 376.730313668  # CODATA 2018 vacuum impedance, ohm
MIL = 25.4e-6
AIR = ConstantDielectric(1.0)


def k_ratio(k: float) -> float:
    """K(k')/K(k) for modulus k, with the complementary modulus taken accurately."""
    m = k * k
    return float(ellipkm1(m) / ellipk(m)) if m > 0.5 else float(ellipk(1 - m) / ellipk(m))


def cohn_z(w: float, b: float, er: float = 1.0) -> float:
    """Cohn (IRE Trans. MTT 2, 1954), exact zero-thickness centred stripline:
    Z0 = (30 pi / sqrt(er)) K(k)/K(k'), k = sech(pi w / 2b). (30 pi = eta0/4.)"""
    x = np.pi * w / (2 * b)
    k = 1 / np.cosh(x)
    # K(k)/K(k') with m = k^2 = sech^2, 1 - m = tanh^2
    ratio = ellipkm1(np.tanh(x) ** 2) / ellipkm1(k * k)
    return float(ETA_0 / 4 / np.sqrt(er) * ratio)


def cohn_coupled(w: float, s: float, b: float, er: float = 1.0) -> tuple[float, float]:
    """Cohn (IRE Trans. MTT 3, 1955), zero-thickness edge-coupled stripline:
    k_e = tanh(pi w/2b) tanh(pi (w+s)/2b), k_o = tanh(pi w/2b) coth(pi (w+s)/2b),
    Z = (30 pi / sqrt(er)) K(k')/K(k)."""
    a, c = np.tanh(np.pi * w / (2 * b)), np.tanh(np.pi * (w + s) / (2 * b))
    ke, ko = a * c, a / c
    z = ETA_0 / 4 / np.sqrt(er)
    return z * k_ratio(ke), z * k_ratio(ko)


def stripline_geometry(w, b, t=0.0, er=1.0, pair_spacing=None) -> Geometry:
    d = ConstantDielectric(er)
    lo = (b - t) / 2
    if pair_spacing is None:
        traces = (Trace.centred(0.0, w, lo, t),)
    else:
        off = (pair_spacing + w) / 2
        traces = (Trace.centred(-off, w, lo, t), Trace.centred(off, w, lo, t))
    return Geometry((Layer(lo, d), Layer(b - lo, d)), traces, True, True)


def z_single(sol) -> float:
    return float(1 / (C_LIGHT * np.sqrt(sol.c_ref[0, 0] * sol.c0[0, 0])))


# -- exact conformal-mapping solutions ---------------------------------------------------
@pytest.mark.parametrize("w_over_b", [0.1, 1.0, 3.0])
def test_cohn_stripline_default_setting(w_over_b):
    b = 1e-3
    sol = fsolve.solve(stripline_geometry(w_over_b * b, b, er=4.0), fsolve.LEVELS["normal"])
    ref = cohn_z(w_over_b * b, b, 4.0)  # Cohn 1954, exact
    assert abs(z_single(sol) / ref - 1) < 0.005


def test_cohn_stripline_finest_setting():
    b = 1e-3
    sol = fsolve.solve(stripline_geometry(b, b), fsolve.LEVELS["fine"])
    assert abs(z_single(sol) / cohn_z(b, b) - 1) < 0.002  # Cohn 1954, exact


@pytest.mark.parametrize("w_over_b, s_over_b", [(0.5, 0.2), (1.0, 0.5)])
def test_cohn_coupled_stripline(w_over_b, s_over_b):
    b = 1e-3
    w, s = w_over_b * b, s_over_b * b
    geom = stripline_geometry(w, b, pair_spacing=s, er=3.0)
    sec = FieldSection(geom, accuracy="normal")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)  # zero thickness: no loss
        modes = sec.modes(np.array([1e9]))
    ze, zo = cohn_coupled(w, s, b, 3.0)  # Cohn 1955, exact
    assert abs(modes["even"].z0[0] / ze - 1) < 0.005
    assert abs(modes["odd"].z0[0] / zo - 1) < 0.005


def test_cpw_on_thick_substrate_against_wen():
    """C. P. Wen, IEEE Trans. MTT 17, 1969: zero-thickness CPW on a substrate filling the
    lower half space, semi-infinite grounds: eps_eff = (er + 1)/2 exactly and
    Z0 = (30 pi / sqrt(eps_eff)) K(k')/K(k), k = w/(w + 2 gap)."""
    er, w, gap = 9.8, 0.2e-3, 0.1e-3
    h = 40 * (w + 2 * gap)  # 'thick': the finite-depth term is O((w/h)^2), ~1e-4 here
    d = ConstantDielectric(er)
    traces = (
        Trace.centred(0.0, w, h, 0.0),
        Trace(-np.inf, -w / 2 - gap, h, 0.0, signal=False),
        Trace(w / 2 + gap, np.inf, h, 0.0, signal=False),
    )
    sol = fsolve.solve(Geometry((Layer(h, d),), traces, False, False), fsolve.LEVELS["normal"])
    eps_ref = (er + 1) / 2
    z_ref = ETA_0 / 4 / np.sqrt(eps_ref) * k_ratio(w / (w + 2 * gap))
    assert abs(sol.c_ref[0, 0] / sol.c0[0, 0] / eps_ref - 1) < 0.01
    assert abs(z_single(sol) / z_ref - 1) < 0.01


@pytest.mark.parametrize("u", [0.1, 1.0, 10.0])
@pytest.mark.parametrize("er", [2.0, 10.0])
def test_microstrip_against_hammerstad_jensen(u, er):
    """Hammerstad & Jensen (IEEE MTT-S Digest 1980), quasi-static zero-thickness Z0 and
    eps_eff as implemented independently by scikit-rf (MLine, disp='none'); the formulas
    claim 0.2 % for eps_eff and 0.03 % for the air impedance (from memory)."""
    import skrf as rf
    from skrf.media import MLine

    h = 0.2e-3
    w = u * h
    m = MLine(
        rf.Frequency(1, 1, 1, "GHz"),
        w=w,
        h=h,
        t=0.0,
        ep_r=er,
        tand=0.0,
        rho=0.0,
        model="hammerstadjensen",
        disp="none",
        diel="frequencyinvariant",
    )
    z_ref, e_ref = float(np.ravel(m.z0)[0].real), float(np.ravel(m.ep_reff)[0].real)
    geom = Geometry((Layer(h, ConstantDielectric(er)),), (Trace.centred(0.0, w, h, 0.0),))
    sol = fsolve.solve(geom, fsolve.LEVELS["normal"])
    assert abs(z_single(sol) / z_ref - 1) < 0.01
    assert abs(sol.c_ref[0, 0] / sol.c0[0, 0] / e_ref - 1) < 0.01


def test_error_estimate_bounds_the_actual_error():
    """The reported estimate (change from the next coarser setting) is not smaller than
    the true error against Cohn's exact value (1954)."""
    b = 1e-3
    geom = stripline_geometry(0.5 * b, b)
    for acc in ("coarse", "normal"):
        sec = FieldSection(geom, accuracy=acc)
        err = abs(z_single(sec.solution()) / cohn_z(0.5 * b, b) - 1)
        est = sec.error_estimate()["z0"]
        assert err <= est
        assert est < 0.01


def test_truncated_boundary_effect_below_stated_accuracy(monkeypatch):
    """Moving the open boundary twice as far changes a microstrip's capacitances by less
    than the error estimate the setting reports (the truncation is within the budget)."""
    h = 0.1e-3
    geom = Geometry((Layer(h, ConstantDielectric(4.0)),), (Trace.centred(0, 2 * h, h, 0.3 * h),))
    sec = FieldSection(geom, accuracy="normal")
    base = sec.solution()
    p = fsolve.PARAMS[1]
    monkeypatch.setitem(fsolve.PARAMS, 7, MeshParams(p.corner, p.face, p.growth, 2 * p.far))
    far = fsolve.solve_level(geom, 7)
    change = abs(far.c0[0, 0] / base.c0[0, 0] - 1)
    assert change < 5e-4
    assert change < max(sec.error_estimate()["vacuum_capacitance"], 1e-4)
    assert abs(far.c_ref[0, 0] / base.c_ref[0, 0] - 1) < 5e-4


# -- closed-form cross-checks -----------------------------------------------------------
def test_thick_stripline_against_closed_form():
    """Cohn's exact value with Wheeler's thickness ratio (IEEE MTT 26(11), 1978), the
    closed-form model, stated within 0.5 % for t/b < 0.25 (from memory): agree to 1 %."""
    from losslane.xsection.stripline import Stripline

    d = ConstantDielectric(3.5)
    w, lo, hi, t = 5 * MIL, 6 * MIL, 6 * MIL, 1.2 * MIL
    cf = Stripline(w, lo, hi, t, d).modes(np.array([1e9]))["single"]
    geom = Geometry((Layer(lo, d), Layer(t + hi, d)), (Trace.centred(0, w, lo, t),), True, True)
    fs = FieldSection(geom, accuracy="normal").modes(np.array([1e9]))["single"]
    assert abs(fs.z0[0] / cf.z0[0] - 1) < 0.01


def test_conductor_loss_against_wheeler_stripline():
    """Skin-effect resistance against the closed-form stripline (Wheeler's incremental-
    inductance rule, Proc. IRE 30, 1942, on Cohn x Wheeler-1978 impedance), smooth
    copper at 10 GHz (delta = 0.66 um << 15 um strip): agree to 1 %."""
    from losslane.xsection.stripline import Stripline

    d = ConstantDielectric(3.5)
    w, lo, hi, t = 5 * MIL, 5 * MIL, 5 * MIL, 0.6 * MIL
    f = np.array([1e10])
    cf = Stripline(w, lo, hi, t, d).modes(f)["single"]
    geom = Geometry((Layer(lo, d), Layer(t + hi, d)), (Trace.centred(0, w, lo, t),), True, True)
    fs = FieldSection(geom, accuracy="normal").modes(f)["single"]
    assert abs(fs.r[0] / cf.r[0] - 1) < 0.01


def test_surface_charge_integral_agrees_with_shape_derivative():
    """The loss factor two ways: the closed integral of the squared vacuum surface charge
    (L2-projected reactions) and the shape derivative of C0 (Wheeler's rule) are the same
    quantity (Hadamard's formula); the direct integral converges toward the other."""
    from skfem import BilinearForm, asm
    from skfem.helpers import dot, grad

    from losslane.xsection.rlgc import EPS0

    @BilinearForm
    def lap(u, v, _):
        return dot(grad(u), grad(v))

    w, lo, t = 5 * MIL, 5 * MIL, 0.6 * MIL
    geom = Geometry((Layer(lo, AIR), Layer(t + lo, AIR)), (Trace.centred(0, w, lo, t),), True, True)
    gaps = []
    for level in (0, 1):
        sol = fsolve.solve(geom, level)
        strip = next(g for g in sol.groups if g.kind == "signal").matrix[0, 0]
        fl = fsolve.fields(geom, level)
        reaction = EPS0 * (asm(lap, fl.basis) @ fl.potential0)
        facets = fsolve._facet_sets(geom, fl.mesh, fl.grid.box)["traces"][0]
        direct = fsolve.charge_factor(fl.mesh, fl.basis, reaction, facets, np.linalg.inv(sol.c0))
        gaps.append(abs(direct[0, 0] / strip - 1))
    assert gaps[1] < 0.03
    assert gaps[1] < gaps[0]


# -- energy partition and dielectric loss ---------------------------------------------
def test_one_material_everywhere_gives_eps_eff_dk_and_g_over_wc_df():
    """Energy partition: a stripline whose core and prepreg are the same material has
    eps_eff = Dk and G/(omega C) = Df exactly (TEM line in a homogeneous dielectric;
    common practice)."""
    d = WidebandDebye(3.8, 0.012, 10e9)
    geom = Geometry(
        (Layer(4 * MIL, d), Layer(5.4 * MIL, d)),
        (Trace.centred(0, 5 * MIL, 4 * MIL, 1.4 * MIL),),
        True,
        True,
    )
    f = np.array([1e6, 1e8, 1e9, 1e10, 3e10, 5e10])
    sec = FieldSection(geom, accuracy="coarse")
    m = sec.modes(f)["single"]
    dk, df = d.dk_df(f)
    np.testing.assert_allclose(m.eps_eff, dk, rtol=1e-9)
    np.testing.assert_allclose(m.g / (2 * np.pi * f * m.c), df, rtol=1e-9)


def test_linearised_permittivities_match_a_direct_solve():
    """C(f) from the one energy partition at F_REF against a new solve with the layers'
    permittivities at f, for a coated microstrip whose laminate and mask disperse
    differently (self-consistency of the reduced model, stated within 1e-5 of C and
    3e-5 of G; the reference drops terms of order Df^2)."""
    lam = WidebandDebye(3.7, 0.009, 10e9)
    mask = WidebandDebye(3.5, 0.025, 1e9)
    h = 4 * MIL
    geom = Geometry(
        (Layer(h, lam),),
        (Trace.centred(0, 7 * MIL, h, 1.4 * MIL),),
        True,
        False,
        Coating(0.8 * MIL, mask),
    )
    sec = FieldSection(geom, accuracy="coarse")
    f = np.array([1e7, 1e11])
    _, _, g, c, _ = sec.matrices(f)
    for k, fk in enumerate(f):
        eps = np.array([lam.eps(np.array([fk]))[0].real, mask.eps(np.array([fk]))[0].real, 1.0])
        direct = fsolve.solve_level(geom, 0, eps)
        assert abs(c[k, 0, 0] / direct.c_ref[0, 0] - 1) < 3e-5
        eps2 = np.array([-lam.eps(np.array([fk]))[0].imag, -mask.eps(np.array([fk]))[0].imag, 0])
        g_direct = 2 * np.pi * fk * np.sum(eps2 * direct.partition[:, 0, 0])
        assert abs(g[k, 0, 0] / g_direct - 1) < 1e-4


# -- geometry effects -------------------------------------------------------------------
def _microstrip(top_width=None, coating=None, accuracy="coarse"):
    d = ConstantDielectric(3.7)
    h, w, t = 4 * MIL, 7 * MIL, 1.4 * MIL
    geom = Geometry((Layer(h, d),), (Trace.centred(0, w, h, t, top_width),), True, False, coating)
    return FieldSection(geom, accuracy=accuracy).modes(np.array([1e9]))["single"]


def test_solder_mask_raises_eps_eff_and_lowers_z0():
    """A dielectric coating adds permittivity where air was: eps_eff rises, Z0 falls
    (common practice; about 1-3 ohm for a typical mask)."""
    bare = _microstrip()
    coated = _microstrip(coating=Coating(0.8 * MIL, ConstantDielectric(3.5, 0.02)))
    assert coated.eps_eff[0] > bare.eps_eff[0] * 1.02
    assert coated.z0[0] < bare.z0[0] - 0.5


def test_narrower_top_raises_z0():
    """Less metal (a trapezoid with a narrower top) means less capacitance: higher Z0
    (common practice)."""
    rect = _microstrip()
    trap = _microstrip(top_width=5 * MIL)
    assert trap.z0[0] > rect.z0[0] + 0.2


# -- matrices ---------------------------------------------------------------------------
def _pair(accuracy="coarse", coat=True):
    d = WidebandDebye(3.6, 0.006, 10e9)
    h, w, s, t = 4 * MIL, 5 * MIL, 6 * MIL, 1.2 * MIL
    off = (s + w) / 2
    coating = Coating(0.7 * MIL, WidebandDebye(3.5, 0.02, 1e9)) if coat else None
    geom = Geometry(
        (Layer(h, d),),
        (Trace.centred(-off, w, h, t, 4 * MIL), Trace.centred(off, w, h, t, 4 * MIL)),
        True,
        False,
        coating,
    )
    return FieldSection(geom, accuracy=accuracy)


def test_pair_matrices_symmetric_positive_definite_equal_self_terms():
    """Reciprocity and passivity: C, L, R, G symmetric, C and L positive definite, R and
    G positive semi-definite; a mirror-symmetric pair has equal self terms (physics)."""
    sec = _pair()
    f = np.array([0.0, 1e9, 2e10])
    rl = sec.rlgc(f)
    for a in (rl.c, rl.l, rl.r, rl.g):
        np.testing.assert_allclose(a, np.swapaxes(a, 1, 2), rtol=1e-12, atol=0)
        np.testing.assert_allclose(a[:, 0, 0], a[:, 1, 1], rtol=1e-6)
    assert np.all(np.linalg.eigvalsh(rl.c) > 0)
    assert np.all(np.linalg.eigvalsh(rl.l) > 0)
    assert np.all(np.linalg.eigvalsh(rl.r) >= -1e-12 * np.abs(rl.r).max())
    assert np.all(np.linalg.eigvalsh(rl.g[1:]) >= 0)
    assert np.all(rl.c[:, 0, 1] < 0)  # Maxwell form: mutual capacitance negative


def test_pair_properties_even_odd():
    sec = _pair()
    p = properties(sec, np.array([1e9, 1e10]))
    for key in (
        "z_odd_ohm",
        "z_even_ohm",
        "z_diff_ohm",
        "z_common_ohm",
        "eps_eff_odd",
        "eps_eff_even",
    ):
        assert len(p[key]) == 2
    assert p["z_diff_ohm"][0] == pytest.approx(2 * p["z_odd_ohm"][0])
    assert p["z_even_ohm"][0] > p["z_odd_ohm"][0]  # coupling (Maxwell C12 < 0)
    assert p["field_solver"]["error_estimate"]["z0"] < 0.01


def test_three_conductors_give_3x3_matrices():
    d = ConstantDielectric(3.5)
    traces = tuple(Trace.centred(x, 4 * MIL, 5 * MIL, 0.6 * MIL) for x in (-9 * MIL, 0, 9 * MIL))
    geom = Geometry((Layer(5 * MIL, d), Layer(5.6 * MIL, d)), traces, True, True)
    sec = FieldSection(geom, accuracy="coarse")
    rl = sec.rlgc(np.array([1e9]))
    assert rl.c.shape == (1, 3, 3)
    np.testing.assert_allclose(rl.c[0, 0, 0], rl.c[0, 2, 2], rtol=1e-6)
    p = properties(sec, np.array([1e9]))
    # homogeneous stripline: every mode travels at c0/sqrt(Dk)
    np.testing.assert_allclose(p["eps_eff_modes"][0], [3.5] * 3, rtol=1e-9)


# -- conductor loss: DC and extremes ---------------------------------------------------
def test_dc_resistance_is_that_of_the_trapezoid():
    """At f = 0 the series resistance is 1/(sigma A), A = t (w_bottom + w_top)/2 (exact),
    when the planes are so thick that their own DC share vanishes."""
    sigma = 5.8e7
    metal = Metal(conductor=Conductor(sigma), plane_thickness=100.0)
    sec = _pair()
    sec = FieldSection(sec.geometry, metal, "coarse")
    rl = sec.rlgc(np.array([0.0]))
    area = 1.2 * MIL * (5 * MIL + 4 * MIL) / 2
    assert rl.r[0, 0, 0] == pytest.approx(1 / (sigma * area), rel=1e-4)
    assert abs(rl.r[0, 0, 1]) < 1e-4 * rl.r[0, 0, 0]


def test_finite_at_dc_and_extreme_frequencies():
    sec = _pair()
    with pytest.warns(LossLaneWarning, match="quasi-static"):  # 1 THz: not quasi-TEM
        rl = sec.rlgc(np.array([0.0, 1e3, 1e12]))
    for a in (rl.r, rl.l, rl.g, rl.c):
        assert np.all(np.isfinite(a))
    assert np.all(rl.g[0] == 0)

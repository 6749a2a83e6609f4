"""Coplanar waveguide's published formulas against Wen's exact infinite-substrate
solution, the side-wall capacitance written out here, and scikit-rf's independent CPW
implementation. (The model's field-solver correction of these formulas is checked against
the field solver in tests/test_accuracy_static.py.)"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from scipy.constants import c as C_LIGHT
from scipy.constants import mu_0
from scipy.special import ellipk

from losslane.errors import LossLaneError, LossLaneWarning
from losslane.materials.dielectric import ConstantDielectric, WidebandDebye
from losslane.xsection.coplanar import Cpw, Gcpw, cpw_eps_quasi_static
from losslane.xsection.rlgc import attenuation_split

MIL = 25.4e-6
ETA0 = mu_0 * C_LIGHT
#: the models with their field-solver correction off: the published formulas alone
CPW, GCPW = Cpw.published(), Gcpw.published()


def k_ratio(k: float) -> float:
    """K(k)/K(k') for modulus k (scipy's ellipk takes the parameter m = k^2)."""
    return float(ellipk(k * k) / ellipk(1 - k * k))


def quiet(fn, *args):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        return fn(*args)


@pytest.mark.parametrize("er", [2.2, 4.0, 10.0])
@pytest.mark.parametrize(
    ("w", "gap"), [(10 * MIL, 5 * MIL), (4 * MIL, 8 * MIL), (20 * MIL, 3 * MIL)]
)
def test_thick_substrate_cpw_is_wens_exact_solution(er: float, w: float, gap: float) -> None:
    # C. P. Wen, IEEE Trans. MTT 17, 1969: on a substrate much thicker than w + 2 gap,
    # eps_eff = (er + 1)/2 and Z0 = (eta0 / (4 sqrt(eps_eff))) K(k')/K(k), k = w/(w + 2 gap)
    # (Wen writes 30 pi for eta0/4). h = 1000 (w + 2 gap) leaves a finite-substrate
    # correction of order (pi (w + 2 gap) / 4h)^2 ~ 1e-6; f <= 1 kHz keeps the Frankel
    # dispersion term below 1e-9.
    h = 1000 * (w + 2 * gap)
    line = CPW(w, gap, h, 0.0, ConstantDielectric(er))
    m = quiet(line.modes, np.array([0.0, 1e3]))["single"]
    eps = (er + 1) / 2
    k = w / (w + 2 * gap)
    z = ETA0 / (4 * np.sqrt(eps)) / k_ratio(k)
    np.testing.assert_allclose(m.eps_eff, eps, rtol=1e-5)
    np.testing.assert_allclose(m.z0, z, rtol=1e-5)


@pytest.mark.parametrize(
    ("w", "gap", "t"),
    [
        (10 * MIL, 5 * MIL, 0.5 * MIL),
        (10 * MIL, 5 * MIL, 1.4 * MIL),
        (5 * MIL, 2 * MIL, 1.4 * MIL),
    ],
)
def test_thickness_adds_the_side_walls_capacitance_in_air(w: float, gap: float, t: float):
    # the published base of the thickness effect: the strip's side walls face the grounds'
    # across both gaps, a parallel-plate capacitance 2 eps0 t / gap (common practice)
    # added in air to Wen's exact zero-thickness line; eps_eff falls accordingly. Hand
    # calculation on a thick substrate ((er + 1)/2 filling, Wen 1969).
    er = 4.0
    h = 1e3 * (w + 2 * gap)
    line = CPW(w, gap, h, t, ConstantDielectric(er))
    m = quiet(line.modes, np.array([0.0]))["single"]
    k_air = 4 * k_ratio(w / (w + 2 * gap)) + 2 * t / gap  # C_air / eps0
    k = 4 * k_ratio(w / (w + 2 * gap)) * (er + 1) / 2 + 2 * t / gap
    assert m.eps_eff[0] == pytest.approx(k / k_air, rel=1e-5)
    assert m.z0[0] == pytest.approx(ETA0 / np.sqrt(k * k_air), rel=1e-5)


# --- scikit-rf's CPW --------------------------------------------------------------------

F = np.array([1e8, 1e9, 5e9, 1e10, 2.8e10, 5.6e10, 1.1e11])
GEOMETRIES = [  # (w, gap, h)
    (10 * MIL, 5 * MIL, 10 * MIL),
    (5 * MIL, 10 * MIL, 20 * MIL),
    (20 * MIL, 4 * MIL, 8 * MIL),
    (0.3e-3, 0.15e-3, 1.6e-3),
]
MATERIALS = [(2.2, 0.001), (3.7, 0.009), (10.0, 0.002)]


def skrf_cpw(w, gap, h, t, er, tand, grounded, mode):
    import skrf as rf
    from skrf.media import CPW

    freq = rf.Frequency.from_f(F, unit="Hz")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)  # its 't < 3 skin depths' note
        return CPW(
            freq,
            w=w,
            s=gap,
            h=h,
            t=t if t > 0 else None,
            ep_r=er,
            tand=tand,
            diel="djordjevicsvensson",
            f_low=1e3,
            f_high=1e12,
            f_epr_tand=10e9,
            has_metal_backside=grounded,
            rho=1 / 5.8e7,
            compatibility_mode=mode,
        )


@pytest.mark.parametrize("grounded", [False, True], ids=["cpw", "gcpw"])
@pytest.mark.parametrize(("er", "tand"), MATERIALS)
@pytest.mark.parametrize(("w", "gap", "h"), GEOMETRIES)
def test_zero_thickness_matches_scikit_rf(w, gap, h, er, tand, grounded) -> None:
    # Ghione-Naldi quasi-static (Electron. Lett. 1983/1984) + Frankel et al. dispersion
    # (IEEE T-MTT 39(6), 1991) on the same wideband Debye laminate (Djordjevic 2001, same
    # corners 1 kHz / 1 THz). scikit-rf's 'qucs' mode evaluates the formulas with the real
    # part of eps_r, as losslane does. Both implement the same published formulas; the
    # tolerance 1e-5 covers scikit-rf's K/K' (Hilberg's approximation, 2 ppm).
    # Dispersion is compared over the whole sweep, past Frankel's fitted 10 f_TE for the
    # thicker substrates: this checks the written-out formula, not an accuracy claim.
    line = (GCPW if grounded else CPW)(w, gap, h, 0.0, WidebandDebye(er, tand, 10e9))
    m = quiet(line.modes, F)["single"]
    sk = skrf_cpw(w, gap, h, 0.0, er, tand, grounded, "qucs")
    np.testing.assert_allclose(m.eps_eff, np.real(sk.ep_reff_f), rtol=1e-5)
    np.testing.assert_allclose(m.z0, np.real(sk.z0_characteristic), rtol=1e-5)
    # the quasi-static part alone (scikit-rf's ep_reff / zl_eff, evaluated with the
    # laminate's eps_r(f) before dispersion); losslane's at DC, where Frankel's term is 0,
    # against scikit-rf's quasi-static formula on the laminate's static permittivity
    er_f = quiet(line.dielectric.eps, F).real
    eps_q = cpw_eps_quasi_static(w, gap, 0.0, h, er_f, grounded)
    np.testing.assert_allclose(eps_q, np.real(sk.ep_reff), rtol=1e-5)
    m0 = quiet(line.modes, np.array([0.0]))["single"]
    sk0 = skrf_cpw(w, gap, h, 0.0, line.dielectric.eps_static, 0.0, grounded, "qucs")
    assert m0.eps_eff[0] == pytest.approx(np.real(sk0.ep_reff), rel=1e-5)
    assert m0.z0[0] == pytest.approx(np.real(sk0.zl_eff), rel=1e-5)
    # dielectric attenuation: scikit-rf's default mode uses the dispersive eps_eff in
    # alpha_d = pi er (eps_eff - 1) tan_d / ((er - 1) sqrt(eps_eff) lambda0) (Gupta et al.
    # 1996, eq. 7.103 form); losslane takes the exact Re sqrt(ZY) with R = 0. The two agree
    # up to terms second order in Df.
    _, _, alpha_d = attenuation_split(m.r, m.l, m.g, m.c, F)
    sk_d = skrf_cpw(w, gap, h, 0.0, er, tand, grounded, None)
    np.testing.assert_allclose(alpha_d, sk_d.alpha_dielectric, rtol=tand**2 + 1e-5)


def test_gcpw_tends_to_cpw_when_the_lower_plane_is_far() -> None:
    # Ghione & Naldi 1983: the lower plane's term K(k3)/K(k3') vanishes as h grows, so GCPW
    # on a thick substrate tends to CPW on the same substrate -- here both compared with
    # Wen's (er + 1)/2 (in GCPW the substrate fills the lower half-space up to the plane)
    w, gap = 10 * MIL, 5 * MIL
    h = 200 * (w + 2 * gap)
    g = GCPW(w, gap, h, 0.0, ConstantDielectric(4.0))
    c = CPW(w, gap, h, 0.0, ConstantDielectric(4.0))
    mg = quiet(g.modes, np.array([0.0]))["single"]
    mc = quiet(c.modes, np.array([0.0]))["single"]
    assert mg.z0[0] == pytest.approx(mc.z0[0], rel=1e-3)
    assert mg.eps_eff[0] == pytest.approx(2.5, rel=1e-3)
    # a close lower plane lowers the impedance (more capacitance)
    near = GCPW(w, gap, 5 * MIL, 0.0, ConstantDielectric(4.0))
    assert quiet(near.modes, np.array([0.0]))["single"].z0[0] < mg.z0[0]


def test_validity_warnings_and_errors() -> None:
    d = ConstantDielectric(3.7)
    f = np.array([1e9])
    with pytest.warns(LossLaneWarning, match="thickness/gap"):
        Cpw(5 * MIL, 5 * MIL, 10 * MIL, 3 * MIL, d).modes(f)
    with pytest.warns(LossLaneWarning, match="width/gap"):
        Cpw(30 * MIL, 5 * MIL, 10 * MIL, 0.5 * MIL, d).modes(f)
    with pytest.warns(LossLaneWarning, match="width/height"):
        Cpw(10 * MIL, 5 * MIL, 200 * MIL, 0.5 * MIL, d).modes(f)
    with warnings.catch_warnings():
        warnings.simplefilter("error", LossLaneWarning)
        Gcpw(10 * MIL, 5 * MIL, 10 * MIL, 0.5 * MIL, d).modes(f)
    # copper thicker than the gap is beyond the verified box (a warning), not impossible:
    # the side walls' capacitance keeps the gap open (Gupta's widening, used before, closed
    # it for these two lines and gave NaN)
    for w, gap, t in [(6 * MIL, 1 * MIL, 3 * MIL), (10 * MIL, 2 * MIL, 1.4 * MIL)]:
        with pytest.warns(LossLaneWarning, match="thickness/gap"):
            rl = Cpw(w, gap, 10 * MIL, t, d).rlgc(np.array([0.0, 1e9]))
        assert np.all(np.isfinite(rl.r)) and np.all(np.isfinite(rl.l))
    for args, key in [
        ((0.0, 5 * MIL, 10 * MIL, 0.5 * MIL), "width"),
        ((10 * MIL, -5 * MIL, 10 * MIL, 0.5 * MIL), "gap"),
        ((10 * MIL, 5 * MIL, 0.0, 0.5 * MIL), "height"),
    ]:
        with pytest.raises(LossLaneError, match=key):
            Cpw(*args, d)

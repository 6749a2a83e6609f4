"""Microstrip against scikit-rf's independent Hammerstad-Jensen / Kirschning-Jansen
implementation and against the exact limits of the air-filled line."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from scipy.constants import c as C_LIGHT
from scipy.constants import mu_0

from losslane.errors import LossLaneError, LossLaneWarning
from losslane.materials.dielectric import ConstantDielectric, WidebandDebye
from losslane.xsection.microstrip import Microstrip
from losslane.xsection.rlgc import attenuation_split

MIL = 25.4e-6
ETA0 = mu_0 * C_LIGHT
F = np.array([1e8, 1e9, 5e9, 1e10, 2.8e10, 5.6e10])
H = 100e-6
U = [0.1, 0.3, 1.0, 2.0, 5.0, 10.0, 20.0]
MATERIALS = [(2.2, 0.001), (3.7, 0.009), (4.2, 0.02), (10.0, 0.002)]
#: the model with its field-solver correction off: the published formulas that scikit-rf
#: implements as well (the correction is checked against the field solver in
#: tests/test_accuracy_static.py)
PUBLISHED = Microstrip.published()


def quiet(fn, *args):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        return fn(*args)


def skrf_mline(w, h, t, er, tand, mode, diel="djordjevicsvensson"):
    import skrf as rf
    from skrf.media import MLine

    freq = rf.Frequency.from_f(F, unit="Hz")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)  # its 't < 3 skin depths' note
        return MLine(
            freq,
            w=w,
            h=h,
            t=t if t > 0 else None,
            ep_r=er,
            tand=tand,
            model="hammerstadjensen",
            disp="kirschningjansen",
            diel=diel,
            f_low=1e3,
            f_high=1e12,
            f_epr_tand=10e9,
            rho=1 / 5.8e7,
            rough=0.0,
            compatibility_mode=mode,
        )


def laminate(er, tand, diel):
    return (
        ConstantDielectric(er, tand)
        if diel == "frequencyinvariant"
        else WidebandDebye(er, tand, 10e9)
    )


@pytest.mark.parametrize("diel", ["frequencyinvariant", "djordjevicsvensson"])
@pytest.mark.parametrize(("er", "tand"), MATERIALS)
@pytest.mark.parametrize("u", U)
def test_zero_thickness_matches_scikit_rf(u, er, tand, diel) -> None:
    # Hammerstad & Jensen (IEEE MTT-S Digest 1980) quasi-static, Kirschning & Jansen
    # (Electron. Lett. 18(6) 1982) eps_eff dispersion, Jansen & Kirschning (AEU 37, 1983)
    # Z0 dispersion. scikit-rf's MLine is a separate implementation of the same papers.
    # Its 'qucs' mode evaluates them with the real part of eps_r, as losslane does; the two
    # then agree to 1e-8 (the published accuracies, 0.2 % for HJ eps_eff and 0.6 % for KJ,
    # are against field solutions; here the same formulas are compared, and what is left is
    # the two libraries' values of mu0 and eps0, 7e-10 in Z0. A coefficient slip shows:
    # Jansen-Kirschning's R2 = 0.2671 u^7 written 0.267 moves Z0 by 4e-8 near u = 1).
    # The constant dielectric is scikit-rf's 'frequencyinvariant'; the wideband Debye one
    # its 'djordjevicsvensson' with the same corners (1 kHz, 1 THz) and fit frequency.
    w = u * H
    line = PUBLISHED(w, H, 0.0, laminate(er, tand, diel))
    m = quiet(line.modes, F)["single"]
    sk = skrf_mline(w, H, 0.0, er, tand, "qucs", diel)
    np.testing.assert_allclose(m.eps_eff, np.real(sk.ep_reff_f), rtol=1e-8)
    np.testing.assert_allclose(m.z0, np.real(sk.z0_characteristic), rtol=1e-8)
    # dielectric attenuation against scikit-rf's default mode, which uses the dispersive
    # eps_eff in alpha_d = pi er (eps_eff - 1) tan_d / ((er - 1) sqrt(eps_eff) lambda0)
    # (the filling-factor form, e.g. Pozar eq. 3.198). It also carries the complex eps_r
    # through the quasi-static formulas, and losslane takes the exact Re sqrt(ZY) with
    # R = 0: both differences are second order in Df.
    _, _, alpha_d = attenuation_split(m.r, m.l, m.g, m.c, F)
    sk_d = skrf_mline(w, H, 0.0, er, tand, None, diel)
    np.testing.assert_allclose(alpha_d, sk_d.alpha_dielectric, rtol=tand**2 + 1e-7)


@pytest.mark.parametrize("er", [2.2, 3.7, 10.0])
@pytest.mark.parametrize("u", [0.1, 0.5, 1.0, 2.0, 10.0])
@pytest.mark.parametrize("t", [5e-6, 17.5e-6, 35e-6])
def test_thick_strip_matches_scikit_rf(t, u, er) -> None:
    # the Hammerstad-Jensen thickness correction (widened u1 in air, ur in the dielectric)
    # is the same formula in both. KNOWN DIFFERENCE: scikit-rf's default mode feeds the
    # thickness-widened width ur into the Kirschning-Jansen dispersion, while losslane
    # (and scikit-rf's 'qucs' mode) use the strip's own u = w/h, as the dispersion papers
    # are written for zero-thickness strips. Compared in 'qucs' mode, tightly; the default
    # mode differs by up to about 1.5 % in dispersive eps_eff for thick, narrow strips.
    w = u * H
    line = PUBLISHED(w, H, t, WidebandDebye(er, 0.005, 10e9))
    m = quiet(line.modes, F)["single"]
    sk = skrf_mline(w, H, t, er, 0.005, "qucs")
    np.testing.assert_allclose(m.eps_eff, np.real(sk.ep_reff_f), rtol=1e-8)
    np.testing.assert_allclose(m.z0, np.real(sk.z0_characteristic), rtol=1e-8)
    # quasi-static values at DC, where the laminate has its static permittivity, against
    # scikit-rf's quasi-static ep_reff / zl_eff for that permittivity
    m0 = quiet(line.modes, np.array([0.0]))["single"]
    sk0 = skrf_mline(w, H, t, line.dielectric.eps_static, 0.0, "qucs", "frequencyinvariant")
    assert m0.eps_eff[0] == pytest.approx(np.real(sk0.ep_reff), rel=1e-12)
    assert m0.z0[0] == pytest.approx(np.real(sk0.zl_eff), rel=1e-8)


def test_thick_strip_with_skrf_default_mode_differs_as_documented() -> None:
    # the difference named above, measured so a change on either side is noticed: at
    # u = 0.1, t/h = 0.35, er = 10 the default mode's eps_eff is 0.5..2 % higher at 56 GHz
    w, t, er = 0.1 * H, 35e-6, 10.0
    line = PUBLISHED(w, H, t, ConstantDielectric(er))
    m = quiet(line.modes, F)["single"]
    sk = skrf_mline(w, H, t, er, 0.0, None, "frequencyinvariant")
    rel = np.real(sk.ep_reff_f[-1]) / m.eps_eff[-1] - 1
    assert 0.005 < rel < 0.02


@pytest.mark.parametrize("u", [0.01, 0.03])
def test_narrow_air_strip_tends_to_its_equivalent_wire(u: float) -> None:
    # a thin flat strip of width w acts as a round wire of radius w/4 (exact conformal
    # result, e.g. Ramo-Whinnery-Van Duzer); over a plane at height h >> w that is
    # Z = (eta0/2 pi) acosh(4h/w) = (eta0/2 pi) ln(8h/w) + O(u^2). Hammerstad-Jensen
    # quote 0.03 % for their air impedance down to u = 0.01 (from memory). Below the
    # field-solver correction's box (w/h >= 0.05), so the published formula is checked.
    line = PUBLISHED(u * H, H, 0.0, ConstantDielectric(1.0))
    z = quiet(line.modes, np.array([0.0]))["single"].z0[0]
    assert z == pytest.approx(ETA0 / (2 * np.pi) * np.arccosh(4 / u), rel=3e-4)


def test_limits_of_effective_permittivity() -> None:
    # eps_eff = 1 in air; it tends to er for a very wide strip (parallel plate) and to
    # er at high frequency (Kirschning-Jansen: the field concentrates in the substrate)
    f = np.array([0.0, 1e9])
    air = quiet(Microstrip(2 * H, H, 0.0, ConstantDielectric(1.0)).modes, f)["single"]
    np.testing.assert_allclose(air.eps_eff, 1.0, rtol=1e-12)
    wide = quiet(Microstrip(1000 * H, H, 0.0, ConstantDielectric(4.0)).modes, f)["single"]
    assert 3.8 < wide.eps_eff[0] < 4.0
    hf = quiet(Microstrip(H, H, 0.0, ConstantDielectric(4.0)).modes, np.array([0.0, 3e11, 3e12]))
    e = hf["single"].eps_eff
    assert e[0] < e[1] < e[2] < 4.0
    assert 4.0 - e[2] < 0.05 * (4.0 - e[0])


def test_validity_warnings_name_the_parameter() -> None:
    d = ConstantDielectric(3.7)
    f = np.array([1e9])
    with pytest.warns(LossLaneWarning, match="width/height"):
        Microstrip(200 * H, H, 17e-6, d).modes(f)
    with pytest.warns(LossLaneWarning, match="thickness/height"):
        Microstrip(H, H, 0.8 * H, d).modes(f)
    with pytest.warns(LossLaneWarning, match="height/wavelength"):
        Microstrip(H, 1e-3, 17e-6, d).modes(np.array([60e9]))
    with pytest.warns(LossLaneWarning, match="dk"):
        Microstrip(H, H, 17e-6, ConstantDielectric(30.0)).modes(f)
    with warnings.catch_warnings():
        warnings.simplefilter("error", LossLaneWarning)  # an ordinary line is quiet
        Microstrip(6 * MIL, 3.5 * MIL, 1.4 * MIL, WidebandDebye(3.7, 0.009, 10e9)).modes(F)


@pytest.mark.parametrize(
    ("args", "key"),
    [
        ((0.0, H, 17e-6), "width"),
        ((-H, H, 17e-6), "width"),
        ((H, 0.0, 17e-6), "height"),
        ((H, H, -1e-6), "thickness"),
        ((float("inf"), H, 17e-6), "width"),
    ],
)
def test_impossible_geometry_is_an_error(args: tuple, key: str) -> None:
    with pytest.raises(LossLaneError, match=key):
        Microstrip(*args, ConstantDielectric(3.7))

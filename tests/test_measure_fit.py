"""Fitting materials to an extracted line (losslane.measure.fit).

Outside references, named beside each check:
* the synthetic coupons' own materials (the truth the fit must return), made with the
  line models and cascaded through asymmetric launches (tests/coupon_helpers.py);
* linearised least-squares statistics: the standard uncertainty from (J^T J)^-1 s^2
  should cover the error of the estimate (|z| < 4 for any reasonable realisation), and a
  narrower band holds less information, so larger uncertainties (any statistics text);
* the library reader (losslane.materials.library.load_library) for the written TOML;
* the modes of a symmetric pair (C. R. Paul, *Analysis of Multiconductor Transmission
  Lines*): the differential mode is the odd mode.
"""

from __future__ import annotations

import json
import warnings

import numpy as np
import pytest
from coupon_helpers import (
    LAMINATE,
    coupons,
    microstrip,
    stripline,
    stripline_pair,
    with_noise,
)

from losslane import LossLaneError, LossLaneWarning
from losslane.materials.conductor import Conductor
from losslane.materials.dielectric import ConstantDielectric, WidebandDebye
from losslane.materials.library import load_library
from losslane.materials.roughness import Groiss, Hammerstad, Huray, Smooth
from losslane.measure import extract_line, fit_materials, line_constants, with_materials
from losslane.units import INCH, MIL
from losslane.xsection import Microstrip, Stripline, StriplinePair
from losslane.xsection.base import Metal

LENGTHS = (2 * INCH, 6 * INCH)
TRUTH = {
    "dk": 3.7,
    "df": 0.01,
    "rq": 0.8e-6,
    "radius": 0.5e-6,
    "surface_ratio": 1.6,
    "conductivity": 5.8e7,
}


def quiet_extract(nets, lengths=LENGTHS, **kw):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        return extract_line(nets, lengths, **kw)


def quiet_fit(*args, **kw):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        return fit_materials(*args, **kw)


def nominal_stripline(dk=3.4, df=0.02, foil=None, sigma=5.8e7) -> Stripline:
    """The coupon's geometry with datasheet-like (wrong) materials: the fit's start."""
    metal = Metal(conductor=Conductor(sigma), foil=foil or Hammerstad(2e-6))
    return Stripline(5.5 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, WidebandDebye(dk, df, 10e9), metal)


def z_scores(fit):
    return {k: (fit.values[k] - TRUTH[k]) / fit.uncertainty[k] for k in fit.vary}


@pytest.fixture(scope="module")
def clean_stripline():
    return extract_line(coupons(stripline(), LENGTHS), LENGTHS)


@pytest.fixture(scope="module")
def noisy_stripline():
    # default noise model (1e-3 relative) and data noisy at that level
    return quiet_extract(with_noise(coupons(stripline(), LENGTHS), 1e-3, seed=5))


def test_noise_free_fit_recovers_dk_df_and_hammerstad_rq(clean_stripline):
    fit = fit_materials(clean_stripline, nominal_stripline(), ("dk", "df", "rq"))
    # the synthetic coupons' materials: WidebandDebye(3.7, 0.01 @ 10 GHz), Hammerstad 0.8 um
    for k in ("dk", "df", "rq"):
        assert fit.values[k] == pytest.approx(TRUTH[k], rel=1e-6)
    assert fit.residual_db_per_in < 1e-6
    assert fit.separable
    assert fit.band_hz == clean_stripline.usable_band_hz


def test_noise_free_fit_recovers_huray_and_the_dielectric():
    ext = extract_line(coupons(microstrip(), LENGTHS), LENGTHS)
    start = Microstrip(
        7 * MIL,
        4 * MIL,
        1.4 * MIL,
        WidebandDebye(3.5, 0.015, 10e9),
        Metal(foil=Huray.from_surface_ratio(1e-6, 1.0)),
    )
    vary = ("dk", "df", "radius", "surface_ratio")
    fit = fit_materials(ext, start, vary, band=(1e9, 40e9))
    for k in vary:
        assert fit.values[k] == pytest.approx(TRUTH[k], rel=1e-6)


def test_noise_free_fit_of_groiss_roughness_and_conductivity():
    truth = stripline(foil=Groiss(0.6e-6), sigma=4.5e7)
    ext = extract_line(coupons(truth, LENGTHS, kind="b"), LENGTHS)
    start = nominal_stripline(dk=3.7, df=0.02, foil=Groiss(1.5e-6))
    fit = fit_materials(ext, start, ("df", "rq", "conductivity"), band=(1e9, 40e9))
    assert fit.values["df"] == pytest.approx(0.01, rel=1e-6)
    assert fit.values["rq"] == pytest.approx(0.6e-6, rel=1e-6)
    assert fit.conductivity == pytest.approx(4.5e7, rel=1e-6)
    assert fit.foil == Groiss(fit.values["rq"])


def test_fit_from_arrays_with_relative_weighting():
    f = np.linspace(1e9, 30e9, 59)
    alpha, eps = line_constants(stripline(), f)
    fit = fit_materials((f, alpha, eps), nominal_stripline(), ("dk", "df", "rq"))
    assert fit.weighting == "relative"
    for k in ("dk", "df", "rq"):
        assert fit.values[k] == pytest.approx(TRUTH[k], rel=1e-6)


def test_narrow_band_gives_larger_uncertainties_not_a_confident_wrong_answer(noisy_stripline):
    vary = ("df", "rq", "conductivity")
    start = nominal_stripline(dk=3.7)
    wide = quiet_fit(noisy_stripline, start, vary, band=(1e9, 40e9))
    with pytest.warns(LossLaneWarning, match="cannot separate"):
        narrow = fit_materials(noisy_stripline, start, vary, band=(4e9, 5e9))
    assert wide.separable and not narrow.separable
    for k in vary:
        assert narrow.uncertainty[k] > 5 * wide.uncertainty[k]
    # the truth stays inside the stated uncertainty in both cases
    for fit in (wide, narrow):
        assert all(abs(z) < 4 for z in z_scores(fit).values())
    # over 4-5 GHz roughness and conductivity trade against each other
    i, j = vary.index("rq"), vary.index("conductivity")
    assert abs(narrow.correlation[i, j]) > 0.99
    assert narrow.multiple_correlation[j] > 0.99


def test_huray_radius_and_surface_ratio_cannot_be_separated_at_low_frequency():
    """Where the skin depth is much larger than the sphere radius, K - 1 ~ 3 SR a^2 /
    delta^2: only the product SR a^2 shows (Huray's model expanded for delta >> a)."""
    nets = with_noise(coupons(microstrip(), LENGTHS), 1e-3, seed=6)
    ext = quiet_extract(nets)
    start = Microstrip(
        7 * MIL, 4 * MIL, 1.4 * MIL, LAMINATE, Metal(foil=Huray.from_surface_ratio(1e-6, 1.0))
    )
    vary = ("radius", "surface_ratio")
    wide = quiet_fit(ext, start, vary, band=(1e9, 40e9))
    with pytest.warns(LossLaneWarning, match="cannot separate"):
        low = fit_materials(ext, start, vary, band=(0.1e9, 1.5e9))
    assert not low.separable and abs(low.correlation[0, 1]) > 0.999
    for k in vary:
        assert low.uncertainty[k] / low.values[k] > 0.1  # honest: poorly known
        assert wide.uncertainty[k] / wide.values[k] < 0.01
        assert low.uncertainty[k] > 20 * wide.uncertainty[k]
    for fit in (wide, low):
        assert all(abs(z) < 4 for z in z_scores(fit).values())


def test_undetermined_parameter_gets_infinite_uncertainty():
    # smooth-copper data fitted with a 1 nm Hammerstad rq: below 200 kHz (skin depth
    # > 150 um) rq changes K by ~1e-10, nothing the data can show
    f = np.linspace(1e4, 2e5, 40)
    alpha, eps = line_constants(stripline(foil=Smooth()), f)
    section = nominal_stripline(dk=3.7, df=0.01, foil=Hammerstad(1e-9))
    with pytest.warns(LossLaneWarning):
        fit = fit_materials((f, alpha, eps), section, ("df", "rq"), restarts=0)
    assert not fit.separable
    assert fit.uncertainty["rq"] == np.inf  # undetermined, not a pseudo-inverse's zero
    assert fit.to_json()["uncertainty"]["rq_m"] is None
    assert fit.values["df"] == pytest.approx(0.01, rel=1e-6)  # the rest is still found


def test_a_wrong_fixed_foil_is_reported_as_a_model_that_misses_the_data():
    # coupons made with 0.5 um / 1.6 Huray spheres, fitted with another foil held fixed
    ext = extract_line(coupons(microstrip(), LENGTHS), LENGTHS)
    wrong = with_materials(microstrip(), foil=Huray(((0.4e-6, 1.0), (1.2e-6, 0.5)), 1.2))
    with pytest.warns(LossLaneWarning, match="misses the data"):
        fit = fit_materials(ext, wrong, ("dk", "df"), band=(1e9, 40e9))
    assert fit.chi2_per_dof > 10  # against the default 1e-3 noise model
    data = fit.to_json()
    assert data["foil"]["spheres"][1] == {"radius_m": 1.2e-6, "surface_ratio": 0.5}
    assert "radius" not in fit.values  # only the section's own foil parameters
    with pytest.raises(LossLaneError, match="one sphere size"):
        fit_materials(ext, wrong, ("radius",))


def test_library_toml_loads_back_and_gives_the_same_line(tmp_path, clean_stripline):
    fit = fit_materials(clean_stripline, nominal_stripline(), ("dk", "df", "rq"))
    path = tmp_path / "fitted.toml"
    path.write_text(fit.library_toml("coupon laminate", "coupon-foil"), encoding="utf-8")
    lib = load_library([path])
    diel = lib.dielectric("coupon laminate")
    foil = lib.foil("coupon-foil")
    assert diel.model == "wideband-debye" and diel.at == pytest.approx(10e9)
    assert diel.dk == pytest.approx(fit.values["dk"], rel=1e-12)
    assert diel.df == pytest.approx(fit.values["df"], rel=1e-12)
    assert isinstance(foil, Hammerstad) and foil.rq == pytest.approx(fit.values["rq"], rel=1e-12)
    rebuilt = with_materials(stripline(), diel, foil)
    a1, e1 = line_constants(rebuilt, clean_stripline.f)
    a2, e2 = line_constants(fit.section, clean_stripline.f)
    np.testing.assert_allclose(a1, a2, rtol=1e-10)
    np.testing.assert_allclose(e1, e2, rtol=1e-12)


def test_library_toml_for_huray_and_conductivity(tmp_path):
    ext = extract_line(coupons(microstrip(), LENGTHS), LENGTHS)
    fit = fit_materials(ext, microstrip(), ("surface_ratio", "conductivity"), band=(1e9, 40e9))
    text = fit.library_toml()
    assert "conductivity = " in text and text.count("[foils.fitted-foil]") == 1
    path = tmp_path / "lib.toml"
    path.write_text(text, encoding="utf-8")
    foil = load_library([path]).foil("fitted-foil")
    assert isinstance(foil, Huray)
    assert foil.spheres[0][1] == pytest.approx(fit.values["surface_ratio"], rel=1e-12)


def test_json_contract(clean_stripline):
    fit = fit_materials(clean_stripline, nominal_stripline(), ("dk", "df", "rq"))
    data = json.loads(json.dumps(fit.to_json(), allow_nan=False))
    assert set(data["dielectric"]) >= {"dk", "df", "at_hz"}
    assert data["foil"]["model"] == "hammerstad" and "rq_m" in data["foil"]
    assert set(data["uncertainty"]) == {"dk", "df", "rq_m"}
    assert data["residual_db_per_in"] >= 0
    assert len(data["band_hz"]) == 2 and data["band_hz"][0] < data["band_hz"][1]
    assert data["dielectric"]["dk"] == pytest.approx(3.7, rel=1e-6)


def test_differential_pair_fit_recovers_the_dielectric():
    pair = stripline_pair()
    lengths = (1 * INCH, 5 * INCH)
    ext = extract_line(coupons(pair, lengths), lengths)
    start = StriplinePair(
        4.5 * MIL, 7 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, WidebandDebye(3.3, 0.02, 10e9), pair.metal
    )
    fit = fit_materials(ext, start, ("dk", "df"), band=(1e9, 40e9))
    assert fit.mode == "differential"
    assert fit.values["dk"] == pytest.approx(3.7, rel=1e-6)
    assert fit.values["df"] == pytest.approx(0.01, rel=1e-6)


def test_with_materials_keeps_geometry_and_plane_foil():
    section = Stripline(
        5 * MIL, 6 * MIL, 7 * MIL, 0.6 * MIL, ConstantDielectric(3.5, 0.01),
        Metal(foil=Hammerstad(1e-6), plane_foil=Smooth()),
    )  # fmt: skip
    out = with_materials(section, WidebandDebye(3.6, 0.008, 5e9), Groiss(0.5e-6))
    assert (out.width, out.below, out.above, out.thickness) == (
        5 * MIL,
        6 * MIL,
        7 * MIL,
        0.6 * MIL,
    )
    assert out.metal.foil == Groiss(0.5e-6) and out.metal.plane_foil == Smooth()
    assert out.dielectric.dk == 3.6
    assert with_materials(section).dielectric is section.dielectric


def test_line_constants_of_a_pair_are_its_modes():
    # Paul: a symmetric pair's modal gamma from the section's own even/odd mode RLGC
    pair = stripline_pair()
    f = np.linspace(1e8, 30e9, 30)
    modes = pair.modes(f)
    w = 2 * np.pi * f
    for mode, name in (("differential", "odd"), ("common", "even")):
        m = modes[name]
        gamma = np.sqrt((m.r + 1j * w * m.l) * (m.g + 1j * w * m.c))
        alpha, eps = line_constants(pair, f, mode)
        np.testing.assert_allclose(alpha, gamma.real, rtol=1e-10)
        np.testing.assert_allclose(eps, (-((gamma * 299_792_458.0 / w) ** 2)).real, rtol=1e-10)


# ------------------------------------------------------------------ bad input


def test_bad_input(clean_stripline):
    s = nominal_stripline()
    with pytest.raises(LossLaneError, match="unknown parameter 'loss'"):
        fit_materials(clean_stripline, s, ("dk", "loss"))
    with pytest.raises(LossLaneError, match="not a parameter of the 'hammerstad'"):
        fit_materials(clean_stripline, s, ("radius",))
    with pytest.raises(LossLaneError, match="usable point"):
        fit_materials(clean_stripline, s, ("dk", "df"), band=(1.0e9, 1.01e9))
    with pytest.raises(LossLaneError, match="band"):
        fit_materials(clean_stripline, s, ("dk",), band=(5e9, 1e9))
    with pytest.raises(LossLaneError, match="differs from the extraction's mode"):
        fit_materials(clean_stripline, s, ("dk",), mode="differential")
    with pytest.raises(LossLaneError, match="cannot be fitted"):
        fit_materials(clean_stripline, s, ("dk",), foil_model="graded")
    with pytest.raises(LossLaneError, match="replaces the section's"):
        fit_materials(clean_stripline, s, ("dk",), foil_model="huray")
    with pytest.raises(LossLaneError, match="needs a pair"):
        line_constants(s, np.array([1e9]), "differential")


def test_foil_model_can_replace_the_sections_foil(clean_stripline):
    # Hammerstad-made data fitted with Groiss from a smooth, lossless-laminate start
    start = nominal_stripline(dk=3.7, df=0.0, foil=Smooth())
    start = with_materials(start, ConstantDielectric(3.7, 0.0))
    fit = quiet_fit(clean_stripline, start, ("df", "rq"), foil_model="groiss")
    assert isinstance(fit.foil, Groiss) and isinstance(fit.dielectric, WidebandDebye)
    assert fit.values["df"] == pytest.approx(0.01, rel=0.01)  # another foil law: close only
    assert fit.chi2_per_dof > 4  # and the misfit of the other law is reported

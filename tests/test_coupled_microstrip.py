"""Coupled microstrip (microstrip-pair) against an independent numerical solution and the
single-strip limit."""

from __future__ import annotations

import numpy as np
import pytest
from _coupled_numerics import fd_microstrip_pair, sda_microstrip

from losslane.materials.dielectric import ConstantDielectric
from losslane.xsection.microstrip import Microstrip, eps_eff_thin, z_air_thin
from losslane.xsection.microstrip_pair import MicrostripPair, static_modes, static_modes_thin

MIL = 25.4e-6


def test_spectral_solver_reproduces_hammerstad_jensen():
    # The test's method-of-moments solver for a lone zero-thickness strip (the pair with a
    # very wide gap) against Hammerstad-Jensen, published as within 0.2 % in eps_eff and
    # 0.03 % in the air impedance (Hammerstad & Jensen 1980) -- checks the solver itself.
    for u, er in [(0.3, 4.0), (1.0, 10.0), (3.0, 2.2)]:
        z, e = sda_microstrip(u, 200.0, 1.0, er, "even")
        e_hj = float(eps_eff_thin(u, er))
        assert e == pytest.approx(e_hj, rel=3e-3)
        assert z == pytest.approx(float(z_air_thin(u)) / np.sqrt(e_hj), rel=3e-3)


@pytest.mark.parametrize(
    "u, g, er",
    [
        (0.1, 0.1, 4.0),
        (0.3, 1.0, 9.8),
        (1.0, 0.3, 2.2),
        (1.0, 3.0, 16.0),
        (3.0, 0.1, 4.0),
        (10.0, 10.0, 9.8),
        (1.0, 1.0, 1.0),
    ],
)
def test_quasi_static_against_moment_method(u, g, er):
    # source: independent spectral-domain moment-method solution (tests/_coupled_numerics)
    # of the zero-thickness pair. Kirschning & Jansen (1984) state about 1 % accuracy
    # (from memory); over their range the largest deviation measured was 1.1 % (odd-mode
    # Z at w/h = 10, s/h = 0.1).
    er_a = np.array([er])
    kj = static_modes_thin(u, g, er_a)
    for mode in ("even", "odd"):
        z, e = sda_microstrip(u, g, 1.0, er, mode)
        assert kj[mode][0][0] == pytest.approx(z, rel=0.015)
        assert kj[mode][1][0] == pytest.approx(e, rel=0.01)


def test_air_filled_modes_have_unit_eps():
    # exact: without a dielectric both modes are TEM in air
    r = static_modes_thin(1.3, 0.7, np.array([1.0]))
    assert r["even"][1][0] == pytest.approx(1.0, abs=1e-12)
    assert r["odd"][1][0] == pytest.approx(1.0, abs=1e-12)


@pytest.mark.filterwarnings("ignore::losslane.errors.LossLaneWarning")
@pytest.mark.parametrize("t", [0.0, 0.7, 1.4])
def test_wide_spacing_tends_to_single_microstrip(t):
    # s -> infinity: both modes must become the isolated strip (losslane's Microstrip,
    # Hammerstad-Jensen with thickness; Kirschning-Jansen dispersion). One even-mode Z
    # dispersion term (Q17) does not vanish with the gap; up to f h = 3 GHz mm its effect
    # stays below 1e-5 (it reaches 0.25 % at f h = 15 GHz mm).
    d = ConstantDielectric(dk=3.8)
    w, h = 6 * MIL, 4 * MIL
    f = np.array([0.0, 1e9, 30e9])
    one = Microstrip(w, h, t * MIL, d).modes(f)["single"]
    modes = MicrostripPair(w, 1e4 * h, h, t * MIL, d).modes(f)
    for m in ("even", "odd"):
        np.testing.assert_allclose(modes[m].eps_eff, one.eps_eff, rtol=1e-4)
        np.testing.assert_allclose(modes[m].z0, one.z0, rtol=1e-4)
        if t > 0:
            np.testing.assert_allclose(modes[m].r, one.r, rtol=1e-3)


def test_quasi_static_thickness_limit_is_hammerstad_jensen():
    # t > 0, s -> infinity: exactly the single strip's Hammerstad-Jensen values
    from losslane.xsection.microstrip import quasi_static

    er = np.array([3.0, 4.5])
    z1, e1 = quasi_static(5.0, 4.0, 1.4, er)
    for z, e in static_modes(5.0, 4e4, 4.0, 1.4, er).values():
        np.testing.assert_allclose(z, z1, rtol=1e-4)
        np.testing.assert_allclose(e, e1, rtol=1e-4)


def test_dispersion_moves_both_modes_toward_eps_r():
    # physics of dispersion (common practice): eps_eff of each mode rises monotonically
    # with frequency from its quasi-static value toward eps_r; the even mode, with more of
    # its field in the substrate, stays above the odd mode
    d = ConstantDielectric(dk=4.0)
    p = MicrostripPair(5 * MIL, 6 * MIL, 5 * MIL, 1.4 * MIL, d)
    f = np.linspace(0.0, 100e9, 201)
    modes = p.modes(f)
    for m in modes.values():
        assert np.all(np.diff(m.eps_eff) > 0)
        assert np.all(m.eps_eff < 4.0)
    assert np.all(modes["even"].eps_eff > modes["odd"].eps_eff)


@pytest.mark.parametrize(
    "u, g, t_h, er",
    [
        (1.25, 1.75, 0.35, 3.6),  # 5/7 mil pair, 1.4 mil copper, 4 mil of Dk 3.6
        (0.5, 0.25, 0.2, 4.0),  # tight gap, t/s = 0.8: the side-wall term dominates
        (1.0, 0.25, 0.1, 10.0),
        (0.5, 2.0, 0.2, 4.0),
    ],
)
def test_thickness_against_finite_differences(u, g, t_h, er):
    # source: independent finite-difference solution of the thick pair
    # (tests/_coupled_numerics.py; it reproduces Hammerstad-Jensen's thick single strip
    # to 0.1 % in Z). Over 0.25 <= s/h <= 3, t/h <= 0.35 the largest deviations measured
    # were 1.0 % in Z and 3.1 % in eps_eff (zero-thickness model error included).
    qs = static_modes(u, g, 1.0, t_h, np.array([er]))
    for mode in ("even", "odd"):
        z, e = fd_microstrip_pair(u, g, 1.0, t_h, er, mode)
        assert qs[mode][0][0] == pytest.approx(z, rel=0.015)
        assert qs[mode][1][0] == pytest.approx(e, rel=0.035)


def test_finite_difference_solver_reproduces_moment_method():
    # the two independent references agree for a zero-thickness pair on a substrate,
    # which checks the finite-difference treatment of the dielectric interface
    for mode in ("even", "odd"):
        z_fd, e_fd = fd_microstrip_pair(1.0, 0.5, 1.0, 0.0, 4.0, mode)
        z_mom, e_mom = sda_microstrip(1.0, 0.5, 1.0, 4.0, mode)
        assert z_fd == pytest.approx(z_mom, rel=3e-3)
        assert e_fd == pytest.approx(e_mom, rel=3e-3)


def test_static_limit_of_the_dispersive_model():
    # at f = 0 the Kirschning-Jansen dispersion laws reduce to the quasi-static values
    # (exact: F(0) = 0, Q22 = 0, Q24 = Q25 = 0, Q23 = 1): the published ones with the
    # correction off, the corrected ones (what the dispersion starts from) with it on
    d = ConstantDielectric(dk=4.2)
    dims = {"width": 5.0, "spacing": 6.0, "height": 4.0, "thickness": 1.2}
    for cls in (MicrostripPair.published(), MicrostripPair):
        p = cls(**{k: v * MIL for k, v in dims.items()}, dielectric=d)
        modes = p.modes(np.array([0.0]))
        qs = cls.corrected_static(dims, np.array([4.2]))
        for m in ("even", "odd"):
            z_air, eps = qs[m]
            assert modes[m].z0[0] == pytest.approx(z_air[0] / np.sqrt(eps[0]), rel=1e-12)
            assert modes[m].eps_eff[0] == pytest.approx(eps[0], rel=1e-12)
    published = static_modes(5.0, 6.0, 4.0, 1.2, np.array([4.2]))
    p = MicrostripPair.published()(*(v * MIL for v in dims.values()), d)
    assert p.modes(np.array([0.0]))["odd"].z0[0] == pytest.approx(published["odd"][0][0])

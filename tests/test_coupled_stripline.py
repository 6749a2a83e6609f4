"""Coupled stripline (stripline-pair) against exact and independent numerical solutions."""

from __future__ import annotations

import numpy as np
import pytest
from _coupled_numerics import C0, fd_stripline_pair, green_stripline, sda_capacitance
from scipy.special import ellipk

from losslane.materials.dielectric import ConstantDielectric
from losslane.xsection.rlgc import ETA0
from losslane.xsection.stripline import Stripline
from losslane.xsection.stripline_pair import StriplinePair, centred_pair_z_air, stripline_pair_z_air

MIL = 25.4e-6


def cohn_exact(w: float, s: float, b: float, er: float) -> tuple[float, float]:
    """S. B. Cohn, IRE Trans. MTT 3, 1955 (exact, zero thickness):
    Z = (eta0 / 4 sqrt(er)) K(k')/K(k), k_e = tanh(pi w/2b) tanh(pi (w+s)/2b),
    k_o = tanh(pi w/2b) coth(pi (w+s)/2b). scipy's ellipk takes m = k^2."""
    t1 = np.tanh(np.pi * w / (2 * b))
    t2 = np.tanh(np.pi * (w + s) / (2 * b))
    out = []
    for k in (t1 * t2, t1 / t2):
        out.append(ETA0 / (4 * np.sqrt(er)) * ellipk(1 - k * k) / ellipk(k * k))
    return out[0], out[1]


def pair(w, s, below, above, t, er=3.5):
    return StriplinePair(w, s, below, above, t, ConstantDielectric(dk=er))


@pytest.mark.parametrize(
    "w_b, s_b", [(0.05, 0.05), (0.2, 0.1), (0.3, 0.5), (0.5, 0.2), (1.0, 1.0), (2.0, 0.05)]
)
def test_zero_thickness_equals_cohn_exact(w_b, s_b):
    # source: Cohn 1955, exact conformal-mapping solution (computed here independently)
    b = 20 * MIL
    ze, zo = cohn_exact(w_b * b, s_b * b, b, 3.5)
    with pytest.warns(Warning, match="thickness = 0"):
        modes = pair(w_b * b, s_b * b, b / 2, b / 2, 0.0).modes(np.array([1e9]))
    assert modes["even"].z0[0] == pytest.approx(ze, rel=1e-9)
    assert modes["odd"].z0[0] == pytest.approx(zo, rel=1e-9)
    assert modes["even"].eps_eff[0] == pytest.approx(3.5)


def test_spectral_solver_reproduces_cohn():
    # The test's own method-of-moments solver (tests/_coupled_numerics.py) against the
    # exact solution (Cohn 1955) first, so it can be trusted for the microstrip checks.
    for w, s in [(0.3, 0.2), (1.0, 0.5)]:
        ze, zo = cohn_exact(w, s, 1.0, 1.0)
        for mode, z in (("even", ze), ("odd", zo)):
            c = sda_capacitance(w, s, green_stripline(1.0), mode)
            assert 1 / (C0 * c) == pytest.approx(z, rel=2e-4)


def test_finite_difference_solver_reproduces_cohn():
    # The finite-difference reference against the exact zero-thickness solution (Cohn 1955)
    ze, zo = cohn_exact(0.5, 0.25, 1.0, 1.0)
    assert fd_stripline_pair(0.5, 0.25, 1.0, 0.0, "even") == pytest.approx(ze, rel=1e-3)
    assert fd_stripline_pair(0.5, 0.25, 1.0, 0.0, "odd") == pytest.approx(zo, rel=1e-3)


@pytest.mark.parametrize(
    "w, s, t",
    [
        (0.25, 0.05, 0.05),  # t = s: the side-wall (narrow-gap) form matters
        (0.25, 0.25, 0.05),
        (0.5, 0.1, 0.1),
        (0.5, 1.0, 0.05),
        (1.0, 0.05, 0.1),
        (1.0, 0.5, 0.05),
    ],
)
def test_thickness_against_finite_differences(w, s, t):
    # source: independent finite-difference solution of the thick pair (b = 1), within
    # 2 % inside the model's range (t/b <= 0.1, t/w <= 0.2)
    for mode in ("even", "odd"):
        ref = fd_stripline_pair(w, s, 1.0, t, mode)
        assert centred_pair_z_air(mode, w, s, 1.0, t) == pytest.approx(ref, rel=0.02)


@pytest.mark.filterwarnings("ignore::losslane.errors.LossLaneWarning")
@pytest.mark.parametrize("below, above, t", [(5, 5, 0.6), (4, 7, 1.2), (3, 9, 0.0)])
def test_wide_spacing_tends_to_single_stripline(below, above, t):
    # for s -> infinity both modes become the isolated strip (exact limit of Cohn's k_e,
    # k_o and of the thickness corrections); losslane's Stripline is the single line
    w, f = 5 * MIL, np.array([0.0, 1e9, 10e9])
    single = Stripline(w, below * MIL, above * MIL, t * MIL, ConstantDielectric(dk=3.5))
    modes = pair(w, 2000 * MIL, below * MIL, above * MIL, t * MIL).modes(f)
    one = single.modes(f)["single"]
    for m in ("even", "odd"):
        np.testing.assert_allclose(modes[m].z0, one.z0, rtol=1e-6)
        # conductor loss and DC resistance too (Wheeler's rule on each mode's impedance)
        np.testing.assert_allclose(modes[m].r, one.r, rtol=1e-3)


def test_offset_pair_is_the_parallel_combination():
    # common practice (as for the single offset stripline): Z = 2 Z1 Z2 / (Z1 + Z2) with
    # the two centred pairs of plane spacings 2 h1 + t and 2 h2 + t; for h1 = h2 it must
    # be the centred pair
    w, s, t = 5.0, 6.0, 0.6
    for mode in ("even", "odd"):
        z1 = centred_pair_z_air(mode, w, s, 2 * 4 + t, t)
        z2 = centred_pair_z_air(mode, w, s, 2 * 8 + t, t)
        assert stripline_pair_z_air(mode, w, s, 4, 8, t) == pytest.approx(2 * z1 * z2 / (z1 + z2))
        zc = centred_pair_z_air(mode, w, s, 10 + t, t)
        assert stripline_pair_z_air(mode, w, s, 5, 5, t) == pytest.approx(zc, rel=1e-12)
        assert stripline_pair_z_air(mode, w, s, 5, 5 * (1 + 1e-9), t) == pytest.approx(zc, rel=1e-8)


def test_homogeneous_modes_share_the_delay():
    # TEM in a homogeneous dielectric: both modes have eps_eff = eps_r and, once the
    # internal inductance has faded (1 THz), travel at c/sqrt(eps_r) (exact)
    f = np.array([1e9, 1e12])
    modes = pair(5 * MIL, 6 * MIL, 5 * MIL, 6 * MIL, 0.6 * MIL).modes(f)
    for m in modes.values():
        np.testing.assert_allclose(m.eps_eff, 3.5)
        assert np.sqrt(m.l * m.c)[1] == pytest.approx(np.sqrt(3.5) / C0, rel=2e-3)

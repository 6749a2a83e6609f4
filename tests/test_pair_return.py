"""The return path of a symmetric pair's modes (``materials.conductor.sheet_return`` with
``pair``) against the exact spectral solution of two line currents over a conducting
slab, the image solution at high frequency, the loop inductance at DC, and the
exponential integral it rests on against scipy."""

from __future__ import annotations

import numpy as np
import pytest

from losslane.materials.conductor import COPPER, MU0, exp_e1, pair_return_shape, sheet_return

MIL = 25.4e-6
SIGMA = COPPER.sigma


def spectral(f: float, h: float, t: float, d: float | None = None) -> complex:
    """j w mu0 / pi times int exp(-2 kappa h) / (kappa + Y) dkappa, times cos(kappa d)
    when ``d`` is given: the exact slab solution of a line current at height h over a slab
    of thickness t (Y its input admittance, g = sqrt(kappa^2 + j w mu0 sigma); e.g.
    J. R. Wait, *Electromagnetic Waves in Stratified Media*), integrated numerically. Two
    currents d apart carry the factor 1 + sign cos(kappa d) in their spectrum (Fourier
    transform of the two filaments), so a mode's impedance per line is
    spectral(h, t) + sign spectral(h, t, d)."""
    from scipy.integrate import quad

    w = 2 * np.pi * f
    k2 = 1j * w * MU0 * SIGMA

    def integrand(kap: float) -> complex:
        g = np.sqrt(kap * kap + k2)
        th = np.tanh(g * t)
        y = g * (g * th + kap) / (g + kap * th)
        return np.exp(-2 * kap * h) / (kap + y)

    kw = {"limit": 400, "epsrel": 1e-10} if d is None else {"weight": "cos", "wvar": d}
    re = quad(lambda k: integrand(k).real, 0, np.inf, **kw)[0]
    im = quad(lambda k: integrand(k).imag, 0, np.inf, **kw)[0]
    return 1j * w * MU0 / np.pi * (re + 1j * im)


def test_exponential_integral_against_scipy_off_the_positive_half_plane() -> None:
    # a pair's modes evaluate e^c E1(c) up to about 160 degrees from the real axis;
    # reference scipy.special.exp1 (principal branch)
    from scipy.special import exp1

    r = np.geomspace(1e-3, 300.0, 300)  # e^c within range
    for deg in (0, 45, 90, 120, 150, 165):
        z = r * np.exp(1j * np.deg2rad(deg))
        np.testing.assert_allclose(exp_e1(z), np.exp(z) * exp1(z), rtol=1e-9)


@pytest.mark.parametrize("sign", [1.0, -1.0])
def test_pair_mode_return_against_the_exact_slab_solution(sign: float) -> None:
    # two 4 mil high line currents 10 mil apart over a 0.5 oz plane, 1 kHz .. 10 GHz;
    # the closed form takes the slab's k as (1 + j)/delta, exact for kappa << 1/delta: the
    # odd mode, whose spectrum starts at kappa ~ 1/d, is off most (measured: even within
    # 1.3 %, odd 7.5 % below 10 MHz where its return carries little, both 1e-3 from 1 GHz)
    h, d, t = 4 * MIL, 10 * MIL, 17.4e-6
    f = np.array([1e3, 1e4, 1e5, 1e6, 3e6, 1e7, 1e8, 1e9, 1e10])
    r, l_int = sheet_return(f, COPPER, 1.0, t, floor=0.0, pair=(h, d, sign))
    z = np.array([spectral(fi, h, t) + sign * spectral(fi, h, t, d) for fi in f])
    tol = 0.015 if sign > 0 else 0.08
    np.testing.assert_allclose(r, z.real, rtol=tol)
    np.testing.assert_allclose(2 * np.pi * f * l_int, z.imag, rtol=tol)
    np.testing.assert_allclose(r[-2:], z.real[-2:], rtol=1e-3)


def test_pair_mode_return_limits() -> None:
    # high frequency: Wheeler's (1 + j) Rs G with the image solution's per-line factor of
    # two filaments, G = (1 +- 4h^2/(4h^2 + d^2)) / (2 pi h) (hand calculation from the
    # surface current of two images); DC, odd mode: no current in the plane, so its part
    # of the inductance is the two lines' loop less their perfect-plane value,
    # mu0/(4 pi) ln(1 + d^2/4h^2) (filaments, hand calculation), up to the slab's own
    # O(t/h) term of the closed form
    h, d, t = 4 * MIL, 10 * MIL, 17.4e-6
    rs = np.sqrt(np.pi * 1e12 * MU0 / SIGMA)
    for sign in (1.0, -1.0):
        r, l_int = sheet_return(np.array([1e12]), COPPER, 1.0, t, pair=(h, d, sign))
        g = (1 + sign * 4 * h * h / (4 * h * h + d * d)) / (2 * np.pi * h)
        assert r[0] == pytest.approx(rs * g, rel=1e-3)
        assert 2 * np.pi * 1e12 * l_int[0] == pytest.approx(rs * g, rel=1e-3)
    r, l_int = sheet_return(np.array([0.0]), COPPER, 1.0, t, floor=1e-9, pair=(h, d, -1.0))
    assert r[0] == 0.0
    loop = MU0 / (4 * np.pi) * np.log(1 + d * d / (4 * h * h))
    assert l_int[0] == pytest.approx(loop, rel=0.06)
    # the modes' factors give back the two currents' height and spacing
    g_e, g_o = ((1 + s * 4 * h * h / (4 * h * h + d * d)) / (2 * np.pi * h) for s in (1, -1))
    hh, dd = pair_return_shape(g_e, g_o)
    assert hh == pytest.approx(h, rel=1e-12) and dd == pytest.approx(d, rel=1e-9)

"""The fitted insertion loss a0 + a1*sqrt(f) + a2*f + a4*f^2 (IEEE 802.3's fitted-attenuation
form, from memory) and the insertion-loss deviation, against exact synthetic data and an
independent least-squares solve written here."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from budget_scenarios import SMALL_CHANNEL, parse, scenario_text

from losslane.api import demo_scenario_path
from losslane.budget import (
    FIT_LOW_EDGE_HZ,
    fit_band,
    fit_channel,
    fit_insertion_loss,
)
from losslane.channel import build_channel
from losslane.errors import LossLaneError
from losslane.scenario import Budget, load_scenario


@pytest.fixture(scope="module")
def demo():
    return build_channel(load_scenario(demo_scenario_path(single_ended=True)))


def _model(f_hz: np.ndarray, a) -> np.ndarray:
    g = f_hz / 1e9
    return a[0] + a[1] * np.sqrt(g) + a[2] * g + a[3] * g * g


@pytest.mark.parametrize(
    "coef",
    [
        (0.3, 1.1, 0.45, 0.004),  # a typical board channel, dB with f in GHz
        (-0.05, 2.5, 0.12, 0.0),
        (0.0, 0.0, 0.0, 0.02),
    ],
)
def test_fit_recovers_exact_coefficients(coef) -> None:
    # data made exactly of the four terms: least squares must give them back
    f = np.linspace(0.0, 40e9, 4001)
    fit = fit_insertion_loss(f, _model(f, coef), 50e6, 40e9)
    assert np.allclose(fit.coefficients, coef, rtol=1e-9, atol=1e-11)
    assert np.max(np.abs(fit.ild_db)) < 1e-10
    assert fit.f[0] == pytest.approx(50e6) and fit.f[-1] == pytest.approx(40e9)


def test_ild_is_the_ripple_added_to_a_smooth_loss() -> None:
    # smooth loss plus a ripple orthogonal-ish to the basis: ILD recovers the ripple, with
    # its peak where the ripple peaks
    f = np.linspace(50e6, 20e9, 3991)
    coef = (0.2, 1.0, 0.4, 0.003)
    ripple = 0.3 * np.sin(2 * np.pi * f / 0.5e9) * np.exp(-(((f - 12e9) / 3e9) ** 2))
    fit = fit_insertion_loss(f, _model(f, coef) + ripple, 50e6, 20e9)
    assert np.allclose(fit.ild_db, ripple, atol=0.01)
    assert fit.ild_peak_hz == pytest.approx(f[np.argmax(np.abs(ripple))], abs=0.05e9)
    assert abs(fit.ild_peak_db) == pytest.approx(np.max(np.abs(ripple)), abs=0.01)


def test_fit_of_a_build_matches_an_independent_lstsq(demo) -> None:
    fit = fit_channel(demo)
    # independent solve: plain np.linalg.lstsq on the unscaled design matrix, f in GHz
    m = (demo.f >= fit.band.start - 1) & (demo.f <= fit.band.stop + 1)
    g = demo.f[m] / 1e9
    a = np.column_stack([np.ones_like(g), np.sqrt(g), g, g**2])
    coef, *_ = np.linalg.lstsq(a, demo.insertion_loss_db[m], rcond=None)
    mine = fit.fitted_db(demo.f[m])
    assert np.max(np.abs(mine - a @ coef)) < 0.01
    assert np.allclose(fit.coefficients, coef, rtol=1e-6, atol=1e-8)
    ild = demo.insertion_loss_db[m] - a @ coef
    assert fit.ild_peak_db == pytest.approx(ild[np.argmax(np.abs(ild))], abs=0.01)
    assert fit.ild_rms_db == pytest.approx(np.sqrt(np.mean(ild**2)), abs=0.01)
    # the fitted loss at Nyquist is close to the channel's own (a smooth, low-ripple lane)
    ny = demo.scenario.budget.nyquist
    il_ny = float(np.interp(ny, demo.f, demo.insertion_loss_db))
    assert float(fit.fitted_db(ny)[0]) == pytest.approx(il_ny, abs=0.5)
    assert fit.to_json(ny)["nyquist_in_band"] is True


def test_default_band_is_50_mhz_to_twice_nyquist(demo) -> None:
    band = fit_band(demo.scenario.budget, demo.f)
    assert band.start == FIT_LOW_EDGE_HZ == 50e6
    assert band.stop == pytest.approx(2 * demo.scenario.budget.nyquist)  # 16 GHz
    assert "2 x Nyquist" in band.rule


def test_default_band_is_capped_at_the_sweep_stop() -> None:
    f = np.linspace(0, 20e9, 401)
    band = fit_band(Budget(32e9, "nrz", 20.0, ()), f)  # 2 x Nyquist = 32 GHz > 20 GHz
    assert band.stop == 20e9 and "sweep stop" in band.rule
    no_rate = fit_band(None, f)
    assert (no_rate.start, no_rate.stop) == (50e6, 20e9)
    # a sweep that starts above 50 MHz starts the fit at its first point
    assert fit_band(None, np.linspace(100e6, 10e9, 100)).start == 100e6


def test_explicit_band_is_used_and_checked() -> None:
    f = np.linspace(0, 20e9, 401)
    b = Budget(16e9, "nrz", 16.0, (), fit_start=1e9, fit_stop=12e9)
    band = fit_band(b, f)
    assert (band.start, band.stop) == (1e9, 12e9)
    assert "fit_start" in band.rule and "fit_stop" in band.rule
    with pytest.raises(LossLaneError, match=r"\[budget\]\.fit_stop = 25 GHz.*0\.\.20 GHz"):
        fit_band(dataclasses.replace(b, fit_stop=25e9), f)
    with pytest.raises(LossLaneError, match="fit_stop must lie above fit_start"):
        fit_band(dataclasses.replace(b, fit_start=12e9, fit_stop=3e9), f)
    with pytest.raises(LossLaneError, match="needs at least 8"):
        fit_band(dataclasses.replace(b, fit_start=1e9, fit_stop=1.1e9), f)


def test_fit_skips_with_a_warning_on_a_coarse_sweep() -> None:
    from losslane.errors import LossLaneWarning

    sc = parse(scenario_text(SMALL_CHANNEL, stop="2 GHz", step="500 MHz"))
    with pytest.warns(LossLaneWarning, match="fitted insertion loss skipped"):
        assert fit_channel(build_channel(sc)) is None

"""The fitted insertion loss knows when it does not apply: it refuses a lane with a deep
via-stub notch in its band and a band-pass channel (an LC filter made with scikit-rf's
lumped elements, imported as Touchstone), and still fits the demo lane with the plain,
unweighted least-squares coefficients (checked against an independent np.linalg.lstsq)."""

from __future__ import annotations

import json

import numpy as np
import pytest
import skrf
from budget_scenarios import parse, pieces, scenario_text, write

from losslane import api
from losslane.api import demo_scenario_path
from losslane.budget import FitOff, fit_channel, fit_insertion_loss
from losslane.channel import build_channel
from losslane.fit_check import FALL_BACK_DB, RESIDUAL_SHARE, assess, fall_back
from losslane.scenario import load_scenario

# an open via stub resonates at c / (4 stub sqrt(Dk)) (common practice): 100 mil in Dk 3.5
# is about 15.8 GHz, inside the fit band of a 25 Gb/s NRZ lane (50 MHz .. 25 GHz)
NOTCH_LANE = (
    pieces("route", ["2 in"], "launch")
    + '[[channel]]\nvia = { barrel = "20 mil", stub = "100 mil", impedance = "44 ohm", '
    'dielectric = "core" }\nname = "stubbed via"\n' + pieces("route", ["3 in"], "run")
)
NOTCH_BUDGET = '[budget]\ndata_rate = "25 Gb/s"\nmax_loss = "30 dB"\n'


def _gigahertz_grid(start: float, stop: float, step: float) -> np.ndarray:
    n = int(round((stop - start) / step)) + 1
    return np.linspace(start, stop, n)


def write_band_pass(path, f: np.ndarray) -> None:
    """A two-resonator LC band-pass centred on 10 GHz: a series L-C branch (4 nH with
    C = 1 / (w0^2 L)) then a shunt L-C tank (0.2 nH), both resonant at 10 GHz; made from
    scikit-rf's lumped elements on a 50-ohm medium."""
    freq = skrf.Frequency.from_f(f, unit="hz")
    m = skrf.media.DefinedGammaZ0(freq, z0=50)
    w0 = 2 * np.pi * 10e9
    l1, l2 = 4e-9, 0.2e-9
    net = (
        m.inductor(l1)
        ** m.capacitor(1 / (w0**2 * l1))
        ** m.shunt_inductor(l2)
        ** m.shunt_capacitor(1 / (w0**2 * l2))
    )
    net.write_touchstone(str(path.with_suffix("")), form="ri")


def test_fit_refuses_a_lane_with_a_deep_notch() -> None:
    sc = parse(scenario_text(NOTCH_LANE, NOTCH_BUDGET, stop="30 GHz"))
    result = build_channel(sc)
    fit = fit_channel(result)
    # the notch is there and deep (the premise of the test)
    drop, top, bottom = fall_back(fit.f, fit.il_db)
    assert drop > 10.0 and 12e9 < top < 20e9
    assert fit.applies is False
    assert "falls back" in fit.reason and "notch or a pass band" in fit.reason
    data = fit.to_json(sc.budget.nyquist)
    assert data["applies"] is False and data["reason"] == fit.reason
    for key in ("a0_db", "a1_db_per_sqrt_ghz", "a2_db_per_ghz", "a4_db_per_ghz2", "ild_peak_db"):
        assert data[key] is None
    json.dumps(data, allow_nan=False)  # finite or null only


def test_fit_refuses_a_band_pass_channel(tmp_path) -> None:
    f = _gigahertz_grid(10e6, 20e9, 10e6)
    write_band_pass(tmp_path / "filter.s2p", f)
    channel = (
        pieces("route", ["0.5 in"], "feed")
        + '[[channel]]\ntouchstone = "filter.s2p"\nname = "band-pass filter"\n'
        + pieces("route", ["0.5 in"], "out")
    )
    scen = write(tmp_path, scenario_text(channel, start="10 MHz", step="10 MHz"))
    built = api.build(scen, out=tmp_path / "o", plots=False)
    fit = built.fit
    il = built.channel.insertion_loss_db
    assert il[np.argmin(np.abs(f - 10e9))] < 1.0 < 20.0 < il[np.argmin(np.abs(f - 1e9))]
    assert fit.applies is False and "falls back" in fit.reason
    data = built.to_json()
    assert data["fit"]["applies"] is False and data["fit"]["a0_db"] is None
    # no ILD chart or coefficients in the outputs, and the reason in the text
    from losslane.report.channel import build_text

    text = build_text(built)
    assert "does not apply" in text and "a0 =" not in text


def test_fit_refuses_a_residual_comparable_to_the_loss() -> None:
    # a loss that steps up by 4 dB at 5 GHz: it never falls back, but the smooth form
    # cannot follow it; the rms residual exceeds RESIDUAL_SHARE of the largest loss
    f = _gigahertz_grid(50e6, 10e9, 10e6)
    il = 0.05 * np.sqrt(f / 1e9) + np.where(f > 5e9, 4.0, 0.0)
    fit = fit_insertion_loss(f, il, 50e6, 10e9)
    assert fall_back(f, il)[0] <= FALL_BACK_DB
    applies, reason = assess(fit.f, fit.il_db, fit.ild_db)
    rms = float(np.sqrt(np.mean(fit.ild_db**2)))
    assert rms > RESIDUAL_SHARE * float(np.max(il))
    assert applies is False and "residual" in reason


@pytest.mark.parametrize("single_ended", [False, True])
def test_fit_still_fits_the_demo_lane(single_ended: bool) -> None:
    result = build_channel(load_scenario(demo_scenario_path(single_ended)))
    fit = fit_channel(result)
    assert fit.applies is True and fit.reason is None
    # the same coefficients as the plain fit, and as an independent unweighted lstsq on
    # the unscaled design matrix (f in GHz)
    plain = fit_insertion_loss(result.f, result.insertion_loss_db, fit.band.start, fit.band.stop)
    assert fit.coefficients == plain.coefficients
    m = (result.f >= fit.band.start - 1) & (result.f <= fit.band.stop + 1)
    g = result.f[m] / 1e9
    a = np.column_stack([np.ones_like(g), np.sqrt(g), g, g**2])
    coef, *_ = np.linalg.lstsq(a, result.insertion_loss_db[m], rcond=None)
    np.testing.assert_allclose(fit.coefficients, coef, rtol=1e-6, atol=1e-9)
    data = fit.to_json(result.scenario.budget.nyquist)
    assert data["applies"] is True and data["a0_db"] == fit.coefficients[0]


def test_fit_turned_off(tmp_path) -> None:
    sc = parse(scenario_text(NOTCH_LANE, NOTCH_BUDGET + "fit = false\n", stop="30 GHz"))
    off = fit_channel(build_channel(sc))
    assert isinstance(off, FitOff) and "fit = false" in off.reason
    assert off.to_json() == {"applies": False, "reason": off.reason}
    # without a [budget]: the build option
    scen = write(tmp_path, scenario_text(NOTCH_LANE, stop="30 GHz"))
    built = api.build(scen, out=tmp_path / "o", skip_fit=True)
    assert isinstance(built.fit, FitOff) and "--skip-fit" in built.fit.reason
    assert not any(p.name.endswith("-ild.png") for p in built.files)
    from losslane.cli import main

    code = main(["build", str(scen), "--out", str(tmp_path / "c"), "--no-plots", "--skip-fit"])
    assert code == 0
    doc = json.loads((tmp_path / "c" / "test-lane-budget.json").read_text())
    assert doc["fit"]["applies"] is False and "--skip-fit" in doc["fit"]["reason"]

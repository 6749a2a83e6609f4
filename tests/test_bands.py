"""Bands: judged at every sweep point, checked against scikit-rf reading the same
S-parameters (its Network magnitudes, and its mixed-mode conversion se2gmm for a pair);
a rippling return loss whose point checks sit on its peaks passes its points and fails its
band; the default band of [budget] min_return_loss; --strict and the JSON keys of bands."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
import skrf
from budget_scenarios import SMALL_CHANNEL, parse, pieces, scenario_text, write

from losslane.api import demo_scenario_path
from losslane.bands import ChannelCurves, judge_band, validate_limits
from losslane.bandspec import Band
from losslane.budget import evaluate_budget
from losslane.channel import build_channel
from losslane.cli import main
from losslane.errors import LossLaneError
from losslane.scenario import load_scenario

# two equal shunt capacitances 3 in apart on a matched line: their reflections add and
# cancel in turn, so the return loss ripples (period c / (2 * 3 in * sqrt(eps_eff)))
RIPPLE_CHANNEL = (
    '[[channel]]\nshunt = { capacitance = "0.35 pF" }\nname = "pad in"\n'
    + pieces("route", ["3 in"], "run")
    + '[[channel]]\nshunt = { capacitance = "0.35 pF" }\nname = "pad out"\n'
)
BAND_LO, BAND_HI = 6e9, 10e9


def _skrf_db(net: skrf.Network, m: int, n: int) -> np.ndarray:
    """-20 log10 |S_mn| from scikit-rf's own magnitude."""
    with np.errstate(divide="ignore"):  # S21 = 0 at DC behind a DC block
        return -20.0 * np.log10(np.abs(net.s[:, m, n]))


def _band_sel(f: np.ndarray, lo: float, hi: float) -> np.ndarray:
    return (f >= lo - 1.0) & (f <= hi + 1.0)


@pytest.fixture(scope="module")
def small():
    sc = parse(scenario_text(SMALL_CHANNEL, step="10 MHz"))
    return build_channel(sc)


def test_band_worst_values_match_scikit_rf(small) -> None:
    # reference: scikit-rf's Network of the same S (scenario port order), its |S11|, |S22|
    # and |S21| over the same sweep points; the worst value and the grid point where it is
    net = small.network
    f = np.asarray(net.f)
    curves = ChannelCurves(small)
    for lo, hi in ((1e9, 7.5e9), (2.4e9, 2.4e9), (0.01e9, 20e9), (13.37e9, 13.91e9)):
        res = judge_band(curves, Band("b", "test", lo, hi, 30.0, 5.0))
        sel = _band_sel(f, lo, hi)
        assert res.points == int(np.count_nonzero(sel))
        rl = np.minimum(_skrf_db(net, 0, 0), _skrf_db(net, 1, 1))[sel]
        assert res.return_loss.value_db == pytest.approx(float(rl.min()), abs=1e-9)
        assert res.return_loss.at_hz == f[sel][np.argmin(rl)]
        end = (
            "input"
            if _skrf_db(net, 0, 0)[sel].min() <= _skrf_db(net, 1, 1)[sel].min()
            else "output"
        )
        assert res.return_loss.end == end
        il = _skrf_db(net, 1, 0)[sel]
        assert res.loss.value_db == pytest.approx(float(il.max()), abs=1e-9)
        assert res.loss.at_hz == f[sel][np.argmax(il)]
        assert res.loss_passed is bool(il.max() <= 30.0)


def test_band_of_a_pair_matches_scikit_rf_mixed_mode() -> None:
    # reference: scikit-rf's se2gmm on the 4-port in the demo's in-in-out-out order gives
    # d1, d2, c1, c2: Sdd = s[:, :2, :2], Scd = s[:, 2:, :2], Scc = s[:, 2:, 2:]
    result = build_channel(load_scenario(demo_scenario_path()))
    net = result.network.copy()
    net.se2gmm(p=2)
    f = np.asarray(net.f)
    lo, hi = 3e9, 9e9
    res = judge_band(ChannelCurves(result), Band("b", "test", lo, hi, 20.0, 10.0))
    sel = _band_sel(f, lo, hi)

    def db(m, n):
        return _skrf_db(net, m, n)[sel]

    rl = np.minimum(db(0, 0), db(1, 1))
    assert res.return_loss.value_db == pytest.approx(float(rl.min()), abs=1e-9)
    assert res.return_loss.at_hz == f[sel][np.argmin(rl)]
    assert res.loss.value_db == pytest.approx(float(db(1, 0).max()), abs=1e-9)
    assert res.loss.at_hz == f[sel][np.argmax(db(1, 0))]
    # common-mode loss (Scc21) and the mode conversion (Scd21; Scd11 and Scd22)
    assert res.common_mode_loss.value_db == pytest.approx(float(db(3, 2).max()), abs=1e-9)
    assert res.far_conversion.value_db == pytest.approx(float(db(3, 0).min()), abs=1e-9)
    near = np.minimum(db(2, 0), db(3, 1))
    assert res.near_conversion.value_db == pytest.approx(float(near.min()), abs=1e-9)
    data = res.to_json()
    assert data["max_scd21_db"] == pytest.approx(-float(db(3, 0).min()), abs=1e-9)
    assert data["max_scd21_hz"] == f[sel][np.argmin(db(3, 0))]


def _ripple_peaks(result, lo: float, hi: float) -> tuple[np.ndarray, np.ndarray]:
    """The local maxima of the worse-end return loss inside [lo, hi] (found, not chosen)."""
    f = result.f
    rl = np.minimum(*result.return_loss)
    i = np.arange(1, f.size - 1)
    peak = (rl[i] > rl[i - 1]) & (rl[i] >= rl[i + 1]) & (f[i] >= lo) & (f[i] <= hi)
    return f[i[peak]], rl[i[peak]]


def _checks(freqs, limit: float) -> str:
    return "".join(
        f'[[budget.check]]\nat = "{float(x)!r} Hz"\nmin_return_loss = "{float(limit)!r} dB"\n'
        for x in freqs
    )


def test_rippling_return_loss_passes_its_points_and_fails_its_band(tmp_path) -> None:
    # our own construction: two equal pads on a line; the checks are put on the ripple's
    # peaks found in the built curve, the limit halfway between the lowest peak and the
    # band's minimum -- any ripple deeper than the rounding does the same
    base = build_channel(parse(scenario_text(RIPPLE_CHANNEL, step="10 MHz")))
    fp, rp = _ripple_peaks(base, BAND_LO, BAND_HI)
    assert fp.size >= 2, "the pads should make the return loss ripple in the band"
    f = base.f
    sel = _band_sel(f, BAND_LO, BAND_HI)
    rl_band = np.minimum(*base.return_loss)[sel]
    assert rp.min() - rl_band.min() > 3.0  # a real ripple, not rounding
    limit = 0.5 * (rp.min() + rl_band.min())
    budget = (
        "[budget]\n"
        + _checks(fp, limit)
        + f'[[budget.band]]\nname = "the band"\nstart = "{BAND_LO!r} Hz"\n'
        + f'stop = "{BAND_HI!r} Hz"\nmin_return_loss = "{float(limit)!r} dB"\n'
    )
    sc = parse(scenario_text(RIPPLE_CHANNEL, budget, step="10 MHz"))
    result = build_channel(sc)
    b = evaluate_budget(result)
    assert [p.passed for p in b.points] == [True] * fp.size
    (band,) = b.bands
    assert band.passed is False and b.passed is False
    assert band.return_loss.value_db == pytest.approx(float(rl_band.min()), abs=1e-12)
    assert band.return_loss.at_hz not in set(fp)
    # each point is noted as sitting on a ripple whose trough breaks its limit
    for note in b.ripples:
        assert note.on_ripple and note.would_fail
        assert note.rl_worst_db < limit
    # and --strict fails the build on the band alone
    scen = write(tmp_path, scenario_text(RIPPLE_CHANNEL, budget, step="10 MHz"))
    code = main(["build", str(scen), "--out", str(tmp_path / "o"), "--no-plots", "--strict"])
    assert code == 1


def test_default_band_of_budget_min_return_loss() -> None:
    budget = '[budget]\ndata_rate = "10 Gb/s"\nmax_loss = "20 dB"\nmin_return_loss = "6 dB"\n'
    sc = parse(scenario_text(SMALL_CHANNEL, budget, step="10 MHz"))
    b = evaluate_budget(build_channel(sc))
    (band,) = b.bands
    # from the first point above DC to the Nyquist frequency (10 Gb/s NRZ: 5 GHz)
    assert (band.band.start, band.band.stop) == (10e6, 5e9)
    assert band.points == 500 and band.band.min_return_loss == 6.0
    # without a data rate: to the sweep's end
    sc = parse(scenario_text(SMALL_CHANNEL, '[budget]\nmin_return_loss = "6 dB"\n'))
    (band,) = evaluate_budget(build_channel(sc)).bands
    assert band.band.stop == 20e9 and band.band.start == 50e6


BAND_KEYS = {
    "name",
    "start_hz",
    "stop_hz",
    "worst_loss_db",
    "worst_loss_hz",
    "max_loss_db",
    "worst_return_loss_db",
    "worst_return_loss_hz",
    "min_return_loss_db",
    "passed",
}
MASK_KEYS = {"name", "quantity", "worst_margin_db", "worst_margin_hz", "passed"}


@pytest.mark.parametrize(("loss", "strict_code"), [("30 dB", 0), ("1 dB", 1)])
def test_json_keys_and_strict(tmp_path, capsys, loss: str, strict_code: int) -> None:
    budget = (
        f'[budget]\n[[budget.band]]\nstart = "1 GHz"\nstop = "4 GHz"\nmax_loss = "{loss}"\n'
        '[[budget.mask]]\nquantity = "return-loss"\npoints = [["1 GHz", "1 dB"], '
        '["4 GHz", "2 dB"]]\n'
    )
    scen = write(tmp_path, scenario_text(SMALL_CHANNEL, budget))
    args = ["build", str(scen), "--out", str(tmp_path / "o"), "--no-plots", "--json"]
    code = main(args + ["--strict"])
    data = json.loads(capsys.readouterr().out)
    assert code == strict_code
    (band,) = data["budget"]["bands"]
    (mask,) = data["budget"]["masks"]
    assert BAND_KEYS <= set(band) and MASK_KEYS <= set(mask)
    assert (band["start_hz"], band["stop_hz"], band["name"]) == (1e9, 4e9, "band 1")
    assert band["passed"] is (strict_code == 0) and mask["passed"] is True
    assert data["budget"]["passed"] is (strict_code == 0)
    assert data["budget"]["checks"] == [] and data["budget"]["nyquist_hz"] is None
    assert {"applies", "reason"} <= set(data["fit"])
    # the budget file holds the same
    doc = json.loads((tmp_path / "o" / "test-lane-budget.json").read_text())
    assert doc["budget"]["bands"] == data["budget"]["bands"]


def _error(text: str, *, tmp_path: Path) -> str:
    sc = parse(text)
    with pytest.raises(LossLaneError) as exc:
        validate_limits(sc)
    return str(exc.value)


def test_bands_and_masks_are_checked_against_the_sweep(tmp_path) -> None:
    band = '[budget]\n[[budget.band]]\nstart = "{a}"\nstop = "{b}"\nmax_loss = "3 dB"\n'
    msg = _error(
        scenario_text(SMALL_CHANNEL, band.format(a="1 GHz", b="25 GHz")), tmp_path=tmp_path
    )
    assert "[[budget.band]] #1" in msg and "outside the sweep" in msg and "0..20 GHz" in msg
    # a band between two sweep points (50 MHz steps) holds none
    msg = _error(
        scenario_text(SMALL_CHANNEL, band.format(a="1.01 GHz", b="1.02 GHz")), tmp_path=tmp_path
    )
    assert "holds no sweep point" in msg
    mask = (
        '[budget]\n[[budget.mask]]\nquantity = "far-end-conversion"\n'
        'points = [["1 GHz", "30 dB"], ["5 GHz", "25 dB"]]\n'
    )
    msg = _error(scenario_text(SMALL_CHANNEL, mask), tmp_path=tmp_path)
    assert "[[budget.mask]] #1.quantity = 'far-end-conversion'" in msg
    assert "differential" in msg and "'insertion-loss'" in msg


@pytest.mark.parametrize(
    ("table", "expected"),
    [
        ('[[budget.band]]\nstart = "1 GHz"\nstop = "2 GHz"\n', "give max_loss and/or"),
        ('[[budget.band]]\nstart = "2 GHz"\nstop = "1 GHz"\nmax_loss = "1 dB"\n', "lies below"),
        ('[[budget.band]]\nstart = "1 GHz"\nstop = "2 GHz"\nmax_los = "1 dB"\n', "max_loss"),
        ('[[budget.band]]\nstart = "1 GHz"\nstop = "2 GHz"\nmax_loss = "-1 dB"\n', "> 0"),
        (
            '[[budget.mask]]\nquantity = "insertion-loss"\npoints = [["2 GHz", "1 dB"], '
            '["1 GHz", "2 dB"]]\n',
            "must increase",
        ),
        (
            '[[budget.mask]]\nquantity = "insertion-loss"\npoints = [["0 Hz", "1 dB"], '
            '["1 GHz", "2 dB"]]\ninterpolation = "log-frequency"\n',
            "above 0 Hz",
        ),
        (
            '[[budget.mask]]\nquantity = "loss"\npoints = [["1 GHz", "1 dB"], ["2 GHz", "2 dB"]]\n',
            "'insertion-loss'",
        ),  # fmt: skip
        ('[[budget.mask]]\nquantity = "return-loss"\npoints = [["1 GHz", "1 dB"]]\n', "two"),
        (
            '[[budget.mask]]\nquantity = "return-loss"\n'
            'points = [["1 GHz", "1"], ["2 GHz", "2 dB"]]\n',
            "points[0][1]",
        ),  # fmt: skip
        ("fit = 1\n", "true or false"),
        ('min_return_loss = "0 dB"\n', "> 0"),
    ],
)
def test_bad_band_and_mask_keys_name_the_key(table: str, expected: str) -> None:
    with pytest.raises(LossLaneError, match=None) as exc:
        parse(scenario_text(SMALL_CHANNEL, "[budget]\n" + table))
    assert expected in str(exc.value)
    assert "budget" in str(exc.value)

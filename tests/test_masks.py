"""Limit masks: a channel exactly on its mask passes with margin 0 (to rounding) and fails
when the mask moves by 0.1 dB; log-frequency interpolation against a hand computation;
the mode quantities of a pair against scikit-rf's mixed-mode conversion (se2gmm)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from budget_scenarios import SMALL_CHANNEL, parse, scenario_text

from losslane.api import demo_scenario_path
from losslane.bands import ON_LIMIT_DB, ChannelCurves, judge_mask
from losslane.bandspec import Mask
from losslane.budget import evaluate_budget
from losslane.channel import build_channel
from losslane.scenario import load_scenario

LO, HI = 2e9, 6e9


@pytest.fixture(scope="module")
def small():
    return build_channel(parse(scenario_text(SMALL_CHANNEL)))


@pytest.fixture(scope="module")
def pair():
    return build_channel(load_scenario(demo_scenario_path()))


def _on_curve(result, values: np.ndarray, shift: float = 0.0) -> str:
    """A mask through the curve at every sweep point of LO..HI, moved by ``shift`` dB,
    written as a scenario would write it (frequencies in Hz and dB at full precision)."""
    f = result.f
    sel = (f >= LO) & (f <= HI)
    pts = ", ".join(
        f'["{float(x)!r} Hz", "{float(v + shift)!r} dB"]'
        for x, v in zip(f[sel], values[sel], strict=True)
    )
    return f"points = [{pts}]\n"


@pytest.mark.parametrize("quantity", ["insertion-loss", "return-loss"])
def test_a_channel_on_its_mask_passes_with_zero_margin(small, quantity: str) -> None:
    curve = (
        small.insertion_loss_db if quantity == "insertion-loss" else np.minimum(*small.return_loss)
    )
    # a maximum (insertion loss) breaks when the mask moves down, a minimum when it moves up
    worse = -0.1 if quantity == "insertion-loss" else 0.1
    results = []
    for shift in (0.0, worse):
        budget = f'[budget]\n[[budget.mask]]\nquantity = "{quantity}"\n' + _on_curve(
            small, curve, shift
        )
        sc = parse(scenario_text(SMALL_CHANNEL, budget))
        result = build_channel(sc)
        np.testing.assert_array_equal(result.insertion_loss_db, small.insertion_loss_db)
        (m,) = evaluate_budget(result).masks
        results.append(m)
    on, moved = results
    assert abs(on.worst_margin_db) <= ON_LIMIT_DB and on.passed
    assert on.points == 81  # 2..6 GHz in 50 MHz steps
    assert moved.worst_margin_db == pytest.approx(-0.1, abs=1e-12)
    assert not moved.passed


def test_log_frequency_interpolation_by_hand() -> None:
    m = Mask("m", "test", "insertion-loss", (1e9, 10e9), (10.0, 20.0), log_frequency=True)
    lin = Mask("m", "test", "insertion-loss", (1e9, 10e9), (10.0, 20.0))
    # straight in log10(f): 10 dB + 10 dB * log10(f / 1 GHz) over the decade
    assert float(m.limit_at(2e9)) == pytest.approx(10.0 + 10.0 * math.log10(2.0), abs=1e-12)
    assert float(m.limit_at(10**9.5)) == pytest.approx(15.0, abs=1e-12)  # the geometric mean
    assert float(m.limit_at(5e9)) == pytest.approx(16.98970004336019, abs=1e-12)
    # straight in f: 10 dB + 10 dB * (2 - 1) / (10 - 1)
    assert float(lin.limit_at(2e9)) == pytest.approx(10.0 + 10.0 / 9.0, abs=1e-12)
    # the knots themselves are exact either way
    np.testing.assert_array_equal(m.limit_at([1e9, 10e9]), [10.0, 20.0])
    # three points: each segment interpolated on its own
    m3 = Mask("m", "t", "return-loss", (1e8, 1e9, 4e9), (20.0, 16.0, 10.0), log_frequency=True)
    hand = 16.0 + (10.0 - 16.0) * math.log10(2e9 / 1e9) / math.log10(4e9 / 1e9)
    assert float(m3.limit_at(2e9)) == pytest.approx(hand, abs=1e-12)


def test_log_mask_judged_on_a_channel(small) -> None:
    f = small.f
    m = Mask("loss", "test", "insertion-loss", (1e9, 10e9), (5.0, 15.0), log_frequency=True)
    res = judge_mask(ChannelCurves(small), m)
    sel = (f >= 1e9) & (f <= 10e9)
    limit = 5.0 + 10.0 * np.log10(f[sel] / 1e9)  # by hand
    margin = limit - small.insertion_loss_db[sel]
    assert res.worst_margin_db == pytest.approx(float(margin.min()), abs=1e-12)
    assert res.worst_margin_hz == f[sel][np.argmin(margin)]
    assert res.passed is bool(margin.min() >= 0)


@pytest.mark.parametrize(
    ("quantity", "kind", "ports"),
    [
        # scikit-rf's se2gmm on in-in-out-out: d1, d2, c1, c2 -> (out, in) indices
        ("common-mode-loss", "max", [(3, 2)]),  # Scc21
        ("far-end-conversion", "min", [(3, 0)]),  # Scd21
        ("near-end-conversion", "min", [(2, 0), (3, 1)]),  # Scd11, Scd22
    ],
)
def test_mode_masks_of_a_pair(pair, quantity: str, kind: str, ports) -> None:
    net = pair.network.copy()
    net.se2gmm(p=2)
    f = np.asarray(net.f)
    sel = (f >= LO) & (f <= HI)
    with np.errstate(divide="ignore"):  # Scd at DC is 0 for this lane
        per_end = [-20 * np.log10(np.abs(net.s[:, a, b])) for a, b in ports]
    # a loss (maximum limit) is worst where largest, an isolation (minimum) where smallest
    values = np.max(per_end, axis=0) if kind == "max" else np.min(per_end, axis=0)
    curves = ChannelCurves(pair)
    on = judge_mask(curves, Mask("m", "t", quantity, tuple(f[sel]), tuple(values[sel])))
    assert abs(on.worst_margin_db) < 1e-9 and on.passed
    worse = 0.1 if kind == "min" else -0.1
    moved = judge_mask(curves, Mask("m", "t", quantity, tuple(f[sel]), tuple(values[sel] + worse)))
    assert moved.worst_margin_db == pytest.approx(-0.1, abs=1e-9) and not moved.passed

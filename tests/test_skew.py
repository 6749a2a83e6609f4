"""Intra-pair skew (losslane.network.skew, the scenario's ``skew`` key).

Outside references:
* mixed-mode S-parameters (D. E. Bockelman, W. R. Eisenstadt, IEEE Trans. MTT 43(7),
  1995): for two uncoupled, lossless, matched legs whose delays differ by dt,
  Sdd21 = (e^{-j w t_P} + e^{-j w t_N}) / 2 and Scd21 = (e^{-j w t_P} - e^{-j w t_N}) / 2,
  so |Sdd21| = |cos(pi f dt)| and |Scd21| = |sin(pi f dt)|;
* lossless line theory (D. M. Pozar, *Microwave Engineering*): a matched TEM line of
  delay t is exactly e^{-j w t}; a passive network has every singular value of S at most 1
  and a reciprocal one S = S^T;
* Cohn's exact coupled stripline (IRE Trans. MTT 3, 1955): widely spaced strips barely
  couple, so the pair tends to two independent legs.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from scipy.optimize import brentq

from losslane import LossLaneWarning
from losslane.channel import build_channel
from losslane.errors import LossLaneError
from losslane.materials.dielectric import ConstantDielectric
from losslane.network.line import LineSegment, UniformLine, line_scaled_abcd
from losslane.network.mixedmode import mixed_mode_internal
from losslane.network.skew import SkewedPair
from losslane.scenario import parse_scenario
from losslane.xsection.base import PAIR_TRANSFORM, Metal
from losslane.xsection.leg import leg_section
from losslane.xsection.microstrip import Microstrip
from losslane.xsection.microstrip_pair import MicrostripPair
from losslane.xsection.rlgc import C0, RLGC
from losslane.xsection.stripline import Stripline
from losslane.xsection.stripline_pair import StriplinePair

MIL = 25.4e-6
F = np.linspace(0.0, 40e9, 401)


def _lossless(z0: float, dk: float, f: np.ndarray, n: int) -> RLGC:
    """A lossless TEM line (n = 2: two uncoupled identical legs)."""
    l_pul = z0 * np.sqrt(dk) / C0
    c_pul = np.sqrt(dk) / (z0 * C0)
    if n == 1:
        zero = np.zeros(f.shape)
        return RLGC.single(f, zero, np.full(f.shape, l_pul), zero, np.full(f.shape, c_pul))
    eye = np.broadcast_to(np.eye(2), f.shape + (2, 2))
    zero = np.zeros(f.shape + (2, 2))
    return RLGC(f, zero, eye * l_pul, zero, eye * c_pul, PAIR_TRANSFORM)


@pytest.mark.parametrize("dt", [5e-12, -3e-12])
def test_uncoupled_matched_legs_give_the_exact_mixed_mode_transmission(dt):
    dk, length = 3.6, 0.05
    pair = LineSegment(UniformLine.from_rlgc(_lossless(50.0, dk, F, 2)), length, "pair")
    leg = _lossless(50.0, dk, F, 1)
    extra = dt * C0 / np.sqrt(dk)  # the leg's velocity c / sqrt(Dk)
    block = SkewedPair(pair, extra, lambda f, l: line_scaled_abcd(leg, l))
    mm = mixed_mode_internal(block.s(F, 50.0), 50.0)
    np.testing.assert_allclose(np.abs(mm.dd[:, 1, 0]), np.abs(np.cos(np.pi * F * dt)), atol=1e-6)
    np.testing.assert_allclose(np.abs(mm.cd[:, 1, 0]), np.abs(np.sin(np.pi * F * dt)), atol=1e-6)
    # the sign says which leg is longer: Scd21 = (e^{-jw tP} - e^{-jw tN}) / 2
    t0 = length * np.sqrt(dk) / C0
    t_p, t_n = t0 + max(dt, 0.0), t0 + max(-dt, 0.0)
    w = 2 * np.pi * F
    expected = 0.5 * (np.exp(-1j * w * t_p) - np.exp(-1j * w * t_n))
    np.testing.assert_allclose(mm.cd[:, 1, 0], expected, atol=1e-6)
    assert block.longer == ("P" if dt > 0 else "N")


def _stripline_pair(spacing_in_widths: float) -> StriplinePair:
    """A lossless stripline pair of 50-ohm legs, ``spacing_in_widths`` widths apart
    (zero-thickness strips: Cohn's exact solution, no conductor loss)."""
    d = ConstantDielectric(3.6, 0.0, "flat")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)

        def z(w: float) -> float:
            s = Stripline(w, 6 * MIL, 6 * MIL, 0.0, d)
            return float(s.line_values(np.array([1e9])).main.z0[0]) - 50.0

        w = brentq(z, 1 * MIL, 30 * MIL, xtol=1e-12)
    return StriplinePair(w, spacing_in_widths * w, 6 * MIL, 6 * MIL, 0.0, d, Metal())


def _skewed_deviation(sec: StriplinePair, dt: float) -> tuple[float, float]:
    """Largest deviation of |Sdd21| and |Scd21| from the uncoupled result."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        line = UniformLine.from_rlgc(sec.rlgc(F))
        leg = leg_section(sec)
        assert isinstance(leg, Stripline) and leg.width == sec.width
        delay = float(leg.line_values(np.array([10e9])).main.delay[0])
        leg_rlgc = leg.rlgc(F)
        block = SkewedPair(
            LineSegment(line, 0.05, "pair"), dt / delay, lambda f, l: line_scaled_abcd(leg_rlgc, l)
        )
        mm = mixed_mode_internal(block.s(F, 50.0), 50.0)
    dd = np.max(np.abs(np.abs(mm.dd[:, 1, 0]) - np.abs(np.cos(np.pi * F * dt))))
    cd = np.max(np.abs(np.abs(mm.cd[:, 1, 0]) - np.abs(np.sin(np.pi * F * dt))))
    return float(dd), float(cd)


def test_a_widely_spaced_stripline_pair_follows_the_uncoupled_result():
    # two widths apart (13 mil between strips 12 mil from plane to plane): measured
    # deviations 4.8e-5 (Sdd21) and 2.3e-5 (Scd21)
    dd, cd = _skewed_deviation(_stripline_pair(2.0), 4e-12)
    assert dd < 1e-3 and cd < 1e-3
    # the check can tell: one width apart the coupling moves |Sdd21| by more than 1e-3
    assert _skewed_deviation(_stripline_pair(1.0), 4e-12)[0] > 1e-3


def test_a_coupled_skewed_pair_stays_passive_and_reciprocal():
    d = ConstantDielectric(3.6, 0.004, "core")
    sec = MicrostripPair(5 * MIL, 5 * MIL, 3.5 * MIL, 1.4 * MIL, d, Metal())
    line = UniformLine.from_rlgc(sec.rlgc(F))
    leg = leg_section(sec)
    assert isinstance(leg, Microstrip)
    leg_rlgc = leg.rlgc(F)
    block = SkewedPair(
        LineSegment(line, 0.1, "pair"), 20 * MIL, lambda f, l: line_scaled_abcd(leg_rlgc, l)
    )
    s = block.s(F, 50.0)
    np.testing.assert_allclose(s, np.swapaxes(s, 1, 2), atol=1e-12)
    assert np.max(np.linalg.svd(s, compute_uv=False)) <= 1.0 + 1e-12
    mm = mixed_mode_internal(s, 50.0)
    assert np.max(np.abs(mm.cd[:, 1, 0])) > 0.05  # the skew converts
    # the chain-matrix form of the same block agrees
    from losslane.network.scaled import abcd_to_s

    np.testing.assert_allclose(abcd_to_s(block.scaled_abcd(F), 50.0), s, atol=1e-10)


# ------------------------------------------------------------------- in a scenario

SCEN = """
name = "skewed"
[sweep]
start = "0 Hz"
stop = "20 GHz"
step = "50 MHz"
[lines.pair]
kind = "stripline-pair"
width = "5 mil"
spacing = "7 mil"
below = "6 mil"
above = "6 mil"
thickness = "0.6 mil"
dielectric = "low-loss"
[[channel]]
line = "pair"
length = "4 in"
SKEW
[[channel]]
via = { barrel = "50 mil", impedance = "45 ohm", dielectric = "low-loss" VIA }
[budget]
data_rate = "16 Gb/s"
max_loss = "20 dB"
"""


def _scen(skew: str = "", via: str = ""):
    return parse_scenario(SCEN.replace("SKEW", skew).replace("VIA", via))


def test_a_skew_as_time_is_the_leg_length_at_its_velocity():
    res = build_channel(_scen('skew = "2 ps"'))
    blk = res.blocks[0]
    leg = leg_section(res.scenario.lines["pair"])
    # converted at the budget's Nyquist frequency (8 GHz)
    v = 1.0 / float(leg.line_values(np.array([8e9])).main.delay[0])
    assert blk.extra == pytest.approx(2e-12 * v, rel=1e-12, abs=0)
    assert blk.skew_time == 2e-12


def test_skew_shows_as_mode_conversion_in_the_budget():
    plain = build_channel(_scen())
    skewed = build_channel(_scen('skew = "-10 mil"', ', skew = "3 mil"'))
    from losslane.budget import evaluate_budget

    b0, b1 = evaluate_budget(plain), evaluate_budget(skewed)
    assert b0.nyquist.scd21_db < -200  # a symmetric pair converts nothing
    assert b1.nyquist.scd21_db > -40
    rows = b1.nyquist.segments
    assert rows[0].conversion_db > -40 and rows[1].conversion_db > -60
    js = b1.to_json()
    assert js["nyquist"]["mode_conversion_db"] == b1.nyquist.scd21_db
    assert js["segments"][0]["mode_conversion_db"] == rows[0].conversion_db
    assert skewed.blocks[0].longer == "N" and skewed.blocks[1].longer == "P"


def test_skew_needs_a_pair_and_a_length_or_time():
    single = SCEN.replace('kind = "stripline-pair"', 'kind = "stripline"').replace(
        'spacing = "7 mil"\n', ""
    )
    with pytest.raises(LossLaneError, match="skew is the length difference"):
        parse_scenario(single.replace("SKEW", 'skew = "5 mil"').replace("VIA", ""))
    with pytest.raises(LossLaneError, match=r"skew = '5 ohm'.*a length .* or a time"):
        _scen('skew = "5 ohm"')

"""IEEE Std 370-2020 frequency-domain quality metrics: hand-computed values on synthetic
S-parameter sets with known violations, the standard's formulas transcribed literally,
and our own line models, which must score as passive, reciprocal and causal."""

from __future__ import annotations

import json

import numpy as np
import pytest

from losslane.errors import LossLaneError
from losslane.materials.dielectric import ConstantDielectric, WidebandDebye
from losslane.network import LineSegment, SeriesCapacitor, ShuntCapacitor, Via, build_network
from losslane.network.quality import (
    PASSIVITY_A,
    RECIPROCITY_C,
    quality,
    quality_level,
)
from losslane.units import INCH, MIL
from losslane.xsection import Microstrip, Stripline, StriplinePair

N = 200
F = np.linspace(0.0, 20e9, N)
TAU = 0.2e-9  # s: phase step 2 pi * 100 MHz * 0.2 ns = 0.13 rad, well sampled


def thru(f=F, tau=TAU, ports=2):
    """A matched, lossless delay: S21 = S12 = exp(-j w tau), S11 = S22 = 0."""
    s = np.zeros((f.size, ports, ports), complex)
    d = np.exp(-2j * np.pi * f * tau)
    half = ports // 2
    for k in range(half):
        s[:, k, k + half] = s[:, k + half, k] = d
    return s


# ---------------------------------------------------------------- passivity


def test_lossless_thru_is_passive_reciprocal_and_causal():
    # IEEE 370-2020: singular values of a lossless matched thru are exactly 1 (<= A)
    q = quality(F, thru())
    assert q.passivity == 100.0 and q.reciprocity == 100.0 and q.causality == 100.0
    assert (q.passivity_level, q.reciprocity_level, q.causality_level) == ("good",) * 3
    assert q.passivity_failures_hz.size == 0
    assert q.negligible_entries == ("S11", "S22")


def test_gain_at_k_points_gives_the_hand_computed_passivity():
    # IEEE 370-2020: PW = (PM - A)/B at each failing point, metric = (N - sum PW)/N x 100;
    # by hand with PM = 1.01 at k = 7 of N = 200: 100 (1 - 7 (1.01 - 1.00001)/0.1 / 200)
    s = thru()
    bad = [3, 40, 41, 90, 120, 150, 199]
    s[bad] *= 1.01
    q = quality(F, s)
    assert q.passivity == pytest.approx(100 * (1 - 7 * 0.09990 / 200), abs=1e-9)
    assert q.passivity == pytest.approx(99.650350, abs=1e-6)
    assert q.passivity_level == "acceptable"
    np.testing.assert_array_equal(q.passivity_failures_hz, F[bad])
    assert q.max_singular_value == pytest.approx(1.01, abs=1e-12)
    assert q.max_singular_value_hz in F[bad]


def test_passivity_uses_the_largest_singular_value_not_the_largest_entry():
    # IEEE 370-2020 defines PM as the largest singular value (the 2-norm of S). For the real
    # symmetric [[a, b], [b, a]] the singular values are |a + b| and |a - b| (linear
    # algebra): a = 0.3, b = 0.75 gives 1.05 although no entry exceeds 0.75;
    # PW = (1.05 - 1.00001)/0.1 = 0.4999 at every point, metric = 100 (1 - 0.4999) = 50.01
    s = np.empty((N, 2, 2), complex)
    s[:, 0, 0] = s[:, 1, 1] = 0.3
    s[:, 0, 1] = s[:, 1, 0] = 0.75
    q = quality(F, s)
    assert q.max_singular_value == pytest.approx(1.05, abs=1e-12)
    assert q.passivity == pytest.approx(50.01, abs=1e-9)
    assert q.passivity_level == "poor"
    # entries that do not turn at all score 100 (IEEE 370 reference code convention)
    assert q.causality == 100.0


def test_passivity_metric_is_clamped_at_zero():
    # IEEE 370-2020: metric = max(N - sum PW, 0)/N x 100; a gain of 3 gives PW = 19.99
    q = quality(F, 3.0 * thru())
    assert q.passivity == 0.0 and q.passivity_level == "poor"


def test_threshold_a_is_the_standards():
    # IEEE 370-2020: singular values up to A = 1.00001 are not penalised
    s = thru()
    s[10] *= PASSIVITY_A * (1 - 1e-9)
    assert quality(F, s).passivity == 100.0
    s[10] *= 1 + 2e-6  # now PM = A (1 - 1e-9)(1 + 2e-6), PW = (PM - A)/0.1 at one point
    pw = (PASSIVITY_A * (1 - 1e-9) * (1 + 2e-6) - PASSIVITY_A) / 0.1
    assert quality(F, s).passivity == pytest.approx(100 * (1 - pw / N), rel=0, abs=1e-10)


# ---------------------------------------------------------------- reciprocity


def test_asymmetric_transfer_gives_the_hand_computed_reciprocity():
    # IEEE 370-2020: RM = sum_km |S_km - S_mk| / (P (P - 1)); a 2-port with
    # S12 = S21 + delta has RM = 2 |delta| / 2 = |delta|; RW = (|delta| - C)/B.
    # |delta| = 0.01 at k = 25 of 200 points: 100 (1 - 25 (0.01 - 1e-6)/0.1 / 200)
    s = thru()
    pts = np.arange(50, 75)
    s[pts, 0, 1] += 0.01 * np.exp(1j * 0.7)
    q = quality(F, s)
    assert q.reciprocity == pytest.approx(100 * (1 - 25 * (0.01 - 1e-6) / 0.1 / 200), abs=1e-9)
    assert q.reciprocity == pytest.approx(98.75012, abs=1e-5)
    assert q.reciprocity_level == "inconclusive"


def test_four_port_reciprocity_normalisation():
    # IEEE 370-2020: the normalisation is P (P - 1) = 12 for a 4-port; one asymmetric pair
    # S31 != S13 by 0.01 gives RM = 2 x 0.01 / 12 everywhere, RW = (RM - C)/B,
    # metric = 100 (1 - RW)
    s = thru(ports=4)
    s[:, 2, 0] += 0.01
    rm = 2 * 0.01 / 12
    q = quality(F, s)
    assert q.reciprocity == pytest.approx(100 * (1 - (rm - RECIPROCITY_C) / 0.1), abs=1e-9)
    assert q.reciprocity == pytest.approx(98.33433, abs=1e-5)


# ---------------------------------------------------------------- causality


def turning(n: int, m: int, step: float = 0.05) -> np.ndarray:
    """A unit-magnitude response whose phase falls by ``step`` per point (clockwise) for the
    first m steps and then rises (counter-clockwise) for the remaining n - 1 - m."""
    phase = np.concatenate([-step * np.arange(m + 1), -step * m + step * np.arange(1, n - m)])
    return 0.8 * np.exp(1j * phase)


def test_wrong_way_share_gives_the_hand_computed_causality():
    # IEEE 370-2020: R_n = Re(V_n+1) Im(V_n) - Im(V_n+1) Re(V_n). On a circle with equal
    # steps every R_n has the same size c; the m - 1 all-clockwise triples count +c, the
    # N - 2 - m all-counter-clockwise ones -c, and the turning point (V_m = -V_m-1) 0, so
    # metric = 100 (m - 1)/(N - 3) by hand: m = 76, N = 101 -> 7500/98 = 76.53
    n, m = 101, 76
    f = np.linspace(1e6, 10e9, n)
    s = np.zeros((n, 2, 2), complex)
    s[:, 1, 0] = s[:, 0, 1] = turning(n, m)
    q = quality(f, s)
    assert q.causality == pytest.approx(100 * (m - 1) / (n - 3), abs=1e-9)
    assert q.causality == pytest.approx(76.530612, abs=1e-6)
    assert q.causality_level == "acceptable"
    assert q.worst_causality_entry in ("S12", "S21")


def test_delay_is_causal_and_advance_is_not():
    # a delay exp(-j w tau) turns clockwise (causal): 100; an advance exp(+j w tau)
    # turns the other way at every point: 0 (IEEE 370-2020 sign convention)
    q = quality(F, thru())
    assert q.causality == 100.0
    q = quality(F, np.conj(thru()))
    assert q.causality == 0.0 and q.causality_level == "poor"


def test_negligible_entries_are_left_out_but_small_noise_is_not():
    # the issue's rule: an entry whose magnitude never exceeds 1e-6 is negligible
    rng = np.random.default_rng(7)
    noise = rng.normal(size=(N, 2)) + 1j * rng.normal(size=(N, 2))
    s = thru()
    s[:, 0, 0] = 0.3e-6 * noise[:, 0] / np.max(np.abs(noise[:, 0]))
    s[:, 1, 1] = 1e-7 * noise[:, 1]
    q = quality(F, s)
    assert q.negligible_entries == ("S11", "S22")
    assert q.causality == 100.0
    # the same noise at 1e-5: the entry counts, and random turning is about 50 %
    s[:, 0, 0] = 1e-5 * noise[:, 0]
    q = quality(F, s)
    assert q.worst_causality_entry == "S11"
    assert q.negligible_entries == ("S22",)
    assert 30 < q.causality < 70


def test_vectorized_metrics_equal_the_ieee370_definitions_evaluated_point_by_point():
    # the formulas of IEEE 370-2020 written out point by point and entry by entry, on a
    # random 4-port with every kind of violation; reproducible to rounding
    rng = np.random.default_rng(3)
    n, p = 57, 4
    f = np.linspace(0, 5e9, n)
    s = 0.45 * (rng.normal(size=(n, p, p)) + 1j * rng.normal(size=(n, p, p)))
    a, b, c = 1.00001, 0.1, 1e-6
    pw = rw = 0.0
    for k in range(n):
        pm = np.linalg.norm(s[k], 2)
        pw += (pm - a) / b if pm > a else 0.0
        rm = sum(abs(s[k, i, j] - s[k, j, i]) for i in range(p) for j in range(p)) / (p * (p - 1))
        rw += (rm - c) / b if rm > c else 0.0
    cq = []
    for i in range(p):
        for j in range(p):
            pos = tot = 0.0
            for k in range(n - 2):
                v0 = s[k + 1, i, j] - s[k, i, j]
                v1 = s[k + 2, i, j] - s[k + 1, i, j]
                r = v1.real * v0.imag - v1.imag * v0.real
                pos += max(r, 0.0)
                tot += abs(r)
            cq.append(100 * pos / tot)
    q = quality(f, s)
    assert q.passivity == pytest.approx(max(n - pw, 0) / n * 100, abs=1e-9)
    assert q.reciprocity == pytest.approx(max(n - rw, 0) / n * 100, abs=1e-9)
    assert q.causality == pytest.approx(min(cq), abs=1e-9)
    np.testing.assert_allclose(q.causality_by_entry.ravel(), cq, atol=1e-9)


# ---------------------------------------------------------------- levels and output


@pytest.mark.parametrize(
    ("metric", "kind", "level"),
    [
        (99.9, "passivity", "good"),
        (99.89, "passivity", "acceptable"),
        (99.0, "reciprocity", "acceptable"),
        (98.99, "reciprocity", "inconclusive"),
        (80.0, "passivity", "inconclusive"),
        (79.9, "passivity", "poor"),
        (80.0, "causality", "good"),
        (79.9, "causality", "acceptable"),
        (50.0, "causality", "acceptable"),
        (49.9, "causality", "inconclusive"),
        (20.0, "causality", "inconclusive"),
        (19.9, "causality", "poor"),
    ],
)
def test_levels_follow_the_standards_table(metric, kind, level):
    # IEEE 370-2020 quality levels (table from memory, as stated in the issue)
    assert quality_level(metric, kind) == level


def test_json_has_the_issues_keys():
    q = quality(F, thru())
    out = q.to_json()
    for key in (
        "passivity",
        "reciprocity",
        "causality",
        "passivity_level",
        "reciprocity_level",
        "causality_level",
        "worst_causality_entry",
        "negligible_entries",
    ):
        assert key in out
    json.dumps(out, allow_nan=False)


def test_bad_input_is_named():
    with pytest.raises(LossLaneError, match="at least 3"):
        quality(F[:2], thru()[:2])
    with pytest.raises(LossLaneError, match="shape"):
        quality(F, thru()[:, :1])
    s = thru()
    s[5, 1, 0] = np.nan
    with pytest.raises(LossLaneError, match="S21 at"):
        quality(F, s)
    with pytest.raises(LossLaneError, match="increasing"):
        quality(F[::-1], thru())
    with pytest.raises(LossLaneError, match="quality kind"):
        quality_level(50, "stability")


# ---------------------------------------------------------------- our own models


SWEEP = np.linspace(0.0, 40e9, 4001)


@pytest.mark.filterwarnings("ignore:stripline. thickness = 0")
def test_lossless_stripline_scores_passive_reciprocal_causal():
    # a lossless TEM line (zero-thickness strip, Df = 0) is passive, reciprocal and causal;
    # IEEE 370-2020 metrics: 100, 100 and a good causality level
    sl = Stripline(
        width=5 * MIL,
        below=6 * MIL,
        above=6 * MIL,
        thickness=0.0,
        dielectric=ConstantDielectric(3.7, 0.0),
    )
    net = build_network([LineSegment(sl, 4 * INCH)], SWEEP, 50.0)
    q = quality(net.f, net.s)
    assert q.passivity == 100.0 and q.reciprocity == 100.0
    assert q.causality_level == "good" and q.causality > 99, q.causality
    assert q.max_singular_value <= 1 + 1e-12


def test_lossy_channel_scores_passive_reciprocal_causal():
    # a lossy single-ended channel of causal models (wideband Debye laminate, copper,
    # a pad, a DC block, a via with its stub): IEEE 370-2020 metrics 100, 100, good
    core = WidebandDebye(3.7, 0.009, 10e9)
    ms = Microstrip(width=6 * MIL, height=3.5 * MIL, thickness=1.4 * MIL, dielectric=core)
    sl = Stripline(
        width=5 * MIL, below=6 * MIL, above=6 * MIL, thickness=0.6 * MIL, dielectric=core
    )
    blocks = [
        LineSegment(ms, 1.0 * INCH),
        ShuntCapacitor(0.15e-12),
        SeriesCapacitor(100e-9, esl=0.4e-9, esr=0.01),
        Via(55 * MIL, 10 * MIL, 45.0, core),
        LineSegment(sl, 5 * INCH),
    ]
    net = build_network(blocks, SWEEP, 50.0)
    q = quality(net.f, net.s)
    assert q.passivity == 100.0 and q.reciprocity == 100.0
    assert q.causality_level == "good" and q.causality > 99, q.causality


def test_lossy_pair_scores_passive_reciprocal_causal():
    # a differential 4-port of a stripline pair on a causal laminate
    core = WidebandDebye(3.5, 0.006, 10e9)
    pair = StriplinePair(
        width=4.5 * MIL,
        spacing=6 * MIL,
        below=6 * MIL,
        above=6 * MIL,
        thickness=0.6 * MIL,
        dielectric=core,
    )
    net = build_network([LineSegment(pair, 6 * INCH)], SWEEP, 50.0)
    q = quality(net.f, net.s)
    assert q.ports == 4
    assert q.passivity == 100.0 and q.reciprocity == 100.0
    assert q.causality_level == "good" and q.causality > 99, q.worst_causality_entry

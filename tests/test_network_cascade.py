"""The vectorized cascade against scikit-rf's own cascade, and the S <-> ABCD conversions."""

from __future__ import annotations

import numpy as np
import pytest
from network_channels import pair_channel, single_channel

from losslane.errors import LossLaneError
from losslane.materials.dielectric import ConstantDielectric
from losslane.network import (
    LineSegment,
    ScaledABCD,
    SeriesRL,
    abcd_to_s,
    block_network,
    build_network,
    cascade,
    s_to_scaled_abcd,
    to_network,
)
from losslane.network.scaled import stack_matmul
from losslane.units import MIL
from losslane.xsection import Stripline

Z0 = 50.0


def test_cascade_agrees_with_scikit_rf_cascade_two_port():
    # scikit-rf's cascade_list (S-parameter connection of the blocks' networks) is an
    # independent cascade; agreement to 1e-9
    import skrf

    f = np.linspace(0, 40e9, 401)
    blocks = single_channel()
    ours = build_network(blocks, f, Z0)
    ref = skrf.network.cascade_list([block_network(b, f, Z0) for b in blocks])
    assert np.max(np.abs(ours.s - ref.s)) < 1e-9
    assert ours.is_passive()
    assert ours.is_reciprocal()


def test_cascade_agrees_with_scikit_rf_cascade_four_port():
    # scikit-rf's cascade of 2N-ports connects ports N..2N-1 of one to 0..N-1 of the next
    # (in-in-out-out), an independent check of the 4-port cascade
    import skrf

    f = np.linspace(0, 30e9, 301)
    blocks = pair_channel(f)
    ours = build_network(blocks, f, Z0)
    ref = skrf.network.cascade_list([block_network(b, f, Z0) for b in blocks])
    assert np.max(np.abs(ours.s - ref.s)) < 1e-9
    assert ours.is_passive()
    assert ours.is_reciprocal()


def test_port_orders():
    f = np.linspace(0, 20e9, 21)
    blocks = pair_channel(f)
    a = build_network(blocks, f, Z0, order="in-in-out-out")
    b = build_network(blocks, f, Z0, order="in-out-in-out")
    # in-out-in-out: port 2 is line 1's far end = port 3 of in-in-out-out
    p = [0, 2, 1, 3]
    np.testing.assert_array_equal(b.s, a.s[:, p][:, :, p])
    assert b.port_names == ["in1", "out1", "in2", "out2"]
    assert a.port_names == ["in1", "in2", "out1", "out2"]
    with pytest.raises(LossLaneError, match="order"):
        build_network(blocks, f, Z0, order="out-in")
    # per-port references are given in the output order and follow the ports
    za = np.array([40.0, 45.0, 55.0, 60.0])
    ra = build_network(blocks, f, za, order="in-in-out-out")
    rb = build_network(blocks, f, za[p], order="in-out-in-out")
    np.testing.assert_array_equal(rb.s, ra.s[:, p][:, :, p])
    np.testing.assert_array_equal(rb.z0.real[0], za[p])


def test_unequal_references_match_scikit_rf_renormalisation():
    # renormalising to other port impedances with scikit-rf gives the same S
    f = np.linspace(1e6, 20e9, 51)
    blocks = single_channel()
    base = build_network(blocks, f, 50.0)
    ours = build_network(blocks, f, [40.0, 60.0])
    ref = base.copy()
    ref.renormalize(np.array([40.0, 60.0]))
    np.testing.assert_allclose(ours.s, ref.s, rtol=1e-10, atol=1e-13)


def test_abcd_to_s_matches_scikit_rf_conversion():
    # scikit-rf's a2s / s2a (2-port ABCD <-> S formulas) are independent conversions
    import skrf

    f = np.linspace(1e6, 30e9, 61)
    for b in single_channel():
        t = b.abcd(f)
        np.testing.assert_allclose(
            abcd_to_s(t, Z0), skrf.network.a2s(t, Z0), rtol=1e-11, atol=1e-13
        )
    rng = np.random.default_rng(5)
    s = 0.4 * (rng.standard_normal((30, 2, 2)) + 1j * rng.standard_normal((30, 2, 2)))
    np.testing.assert_allclose(s_to_scaled_abcd(s, Z0).abcd(), skrf.network.s2a(s, Z0), rtol=1e-12)


def test_s_abcd_round_trip_non_reciprocal_four_port():
    # S -> scaled ABCD -> S must give back any (even non-reciprocal) 4-port
    rng = np.random.default_rng(1)
    s = 0.3 * (rng.standard_normal((25, 4, 4)) + 1j * rng.standard_normal((25, 4, 4)))
    z = np.array([45.0, 55.0, 50.0, 60.0])
    back = abcd_to_s(s_to_scaled_abcd(s, z), z)
    np.testing.assert_allclose(back, s, atol=1e-13)


def test_plain_and_scaled_inputs_agree():
    # away from DC (where the series capacitor's plain matrix is infinite)
    f = np.linspace(1e6, 20e9, 41)
    blocks = single_channel()
    chain = cascade(blocks, f)
    plain = chain.abcd()
    np.testing.assert_allclose(abcd_to_s(plain, Z0), abcd_to_s(chain, Z0), atol=1e-12)
    with pytest.raises(ValueError, match="finite"):
        abcd_to_s(cascade(blocks, [0.0, 1e9]).abcd(), Z0)


def test_matmul_paths_equal_numpy_matmul():
    # the cascade's entry-by-entry product of frequency-last stacks (and its np.matmul
    # fallback above 8 x 8) against numpy's matmul
    rng = np.random.default_rng(3)
    for m in (2, 4, 6, 10):
        a = rng.standard_normal((7, m, m)) + 1j * rng.standard_normal((7, m, m))
        b = rng.standard_normal((7, m, m)) + 1j * rng.standard_normal((7, m, m))
        got = stack_matmul(np.moveaxis(a, 0, -1).copy(), np.moveaxis(b, 0, -1).copy())
        want = np.matmul(a, b)
        np.testing.assert_allclose(np.moveaxis(got, -1, 0), want, rtol=1e-14, atol=1e-13)


def test_many_blocks_stay_finite():
    # 400 lossy segments of 0.5 m (alpha l ~ thousands of Np in all): renormalisation
    # keeps everything finite; S11 tends to the single-line reflection
    f = np.array([0.0, 1e9, 50e9])
    sec = Stripline(
        width=5 * MIL,
        below=6 * MIL,
        above=6 * MIL,
        thickness=0.6 * MIL,
        dielectric=ConstantDielectric(3.7, 0.02),
    )
    seg = LineSegment(sec, 0.5)
    item = seg.scaled_abcd(f)
    chain = cascade([item] * 400, f)
    assert np.all(np.isfinite(chain.matrix)) and np.all(np.isfinite(chain.log_scale))
    s = abcd_to_s(chain, Z0)
    assert np.all(np.isfinite(s))
    zc = sec.rlgc(f).zc()[-1]
    assert s[-1, 0, 0] == pytest.approx((zc - Z0) / (zc + Z0), rel=1e-12)
    # length additivity across the long chain: the same as one 200 m segment (DC exact)
    one = abcd_to_s(cascade([LineSegment(sec, 200.0)], f), Z0)
    np.testing.assert_allclose(s[0], one[0], rtol=1e-12)
    np.testing.assert_allclose(
        chain.log_scale[1:], cascade([LineSegment(sec, 200.0)], f).log_scale[1:], rtol=1e-9
    )


def test_mixed_conductor_counts_are_an_error():
    f = np.linspace(0, 1e9, 3)
    blocks = [SeriesRL(1.0), SeriesRL(1.0, n=2, name="odd one")]
    with pytest.raises(LossLaneError, match="odd one"):
        cascade(blocks, f)
    with pytest.raises(LossLaneError, match="no segments"):
        cascade([], f)
    with pytest.raises(LossLaneError, match="frequency"):
        cascade([SeriesRL(1.0)], [-1.0, 1.0])


def test_to_network_keeps_frequencies_and_references():
    f = np.array([0.0, 1.5e9, 3.25e9])
    s = np.zeros((3, 2, 2), complex)
    net = to_network(s, f, [40.0, 60.0], "x")
    np.testing.assert_array_equal(net.f, f)
    np.testing.assert_array_equal(net.z0.real, [[40.0, 60.0]] * 3)
    assert net.name == "x"


def test_scaled_abcd_is_normalised_exactly():
    # the power-of-two normalisation must not change the represented matrix
    f = np.linspace(0, 10e9, 11)
    blk = single_channel()[4].scaled_abcd(f)
    peak = np.max(np.abs(blk.matrix), axis=(1, 2))
    assert np.all((peak >= 0.5) & (peak < 1.0))
    t = ScaledABCD.reciprocal(blk.abcd(), np.zeros(f.size)).abcd()
    np.testing.assert_allclose(t, blk.abcd(), rtol=1e-15)

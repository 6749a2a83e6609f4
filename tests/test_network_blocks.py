"""Vias and lumped blocks against closed forms and scikit-rf's independent media models."""

from __future__ import annotations

import numpy as np
import pytest

from losslane.errors import LossLaneError
from losslane.materials.dielectric import ConstantDielectric
from losslane.network import (
    SeriesCapacitor,
    SeriesImpedance,
    SeriesRL,
    ShuntCapacitor,
    Via,
    block_network,
)
from losslane.units import MIL
from losslane.xsection.rlgc import C0

Z0 = 50.0


def media(f, gamma=None, zc=Z0):
    import skrf
    from skrf.media import DefinedGammaZ0

    freq = skrf.Frequency.from_f(f, unit="Hz")
    if gamma is None:
        gamma = 1j * 2 * np.pi * f / C0
    return DefinedGammaZ0(freq, z0_port=Z0, gamma=gamma, z0=zc)


@pytest.mark.parametrize("dielectric", [3.7, ConstantDielectric(3.7, 0.01)])
def test_via_stub_notch_at_quarter_wave(dielectric):
    # common practice: an open via stub resonates at f = c / (4 L_stub sqrt(eps_eff));
    # the S21 minimum must lie within 3 % of it
    stub = 40 * MIL
    via = Via(barrel_length=55 * MIL, stub_length=stub, impedance=45.0, dielectric=dielectric)
    f_q = C0 / (4 * stub * np.sqrt(3.7))
    f = np.linspace(0.2 * f_q, 1.8 * f_q, 4001)
    s21 = np.abs(block_network(via, f, Z0).s[:, 1, 0])
    f_min = f[np.argmin(s21)]
    assert abs(f_min / f_q - 1) < 0.03
    assert via.notch_frequency() == pytest.approx(f_q, rel=1e-15)
    assert s21.min() < 0.05  # a deep notch, not a ripple
    assert s21[0] > 0.9


def test_via_matches_scikit_rf_line_and_shunt_open_stub():
    # scikit-rf media: barrel = line, stub = shunt(delay_open); same lossless TEM model
    # (f = 0 excluded: scikit-rf perturbs its DC point; ours is checked exactly below)
    f = np.linspace(0.1e9, 60e9, 600)
    eps = 3.4
    via = Via(55 * MIL, 18 * MIL, 42.0, eps)
    m = media(f, gamma=1j * 2 * np.pi * f * np.sqrt(eps) / C0, zc=42.0)
    ref = m.line(55 * MIL, unit="m") ** m.shunt(m.delay_open(18 * MIL, unit="m"))
    ours = block_network(via, f, Z0)
    np.testing.assert_allclose(ours.s, ref.s, rtol=1e-10, atol=1e-12)
    # DC: a lossless via is a short piece of wire, S = [[0, 1], [1, 0]] exactly
    np.testing.assert_array_equal(block_network(via, [0.0], Z0).s[0], [[0, 1], [1, 0]])


def test_lossy_via_is_passive_and_reciprocal():
    # IEEE 370-2020 passivity / reciprocity (via scikit-rf's checks)
    f = np.linspace(0, 80e9, 401)
    for n in (1, 2):
        via = Via(60 * MIL, 25 * MIL, 40.0, ConstantDielectric(3.9, 0.015), n=n)
        net = block_network(via, f, Z0)
        assert net.is_passive()
        assert net.is_reciprocal()
        assert np.all(np.isfinite(net.s))


def test_lumped_parts_match_scikit_rf_media():
    # scikit-rf's series capacitor / inductor / resistor / shunt capacitor networks
    f = np.linspace(1e6, 40e9, 201)
    m = media(f)
    cases = [
        (SeriesCapacitor(100e-9), m.capacitor(100e-9)),
        (
            SeriesCapacitor(10e-12, esl=0.4e-9, esr=0.01),
            m.resistor(0.01) ** m.inductor(0.4e-9) ** m.capacitor(10e-12),
        ),
        (SeriesRL(2.0, 0.8e-9), m.resistor(2.0) ** m.inductor(0.8e-9)),
        (ShuntCapacitor(0.3e-12), m.shunt_capacitor(0.3e-12)),
        (SeriesImpedance(lambda f: 5 + 1j * f * 1e-9), None),
    ]
    for block, ref in cases[:-1]:
        np.testing.assert_allclose(block_network(block, f, Z0).s, ref.s, rtol=1e-11, atol=1e-14)
    # a general series impedance Z: S21 = 2 Z0 / (2 Z0 + Z) (circuit theory)
    z = 5 + 1j * f * 1e-9
    s = block_network(cases[-1][0], f, Z0).s
    np.testing.assert_allclose(s[:, 1, 0], 2 * Z0 / (2 * Z0 + z), rtol=1e-13)


def test_series_capacitor_is_an_open_at_dc():
    # circuit theory: a series capacitor blocks DC, so S21(0) = 0 and S11(0) = 1 exactly
    f = np.array([0.0, 1e3, 1e9])
    for n in (1, 2):
        net = block_network(SeriesCapacitor(100e-9, esl=0.5e-9, esr=0.02, n=n), f, Z0)
        s = net.s
        assert np.all(np.isfinite(s))
        np.testing.assert_array_equal(s[0, n:, :n], 0.0)
        np.testing.assert_array_equal(s[0, :n, n:], 0.0)
        np.testing.assert_allclose(s[0, :n, :n], np.eye(n), atol=1e-15)
        np.testing.assert_allclose(s[0, n:, n:], np.eye(n), atol=1e-15)
        t = SeriesCapacitor(100e-9, esl=0.5e-9, esr=0.02, n=n).abcd(f)
        assert t[0, 0, n] == complex(0.02, -np.inf) and t[0, 0, 0] == 1 and t[0, n, 0] == 0
        # at 1 kHz 100 nF is 1.6 kohm: S21 = 2 Z0 / (2 Z0 + Z)
        z = 0.02 + 1j * 2 * np.pi * 1e3 * 0.5e-9 + 1 / (1j * 2 * np.pi * 1e3 * 100e-9)
        assert s[1, n, 0] == pytest.approx(2 * Z0 / (2 * Z0 + z), rel=1e-12)


def test_two_dc_blocks_in_series_stay_an_open():
    # circuit theory: two series capacitors are still an open at DC; the limit matrices
    # of the two must not cancel each other (S21 = 0 exactly, S11 = S22 = 1, finite)
    from losslane.network import Via, build_network

    f = np.array([0.0, 1e6, 1e9])
    for n in (1, 2):
        blocks = [
            SeriesCapacitor(100e-9, n=n),
            SeriesCapacitor(220e-9, esl=0.3e-9, n=n),
            Via(1e-3, 0.5e-3, 45.0, 3.7, n=n),
            SeriesCapacitor(10e-9, n=n),
        ]
        s = build_network(blocks, f, Z0).s
        assert np.all(np.isfinite(s))
        np.testing.assert_array_equal(s[0, n:, :n], 0.0)
        np.testing.assert_array_equal(s[0, :n, n:], 0.0)
        np.testing.assert_allclose(s[0, :n, :n], np.eye(n), atol=1e-15)
        np.testing.assert_allclose(s[0, n:, n:], np.eye(n), atol=1e-15)
        # away from DC: scikit-rf's cascade of the same blocks (independent connection)
        import skrf

        ref = skrf.network.cascade_list([block_network(b, f[1:], Z0) for b in blocks])
        assert np.max(np.abs(s[1:] - ref.s)) < 1e-12


def test_lumped_pair_is_one_part_per_leg():
    # n = 2: the same 2-port in each leg, legs uncoupled
    f = np.linspace(0, 20e9, 51)
    s1 = block_network(SeriesRL(1.0, 0.5e-9), f, Z0).s
    s2 = block_network(SeriesRL(1.0, 0.5e-9, n=2), f, Z0).s
    np.testing.assert_allclose(s2[:, 0::2, 0::2][:, [0, 1]][:, :, [0, 1]], s1, atol=1e-15)
    np.testing.assert_allclose(s2[:, [0, 2]][:, :, [0, 2]], s1, atol=1e-15)
    np.testing.assert_array_equal(s2[:, 0, 1], 0)
    np.testing.assert_array_equal(s2[:, 0, 3], 0)


def test_bad_block_inputs_name_the_key():
    with pytest.raises(LossLaneError, match="value"):
        SeriesCapacitor(0.0)
    with pytest.raises(LossLaneError, match="esr"):
        SeriesCapacitor(1e-9, esr=-1)
    with pytest.raises(LossLaneError, match="stub"):
        Via(1e-3, -1e-3, 45.0, 3.7)
    with pytest.raises(LossLaneError, match="impedance"):
        Via(1e-3, 1e-3, 0.0, 3.7)
    with pytest.raises(LossLaneError, match="eps_eff"):
        Via(1e-3, 1e-3, 45.0, 0.5)
    with pytest.raises(LossLaneError, match="n = 0"):
        ShuntCapacitor(1e-12, n=0)

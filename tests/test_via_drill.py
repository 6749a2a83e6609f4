"""Vias from their drill geometry on a stackup (losslane.via_geometry, network.via
DrilledVia).

Outside references:
* the stackup's own arithmetic (barrel and stubs between copper-layer centres and the
  hole's ends, the convention the README states), summed by hand here;
* the coaxial line Z = 60/sqrt(eps_r) ln(D/d) (S. Ramo, J. R. Whinnery, T. Van Duzer,
  *Fields and Waves in Communication Electronics*; 60 = eta0 / 2 pi rounded);
* the quarter-wave notch of an open stub at f = c / (4 L_stub sqrt(Dk)), within 3 %
  (common practice), checked without pads;
* mixed-mode S-parameters (D. E. Bockelman, W. R. Eisenstadt, IEEE Trans. MTT 43(7),
  1995): two identical uncoupled legs carry the differential mode exactly as one leg
  carries a single-ended wave, Sdd21 (2 Z_ref) = S21 (Z_ref).
"""

from __future__ import annotations

import numpy as np
import pytest

from losslane.channel import build_channel
from losslane.errors import LossLaneError
from losslane.network.mixedmode import mixed_mode_internal
from losslane.network.via import DrilledVia
from losslane.scenario import parse_scenario
from losslane.xsection.rlgc import C0, ETA0
from losslane.xsection.round import circle, maxwell_capacitance, mode_impedance

MIL = 25.4e-6

HEAD = """
name = "vias"
[sweep]
start = "0 Hz"
stop = "40 GHz"
step = "10 MHz"
[dielectrics.flat]
dk = 3.6
df = 0
model = "constant"
"""

# an invented 10-layer board in one lossless laminate of constant Dk 3.6
BOARD = """
[stackup]
layers = [
  { name = "L1", conductor = "signal", thickness = "1.6 mil" },
  { name = "pp1", dielectric = "flat", thickness = "3.5 mil" },
  { name = "L2", conductor = "plane", thickness = "1.2 mil" },
  { name = "core1", dielectric = "flat", thickness = "5 mil" },
  { name = "L3", conductor = "signal", thickness = "0.6 mil" },
  { name = "pp2", dielectric = "flat", thickness = "6 mil" },
  { name = "L4", conductor = "plane", thickness = "1.2 mil" },
  { name = "core2", dielectric = "flat", thickness = "5 mil" },
  { name = "L5", conductor = "signal", thickness = "0.6 mil" },
  { name = "pp3", dielectric = "flat", thickness = "8 mil" },
  { name = "L6", conductor = "signal", thickness = "0.6 mil" },
  { name = "core3", dielectric = "flat", thickness = "5 mil" },
  { name = "L7", conductor = "plane", thickness = "1.2 mil" },
  { name = "pp4", dielectric = "flat", thickness = "5 mil" },
  { name = "L8", conductor = "signal", thickness = "0.6 mil" },
  { name = "core4", dielectric = "flat", thickness = "5 mil" },
  { name = "L9", conductor = "plane", thickness = "1.2 mil" },
  { name = "pp5", dielectric = "flat", thickness = "3.5 mil" },
  { name = "L10", conductor = "signal", thickness = "1.6 mil" },
]
"""

LINES = """
[lines.se]
kind = "stripline"
layer = "L3"
width = "4.5 mil"
[lines.pair]
kind = "stripline-pair"
layer = "L3"
width = "4 mil"
spacing = "8 mil"
"""


def _scenario(via: str, pair: bool = False, board: str = BOARD):
    line = "pair" if pair else "se"
    chan = f'[[channel]]\nline = "{line}"\nlength = "1 in"\n[[channel]]\nvia = {via}\n'
    lines = LINES if pair else LINES.split("[lines.pair]")[0]
    return parse_scenario(HEAD + board + lines + chan)


def _drill(via: str, pair: bool = False):
    return _scenario(via, pair).channel[1].drill


# --------------------------------------------------------------- lengths and stubs


def test_backdrill_leaves_the_stub_the_stackup_arithmetic_says():
    g = _drill('{ from = "L1", to = "L3", drill = "8 mil", antipad = "26 mil", backdrill = "L5" }')
    # barrel: centre of L1 to centre of L3
    assert g.barrel_length == pytest.approx((0.8 + 3.5 + 1.2 + 5 + 0.3) * MIL, rel=1e-12, abs=0)
    # the drill removes L5 and everything below it: the stub ends at L5's top face
    assert g.stub_below_length == pytest.approx((0.3 + 6 + 1.2 + 5) * MIL, rel=1e-12, abs=0)
    assert g.stub_above_length == 0.0  # entering at the top copper
    assert g.backdrill == "L5"


def test_through_via_from_an_inner_layer_has_a_stub_above_unless_blind():
    through = _drill('{ from = "L3", to = "L8", drill = "8 mil", antipad = "26 mil" }')
    assert through.stub_above_length == pytest.approx(
        (0.3 + 5 + 1.2 + 3.5 + 1.6) * MIL, rel=1e-12, abs=0
    )
    assert through.barrel_length == pytest.approx(
        (0.3 + 6 + 1.2 + 5 + 0.6 + 8 + 0.6 + 5 + 1.2 + 5 + 0.3) * MIL, abs=0
    )
    # no back-drill: the stub runs to the bottom face
    assert through.stub_below_length == pytest.approx(
        (0.3 + 5 + 1.2 + 3.5 + 1.6) * MIL, rel=1e-12, abs=0
    )
    blind = _drill('{ from = "L3", to = "L8", drill = "8 mil", antipad = "26 mil", blind = true }')
    assert blind.stub_above_length == 0.0 and blind.stub_above == ()
    given = _drill(
        '{ from = "L3", to = "L8", drill = "8 mil", antipad = "26 mil", stub = "4 mil" }'
    )
    assert given.stub_below_length == pytest.approx(4 * MIL, rel=1e-12, abs=0)
    full = _drill('{ from = "L1", to = "L10", drill = "8 mil", antipad = "26 mil" }')
    assert full.stub_above == () and full.stub_below == ()


# ------------------------------------------------------------------------ impedances


def test_single_barrel_is_the_coaxial_line():
    sc = _scenario('{ from = "L1", to = "L3", drill = "8 mil", antipad = "26 mil" }')
    via = build_channel(sc).blocks[1]
    z = via.impedances()["single"]
    # Ramo-Whinnery, with the textbook's rounded 60 ohm: within its 0.07 %
    assert z == pytest.approx(60 / np.sqrt(3.6) * np.log(26 / 8), rel=8e-4, abs=0)
    assert z == pytest.approx(ETA0 / (2 * np.pi * np.sqrt(3.6)) * np.log(26 / 8), rel=1e-13, abs=0)
    # and a 2-D field solution (boundary elements) of the barrel in its antipad
    c = maxwell_capacitance(
        [circle(0, 0, 4 * MIL, 160), circle(0, 0, 13 * MIL, 320)], [False, True]
    )[0, 0]
    assert mode_impedance(c, 3.6) == pytest.approx(z, rel=5e-3, abs=0)


def test_stub_notch_at_the_quarter_wave_frequency_without_pads():
    sc = _scenario('{ from = "L1", to = "L3", drill = "8 mil", antipad = "26 mil" }')
    res = build_channel(sc)
    via = res.blocks[1]
    g = via.geometry
    stub = g.stub_below_length
    expected = C0 / (4 * stub * np.sqrt(3.6))  # common practice
    f = res.f
    s21 = np.abs(via.s(f)[:, 1, 0])
    band = (f > 0.5 * expected) & (f < 1.5 * expected)
    notch = f[band][np.argmin(s21[band])]
    assert notch == pytest.approx(expected, rel=0.03, abs=0)
    assert via.stub_notch() == pytest.approx(expected, rel=1e-12, abs=0)
    assert s21[band].min() < 1e-2
    # the whole channel shows it too
    il = res.insertion_loss_db
    assert f[band][np.argmax(il[band])] == pytest.approx(expected, rel=0.03, abs=0)


def test_pads_add_capacitance_at_both_ends():
    bare = _scenario('{ from = "L1", to = "L3", drill = "8 mil", antipad = "26 mil" }')
    padded = _scenario(
        '{ from = "L1", to = "L3", drill = "8 mil", antipad = "26 mil", pad = "18 mil" }'
    )
    vb, vp = build_channel(bare).blocks[1], build_channel(padded).blocks[1]
    c_in, c_out = vp.pad_capacitance
    # tens of femtofarads for an 18 mil pad (typical of such pads; common practice)
    assert 10e-15 < c_in < 100e-15 and 10e-15 < c_out < 100e-15
    f = np.array([2e9, 5e9])
    assert np.all(np.abs(vp.s(f)[:, 0, 0]) > np.abs(vb.s(f)[:, 0, 0]))


def test_a_pair_in_round_antipads_is_two_uncoupled_barrels():
    pair = _scenario(
        '{ from = "L1", to = "L3", drill = "8 mil", antipad = "26 mil", pitch = "30 mil", '
        'antipad_shape = "round" }',
        pair=True,
    )
    single = _scenario('{ from = "L1", to = "L3", drill = "8 mil", antipad = "26 mil" }')
    vp, vs = build_channel(pair).blocks[1], build_channel(single).blocks[1]
    f = np.linspace(0, 40e9, 81)
    mm = mixed_mode_internal(vp.s(f, 50.0), 50.0)
    np.testing.assert_allclose(mm.dd[:, 1, 0], vs.s(f, 50.0)[:, 1, 0], rtol=0, atol=1e-12)
    np.testing.assert_allclose(np.abs(mm.cd), 0.0, atol=1e-12)  # symmetric: no conversion


def test_an_oblong_pair_is_passive_and_reciprocal():
    sc = _scenario(
        '{ from = "L3", to = "L8", drill = "8 mil", antipad = "26 mil", pitch = "32 mil", '
        'pad = "18 mil" }',
        pair=True,
    )
    via = build_channel(sc).blocks[1]
    assert isinstance(via, DrilledVia)
    z = via.impedances()
    assert z["odd"] < z["even"]
    f = np.linspace(0, 40e9, 201)
    s = via.s(f)
    np.testing.assert_allclose(s, np.swapaxes(s, 1, 2), atol=1e-12)
    assert np.max(np.linalg.svd(s, compute_uv=False)) <= 1 + 1e-12
    # the chain matrix and the S form agree
    from losslane.network.scaled import abcd_to_s

    np.testing.assert_allclose(abcd_to_s(via.scaled_abcd(f), 50.0), s, atol=1e-10)


def test_an_upward_via_is_the_same_via_turned_around():
    body = '{ from = "L1", to = "L3", drill = "8 mil", antipad = "26 mil", pad = "18 mil"'
    down = build_channel(_scenario(body + " }")).blocks[1]
    up = build_channel(_scenario(body + ", upward = true }")).blocks[1]
    f = np.linspace(0, 40e9, 81)
    # reciprocity: turning a 2-port around swaps its ports (Pozar)
    np.testing.assert_allclose(up.s(f), down.s(f)[:, ::-1, ::-1], rtol=0, atol=1e-13)


# ---------------------------------------------------------------------- bad vias

BAD = {
    "backdrill on the exit layer": (
        '{ from = "L1", to = "L5", drill = "8 mil", antipad = "26 mil", backdrill = "L5" }',
        ["backdrill = 'L5'", "is the exit layer"],
    ),
    "stub and backdrill": (
        '{ from = "L1", to = "L5", drill = "8 mil", antipad = "26 mil", backdrill = "L8", '
        'stub = "2 mil" }',
        ["not both"],
    ),
    "stub longer than the board": (
        '{ from = "L1", to = "L8", drill = "8 mil", antipad = "26 mil", stub = "50 mil" }',
        ["stub = '50 mil'", "at most"],
    ),
    "via on a plane": (
        '{ from = "L2", to = "L8", drill = "8 mil", antipad = "26 mil" }',
        ["from = 'L2'", "plane"],
    ),
    "antipad inside the drill": (
        '{ from = "L1", to = "L8", drill = "8 mil", antipad = "6 mil" }',
        ["antipad = '6 mil'", "wider than the drill"],
    ),
    "explicit and drill keys mixed": (
        '{ from = "L1", to = "L8", drill = "8 mil", antipad = "26 mil", impedance = "40 ohm" }',
        ["unknown key 'impedance'"],
    ),
    "pitch on a single-ended channel": (
        '{ from = "L1", to = "L8", drill = "8 mil", antipad = "26 mil", pitch = "30 mil" }',
        ["pitch is for the via pairs"],
    ),
}


@pytest.mark.parametrize("case", list(BAD))
def test_bad_vias(case):
    via, words = BAD[case]
    with pytest.raises(LossLaneError) as exc:
        _scenario(via)
    for w in words:
        assert w in str(exc.value), str(exc.value)


def test_a_pair_channel_needs_pitch():
    with pytest.raises(LossLaneError, match="needs pitch"):
        _scenario('{ from = "L1", to = "L3", drill = "8 mil", antipad = "26 mil" }', pair=True)

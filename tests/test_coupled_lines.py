"""Both pair models: mode relations, 2x2 matrices, validity warnings, errors, CLI."""

from __future__ import annotations

import json
import warnings

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from reported import properties

from losslane.cli import main
from losslane.errors import LossLaneError, LossLaneWarning
from losslane.materials.conductor import COPPER
from losslane.materials.dielectric import ConstantDielectric, WidebandDebye
from losslane.xsection.base import Metal
from losslane.xsection.microstrip import Microstrip
from losslane.xsection.microstrip_pair import MicrostripPair
from losslane.xsection.stripline import Stripline
from losslane.xsection.stripline_pair import StriplinePair

MIL = 25.4e-6
D = WidebandDebye(dk=3.6, df=0.006, at=10e9)


def micro(s_mil=7.0, w=5.0, h=4.0, t=1.4, metal=None):
    return MicrostripPair(w * MIL, s_mil * MIL, h * MIL, t * MIL, D, metal or Metal())


def strip(s_mil=6.0, w=4.0, lo=5.0, hi=5.0, t=0.6, metal=None):
    return StriplinePair(w * MIL, s_mil * MIL, lo * MIL, hi * MIL, t * MIL, D, metal or Metal())


PAIRS = [micro(), strip(), strip(w=5.0, lo=4.0, hi=8.0)]
F = np.array([0.0, 1e6, 1e9, 10e9, 40e9])


@pytest.mark.parametrize("p", PAIRS, ids=lambda p: p.kind)
def test_diff_and_common_impedance(p):
    # definitions (common practice): Z_diff = 2 Z_odd, Z_common = Z_even / 2
    props = properties(p, np.array([1e9, 10e9]))
    np.testing.assert_allclose(props["z_diff_ohm"], 2 * np.array(props["z_odd_ohm"]))
    np.testing.assert_allclose(props["z_common_ohm"], np.array(props["z_even_ohm"]) / 2)
    # the loss keys are the odd (differential) mode's
    odd = p.modes(np.array([1e9, 10e9]))["odd"]
    np.testing.assert_allclose(props["z0_ohm"], np.sqrt(odd.l / odd.c))
    np.testing.assert_allclose(props["eps_eff_odd"], props["eps_eff"])


@pytest.mark.filterwarnings("ignore::losslane.errors.LossLaneWarning")
@pytest.mark.parametrize("p", PAIRS, ids=lambda p: p.kind)
def test_matrices_are_physical(p):
    # a passive reciprocal pair (common practice): symmetric R, L, G, C; L and C positive
    # definite; Maxwell capacitance matrix with negative mutual term; positive mutual L
    rl = p.rlgc(F)
    for a in (rl.r, rl.l, rl.g, rl.c):
        np.testing.assert_allclose(a, np.swapaxes(a, 1, 2))
    assert np.all(np.linalg.eigvalsh(rl.l) > 0)
    assert np.all(np.linalg.eigvalsh(rl.c) > 0)
    assert np.all(rl.c[:, 0, 1] < 0)
    assert np.all(rl.l[:, 0, 1] > 0)
    assert np.all(np.linalg.eigvalsh(rl.r) > 0)
    assert np.all(np.linalg.eigvalsh(rl.g[1:]) >= 0)
    np.testing.assert_allclose(rl.g[0], 0.0, atol=1e-15)


@pytest.mark.parametrize(
    "p, single",
    [
        (
            micro(metal=Metal(plane_thickness=1.0)),
            Microstrip(5 * MIL, 4 * MIL, 1.4 * MIL, D, Metal(plane_thickness=1.0)),
        ),
        (
            strip(metal=Metal(plane_thickness=1.0)),
            Stripline(4 * MIL, 5 * MIL, 5 * MIL, 0.6 * MIL, D, Metal(plane_thickness=1.0)),
        ),
    ],
    ids=["microstrip", "stripline"],
)
def test_dc_resistance_per_line_is_the_strip_resistance(p, single):
    # exact at DC: each strip carries its current uniformly, R = 1/(sigma w t), in both
    # modes; planes made very thick (1 m) so their convention-dependent DC share vanishes
    w, t = p.width, p.thickness
    r_strip = 1.0 / (COPPER.sigma * w * t)
    modes = p.modes(np.array([0.0]))
    for m in modes.values():
        assert m.r[0] == pytest.approx(r_strip, rel=1e-4)
    r11 = p.rlgc(np.array([0.0])).r[0, 0, 0]
    assert r11 == pytest.approx(single.rlgc(np.array([0.0])).r[0, 0, 0], rel=1e-4)


@pytest.mark.filterwarnings("ignore::losslane.errors.LossLaneWarning")
@pytest.mark.parametrize("p", PAIRS, ids=lambda p: p.kind)
def test_dc_and_terahertz_are_finite(p):
    # every model answers at DC and at extreme frequencies (project rule)
    f = np.array([0.0, 1e12])
    props = properties(p, f)
    for key in (
        "z0_ohm",
        "eps_eff",
        "delay_ps_per_in",
        "loss_db_per_in",
        "z_odd_ohm",
        "z_even_ohm",
        "eps_eff_odd",
        "eps_eff_even",
    ):
        assert np.all(np.isfinite(props[key])), key
    rl = p.rlgc(f)
    for a in (rl.r, rl.l, rl.g, rl.c):
        assert np.all(np.isfinite(a))


@pytest.mark.filterwarnings("ignore::losslane.errors.LossLaneWarning")
def test_skin_loss_trends_with_coupling():
    # common practice: with a very tight gap the odd-mode current crowds onto the facing
    # edges, so its conductor loss rises above the lone strip's; once the gap is about the
    # height or more, the even mode, whose return currents share one plane region, loses
    # more than the odd mode
    f = np.array([10e9])
    lone = Microstrip(5 * MIL, 4 * MIL, 1.4 * MIL, D).modes(f)["single"].r[0]
    assert micro(1.0).modes(f)["odd"].r[0] > 1.1 * lone
    for s_mil in (4.0, 7.0, 20.0):
        m = micro(s_mil).modes(f)
        assert m["even"].r[0] > m["odd"].r[0]


@settings(max_examples=30, deadline=None)
@given(
    u=st.floats(0.2, 6.0),
    g=st.floats(0.15, 4.0),
    grow=st.floats(1.3, 2.5),
    t_h=st.one_of(st.just(0.0), st.floats(0.005, 0.3)),
    er=st.floats(2.0, 12.0),
)
def test_microstrip_pair_mode_ordering(u, g, grow, t_h, er):
    # physics of coupling (common practice): Z_odd < Z_single < Z_even, and a tighter gap
    # spreads the two further apart
    d = ConstantDielectric(dk=er)
    h = 4 * MIL
    f = np.array([1e9])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        z1 = Microstrip(u * h, h, t_h * h, d).modes(f)["single"].z0[0]
        near = MicrostripPair(u * h, g * h, h, t_h * h, d).modes(f)
        far = MicrostripPair(u * h, g * grow * h, h, t_h * h, d).modes(f)
    assert near["odd"].z0[0] < far["odd"].z0[0] < z1 < far["even"].z0[0] < near["even"].z0[0]


@settings(max_examples=30, deadline=None)
@given(
    w_b=st.floats(0.1, 2.0),
    s_b=st.floats(0.05, 2.0),
    grow=st.floats(1.3, 2.5),
    t_w=st.one_of(st.just(0.0), st.floats(0.005, 0.2)),
    offset=st.floats(0.5, 2.0),
)
def test_stripline_pair_mode_ordering(w_b, s_b, grow, t_w, offset):
    # as above, centred and offset (common practice)
    b = 12 * MIL
    w, t = w_b * b, min(t_w * w_b * b, 0.1 * b)
    lo = (b - t) / (1 + offset)
    hi = b - t - lo
    d = ConstantDielectric(dk=3.5)
    f = np.array([1e9])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        z1 = Stripline(w, lo, hi, t, d).modes(f)["single"].z0[0]
        near = StriplinePair(w, s_b * b, lo, hi, t, d).modes(f)
        far = StriplinePair(w, s_b * grow * b, lo, hi, t, d).modes(f)
    assert near["odd"].z0[0] < far["odd"].z0[0] < z1 < far["even"].z0[0] < near["even"].z0[0]


@pytest.mark.parametrize(
    "p, key",
    [
        (micro(s_mil=0.2), "spacing/height"),
        (micro(w=50.0), "width/height"),
        (micro(t=3.0), "thickness/height"),
        (strip(t=4.0, w=10.0), "thickness/plane spacing"),
        (strip(lo=0.3, hi=10.0, w=4.0, t=0.6), "nearer plane/"),
    ],
)
def test_validity_warnings(p, key):
    # every model warns outside its stated range (project rule), naming the parameter
    with pytest.warns(LossLaneWarning, match=key.replace("(", r"\(").replace(")", r"\)")):
        p.modes(np.array([1e9]))


def test_microstrip_pair_dispersion_range_warning():
    with pytest.warns(LossLaneWarning, match="frequency x height"):
        micro(h=10.0).modes(np.array([100e9]))


@pytest.mark.parametrize(
    "make",
    [
        lambda: micro(s_mil=0.0),
        lambda: micro(s_mil=-1.0),
        lambda: micro(w=0.0),
        lambda: micro(h=float("nan")),
        lambda: micro(t=-1.0),
        lambda: strip(lo=0.0),
        lambda: strip(s_mil=0.0),
    ],
)
def test_impossible_geometry_is_an_error(make):
    with pytest.raises(LossLaneError, match="must be"):
        make()


MS_ARGS = [
    "line",
    "microstrip-pair",
    "--width",
    "5mil",
    "--spacing",
    "7mil",
    "--height",
    "4mil",
    "--thickness",
    "1.4mil",
    "--dk",
    "3.6",
    "--df",
    "0.006",
    "--dk-at",
    "10GHz",
]


def test_cli_json_has_the_pair_keys(capsys):
    assert main([*MS_ARGS, "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["kind"] == "microstrip-pair"
    for key in (
        "z_odd_ohm",
        "z_even_ohm",
        "z_diff_ohm",
        "z_common_ohm",
        "eps_eff_odd",
        "eps_eff_even",
        "loss_db_per_in",
    ):
        assert len(out[key]) == 3, key
    assert np.array(out["rlgc"]["l_h_per_m"]).shape == (3, 2, 2)
    np.testing.assert_allclose(out["z_diff_ohm"], 2 * np.array(out["z_odd_ohm"]))
    # a 5/7/5-mil-class edge-coupled pair on 4 mil of Dk 3.6 is a ~100-120 ohm pair
    # (common practice); the quasi-static model puts it inside that band
    assert 95 < out["z_diff_ohm"][0] < 125


def test_cli_table_shows_z_diff(capsys):
    assert main(MS_ARGS) == 0
    out = capsys.readouterr().out
    assert "Z_diff" in out and "Z_common" in out and "microstrip-pair" in out


def test_cli_stripline_pair(capsys):
    args = ["line", "stripline-pair", "--width", "4mil", "--spacing", "6mil", "--below"]
    args += ["5mil", "--above", "6mil", "--thickness", "0.6mil", "--dk", "3.6", "--df", "0.006"]
    assert main([*args, "--dk-at", "10GHz", "--at", "0,5GHz", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["kind"] == "stripline-pair"
    assert out["z_diff_ohm"][1] == pytest.approx(2 * out["z_odd_ohm"][1])


def test_cli_missing_spacing_is_exit_2(capsys):
    args = [a for a in MS_ARGS if a not in ("--spacing", "7mil")]
    assert main(args) == 2
    err = capsys.readouterr().err
    assert "spacing" in err and "Traceback" not in err

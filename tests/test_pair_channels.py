"""Differential (4-port) channels end to end: mode conversion, mixed-mode values against
scikit-rf's own conversion, passivity/reciprocity, and the single-ended/pair mix error."""

from __future__ import annotations

import numpy as np
import pytest
import skrf

from losslane.channel import build_channel
from losslane.cli import main
from losslane.network.mixedmode import mixed_mode
from losslane.network.touchstone import write_touchstone
from losslane.scenario import parse_scenario

PAIR_LINES = """
[sweep]
start = "0 Hz"
stop = "20 GHz"
step = "50 MHz"

[ports]
reference = "50 ohm"
order = "{order}"

[lines.pair]
kind = "stripline-pair"
width = "5 mil"
spacing = "7 mil"
below = "6 mil"
above = "6 mil"
thickness = "0.6 mil"
dielectric = "low-loss"
foil = "very-low-profile"

[lines.top]
kind = "microstrip-pair"
width = "5.4 mil"
spacing = "7 mil"
height = "3.5 mil"
thickness = "1.6 mil"
dielectric = "low-loss"
"""

SYMMETRIC = (
    PAIR_LINES
    + """
[[channel]]
line = "top"
length = "0.5 in"
[[channel]]
via = { barrel = "50 mil", stub = "10 mil", impedance = "46 ohm", dielectric = "low-loss" }
[[channel]]
capacitor = { value = "100 nF", esl = "0.3 nH" }
[[channel]]
line = "pair"
length = "6 in"
"""
)


def symmetric(order: str) -> str:
    return SYMMETRIC.replace("{order}", order)


@pytest.fixture(params=["in-in-out-out", "in-out-in-out"])
def order(request) -> str:
    return request.param


def test_symmetric_pair_channel_has_no_mode_conversion(order: str) -> None:
    # A symmetric pair has no differential-to-common conversion: |Scd21| should be at
    # rounding level; the issue asks for below -60 dB (Bockelman & Eisenstadt 1995).
    res = build_channel(parse_scenario(symmetric(order)))
    mm = mixed_mode(res.network.s, 50.0, order)
    with np.errstate(divide="ignore"):
        scd21 = 20 * np.log10(np.abs(mm.cd[:, 1, 0]) + 1e-300)
    assert scd21.max() < -60
    assert res.nports == 4


def test_mixed_mode_agrees_with_scikit_rf(order: str) -> None:
    # Independent implementation: scikit-rf's se2gmm converts single-ended to mixed mode
    # with pairs (1, 2) -> differential port 1 and (3, 4) -> port 2, i.e. the in-in-out-out
    # numbering; for in-out-in-out we renumber before handing it over.
    res = build_channel(parse_scenario(symmetric(order)))
    net = res.network.copy()
    if order == "in-out-in-out":
        net.renumber([0, 1, 2, 3], [0, 2, 1, 3])
    net.se2gmm(p=2)
    mm = mixed_mode(res.network.s, 50.0, order)
    np.testing.assert_allclose(net.s[:, :2, :2], mm.dd, atol=1e-12)
    np.testing.assert_allclose(net.s[:, 2:, 2:], mm.cc, atol=1e-12)
    np.testing.assert_allclose(net.s[:, 2:, :2], mm.cd, atol=1e-12)
    np.testing.assert_allclose(net.s[:, :2, 2:], mm.dc, atol=1e-12)
    # the references: differential 2 x 50, common 50 / 2 (scikit-rf's defaults)
    np.testing.assert_allclose(net.z0[0].real, [100, 100, 25, 25])


def test_four_port_channel_is_passive_and_reciprocal(order: str) -> None:
    # IEEE 370-2020 definitions, as implemented by scikit-rf
    res = build_channel(parse_scenario(symmetric(order)))
    assert np.all(res.network.is_passive())
    assert res.network.is_reciprocal(tol=1e-9)


def test_asymmetric_file_shows_its_mode_conversion(tmp_path) -> None:
    # An imported 4-port with one leg's shunt capacitance larger converts differential to
    # common mode; the channel must carry that conversion through (it cannot come from the
    # symmetric lines). Reference: the file's own mixed-mode Scd21 at low loss.
    from losslane.network.cascade import build_network
    from losslane.network.line import LineSegment
    from losslane.network.lumped import ShuntCapacitor
    from losslane.xsection.rlgc import RLGC

    f = np.linspace(0, 20e9, 401)
    n = f.size
    c = np.broadcast_to(np.array([[1.0, -0.1], [-0.1, 1.15]]) * 90e-12, (n, 2, 2)).copy()
    l = np.broadcast_to(np.array([[1.0, 0.1], [0.1, 1.0]]) * 250e-9, (n, 2, 2)).copy()
    zero = np.zeros((n, 2, 2))
    part = build_network(
        [ShuntCapacitor(0.1e-12, n=2), LineSegment(RLGC(f, zero, l, zero, c), 5e-3)],
        f,
        50.0,
        order="in-in-out-out",
    )
    path = tmp_path / "skewed.s4p"
    write_touchstone(part, path, order="in-in-out-out")
    scenario = symmetric("in-in-out-out")
    scenario += '\n[[channel]]\ntouchstone = "skewed.s4p"\n'
    res = build_channel(parse_scenario(scenario, base=tmp_path))
    file_scd = np.abs(mixed_mode(part.s, 50.0).cd[:, 1, 0])
    chan_scd = np.abs(mixed_mode(res.network.s, 50.0).cd[:, 1, 0])
    k = np.searchsorted(f, 10e9)
    assert 20 * np.log10(chan_scd[k]) > -40  # clearly visible conversion
    # same order of magnitude as the file's own conversion, reduced by the line loss
    assert 0.05 < chan_scd[k] / file_scd[k] < 1.5


def test_pair_and_single_line_in_one_channel_is_refused(tmp_path, capsys) -> None:
    text = (
        PAIR_LINES.replace("{order}", "in-in-out-out")
        + """
[lines.se]
kind = "stripline"
width = "5 mil"
below = "6 mil"
above = "6 mil"
thickness = "0.6 mil"
dielectric = "low-loss"

[[channel]]
line = "pair"
length = "1 in"
[[channel]]
line = "se"
length = "1 in"
name = "odd one"
"""
    )
    p = tmp_path / "mixed.toml"
    p.write_text(text)
    out = tmp_path / "out"
    rc = main(["build", str(p), "--out", str(out)])
    cap = capsys.readouterr()
    assert rc == 2
    assert "odd one" in cap.err and "single-ended" in cap.err
    assert "Traceback" not in cap.err
    assert not out.exists()


def test_differential_demo_writes_s4p_and_mixed_mode_plot(tmp_path, capsys) -> None:
    rc = main(["demo", "--out", str(tmp_path / "demo")])
    assert rc == 0, capsys.readouterr().err
    names = sorted(p.name for p in (tmp_path / "demo").iterdir())
    assert "sensor-lane.s4p" in names
    assert "sensor-lane-mixed-mode.png" in names
    net = skrf.Network(str(tmp_path / "demo" / "sensor-lane.s4p"))
    assert net.nports == 4 and net.f[0] == 0.0


def test_field_solver_coated_trapezoidal_pair_builds_an_s4p(tmp_path, capsys) -> None:
    # The end-to-end case: a coated, etched (trapezoidal) differential pair from the
    # 2-D field solver, in a scenario, cascaded and written as a 4-port Touchstone file.
    text = """
name = "coated pair"
[sweep]
start = "0 Hz"
stop = "20 GHz"
step = "100 MHz"
[lines.top]
kind = "microstrip-pair"
solver = "field"
accuracy = "coarse"
width = "5 mil"
top_width = "4 mil"
spacing = "7 mil"
height = "4 mil"
thickness = "1.4 mil"
dielectric = "low-loss"
coating_thickness = "0.8 mil"
coating_dielectric = "solder-mask"
[[channel]]
line = "top"
length = "2 in"
[[channel]]
via = { barrel = "50 mil", stub = "10 mil", impedance = "46 ohm", dielectric = "low-loss" }
[[channel]]
line = "top"
length = "1 in"
"""
    p = tmp_path / "coated.toml"
    p.write_text(text)
    rc = main(["build", str(p), "--out", str(tmp_path / "out"), "--no-plots"])
    assert rc == 0, capsys.readouterr().err
    net = skrf.Network(str(tmp_path / "out" / "coated-pair.s4p"))
    assert net.nports == 4
    assert np.all(net.is_passive()) and net.is_reciprocal(tol=1e-9)
    # symmetric pair: no mode conversion (Bockelman & Eisenstadt 1995)
    assert np.abs(mixed_mode(net.s, 50.0).cd[:, 1, 0]).max() < 1e-3

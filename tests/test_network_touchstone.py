"""Touchstone writing/reading and imported Touchstone blocks."""

from __future__ import annotations

import os

import numpy as np
import pytest
from network_channels import pair_channel, pair_rlgc, single_channel

from losslane import LossLaneError, LossLaneWarning, __version__
from losslane.network import (
    LineSegment,
    TouchstoneBlock,
    block_network,
    build_network,
    read_touchstone,
    to_network,
    write_touchstone,
)
from losslane.network.touchstone import DB_FLOOR
from losslane.xsection import RLGC

Z0 = 50.0


@pytest.fixture(scope="module")
def nets():
    f = np.linspace(0, 40e9, 81)
    return {
        2: build_network(single_channel(), f, Z0, "lane"),
        4: build_network(pair_channel(f), f, Z0, "pair", order="in-out-in-out"),
    }


@pytest.mark.parametrize("version", [1, 2])
@pytest.mark.parametrize("form", ["ri", "ma", "db"])
@pytest.mark.parametrize("nports", [2, 4])
def test_round_trip(tmp_path, nets, version, form, nports):
    # Touchstone 1.x/2.x (IBIS Open Forum specification), read back by scikit-rf's parser
    net = nets[nports]
    path = write_touchstone(net, tmp_path / f"ch.s{nports}p", version, form, scenario="t")
    back = read_touchstone(path)
    assert back.nports == nports
    np.testing.assert_array_equal(back.f, net.f)
    np.testing.assert_array_equal(back.z0, net.z0)
    assert back.port_names == net.port_names
    if form == "ri":
        np.testing.assert_array_equal(back.s, net.s)  # shortest round-trip repr: exact
    else:
        # polar form: a few units in the last place; DB holds exact zeros as 1e-300
        np.testing.assert_allclose(back.s, net.s, rtol=1e-13, atol=2 * DB_FLOOR)
        assert np.max(np.abs(back.s - net.s)) < 1e-14
    # IEEE 370-2020 quality checks of what was written (scikit-rf implementations)
    assert back.is_passive()
    assert back.is_reciprocal()
    assert [p for p in tmp_path.iterdir() if p.name.startswith(".")] == []


def test_header_states_tool_scenario_ports_and_reference(tmp_path, nets):
    path = write_touchstone(
        nets[4],
        tmp_path / "p.s4p",
        2,
        "ri",
        ["made for a test"],
        scenario="sample lane",
        order="in-out-in-out",
    )
    text = path.read_text(encoding="ISO-8859-1")
    head = text.split("[Version]")[0]
    assert f"losslane {__version__}" in head
    assert "scenario: sample lane" in head
    assert "line 1: port 1 (in) -> port 2 (out)" in head
    assert "line 2: port 3 (in) -> port 4 (out)" in head
    assert "50 ohm" in head
    assert "made for a test" in head
    assert "[Version] 2.0" in text
    assert "[Reference] 50.0 50.0 50.0 50.0" in text


def test_version_two_holds_per_port_references(tmp_path):
    f = np.linspace(0, 20e9, 21)
    net = build_network(single_channel(), f, [40.0, 60.0], "x")
    with pytest.raises(LossLaneError, match="version 2"):
        write_touchstone(net, tmp_path / "x.s2p", version=1)
    back = read_touchstone(write_touchstone(net, tmp_path / "x.s2p", version=2))
    np.testing.assert_array_equal(back.z0.real, [[40.0, 60.0]] * f.size)
    np.testing.assert_array_equal(back.s, net.s)


def test_bad_write_requests_are_errors(tmp_path, nets):
    with pytest.raises(LossLaneError, match=r"\.s2p"):
        write_touchstone(nets[2], tmp_path / "x.s4p")
    with pytest.raises(LossLaneError, match=r"\.s2p"):
        write_touchstone(nets[2], tmp_path / "x.ts", version=1)
    with pytest.raises(LossLaneError, match="form"):
        write_touchstone(nets[2], tmp_path / "x.s2p", form="xy")
    with pytest.raises(LossLaneError, match="version"):
        write_touchstone(nets[2], tmp_path / "x.s2p", version=3)
    with pytest.raises(LossLaneError, match="directory"):
        write_touchstone(nets[2], tmp_path / "missing" / "x.s2p")
    assert list(tmp_path.iterdir()) == []


def test_failed_write_leaves_nothing(tmp_path, nets, monkeypatch):
    target = tmp_path / "x.s2p"
    target.write_text("old contents")

    def boom(src, dst):
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", boom)
    with pytest.raises(OSError):
        write_touchstone(nets[2], target)
    assert target.read_text() == "old contents"
    assert [p.name for p in tmp_path.iterdir()] == ["x.s2p"]


def test_read_errors_name_the_file(tmp_path):
    with pytest.raises(LossLaneError, match="nothere.s2p"):
        read_touchstone(tmp_path / "nothere.s2p")
    bad = tmp_path / "bad.s2p"
    bad.write_text("# Hz S RI R 50\n1 2 3\nthis is not data\n")
    with pytest.raises(LossLaneError, match="bad.s2p"):
        read_touchstone(bad)


@pytest.mark.parametrize("order", ["in-in-out-out", "in-out-in-out"])
def test_touchstone_block_reproduces_the_written_channel(tmp_path, order):
    # a channel written to a file and imported again must cascade exactly like the
    # original blocks (checks the port order mapping and the S -> ABCD conversion)
    f = np.linspace(0, 30e9, 61)
    blocks = pair_channel(f)
    net = build_network(blocks, f, Z0, "pair", order=order)
    path = write_touchstone(net, tmp_path / "pair.s4p", 1, "ri", order=order)
    line = LineSegment(pair_rlgc(f), 0.1)
    imported = TouchstoneBlock(path, n=2, order=order)
    ours = build_network([line, imported, line], f, Z0)
    ref = build_network([line, *blocks, line], f, Z0)
    assert np.max(np.abs(ours.s - ref.s)) < 1e-12
    # and 2-port, through the single-ended path
    f2 = np.linspace(0, 30e9, 61)
    net2 = build_network(single_channel(), f2, Z0, "lane")
    p2 = write_touchstone(net2, tmp_path / "lane.s2p")
    again = build_network([TouchstoneBlock(p2)], f2, Z0)
    np.testing.assert_allclose(again.s, net2.s, atol=1e-13)


def test_touchstone_block_interpolates_with_scikit_rf(tmp_path):
    # on another grid inside the band the block equals scikit-rf's linear interpolation
    import skrf

    f = np.linspace(10e6, 30e9, 301)
    net = build_network(single_channel(), f, Z0, "lane")
    path = write_touchstone(net, tmp_path / "lane.s2p")
    sweep = np.linspace(20e6, 29e9, 177)
    ours = build_network([TouchstoneBlock(path)], sweep, Z0)
    ref = net.interpolate(skrf.Frequency.from_f(sweep, unit="Hz"), kind="linear")
    np.testing.assert_allclose(ours.s, ref.s, atol=1e-12)


def test_non_reciprocal_file_cascades_like_scikit_rf(tmp_path):
    # an isolator-like 2-port (S12 = 0), accepted as it is (a non-reciprocal file is
    # refused by default): the cascade must carry it exactly
    import skrf

    f = np.linspace(1e9, 10e9, 10)
    s = np.zeros((f.size, 2, 2), complex)
    s[:, 1, 0] = 0.7 * np.exp(-1j * f / 1e9)
    s[:, 0, 0] = 0.1
    iso = to_network(s, f, Z0, "iso")
    path = write_touchstone(iso, tmp_path / "iso.s2p")
    n = f.size
    rl = RLGC.single(f, np.full(n, 5.0), np.full(n, 300e-9), np.zeros(n), np.full(n, 125e-12))
    line = LineSegment(rl, 0.2)
    ours = build_network([line, TouchstoneBlock(path, as_is=True), line], f, Z0)
    ln = block_network(line, f, Z0)
    ref = skrf.network.cascade_list([ln, iso, ln])
    assert np.max(np.abs(ours.s - ref.s)) < 1e-12
    np.testing.assert_array_equal(ours.s[:, 0, 1], 0.0)


@pytest.mark.parametrize("n", [1, 2])
def test_dc_blocked_files_in_series(tmp_path, n):
    # two DC-blocked files (S21 = 0 at f = 0) in a row with a capacitor: still an open at
    # DC, and equal to the cascade of the original blocks elsewhere
    from losslane.network import SeriesCapacitor, Via

    f = np.linspace(0, 20e9, 41)
    parts = [SeriesCapacitor(100e-9, esl=0.4e-9, n=n), Via(1.5e-3, 0.3e-3, 45.0, 3.7, n=n)]
    path = write_touchstone(build_network(parts, f, Z0), tmp_path / f"dcb.s{2 * n}p")
    blk = TouchstoneBlock(path, n=n)
    got = build_network([blk, SeriesCapacitor(10e-9, n=n), blk], f, Z0).s
    ref = build_network([*parts, SeriesCapacitor(10e-9, n=n), *parts], f, Z0).s
    assert np.all(np.isfinite(got))
    assert np.max(np.abs(got[0, n:, :n])) < 1e-90  # exactly 0 for n = 1; ~1e-100 for n = 2
    np.testing.assert_allclose(got[0, :n, :n], np.eye(n), atol=1e-15)
    assert np.max(np.abs(got[1:] - ref[1:])) < 1e-12


def test_sweep_beyond_band_is_an_error(tmp_path):
    f = np.linspace(10e6, 20e9, 51)
    path = write_touchstone(build_network(single_channel(), f, Z0), tmp_path / "m.s2p")
    blk = TouchstoneBlock(path)
    with pytest.raises(LossLaneError) as err:
        blk.abcd(np.linspace(10e6, 40e9, 11))
    msg = str(err.value)
    assert "m.s2p" in msg and "20 GHz" in msg and "40 GHz" in msg and "10 MHz" in msg
    with pytest.raises(LossLaneError, match="start the sweep"):
        blk.abcd(np.linspace(1e6, 20e9, 11))


def test_wrong_port_count_is_an_error(tmp_path):
    f = np.linspace(0, 20e9, 11)
    p2 = write_touchstone(build_network(single_channel(), f, Z0), tmp_path / "m.s2p")
    p4 = write_touchstone(build_network(pair_channel(f), f, Z0), tmp_path / "p.s4p")
    with pytest.raises(LossLaneError, match=r"m\.s2p.* 2 ports .* needs 4"):
        TouchstoneBlock(p2, n=2)
    with pytest.raises(LossLaneError, match=r"p\.s4p.* 4 ports .* needs 2"):
        TouchstoneBlock(p4, n=1)
    with pytest.raises(LossLaneError, match="order"):
        TouchstoneBlock(p4, n=2, order="1-2-3-4")


def test_dc_point_is_extrapolated_with_a_warning(tmp_path):
    # skrf's extrapolate_to_dc from a file without DC; for a channel without a DC block
    # the extrapolated point must be nearer the exact DC answer (series resistance) than
    # the file's first point is, entry by entry
    f = np.linspace(0, 20e9, 2001)
    blocks = [b for b in single_channel() if b.kind != "capacitor"]
    exact = build_network(blocks, f, Z0)
    path = write_touchstone(exact[1:], tmp_path / "m.s2p")  # drop the DC point
    blk = TouchstoneBlock(path)
    with pytest.warns(LossLaneWarning, match="DC point is extrapolated"):
        got = build_network([blk], f, Z0)
    assert np.all(np.isfinite(got.s))
    assert np.all(np.abs(got.s[0] - exact.s[0]) < np.abs(exact.s[1] - exact.s[0]))
    np.testing.assert_array_equal(got.s[0].imag, 0.0)
    np.testing.assert_allclose(got.s[1:], exact.s[1:], atol=1e-13)


def test_non_passive_file_is_flagged(tmp_path):
    # IEEE 370-2020 passivity: singular values of S at most 1
    f = np.linspace(1e9, 2e9, 3)
    s = np.zeros((3, 2, 2), complex)
    s[:, 1, 0] = s[:, 0, 1] = 1.2
    path = write_touchstone(to_network(s, f, Z0, "gain"), tmp_path / "gain.s2p")
    # refused, naming the file and the worst frequency (a gain of 1.2 is no rounding)
    with pytest.raises(LossLaneError, match=r"gain.s2p.*1\.2 at 1 GHz \(not passive"):
        TouchstoneBlock(path)
    # accepted as it is only when asked
    assert TouchstoneBlock(path, as_is=True).check.action == "as-is"

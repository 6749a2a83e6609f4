"""Channels on group lines: the 2n-port, the victim's views, imported 2n-port files, the
scenario's [crosstalk] table, and the build's files and --json.

Outside references: passivity and reciprocity of the 2n-port (largest singular value and
S - S^T; scikit-rf's checks on the written file, IEEE 370-2020 criteria); a line's own
S-parameters imported as a Touchstone file cascade like the line itself (the cascade of
two halves of a uniform line is the whole line: any transmission-line text); the victim's
own 4-port is the 2n-port with the other ports terminated in the reference (scattering
matrix definition, Pozar); scikit-rf's Touchstone reader.
"""

from __future__ import annotations

import json
import warnings

import numpy as np
import pytest
import skrf
from cli_helpers import run

from losslane import api
from losslane.channel import build_channel
from losslane.errors import LossLaneError, LossLaneWarning
from losslane.network.scatter import loss_db
from losslane.scenario import parse_scenario

HEAD = """
name = "three lanes"
[sweep]
start = "0 Hz"
stop = "20 GHz"
step = "20 MHz"
"""
BUS = """
[lines.bus]
kind = "stripline-group"
thickness = "0.6 mil"
below = "5 mil"
above = "5 mil"
dielectric = "low-loss"
accuracy = "coarse"
traces = [
  { name = "agg1", width = "5 mil", spacing = "7 mil" },
  { name = "vic", width = "5 mil", spacing = "7 mil", gap = "10 mil" },
  { name = "clk", width = "6 mil", gap = "10 mil" },
]
"""
CHANNEL = """
[[channel]]
line = "bus"
length = "2 in"
[[channel]]
via = { barrel = "40 mil", stub = "8 mil", impedance = "45 ohm", dielectric = "low-loss" }
[[channel]]
capacitor = { value = "100 nF", esl = "0.3 nH" }
[[channel]]
line = "bus"
length = "3 in"
"""
BUDGET = """
[budget]
data_rate = "16 Gb/s"
max_loss = "20 dB"
max_icn = "{limit}"
[[budget.check]]
at = "4 GHz"
max_loss = "10 dB"
"""


def scenario(text: str, **kw):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        return parse_scenario(text, **kw)


def full(victim: str = "vic", limit: str = "5 mV", extra: str = "") -> str:
    return (
        HEAD
        + BUS
        + CHANNEL
        + BUDGET.format(limit=limit)
        + f'\n[crosstalk]\nvictim = "{victim}"\n'
        + extra
    )


@pytest.fixture(scope="module")
def built():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        return build_channel(scenario(full()))


def test_group_channel_is_a_passive_reciprocal_2n_port(built):
    s = built.s
    assert s.shape == (built.f.size, 10, 10) and built.conductors == 5
    assert built.pairs == ((0, 1), (2, 3))
    assert np.linalg.svd(s, compute_uv=False).max() <= 1 + 1e-9
    assert np.abs(s - np.swapaxes(s, 1, 2)).max() <= 1e-9


def test_victim_views_are_its_own_ports(built):
    # the victim's 4-port: rows and columns of its conductors (2, 3) at both ends, every
    # other port terminated in the reference
    p = [2, 3, 7, 8]
    assert np.array_equal(built.main_s, built.s[:, p][:, :, p])
    assert built.differential and built.victim == "vic"
    assert built.insertion_loss_db == pytest.approx(loss_db(built.main_s), abs=1e-12)
    mm = built.main_mixed_mode
    sdd21 = 0.5 * (
        built.s[:, 7, 2] - built.s[:, 7, 3] - built.s[:, 8, 2] + built.s[:, 8, 3]
    )  # Bockelman-Eisenstadt
    assert mm.dd[:, 1, 0] == pytest.approx(sdd21, abs=1e-14)
    # each segment's loss is the victim's own through that block
    blk = built.blocks[0].s(built.f)
    assert built.segment_loss_db[0] == pytest.approx(loss_db(blk[:, p][:, :, p]), abs=1e-12)


def test_budget_and_json_follow_the_victim(built):
    from losslane.budget import evaluate_budget

    b = evaluate_budget(built)
    assert b.mode == "differential"
    ny = b.nyquist
    sec = built.scenario.lines["bus"]
    row = ny.segments[0]
    assert row.db_per_in == pytest.approx(float(sec.trace_db_per_in(np.array([ny.at]), "vic")[0]))


def test_single_ended_victim_and_modes():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        ch = build_channel(scenario(full("clk")))
    from losslane.crosstalk.evaluate import evaluate_crosstalk

    assert not ch.differential and ch.main_s.shape[1:] == (2, 2)
    assert ch.main_mixed_mode is None
    xt = evaluate_crosstalk(ch)
    modes = {c.aggressor: c.mode for c in xt.couplings}
    assert modes == {
        "agg1": "differential to single-ended",
        "vic": "differential to single-ended",
    }
    # the single trace's own ports: conductor 4 near (4) and far (9)
    assert ch.insertion_loss_db == pytest.approx(loss_db(ch.s[:, [4, 9]][:, :, [4, 9]]))


def test_imported_2n_port_file_cascades_like_the_line(tmp_path):
    from losslane.network.touchstone import write_touchstone

    lines = HEAD + BUS + '\n[crosstalk]\nvictim = "vic"\n'
    one = build_channel(scenario(lines + '[[channel]]\nline = "bus"\nlength = "1 in"\n'))
    write_touchstone(one.network, tmp_path / "inch.s10p", form="ri")
    two = build_channel(scenario(lines + '[[channel]]\nline = "bus"\nlength = "2 in"\n'))
    mixed = build_channel(
        scenario(
            lines
            + '[[channel]]\nline = "bus"\nlength = "1 in"\n'
            + '[[channel]]\ntouchstone = "inch.s10p"\n',
            base=tmp_path,
        )
    )
    assert np.abs(mixed.s - two.s).max() < 1e-9
    # a file with the wrong port count is refused
    write_touchstone(
        skrf.Network(frequency=one.network.frequency, s=one.s[:, :4, :4], z0=50, name="four"),
        tmp_path / "four.s4p",
    )
    with pytest.raises(LossLaneError, match="has 4 ports but .* needs 10"):
        build_channel(
            scenario(
                lines
                + '[[channel]]\nline = "bus"\nlength = "1 in"\n'
                + '[[channel]]\ntouchstone = "four.s4p"\n',
                base=tmp_path,
            )
        )


@pytest.mark.parametrize(
    ("text", "message"),
    [
        (HEAD + BUS + CHANNEL, r"\[crosstalk\]: the channel runs on group lines"),
        (full(extra="").replace('victim = "vic"', 'victim = "vik"'), "did you mean 'vic'"),
        (full(extra='aggressors = ["vic"]\n'), "is the victim"),
        (full(extra='aggressors = ["agg9"]\n'), "no trace of that name"),
        (full(extra='near_amplitude = "1.2"\n'), "bare number"),
        (full(extra='far_transition = "0 ps"\n'), "transition time is > 0"),
        (full(extra='bandwidth = "10 GHz"\n'), "unknown key 'bandwidth'"),
        (full() + '[ports]\norder = "in-out-in-out"\n', "in-in-out-out' only"),
        (
            full()
            + '[lines.plain]\nkind = "stripline"\nwidth = "5 mil"\nthickness = "0.6 mil"\n'
            + 'below = "5 mil"\nabove = "5 mil"\ndielectric = "low-loss"\n'
            + '[[channel]]\nline = "plain"\nlength = "1 in"\n',
            "is a single line but",
        ),
        (
            full().replace('name = "clk"', 'name = "clock"'),
            "",  # one group line only: a rename is fine (the victim stays)
        ),
    ],
)
def test_scenario_errors_name_the_key(text, message):
    if not message:
        scenario(text)
        return
    with pytest.raises(LossLaneError, match=message):
        scenario(text)


def test_group_lines_of_one_channel_share_their_traces():
    other = BUS.replace("[lines.bus]", "[lines.other]").replace('name = "clk"', 'name = "clock"')
    text = full() + other + '[[channel]]\nline = "other"\nlength = "1 in"\n'
    with pytest.raises(LossLaneError, match="every group line of a channel has the same traces"):
        scenario(text)


def test_crosstalk_and_noise_limit_need_group_lines():
    plain = (
        HEAD
        + '[lines.p]\nkind = "stripline"\nwidth = "5 mil"\nthickness = "0.6 mil"\n'
        + 'below = "5 mil"\nabove = "5 mil"\ndielectric = "low-loss"\n'
        + '[[channel]]\nline = "p"\nlength = "1 in"\n'
    )
    with pytest.raises(LossLaneError, match="no group lines"):
        scenario(plain + '[crosstalk]\nvictim = "p"\n')
    with pytest.raises(LossLaneError, match="max_icn: the integrated crosstalk noise needs"):
        scenario(plain + '[budget]\ndata_rate = "10 Gb/s"\nmax_icn = "3 mV"\n')
    with pytest.raises(LossLaneError, match="needs data_rate"):
        scenario(full().replace('data_rate = "16 Gb/s"\n', ""))


def test_build_writes_the_2n_port_the_victim_file_and_reports(tmp_path):
    path = tmp_path / "bus.toml"
    path.write_text(full(limit="0.001 mV"), encoding="utf-8")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        res = api.build(path, out=tmp_path / "out")
    names = [p.name for p in res.files]
    assert names[0] == "three-lanes.s10p"
    assert "three-lanes-vic.s4p" in names
    assert {"three-lanes-crosstalk.png", "three-lanes-crosstalk-step.png"} <= set(names)
    whole = skrf.Network(str(res.files[0]))
    assert np.array_equal(whole.s, res.channel.s)
    assert whole.is_passive() and whole.is_reciprocal()
    victim = skrf.Network(str(tmp_path / "out" / "three-lanes-vic.s4p"))
    assert np.array_equal(victim.s, res.channel.main_s)
    header = res.files[0].read_text(encoding="latin-1")
    assert "near ends (transmitter side) 1 = agg1 P, 2 = agg1 N, 3 = vic P, 4 = vic N, 5 = clk" in (
        header
    )
    assert "far ends (receiver side) 6 = agg1 P" in header
    # the limit of 0.001 mV fails: the build's verdict and --strict say so
    assert res.crosstalk.passed is False and res.passed is False
    page = (tmp_path / "out" / "three-lanes-report.html").read_text(encoding="utf-8")
    assert '<h2 id="crosstalk">Crosstalk</h2>' in page and "over the limit" in page
    data = res.to_json()
    xt = data["crosstalk"]
    assert xt["victim"] == "vic" and xt["points_hz"] == [4e9, 8e9]
    assert [a["name"] for a in xt["aggressors"]] == ["agg1", "clk"]
    assert xt["aggressors"][1]["mode"] == "single-ended to differential"
    for a in xt["aggressors"]:
        assert len(a["next_db"]) == len(a["fext_db"]) == 2
        assert all(v > 0 for v in a["next_db"] + a["fext_db"])
    assert xt["icn_mv"] == pytest.approx(res.crosstalk.noise.total * 1e3)
    assert data["budget"]["mode"] == "differential"


def test_cli_json_and_strict(tmp_path, capsys):
    path = tmp_path / "bus.toml"
    path.write_text(full(limit="0.001 mV"), encoding="utf-8")
    rc, out, _ = run(
        capsys, "build", str(path), "--out", str(tmp_path / "o"), "--json", "--no-plots", "--strict"
    )
    assert rc == 1
    data = json.loads(out)
    assert set(data["crosstalk"]) >= {"victim", "points_hz", "aggressors", "icn_mv"}
    assert data["ports"] == 10 and data["port_order"] == "in-in-out-out"


def test_line_command_refuses_a_group(capsys):
    args = ("--below", "5mil", "--above", "5mil", "--thickness", "0.6mil")
    rc, _, err = run(capsys, "line", "stripline-group", *args, "--dielectric", "low-loss")
    assert rc == 2 and "described in a scenario file" in err

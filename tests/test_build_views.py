"""Every build judges and shows the S-parameters it writes: the IEEE 370 quality line in
the summary, ``quality`` and ``time_domain`` in the JSON, the impedance profile and the
pulse (or step) response as charts and on the report page, with the stimulus of the
scenario's ``[time]`` section.

Outside references: TEM delay sqrt(Dk)/c of a homogeneous stripline, IEEE Std 370-2020's
levels, RFC 8259 (JSON has no NaN or Infinity), the PNG signature (ISO/IEC 15948).
"""

from __future__ import annotations

import base64
import json
import math

import pytest
from budget_scenarios import PASSING_BUDGET, SMALL_CHANNEL, scenario_text, write
from cli_helpers import run
from test_report_html import parse_page

from losslane import api

C0 = 299_792_458.0  # m/s, exact (SI)
INCH = 25.4e-3

TEM = """
name = "tem lane"
[sweep]
start = "0 Hz"
stop = "40 GHz"
step = "10 MHz"
[dielectrics.clear]
dk = 3.7
df = 0
model = "constant"
[lines.route]
kind = "stripline"
width = "6.5 mil"
thickness = "0.6 mil"
below = "6 mil"
above = "6 mil"
dielectric = "clear"
conductivity = "1e15 S/m"   # practically no conductor loss: a TEM line
[[channel]]
line = "route"
length = "4 in"
"""


def strict_json(text: str):
    def refuse(name):
        raise AssertionError(f"{name} in JSON output")

    return json.loads(text, parse_constant=refuse)


@pytest.fixture(scope="module")
def built(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("views")
    scen = write(tmp, scenario_text(SMALL_CHANNEL, PASSING_BUDGET, name="view lane"))
    return tmp, scen


def test_summary_shows_the_quality_line_and_the_time_views(built, capsys):
    tmp, scen = built
    code, out, err = run(capsys, "build", str(scen), "--out", str(tmp / "a"))
    assert code == 0, err
    # our lines, via and capacitor are passive and reciprocal: IEEE 370 100 / 100
    assert (
        "written S-parameters: IEEE 370 quality: passivity 100.00 (good), reciprocity "
        "100.00 (good), causality" in out
    )
    assert "time domain (" in out and "S21 delay" in out
    assert "pulse response of S21 (10 Gb/s NRZ" in out  # [budget] data_rate by default
    names = sorted(p.name for p in (tmp / "a").iterdir())
    assert "view-lane-impedance-profile.png" in names and "view-lane-pulse.png" in names
    for name in ("view-lane-impedance-profile.png", "view-lane-pulse.png"):
        assert (tmp / "a" / name).read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
        assert str(tmp / "a" / name) in out  # listed with the files written


def test_report_page_embeds_the_time_charts_and_the_quality_table(built, capsys):
    tmp, scen = built
    code, _, err = run(capsys, "build", str(scen), "--out", str(tmp / "b"))
    assert code == 0, err
    page = parse_page((tmp / "b" / "view-lane-report.html").read_text(encoding="utf-8"))
    imgs = {
        base64.b64decode(v.split(",", 1)[1]) for t, k, v in page.attrs if t == "img" and k == "src"
    }
    for name in ("view-lane-impedance-profile.png", "view-lane-pulse.png"):
        assert (tmp / "b" / name).read_bytes() in imgs
    text = "".join(page.text)
    assert "Quality and time-domain views of the written S-parameters" in text
    assert {"passivity", "reciprocity", "100.00", "good"} <= set(page.cells)


def test_json_carries_quality_and_time_domain(built, capsys):
    tmp, scen = built
    code, out, err = run(capsys, "build", str(scen), "--out", str(tmp / "c"), "--json")
    assert code == 0, err
    data = strict_json(out)
    q = data["quality"]
    assert (q["passivity"], q["reciprocity"]) == (100.0, 100.0)
    assert {"passivity_level", "reciprocity_level", "causality_level"} <= set(q)
    td = data["time_domain"]
    assert [s["path"] for s in td["step"]] == ["S21"]
    assert td["pulse"]["data_rate_bps"] == 10e9 and td["pulse"]["modulation"] == "nrz"
    assert "volts" not in td["pulse"]  # waveforms are in the charts, not the build JSON
    assert [(p["port"], p["mode"]) for p in td["tdr"]] == [
        (1, "single-ended"),
        (2, "single-ended"),
    ]
    # the default stimulus: 0.75 / sweep stop (20 GHz)
    assert td["rise_time_s"] == pytest.approx(0.75 / 20e9, rel=1e-3)


def test_time_section_sets_the_stimulus(tmp_path, capsys):
    text = scenario_text(
        SMALL_CHANNEL,
        PASSING_BUDGET
        + '[time]\nrise_time = "60 ps"\ndata_rate = "25 Gb/s"\nmodulation = "pam4"\n',
        name="timed lane",
    )
    res = api.build(write(tmp_path, text), out=tmp_path / "o", plots=False)
    td = res.to_json()["time_domain"]
    assert td["rise_time_s"] == pytest.approx(60e-12, rel=1e-3)
    # [time] data_rate and modulation replace [budget]'s; PAM4 carries 2 bits per symbol
    assert td["pulse"]["data_rate_bps"] == 25e9 and td["pulse"]["modulation"] == "pam4"
    assert td["pulse"]["ui_s"] == pytest.approx(2 / 25e9, rel=1e-12)


def test_without_a_data_rate_the_build_charts_the_step(tmp_path, capsys):
    scen = write(tmp_path, scenario_text(SMALL_CHANNEL, name="plain lane"))
    code, out, err = run(capsys, "build", str(scen), "--out", str(tmp_path / "o"))
    assert code == 0, err
    names = {p.name for p in (tmp_path / "o").iterdir()}
    assert {"plain-lane-impedance-profile.png", "plain-lane-step.png"} <= names
    assert "plain-lane-pulse.png" not in names
    assert "pulse response: none (no data_rate in [time] or [budget])" in out


def test_step_delay_of_a_tem_build_is_length_times_sqrt_dk_over_c(tmp_path):
    res = api.build(write(tmp_path, TEM + '[time]\nrise_time = "30 ps"\n'), out=tmp_path / "o")
    td = res.to_json()["time_domain"]
    (st,) = td["step"]
    # the transform samples 8 times per rise time: within one time step
    assert st["delay_s"] == pytest.approx(4 * INCH * math.sqrt(3.7) / C0, abs=30e-12 / 8)
    assert res.to_json()["quality"]["causality"] == pytest.approx(100.0, abs=1e-6)


@pytest.mark.parametrize(
    "section, message",
    [
        ('rise_time = "10 ps"', "[time].rise_time = '10 ps': the sweep stops at 20 GHz"),
        ('rise_time = "30"', "a bare number is not a time"),
        ('modulation = "pam4"', "[time].modulation = 'pam4' goes with [time].data_rate"),
        ('data_rate = "0 Gb/s"', "[time].data_rate = '0 Gb/s': must be > 0"),
        ('risetime = "30 ps"', "rise_time"),
    ],
)
def test_time_section_errors_name_the_key(tmp_path, capsys, section, message):
    scen = write(tmp_path, scenario_text(SMALL_CHANNEL, "[time]\n" + section + "\n"))
    code, out, err = run(capsys, "build", str(scen), "--out", str(tmp_path / "o"))
    assert code == 2 and message in err, err
    assert not (tmp_path / "o").exists()  # refused before any work


def test_a_two_point_sweep_builds_without_views(tmp_path, capsys):
    text = scenario_text(SMALL_CHANNEL, step="20 GHz", name="two points")
    scen = write(tmp_path, text)
    code, out, err = run(capsys, "build", str(scen), "--out", str(tmp_path / "o"), "--json")
    assert code == 0, err
    data = strict_json(out)
    assert data["points"] == 2 and data["quality"] is None and data["time_domain"] is None

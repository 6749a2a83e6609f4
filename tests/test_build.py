"""`losslane build` and `losslane demo` end to end, through the command line and api.build().

Outside references: scikit-rf's Touchstone reader, its passivity and reciprocity checks
(IEEE 370-2020 quality criteria) and its own, independent network media and cascade
(``skrf.media.DistributedCircuit`` / ``DefinedGammaZ0`` and the ``**`` connection
operator); the Touchstone format (IBIS Open Forum, Touchstone File Format Specification
1.x / 2.x); DC circuit theory for a series resistance between two matched ports; the
hand DC resistance of a rectangular strip, R = 1/(sigma w t) per metre.
"""

from __future__ import annotations

import json
import os
import re
import shutil
import subprocess
import sys
import tomllib
from pathlib import Path

import numpy as np
import pytest
from reported import build_parts

from losslane import api
from losslane.cli import main

ROOT = Path(__file__).resolve().parents[1]
SRC = ROOT / "src"
MODELS = SRC / "losslane" / "data" / "models"
Z0 = 50.0
C0 = 299_792_458.0  # m/s, exact (SI definition)
INCH = 0.0254  # exact (1959 agreement)
MIL = INCH / 1000

# A plain single-ended channel, short enough to build in a few tens of milliseconds.
SMALL = """
name = "bench lane"

[sweep]
start = "0 Hz"
stop = "20 GHz"
step = "50 MHz"

[lines.route]
kind = "stripline"
width = "5 mil"
thickness = "0.6 mil"
below = "6 mil"
above = "7 mil"
dielectric = "low-loss"
foil = "very-low-profile"

[[channel]]
line = "route"
length = "4 in"

[[channel]]
capacitor = { value = "100 nF", esl = "0.4 nH", esr = "15 mohm" }

[[channel]]
touchstone = "models/conn.s2p"

[[channel]]
line = "route"
length = "2 in"
"""


def write_scenario(directory: Path, text: str = SMALL, name: str = "lane.toml") -> Path:
    directory.mkdir(parents=True, exist_ok=True)
    (directory / "models").mkdir(exist_ok=True)
    shutil.copy(MODELS / "mezzanine-pin.s2p", directory / "models" / "conn.s2p")
    shutil.copy(MODELS / "mezzanine-pair.s4p", directory / "models" / "pair.s4p")
    p = directory / name
    p.write_text(text, encoding="utf-8")
    return p


def cli(capsys, *argv: str) -> tuple[int, str, str]:
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def subprocess_cli(*argv: str, cwd: Path) -> subprocess.CompletedProcess:
    env = {**os.environ, "PYTHONPATH": str(SRC)}
    return subprocess.run(
        [sys.executable, "-m", "losslane", *argv],
        capture_output=True,
        text=True,
        cwd=cwd,
        env=env,
        timeout=120,
    )


def read(path: Path):
    import skrf

    return skrf.Network(str(path))


def project_version() -> str:
    return tomllib.loads((ROOT / "pyproject.toml").read_text())["project"]["version"]


@pytest.fixture(scope="module")
def demo_build(tmp_path_factory):
    """The demo built once through api.build (no plots): (result, files, text, data)."""
    out = tmp_path_factory.mktemp("demo") / "out"
    return build_parts(api.build(api.demo_scenario_path(single_ended=True), out=out, plots=False))


# ---------------------------------------------------------------- the demo


def test_demo_cli_writes_touchstone_and_plots(tmp_path, capsys):
    out = tmp_path / "demo"
    code, stdout, err = cli(capsys, "demo", "--out", str(out))
    assert code == 0, err
    names = sorted(p.name for p in out.iterdir())
    # the demo is the differential lane: a 4-port file, mixed-mode plot, budget and report
    assert names == [
        "sensor-lane-budget.csv",
        "sensor-lane-budget.json",
        "sensor-lane-budget.png",
        "sensor-lane-ild.png",
        "sensor-lane-impedance-profile.png",
        "sensor-lane-insertion-loss.png",
        "sensor-lane-mixed-mode.png",
        "sensor-lane-pulse.png",
        "sensor-lane-report.html",
        "sensor-lane-return-loss.png",
        "sensor-lane.s4p",
    ]
    for p in out.glob("*.png"):
        assert p.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (ISO/IEC 15948)
    assert "sensor lane: 10 segments, 4-port" in stdout
    for p in out.iterdir():
        assert str(p) in stdout  # the summary lists every file written
    # the summary quotes the budget's Nyquist (16 Gb/s NRZ: 8 GHz) and check point (4 GHz)
    assert re.search(r"^\s+8\s+\d+\.\d+", stdout, re.M) and re.search(r"^\s+4\s", stdout, re.M)
    assert [p.name for p in tmp_path.iterdir()] == ["demo"]  # no staging directory left


def test_demo_output_is_passive_and_reciprocal(demo_build):
    result, files, _, _ = demo_build
    net = read(files[0])
    # IEEE 370-2020 criteria, scikit-rf's implementations
    assert net.is_passive()
    assert net.is_reciprocal()
    assert np.all(np.isfinite(net.s))
    # the DC point is present and real (time-domain simulators need it)
    assert net.f[0] == 0.0 and np.all(net.s[0].imag == 0.0)


def test_api_build_matches_the_written_file(demo_build):
    result, files, text, data = demo_build
    net = read(files[0])
    np.testing.assert_array_equal(net.f, result.f)
    np.testing.assert_array_equal(net.s, result.network.s)  # RI form: exact round trip
    assert data["touchstone"] == str(files[0])
    assert data["points"] == 2001 == result.f.size
    assert data["ports"] == 2


# ---------------------------------------------------------------- Touchstone versions and forms


@pytest.mark.parametrize("version", ["1", "2"])
@pytest.mark.parametrize("form", ["ri", "ma", "db"])
def test_every_version_and_form_loads_back_in_skrf(tmp_path, capsys, demo_build, version, form):
    result = demo_build[0]
    out = tmp_path / "o"
    scen = str(api.demo_scenario_path(single_ended=True))
    argv = ["build", scen, "--out", str(out), "--no-plots", "--touchstone-version", version]
    code, _, err = cli(capsys, *argv, "--form", form)
    assert code == 0, err
    path = out / "sensor-lane-single-ended.s2p"
    text = path.read_text(encoding="ISO-8859-1")
    # option line (Touchstone spec): frequency unit, parameter, format, reference
    option = next(ln for ln in text.splitlines() if ln.startswith("#"))
    assert option.split()[:5] == ["#", "Hz", "S", form.upper(), "R"]
    if version == "2":
        assert re.search(r"^\[Version\]\s+2\.0", text, re.M)
        assert re.search(r"^\[Number of Ports\]\s+2", text, re.M)
    else:
        assert "[Version]" not in text
    net = read(path)
    np.testing.assert_array_equal(net.f, result.f)
    np.testing.assert_array_equal(net.z0, np.full((result.f.size, 2), Z0))
    if form == "ri":
        np.testing.assert_array_equal(net.s, result.network.s)
    else:
        # polar forms: exact up to the rounding of the magnitude/angle conversion
        assert np.max(np.abs(net.s - result.network.s)) < 1e-13
    assert net.is_passive() and net.is_reciprocal()


def test_header_states_version_scenario_ports_and_reference(demo_build):
    files = demo_build[1]
    head = [ln for ln in files[0].read_text().splitlines() if ln.startswith("!")][:8]
    assert head[0] == f"!losslane {project_version()}"  # the packaged version
    assert "!scenario: sensor lane single-ended" in head
    assert "!ports: port 1 = near end (in), port 2 = far end (out)" in head
    assert "!reference impedance: 50 ohm at every port (power waves)" in head
    assert any("sensor-lane-single.toml" in ln for ln in head)  # which scenario file


# ---------------------------------------------------------------- --json


def test_json_is_one_object_and_nothing_else(tmp_path, capsys):
    scen = write_scenario(tmp_path / "s")
    code, stdout, err = cli(capsys, "build", str(scen), "--out", str(tmp_path / "o"), "--json")
    assert code == 0, err
    data = json.loads(stdout)  # the whole of stdout is one JSON document
    assert isinstance(data, dict)
    assert stdout.count("\n") == 1 and stdout.endswith("}\n")
    assert {"touchstone", "ports", "points", "files"} <= set(data)
    assert data["ports"] == 2 and data["points"] == 401
    assert data["touchstone"] == str(tmp_path / "o" / "bench-lane.s2p")
    # no [budget] section: the fit, the budget JSON and the report are still written
    # (a 2-port also gets its RF views: phase and group delay, VSWR, Smith chart)
    assert sorted(Path(p).name for p in data["files"]) == [
        "bench-lane-budget.json",
        "bench-lane-ild.png",
        "bench-lane-impedance-profile.png",
        "bench-lane-insertion-loss.png",
        "bench-lane-phase-delay.png",
        "bench-lane-report.html",
        "bench-lane-return-loss.png",
        "bench-lane-smith.png",
        "bench-lane-step.png",
        "bench-lane-vswr.png",
        "bench-lane.s2p",
    ]
    assert all(Path(p).is_file() for p in data["files"])


def test_json_in_a_new_process_keeps_warnings_on_stderr(tmp_path):
    # a file starting above 0 Hz has its DC point extrapolated, with a warning (stderr)
    import skrf

    d = tmp_path / "s"
    scen = write_scenario(d)
    net = skrf.Network(str(d / "models" / "conn.s2p"))[1:]  # drop the file's DC point
    net.write_touchstone(str(d / "models" / "conn"), skrf_comment=False)
    r = subprocess_cli("build", str(scen), "--out", "o", "--no-plots", "--json", cwd=tmp_path)
    assert r.returncode == 0, r.stderr
    data = json.loads(r.stdout)
    assert data["files"][0] == "o/bench-lane.s2p"
    assert sorted(data["files"][1:]) == ["o/bench-lane-budget.json", "o/bench-lane-report.html"]
    assert "warning:" in r.stderr and "extrapolated" in r.stderr
    assert "Traceback" not in r.stderr


def test_subprocess_demo_json(tmp_path):
    r = subprocess_cli("demo", "--no-plots", "--json", cwd=tmp_path)
    assert r.returncode == 0, r.stderr
    data = json.loads(r.stdout)
    assert data["ports"] == 4 and data["points"] == 2001  # the differential lane
    assert (tmp_path / data["touchstone"]).is_file()


# ---------------------------------------------------------------- independent cascade


SKRF_CHANNEL = """
name = "skrf check"

[sweep]
start = "10 MHz"                      # scikit-rf's line media are not defined at f = 0
stop = "20 GHz"
step = "10 MHz"

[lines.top]
kind = "microstrip"
width = "6 mil"
thickness = "1.4 mil"
height = "3.5 mil"
dielectric = "epoxy-glass-midloss"
foil = "reverse-treated"

[lines.inner]
kind = "stripline"
width = "5 mil"
thickness = "0.6 mil"
below = "6 mil"
above = "7 mil"
dielectric = "low-loss"

[[channel]]
line = "top"
length = "1.3 in"

[[channel]]
shunt = { capacitance = "0.12 pF" }

[[channel]]
capacitor = { value = "100 nF", esl = "0.4 nH", esr = "15 mohm" }

[[channel]]
series = { resistance = "0.3 ohm", inductance = "0.25 nH" }

[[channel]]
via = { barrel = "55 mil", stub = "20 mil", impedance = "45 ohm", dielectric = "low-loss" }

[[channel]]
touchstone = "models/conn.s2p"

[[channel]]
line = "inner"
length = "4 in"
"""


def skrf_segment(seg, freq, f):
    """The same segment built from scikit-rf's own media (independent network code)."""
    import skrf
    from skrf.media import DefinedGammaZ0, DistributedCircuit

    v = seg.values
    w = 2 * np.pi * f
    if seg.type == "line":
        # our cross-section's RLGC into scikit-rf's distributed-circuit line
        r, l, g, c = seg.section.rlgc(f).scalar()
        return DistributedCircuit(freq, z0_port=Z0, R=r, L=l, G=g, C=c).line(v["length"], "m")
    if seg.type == "touchstone":
        return skrf.Network(str(seg.path)).interpolate(freq, kind="linear")
    lumped = DefinedGammaZ0(freq, z0=Z0, gamma=1j * w / C0)
    if seg.type == "shunt":
        return lumped.shunt_capacitor(v["capacitance"])
    if seg.type == "capacitor":
        return (
            lumped.capacitor(v["value"]) ** lumped.inductor(v["esl"]) ** lumped.resistor(v["esr"])
        )
    if seg.type == "series":
        return lumped.resistor(v["resistance"]) ** lumped.inductor(v["inductance"])
    if seg.type == "via":
        # barrel: a TEM line of the given impedance at the nominal Dk in the via's
        # dielectric; stub: the same line, open, in shunt at the exit (the model's definition)
        eps = seg.dielectric.eps(f)
        zc = v["impedance"] * np.sqrt(seg.dielectric.dk / eps)
        media = DefinedGammaZ0(freq, z0_port=Z0, z0=zc, gamma=1j * w * np.sqrt(eps) / C0)
        return media.line(v["barrel"], "m") ** media.shunt_delay_open(v["stub"], "m")
    raise AssertionError(seg.type)


def test_build_cascade_equals_skrf_cascade_of_the_same_blocks(tmp_path):
    import skrf

    scen = write_scenario(tmp_path / "s", SKRF_CHANNEL)
    result, files, _, _ = build_parts(api.build(scen, out=tmp_path / "o", plots=False))
    f = result.f
    freq = skrf.Frequency.from_f(f, unit="Hz")
    nets = [skrf_segment(seg, freq, f) for seg in result.scenario.channel]
    assert [s.type for s in result.scenario.channel] == [
        "line",
        "shunt",
        "capacitor",
        "series",
        "via",
        "touchstone",
        "line",
    ]
    ref = nets[0]
    for n in nets[1:]:
        ref = ref**n  # scikit-rf's own cascade
    written = read(files[0])
    np.testing.assert_array_equal(written.f, f)
    assert np.max(np.abs(written.s - ref.s)) < 1e-9
    # and the scikit-rf cascade_list of the same blocks
    assert np.max(np.abs(skrf.network.cascade_list(nets).s - written.s)) < 1e-9
    # each segment's own insertion loss and the cumulative loss through segment k (the
    # plots' curves) are -20 log10 |S21| of the same scikit-rf networks
    for k, net in enumerate(nets):
        own = -20 * np.log10(np.abs(net.s[:, 1, 0]))
        through = -20 * np.log10(np.abs(skrf.network.cascade_list(nets[: k + 1]).s[:, 1, 0]))
        assert np.max(np.abs(result.segment_loss_db[k] - own)) < 1e-9
        assert np.max(np.abs(result.cumulative_loss_db[k] - through)) < 1e-9
    np.testing.assert_array_equal(result.cumulative_loss_db[-1], result.insertion_loss_db)


# ---------------------------------------------------------------- DC


@pytest.mark.parametrize(
    ("kind", "geometry"),
    [
        ("stripline", 'below = "6 mil"\nabove = "7 mil"'),
        ("microstrip", 'height = "3.5 mil"'),
    ],
)
def test_dc_point_of_a_plain_line_is_its_series_resistance(tmp_path, kind, geometry):
    # DC circuit theory: a series resistance R between two Z0 ports gives
    # S21 = 2 Z0 / (2 Z0 + R), S11 = R / (2 Z0 + R). With return planes 1 km thick (their
    # DC resistance vanishes) R is the strip's own, R = length / (sigma w t) (hand value)
    text = f"""
name = "dc lane"
[sweep]
start = "0 Hz"
stop = "10 GHz"
points = 11
[lines.l]
kind = "{kind}"
width = "5 mil"
thickness = "0.7 mil"
{geometry}
dielectric = "low-loss"
foil = "standard-ed"
plane_thickness = "1000 m"
conductivity = "5.8e7 S/m"
[[channel]]
line = "l"
length = "10 in"
"""
    scen = write_scenario(tmp_path / "s", text)
    _, files, _, _ = build_parts(api.build(scen, out=tmp_path / "o", plots=False))
    net = read(files[0])
    r = 10 * INCH / (5.8e7 * 5 * MIL * 0.7 * MIL)
    assert net.f[0] == 0.0
    assert net.s[0, 1, 0] == pytest.approx(2 * Z0 / (2 * Z0 + r), rel=1e-7)
    assert net.s[0, 0, 0] == pytest.approx(r / (2 * Z0 + r), rel=1e-6)
    assert net.s[0, 1, 0].imag == 0.0 and net.s[0, 0, 0].imag == 0.0


def test_dc_block_opens_the_channel_at_dc(tmp_path):
    # an ideal series capacitor is an open at f = 0: S21 = 0, S11 = S22 = 1 (circuit theory)
    scen = write_scenario(tmp_path / "s")
    _, files, _, _ = build_parts(api.build(scen, out=tmp_path / "o", plots=False))
    s0 = read(files[0]).s[0]
    assert s0[1, 0] == 0.0 and s0[0, 1] == 0.0
    # the lines and the connector in front of the open only add loss; |S11| <= 1
    assert 0.9 < abs(s0[0, 0]) <= 1.0


# ---------------------------------------------------------------- bad input


def _bad(tmp_path: Path, edit: tuple[str, str] | None = None, extra: str = "") -> Path:
    text = SMALL if edit is None else SMALL.replace(*edit)
    assert edit is None or text != SMALL
    return write_scenario(tmp_path / "s", text + extra)


BAD = {
    "missing unit": (('length = "4 in"', "length = 4"), "[[channel]] #1.length = 4"),
    "unknown key": (('width = "5 mil"', 'widht = "5 mil"'), "did you mean 'width'?"),
    "unknown material": (('dielectric = "low-loss"', 'dielectric = "low-los"'), "'low-loss'"),
    "sweep beyond the file's band": (
        ('stop = "20 GHz"', 'stop = "60 GHz"'),
        "end the sweep at or below 50 GHz",
    ),
    "wrong port count": (
        ('touchstone = "models/conn.s2p"', 'touchstone = "models/pair.s4p"'),
        "has 4 ports but this single-ended (2-port) channel needs 2",
    ),
    "malformed TOML": (('stop = "20 GHz"', 'stop = "20 GHz'), "not valid TOML"),
    "step does not divide": (('step = "50 MHz"', 'step = "70 MHz"'), "does not divide"),
}


def _assert_clean_failure(code: int, stdout: str, err: str, fragment: str, out: Path) -> None:
    assert code == 2
    assert "Traceback" not in err
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    assert lines[0].startswith("error: ") and fragment in lines[0], lines[0]
    assert stdout == ""
    assert not out.exists()
    # nothing staged or half-written beside it
    assert sorted(p.name for p in out.parent.iterdir()) == ["s"]


@pytest.mark.parametrize("case", list(BAD))
def test_bad_scenario_exits_2_with_one_line_and_no_files(tmp_path, capsys, case):
    edit, fragment = BAD[case]
    scen = _bad(tmp_path, edit)
    out = tmp_path / "o"
    code, stdout, err = cli(capsys, "build", str(scen), "--out", str(out))
    _assert_clean_failure(code, stdout, err, fragment, out)


def test_nonexistent_scenario_path(tmp_path, capsys):
    (tmp_path / "s").mkdir()
    out = tmp_path / "o"
    code, stdout, err = cli(capsys, "build", str(tmp_path / "s" / "none.toml"), "--out", str(out))
    _assert_clean_failure(code, stdout, err, "does not exist", out)


def test_output_path_that_is_an_existing_file(tmp_path, capsys):
    scen = _bad(tmp_path)
    out = tmp_path / "s" / "taken"
    out.write_text("keep me")
    code, stdout, err = cli(capsys, "build", str(scen), "--out", str(out))
    assert code == 2 and "Traceback" not in err
    assert err.startswith("error: --out") and "existing file" in err
    assert len(err.strip().splitlines()) == 1
    assert out.read_text() == "keep me"
    assert sorted(p.name for p in (tmp_path / "s").iterdir()) == [
        "lane.toml",
        "models",
        "taken",
    ]


def test_failure_while_writing_leaves_nothing(tmp_path, capsys, monkeypatch):
    # a failure after the Touchstone file is staged (here: in the plots) must not leave
    # the output directory, a partial file or the staging directory behind
    from losslane.errors import LossLaneError
    from losslane.report import channel as build_outputs

    def boom(*args, **kwargs):
        raise LossLaneError("plot failed")

    monkeypatch.setattr(build_outputs, "plot_files", boom)
    scen = _bad(tmp_path)
    out = tmp_path / "o"
    code, stdout, err = cli(capsys, "build", str(scen), "--out", str(out))
    _assert_clean_failure(code, stdout, err, "plot failed", out)


def test_failed_build_keeps_an_existing_output_directory_as_it_was(tmp_path, capsys):
    scen = _bad(tmp_path, BAD["sweep beyond the file's band"][0])
    out = tmp_path / "o"
    out.mkdir()
    (out / "old.s2p").write_text("previous result")
    code, _, err = cli(capsys, "build", str(scen), "--out", str(out))
    assert code == 2 and "Traceback" not in err
    assert [p.name for p in out.iterdir()] == ["old.s2p"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["o", "s"]


def test_bad_scenario_in_a_new_process(tmp_path):
    scen = _bad(tmp_path, BAD["missing unit"][0])
    r = subprocess_cli("build", str(scen), "--out", "o", cwd=tmp_path)
    assert r.returncode == 2
    assert r.stdout == ""
    assert r.stderr.startswith("error: [[channel]] #1.length = 4: a bare number is not a length")
    assert len(r.stderr.strip().splitlines()) == 1
    assert sorted(p.name for p in tmp_path.iterdir()) == ["s"]

"""Regressions found by the hostile-input suite once it covered stackups, groups, bands and
masks, [time], [compare] and the inspect / extract / fit / sweep commands. Each test is
the smallest input of a class that failed (a traceback, a silent wrong number, a message
naming the wrong thing, a file left behind) and checks the class's rule.
"""

from __future__ import annotations

import json
import tempfile
import uuid
from pathlib import Path

import numpy as np
import pytest
from hostile_commands import Line, coupon_s
from hostile_common import SMALL, error_line, run_cli
from hostile_strategies import lossy_line_s, touchstone_text

from losslane.network.touchstone import read_touchstone
from losslane.report.strict_json import loads

SWEEP_20 = """
[sweep]
start = "0 Hz"
stop = "20 MHz"
points = 3
"""

STACK = """
[stackup]
layers = [
  { name = "L1", conductor = "plane", thickness = "1.2 mil" },
  { name = "core", dielectric = "low-loss", thickness = "5 mil" },
  { name = "L2", conductor = "signal", thickness = "0.6 mil" },
  { name = "pp", dielectric = "%s", thickness = "4.4 mil" },
  { name = "L3", conductor = "plane", thickness = "1.2 mil" },
  { name = "core2", dielectric = "low-loss", thickness = "5 mil" },
  { name = "L4", conductor = "signal", thickness = "1.4 mil" },
]
"""

GROUP = """
[lines.on]
kind = "stripline-group"
layer = "L2"
accuracy = "coarse"
traces = [
  { name = "a", width = "5 mil", spacing = "6 mil" },
  { name = "b", width = "5 mil", gap = "15 mil" },
]

[lines.off]
kind = "stripline-group"
below = "4.4 mil"
above = "5 mil"
thickness = "0.6 mil"
dielectric = "low-loss"
plane_thickness = "1.2 mil"
accuracy = "coarse"
traces = [
  { name = "a", width = "5 mil", spacing = "6 mil" },
  { name = "b", width = "5 mil", gap = "15 mil" },
]

[lines.ms]
kind = "microstrip"
layer = "L4"
width = "7 mil"

[[channel]]
line = "on"
length = "1 in"

[crosstalk]
victim = "a"
"""


def build(capsys, tmp_path: Path, text: str, files: dict | None = None) -> tuple[int, str, str]:
    for name, content in (files or {}).items():
        (tmp_path / name).write_text(content, encoding="utf-8")
    (tmp_path / "lane.toml").write_text(text, encoding="utf-8")
    return run_cli(
        capsys,
        "build",
        str(tmp_path / "lane.toml"),
        "--out",
        str(tmp_path / "out"),
        "--no-plots",
        "--json",
    )


def refused(capsys, tmp_path: Path, text: str, files: dict | None = None) -> str:
    rc, out, err = build(capsys, tmp_path, text, files)
    assert rc == 2, err
    assert out == "" and not (tmp_path / "out").exists()
    return error_line(err)


# --- scenarios ---------------------------------------------------------------------------


def test_a_stackup_layer_without_a_name_is_reported_missing(capsys, tmp_path):
    text = SMALL.replace(
        "[[channel]]", STACK.replace('name = "L1", ', "") % "low-loss" + "\n[[channel]]", 1
    )
    msg = refused(capsys, tmp_path, text)
    assert "layer #1" in msg and "missing name" in msg, msg


def test_group_line_on_a_stackup_layer_is_field_solved_with_its_layers(capsys, tmp_path):
    """A group line on a layer was refused (its field-solver keys taken for a closed form)
    or crashed; it is the same section as the group written with the layer's heights
    (within the mesh's rounding, 1e-4) and, with two laminates, it sees both."""
    from losslane.scenario import parse_scenario

    f = np.array([1e9, 5e9])
    one = parse_scenario(SWEEP_20 + STACK % "low-loss" + GROUP)
    on, off = one.lines["on"].rlgc(f), one.lines["off"].rlgc(f)
    assert one.line_models["on"].solver == "field"
    np.testing.assert_allclose(on.c, off.c, rtol=1e-4, atol=1e-4 * np.abs(off.c).max())
    np.testing.assert_allclose(on.l, off.l, rtol=1e-4, atol=1e-4 * np.abs(off.l).max())
    two = parse_scenario(SWEEP_20 + STACK % "very-low-loss" + GROUP)
    names = {ly.dielectric.name for ly in two.lines["on"].geometry.layers}
    assert names == {"low-loss", "very-low-loss"}
    c_on = two.lines["on"].rlgc(f).c
    assert np.max(np.abs(c_on - off.c)) > 1e-3 * np.abs(off.c).max()  # the second laminate
    rc, out, err = build(capsys, tmp_path, SWEEP_20 + STACK % "very-low-loss" + GROUP)
    assert rc == 0, err
    doc = loads(out)
    assert {ln["name"]: ln["solver"] for ln in doc["lines"]}["on"] == "field"


@pytest.mark.parametrize(
    ("section", "needle"),
    [
        ('[time]\nrise_time = "1 us"\n', "[time].rise_time = '1 us'"),
        ('[time]\ndata_rate = "1 Mb/s"\n', "[time].data_rate = '1 Mb/s'"),
    ],
)
def test_a_stimulus_longer_than_the_time_window_is_refused_naming_it(
    capsys, tmp_path, section, needle
):
    """A rise time of the whole window (1 / step) crashed the transform; a pulse whose
    cursors span more than the window came out as absurd cursors."""
    text = SMALL.replace('step = "100 MHz"', 'step = "10 MHz"') + section
    msg = refused(capsys, tmp_path, text)
    assert needle in msg and "window" in msg, msg


def test_a_budget_rate_too_low_for_the_pulse_gives_the_step_response(capsys, tmp_path):
    text = SMALL + '\n[budget]\ndata_rate = "400 Mb/s"\n'  # UI 2.5 ns; window 10 ns
    rc, out, err = build(capsys, tmp_path, text)
    assert rc == 0, err
    assert "no pulse response at [budget] data_rate" in err
    doc = loads(out)
    assert doc["time_domain"]["pulse"] is None
    assert doc["time_domain"]["step"]


def test_pulse_cursors_are_never_extrapolated_beyond_the_time_window():
    """The pulse response of an ideal delay line is the pulse itself: a main cursor of the
    pulse's amplitude and zero elsewhere (exact by construction). Cursors that fell outside
    the window used to be extrapolated from its edge (values of 5 to 1e4 V for a 1 V
    pulse); the window repeats, so they are read where the period puts them."""
    from losslane.network.timedomain import time_domain

    f = np.linspace(0, 20e6 * 400, 401)  # window 50 ns
    s = np.zeros((f.size, 2, 2), complex)
    s[:, 1, 0] = s[:, 0, 1] = np.exp(-2j * np.pi * f * 1e-10)
    for ui in (2e-9, 15e-9):  # the cursors inside the window, and spilling over it
        p = time_domain(f, s, data_rate=1 / ui).pulse
        assert abs(p.main_cursor - 1.0) < 0.02
        assert max(abs(x) for x in (p.pre_cursor, *p.post_cursors)) < 0.02 + (ui > 5e-9)


# --- inspect, extract, fit -----------------------------------------------------------------


def test_inspect_names_the_file_whose_data_cannot_be_judged(capsys, tmp_path):
    f = np.array([0.0, 5e9])
    p = tmp_path / "two.s2p"
    p.write_text(touchstone_text(f, lossy_line_s(f, 50, 50, 0.01, 1e-10), "ri", "Hz", 1, 50.0))
    rc, out, err = run_cli(capsys, "inspect", str(p), "--json")
    assert rc == 2
    assert str(p) in error_line(err)


@pytest.mark.parametrize(("option", "value"), [("--rise-time", "1us"), ("--data-rate", "10Mb/s")])
def test_inspect_refuses_a_stimulus_longer_than_its_window(capsys, tmp_path, option, value):
    f = np.linspace(0, 20e9, 201)  # step 100 MHz: window 10 ns
    p = tmp_path / "line.s2p"
    p.write_text(touchstone_text(f, lossy_line_s(f, 50, 50, 0.01, 1e-10), "ri", "Hz", 1, 50.0))
    rc, out, err = run_cli(capsys, "inspect", str(p), option, value, "--json")
    assert rc == 2 and out == ""
    assert f"{option} = '{value}'" in error_line(err)


def test_extract_names_a_coupon_without_transmission(capsys, tmp_path):
    """Uncoupled legs numbered in-in-out-out, read as in-out-in-out: S21 is exactly 0."""
    f = np.linspace(1e8, 10e9, 50)
    for k, inches in enumerate((2.0, 5.0)):
        s = coupon_s(f, Line(50.0, 0.01, 1.6e-10), inches, 4, 50.0)
        (tmp_path / f"c{k}.s4p").write_text(touchstone_text(f, s, "ri", "Hz", 1, 50.0))
    rc, out, err = run_cli(
        capsys,
        "extract",
        str(tmp_path / "c0.s4p"),
        str(tmp_path / "c1.s4p"),
        "--lengths",
        "2,5in",
        "--order",
        "in-out-in-out",
        "--json",
    )
    assert rc == 2
    msg = error_line(err)
    assert "'c0.s4p'" in msg and "in-out-in-out" in msg, msg


def test_fit_messages_name_the_command_line_options(capsys, tmp_path):
    f = np.linspace(1e8, 10e9, 50)
    files = []
    for k, inches in enumerate((2.0, 5.0)):
        p = tmp_path / f"c{k}.s2p"
        s = coupon_s(f, Line(50.0, 0.01, 1.6e-10), inches, 2, 50.0)
        p.write_text(touchstone_text(f, s, "ri", "Hz", 1, 50.0))
        files.append(str(p))
    rc, out, err = run_cli(
        capsys,
        "fit",
        *files,
        "--lengths",
        "2,5in",
        "stripline",
        "--width",
        "5mil",
        "--thickness",
        "0.6mil",
        "--below",
        "6mil",
        "--above",
        "6mil",
        "--dielectric",
        "low-loss",
        "--foil",
        "hyper-low-profile",
        "--foil-model",
        "hammerstad",
        "--vary",
        "dk,df",
    )
    assert rc == 2
    msg = error_line(err)
    assert "--foil-model hammerstad" in msg and "--vary" in msg and "foil_model" not in msg


# --- board dimensions ----------------------------------------------------------------------


@pytest.mark.parametrize(
    ("old", "new", "needle"),
    [
        (
            'thickness = "5 mil" },\n  { name = "L2"',
            'thickness = "2 m" },\n  { name = "L2"',
            "layer 'core'.thickness = '2 m'",
        ),
        ('drill = "8 mil"', 'drill = "5 m"', "via.drill = '5 m'"),
        ('antipad = "30 mil"', 'antipad = "9000 m"', "via.antipad = '9000 m'"),
        ('width = "7 mil"', 'width = "9000 m"', "[lines.ms].width = '9000 m'"),
        ('spacing = "6 mil" }', 'spacing = "2 m" }', "spacing = '2 m'"),
    ],
)
def test_board_dimensions_beyond_a_metre_are_refused(capsys, tmp_path, old, new, needle):
    """The README's input limits bound every board dimension to 1 nm .. 1 m; stackup
    layers, drilled vias, lines on layers and group traces took any length to 10 km."""
    text = (
        SWEEP_20
        + STACK % "low-loss"
        + GROUP.replace(
            "[[channel]]",
            '[[channel]]\nvia = { from = "L2", to = "L4", '
            'drill = "8 mil", antipad = "30 mil", pad = "18 mil" }\n[[channel]]',
        )
    )
    assert old in text
    msg = refused(capsys, tmp_path, text.replace(old, new, 1))
    assert needle in msg and "board dimension" in msg, msg


# --- sweeps --------------------------------------------------------------------------------

BASE_PLAN = """
name = "t"
%s
[base]
kind = "microstrip"
width = "5 mil"
height = "4 mil"
thickness = "1.4 mil"
dielectric = "low-loss"
[vary]
width = ["5 mil", "6 mil"]
[results]
at = ["1 GHz"]
"""


def sweep(capsys, tmp_path: Path, plan: str, *extra: str) -> tuple[int, str, str]:
    (tmp_path / "plan.toml").write_text(plan, encoding="utf-8")
    return run_cli(
        capsys,
        "sweep",
        str(tmp_path / "plan.toml"),
        "--out",
        str(tmp_path / "t.parquet"),
        "--workers",
        "0",
        "--no-plots",
        "--json",
        *extra,
    )


@pytest.mark.parametrize(
    ("top", "needle"),
    [
        ("scheduler = 3", "scheduler = 3"),
        ('workers = "x"', "workers = 'x'"),
        ("chunk = 0", "chunk = 0"),
        ("library = 3", "library = 3"),
        ('together = [[{ a = 1 }, "width"]]', "together"),
    ],
)
def test_plan_keys_of_the_wrong_type_are_refused_naming_them(capsys, tmp_path, top, needle):
    rc, out, err = sweep(capsys, tmp_path, BASE_PLAN % top)
    assert rc == 2, err
    assert needle in error_line(err)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plan.toml"]


@pytest.mark.parametrize(
    ("old", "new", "needle"),
    [
        ("[base]\nkind", "[vary.x]\nkind", "[base] = 'x'"),
        ('at = ["1 GHz"]', "at = 3", "[results].at = 3"),
        ('thickness = "1.4 mil"', 'thickness = "1.4 mil"\nwidht = "5 mil"', "[base]: unknown key"),
        ('at = ["1 GHz"]', 'at = ["1 GHz"]\ntouchstone = "yes"', "[results].touchstone"),
    ],
)
def test_plan_sections_of_the_wrong_type_are_refused_naming_them(
    capsys, tmp_path, old, new, needle
):
    top = 'base = "x"' if new.startswith("[vary.x]") else ""
    rc, out, err = sweep(capsys, tmp_path, (BASE_PLAN % top).replace(old, new))
    assert rc == 2, err
    assert needle in error_line(err)


def test_workers_zero_runs_here_whatever_scheduler_the_plan_names(capsys, tmp_path):
    """--workers 0 used to be overridden by the plan's scheduler (a connection attempt to
    an address nothing listens on)."""
    rc, out, err = sweep(capsys, tmp_path, BASE_PLAN % 'scheduler = "tcp://127.0.0.1:9"')
    assert rc == 0, err
    assert json.loads(out)["cases"] == 2


def test_a_refused_sweep_leaves_no_parts_folder(capsys, tmp_path):
    """A base value found bad while the cases run (a bare number for a length) is a bad
    plan (exit 2); the parts folder the run had begun is removed."""
    rc, out, err = sweep(capsys, tmp_path, (BASE_PLAN % "").replace('"1.4 mil"', "3"))
    assert rc == 2, err
    assert "[base].thickness = 3" in error_line(err)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plan.toml"]


def test_scenario_sweeps_write_nothing_outside_their_scratch_folder(capsys, tmp_path):
    """An imported model named "../<dir>/m.s2p" was written beside the worker's scratch
    folder (into the system's temporary directory); a [compare] measurement was not
    shipped at all (every case failed)."""
    unique = f"hostile-{uuid.uuid4().hex}"
    (tmp_path / unique).mkdir()
    (tmp_path / "lane").mkdir()
    f = np.linspace(0, 20e9, 41)
    s = lossy_line_s(f, 50.0, 50.0, 0.01, 1e-10)
    (tmp_path / unique / "m.s2p").write_text(touchstone_text(f, s, "ri", "Hz", 1, 50.0))
    (tmp_path / "lane" / "meas.s2p").write_text(touchstone_text(f, s, "ri", "Hz", 1, 50.0))
    scenario = SMALL + (
        f'\n[[channel]]\ntouchstone = "../{unique}/m.s2p"\n\n[compare]\nmeasured = "meas.s2p"\n'
    )
    (tmp_path / "lane" / "lane.toml").write_text(scenario, encoding="utf-8")
    plan = 'scenario = "lane.toml"\n[vary]\n"channel.1.length" = ["1 in", "2 in"]\n'
    rc, out, err = sweep(capsys, tmp_path / "lane", plan)
    assert rc == 0, err
    doc = json.loads(out)
    assert doc["cases"] == 2 and doc["failed"] == 0
    assert not (Path(tempfile.gettempdir()) / unique).exists()
    net = read_touchstone(tmp_path / unique / "m.s2p")  # the original, untouched
    assert net.f.size == 41


@pytest.mark.parametrize("out", ["/proc/t.csv", "{dir}/no/such/t.csv", "{dir}"])
def test_sweep_output_follows_the_rule_of_output_locations(capsys, tmp_path, out):
    """A table in a place that cannot be written (/proc) crashed when its parts folder
    was made; the sweep checks --out as every command does, before any work."""
    (tmp_path / "plan.toml").write_text(BASE_PLAN % "", encoding="utf-8")
    target = out.replace("{dir}", str(tmp_path / "t.csv" if out == "{dir}" else tmp_path))
    if out == "{dir}":
        Path(target).mkdir()
    before = sorted(tmp_path.rglob("*"))
    rc, _, err = run_cli(
        capsys, "sweep", str(tmp_path / "plan.toml"), "--out", target, "--workers", "0"
    )
    assert rc == 2
    assert "--out" in error_line(err)
    assert sorted(tmp_path.rglob("*")) == before


def test_fit_messages_speak_of_options_and_the_extraction_not_keywords(capsys, tmp_path):
    """Coupons 1 and 9 in long on a 0.5 GHz grid: the phase of their 8 in difference turns
    by more than pi between points, so the extraction flags (nearly) every point. The fit's
    refusals came out in its Python keywords ("band = (1e8, 1e8) Hz is not valid") although
    the user gave no band."""
    f = np.linspace(1e8, 20e9, 40)
    files = []
    for k, inches in enumerate((1.0, 9.0)):
        p = tmp_path / f"c{k}.s2p"
        s = coupon_s(f, Line(50.0, 0.01, 1.6e-10), inches, 2, 50.0)
        p.write_text(touchstone_text(f, s, "ri", "Hz", 1, 50.0))
        files.append(str(p))
    line = ["stripline", "--width", "5mil", "--thickness", "0.6mil", "--below", "6mil"]
    line += ["--above", "6mil", "--dielectric", "low-loss", "--vary", "dk,df"]
    rc, out, err = run_cli(capsys, "fit", *files, "--lengths", "1,9in", *line)
    assert rc == 2
    msg = error_line(err)
    assert "usable band" in msg and "--band" in msg and "band = " not in msg, msg
    rc, out, err = run_cli(
        capsys, "fit", *files, "--lengths", "1,9in", *line, "--band", "1GHz,5GHz"
    )
    assert rc == 2
    assert error_line(err).startswith("error: --band = "), err

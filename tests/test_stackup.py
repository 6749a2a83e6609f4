"""Stackups (losslane.stackup) and lines placed on their layers (xsection.on_layer).

Outside references: the arithmetic of the stackup itself (a dielectric's thickness is face
to face between its copper layers, so a trace's height is the sum of the layers between
it and its plane -- the fabricator's stackup convention, common practice), exact unit
definitions (1 mil = 25.4 um, 1 oz copper = 34.8 um: common practice), and the explicit
line keys the README documents: a line placed on a layer must be the very line written
with the same heights, so its S-parameters agree to 1e-12.
"""

from __future__ import annotations

import json

import numpy as np
import pytest
from cli_helpers import run

from losslane import api
from losslane.channel import build_channel
from losslane.errors import LossLaneError
from losslane.materials.library import load_library
from losslane.scenario import parse_scenario
from losslane.stackup import parse_stackup

MIL = 25.4e-6

HEAD = """
name = "board"
[sweep]
start = "0 Hz"
stop = "20 GHz"
points = 81
"""

# an invented 10-layer board: homogeneous laminate, no mask (every line closed form)
BOARD = """
[stackup]
layers = [
  { name = "L1", conductor = "signal", thickness = "1.6 mil", foil = "very-low-profile" },
  { name = "pp1", dielectric = "low-loss", thickness = "3.5 mil" },
  { name = "L2", conductor = "plane", thickness = "1.2 mil" },
  { name = "core1", dielectric = "low-loss", thickness = "5 mil" },
  { name = "L3", conductor = "signal", thickness = "0.6 mil", foil = "very-low-profile" },
  { name = "pp2", dielectric = "low-loss", thickness = "6 mil" },
  { name = "L4", conductor = "plane", weight = "1 oz" },
  { name = "core2", dielectric = "low-loss", thickness = "5 mil" },
  { name = "L5", conductor = "signal", thickness = "0.6 mil" },
  { name = "pp3", dielectric = "low-loss", thickness = "8 mil" },
  { name = "L6", conductor = "signal", thickness = "0.6 mil" },
  { name = "core3", dielectric = "low-loss", thickness = "5 mil" },
  { name = "L7", conductor = "plane", thickness = "1.2 mil" },
  { name = "pp4", dielectric = "low-loss", thickness = "5 mil" },
  { name = "L8", conductor = "signal", thickness = "0.6 mil" },
  { name = "core4", dielectric = "low-loss", thickness = "5 mil" },
  { name = "L9", conductor = "plane", thickness = "1.2 mil" },
  { name = "pp5", dielectric = "low-loss", thickness = "3.5 mil" },
  { name = "L10", conductor = "signal", thickness = "1.6 mil", foil = "very-low-profile" },
]
"""


def _stackup(text: str = BOARD):
    import tomllib

    lib = load_library()
    return parse_stackup("", tomllib.loads(text)["stackup"], lib.dielectric, lib.foil)


def _s(lines: str, channel: str) -> np.ndarray:
    sc = parse_scenario(HEAD + BOARD + lines + channel)
    return build_channel(sc).s


# --------------------------------------------------------------------- the stack itself


def test_positions_are_the_sum_of_the_layers_above():
    st = _stackup()
    # face-to-face arithmetic: L3's top face lies under L1, pp1, L2 and core1
    assert st.depth_top("L3") == pytest.approx((1.6 + 3.5 + 1.2 + 5) * MIL, rel=1e-15, abs=0)
    assert st.depth_centre("L3") == pytest.approx(
        (1.6 + 3.5 + 1.2 + 5 + 0.3) * MIL, rel=1e-15, abs=0
    )
    # 1 oz copper = 34.8 um (common practice)
    assert st.layer("L4", "layer").thickness == pytest.approx(34.8e-6, rel=1e-15, abs=0)
    total = (2 * 1.6 + 3 * 1.2 + 4 * 0.6 + 2 * 3.5 + 6 + 8 + 5 * 5) * MIL + 34.8e-6
    assert st.thickness == pytest.approx(total, rel=1e-14, abs=0)


def test_placement_finds_the_nearest_planes_and_the_layers_between():
    st = _stackup()
    top = st.place("L1", "layer")
    assert top.outer == "top" and top.plane_below.name == "L2" and top.plane_above is None
    assert top.distance_below == pytest.approx(3.5 * MIL, rel=1e-12, abs=0)
    bottom = st.place("L10", "layer")
    assert bottom.outer == "bottom" and bottom.plane_above.name == "L9"
    assert bottom.distance_above == pytest.approx(3.5 * MIL, rel=1e-12, abs=0)
    inner = st.place("L3", "layer")
    assert (inner.plane_above.name, inner.plane_below.name) == ("L2", "L4")
    assert inner.distance_above == pytest.approx(5 * MIL, rel=1e-12, abs=0)
    assert inner.distance_below == pytest.approx(6 * MIL, rel=1e-12, abs=0)
    # L5 reaches its lower plane L7 through pp3, the copper of L6 and core3
    dual = st.place("L5", "layer")
    assert [ly.name for ly in dual.below] == ["pp3", "L6", "core3"]
    assert dual.distance_below == pytest.approx((8 + 0.6 + 5) * MIL, rel=1e-12, abs=0)


# ----------------------------------------------- lines on layers = the explicit lines

EQUIVALENTS = {
    "microstrip on the top layer": (
        'kind = "microstrip"\nlayer = "L1"\nwidth = "7 mil"',
        'kind = "microstrip"\nwidth = "7 mil"\nheight = "3.5 mil"\nthickness = "1.6 mil"\n'
        'dielectric = "low-loss"\nfoil = "very-low-profile"\nplane_thickness = "1.2 mil"',
    ),
    "microstrip on the bottom layer": (
        'kind = "microstrip"\nlayer = "L10"\nwidth = "7 mil"',
        'kind = "microstrip"\nwidth = "7 mil"\nheight = "3.5 mil"\nthickness = "1.6 mil"\n'
        'dielectric = "low-loss"\nfoil = "very-low-profile"\nplane_thickness = "1.2 mil"',
    ),
    "offset stripline pair": (
        'kind = "stripline-pair"\nlayer = "L3"\nwidth = "5 mil"\nspacing = "7 mil"',
        'kind = "stripline-pair"\nwidth = "5 mil"\nspacing = "7 mil"\nbelow = "6 mil"\n'
        'above = "5 mil"\nthickness = "0.6 mil"\ndielectric = "low-loss"\n'
        'foil = "very-low-profile"\nplane_thickness = "1.2 mil"',
    ),
    "centred stripline, the given thickness and foil win": (
        'kind = "stripline"\nlayer = "L8"\nwidth = "4.5 mil"\nthickness = "0.7 mil"\n'
        'foil = "standard-ed"',
        'kind = "stripline"\nwidth = "4.5 mil"\nbelow = "5 mil"\nabove = "5 mil"\n'
        'thickness = "0.7 mil"\ndielectric = "low-loss"\nfoil = "standard-ed"\n'
        'plane_thickness = "1.2 mil"',
    ),
    "stripline past a copper layer, the thinner plane's thickness": (
        'kind = "stripline"\nlayer = "L5"\nwidth = "8 mil"',
        'kind = "stripline"\nwidth = "8 mil"\nbelow = "13.6 mil"\nabove = "5 mil"\n'
        'thickness = "0.6 mil"\ndielectric = "low-loss"\nplane_thickness = "1.2 mil"',
    ),
    "grounded coplanar on the top layer": (
        'kind = "gcpw"\nlayer = "L1"\nwidth = "10 mil"\ngap = "6 mil"',
        'kind = "gcpw"\nwidth = "10 mil"\ngap = "6 mil"\nheight = "3.5 mil"\n'
        'thickness = "1.6 mil"\ndielectric = "low-loss"\nfoil = "very-low-profile"\n'
        'plane_thickness = "1.2 mil"',
    ),
}


@pytest.mark.parametrize("case", list(EQUIVALENTS))
def test_a_line_on_a_layer_is_its_explicit_equivalent(case):
    placed, explicit = EQUIVALENTS[case]
    chan = '[[channel]]\nline = "x"\nlength = "3 in"\n'
    a = _s(f"[lines.x]\n{placed}\n", chan)
    b = _s(f"[lines.x]\n{explicit}\n", chan)
    # the stackup's heights are the explicit keys (face-to-face arithmetic): same S
    np.testing.assert_allclose(a, b, rtol=0, atol=1e-12)
    assert np.max(np.abs(a[:, a.shape[1] // 2, 0])) > 0.1  # a real line, not two empty results


MASKED = BOARD.replace(
    "layers = [\n",
    'layers = [\n  { name = "sm-top", mask = "solder-mask", thickness = "0.8 mil" },\n',
)


def test_a_masked_outer_line_is_the_explicit_coated_field_solve():
    placed = '[lines.x]\nkind = "microstrip"\nlayer = "L1"\nwidth = "7 mil"\n'
    explicit = (
        '[lines.x]\nkind = "microstrip"\nwidth = "7 mil"\nheight = "3.5 mil"\n'
        'thickness = "1.6 mil"\ndielectric = "low-loss"\nfoil = "very-low-profile"\n'
        'plane_thickness = "1.2 mil"\nsolver = "field"\ncoating_thickness = "0.8 mil"\n'
        'coating_dielectric = "solder-mask"\n'
    )
    chan = '[[channel]]\nline = "x"\nlength = "2 in"\n'
    a = parse_scenario(HEAD + MASKED + placed + chan)
    b = parse_scenario(HEAD + MASKED + explicit + chan)
    assert a.line_models["x"].solver == "field"
    assert any("solder mask 'sm-top'" in n for n in a.line_models["x"].notes)
    np.testing.assert_allclose(build_channel(a).s, build_channel(b).s, rtol=0, atol=1e-12)


MIXED = BOARD.replace(
    '{ name = "pp2", dielectric = "low-loss", thickness = "6 mil" }',
    '{ name = "pp2", dielectric = "epoxy-glass-midloss", thickness = "6 mil" }',
)


def test_core_and_prepreg_of_different_dk_take_the_field_solver():
    # L3 lies between core1 (low-loss, above) and pp2 of another Dk (below): the stackup's
    # layers are the explicit dielectric (under the trace) and dielectric_above (embedding
    # it, as the default fill = "above" says) of the field solver's stripline
    placed = '[lines.x]\nkind = "stripline"\nlayer = "L3"\nwidth = "5 mil"\n'
    explicit = (
        '[lines.x]\nkind = "stripline"\nwidth = "5 mil"\nbelow = "6 mil"\nabove = "5 mil"\n'
        'thickness = "0.6 mil"\ndielectric = "epoxy-glass-midloss"\n'
        'dielectric_above = "low-loss"\nfoil = "very-low-profile"\n'
        'plane_thickness = "1.2 mil"\nsolver = "field"\n'
    )
    chan = '[[channel]]\nline = "x"\nlength = "2 in"\n'
    a = parse_scenario(HEAD + MIXED + placed + chan)
    b = parse_scenario(HEAD + MIXED + explicit + chan)
    m = a.line_models["x"]
    assert m.solver == "field" and "different dielectrics" in " ".join(m.notes)
    np.testing.assert_allclose(build_channel(a).s, build_channel(b).s, rtol=0, atol=1e-12)


def test_the_build_says_which_model_each_line_used(tmp_path):
    text = (
        HEAD
        + MASKED
        + '[lines.outer]\nkind = "microstrip"\nlayer = "L1"\nwidth = "7 mil"\n'
        + '[lines.inner]\nkind = "stripline"\nlayer = "L5"\nwidth = "8 mil"\n'
        + '[[channel]]\nline = "outer"\nlength = "0.5 in"\n'
        + '[[channel]]\nline = "inner"\nlength = "2 in"\n'
    )
    p = tmp_path / "b.toml"
    p.write_text(text)
    built = api.build(p, out=tmp_path / "out", plots=False)
    data = json.loads(json.dumps(built.to_json()))
    by = {m["name"]: m for m in data["lines"]}
    assert by["outer"]["solver"] == "field" and by["outer"]["layer"] == "L1"
    assert by["inner"]["solver"] == "closed-form"
    # the copper layer between L5 and its plane is said to be filled
    assert any("L6" in n and "filled" in n for n in by["inner"]["notes"])
    from losslane.report.channel import build_text

    text_out = build_text(built)
    assert "line outer: microstrip on L1, 2-D field solver" in text_out
    assert "line inner: stripline on L5, closed form" in text_out


def test_line_json_names_its_solver():
    closed = api.line(
        "microstrip",
        at="1GHz",
        width="7mil",
        height="3.5mil",
        thickness="1.4mil",
        dielectric="low-loss",
    )
    assert closed.to_json()["solver"] == "closed-form"


# ---------------------------------------------------------------- several boards


def test_named_stackups_and_a_library_file_shared_by_scenarios(tmp_path):
    (tmp_path / "host.toml").write_text(BOARD.replace("[stackup]", "[stackups.host]"))
    small = """
[stackup]
layers = [
  { name = "T", conductor = "signal", thickness = "1.4 mil" },
  { name = "c", dielectric = "epoxy-glass-midloss", thickness = "4 mil" },
  { name = "G", conductor = "plane", thickness = "1.4 mil" },
]
"""
    text = (
        'library = ["host.toml"]\n'
        + HEAD
        + small
        + '[lines.a]\nkind = "microstrip"\nlayer = "T"\nwidth = "8 mil"\n'
        + '[lines.b]\nkind = "stripline"\nstackup = "host"\nlayer = "L8"\nwidth = "4.5 mil"\n'
        + '[[channel]]\nline = "a"\nlength = "1 in"\n[[channel]]\nline = "b"\nlength = "1 in"\n'
    )
    sc = parse_scenario(text, base=tmp_path)
    assert sc.lines["a"].height == pytest.approx(4 * MIL, rel=1e-12, abs=0)
    assert sc.lines["b"].below == pytest.approx(5 * MIL, rel=1e-12, abs=0)
    assert sc.line_models["b"].stackup == "host"
    # without [stackup] and with two named boards, a line must name one
    two = BOARD.replace("[stackup]", "[stackups.a]") + BOARD.replace("[stackup]", "[stackups.b]")
    with pytest.raises(LossLaneError, match=r"several stackups.*\[lines.x\].stackup"):
        parse_scenario(
            HEAD + two + '[lines.x]\nkind = "stripline"\nlayer = "L3"\nwidth = "4 mil"\n'
            '[[channel]]\nline = "x"\nlength = "1 in"\n'
        )


# ------------------------------------------------------------------- bad input

BAD_STACKS = {
    "duplicate name": (('name = "L5"', 'name = "L3"'), "'L3'", "used twice"),
    "zero thickness": (('thickness = "8 mil"', 'thickness = "0 mil"'), "'pp3'", "> 0"),
    "adjacent copper": (
        ('  { name = "pp3", dielectric = "low-loss", thickness = "8 mil" },\n', ""),
        "'L5' and 'L6'",
        "adjacent",
    ),
    "mask inside": (
        (
            'dielectric = "low-loss", thickness = "8 mil"',
            'mask = "solder-mask", thickness = "8 mil"',
        ),
        "'pp3'",
        "outside",
    ),
    "two roles": (
        (
            'name = "L5", conductor = "signal"',
            'name = "L5", dielectric = "low-loss", conductor = "signal"',
        ),
        "'L5'",
        "exactly one",
    ),
}


@pytest.mark.parametrize("case", list(BAD_STACKS))
def test_bad_stackups_name_the_layer(case):
    (old, new), layer, words = BAD_STACKS[case]
    board = BOARD.replace(old, new, 1)
    assert board != BOARD
    with pytest.raises(LossLaneError) as exc:
        _stackup(board)
    assert layer in str(exc.value) and words in str(exc.value), str(exc.value)


def test_no_plane_is_an_error():
    text = """
[stackup]
layers = [
  { name = "A", conductor = "signal", thickness = "1 mil" },
  { name = "d", dielectric = "low-loss", thickness = "4 mil" },
  { name = "B", conductor = "signal", thickness = "1 mil" },
]
"""
    with pytest.raises(LossLaneError, match="no plane layer"):
        _stackup(text)


BAD_LINES = {
    "a line on a dielectric layer": (
        'kind = "stripline"\nlayer = "pp2"\nwidth = "4 mil"',
        ["'pp2'", "dielectric layer", "signal layer"],
    ),
    "a line on a plane": ('kind = "stripline"\nlayer = "L4"\nwidth = "4 mil"', ["'L4'", "plane"]),
    "microstrip on an inner layer": (
        'kind = "microstrip"\nlayer = "L3"\nwidth = "4 mil"',
        ["'microstrip'", "'L3'", "inner layer", "stripline"],
    ),
    "stripline on an outer layer": (
        'kind = "stripline-pair"\nlayer = "L1"\nwidth = "4 mil"\nspacing = "5 mil"',
        ["'stripline-pair'", "'L1'", "outer (top) layer", "microstrip-pair"],
    ),
    "heights and layer mixed": (
        'kind = "stripline"\nlayer = "L3"\nwidth = "4 mil"\nbelow = "5 mil"',
        ["below", "not both"],
    ),
    "unknown layer": ('kind = "stripline"\nlayer = "L33"\nwidth = "4 mil"', ["'L33'", "'L3'"]),
    "the mask from the line": (
        'kind = "microstrip"\nlayer = "L1"\nwidth = "4 mil"\ncoating_thickness = "1 mil"',
        ["coating_thickness", "stackup"],
    ),
    "closed form where none fits": (
        'kind = "stripline"\nlayer = "L3"\nwidth = "4 mil"\nsolver = "closed-form"',
        ["closed-form", "different dielectrics"],
    ),
}


@pytest.mark.parametrize("case", list(BAD_LINES))
def test_bad_lines_on_layers_name_both(case):
    spec, words = BAD_LINES[case]
    board = MIXED if "closed form" in case else BOARD
    text = HEAD + board + f"[lines.x]\n{spec}\n" + '[[channel]]\nline = "x"\nlength = "1 in"\n'
    with pytest.raises(LossLaneError) as exc:
        parse_scenario(text)
    for w in words:
        assert w in str(exc.value), str(exc.value)


def _cli_bad(tmp_path, capsys, channel: str, fragment: list[str]):
    (tmp_path / "s").mkdir()
    scen = tmp_path / "s" / "bad.toml"
    scen.write_text(HEAD + BOARD + channel)
    out = tmp_path / "o"
    code, stdout, err = run(capsys, "build", str(scen), "--out", str(out))
    assert code == 2 and "Traceback" not in err and stdout == ""
    line = err.strip().splitlines()
    assert len(line) == 1 and line[0].startswith("error: ")
    for frag in fragment:
        assert frag in line[0], line[0]
    assert not out.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["s"]


def test_cli_line_on_a_dielectric_layer(tmp_path, capsys):
    _cli_bad(
        tmp_path,
        capsys,
        '[lines.x]\nkind = "stripline"\nlayer = "core2"\nwidth = "4 mil"\n'
        '[[channel]]\nline = "x"\nlength = "1 in"\n',
        ["[lines.x].layer = 'core2'", "dielectric layer"],
    )


def test_cli_via_from_a_layer_below_its_end(tmp_path, capsys):
    _cli_bad(
        tmp_path,
        capsys,
        '[[channel]]\nvia = { from = "L8", to = "L3", drill = "8 mil", antipad = "26 mil" }\n',
        ["from = 'L8'", "below", "to = 'L3'"],
    )


def test_cli_backdrill_above_the_exit_layer(tmp_path, capsys):
    _cli_bad(
        tmp_path,
        capsys,
        '[[channel]]\nvia = { from = "L1", to = "L5", drill = "8 mil", antipad = "26 mil", '
        'backdrill = "L4" }\n',
        ["backdrill = 'L4'", "above the exit layer 'L5'"],
    )


def test_fill_below_embeds_the_trace_in_the_lower_sheet():
    # L3 between core1 (Dk 3.6, above) and pp2 (Dk 3.9, below): with fill = "below" the
    # trace's copper thickness sits in pp2, so more of its field is in the higher Dk and
    # its impedance is lower (a larger capacitance per length, TEM: Z = sqrt(L/C))
    fill_below = MIXED.replace(
        '{ name = "L3", conductor = "signal", thickness = "0.6 mil", foil = "very-low-profile" }',
        '{ name = "L3", conductor = "signal", thickness = "0.6 mil", fill = "below" }',
    )
    assert fill_below != MIXED
    line = '[lines.x]\nkind = "stripline"\nlayer = "L3"\nwidth = "5 mil"\n'
    chan = '[[channel]]\nline = "x"\nlength = "1 in"\n'
    above = parse_scenario(HEAD + MIXED + line + chan).lines["x"]
    below = parse_scenario(HEAD + fill_below + line + chan).lines["x"]
    lo = below.geometry.layers
    assert [ly.name for ly in lo] == ["pp2", "core1"]
    assert lo[0].thickness == pytest.approx(6.6 * MIL, rel=1e-12, abs=0)  # 6 mil + the copper
    assert below.geometry.signals[0].y == pytest.approx(6 * MIL, rel=1e-12, abs=0)
    f = np.array([1e9])
    assert below.line_values(f).main.z0[0] < above.line_values(f).main.z0[0]

"""The scenario loader (losslane.scenario): every section of the format documented in the
README ("Writing a scenario"), and the promise that bad input is an error naming the
section, the key and the value, saying what would be valid, and suggesting the closest key
or name for a typo.

Values are checked against exact unit definitions (1 in = 25.4 mm and 1 mil = 0.001 in by
international agreement, 1959; SI prefixes) and the trade's rule Nyquist = baud / 2 with
PAM4 carrying 2 bits per symbol (common practice).
"""

from __future__ import annotations

import shutil
from pathlib import Path

import numpy as np
import pytest

from losslane.errors import LossLaneError
from losslane.materials.dielectric import ConstantDielectric, WidebandDebye
from losslane.materials.roughness import Hammerstad, Smooth
from losslane.scenario import load_scenario, parse_scenario
from losslane.xsection.coplanar import Coplanar
from losslane.xsection.microstrip import Microstrip
from losslane.xsection.stripline import Stripline

MODELS = Path(__file__).resolve().parents[1] / "src" / "losslane" / "data" / "models"

# exact unit definitions (international yard and pound agreement, 1959; SI prefixes)
INCH = 0.0254
MIL = INCH / 1000

# Every section of the README's format, with the README's own values.
BASE = """
name = "radio feed"

[sweep]
start = "0 Hz"
stop = "12 GHz"
step = "10 MHz"

[ports]
reference = "50 ohm"

[dielectrics.core]
dk = 3.48
df = 0.0037
at = "10 GHz"

[foils.treated]
model = "hammerstad"
rq = "0.7 um"

[lines.feed]
kind = "gcpw"
width = "42 mil"
gap = "8 mil"
height = "20 mil"
thickness = "1.4 mil"
dielectric = "core"
foil = "treated"

[lines.inner]
kind = "stripline"
width = "5 mil"
thickness = "0.6 mil"
below = "6 mil"
above = "7 mil"
dielectric = "low-loss"
foil = "very-low-profile"

[[channel]]
line = "feed"
length = "3.2 in"
name = "feed to filter"

[[channel]]
shunt = { capacitance = "0.15 pF" }

[[channel]]
capacitor = { value = "10 pF", esl = "0.3 nH", esr = "0.1 ohm" }

[[channel]]
series = { resistance = "0 ohm", inductance = "0.2 nH" }

[[channel]]
via = { barrel = "60 mil", stub = "12 mil", impedance = "48 ohm", dielectric = "core" }

[[channel]]
line = "inner"
length = "25 mm"

[budget]
data_rate = "16 Gb/s"
modulation = "nrz"
max_loss = "16 dB"

[[budget.check]]
at = "5.8 GHz"
max_loss = "1.5 dB"
min_return_loss = "12 dB"
"""


def parse(text: str = BASE, base: Path | str = "."):
    return parse_scenario(text, base=base)


def edit(old: str, new: str, text: str = BASE) -> str:
    """``text`` with ``old`` replaced once (and asserted present, so a stale edit fails)."""
    assert text.count(old) == 1, f"{old!r} not found exactly once in the base scenario"
    return text.replace(old, new)


def error(text: str, base: Path | str = ".") -> str:
    with pytest.raises(LossLaneError) as info:
        parse(text, base)
    return str(info.value)


# ---------------------------------------------------------------- every section, parsed


def test_name_and_ports():
    sc = parse()
    assert sc.name == "radio feed"
    assert sc.ports.reference == 50.0
    assert sc.ports.order == "in-in-out-out"  # the default 4-port numbering
    sc = parse(edit('reference = "50 ohm"', 'reference = "42.5 ohm"\norder = "in-out-in-out"'))
    assert sc.ports.reference == 42.5
    assert sc.ports.order == "in-out-in-out"


def test_name_defaults_to_the_file_name(tmp_path):
    p = tmp_path / "lane-a.toml"
    p.write_text(edit('name = "radio feed"\n', ""))
    assert load_scenario(p).name == "lane-a"


def test_sweep_by_step_includes_both_ends_and_dc():
    f = parse().frequencies()
    # 0..12 GHz in 10 MHz steps: 1200 steps, 1201 points (README: "or: points = 1201")
    assert f.size == 1201
    assert f[0] == 0.0 and f[-1] == 12e9
    assert np.allclose(np.diff(f), 10e6, rtol=1e-9, atol=0)


def test_sweep_by_points_gives_the_same_grid():
    by_points = parse(edit('step = "10 MHz"', "points = 1201")).frequencies()
    assert np.allclose(by_points, parse().frequencies(), rtol=0, atol=1e-3)


def test_sweep_units_are_caseless_and_prefixed():
    sc = parse(edit('start = "0 Hz"\nstop = "12 GHz"', 'start = "10 mhz"\nstop = "1.2 ghz"'))
    assert sc.sweep.start == 10e6 and sc.sweep.stop == 1.2e9  # SI prefixes
    assert sc.sweep.points == 120


def test_own_dielectric_and_foil():
    sc = parse()
    d = sc.dielectrics["core"]
    assert isinstance(d, WidebandDebye)  # the README's default: causal wideband Debye
    assert (d.dk, d.df, d.at) == (3.48, 0.0037, 10e9)
    # the fit reproduces the given values at the given frequency
    dk, df = d.dk_df(np.array([10e9]))
    assert dk[0] == pytest.approx(3.48, rel=1e-9) and df[0] == pytest.approx(0.0037, rel=1e-9)
    assert sc.foils["treated"] == Hammerstad(0.7e-6)
    sc = parse(edit('at = "10 GHz"', 'at = "10 GHz"\nmodel = "constant"'))
    assert isinstance(sc.dielectrics["core"], ConstantDielectric)


def test_lines_take_exact_units_and_resolve_materials():
    sc = parse()
    feed = sc.lines["feed"]
    assert isinstance(feed, Coplanar) and feed.grounded  # gcpw: grounded coplanar
    assert feed.width == pytest.approx(42 * MIL, rel=1e-15)
    assert feed.gap == pytest.approx(8 * MIL, rel=1e-15)
    assert feed.height == pytest.approx(20 * MIL, rel=1e-15)
    assert feed.thickness == pytest.approx(1.4 * MIL, rel=1e-15)
    assert feed.dielectric is sc.dielectrics["core"]  # the scenario's own section
    assert feed.metal.foil is sc.foils["treated"]
    inner = sc.lines["inner"]
    assert isinstance(inner, Stripline)
    assert (inner.below, inner.above) == pytest.approx((6 * MIL, 7 * MIL), rel=1e-15)
    # library names resolve from the bundled library
    assert inner.dielectric is sc.library.dielectrics["low-loss"]
    assert inner.metal.foil is sc.library.foils["very-low-profile"]


def test_line_foil_defaults_to_smooth_and_thickness_takes_oz():
    text = edit('foil = "very-low-profile"\n', "")
    text = edit('thickness = "0.6 mil"', 'thickness = "1 oz"', text)
    inner = parse(text).lines["inner"]
    assert isinstance(inner.metal.foil, Smooth)  # README: "foil (default smooth)"
    # 1 oz copper = 34.8 um (1.37 mil) thick (common practice)
    assert inner.thickness == pytest.approx(34.8e-6, rel=1e-12)


def test_microstrip_and_cpw_kinds():
    text = edit('kind = "gcpw"', 'kind = "cpw"')
    assert not parse(text).lines["feed"].grounded
    ms = """
[lines.top]
kind = "microstrip"
width = "6 mil"
thickness = "1.4 mil"
height = "3.5 mil"
dielectric = "core"
"""
    text = edit('[[channel]]\nline = "inner"', ms + '\n[[channel]]\nline = "top"')
    sc = parse(text)
    assert isinstance(sc.lines["top"], Microstrip)
    assert sc.channel[-1].section is sc.lines["top"]


def test_channel_segments_in_order_with_si_values():
    sc = parse()
    ch = sc.channel
    assert [s.type for s in ch] == ["line", "shunt", "capacitor", "series", "via", "line"]
    assert ch[0].name == "feed to filter"
    assert ch[0].values["length"] == pytest.approx(3.2 * INCH, rel=1e-15)
    assert ch[1].values == {"capacitance": pytest.approx(0.15e-12, rel=1e-12)}
    assert ch[2].values == pytest.approx({"value": 10e-12, "esl": 0.3e-9, "esr": 0.1}, rel=1e-12)
    assert ch[3].values == pytest.approx({"resistance": 0.0, "inductance": 0.2e-9}, abs=1e-24)
    assert ch[4].values == pytest.approx(
        {"barrel": 60 * MIL, "stub": 12 * MIL, "impedance": 48.0}, rel=1e-12
    )
    assert ch[4].dielectric is sc.dielectrics["core"]
    assert ch[5].values["length"] == pytest.approx(25e-3, rel=1e-15)
    # an unnamed line segment is labelled by its line
    assert ch[5].name == "inner"


def test_via_stub_defaults_to_zero_and_capacitor_parasitics_to_zero():
    text = edit('stub = "12 mil", ', "")
    text = edit('value = "10 pF", esl = "0.3 nH", esr = "0.1 ohm"', 'value = "10 pF"', text)
    ch = parse(text).channel
    assert ch[4].values["stub"] == 0.0
    assert ch[2].values == pytest.approx({"value": 10e-12, "esl": 0.0, "esr": 0.0}, abs=1e-24)


def test_repeated_segment_labels_are_numbered():
    text = edit('line = "inner"\nlength = "25 mm"', 'line = "feed"\nlength = "1 in"')
    text = edit('name = "feed to filter"\n', "", text)
    names = [s.name for s in parse(text).channel]
    assert names[0] == "feed (1)" and names[-1] == "feed (2)"


def test_budget_nyquist_nrz_and_pam4():
    b = parse().budget
    assert b.data_rate == 16e9 and b.max_loss == 16.0
    # Nyquist = baud / 2; NRZ carries 1 bit per symbol (common practice)
    assert b.nyquist == pytest.approx(8e9)
    assert len(b.checks) == 1
    c = b.checks[0]
    assert (c.at, c.max_loss, c.min_return_loss) == (5.8e9, 1.5, 12.0)
    b = parse(edit('modulation = "nrz"', 'modulation = "pam4"')).budget
    # PAM4 carries 2 bits per symbol: 16 Gb/s is 8 GBd, Nyquist 4 GHz (common practice)
    assert b.nyquist == pytest.approx(4e9)


def test_budget_is_optional():
    text = BASE[: BASE.index("[budget]")]
    assert parse(text).budget is None


def test_touchstone_segment_path_is_relative_to_the_scenario_file(tmp_path, monkeypatch):
    d = tmp_path / "project" / "lanes"
    (d / "models").mkdir(parents=True)
    shutil.copy(MODELS / "mezzanine-pin.s2p", d / "models" / "conn.s2p")
    scen = d / "lane.toml"
    scen.write_text(
        edit(
            '[[channel]]\nline = "inner"\nlength = "25 mm"',
            '[[channel]]\ntouchstone = "models/conn.s2p"',
        )
    )
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    monkeypatch.chdir(elsewhere)  # the working directory must not matter
    seg = load_scenario(Path("..") / "project" / "lanes" / "lane.toml").channel[-1]
    assert seg.type == "touchstone"
    assert seg.path == (d / "models" / "conn.s2p").resolve()
    assert seg.name == "conn"  # unnamed: labelled by the file


def test_touchstone_missing_file_says_paths_are_relative(tmp_path):
    text = edit(
        '[[channel]]\nline = "inner"\nlength = "25 mm"',
        '[[channel]]\ntouchstone = "models/none.s2p"',
    )
    msg = error(text, base=tmp_path)
    assert "[[channel]] #6.touchstone" in msg and "'models/none.s2p'" in msg
    assert str(tmp_path / "models" / "none.s2p") in msg
    assert "relative to the scenario file" in msg


def test_touchstone_needs_a_touchstone_extension(tmp_path):
    (tmp_path / "conn.txt").write_text("not a model")
    text = edit(
        '[[channel]]\nline = "inner"\nlength = "25 mm"', '[[channel]]\ntouchstone = "conn.txt"'
    )
    msg = error(text, base=tmp_path)
    assert "'conn.txt'" in msg and ".s2p" in msg


def test_touchstone_order_is_checked(tmp_path):
    shutil.copy(MODELS / "mezzanine-pin.s2p", tmp_path / "conn.s2p")
    text = edit(
        '[[channel]]\nline = "inner"\nlength = "25 mm"',
        '[[channel]]\ntouchstone = "conn.s2p"\norder = "in-in-in-out"',
    )
    msg = error(text, base=tmp_path)
    assert "[[channel]] #6.order" in msg and "'in-in-in-out'" in msg
    assert "'in-in-out-out'" in msg and "'in-out-in-out'" in msg


# ---------------------------------------------------------------- typos: closest key


TYPOS = [
    # (section as named in the message, text edit old -> new, typo, suggestion)
    ("scenario", ('name = "radio feed"', 'nmae = "radio feed"'), "nmae", "name"),
    ("[sweep]", ('stop = "12 GHz"', 'stpo = "12 GHz"'), "stpo", "stop"),
    ("[ports]", ('reference = "50 ohm"', 'refrence = "50 ohm"'), "refrence", "reference"),
    ("[dielectrics.core]", ("df = 0.0037", "dff = 0.0037"), "dff", "df"),
    ("[foils.treated]", ('rq = "0.7 um"', 'rqq = "0.7 um"'), "rqq", "rq"),
    ("[lines.feed]", ('width = "42 mil"', 'widht = "42 mil"'), "widht", "width"),
    ("[lines.inner]", ('below = "6 mil"', 'bellow = "6 mil"'), "bellow", "below"),
    ("[[channel]] #1", ('length = "3.2 in"', 'lenght = "3.2 in"'), "lenght", "length"),
    ("[[channel]] #1", ('line = "feed"', 'lin = "feed"'), "lin", "line"),
    (
        "[[channel]] #2.shunt",
        ('shunt = { capacitance = "0.15 pF" }', 'shunt = { capacitence = "0.15 pF" }'),
        "capacitence",
        "capacitance",
    ),
    ("[[channel]] #3.capacitor", ('esl = "0.3 nH"', 'esll = "0.3 nH"'), "esll", "esl"),
    (
        "[[channel]] #4.series",
        ('inductance = "0.2 nH"', 'inductnce = "0.2 nH"'),
        "inductnce",
        "inductance",
    ),
    ("[[channel]] #5.via", ('barrel = "60 mil"', 'barel = "60 mil"'), "barel", "barrel"),
    (
        "[[channel]] #5",
        ('via = { barrel = "60 mil"', 'nam = "v"\nvia = { barrel = "60 mil"'),
        "nam",
        "name",
    ),
    ("[budget]", ('max_loss = "16 dB"', 'max_los = "16 dB"'), "max_los", "max_loss"),
    (
        "[[budget.check]] #1",
        ('min_return_loss = "12 dB"', 'min_retrun_loss = "12 dB"'),
        "min_retrun_loss",
        "min_return_loss",
    ),
]


@pytest.mark.parametrize(("section", "change", "typo", "close"), TYPOS, ids=[t[2] for t in TYPOS])
def test_unknown_key_names_section_and_suggests_closest(section, change, typo, close):
    msg = error(edit(*change))
    assert msg.startswith(section), msg
    assert f"unknown key {typo!r}" in msg
    assert f"did you mean {close!r}?" in msg
    assert "valid keys:" in msg and close in msg.split("valid keys:")[1]


def test_unknown_key_without_a_close_match_lists_the_valid_keys():
    msg = error(edit('reference = "50 ohm"', 'reference = "50 ohm"\nzzzz = 1'))
    assert "unknown key 'zzzz'" in msg and "did you mean" not in msg
    assert "valid keys: reference, order" in msg


def test_segment_with_two_types_is_refused():
    msg = error(edit('length = "3.2 in"', 'length = "3.2 in"\nshunt = { capacitance = "1 pF" }'))
    assert msg.startswith("[[channel]] #1") and "exactly one of" in msg
    assert "line, shunt" in msg


# ---------------------------------------------------------------- missing units


UNITLESS = [
    ('length = "3.2 in"', "length = 3.2", "[[channel]] #1.length", "3.2", "length"),
    ('width = "42 mil"', "width = 42", "[lines.feed].width", "42", "length"),
    ('thickness = "1.4 mil"', 'thickness = "1.4"', "[lines.feed].thickness", "'1.4'", "length"),
    ('stop = "12 GHz"', "stop = 12e9", "[sweep].stop", "12000000000.0", "frequency"),
    ('at = "10 GHz"', "at = 10", "[dielectrics.core].at", "10", "frequency"),
    ('rq = "0.7 um"', "rq = 0.7", "[foils.treated].rq", "0.7", "length"),
    ('capacitance = "0.15 pF"', "capacitance = 0.15", "capacitance", "0.15", "capacitance"),
    ('barrel = "60 mil"', "barrel = 60", "[[channel]] #5.via.barrel", "60", "length"),
    ('esr = "0.1 ohm"', "esr = 0.1", "[[channel]] #3.capacitor.esr", "0.1", "resistance"),
    ('reference = "50 ohm"', "reference = 50", "[ports].reference", "50", "resistance"),
    ('data_rate = "16 Gb/s"', "data_rate = 16", "[budget].data_rate", "16", "data rate"),
    ('max_loss = "1.5 dB"', "max_loss = 1.5", "[[budget.check]] #1.max_loss", "1.5", "decibel"),
]


@pytest.mark.parametrize(
    ("old", "new", "key", "value", "kind"), UNITLESS, ids=[u[2] for u in UNITLESS]
)
def test_bare_number_is_refused_with_the_accepted_units(old, new, key, value, kind):
    msg = error(edit(old, new))
    assert key in msg and f"= {value}" in msg, msg
    assert f"not a {kind}" in msg
    assert "accepted units:" in msg and "e.g." in msg


def test_unknown_unit_is_named():
    msg = error(edit('length = "3.2 in"', 'length = "3.2 furlong"'))
    assert "[[channel]] #1.length = '3.2 furlong'" in msg
    assert "unknown length unit 'furlong'" in msg and "mil" in msg and "mm" in msg


# ---------------------------------------------------------------- unknown names


def test_unknown_library_dielectric_is_suggested():
    msg = error(edit('dielectric = "low-loss"', 'dielectric = "low-los"'))
    assert "[lines.inner].dielectric = 'low-los'" in msg
    assert "unknown dielectric" in msg and "did you mean 'low-loss'?" in msg
    # the known names include both the scenario's own and the library's
    assert "core" in msg and "epoxy-glass-midloss" in msg


def test_unknown_own_dielectric_is_suggested():
    msg = error(
        edit('dielectric = "core"\nfoil = "treated"', 'dielectric = "cor"\nfoil = "treated"')
    )
    assert "[lines.feed].dielectric = 'cor'" in msg and "did you mean 'core'?" in msg


def test_unknown_foil_is_suggested():
    msg = error(edit('foil = "very-low-profile"', 'foil = "very-low-profil"'))
    assert "[lines.inner].foil = 'very-low-profil'" in msg
    assert "unknown foil" in msg and "did you mean 'very-low-profile'?" in msg


def test_unknown_via_dielectric_is_suggested():
    msg = error(
        edit(
            'impedance = "48 ohm", dielectric = "core"', 'impedance = "48 ohm", dielectric = "coer"'
        )
    )
    assert "[[channel]] #5.via.dielectric = 'coer'" in msg and "did you mean 'core'?" in msg


def test_unknown_line_name_is_suggested():
    msg = error(edit('line = "feed"', 'line = "fed"'))
    assert "[[channel]] #1.line = 'fed'" in msg
    assert "no such [lines.*] section" in msg and "did you mean 'feed'?" in msg
    assert "known: feed, inner" in msg


def test_unknown_line_kind_is_suggested():
    msg = error(edit('kind = "gcpw"', 'kind = "gcpv"'))
    assert "[lines.feed].kind = 'gcpv'" in msg and "did you mean 'gcpw'?" in msg
    assert "microstrip" in msg and "stripline" in msg


def test_unknown_foil_model_lists_the_models():
    msg = error(edit('model = "hammerstad"', 'model = "hammerstadt"'))
    assert "[foils.treated].model = 'hammerstadt'" in msg
    for m in ("'none'", "'hammerstad'", "'groiss'", "'huray'", "'graded'"):
        assert m in msg


def test_unknown_modulation_lists_the_choices():
    msg = error(edit('modulation = "nrz"', 'modulation = "pam8"'))
    assert "[budget].modulation = 'pam8'" in msg and "'nrz'" in msg and "'pam4'" in msg


# ---------------------------------------------------------------- other bad values


def test_sweep_step_that_does_not_divide_the_range():
    msg = error(edit('step = "10 MHz"', 'step = "7 MHz"'))
    assert "[sweep].step = '7 MHz'" in msg and "does not divide" in msg
    assert "'0 Hz'..'12 GHz'" in msg and "points" in msg


def test_sweep_needs_exactly_one_of_step_and_points():
    msg = error(edit('step = "10 MHz"', 'step = "10 MHz"\npoints = 1201'))
    assert msg.startswith("[sweep]") and "exactly one of step" in msg
    msg = error(edit('step = "10 MHz"\n', ""))
    assert "exactly one of step" in msg


@pytest.mark.parametrize(
    ("old", "new", "needle"),
    [
        ('stop = "12 GHz"', 'stop = "0 Hz"', "[sweep].stop = '0 Hz': must be above start"),
        ('start = "0 Hz"', 'start = "-1 GHz"', "[sweep].start = '-1 GHz': must be >= 0 Hz"),
        ('step = "10 MHz"', 'step = "0 Hz"', "[sweep].step = '0 Hz': must be > 0 Hz"),
        ('step = "10 MHz"', "points = 1", "[sweep].points = 1: expected a whole number >= 2"),
        ('step = "10 MHz"', "points = 20.5", "[sweep].points = 20.5: expected a whole number"),
        ('step = "10 MHz"', 'step = "1 Hz"', "more than the 200001 allowed"),
        ('reference = "50 ohm"', 'reference = "0 ohm"', "[ports].reference = '0 ohm': must be >"),
        ('length = "3.2 in"', 'length = "0 in"', "[[channel]] #1.length = '0 in': must be > 0"),
        ("dk = 3.48", "dk = 0.5", "[dielectrics.core].dk = 0.5: valid values are >= 1"),
        ("df = 0.0037", "df = 1.5", "[dielectrics.core].df = 1.5: valid values are >= 0 and < 1"),
        ('width = "42 mil"', 'width = "-4 mil"', "[lines.feed].width = '-4 mil': a gcpw needs"),
    ],
)
def test_bad_values_name_key_value_and_the_valid_range(old, new, needle):
    assert needle in error(edit(old, new))


def test_missing_required_keys_are_named():
    assert "[lines.feed]: missing [lines.feed].gap" in error(edit('gap = "8 mil"\n', ""))
    msg = error(edit('dielectric = "core"\nfoil = "treated"', 'foil = "treated"'))
    assert "[lines.feed]: missing [lines.feed].dielectric" in msg
    msg = error(edit('at = "10 GHz"\n', ""))
    assert "[dielectrics.core]: missing key 'at'" in msg and 'model = "constant"' in msg
    msg = error(edit('line = "feed"\nlength = "3.2 in"', 'line = "feed"'))
    assert "[[channel]] #1: missing [[channel]] #1.length (a length with a unit)" in msg
    no_sweep = edit('[sweep]\nstart = "0 Hz"\nstop = "12 GHz"\nstep = "10 MHz"\n', "")
    msg = error(no_sweep)
    assert "scenario: missing the [sweep] section" in msg and "step or points" in msg
    no_channel = BASE[: BASE.index("[[channel]]")]
    assert "scenario: missing the [[channel]] segments" in error(no_channel)


def test_budget_allowance_needs_a_data_rate():
    msg = error(edit('data_rate = "16 Gb/s"\n', ""))
    assert msg.startswith("[budget]") and "max_loss" in msg and "data_rate" in msg


def test_check_needs_a_limit():
    msg = error(edit('max_loss = "1.5 dB"\nmin_return_loss = "12 dB"\n', ""))
    assert msg.startswith("[[budget.check]] #1") and "max_loss and/or min_return_loss" in msg


def test_malformed_toml_names_the_file(tmp_path):
    p = tmp_path / "broken.toml"
    p.write_text(BASE.replace('stop = "12 GHz"', 'stop = "12 GHz'))
    with pytest.raises(LossLaneError) as info:
        load_scenario(p)
    assert str(p) in str(info.value) and "not valid TOML" in str(info.value)


def test_nonexistent_scenario_file(tmp_path):
    with pytest.raises(LossLaneError, match="does not exist"):
        load_scenario(tmp_path / "nowhere.toml")


# ---------------------------------------------------------------- single-ended vs pairs


def test_mixing_single_ended_and_pair_names_the_odd_segment():
    pair = """
[lines.pair]
kind = "microstrip-pair"
width = "5 mil"
spacing = "7 mil"
thickness = "1.4 mil"
height = "3.5 mil"
dielectric = "core"
"""
    text = edit(
        '[[channel]]\nline = "inner"\nlength = "25 mm"',
        pair + '\n[[channel]]\nline = "pair"\nlength = "25 mm"\nname = "odd one"',
    )
    msg = error(text)
    assert "[[channel]] #6 (odd one)" in msg and "'pair'" in msg
    assert "single-ended" in msg and "pair" in msg

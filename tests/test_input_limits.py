"""Input limits (README "Input limits", losslane.limits) and messages that name the right
key: absurd values are refused with the key, the value and the range instead of reaching
the numerics as NaN; plain numbers use ASCII digits; no-break spaces separate a number
from its unit.

The limits are our own choices, documented in the README; the unit factors they are
checked with are exact (1 mil = 25.4 um by the 1959 international agreement; SI prefixes).
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

import pytest
from hostile_common import SMALL, error_line, run_cli

from losslane.errors import LossLaneError
from losslane.limits import DIMENSION, KIND_RANGES
from losslane.units import parse_conductivity, parse_frequency, parse_length, parse_number
from losslane.xsection import registry
from losslane.xsection.coplanar import Cpw

LINE = ["line", "microstrip", "--height", "3.5mil", "--thickness", "1.4mil"]
MATERIAL = ["--dk", "3.7", "--df", "0.01", "--dk-at", "10GHz"]


def refused(capsys, *argv: str) -> str:
    rc, out, err = run_cli(capsys, *argv)
    assert rc == 2, (out, err)
    return error_line(err)


# --- the absurd values, each refused naming its key --------------------------


@pytest.mark.parametrize(
    ("option", "value", "needle"),
    [
        ("--width", "1e30 mil", "--width = '1e30 mil'"),
        ("--width", "1e-300 mil", "--width = '1e-300 mil'"),
        ("--height", "1e-300 m", "--height = '1e-300 m'"),
        ("--conductivity", "1e-300 S/m", "--conductivity = '1e-300 S/m'"),
    ],
)
def test_absurd_dimensions_and_conductivity_are_refused(capsys, option, value, needle):
    args = {"--width": "6mil", "--height": "3.5mil", "--conductivity": None}
    args[option] = value
    argv = ["line", "microstrip", "--thickness", "1.4mil", *MATERIAL]
    for k, v in args.items():
        if v is not None:
            argv += [k, v]
    msg = refused(capsys, *argv)
    assert needle in msg
    assert "range" in msg  # and says what is valid
    assert "nan" not in msg.lower()  # not "conductor depth nan" (issue 11, item 6)


def test_negative_frequency_is_refused_naming_at(capsys):
    msg = refused(capsys, *LINE, "--width", "6mil", *MATERIAL, "--at=-1GHz")
    assert "--at = '-1GHz': must be >= 0 Hz" in msg


def test_etch_factor_nan_names_etch_factor(capsys):
    msg = refused(
        capsys, *LINE, "--width", "6mil", *MATERIAL, "--solver", "field", "--etch-factor", "nan"
    )
    assert msg.startswith("error: --etch-factor")
    assert "top" not in msg


def test_compare_size_at_zero_names_size_at(capsys):
    msg = refused(
        capsys,
        "compare",
        "microstrip",
        "--height",
        "4mil",
        "--thickness",
        "1.4mil",
        "--target",
        "50",
        "--materials",
        "low-loss",
        "--size-at",
        "0Hz",
        "--no-plot",
    )
    assert "--size-at 0Hz" in msg and "--at" not in msg


def test_dk_above_the_range_is_refused(capsys):
    msg = refused(capsys, *LINE, "--width", "6mil", "--dk", "250", "--df", "0", "--dk-at", "1GHz")
    assert "--dk = 250.0" in msg and ">= 1 and <= 100" in msg


def test_line_gap_on_a_microstrip_lists_real_options_only(capsys):
    msg = refused(capsys, *LINE, "--width", "6mil", *MATERIAL, "--gap", "5mil")
    assert "unknown key 'gap'" in msg
    assert "--note" not in msg  # a scenario-file key, not an option (issue 11, item 6)


# --- scenario keys ---------------------------------------------------------------------


def build_refused(capsys, tmp_path: Path, text: str) -> str:
    p = tmp_path / "lane.toml"
    p.write_text(text, encoding="utf-8")
    rc, out, err = run_cli(capsys, "build", str(p), "--out", str(tmp_path / "out"), "--no-plots")
    assert rc == 2, (out, err)
    assert not (tmp_path / "out").exists()
    return error_line(err)


def test_stop_beyond_the_range_names_stop(capsys, tmp_path):
    msg = build_refused(capsys, tmp_path, SMALL.replace('stop = "20 GHz"', 'stop = "1e30 GHz"'))
    assert "[sweep].stop = '1e30 GHz'" in msg


def test_tiny_step_names_step_and_does_not_overflow(capsys, tmp_path):
    # 1e-300 Hz is outside the frequency range; 0.001 Hz is inside it but gives 2e13 points
    msg = build_refused(capsys, tmp_path, SMALL.replace('"100 MHz"', '"1e-300 Hz"'))
    assert "[sweep].step = '1e-300 Hz'" in msg
    msg = build_refused(capsys, tmp_path, SMALL.replace('"100 MHz"', '"0.001 Hz"'))
    assert "[sweep].step = '0.001 Hz'" in msg and "frequency points" in msg


def test_conductivity_nan_in_a_graded_layer_is_refused(capsys, tmp_path):
    extra = (
        '\n[foils.plated]\nmodel = "graded"\n'
        'layers = [{ conductivity = nan, thickness = "1 um" }]\n'
    )
    msg = build_refused(capsys, tmp_path, SMALL + extra)
    assert "[foils.plated].layers[0].conductivity = nan" in msg


@pytest.mark.parametrize(
    ("old", "new", "needle"),
    [
        ('length = "2 in"', 'length = "1e5 m"', "[[channel]] #1.length = '1e5 m'"),
        ('width = "6 mil"', 'width = "2 m"', "[lines.host].width = '2 m'"),
        ('height = "3.5 mil"', 'height = "0.1 nm"', "[lines.host].height = '0.1 nm'"),
    ],
)
def test_lengths_outside_their_ranges_name_the_key(capsys, tmp_path, old, new, needle):
    assert needle in build_refused(capsys, tmp_path, SMALL.replace(old, new))


# --- the parser itself -----------------------------------------------------------------


def test_ranges_hold_at_their_edges():
    lo, hi = KIND_RANGES["length"]
    assert parse_length(f"{lo} m") == lo and parse_length(f"{hi} m") == hi
    assert parse_length("0 m") == 0.0
    with pytest.raises(LossLaneError, match="outside the accepted length range"):
        parse_length(f"{hi * 1.01} m")
    assert parse_frequency("10 THz") == 1e13  # SI prefix T = 1e12
    with pytest.raises(LossLaneError, match="outside the accepted frequency range"):
        parse_frequency("11 THz")
    assert parse_conductivity(5.8e7) == 5.8e7  # copper, a bare number in S/m
    with pytest.raises(LossLaneError, match="not a finite conductivity"):
        parse_conductivity(float("nan"))
    assert DIMENSION == (1e-9, 1.0)


@pytest.mark.parametrize("text", ["\uff15 mil", "\u0665 mil", "1\uff10 GHz"])
def test_non_ascii_digits_are_refused_with_the_character_named(text):
    with pytest.raises(LossLaneError, match=r"contains the digit .* write numbers with the ASCII"):
        parse_length(text, "width")


@pytest.mark.parametrize("space", ["\u00a0", "\u202f", "\u2009"])
def test_unicode_spaces_separate_number_and_unit(space):
    # 5 mil = 5 x 25.4 um exactly
    assert parse_length(f"5{space}mil") == pytest.approx(5 * 25.4e-6, rel=1e-15)


@pytest.mark.parametrize("text", ["nan", "inf", "1_0", "\uff13.7", "3,7", ""])
def test_plain_numbers_are_strict(text):
    with pytest.raises(LossLaneError):
        parse_number(text, "dk")


def test_plain_number_options_refuse_full_width_digits(capsys):
    msg = refused(
        capsys, *LINE, "--width", "6mil", "--dk", "\uff13.7", "--df", "0", "--dk-at", "1GHz"
    )
    assert "--dk" in msg and "U+FF13" in msg


def test_dielectric_fit_errors_name_the_options(capsys):
    # found by the hostile-input suite: the wideband Debye fit's refusal named "at", a key
    # of scenario files, not the option the user gave
    msg = refused(capsys, *LINE, "--width", "6mil", "--dk", "3.7", "--df", "0.01", "--dk-at", "0Hz")
    assert "--dk-at 0Hz" in msg and "between the model's corners" in msg


@dataclasses.dataclass(frozen=True)
class _RefusingCpw(Cpw):
    """A stand-in kind whose model refuses a strip as thick as its gap, as the coplanar
    closed form once did (Gupta's thickness widening closed the gap); the corrected
    coplanar model now answers there with an extrapolation warning, so the refusal path
    is checked with this registered kind."""

    kind = "refusing-cpw"

    def __post_init__(self) -> None:
        if self.thickness >= self.gap:
            raise LossLaneError(
                f"{self.kind}: thickness = {self.thickness:g} m closes the gap for "
                f"gap = {self.gap:g} m"
            )


def test_a_model_refusal_names_its_section(capsys, tmp_path, monkeypatch):
    # found by the hostile-input suite: a model's own refusal did not say which [lines.*]
    # section it came from
    monkeypatch.setattr(registry, "MODELS", registry.MODELS + (_RefusingCpw,))
    text = SMALL.replace('kind = "microstrip"', 'kind = "refusing-cpw"\ngap = "3 mil"').replace(
        'thickness = "1.4 mil"', 'thickness = "3 mil"'
    )
    msg = build_refused(capsys, tmp_path, text)
    assert msg.startswith("error: [lines.host]: refusing-cpw: thickness") and "gap" in msg


@pytest.mark.parametrize(
    ("argv", "key"),
    [
        (["size", "microstrip", "--target", "\uff15\uff10"], "--target"),
        (["spread", "microstrip", "--width", "6mil", "--band", "\uff11\uff10%"], "--band"),
        (["spread", "microstrip", "--width", "6mil", "--width-tol", "\uff11%"], "--width-tol"),
    ],
)
def test_design_numbers_refuse_full_width_digits(capsys, argv, key):
    common = ["--height", "4mil", "--thickness", "1.4mil", "--dielectric", "low-loss"]
    extra = ["--no-plot", "--samples", "20"] if argv[0] == "spread" else []
    msg = refused(capsys, *argv, *common, *extra)
    assert msg.startswith(f"error: {key} = ") and "ASCII digits" in msg


def test_a_model_refusal_on_the_command_line_names_the_options(capsys, monkeypatch):
    monkeypatch.setattr(registry, "MODELS", registry.MODELS + (_RefusingCpw,))
    msg = refused(
        capsys,
        "line",
        "refusing-cpw",
        *("--width", "5mil", "--height", "5mil", "--gap", "3mil", "--thickness", "3mil"),
        *MATERIAL,
    )
    assert "refusing-cpw: --thickness = " in msg and "for --gap = " in msg

"""Unreadable and malformed user files (issue 11, item 1): a scenario or library that is
not UTF-8, a library path that is a directory, a device given as a scenario, wrong types
inside foil entries, malformed areas, NaN in a plated layer, a name longer than a file
system holds. Each is exit code 2 with one line naming the file or the key -- never a
traceback -- and a build leaves no files behind.

These are checks of our own error contract (README: "Bad input exits with code 2 and
writes no files"); no outside reference applies.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from hostile_common import SMALL, error_line, files_under, run_cli

from losslane.errors import LossLaneError
from losslane.materials.library import parse_area


def build(capsys, tmp_path: Path, text: str | bytes, *extra: str) -> tuple[int, str, str]:
    p = tmp_path / "lane.toml"
    if isinstance(text, bytes):
        p.write_bytes(text)
    else:
        p.write_text(text, encoding="utf-8")
    return run_cli(capsys, "build", str(p), "--out", str(tmp_path / "out"), "--no-plots", *extra)


def refused(capsys, tmp_path: Path, text: str | bytes) -> str:
    before = files_under(tmp_path) | {tmp_path / "lane.toml"}
    rc, out, err = build(capsys, tmp_path, text)
    assert rc == 2, (out, err)
    assert files_under(tmp_path) == before  # nothing written, nothing staged
    return error_line(err)


def test_scenario_not_utf8_names_file_and_line(capsys, tmp_path):
    msg = refused(capsys, tmp_path, SMALL.encode() + b'\nnote = "caf\xe9"\n')
    assert "scenario file" in msg and "lane.toml" in msg
    assert "line 20" in msg and "0xe9" in msg and "UTF-8" in msg


def test_library_not_utf8_names_the_library(capsys, tmp_path):
    (tmp_path / "mine.toml").write_bytes(b'[foils.x]\nmodel = "none"\nnote = "\xff"\n')
    msg = refused(capsys, tmp_path, 'library = ["mine.toml"]\n' + SMALL)
    assert "library file" in msg and "mine.toml" in msg and "line 3" in msg


def test_library_path_that_is_a_directory(capsys, tmp_path):
    (tmp_path / "libs").mkdir()
    msg = refused(capsys, tmp_path, 'library = ["libs"]\n' + SMALL)
    assert "library file" in msg and "libs" in msg and "is a directory" in msg
    rc, out, err = run_cli(capsys, "materials", "--library", str(tmp_path / "libs"))
    assert rc == 2 and "is a directory" in error_line(err)


def test_device_as_scenario_is_not_reported_missing(capsys):
    rc, out, err = run_cli(capsys, "build", "/dev/null", "--no-plots")
    assert rc == 2
    msg = error_line(err)
    assert "/dev/null" in msg and "not a regular file" in msg and "does not exist" not in msg


@pytest.mark.parametrize(
    ("foil", "needle"),
    [
        ('model = "huray"\nspheres = 3', "[foils.f].spheres = 3: expected a list of tables"),
        ('model = "graded"\nlayers = 3', "[foils.f].layers = 3: expected a list of tables"),
        ('model = "graded"\nlayers = [3]', "[foils.f].layers[0]: expected a table"),
        (
            'model = "graded"\nlayers = [{ name = 4, conductivity = "1e7 S/m", '
            'thickness = "1 um" }]',
            "[foils.f].layers[0].name = 4: expected text",
        ),
        (
            'model = "huray"\nradius = "0.5 um"\ncount = 3\ntile_area = "1..2 um^2"',
            "[foils.f].tile_area = '1..2 um^2': '1..2' is not a number",
        ),
        (
            'model = "graded"\nlayers = [{ conductivity = nan, thickness = "1 um" }]',
            "[foils.f].layers[0].conductivity = nan",
        ),
        (
            'model = "graded"\nlayers = [{ conductivity = "1e7 S/m", thickness = "nan um" }]',
            "[foils.f].layers[0].thickness = 'nan um'",
        ),
        ('model = "huray"\nradius = "0.5 um"\nsurface_ratio = inf', "surface_ratio = inf"),
    ],
)
def test_wrong_types_inside_foil_entries(capsys, tmp_path, foil, needle):
    assert needle in refused(capsys, tmp_path, SMALL + f"\n[foils.f]\n{foil}\n")


def test_library_sections_of_the_wrong_type(capsys, tmp_path):
    (tmp_path / "mine.toml").write_text("dielectrics = 3\n", encoding="utf-8")
    msg = refused(capsys, tmp_path, 'library = ["mine.toml"]\n' + SMALL)
    assert "mine.toml" in msg and "dielectrics = 3" in msg


@pytest.mark.parametrize("text", ["1..2 um^2", "um^2", "1e400 um^2", "-5 um^2", "5 um"])
def test_malformed_areas(text):
    with pytest.raises(LossLaneError, match="tile_area"):
        parse_area(text, "tile_area")


def test_area_is_a_squared_length():
    # 100 um^2 = 100 x (1e-6 m)^2 exactly (SI prefix)
    assert parse_area("100 um^2", "a") == pytest.approx(1e-10, rel=1e-15)


def test_name_longer_than_a_file_name_gets_a_safe_stem(capsys, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    text = SMALL.replace('name = "bench lane"', f'name = "{"very long lane " * 40}"')
    p = tmp_path / "lane.toml"
    p.write_text(text, encoding="utf-8")
    rc, out, err = run_cli(capsys, "build", str(p), "--no-plots")
    assert rc == 0, err
    assert "file stems are cut to 120 characters" in err  # said, not silent
    (out_dir,) = [d for d in tmp_path.iterdir() if d.is_dir()]
    assert len(out_dir.name) <= 120
    names = sorted(f.name for f in out_dir.iterdir())
    assert names and all(len(n.encode()) <= 255 for n in names)
    assert any(n.endswith(".s2p") for n in names)


@pytest.mark.parametrize(
    ("where", "needle"),
    [
        ("scenario", "scenario file"),
        ("library", "library file"),
        ("touchstone", "[[channel]] #2.touchstone"),
        ("out", "--out"),
    ],
)
def test_nul_characters_in_paths(capsys, tmp_path, where, needle):
    # found by the hostile-input suite: a NUL in a path raised ValueError from the OS layer
    text = SMALL
    scenario, out = str(tmp_path / "lane.toml"), str(tmp_path / "out")
    if where == "scenario":
        scenario = str(tmp_path / "la\x00ne.toml")
    elif where == "library":
        text = 'library = ["li\\u0000b.toml"]\n' + SMALL
    elif where == "touchstone":
        text = SMALL + '\n[[channel]]\ntouchstone = "pa\\u0000rt.s2p"\n'
    else:
        out = str(tmp_path / "o\x00ut")
    (tmp_path / "lane.toml").write_text(text, encoding="utf-8")
    before = files_under(tmp_path)
    rc, stdout, err = run_cli(capsys, "build", scenario, "--out", out, "--no-plots")
    assert rc == 2
    msg = error_line(err)
    assert needle in msg and "NUL" in msg
    assert files_under(tmp_path) == before


@pytest.mark.parametrize(("make", "needle"), [("dir", "is a directory"), ("dev", "not a regular")])
def test_touchstone_path_that_is_not_a_file(capsys, tmp_path, make, needle):
    if make == "dir":
        (tmp_path / "part.s2p").mkdir()
        name = "part.s2p"
    else:
        name = "/dev/null"
    (tmp_path / "lane.toml").write_text(
        SMALL + f'\n[[channel]]\ntouchstone = "{name}"\n', encoding="utf-8"
    )
    rc, out, err = run_cli(
        capsys, "build", str(tmp_path / "lane.toml"), "--out", str(tmp_path / "o"), "--no-plots"
    )
    assert rc == 2
    msg = error_line(err)
    assert "[[channel]] #2.touchstone" in msg and needle in msg and "does not exist" not in msg


def test_dollar_signs_in_names_do_not_break_the_charts(capsys, tmp_path):
    # found by the hostile-input suite: matplotlib read '$...$' in a title or legend as math
    # and failed on unbalanced markup; names are shown as written
    text = SMALL.replace('name = "bench lane"', 'name = "$\\\\frac{$ lane"').replace(
        'length = "2 in"', 'length = "2 in"\nname = "seg $^$"'
    )
    text += '\n[[channel]]\nline = "host"\nlength = "1 in"\n'
    rc, out, err = build(capsys, tmp_path, text)  # --no-plots there; this one draws
    assert rc == 0, err
    p = tmp_path / "lane.toml"
    rc, out, err = run_cli(capsys, "build", str(p), "--out", str(tmp_path / "charts"))
    assert rc == 0, err
    assert (tmp_path / "charts" / "frac-lane-insertion-loss.png").stat().st_size > 0

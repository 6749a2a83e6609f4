"""Where outputs may go (README "Where files go", losslane.report.output): one rule for
every command -- losslane creates no directory but a build's output directory -- and every
location that cannot be written is refused up front, naming the option and the path, with
nothing left behind (issue 11, items 1 and 7).

These check our own contract; the file-system facts used are POSIX ones: /proc is a
virtual file system where no regular file can be created, and a path component that is a
regular file cannot hold a directory.
"""

from __future__ import annotations

import os
from pathlib import Path

import pytest
from hostile_common import SMALL, error_line, files_under, run_cli

from losslane.errors import LossLaneError
from losslane.report.output import MAX_STEM, check_output_dir, check_output_file, file_stem

MICROSTRIP = ["microstrip", "--height", "4mil", "--thickness", "1.4mil"]


@pytest.fixture
def lane(tmp_path: Path) -> Path:
    p = tmp_path / "lane.toml"
    p.write_text(SMALL, encoding="utf-8")
    return p


def refused_build(capsys, lane: Path, out: str) -> str:
    before = files_under(lane.parent)
    rc, stdout, err = run_cli(capsys, "build", str(lane), "--out", out, "--no-plots")
    assert rc == 2, (stdout, err)
    assert files_under(lane.parent) == before  # no staging directory, no probe, no file
    return error_line(err)


def test_out_under_proc_is_refused(capsys, lane):
    msg = refused_build(capsys, lane, "/proc/losslane-out")
    assert "--out '/proc/losslane-out'" in msg and "cannot write" in msg


def test_out_empty_is_refused(capsys, lane, monkeypatch):
    monkeypatch.chdir(lane.parent)
    msg = refused_build(capsys, lane, "")
    assert "--out '': an empty name" in msg


def test_out_with_a_missing_parent_is_refused(capsys, lane):
    msg = refused_build(capsys, lane, str(lane.parent / "no" / "such"))
    assert "does not exist; create it first" in msg


def test_out_inside_a_file_is_refused(capsys, lane):
    msg = refused_build(capsys, lane, str(lane / "sub"))
    assert "--out" in msg and "lane.toml" in msg


def test_out_that_is_a_file_is_refused(capsys, lane):
    msg = refused_build(capsys, lane, str(lane))
    assert "is an existing file, not a directory" in msg


def test_an_output_name_taken_by_a_directory_leaves_nothing(capsys, lane):
    out = lane.parent / "out"
    # the report page is written last: every file before it would be moved in first
    (out / "bench-lane-report.html").mkdir(parents=True)
    msg = refused_build(capsys, lane, str(out))
    assert "bench-lane-report.html" in msg and "is not a file" in msg
    assert sorted(p.name for p in out.iterdir()) == ["bench-lane-report.html"]


def _read_only(monkeypatch, directory: Path) -> None:
    """Make ``directory`` read-only: its mode, and -- since the super-user ignores modes --
    a refusal of every file created in it."""
    directory.chmod(0o555)
    if os.geteuid() == 0:
        real_touch = Path.touch
        real_mkdtemp = __import__("tempfile").mkdtemp

        def touch(self, *a, **k):
            if self.parent == directory:
                raise PermissionError(13, "Permission denied", str(self))
            return real_touch(self, *a, **k)

        def mkdtemp(*a, dir=None, **k):
            if dir is not None and Path(dir) == directory:
                raise PermissionError(13, "Permission denied", str(dir))
            return real_mkdtemp(*a, dir=dir, **k)

        monkeypatch.setattr(Path, "touch", touch)
        monkeypatch.setattr("tempfile.mkdtemp", mkdtemp)


def test_out_in_a_read_only_directory_is_refused(capsys, lane, monkeypatch):
    ro = lane.parent / "ro"
    ro.mkdir()
    _read_only(monkeypatch, ro)
    try:
        msg = refused_build(capsys, lane, str(ro / "out"))
        assert "cannot write in" in msg and "Permission denied" in msg
        msg = refused_build(capsys, lane, str(ro))
        assert "cannot write in" in msg
        assert list(ro.iterdir()) == []
    finally:
        ro.chmod(0o755)


def test_out_is_created_when_only_it_is_missing(capsys, lane):
    out = lane.parent / "fresh"
    rc, stdout, err = run_cli(capsys, "build", str(lane), "--out", str(out), "--no-plots")
    assert rc == 0, err
    assert (out / "bench-lane.s2p").is_file()
    assert not [p for p in lane.parent.iterdir() if p.name.startswith(".losslane")]


def test_out_dot_writes_into_the_working_directory(capsys, lane, monkeypatch):
    monkeypatch.chdir(lane.parent)
    rc, stdout, err = run_cli(capsys, "build", str(lane), "--out", ".", "--no-plots")
    assert rc == 0, err
    assert (lane.parent / "bench-lane.s2p").is_file()
    assert not [p for p in lane.parent.iterdir() if p.name.startswith(".losslane")]


@pytest.mark.parametrize("command", ["compare", "spread"])
def test_plot_in_a_missing_folder_is_refused_before_any_work(capsys, tmp_path, command):
    extra = (
        ["--materials", "low-loss", "--target", "50"]
        if command == "compare"
        else ["--width", "7mil", "--dielectric", "low-loss", "--samples", "10"]
    )
    png = tmp_path / "nodir" / "x.png"
    rc, out, err = run_cli(capsys, command, *MICROSTRIP, *extra, "--plot", str(png))
    assert rc == 2
    msg = error_line(err)
    assert "--plot" in msg and "does not exist; create it first" in msg
    assert not (tmp_path / "nodir").exists()  # the old behaviour created it


def test_plot_checks(tmp_path):
    with pytest.raises(LossLaneError, match="unknown picture format"):
        check_output_file(tmp_path / "x.jpeg", "--plot")
    with pytest.raises(LossLaneError, match="is an existing directory"):
        (tmp_path / "d.png").mkdir()
        check_output_file(tmp_path / "d.png", "--plot")
    with pytest.raises(LossLaneError, match="an empty name"):
        check_output_file("", "--plot")
    with pytest.raises(LossLaneError, match="cannot write in '/proc'"):
        check_output_file("/proc/x.png", "--plot")
    assert check_output_file(tmp_path / "ok.svg", "--plot") == tmp_path / "ok.svg"
    assert check_output_dir(tmp_path / "new") == tmp_path / "new"
    assert list(tmp_path.iterdir()) == [tmp_path / "d.png"]  # the probes left nothing


def test_file_stems():
    assert file_stem("Radio feed #2") == ("radio-feed-2", False)
    assert file_stem("  ***  ") == ("channel", False)
    assert file_stem("caf\u00e9 lane") == ("caf-lane", False)
    stem, cut = file_stem("a" * 500)
    assert cut and len(stem) == MAX_STEM
    # 255 bytes per name (POSIX NAME_MAX on common file systems): the longest output name
    # and the atomic writer's temporary name fit
    longest = f".{stem}-insertion-loss.png.{2**22}.{'f' * 8}.tmp"
    assert len(longest.encode()) <= 255

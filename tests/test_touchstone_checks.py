"""Reading checks of imported Touchstone files (issue 11, items 1, 2, 6, 7): NaN or infinite
entries, reference impedances of 0 or below, decreasing or duplicate frequencies (reported
as such, not as "1 point"), rows that do not fit the port count, a version-2
``[Number of Frequencies]`` that disagrees with the rows, absurd magnitudes. Each is a
LossLaneError naming the file and the line; valid files -- including a version-1 2-port
with noise data -- still read as before.

Outside reference: the Touchstone File Format Specification (IBIS Open Forum) 1.1 and 2.0
-- the option line and its defaults, one-line 2-port rows, noise data after a frequency
not above the last one, ``[Number of Frequencies]`` (recalled from memory) -- and
scikit-rf's reader for the values of valid files.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from hostile_common import SMALL, error_line, files_under, run_cli

from losslane.errors import LossLaneError
from losslane.network.touchstone import read_touchstone
from losslane.network.touchstone_scan import scan_touchstone

MODELS = Path(__file__).resolve().parents[1] / "src" / "losslane" / "data" / "models"

# a matched, lossless 2-port: a through (S21 = S12 = 1) at three frequencies
THROUGH = """! a through
# Hz S RI R 50
0 0 0 1 0 1 0 0 0
1e9 0 0 1 0 1 0 0 0
2e10 0 0 1 0 1 0 0 0
"""


def write(tmp_path: Path, text: str, name: str = "part.s2p") -> Path:
    p = tmp_path / name
    p.write_text(text, encoding="latin-1")
    return p


def refused(tmp_path: Path, text: str, name: str = "part.s2p") -> str:
    p = write(tmp_path, text, name)
    with pytest.raises(LossLaneError) as info:
        read_touchstone(p)
    msg = str(info.value)
    assert f"touchstone file '{p}'" in msg
    return msg


def test_a_valid_file_reads_with_its_rows_located():
    # scikit-rf reads the values; the scan knows each row's line
    scan = scan_touchstone(THROUGH, Path("x.s2p"))
    assert scan.frequencies == [0.0, 1e9, 2e10] and scan.lines == [3, 4, 5]


@pytest.mark.parametrize(
    ("old", "new", "needle"),
    [
        ("1e9 0 0 1 0", "1e9 0 0 nan 0", "line 4: entry 'nan' is not a finite number"),
        ("1e9 0 0 1 0", "1e9 0 0 inf 0", "line 4: entry 'inf' is not a finite number"),
        ("1e9 0 0 1 0", "1e9 0 0 1e400 0", "line 4: entry '1e400' is not a finite number"),
        ("1e9 0 0 1 0", "1e9 0 0 1e308 0", "line 4: S21 at 1e+09 Hz has magnitude 1e+308"),
        ("R 50", "R 0", "line 2: reference impedance 0 ohm in the option line"),
        ("R 50", "R -50", "line 2: reference impedance -50 ohm in the option line"),
        ("R 50", "R nan", "line 2: reference impedance 'nan' is not a finite number"),
        ("R 50", "R", "line 2: option line: 'R' is not followed by a reference impedance"),
        ("1e9 0 0", "2e10 0 0", "line 5: frequency 2e+10 Hz repeats 2e+10 Hz on line 4"),
        ("2e10 0 0", "5e8 0 0", "line 5: frequency 5e+08 Hz is below 1e+09 Hz on line 4"),
        ("1e9 0 0 1 0 1 0 0 0", "1e9 0 0 1 0 1 0 0", "line 4: this line holds 8 numbers"),
        ("2e10 0 0 1 0 1 0 0 0\n", "2e10 0 0 1 0\n", "line 5: the last row has 5 of the 9"),
        ("1e9 0 0 1 0", "1e9 0 0 x 0", "line 4: entry 'x' is not a number"),
        ("0 0 0", "-1 0 0", "line 3: frequency -1 is negative"),
    ],
)
def test_bad_files_name_file_and_line(tmp_path, old, new, needle):
    text = THROUGH.replace(old, new, 1)
    assert text != THROUGH
    assert needle in refused(tmp_path, text)


def test_decreasing_frequencies_are_not_reported_as_one_point(tmp_path):
    # a 2-port row (9 numbers) at a lower frequency is not noise data (5 numbers)
    msg = refused(tmp_path, "# Hz S RI R 50\n2e10 0 0 1 0 1 0 0 0\n0 0 0 1 0 1 0 0 0\n")
    assert "frequencies must increase strictly" in msg and "1 frequency point" not in msg


def test_two_port_noise_data_is_still_read(tmp_path):
    # Touchstone 1.x: noise parameters follow the network data, starting at a frequency
    # not above the last network frequency, five numbers per line
    text = THROUGH + "1e9 1.5 0.3 45 0.2\n2e9 1.7 0.3 50 0.2\n"
    net = read_touchstone(write(tmp_path, text))
    np.testing.assert_array_equal(net.f, [0.0, 1e9, 2e10])
    bad = THROUGH + "1e9 1.5 0.3 45 0.2\n2e9 1.7 0.3\n"
    assert "line 7: noise data row holds 3 numbers" in refused(tmp_path, bad)


def test_a_four_port_file_named_as_two_port(tmp_path):
    rows = "".join(f"{f:g} " + " ".join(["0"] * 32) + "\n" for f in (0, 1e9))
    msg = refused(tmp_path, "# Hz S RI R 50\n" + rows)
    assert "line 2: this line holds 33 numbers; a 2-port row is one line of 9" in msg


def test_four_port_rows_split_over_lines(tmp_path):
    # scikit-rf writes a 4-port row as 4 lines (3 + 1 pairs per matrix row): read as usual
    net = read_touchstone(MODELS / "mezzanine-pair.s4p")
    assert net.nports == 4
    text = (MODELS / "mezzanine-pair.s4p").read_text(encoding="latin-1")
    lines = text.splitlines()
    # drop one number from the first data row's last line: the rows no longer fit
    first = next(i for i, ln in enumerate(lines) if ln and ln[0].isdigit())
    cut = lines[: first + 3] + [lines[first + 3].rsplit(" ", 1)[0]] + lines[first + 4 :]
    msg = refused(tmp_path, "\n".join(cut) + "\n", "pair.s4p")
    assert "the row lengths do not fit the port count" in msg


V2 = """[Version] 2.0
# Hz S RI R 50
[Number of Ports] 2
[Two-Port Data Order] 21_12
[Number of Frequencies] {n}
[Reference] {ref}
[Network Data]
0 0 0 1 0 1 0 0 0
2e10 0 0 1 0 1 0 0 0
[End]
"""


def test_version_2_frequency_count_must_match(tmp_path):
    ok = read_touchstone(write(tmp_path, V2.format(n=2, ref="50 50")))
    assert ok.nports == 2 and list(ok.f) == [0.0, 2e10]
    msg = refused(tmp_path, V2.format(n=5, ref="50 50"))
    assert "line 5: [Number of Frequencies] 5 does not match the 2 frequency rows" in msg


def test_version_2_reference_must_be_positive(tmp_path):
    msg = refused(tmp_path, V2.format(n=2, ref="50 0"))
    assert "line 6: reference impedance 0 ohm in [Reference]" in msg


def test_bundled_models_pass_the_checks():
    for p in sorted(MODELS.glob("*.s*p")):
        scan = scan_touchstone(p.read_text(encoding="latin-1"), p)
        net = read_touchstone(p)
        assert scan.frequencies == list(net.f) and len(scan.lines) == len(net.f)


def test_a_bad_imported_file_in_a_build_names_the_file(capsys, tmp_path):
    write(tmp_path, THROUGH.replace("1e9 0 0 1 0", "1e9 0 0 nan 0"))
    text = SMALL + '\n[[channel]]\ntouchstone = "part.s2p"\n'
    (tmp_path / "lane.toml").write_text(text, encoding="utf-8")
    before = files_under(tmp_path)
    rc, out, err = run_cli(
        capsys, "build", str(tmp_path / "lane.toml"), "--out", str(tmp_path / "o"), "--no-plots"
    )
    assert rc == 2
    msg = error_line(err)
    assert "[[channel]] #2 (part)" in msg and "part.s2p', line 4" in msg
    assert files_under(tmp_path) == before

"""The import policy for Touchstone blocks: small passivity and reciprocity violations from
printed rounding are repaired and reported, large ones refused, `as_is = true` accepts a
file as it is and marks the outputs. Passivity and reciprocity as IEEE 370-2020 defines
them (largest singular value of S at most 1; S = S^T)."""

from __future__ import annotations

import json

import numpy as np
import pytest
from cli_helpers import run

from losslane.errors import LossLaneError
from losslane.network import TouchstoneBlock, build_network, to_network, write_touchstone
from losslane.network.import_check import printed_digits, repair
from losslane.network.quality import quality

Z0 = 50.0
F = np.linspace(1e9, 10e9, 19)


def a_line_s(f: np.ndarray) -> np.ndarray:
    """A matched lossy line's S (reciprocal, passive): S21 = S12 = exp(-gamma l)."""
    s = np.zeros((f.size, 2, 2), complex)
    s[:, 1, 0] = s[:, 0, 1] = 0.9 * np.exp(-1j * 2 * np.pi * f * 0.2e-9)
    s[:, 0, 0] = s[:, 1, 1] = 0.05
    return s


def six_digit_file(path, s: np.ndarray, f: np.ndarray = F) -> None:
    """A Touchstone v1 file printed with 6 significant digits (as many tools write)."""
    lines = ["# Hz S RI R 50"]
    for k, fk in enumerate(f):
        vals = [s[k, 0, 0], s[k, 1, 0], s[k, 0, 1], s[k, 1, 1]]
        nums = " ".join(f"{v.real:.5e} {v.imag:.5e}" for v in vals)
        lines.append(f"{fk:.0f} {nums}")
    path.write_text("\n".join(lines) + "\n", encoding="ascii")


def test_printed_digits_are_read_from_the_numbers(tmp_path) -> None:
    six_digit_file(tmp_path / "six.s2p", a_line_s(F))
    assert printed_digits((tmp_path / "six.s2p").read_text()) == 6
    # our own files are written with Python's shortest round-trip repr: 15-17 digits
    ours = write_touchstone(to_network(a_line_s(F) * 0.987654321, F, Z0), tmp_path / "o.s2p")
    assert printed_digits(ours.read_text()) >= 15


def test_rounding_violations_are_repaired_and_reported(tmp_path) -> None:
    # a lossless reflective 2-port (unitary: every singular value 1, Pozar), with a gain of
    # 3e-7 and |S12 - S21| of 1.6e-6: within 1e-6 plus the rounding of 6 printed digits
    phase = np.exp(-1j * 2 * np.pi * F * 0.2e-9)[:, None, None]
    s = phase * np.array([[0.6, 0.8j], [0.8j, 0.6]]) * (1 + 3e-7)
    s[:, 0, 1] *= 1 + 2e-6
    six_digit_file(tmp_path / "m.s2p", s)
    blk = TouchstoneBlock(tmp_path / "m.s2p")
    assert blk.check.action == "repaired" and 0 < blk.check.repair_size < 1e-5
    used = np.asarray(blk.network.s)
    assert np.max(np.linalg.svd(used, compute_uv=False)) <= 1 + 1e-12
    assert np.max(np.abs(used - np.swapaxes(used, 1, 2))) <= 1e-15
    # and so the channel around it keeps the 1e-9 guarantee
    out = build_network([blk], F, Z0).s
    assert np.max(np.linalg.svd(out, compute_uv=False)) <= 1 + 1e-9
    assert np.max(np.abs(out - np.swapaxes(out, 1, 2))) <= 1e-9


def test_repair_is_the_nearest_passive_reciprocal_matrix_for_small_errors() -> None:
    # symmetrising is the projection onto S = S^T; clipping singular values the nearest
    # passive matrix in the 2-norm (Eckart-Young-Mirsky): a passive reciprocal S is kept
    s = a_line_s(F)
    np.testing.assert_allclose(repair(s), s, atol=1e-15)
    bad = s * 1.001
    fixed = repair(bad)
    assert np.max(np.linalg.svd(fixed, compute_uv=False)) <= 1 + 1e-12
    assert np.max(np.abs(fixed - bad)) < 2e-3


def test_large_violations_are_refused_naming_file_frequency_and_violation(tmp_path) -> None:
    s = a_line_s(F)
    s[5, 0, 1] += 0.01  # 1 % non-reciprocal at one frequency: no rounding does that
    six_digit_file(tmp_path / "bad.s2p", s)
    with pytest.raises(LossLaneError) as err:
        TouchstoneBlock(tmp_path / "bad.s2p")
    msg = str(err.value)
    assert "bad.s2p" in msg and "not reciprocal" in msg and "3.5 GHz" in msg and "as_is" in msg


def test_metrics_of_each_imported_file_are_the_ieee_370_metrics(tmp_path) -> None:
    s = a_line_s(F)
    path = write_touchstone(to_network(s, F, Z0), tmp_path / "ok.s2p")
    blk = TouchstoneBlock(path)
    assert blk.check.action == "none"
    want = quality(F, np.asarray(blk.network.s))
    got = blk.check.to_json()
    assert got["passivity"] == want.passivity == 100.0
    assert got["reciprocity"] == want.reciprocity == 100.0


SCENARIO = """
name = "feed"
[sweep]
start = "1 GHz"
stop = "10 GHz"
points = 19
[[channel]]
touchstone = "{file}"
{as_is}
"""


def test_as_is_marks_every_output(tmp_path, capsys) -> None:
    s = a_line_s(F)
    s[:, 0, 1] *= 1.05  # plainly non-reciprocal
    six_digit_file(tmp_path / "part.s2p", s)
    scen = tmp_path / "feed.toml"
    scen.write_text(SCENARIO.format(file="part.s2p", as_is=""), encoding="utf-8")
    rc, out, err = run(capsys, "build", str(scen), "--out", str(tmp_path / "o"), "--no-plots")
    assert rc == 2 and "part.s2p" in err and "not reciprocal" in err
    assert not (tmp_path / "o").exists()
    scen.write_text(SCENARIO.format(file="part.s2p", as_is="as_is = true"), encoding="utf-8")
    rc, out, err = run(
        capsys, "build", str(scen), "--out", str(tmp_path / "o"), "--no-plots", "--json"
    )
    assert rc == 0, err
    data = json.loads(out)
    assert data["guaranteed_passive_reciprocal"] is False
    assert data["imports"][0]["action"] == "as-is"
    header = (tmp_path / "o" / "feed.s2p").read_text()
    assert "NOT guaranteed passive or reciprocal" in header
    page = (tmp_path / "o" / "feed-report.html").read_text()
    assert "NOT guaranteed passive or reciprocal" in page
    rc, out, err = run(capsys, "build", str(scen), "--out", str(tmp_path / "t"), "--no-plots")
    assert rc == 0 and "NOT guaranteed passive or reciprocal" in out

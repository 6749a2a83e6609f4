"""Strict JSON (issue 11, item 4): every JSON losslane prints or writes parses with a strict
parser (RFC 8259 has no NaN or Infinity); a value without a finite number is null with its
reason; check points where the loss is unbounded (a DC block at or just above 0 Hz) are
refused naming the key.

Outside reference: RFC 8259, section 6 ("Numeric values that cannot be represented ...
such as Infinity and NaN are not permitted"), as enforced by Python's json module with
``allow_nan=False`` / a ``parse_constant`` that refuses them. The DC-block rule is
circuit theory: a series capacitor's impedance 1/(j 2 pi f C) is unbounded at f = 0.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest
from hostile_common import error_line, files_under, run_cli, strict_json

from losslane.report.strict_json import NO_VALUE, RAISE_ON_NAN, dumps, loads, non_finite, sanitize

LANE = """
name = "dc block lane"

[sweep]
start = "0 Hz"
stop = "10 GHz"
step = "1 GHz"

[lines.host]
kind = "microstrip"
width = "6 mil"
thickness = "1.4 mil"
height = "3.5 mil"
dielectric = "low-loss"

[[channel]]
line = "host"
length = "1 in"

[[channel]]
capacitor = { value = "100 nF" }
name = "dc block"
"""


def test_sanitize_replaces_non_finite_numbers_with_null_and_a_reason():
    doc = {"a": math.inf, "b": [1.0, -math.inf, np.float64("nan")], "c": np.float32(2.5)}
    out = sanitize(doc)
    assert out["a"] is None and out["b"] == [1.0, None, None] and out["c"] == 2.5
    assert out[NO_VALUE]["a"] == "+inf: unbounded"
    assert out[NO_VALUE]["b"] == "entry 1: -inf: unbounded; entry 2: not a number"
    assert non_finite(out) == []
    assert non_finite(doc) == ["$.a = inf", "$.b[1] = -inf", "$.b[2] = nan"]


def test_dumps_is_strict_json(monkeypatch):
    monkeypatch.setenv(RAISE_ON_NAN, "0")
    text = dumps({"x": [math.inf, 1.0], "y": math.nan})
    assert loads(text) == {
        "x": [None, 1.0],
        "y": None,
        NO_VALUE: {"x": "entry 0: +inf: unbounded", "y": "not a number"},
    }
    with pytest.raises(ValueError, match="not strict JSON"):
        loads(json.dumps({"x": math.nan}))  # what json.dumps writes by default


def test_dumps_raises_on_nan_in_the_test_suite():
    # tests/conftest.py sets the switch: a NaN in an output fails the test that made it
    with pytest.raises(ValueError, match=r"NaN in a JSON output: \$\.y = nan"):
        dumps({"x": math.inf, "y": math.nan})


def build(capsys, tmp_path: Path, text: str) -> tuple[int, str, str]:
    p = tmp_path / "lane.toml"
    p.write_text(text, encoding="utf-8")
    out = tmp_path / "out"
    return run_cli(capsys, "build", str(p), "--out", str(out), "--no-plots", "--json")


@pytest.mark.parametrize(
    ("budget", "key"),
    [
        ('[[budget.check]]\nat = "0 Hz"\nmax_loss = "3 dB"', "[[budget.check]] #1.at = 0 GHz"),
        ('[[budget.check]]\nat = "0.5 GHz"\nmax_loss = "3 dB"', "[[budget.check]] #1.at = 0.5"),
        ('[[budget.check]]\nat = "1 GHz"\nmin_return_loss = "3 dB"', "#1.at = 1 GHz"),
        ('data_rate = "1 Gb/s"\nmax_loss = "3 dB"', "[budget].data_rate (its Nyquist"),
        ('fit_start = "0 Hz"', "[budget].fit_start = 0 GHz"),
    ],
)
def test_unbounded_check_points_are_refused(capsys, tmp_path, budget, key):
    before = files_under(tmp_path)
    rc, out, err = build(capsys, tmp_path, LANE + "\n[budget]\n" + budget + "\n")
    assert rc == 2, out
    msg = error_line(err)
    assert key in msg and "[[channel]] #2 (dc block)" in msg and "unbounded" in msg
    assert files_under(tmp_path) == before | {tmp_path / "lane.toml"}


def test_the_first_sweep_point_above_dc_is_refused_and_the_next_ones_are_fine(capsys, tmp_path):
    # the budget reads values linearly between sweep points; at the first point above DC
    # the DC point (infinite loss) still enters with weight 0, so that point is refused too
    budget = '\n[budget]\n[[budget.check]]\nat = "1 GHz"\nmax_loss = "3 dB"\n'
    rc, out, err = build(capsys, tmp_path, LANE + budget)
    assert rc == 2 and "choose a frequency above 1 GHz" in error_line(err)
    for at in ("1.5 GHz", "2 GHz"):
        budget = f'\n[budget]\n[[budget.check]]\nat = "{at}"\nmax_loss = "3 dB"\n'
        rc, out, err = build(capsys, tmp_path, LANE + budget)
        assert rc == 0, err
        doc = strict_json(out)
        assert 0 < doc["budget"]["checks"][0]["loss_db"] < 3
        page = strict_json((tmp_path / "out" / "dc-block-lane-budget.json").read_text())
        assert page["budget"]["checks"][0]["loss_db"] == doc["budget"]["checks"][0]["loss_db"]


def test_two_point_sweep_with_a_budget_is_strict_json(capsys, tmp_path):
    text = LANE.replace('step = "1 GHz"', "points = 2").replace(
        '[[channel]]\ncapacitor = { value = "100 nF" }\nname = "dc block"\n', ""
    )
    text += '\n[budget]\ndata_rate = "10 Gb/s"\nmax_loss = "10 dB"\n'
    rc, out, err = build(capsys, tmp_path, text)
    assert rc == 0, err
    doc = strict_json(out)
    # too few points for the four-term fit: no coefficients, the reason given, a warning
    assert doc["fit"]["applies"] is False and "too coarse" in doc["fit"]["reason"]
    assert any("fitted insertion loss skipped" in w for w in doc["warnings"])
    strict_json((tmp_path / "out" / "dc-block-lane-budget.json").read_text())


def test_line_json_is_strict_at_dc(capsys):
    # at 0 Hz a line's characteristic impedance is sqrt(R/G): with G = 0 it is unbounded
    rc, out, err = run_cli(
        capsys,
        "line",
        "microstrip",
        "--width",
        "6mil",
        "--height",
        "3.5mil",
        "--thickness",
        "1.4mil",
        "--dielectric",
        "low-loss",
        "--at",
        "0Hz,1GHz",
        "--json",
    )
    assert rc == 0, err
    doc = strict_json(out)
    assert doc["frequencies_hz"] == [0.0, 1e9]
    assert all(v is None or math.isfinite(v) for v in doc["zc_real_ohm"])


def test_summary_quotes_nothing_read_through_an_unbounded_dc_point(capsys, tmp_path):
    # 3 points 0, 5, 10 GHz: the quarter point 2.5 GHz would be read between DC (infinite
    # loss behind the capacitor) and 5 GHz; it is left out instead of quoted as unbounded
    rc, out, err = build(capsys, tmp_path, LANE.replace('step = "1 GHz"', "points = 3"))
    assert rc == 0, err
    doc = strict_json(out)
    assert [r["at_hz"] for r in doc["summary"]] == [5e9, 7.5e9, 10e9]
    assert all(math.isfinite(r["insertion_loss_db"]) for r in doc["summary"])

"""`losslane build` with a budget: the --json contract of DESIGN.md, the files written,
--strict exit codes (0 pass, 1 a failing check, 2 bad input) and clean errors."""

from __future__ import annotations

import csv
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest
from budget_scenarios import PASSING_BUDGET, SMALL_CHANNEL, scenario_text, write

from losslane.cli import main

SRC = Path(__file__).resolve().parents[1] / "src"
# DESIGN.md, "Command line -- the contract": keys of `losslane build --json`
TOP = {"touchstone", "ports", "points", "files", "budget"}
BUDGET = {
    "nyquist_hz",
    "allowance_db",
    "total_db",
    "margin_db",
    "passed",
    "segments",
    "reflections_db",
    "checks",
}
SEGMENT = {"name", "kind", "loss_db"}
CHECK = {"at_hz", "loss_db", "max_loss_db", "return_loss_db", "min_return_loss_db", "passed"}

FAILING_BUDGET = PASSING_BUDGET.replace('max_loss = "5 dB"', 'max_loss = "0.5 dB"')


def build(tmp_path: Path, text: str, *args: str, capsys) -> tuple[int, str, str, Path]:
    scen = write(tmp_path, text)
    out = tmp_path / "out"
    code = main(["build", str(scen), "--out", str(out), *args])
    cap = capsys.readouterr()
    return code, cap.out, cap.err, out


def test_json_contract_and_files(tmp_path: Path, capsys) -> None:
    code, out, err, d = build(
        tmp_path, scenario_text(SMALL_CHANNEL, PASSING_BUDGET), "--json", "--no-plots",
        capsys=capsys,
    )  # fmt: skip
    assert code == 0, err
    data = json.loads(out)
    assert TOP <= set(data)
    b = data["budget"]
    assert BUDGET <= set(b)
    assert b["nyquist_hz"] == 5e9  # 10 Gb/s NRZ (common practice: baud / 2)
    assert b["allowance_db"] == 12.0
    assert b["margin_db"] == pytest.approx(12.0 - b["total_db"], abs=1e-12)
    assert b["passed"] is True
    assert [s["name"] for s in b["segments"]] == [
        "launch 1",
        "layer via",
        "capacitor",
        "main run 1",
    ]
    for s in b["segments"]:
        assert SEGMENT <= set(s)
    parts = sum(s["loss_db"] for s in b["segments"])
    assert parts + b["reflections_db"] == pytest.approx(b["total_db"], abs=0.01)
    assert len(b["checks"]) == 1 and CHECK <= set(b["checks"][0])
    c = b["checks"][0]
    assert (c["at_hz"], c["max_loss_db"], c["min_return_loss_db"]) == (2.4e9, 5.0, 8.0)
    assert data["fit"]["stop_hz"] == 10e9  # 2 x Nyquist
    names = {Path(p).name for p in data["files"]}
    assert names == {
        "test-lane.s2p",
        "test-lane-budget.csv",
        "test-lane-budget.json",
        "test-lane-report.html",
    }
    assert names == {p.name for p in d.iterdir()}
    doc = json.loads((d / "test-lane-budget.json").read_text())
    assert doc["budget"] == b and doc["fit"] == data["fit"]


def test_csv_rows(tmp_path: Path, capsys) -> None:
    code, _, err, d = build(
        tmp_path, scenario_text(SMALL_CHANNEL, PASSING_BUDGET), "--no-plots", capsys=capsys
    )
    assert code == 0, err
    with (d / "test-lane-budget.csv").open() as fh:
        rows = list(csv.DictReader(fh))
    ny = [r for r in rows if r["point"] == "Nyquist"]
    seg = [r for r in ny if r["kind"]]
    refl = next(r for r in ny if r["row"] == "reflections and interaction")
    total = next(r for r in ny if r["row"] == "total")
    s = sum(float(r["value_db"]) for r in seg) + float(refl["value_db"])
    assert s == pytest.approx(float(total["value_db"]), abs=0.01)
    assert float(total["limit_db"]) == 12.0 and total["result"] == "pass"
    assert float(total["margin_db"]) == pytest.approx(12.0 - float(total["value_db"]), abs=1e-5)
    assert seg[0]["db_per_in"] and not seg[1]["db_per_in"]  # a line, then a via
    rl = [r for r in rows if r["point"] == "check 1" and r["quantity"] == "return loss"]
    assert len(rl) == 2 and all(float(r["limit_db"]) == 8.0 for r in rl)


def test_terminal_summary_shows_the_budget(tmp_path: Path, capsys) -> None:
    code, out, err, _ = build(
        tmp_path, scenario_text(SMALL_CHANNEL, PASSING_BUDGET), "--no-plots", capsys=capsys
    )
    assert code == 0, err
    assert "loss budget" in out and "reflections and interaction" in out
    assert "budget: PASS, margin +" in out
    assert "fitted insertion loss" in out and "ILD" in out
    assert "test-lane-report.html" in out


@pytest.mark.parametrize(
    ("budget", "strict", "code"),
    [
        (PASSING_BUDGET, True, 0),
        (FAILING_BUDGET, True, 1),
        (FAILING_BUDGET, False, 0),
        ("", True, 0),  # no budget: nothing to fail
    ],
)
def test_strict_exit_codes(tmp_path: Path, capsys, budget: str, strict: bool, code: int) -> None:
    args = ["--no-plots", "--json"] + (["--strict"] if strict else [])
    got, out, err, d = build(tmp_path, scenario_text(SMALL_CHANNEL, budget), *args, capsys=capsys)
    assert got == code, err
    data = json.loads(out)  # the JSON is printed either way
    if budget:
        assert data["budget"]["passed"] is (budget == PASSING_BUDGET)
    else:
        assert data["budget"] is None and data["fit"] is not None
    assert (d / "test-lane-budget.json").is_file()  # a failing check still writes its files
    if code == 1:
        assert "--strict" in err
        assert data["budget"]["checks"][0]["passed"] is False


def test_no_budget_writes_no_csv(tmp_path: Path, capsys) -> None:
    code, _, err, d = build(tmp_path, scenario_text(SMALL_CHANNEL), "--no-plots", capsys=capsys)
    assert code == 0, err
    names = {p.name for p in d.iterdir()}
    assert "test-lane-budget.csv" not in names
    assert {"test-lane-budget.json", "test-lane-report.html"} <= names
    doc = json.loads((d / "test-lane-budget.json").read_text())
    assert doc["budget"] is None and doc["fit"]["stop_hz"] == 20e9


@pytest.mark.parametrize(
    ("budget", "needles"),
    [
        (
            '[budget]\n[[budget.check]]\nat = "25 GHz"\nmax_loss = "3 dB"\n',
            ["[[budget.check]] #1.at = 25 GHz", "0..20 GHz"],
        ),
        (
            '[budget]\ndata_rate = "64 Gb/s"\nmax_loss = "20 dB"\n',
            ["[budget].data_rate = 64 Gb/s", "32 GHz", "0..20 GHz"],
        ),
        (
            '[budget]\ndata_rate = "10 Gb/s"\nfit_stop = "30 GHz"\n',
            ["[budget].fit_stop = 30 GHz", "0..20 GHz"],
        ),
        ('[budget]\ndata_rate = "10 Gb/s"\nmax_los = "9 dB"\n', ["max_los", "max_loss"]),
    ],
)
def test_bad_budget_is_exit_2_and_writes_nothing(
    tmp_path: Path, capsys, budget: str, needles: list[str]
) -> None:
    code, out, err, d = build(
        tmp_path, scenario_text(SMALL_CHANNEL, budget), "--strict", capsys=capsys
    )
    assert code == 2
    assert out == ""
    for n in needles:
        assert n in err
    assert not d.exists()
    assert [p.name for p in tmp_path.iterdir()] == ["lane.toml"]  # no staging left behind


def test_bad_input_from_the_shell_has_no_traceback(tmp_path: Path) -> None:
    scen = write(
        tmp_path,
        scenario_text(
            SMALL_CHANNEL, '[budget]\n[[budget.check]]\nat = "40 GHz"\nmax_loss="1 dB"\n'
        ),
    )
    env = dict(os.environ)
    env["PYTHONPATH"] = str(SRC) + os.pathsep + env.get("PYTHONPATH", "")
    proc = subprocess.run(
        [sys.executable, "-m", "losslane", "build", str(scen), "--strict", "--out",
         str(tmp_path / "o")],
        capture_output=True, text=True, env=env, timeout=120,
    )  # fmt: skip
    assert proc.returncode == 2
    assert "Traceback" not in proc.stderr
    assert proc.stderr.startswith("error: [[budget.check]] #1.at = 40 GHz")


def test_a_failure_while_writing_the_report_leaves_nothing(tmp_path: Path, monkeypatch) -> None:
    # the budget's files are staged with the Touchstone file: if the last one fails, none
    # of them appears (DESIGN.md: no partial output)
    import losslane.report.page as page
    from losslane.api import build as api_build

    def broken(**_):
        raise RuntimeError("disk full")

    monkeypatch.setattr(page, "render_report", broken)
    scen = write(tmp_path, scenario_text(SMALL_CHANNEL, PASSING_BUDGET))
    with pytest.raises(RuntimeError, match="disk full"):
        api_build(scen, out=tmp_path / "out", plots=False)
    assert [p.name for p in tmp_path.iterdir()] == ["lane.toml"]

"""`losslane sweep`: a plan's rows equal the single-case commands' results (`line --json`,
`build --json`), failures are recorded per case, an interrupted run resumes to the same
table, and bad plans are refused naming the key."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import numpy as np
import pyarrow.parquet as pq
import pytest
from cli_helpers import run

from losslane import api

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"

LINE_PLAN = """
name = "table"
[base]
kind = "{kind}"
thickness = "1.4 mil"
height = "4 mil"
dielectric = "low-loss"
{extra}
[vary]
width = ["4 mil", "5 mil", "6 mil"]
height = {{ start = "3 mil", stop = "5 mil", step = "1 mil" }}
dielectric = ["low-loss", "very-low-loss"]
[results]
at = ["1 GHz", "28 GHz"]
"""


def write(tmp: Path, name: str, text: str) -> Path:
    p = tmp / name
    p.write_text(text, encoding="utf-8")
    return p


def line_json(kind: str, row: dict, extra: dict) -> dict:
    return api.line(
        kind,
        width=row["width"],
        height=row["height"],
        thickness="1.4 mil",
        dielectric=row["dielectric"],
        at="1GHz,28GHz",
        **extra,
    ).to_json()


def test_rows_equal_line_json_on_a_two_worker_cluster(tmp_path) -> None:
    # Source: the single-case command itself (`line --json` through api.line), run on a
    # local dask cluster of two worker processes started and stopped by the sweep
    plan = write(
        tmp_path, "p.toml", LINE_PLAN.format(kind="microstrip-pair", extra='spacing = "7 mil"')
    )
    res = api.run_sweep(plan, tmp_path / "t.parquet", workers=2, charts=False)
    assert res.cases == 18 and res.failed == 0
    rows = pq.read_table(tmp_path / "t.parquet").to_pylist()
    for row in rows[::5]:
        want = line_json("microstrip-pair", row, {"spacing": "7 mil"})
        for key in ("z_diff_ohm", "z_common_ohm", "eps_eff_odd", "loss_db_per_in", "zc_imag_ohm"):
            assert [row[f"{key}_1GHz"], row[f"{key}_28GHz"]] == want[key], key
    # the varied values as written, and in metres
    assert rows[0]["width"] == "4 mil" and rows[0]["width_m"] == pytest.approx(4 * 25.4e-6)


def test_rows_equal_build_json(tmp_path) -> None:
    shutil.copy(EXAMPLES / "backplane-lane.toml", tmp_path)
    text = """
name = "lanes"
scenario = "backplane-lane.toml"
[vary]
"lines.backplane.width" = ["7.4 mil", "8.2 mil"]
"channel.5.length" = ["2 in", "4 in"]
"""
    plan = write(tmp_path, "p.toml", text)
    res = api.run_sweep(plan, tmp_path / "t.csv", workers=0, charts=False)
    assert res.cases == 4 and res.failed == 0
    table = res.table.to_pylist()
    # Source: `build --json` of the scenario edited by hand as the plan's last case says
    src = (tmp_path / "backplane-lane.toml").read_text()
    edited = src.replace('width = "7.8 mil"', 'width = "8.2 mil"', 1)
    lines = edited.splitlines()
    seg = [i for i, ln in enumerate(lines) if ln.strip() == "[[channel]]"][4]
    k = next(i for i in range(seg, len(lines)) if lines[i].startswith("length"))
    lines[k] = 'length = "4 in"'
    write(tmp_path, "case4.toml", "\n".join(lines) + "\n")
    want = api.build(tmp_path / "case4.toml", out=tmp_path / "o", plots=False).to_json()
    row = table[-1]
    assert row["lines.backplane.width"] == "8.2 mil" and row["channel.5.length"] == "4 in"
    assert row["margin_db"] == want["budget"]["margin_db"]
    assert row["loss_at_nyquist_db"] == want["budget"]["total_db"]
    assert row["ild_peak_db"] == want["fit"]["ild_peak_db"]
    assert row["check1_loss_db"] == want["budget"]["checks"][0]["loss_db"]
    assert (tmp_path / "t.csv").read_text().startswith('"lines.backplane.width"')


def test_impossible_cases_are_recorded_and_the_rest_computed(tmp_path, capsys) -> None:
    text = """
name = "gaps"
[base]
kind = "gcpw"
width = "20 mil"
thickness = "1.4 mil"
height = "10 mil"
dielectric = "low-loss"
[vary]
gap = ["6 mil", "0 mil", "8 mil"]
[results]
at = ["5 GHz"]
"""
    plan = write(tmp_path, "p.toml", text)
    rc, out, err = run(capsys, "sweep", str(plan), "--out", str(tmp_path / "t.parquet"),
                       "--workers", "0", "--json", "--no-plots")  # fmt: skip
    assert rc == 1 and "1 of 3 cases failed" in err
    data = json.loads(out)
    assert data["failed"] == 1
    rows = pq.read_table(tmp_path / "t.parquet").to_pylist()
    # a zero gap is impossible (a thick strip's narrow gap is not: the side walls'
    # capacitance keeps it open, with a validity warning)
    assert "a gcpw needs gap > 0" in rows[1]["error"]
    assert rows[1]["z0_ohm_5GHz"] is None
    for row in (rows[0], rows[2]):
        want = api.line("gcpw", width="20 mil", gap=row["gap"], thickness="1.4 mil",
                        height="10 mil", dielectric="low-loss", at="5GHz").to_json()  # fmt: skip
        assert row["error"] is None and row["z0_ohm_5GHz"] == want["z0_ohm"][0]


def test_a_list_that_mixes_text_and_numbers_is_a_text_column(tmp_path, capsys) -> None:
    # found by the hostile-input suite: ["5 mil", 6] crashed the table writer (a column
    # of text and whole numbers); the value without a unit fails as its own case
    text = LINE_PLAN.format(kind="microstrip", extra="")
    text = text.replace('width = ["4 mil", "5 mil", "6 mil"]', 'width = ["5 mil", 6]')
    plan = write(tmp_path, "p.toml", text)
    rc, out, err = run(capsys, "sweep", str(plan), "--out", str(tmp_path / "t.parquet"),
                       "--workers", "0", "--json", "--no-plots")  # fmt: skip
    assert rc == 1 and "Traceback" not in err
    rows = pq.read_table(tmp_path / "t.parquet").to_pylist()
    assert {r["width"] for r in rows} == {"5 mil", "6"}
    for r in rows:
        assert (r["error"] is None) == (r["width"] == "5 mil"), r


def test_an_interrupted_run_resumes_to_the_same_table(tmp_path) -> None:
    text = LINE_PLAN.format(kind="microstrip", extra="chunk = 2").replace("chunk = 2", "")
    text = "chunk = 2\n" + text
    plan = write(tmp_path, "p.toml", text)
    whole = api.run_sweep(plan, tmp_path / "a.parquet", workers=0, charts=False).table

    class Stop(Exception):
        pass

    def stop_after_three(done: int, total: int) -> None:
        if done >= 6:
            raise Stop

    with pytest.raises(Stop):
        api.run_sweep(plan, tmp_path / "b.parquet", workers=0, progress=stop_after_three)
    parts = sorted((tmp_path / "b.parquet.parts").glob("part-*.parquet"))
    assert 0 < len(parts) < 9 and not (tmp_path / "b.parquet").exists()
    again = api.run_sweep(plan, tmp_path / "b.parquet", workers=0, charts=False).table
    assert again.equals(whole)


def test_random_samples_repeat_with_the_seed(tmp_path) -> None:
    text = """
name = "spread"
samples = 50
seed = 7
[base]
kind = "stripline"
width = "5 mil"
below = "5 mil"
above = "5 mil"
thickness = "0.6 mil"
dielectric = "low-loss"
[vary]
width = { nominal = "5 mil", tolerance = "10%", distribution = "normal" }
dielectric = ["low-loss", "very-low-loss"]
[results]
at = ["10 GHz"]
"""
    plan = write(tmp_path, "p.toml", text)
    a = api.run_sweep(plan, tmp_path / "a.parquet", workers=0, charts=False).table
    b = api.run_sweep(plan, tmp_path / "b.parquet", workers=0, charts=False).table
    assert a.num_rows == 100 and a.equals(b)
    w = np.array(a.column("width_m").to_pylist())
    # 10 % as 3 sigma (as `losslane spread` takes tolerances): sample sigma near 1/30
    assert abs(np.std(w) / (5 * 25.4e-6) - 1 / 30) < 0.01


@pytest.mark.parametrize(
    "vary, words",
    [
        ('colour = ["red"]', ("[vary].colour", "unknown parameter")),
        ('width = { start = "4 mil", stop = "4 mil", step = "1 mil" }', ("[vary].width.stop",)),
        ('width = { start = "4 mil", stop = "6 mil", step = "0.7 mil" }', ("[vary].width.step",)),
        ("width = []", ("[vary].width", "empty")),
    ],
)
def test_bad_plans_exit_2_naming_the_key(tmp_path, capsys, vary, words) -> None:
    text = LINE_PLAN.format(kind="microstrip", extra="").split("[vary]")[0]
    text += f'[vary]\n{vary}\n[results]\nat = ["1 GHz"]\n'
    plan = write(tmp_path, "p.toml", text)
    rc, out, err = run(capsys, "sweep", str(plan), "--out", str(tmp_path / "t.parquet"))
    assert rc == 2 and out == ""
    for w in words:
        assert w in err, err
    assert list(tmp_path.iterdir()) == [plan]


def test_an_existing_cluster_is_used_by_its_address(tmp_path) -> None:
    # a cluster started outside losslane (here: a one-worker local cluster), reached by
    # its scheduler address as on a shared cluster
    from distributed import LocalCluster

    plan = write(tmp_path, "p.toml", LINE_PLAN.format(kind="microstrip", extra=""))
    with LocalCluster(n_workers=1, threads_per_worker=1, dashboard_address=None) as cluster:
        res = api.run_sweep(
            plan, tmp_path / "t.parquet", scheduler=cluster.scheduler_address, charts=False
        )
    want = api.run_sweep(plan, tmp_path / "u.parquet", workers=0, charts=False)
    assert res.table.equals(want.table)

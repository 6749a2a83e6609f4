"""The sweep examples of examples/sweeps run as the README shows them: a stackup table
(layers x widths x laminate builds x foils, some cases on the field solver) and a channel
variation (builds); and the plan's ``together`` groups and stackup layers behave as
documented."""

from __future__ import annotations

import tomllib
from pathlib import Path

import numpy as np
import pytest

from losslane import api
from losslane.errors import LossLaneError
from losslane.sweep.plan import parse_plan

SWEEPS = Path(__file__).resolve().parents[1] / "examples" / "sweeps"


def rows(table) -> list[dict]:
    return table.to_pylist()


def test_stackup_table_example(tmp_path) -> None:
    res = api.run_sweep(SWEEPS / "stackup-table.toml", tmp_path / "t.parquet", workers=0)
    table = rows(res.table)
    assert res.cases == 36 and res.failed == 0  # 3 layers x 3 widths x 2 builds x 2 foils
    # each layer with its own kind (together), every other combination once
    assert {(r["layer"], r["kind"]) for r in table} == {
        ("L1", "microstrip"),
        ("L3", "stripline"),
        ("L8", "stripline"),
    }
    combos = {(r["layer"], r["width"], r["stackup"], r["foil"]) for r in table}
    assert len(combos) == 36
    # the model follows the layer: mask over L1 and two laminates around L3 -> field solver;
    # L8 inside one laminate -> closed form (the stackup docstring's rules)
    for r in table:
        assert r["model"] == ("closed-form" if r["layer"] == "L8" else "field")
    # physics, common practice: a wider trace has a lower impedance; a smoother foil and
    # a lower-loss laminate lose less
    for layer in ("L1", "L3", "L8"):
        for build in ("very-low-loss-build", "low-loss-build"):
            z = [
                r["z0_ohm_1GHz"]
                for w in ("4 mil", "5 mil", "6 mil")
                for r in table
                if (r["layer"], r["stackup"], r["foil"], r["width"])
                == (layer, build, "standard-ed", w)
            ]
            assert z[0] > z[1] > z[2]
    for r in table:
        if r["foil"] == "standard-ed":
            (smooth,) = [
                s
                for s in table
                if (s["layer"], s["width"], s["stackup"], s["foil"])
                == (r["layer"], r["width"], r["stackup"], "hyper-low-profile")
            ]
            assert smooth["loss_db_per_in_12.9GHz"] < r["loss_db_per_in_12.9GHz"]
    assert res.charts and all(p.is_file() for p in res.charts)


def test_a_closed_form_layer_case_equals_line_with_the_stackup_heights(tmp_path) -> None:
    # Source: `losslane line stripline` with the heights read off the board file by hand:
    # L8 has 7 mil of prepreg up to the L7 plane and a 5 mil core down to L9, 0.6 mil
    # copper, planes 1.2 mil, the very-low-loss laminate and the hyper-low-profile foil
    res = api.run_sweep(SWEEPS / "stackup-table.toml", tmp_path / "t.parquet", workers=0)
    (row,) = [
        r
        for r in rows(res.table)
        if (r["layer"], r["width"], r["stackup"], r["foil"])
        == ("L8", "5 mil", "very-low-loss-build", "hyper-low-profile")
    ]
    board = tomllib.loads((SWEEPS / "line-card-board.toml").read_text(encoding="utf-8"))
    layers = {x["name"]: x for x in board["stackups"]["very-low-loss-build"]["layers"]}
    assert layers["pp4"]["thickness"] == "7 mil" and layers["core4"]["thickness"] == "5 mil"
    ref = api.line(
        "stripline",
        width="5 mil",
        below="5 mil",
        above="7 mil",
        thickness="0.6 mil",
        dielectric="very-low-loss",
        foil="hyper-low-profile",
        plane_foil="hyper-low-profile",
        plane_thickness="1.2 mil",
        at="1GHz,12.9GHz,28GHz",
    ).to_json()
    for key in ("z0_ohm", "eps_eff", "loss_db_per_in"):
        got = [row[f"{key}_{f}"] for f in ("1GHz", "12.9GHz", "28GHz")]
        assert got == pytest.approx(ref[key], rel=1e-12)


def test_lane_variation_example(tmp_path) -> None:
    res = api.run_sweep(SWEEPS / "lane-variation.toml", tmp_path / "t.parquet", workers=0)
    table = rows(res.table)
    assert res.cases == 18 and res.failed == 0  # 3 lengths x 3 stub pairs x 2
    assert all(r["channel.10.via.stub"] == r["channel.12.via.stub"] for r in table)
    # physics, common practice: a longer backplane and longer via stubs cost margin
    for r in table:
        for s in table:
            same_stubs = all(r[k] == s[k] for k in ("channel.10.via.stub", "channel.18.via.stub"))
            if same_stubs and r["channel.11.length_m"] < s["channel.11.length_m"]:
                assert r["margin_db"] > s["margin_db"]
    assert all(r["passivity"] == 100 and r["reciprocity"] == 100 for r in table)
    best = max(table, key=lambda r: r["margin_db"])
    assert best["channel.11.length"] == "12 in" and best["channel.18.via.stub"] == "10 mil"


def test_together_groups_walk_side_by_side() -> None:
    plan = parse_plan(
        """
together = [["width", "height"]]
[base]
kind = "microstrip"
width = "5 mil"
height = "4 mil"
thickness = "1.4 mil"
dielectric = "low-loss"
[vary]
width = ["4 mil", "5 mil", "6 mil"]
height = ["3 mil", "4 mil", "5 mil"]
dielectric = ["low-loss", "very-low-loss"]
[results]
at = ["1 GHz"]
"""
    )
    assert plan.cases == 6  # 3 (width with height) x 2, not 3 x 3 x 2
    seen = []
    for case in range(plan.cases):
        i = plan.indices(case)
        assert i["width"] == i["height"]
        seen.append((i["width"], i["dielectric"]))
    assert sorted(seen) == sorted((w, d) for w in range(3) for d in range(2))
    arrays = plan.index_arrays(np.arange(plan.cases))
    assert [dict(zip(arrays, col, strict=True)) for col in zip(*arrays.values(), strict=True)] == [
        plan.indices(c) for c in range(plan.cases)
    ]


@pytest.mark.parametrize(
    ("together", "needle"),
    [
        ('[["width"]]', "at least two keys"),
        ('[["width", "thickness"]]', "'thickness' is not varied"),
        ('[["width", "height"]]', "lists of one length"),
        ('"width"', "expected a list of key lists"),
    ],
)
def test_bad_together_groups_name_the_key(together: str, needle: str) -> None:
    text = f"""
together = {together}
[base]
kind = "microstrip"
width = "5 mil"
height = "4 mil"
thickness = "1.4 mil"
dielectric = "low-loss"
[vary]
width = ["4 mil", "5 mil", "6 mil"]
height = ["3 mil", "4 mil"]
[results]
at = ["1 GHz"]
"""
    with pytest.raises(LossLaneError, match="together") as exc:
        parse_plan(text)
    assert needle in str(exc.value)

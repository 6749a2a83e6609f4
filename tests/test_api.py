"""Every command is also a Python call: the api functions return result objects whose
to_json() is what the commands print with --json (the same library code behind both;
checked on one case per command)."""

from __future__ import annotations

import pytest
from cli_helpers import run_json

from losslane import api

GEOMETRY = ["--height", "4mil", "--thickness", "1.4mil"]


cli_json = run_json


def test_line(capsys) -> None:
    args = ["--width", "6mil", *GEOMETRY, "--dk", "3.7", "--df", "0.009", "--dk-at", "10GHz"]
    got = api.line(
        "microstrip",
        width="6mil",
        height="4mil",
        thickness="1.4mil",
        dk=3.7,
        df=0.009,
        dk_at="10GHz",
        at="1GHz,10GHz",
    ).to_json()
    assert got == cli_json(capsys, "line", "microstrip", *args, "--at", "1GHz,10GHz")


def test_size(capsys) -> None:
    got = api.size(
        "microstrip", "50", height="4mil", thickness="1.4mil", dielectric="low-loss"
    ).to_json()
    want = cli_json(
        capsys, "size", "microstrip", "--target", "50", *GEOMETRY, "--dielectric", "low-loss"
    )
    assert got["width_m"] == pytest.approx(want["width_m"], rel=1e-12)
    assert got["achieved_ohm"] == pytest.approx(50.0, abs=1e-6)
    assert got["sensitivity"] == pytest.approx(want["sensitivity"], rel=1e-9)


def test_compare(capsys) -> None:
    mats = ["low-loss", "very-low-loss"]
    got = api.compare(
        "microstrip",
        mats,
        "50",
        foils=["smooth", "standard-ed"],
        at="10GHz,28GHz",
        height="4mil",
        thickness="1.4mil",
    ).to_json()
    want = cli_json(
        capsys,
        "compare",
        "microstrip",
        "--materials",
        ",".join(mats),
        "--foils",
        "smooth,standard-ed",
        "--target",
        "50",
        "--at",
        "10GHz,28GHz",
        *GEOMETRY,
        "--no-plot",
    )
    assert [(r["material"], r["foil"]) for r in got["rows"]] == [
        (r["material"], r["foil"]) for r in want["rows"]
    ]
    for a, b in zip(got["rows"], want["rows"], strict=True):
        assert a["width_m"] == pytest.approx(b["width_m"], rel=1e-12)
        assert a["loss_db_per_in"] == pytest.approx(b["loss_db_per_in"], rel=1e-12)


def test_spread_same_seed_same_numbers(capsys) -> None:
    got = api.spread(
        "microstrip",
        {"width": "0.5 mil", "dk": 0.1},
        samples=2000,
        seed=5,
        at="10GHz",
        width="7.9mil",
        height="4mil",
        thickness="1.4mil",
        dielectric="low-loss",
    ).to_json()
    want = cli_json(
        capsys,
        "spread",
        "microstrip",
        "--width",
        "7.9mil",
        *GEOMETRY,
        "--dielectric",
        "low-loss",
        "--width-tol",
        "0.5mil",
        "--dk-tol",
        "0.1",
        "--samples",
        "2000",
        "--seed",
        "5",
        "--at",
        "10GHz",
        "--no-plot",
    )
    for part in ("impedance", "loss_db_per_in"):
        assert set(got[part]) == set(want[part])
        for key, values in want[part].items():
            assert got[part][key] == pytest.approx(values, rel=1e-12), (part, key)


def test_materials(capsys) -> None:
    assert api.materials().to_json() == cli_json(capsys, "materials")

"""`losslane spread`: tolerance Monte Carlo. Each check names its source."""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest
from cli_helpers import run, run_json

from losslane import api
from losslane.design.spread import spread
from losslane.materials.dielectric import ConstantDielectric
from losslane.xsection import Microstrip, Stripline

MIL = 25.4e-6
MICROSTRIP = [
    "microstrip",
    "--width",
    "7.9mil",
    "--height",
    "4mil",
    "--thickness",
    "1.4mil",
    "--dielectric",
    "low-loss",
    "--foil",
    "very-low-profile",
]


def spread_json(capsys, *argv: str) -> dict:
    return run_json(capsys, "spread", *argv, "--no-plot")


def line_z0(capsys, argv: list[str], width_mil: float) -> float:
    a = list(argv)
    a[a.index("--width") + 1] = f"{width_mil!r}mil"
    rc, out, err = run(capsys, "line", *a, "--at", "1GHz", "--json")
    assert rc == 0, err
    return json.loads(out)["z0_ohm"][0]


@pytest.mark.parametrize(
    "distribution, sigma_of_tol", [("normal", 1 / 3), ("uniform", 1 / math.sqrt(3))]
)
def test_width_only_std_is_first_order_propagation(capsys, distribution, sigma_of_tol) -> None:
    # Source: first-order propagation of uncertainty, sigma_Z = |dZ/dw| sigma_w (JCGM 100:2008
    # "GUM", eq. 10); sigma_w = tol/3 for a +/- tolerance read as 3 sigma (issue 6), tol/sqrt(3)
    # for a uniform interval of half-width tol (GUM 4.3.7). dZ/dw from `losslane line`.
    tol = 0.1
    res = spread_json(
        capsys,
        *MICROSTRIP,
        "--width-tol",
        f"{tol}mil",
        "--samples",
        "20000",
        "--seed",
        "3",
        "--at",
        "1GHz",
        "--distribution",
        distribution,
    )
    slope = (line_z0(capsys, MICROSTRIP, 7.95) - line_z0(capsys, MICROSTRIP, 7.85)) / 0.1
    want = abs(slope) * tol * sigma_of_tol
    assert res["impedance"]["std"][0] == pytest.approx(want, rel=0.05)


def test_outside_share_and_percentiles_of_a_normal_response(capsys) -> None:
    # Source: the normal distribution -- P(|z| > 1) = 0.3173 and the 1st/99th percentiles
    # at mean -/+ 2.326 sigma; a small width tolerance keeps Z linear in w.
    base = spread_json(
        capsys,
        *MICROSTRIP,
        "--width-tol",
        "0.15mil",
        "--samples",
        "20000",
        "--seed",
        "11",
        "--at",
        "1GHz",
    )
    sigma = base["impedance"]["std"][0]
    res = spread_json(
        capsys,
        *MICROSTRIP,
        "--width-tol",
        "0.15mil",
        "--samples",
        "20000",
        "--seed",
        "11",
        "--at",
        "1GHz",
        "--band",
        f"{sigma!r}ohm",
    )
    imp = res["impedance"]
    assert imp["outside_share"][0] == pytest.approx(0.3173, abs=0.015)
    assert (imp["mean"][0] - imp["p01"][0]) / sigma == pytest.approx(2.326, rel=0.04)
    assert (imp["p99"][0] - imp["mean"][0]) / sigma == pytest.approx(2.326, rel=0.04)


def test_dk_only_spread_of_a_tem_stripline() -> None:
    # Source: Cohn (1954) -- a zero-thickness stripline's Z0 scales as 1/sqrt(Dk), so
    # sigma_Z = Z0 sigma_Dk / (2 Dk) to first order (GUM eq. 10).
    sec = Stripline(5 * MIL, 5 * MIL, 5 * MIL, 0.0, ConstantDielectric(4.0))
    with pytest.warns(Warning):
        res = spread(sec, {"dk": 0.06}, [1e9], samples=20000, seed=5)
    z0 = float(res.nominal_impedance[0])
    want = z0 * (0.06 / 3) / (2 * 4.0)
    assert float(res.impedance.std(ddof=1)) == pytest.approx(want, rel=0.03)


def test_same_seed_same_numbers(capsys) -> None:
    args = [
        *MICROSTRIP,
        "--width-tol",
        "0.5mil",
        "--height-tol",
        "10%",
        "--thickness-tol",
        "0.2mil",
        "--dk-tol",
        "0.1",
        "--samples",
        "3000",
        "--at",
        "1GHz,28GHz",
    ]
    a = spread_json(capsys, *args, "--seed", "42")
    b = spread_json(capsys, *args, "--seed", "42")
    c = spread_json(capsys, *args, "--seed", "43")
    assert a == b
    assert a["impedance"]["mean"] != c["impedance"]["mean"]
    assert a["samples"] == 3000 and a["seed"] == 42


def test_result_does_not_depend_on_chunking() -> None:
    sec = Microstrip(7.9 * MIL, 4 * MIL, 1.4 * MIL, ConstantDielectric(3.6, 0.006))
    tol = {"width": 0.5 * MIL, "height": 0.4 * MIL, "dk": 0.1}
    a = spread(sec, tol, [1e9, 28e9], samples=5000, seed=9)
    done: list[int] = []
    b = spread(sec, tol, [1e9, 28e9], samples=5000, seed=9, chunk=777, progress=done.append)
    np.testing.assert_array_equal(a.impedance, b.impedance)
    np.testing.assert_array_equal(a.loss, b.loss)
    assert done[-1] == 5000 and len(done) == 7


class _Unvectorized(Microstrip):
    """Takes the per-sample path, as the field-solver kinds do."""


def test_per_sample_path_gives_the_same_statistics() -> None:
    sec = Microstrip(7.9 * MIL, 4 * MIL, 1.4 * MIL, ConstantDielectric(3.6, 0.006))
    slow = _Unvectorized(sec.width, sec.height, sec.thickness, sec.dielectric, sec.metal)
    tol = {"width": 0.5 * MIL, "dk": 0.1}
    a = spread(sec, tol, [1e9, 10e9], samples=60, seed=2)
    b = spread(slow, tol, [1e9, 10e9], samples=60, seed=2)
    np.testing.assert_allclose(b.impedance, a.impedance, rtol=1e-12)
    np.testing.assert_allclose(b.loss, a.loss, rtol=1e-12)


def test_json_contract_and_loss_statistics(capsys) -> None:
    res = spread_json(
        capsys,
        *MICROSTRIP,
        "--width-tol",
        "0.5mil",
        "--dk-tol",
        "3%",
        "--samples",
        "2000",
        "--at",
        "1GHz,10GHz,28GHz",
    )
    for key in ("samples", "seed", "impedance", "loss_db_per_in"):
        assert key in res
    for key in ("mean", "std", "p01", "p99", "outside_share"):
        assert len(res["impedance"][key]) == 3
    for key in ("mean", "std", "p01", "p99"):
        assert len(res["loss_db_per_in"][key]) == 3
    loss = res["loss_db_per_in"]
    assert all(s > 0 for s in loss["std"])
    assert loss["mean"][0] < loss["mean"][1] < loss["mean"][2]
    assert res["tolerances"] == {
        "width_m": pytest.approx(0.5 * MIL),
        "dk": pytest.approx(0.03 * 3.6),
    }
    assert res["tolerance_is"] == "3 sigma"


def test_stripline_takes_below_and_above(capsys) -> None:
    res = spread_json(
        capsys,
        "stripline",
        "--width",
        "4.8mil",
        "--below",
        "5mil",
        "--above",
        "5mil",
        "--thickness",
        "0.6mil",
        "--dielectric",
        "low-loss",
        "--below-tol",
        "0.5mil",
        "--above-tol",
        "0.5mil",
        "--samples",
        "2000",
        "--at",
        "1GHz",
    )
    assert res["impedance"]["std"][0] > 0


def test_histograms_are_written(capsys, tmp_path: Path) -> None:
    png = tmp_path / "h.png"
    rc, out, err = run(
        capsys,
        "spread",
        *MICROSTRIP,
        "--width-tol",
        "0.5mil",
        "--samples",
        "500",
        "--plot",
        str(png),
        "--json",
    )
    assert rc == 0, err
    assert json.loads(out)["plot"] == str(png)
    assert png.read_bytes()[:4] == b"\x89PNG"


def test_progress_bar_stays_off_stdout(capsys, monkeypatch) -> None:
    monkeypatch.setattr(api, "PROGRESS_WORK", 0)
    rc, out, err = run(
        capsys,
        "spread",
        *MICROSTRIP,
        "--width-tol",
        "0.5mil",
        "--samples",
        "500",
        "--json",
        "--no-plot",
    )
    assert rc == 0
    assert json.loads(out)["samples"] == 500  # stdout is exactly one JSON object
    assert "sampling" in err


def test_text_output_says_3_sigma(capsys) -> None:
    rc, out, _ = run(
        capsys, "spread", *MICROSTRIP, "--width-tol", "0.5mil", "--samples", "500", "--no-plot"
    )
    assert rc == 0 and "3 sigma" in out and "outside" in out


@pytest.mark.parametrize(
    "argv, words",
    [
        (["--width-tol", "0.5"], ("--width-tol", "unit")),
        (["--width-tol", "-0.5mil"], ("--width-tol", ">= 0")),
        # a percentage that overflows to inf is named as not finite, not as negative
        (["--width-tol", "1e400%"], ("--width-tol", "finite")),
        (["--dk-tol", "1e400"], ("--dk-tol", "finite")),
        (["--width-tol", "8mil"], ("--width-tol", "smaller")),
        (["--dk-tol", "5mil"], ("--dk-tol",)),
        (["--dk-tol", "3.0"], ("--dk-tol", "air")),
        (["--gap-tol", "1mil"], ("--gap-tol", "no gap")),
        ([], ("at least one",)),
        (["--width-tol", "0.5mil", "--samples", "1"], ("--samples",)),
        (["--width-tol", "0.5mil", "--band", "0%"], ("--band",)),
        (["--width-tol", "0.5mil", "--band", "10"], ("--band",)),
        (["--width-tol", "0.5mil", "--seed", "-3"], ("--seed",)),
        (["--width-tol", "0.5mil", "--distribution", "triangle"], ("triangle",)),
    ],
)
def test_bad_tolerance_specs_are_exit_2(capsys, argv, words) -> None:
    rc, out, err = run(capsys, "spread", *MICROSTRIP, *argv, "--no-plot")
    assert rc == 2 and out == "" and "Traceback" not in err
    for w in words:
        assert w in err


def test_height_tol_on_stripline_points_to_below_above(capsys) -> None:
    rc, _, err = run(
        capsys,
        "spread",
        "stripline",
        "--width",
        "5mil",
        "--below",
        "5mil",
        "--above",
        "5mil",
        "--thickness",
        "0.6mil",
        "--dielectric",
        "low-loss",
        "--height-tol",
        "0.5mil",
        "--no-plot",
    )
    assert rc == 2 and "--below-tol" in err


def test_thickness_tol_needs_a_thickness(capsys) -> None:
    a = list(MICROSTRIP)
    a[a.index("--thickness") + 1] = "0mil"
    rc, _, err = run(capsys, "spread", *a, "--thickness-tol", "0.1mil", "--no-plot")
    assert rc == 2 and "--thickness-tol" in err


def test_pair_spread_reports_z_diff(capsys) -> None:
    res = spread_json(
        capsys,
        "microstrip-pair",
        "--width",
        "5mil",
        "--spacing",
        "6mil",
        "--height",
        "4mil",
        "--thickness",
        "1.4mil",
        "--dielectric",
        "low-loss",
        "--width-tol",
        "0.3mil",
        "--samples",
        "200",
        "--at",
        "1GHz",
    )
    assert res["impedance_kind"] == "z_diff"
    assert res["impedance"]["mean"][0] == pytest.approx(
        res["nominal"]["impedance_ohm"][0], rel=0.02
    )

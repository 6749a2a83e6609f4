"""`losslane compare`: materials and foils at equal impedance. Each check names its source."""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from cli_helpers import run, run_json

from losslane.cli import main

MIL = 25.4e-6
MATERIALS = [
    "epoxy-glass-standard",
    "epoxy-glass-midloss",
    "low-loss",
    "very-low-loss",
    "ultra-low-loss",
    "ptfe-ceramic",
]
DF = {
    "epoxy-glass-standard": 0.020,
    "epoxy-glass-midloss": 0.010,
    "low-loss": 0.006,
    "very-low-loss": 0.0035,
    "ultra-low-loss": 0.0018,
    "ptfe-ceramic": 0.0013,
}
# rough to smooth (bundled Huray classes; smooth is ideal copper)
FOILS = ["standard-ed", "reverse-treated", "very-low-profile", "hyper-low-profile", "smooth"]
MICROSTRIP = ["microstrip", "--height", "4mil", "--thickness", "1.4mil"]
STRIPLINE = ["stripline", "--below", "5mil", "--above", "5mil", "--thickness", "0.6mil"]


def compare_json(capsys, *argv: str) -> dict:
    return run_json(capsys, "compare", *argv, "--no-plot")


@pytest.fixture(scope="module")
def grid(tmp_path_factory) -> dict:
    import contextlib
    import io

    buf = io.StringIO()
    with contextlib.redirect_stdout(buf):
        rc = main(
            [
                "compare",
                *MICROSTRIP,
                "--materials",
                ",".join(MATERIALS),
                "--foils",
                ",".join(FOILS),
                "--target",
                "50",
                "--at",
                "1GHz,14GHz,28GHz",
                "--json",
                "--no-plot",
            ]
        )
    assert rc == 0
    return json.loads(buf.getvalue())


def rows_for(res: dict, **match: str) -> list[dict]:
    return [r for r in res["rows"] if all(r[k] == v for k, v in match.items())]


def test_loss_falls_with_df_for_each_foil(grid: dict) -> None:
    # Source: common practice -- at equal impedance and the same foil, a laminate with a
    # lower Df loses less at high frequency (dielectric loss ~ f Df sqrt(Dk)).
    for foil in FOILS:
        rows = sorted(rows_for(grid, foil=foil), key=lambda r: -DF[r["material"]])
        top = [r["loss_db_per_in"][-1] for r in rows]
        assert all(a > b for a, b in zip(top, top[1:], strict=False)), (foil, top)


def test_smoother_foil_loses_less(grid: dict) -> None:
    # Source: common practice (and Huray's model: fewer / smaller nodules, less excess
    # loss) -- for the same laminate, a smoother foil has less conductor loss.
    for mat in MATERIALS:
        by_foil = {r["foil"]: r for r in rows_for(grid, material=mat)}
        cond = [by_foil[f]["conductor_db_per_in"][-1] for f in FOILS]
        total = [by_foil[f]["loss_db_per_in"][-1] for f in FOILS]
        assert all(a > b for a, b in zip(cond, cond[1:], strict=False)), (mat, cond)
        assert all(a > b for a, b in zip(total, total[1:], strict=False)), (mat, total)


def test_resized_width_grows_as_dk_falls(grid: dict) -> None:
    # Source: Z0 ~ 1/sqrt(eps_eff) (TEM/quasi-TEM line theory): a lower-Dk laminate needs a
    # wider trace for the same impedance.
    for foil in FOILS:
        rows = sorted(rows_for(grid, foil=foil), key=lambda r: -r["dk"])
        widths = [r["width_m"] for r in rows]
        assert all(a < b for a, b in zip(widths, widths[1:], strict=False)), (foil, widths)


def test_rows_sorted_and_split_adds_up(grid: dict) -> None:
    top = [r["loss_db_per_in"][-1] for r in grid["rows"]]
    assert top == sorted(top)
    assert len(grid["rows"]) == len(MATERIALS) * len(FOILS)
    for r in grid["rows"]:
        assert abs(r["achieved_ohm"] - 50.0) < 1e-6
        for t, c, d in zip(
            r["loss_db_per_in"], r["conductor_db_per_in"], r["dielectric_db_per_in"], strict=True
        ):
            assert t == pytest.approx(c + d, rel=1e-12)


def test_json_contract(grid: dict) -> None:
    assert grid["frequencies_hz"] == [1e9, 14e9, 28e9]
    for r in grid["rows"]:
        for key in (
            "material",
            "foil",
            "width_m",
            "loss_db_per_in",
            "conductor_db_per_in",
            "dielectric_db_per_in",
        ):
            assert key in r
        assert len(r["loss_db_per_in"]) == 3


def test_row_round_trips_through_line(capsys, grid: dict) -> None:
    # Source: round trip through `losslane line` with the row's width.
    r = grid["rows"][0]
    rc, out, err = run(
        capsys,
        "line",
        *MICROSTRIP,
        "--width",
        f"{r['width_m']!r}m",
        "--dielectric",
        r["material"],
        "--foil",
        r["foil"],
        "--at",
        "1GHz,14GHz,28GHz",
        "--json",
    )
    assert rc == 0, err
    p = json.loads(out)
    assert abs(p["z0_ohm"][0] - 50.0) < 0.05
    assert p["loss_db_per_in"] == pytest.approx(r["loss_db_per_in"], rel=1e-9)


def test_stripline_dielectric_loss_matches_tem_formula(capsys, tmp_path: Path) -> None:
    # Source: dielectric attenuation of a TEM line, alpha_d = pi f sqrt(Dk) Df / c0 (exact
    # to first order in Df for a homogeneous dielectric), i.e. about 2.3 f[GHz] Df sqrt(Dk)
    # dB/in (common practice). At the dk/df frequency (10 GHz) the causal model has exactly
    # that Dk and Df. A zero-thickness strip carries no internal inductance, which would
    # otherwise raise the R = 0 part of the split by L_int/(2 L) (a few tenths of a %).
    lib = tmp_path / "lib.toml"
    lib.write_text(
        "".join(
            f'[dielectrics.test-{i}]\ndk = 3.6\ndf = {df}\nat = "10 GHz"\nnote = "test"\n'
            for i, df in enumerate((0.002, 0.005, 0.010, 0.020))
        )
    )
    args = ["stripline", "--below", "5mil", "--above", "5mil", "--thickness", "0mil"]
    res = compare_json(
        capsys,
        *args,
        "--materials",
        "test-0,test-1,test-2,test-3",
        "--foils",
        "smooth",
        "--target",
        "50",
        "--at",
        "10GHz",
        "--size-at",
        "10GHz",
        "--library",
        str(lib),
    )
    widths = [r["width_m"] for r in res["rows"]]
    # sized where all four have Dk 3.6 (below it the causal model's Dk rises with Df)
    assert max(widths) / min(widths) - 1 < 1e-9
    for r in res["rows"]:
        want = 20 / math.log(10) * math.pi * 10e9 * math.sqrt(3.6) * r["df"] / 299_792_458.0
        want *= 0.0254
        # second order in Df: relative 3 Df^2 / 8 <= 1.5e-4
        assert r["dielectric_db_per_in"][0] == pytest.approx(want, rel=1e-3)
    assert [r["material"] for r in res["rows"]] == ["test-0", "test-1", "test-2", "test-3"]


def test_chart_is_written(capsys, tmp_path: Path) -> None:
    png = tmp_path / "out" / "cmp.png"
    png.parent.mkdir()  # the folder of a --plot must exist (README: where files go)
    rc, out, err = run(
        capsys,
        "compare",
        *MICROSTRIP,
        "--materials",
        "low-loss,ptfe-ceramic",
        "--foils",
        "smooth,standard-ed",
        "--target",
        "50",
        "--plot",
        str(png),
        "--json",
    )
    assert rc == 0, err
    assert json.loads(out)["plot"] == str(png)
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert [p.name for p in png.parent.iterdir()] == ["cmp.png"]  # no temporary left over


def test_text_table(capsys, tmp_path: Path) -> None:
    rc, out, _ = run(
        capsys,
        "compare",
        *MICROSTRIP,
        "--materials",
        "low-loss,ptfe-ceramic",
        "--target",
        "50",
        "--no-plot",
    )
    assert rc == 0
    assert "re-sized to Z0 = 50 ohm" in out and "ptfe-ceramic" in out
    assert out.index("ptfe-ceramic") < out.index("low-loss")  # lowest loss first


@pytest.mark.parametrize(
    "argv, words",
    [
        (["--materials", "no-such-laminate"], ("--materials", "unknown dielectric")),
        (["--materials", "low-loss", "--foils", "mirror"], ("--foils", "unknown foil")),
        (["--materials", "low-loss", "--dk", "3.5"], ("--materials",)),
        (["--materials", "low-loss", "--width", "5mil"], ("--width",)),
        (["--materials", "low-loss,", "--target", "50"], ("--materials",)),
    ],
)
def test_bad_requests_are_exit_2(capsys, argv, words) -> None:
    args = ["compare", *MICROSTRIP, *argv]
    if "--target" not in argv:
        args += ["--target", "50"]
    rc, out, err = run(capsys, *args, "--no-plot")
    assert rc == 2 and out == "" and "Traceback" not in err
    for w in words:
        assert w in err


def test_impossible_target_names_the_candidate(capsys) -> None:
    rc, _, err = run(
        capsys,
        "compare",
        *MICROSTRIP,
        "--materials",
        "low-loss,ptfe-ceramic",
        "--target",
        "300",
        "--no-plot",
    )
    assert rc == 2 and "material 'low-loss'" in err and "thicker dielectric" in err


def test_pairs_compare_at_equal_z_diff(capsys) -> None:
    res = compare_json(
        capsys,
        "microstrip-pair",
        "--height",
        "4mil",
        "--thickness",
        "1.4mil",
        "--spacing",
        "6mil",
        "--materials",
        "low-loss,ptfe-ceramic",
        "--target",
        "100",
    )
    widths = {r["material"]: r["width_m"] for r in res["rows"]}
    assert widths["ptfe-ceramic"] > widths["low-loss"]

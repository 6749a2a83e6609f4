"""`losslane line`: the --json contract of DESIGN.md and clean failures on bad input
(exit code 2, one message on stderr naming the option and value, no traceback)."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from losslane.cli import main

SRC = Path(__file__).resolve().parents[1] / "src"
GOOD = ["--width", "6mil", "--height", "3.5mil", "--thickness", "1.4mil"]
MATERIAL = ["--dk", "3.7", "--df", "0.009", "--dk-at", "10GHz"]
CONTRACT = {
    "kind",
    "frequencies_hz",
    "z0_ohm",
    "zc_real_ohm",
    "zc_imag_ohm",
    "eps_eff",
    "delay_ps_per_in",
    "loss_db_per_in",
    "conductor_db_per_in",
    "dielectric_db_per_in",
    "rlgc",
}
RLGC_KEYS = {"r_ohm_per_m", "l_h_per_m", "g_s_per_m", "c_f_per_m"}


def run(*args: str) -> subprocess.CompletedProcess:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(SRC) + os.pathsep + env.get("PYTHONPATH", "")
    return subprocess.run(
        [sys.executable, "-m", "losslane", *args],
        capture_output=True,
        text=True,
        env=env,
        timeout=60,
    )


def test_json_output_is_one_object_with_the_contract_keys() -> None:
    # DESIGN.md, "Command line -- the contract": one JSON object on stdout, nothing else
    proc = run("line", "microstrip", *GOOD, *MATERIAL, "--at", "1GHz,10GHz,28GHz", "--json")
    assert proc.returncode == 0, proc.stderr
    assert "Traceback" not in proc.stderr
    obj = json.loads(proc.stdout)  # raises if stdout holds anything but one JSON document
    assert isinstance(obj, dict)
    assert proc.stdout.strip().count("\n") == 0
    assert CONTRACT <= set(obj)
    assert set(obj["rlgc"]) == RLGC_KEYS
    assert obj["kind"] == "microstrip"
    assert obj["frequencies_hz"] == [1e9, 10e9, 28e9]
    for key in CONTRACT - {"kind", "frequencies_hz", "rlgc"}:
        assert len(obj[key]) == 3 and all(np.isfinite(obj[key])), key
    for key in RLGC_KEYS:
        assert len(obj["rlgc"][key]) == 3 and all(np.isfinite(obj["rlgc"][key])), key
    # the command is a thin shell over the Python call (DESIGN.md): same numbers
    from losslane.api import line

    same = line(
        "microstrip",
        width="6mil",
        height="3.5mil",
        thickness="1.4mil",
        dk=3.7,
        df=0.009,
        dk_at="10GHz",
        at="1GHz,10GHz,28GHz",
    ).to_json()
    assert same == obj
    # a quasi-TEM line's delay lies between the air and the full-Dk TEM values, 84.7 and
    # 84.7 sqrt(3.7) = 163 ps/in (exact from c), and its loss grows with frequency
    assert all(84.7 < d < 163 for d in obj["delay_ps_per_in"])
    assert obj["loss_db_per_in"] == sorted(obj["loss_db_per_in"])
    # losses in dB are positive and split into conductor + dielectric
    for tot, c, d in zip(
        obj["loss_db_per_in"], obj["conductor_db_per_in"], obj["dielectric_db_per_in"], strict=True
    ):
        assert tot > 0 and c > 0 and d > 0 and tot == pytest.approx(c + d, rel=1e-12)


def test_warnings_go_to_stderr_only() -> None:
    # w/h = 200 is outside Hammerstad-Jensen's range: a warning, still one JSON object
    proc = run(
        "line",
        "microstrip",
        "--width",
        "700mil",
        "--height",
        "3.5mil",
        "--thickness",
        "1.4mil",
        *MATERIAL,
        "--at",
        "1GHz",
        "--json",
    )
    assert proc.returncode == 0
    json.loads(proc.stdout)
    assert "warning:" in proc.stderr and "width/height" in proc.stderr
    assert "warning" not in proc.stdout


def test_dc_point_in_json_is_finite_or_null() -> None:
    proc = run(
        "line",
        "stripline",
        "--width",
        "5mil",
        "--below",
        "6mil",
        "--above",
        "6mil",
        "--thickness",
        "0.6mil",
        *MATERIAL,
        "--at",
        "0Hz,1GHz",
        "--json",
    )
    assert proc.returncode == 0, proc.stderr
    obj = json.loads(proc.stdout)
    # at DC the complex impedance sqrt(R/G) is infinite: JSON has no inf, so it is null
    assert obj["zc_real_ohm"][0] is None
    assert np.isfinite(obj["z0_ohm"][0]) and obj["rlgc"]["g_s_per_m"][0] == 0


def test_subprocess_bad_input_has_no_traceback() -> None:
    proc = run(
        "line",
        "microstrip",
        "--width",
        "6",
        "--height",
        "3.5mil",
        "--thickness",
        "1.4mil",
        *MATERIAL,
    )
    assert proc.returncode == 2
    assert proc.stdout == ""
    assert "Traceback" not in proc.stderr
    assert "--width" in proc.stderr and "'6'" in proc.stderr and "mil" in proc.stderr


BAD = [
    # (argv, fragments that must appear in the one message)
    (
        [
            "line",
            "microstrip",
            "--width",
            "6",
            "--height",
            "3.5mil",
            "--thickness",
            "1.4mil",
            *MATERIAL,
        ],
        ["--width", "'6'", "bare number", "mil", "mm"],
    ),
    (
        [
            "line",
            "microstrip",
            "--width=-6mil",
            "--height",
            "3.5mil",
            "--thickness",
            "1.4mil",
            *MATERIAL,
        ],
        ["--width", "-6mil", "> 0"],
    ),
    (
        ["line", "microstrip", *GOOD, "--dk", "0.5", "--df", "0.009", "--dk-at", "10GHz"],
        ["dk = 0.5", ">= 1"],
    ),
    (
        ["line", "microstrip", *GOOD, "--dk", "3.7", "--df", "1.0", "--dk-at", "10GHz"],
        ["df = 1.0", "0 <= df < 1"],
    ),
    (
        ["line", "microstrip", *GOOD, "--dk", "3.7", "--df", "-0.01", "--dk-at", "10GHz"],
        ["df = -0.01"],
    ),
    (["line", "microstrp", *GOOD, *MATERIAL], ["'microstrp'", "did you mean 'microstrip'"]),
    (
        ["line", "microstrip", *GOOD, *MATERIAL, "--foil", "shiny"],
        ["--foil", "'shiny'", "unknown foil", "very-low-profile"],
    ),
    (["line", "microstrip", *GOOD], ["missing dielectric", "--dk", "--dielectric"]),
    (
        ["line", "microstrip", *GOOD, "--dielectric", "unobtainium"],
        ["'unobtainium'", "unknown dielectric", "low-loss"],
    ),
    (["line", "microstrip", *GOOD, "--dk", "3.7", "--dk-at", "10"], ["--dk-at", "'10'", "GHz"]),
    (["line", "microstrip", *GOOD, *MATERIAL, "--at", "5"], ["--at", "'5'", "GHz"]),
    (["line", "microstrip", "--width", "6mil", "--height", "3.5mil", *MATERIAL], ["--thickness"]),
    (
        [
            "line",
            "cpw",
            "--width",
            "10mil",
            "--gap",
            "0mil",
            "--height",
            "10mil",
            "--thickness",
            "1.4mil",
            *MATERIAL,
        ],
        ["--gap", "'0mil'", "gap > 0"],
    ),
    (
        ["line", "microstrip", *GOOD, *MATERIAL, "--conductivity", "-5"],
        ["conductivity", "-5", "> 0"],
    ),
    (["line", "microstrip", *GOOD, *MATERIAL, "--roughness-model", "hammerstad"], ["--rq"]),
]


@pytest.mark.parametrize(("argv", "fragments"), BAD, ids=[" ".join(b[0][1:3]) for b in BAD])
def test_bad_input_is_exit_code_2_with_one_clear_message(argv, fragments, capsys) -> None:
    code = main(argv)
    out, err = capsys.readouterr()
    assert code == 2
    assert out == ""  # nothing half-written on stdout
    assert "Traceback" not in err
    lines = [x for x in err.splitlines() if x.strip()]
    assert len(lines) == 1 and lines[0].startswith("error: "), err
    for fragment in fragments:
        assert fragment in err, (fragment, err)


def test_click_usage_errors_also_exit_2(capsys) -> None:
    # a value click itself cannot parse (not a float) is a usage error, exit code 2
    code = main(["line", "microstrip", *GOOD, "--dk", "abc"])
    _, err = capsys.readouterr()
    assert code == 2 and "--dk" in err and "Traceback" not in err


def test_table_output_names_the_line(capsys) -> None:
    code = main(
        [
            "line",
            "gcpw",
            "--width",
            "10mil",
            "--gap",
            "5mil",
            "--height",
            "10mil",
            "--thickness",
            "1.4mil",
            "--dielectric",
            "low-loss",
            "--foil",
            "very-low-profile",
            "--at",
            "0Hz,5.8GHz",
        ]
    )
    out, err = capsys.readouterr()
    assert code == 0, err
    assert out.startswith("gcpw") and "huray" in out and "5.8" in out

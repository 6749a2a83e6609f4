"""The field solver behind the scenario keys, the command line, the cache and the picture."""

from __future__ import annotations

import json

import numpy as np
import pytest
from reported import properties

from losslane.api import section
from losslane.cli import main
from losslane.errors import LossLaneError
from losslane.materials.dielectric import ConstantDielectric, WidebandDebye
from losslane.xsection import registry
from losslane.xsection.base import Metal
from losslane.xsection.fieldsolve import solve as fsolve
from losslane.xsection.fieldsolve.keys import EXTRA_KEYS
from losslane.xsection.fieldsolve.options import field_section
from losslane.xsection.fieldsolve.section import FieldSection

MIL = 25.4e-6
BASE = {"thickness": "1.4 mil", "dielectric": "low-loss", "solver": "field", "accuracy": "coarse"}


def test_registered_kinds_and_keys():
    for kind in ("microstrip", "stripline", "cpw", "gcpw", "microstrip-pair", "stripline-pair"):
        assert kind in registry.field_kinds()
    for key in (
        "top_width",
        "etch_factor",
        "coating_thickness",
        "coating_dielectric",
        "dielectric_above",
        "accuracy",
    ):
        assert key in EXTRA_KEYS


@pytest.mark.parametrize(
    "spec",
    [
        {
            "kind": "microstrip",
            "width": "6 mil",
            "height": "3.5 mil",
            "etch_factor": 2.5,
            "coating_thickness": "0.8 mil",
            "coating_dielectric": "solder-mask",
        },
        {
            "kind": "stripline",
            "width": "5 mil",
            "below": "5 mil",
            "above": "6 mil",
            "dielectric_above": "very-low-loss",
            "top_width": "4.2 mil",
        },
        {"kind": "cpw", "width": "8 mil", "gap": "6 mil", "height": "20 mil"},
        {
            "kind": "gcpw",
            "width": "8 mil",
            "gap": "6 mil",
            "height": "10 mil",
            "coating_thickness": "0.6 mil",
            "coating_dielectric": "solder-mask",
        },
    ],
)
def test_kinds_build_from_scenario_keys(spec):
    sec = section({**BASE, **spec})
    assert isinstance(sec, FieldSection)
    p = properties(sec, np.array([0.0, 1e9, 2e10]))
    assert p["kind"] == spec["kind"] and p["solver"] == "field"
    assert 20 < p["z0_ohm"][1] < 120
    assert all(np.isfinite(p["loss_db_per_in"]))
    assert p["field_solver"]["error_estimate"]["z0"] < 0.02


def test_field_and_closed_form_agree_for_a_plain_microstrip():
    """Hammerstad-Jensen with thickness correction (the closed form) vs the solver: the
    quasi-static Z0 agrees to 1 % (HJ states 1 % or better for t/h < 0.5, from memory)."""
    spec = {
        "kind": "microstrip",
        "width": "6 mil",
        "height": "3.5 mil",
        "thickness": "1.4 mil",
        "dielectric": "low-loss",
    }
    cf = properties(section(spec), np.array([1e8]))
    fs = properties(section({**spec, "solver": "field"}), np.array([1e8]))
    assert fs["z0_ohm"][0] == pytest.approx(cf["z0_ohm"][0], rel=0.01)


def test_pair_builders_give_even_odd_properties():
    d = WidebandDebye(3.6, 0.006, 10e9)
    geo = {"width": 5 * MIL, "spacing": 6 * MIL, "height": 4 * MIL, "thickness": 1.2 * MIL}
    spec = {
        "accuracy": "coarse",
        "etch_factor": 2.0,
        "coating_thickness": "0.7 mil",
        "coating_dielectric": WidebandDebye(3.5, 0.02, 1e9),
    }
    sec = field_section(registry.model("microstrip-pair"), geo, d, Metal(), spec, "lines.pair")
    assert sec.n_conductors == 2
    p = properties(sec, np.array([1e9, 1.6e10]))
    assert 70 < p["z_diff_ohm"][0] < 120
    assert p["eps_eff_even"][0] > p["eps_eff_odd"][0]  # even mode has more field below
    geo_s = {
        "width": 4 * MIL,
        "spacing": 6 * MIL,
        "below": 5 * MIL,
        "above": 5 * MIL,
        "thickness": 0.6 * MIL,
    }
    sec_s = field_section(
        registry.model("stripline-pair"), geo_s, d, Metal(), {"accuracy": "coarse"}, "x"
    )
    rl = sec_s.rlgc(np.array([1e9]))
    assert rl.c.shape == (1, 2, 2)


@pytest.mark.parametrize(
    "extra, word",
    [
        ({"top_width": "5 mil", "etch_factor": 2.0}, "not both"),
        ({"etch_factor": 0.3}, "etch factors"),
        ({"coating_thickness": "0.5 mil"}, "coating_dielectric"),
        ({"accuracy": "extreme"}, "accuracy"),
        ({"dielectric_above": "low-loss"}, "dielectric_above"),
    ],
)
def test_bad_microstrip_keys_name_the_key(extra, word):
    spec = {**BASE, "kind": "microstrip", "width": "6 mil", "height": "3.5 mil", **extra}
    with pytest.raises(LossLaneError, match=word):
        section(spec)


def test_coating_rejected_on_stripline_and_too_thick_for_the_gap():
    with pytest.raises(LossLaneError, match="coating_thickness"):
        section(
            {
                **BASE,
                "kind": "stripline",
                "width": "5 mil",
                "below": "5 mil",
                "above": "5 mil",
                "coating_thickness": "1 mil",
                "coating_dielectric": "solder-mask",
            }
        )
    with pytest.raises(LossLaneError, match="half the gap"):
        section(
            {
                **BASE,
                "kind": "cpw",
                "width": "8 mil",
                "gap": "1 mil",
                "height": "10 mil",
                "coating_thickness": "0.8 mil",
                "coating_dielectric": "solder-mask",
            }
        )


def test_cache_solves_a_section_once():
    fsolve.CACHE.clear()
    d1 = ConstantDielectric(3.7, 0.01)
    d2 = ConstantDielectric(3.7, 0.02)  # same permittivity, other loss: same field
    geo = {"width": 6 * MIL, "height": 4 * MIL, "thickness": 1.4 * MIL}
    a = field_section(registry.model("microstrip"), geo, d1, Metal(), {"accuracy": "coarse"}, "a")
    b = field_section(registry.model("microstrip"), geo, d2, Metal(), {"accuracy": "coarse"}, "b")
    properties(a, np.array([1e9]))
    first = fsolve.CACHE.solves
    assert first == 2  # the setting and the coarser one (error estimate)
    a.rlgc(np.linspace(0, 4e10, 9))
    properties(b, np.array([1e9, 1e10]))
    assert fsolve.CACHE.solves == first
    assert fsolve.CACHE.hits > 0


def test_cli_line_field_json_and_plot(tmp_path, capsys):
    out = tmp_path / "section.png"
    code = main(
        [
            "line",
            "microstrip",
            "--width",
            "6mil",
            "--height",
            "3.5mil",
            "--thickness",
            "1.4mil",
            "--dk",
            "3.7",
            "--df",
            "0.009",
            "--dk-at",
            "10GHz",
            "--solver",
            "field",
            "--accuracy",
            "coarse",
            "--etch-factor",
            "2",
            "--coating-thickness",
            "0.8mil",
            "--coating-dielectric",
            "solder-mask",
            "--at",
            "1GHz,10GHz",
            "--json",
            "--plot",
            str(out),
        ]
    )
    assert code == 0
    data = json.loads(capsys.readouterr().out)
    assert data["solver"] == "field"
    assert data["field_solver"]["accuracy"] == "coarse"
    assert len(data["z0_ohm"]) == 2
    assert out.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".losslane-")]


def test_cli_plot_bad_name_and_closed_form(tmp_path, capsys):
    args = [
        "line",
        "microstrip",
        "--width",
        "6mil",
        "--height",
        "3.5mil",
        "--thickness",
        "1.4mil",
        "--dk",
        "3.7",
        "--dk-at",
        "10GHz",
        "--at",
        "1GHz",
    ]
    bad = tmp_path / "section.txt"
    assert main(args + ["--solver", "field", "--accuracy", "coarse", "--plot", str(bad)]) == 2
    assert not bad.exists()
    png = tmp_path / "s.png"
    assert main(args + ["--plot", str(png)]) == 2
    assert "--solver field" in capsys.readouterr().err
    assert not png.exists()

"""`losslane materials`: the library listing. Checks against the bundled TOML files read
independently with tomllib, and the project rule that bundled values are marked typical."""

from __future__ import annotations

import json
import tomllib
from importlib import resources
from pathlib import Path

import pytest
from cli_helpers import run

from losslane.units import parse_frequency, parse_length


def bundled(name: str) -> dict:
    text = resources.files("losslane").joinpath("data", name).read_text(encoding="utf-8")
    return tomllib.loads(text)


def test_json_lists_every_bundled_entry_with_its_values(capsys) -> None:
    rc, out, err = run(capsys, "materials", "--json")
    assert rc == 0, err
    res = json.loads(out)
    diels = {d["name"]: d for d in res["dielectrics"]}
    src = bundled("materials.toml")["dielectrics"]
    assert set(diels) == set(src)
    for name, spec in src.items():
        d = diels[name]
        for key in ("name", "dk", "df", "at_hz", "model", "note"):
            assert key in d
        assert d["dk"] == spec["dk"] and d["df"] == spec.get("df", 0.0)
        assert d["model"] == spec.get("model", "wideband-debye")
        if "at" in spec and d["model"] != "constant":
            assert d["at_hz"] == parse_frequency(spec["at"])
        assert d["class"] == spec["class"]
    foils = {f["name"]: f for f in res["foils"]}
    fsrc = bundled("foils.toml")["foils"]
    assert set(foils) == set(fsrc)
    for name, spec in fsrc.items():
        assert foils[name]["model"] == spec["model"]
        if spec["model"] in ("hammerstad", "groiss"):
            assert foils[name]["rq_m"] == pytest.approx(parse_length(spec["rq"]))
        if spec["model"] == "huray":
            sphere = foils[name]["spheres"][0]
            assert sphere["radius_m"] == pytest.approx(parse_length(spec["radius"]))
            assert sphere["surface_ratio"] == spec["surface_ratio"]


def test_bundled_values_are_marked_typical(capsys) -> None:
    # Project rule: materials and foils are generic classes, typical values marked "typical".
    rc, out, _ = run(capsys, "materials", "--json")
    res = json.loads(out)
    for e in res["dielectrics"] + res["foils"]:
        if e["name"] in ("air", "smooth"):  # exact by definition
            continue
        assert "typical" in e["note"], e["name"]
        assert e["source"].startswith("bundled")


def test_text_table(capsys) -> None:
    rc, out, _ = run(capsys, "materials")
    assert rc == 0
    for word in (
        "dielectrics",
        "foils",
        "low-loss",
        "very-low-profile",
        "huray",
        "typical",
        "Dk",
        "Df",
        "at GHz",
    ):
        assert word in out


def test_library_file_extends_and_overrides(capsys, tmp_path: Path) -> None:
    lib = tmp_path / "mine.toml"
    lib.write_text(
        '[dielectrics.house-core]\nclass = "our core"\ndk = 3.45\ndf = 0.004\nat = "5 GHz"\n'
        'note = "measured on our coupons"\n'
        '[dielectrics.low-loss]\ndk = 3.55\ndf = 0.0055\nat = "10 GHz"\n'
        '[foils.house-foil]\nmodel = "groiss"\nrq = "0.45 um"\n'
    )
    rc, out, err = run(capsys, "materials", "--library", str(lib), "--json")
    assert rc == 0, err
    res = json.loads(out)
    d = {x["name"]: x for x in res["dielectrics"]}
    assert d["house-core"]["dk"] == 3.45 and d["house-core"]["at_hz"] == 5e9
    assert d["house-core"]["source"] == str(lib)
    assert d["low-loss"]["dk"] == 3.55 and d["low-loss"]["source"] == str(lib)
    f = {x["name"]: x for x in res["foils"]}
    assert f["house-foil"]["rq_m"] == pytest.approx(0.45e-6)
    rc, out, _ = run(capsys, "materials", "--library", str(lib))
    assert "house-core" in out and str(lib) in out


def test_scenario_entries_are_listed(capsys, tmp_path: Path) -> None:
    sc = tmp_path / "lane.toml"
    sc.write_text(
        'name = "x"\n[dielectrics.core]\ndk = 3.7\ndf = 0.009\nat = "10 GHz"\n'
        '[lines.host]\nkind = "microstrip"\n'
    )
    rc, out, err = run(capsys, "materials", "--scenario", str(sc), "--json")
    assert rc == 0, err
    names = [d["name"] for d in json.loads(out)["dielectrics"]]
    assert "core" in names


@pytest.mark.parametrize(
    "content, words",
    [
        ("[dielectrics.bad]\ndk = 0.5\n", ("dk",)),
        ("[dielectrics.bad]\ndk = 3.5\ndf = 0.01\n", ("'at'",)),
        ('[foils.bad]\nmodel = "velvet"\n', ("model",)),
        ("not toml = = 3\n", ("not valid TOML",)),
    ],
)
def test_bad_library_file_is_exit_2(capsys, tmp_path: Path, content: str, words) -> None:
    lib = tmp_path / "bad.toml"
    lib.write_text(content)
    rc, out, err = run(capsys, "materials", "--library", str(lib))
    assert rc == 2 and out == "" and "Traceback" not in err
    for w in words:
        assert w in err


def test_missing_library_file_is_exit_2(capsys, tmp_path: Path) -> None:
    rc, _, err = run(capsys, "materials", "--library", str(tmp_path / "none.toml"))
    assert rc == 2 and "does not exist" in err

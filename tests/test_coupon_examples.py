"""The shipped synthetic coupons (examples/coupons) are what tools/make_coupons.py makes,
and extracting and fitting them returns the materials they were made from.

Outside references: the generator's stated materials (the truth); transmission-line
theory for the bare line's gamma = sqrt(Z Y) (Pozar, *Microwave Engineering*); scikit-rf's
Touchstone reader and its reciprocity check; linearised least-squares statistics (the
truth inside the stated uncertainty).
"""

from __future__ import annotations

import importlib.util
import json
from pathlib import Path

import numpy as np
import pytest

from losslane.materials.dielectric import WidebandDebye
from losslane.materials.library import load_library
from losslane.materials.roughness import Huray
from losslane.measure import extract_line, fit_materials, line_constants, with_materials
from losslane.units import INCH, MIL
from losslane.xsection import Stripline
from losslane.xsection.base import Metal

ROOT = Path(__file__).resolve().parents[1]
COUPONS = ROOT / "examples" / "coupons"
TOOL = ROOT / "tools" / "make_coupons.py"


def _tool():
    spec = importlib.util.spec_from_file_location("make_coupons", TOOL)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


TOOL_MODULE = _tool()
NAMES = [TOOL_MODULE.file_name(x) for x in TOOL_MODULE.LENGTHS_IN]
LENGTHS = [x * INCH for x in TOOL_MODULE.LENGTHS_IN]


@pytest.fixture(scope="module")
def extraction():
    return extract_line([COUPONS / n for n in NAMES], LENGTHS, at=[1e9, 10e9, 28e9])


def test_shipped_set_is_what_the_tool_makes(tmp_path):
    import skrf

    assert sorted(p.name for p in COUPONS.glob("*.s2p")) == sorted(NAMES)
    fresh = TOOL_MODULE.main(tmp_path)
    for path in fresh:
        shipped, made = skrf.Network(str(COUPONS / path.name)), skrf.Network(str(path))
        np.testing.assert_array_equal(shipped.f, made.f)
        np.testing.assert_allclose(shipped.s, made.s, rtol=1e-12, atol=1e-15)
        # a reciprocal structure, reciprocal within the added noise (scikit-rf's check)
        assert shipped.is_reciprocal(tol=1e-3)


def test_extraction_recovers_the_line(extraction):
    line = TOOL_MODULE.line()
    alpha, eps = line_constants(line, extraction.f)
    above = extraction.f >= 1e9
    # 1e-4 noise over 3..7 in of difference: well inside 1 % above 1 GHz
    assert np.max(np.abs(extraction.alpha[above] / alpha[above] - 1)) < 0.01
    assert np.max(np.abs(extraction.eps_eff / eps - 1)) < 1e-3
    assert extraction.usable_band_hz is not None
    assert extraction.usable_band_hz[1] == pytest.approx(40e9)
    data = json.loads(json.dumps(extraction.to_json(), allow_nan=False))
    assert data["mode"] == "single-ended" and len(data["loss_db_per_in"]) == 3


def test_fit_returns_the_generators_materials_and_a_usable_library(extraction, tmp_path):
    start = Stripline(
        5.5 * MIL,
        6 * MIL,
        6 * MIL,
        0.6 * MIL,
        WidebandDebye(3.8, 0.012, 10e9),
        Metal(foil=Huray.from_surface_ratio(1e-6, 1.0)),
    )
    vary = ("dk", "df", "radius", "surface_ratio")
    fit = fit_materials(extraction, start, vary)
    truth = {"dk": 3.6, "df": 0.008, "radius": 0.55e-6, "surface_ratio": 1.8}
    for k in vary:
        assert abs(fit.values[k] - truth[k]) < 4 * fit.uncertainty[k]
        assert fit.uncertainty[k] < 0.01 * truth[k]
    path = tmp_path / "coupon.toml"
    path.write_text(fit.library_toml("coupon-laminate", "coupon-foil"), encoding="utf-8")
    lib = load_library([path])
    rebuilt = with_materials(start, lib.dielectric("coupon-laminate"), lib.foil("coupon-foil"))
    a_lib, _ = line_constants(rebuilt, fit.f)
    np.testing.assert_allclose(a_lib, fit.alpha_model, rtol=1e-9)

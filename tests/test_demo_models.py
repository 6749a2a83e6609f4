"""The shipped demo connector models (src/losslane/data/models) are what
tools/make_demo_models.py produces, and are sound S-parameter files.

Outside references: scikit-rf's Touchstone reader and its passivity / reciprocity checks
(IEEE 370-2020 quality criteria); the Touchstone format (IBIS Open Forum specification).
"""

from __future__ import annotations

import importlib.util
from pathlib import Path

import numpy as np
import pytest

ROOT = Path(__file__).resolve().parents[1]
MODELS = ROOT / "src" / "losslane" / "data" / "models"
TOOL = ROOT / "tools" / "make_demo_models.py"
NAMES = ["mezzanine-pin.s2p", "mezzanine-pair.s4p"]


def _tool():
    spec = importlib.util.spec_from_file_location("make_demo_models", TOOL)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def regenerated(tmp_path_factory):
    out = tmp_path_factory.mktemp("models")
    paths = _tool().main(out)
    assert sorted(p.name for p in paths) == sorted(NAMES)
    return out


def read(path: Path):
    import skrf

    return skrf.Network(str(path))


def test_shipped_set_is_complete():
    assert sorted(p.name for p in MODELS.iterdir() if not p.name.startswith(".")) == sorted(NAMES)


@pytest.mark.parametrize("name", NAMES)
def test_shipped_file_is_what_the_tool_makes(regenerated, name):
    shipped, fresh = read(MODELS / name), read(regenerated / name)
    np.testing.assert_array_equal(shipped.f, fresh.f)
    np.testing.assert_array_equal(shipped.z0, fresh.z0)
    # same numbers, allowing for last-place differences of another numpy/BLAS build
    np.testing.assert_allclose(shipped.s, fresh.s, rtol=0, atol=1e-12)

    # and the same header (comment lines before the option line)
    def head(p: Path) -> list[str]:
        lines = p.read_text(encoding="ISO-8859-1").splitlines()
        return lines[: next(i for i, ln in enumerate(lines) if ln.startswith("#")) + 1]

    assert head(MODELS / name) == head(regenerated / name)


@pytest.mark.parametrize("name", NAMES)
def test_shipped_file_is_passive_and_reciprocal(name):
    net = read(MODELS / name)
    # IEEE 370-2020 criteria, scikit-rf's implementations
    assert net.is_passive()
    assert net.is_reciprocal()
    # largest singular value of S at most 1 (passivity, stated directly)
    assert np.linalg.svd(net.s, compute_uv=False).max() <= 1.0 + 1e-12
    assert net.f[0] == 0.0  # a DC point, so channels that start at 0 Hz need no extrapolation


def test_four_port_header_states_its_port_order_and_the_data_agree():
    text = (MODELS / "mezzanine-pair.s4p").read_text(encoding="ISO-8859-1")
    header = [ln for ln in text.splitlines() if ln.startswith("!")]
    assert (
        "!ports: order in-in-out-out; line 1: port 1 (in) -> port 3 (out), "
        "line 2: port 2 (in) -> port 4 (out)"
    ) in header
    assert "!reference impedance: 50 ohm at every port (power waves)" in header
    # the stated order is the data's: at 1 GHz the through paths are 1 -> 3 and 2 -> 4,
    # while 1 -> 2 (near-end coupling) and 1 -> 4 (far-end coupling) are small
    net = read(MODELS / "mezzanine-pair.s4p")
    k = int(np.argmin(np.abs(net.f - 1e9)))
    s = np.abs(net.s[k])
    assert s[2, 0] > 0.9 and s[3, 1] > 0.9
    assert s[1, 0] < 0.1 and s[3, 0] < 0.1


def test_two_port_header_states_its_ports():
    text = (MODELS / "mezzanine-pin.s2p").read_text(encoding="ISO-8859-1")
    assert "!ports: port 1 = near end (in), port 2 = far end (out)" in text.splitlines()

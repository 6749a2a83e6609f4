"""Every scenario in examples/ builds, and gives a sound S-parameter file.

Outside references: scikit-rf's Touchstone reader and its passivity and reciprocity checks
(IEEE 370-2020 quality criteria).
"""

from __future__ import annotations

import warnings
from pathlib import Path

import numpy as np
import pytest
from reported import build_parts

from losslane import LossLaneWarning, api

EXAMPLES = sorted((Path(__file__).resolve().parents[1] / "examples").glob("*.toml"))


def test_there_are_examples():
    assert len(EXAMPLES) >= 2


@pytest.mark.parametrize("path", EXAMPLES, ids=[p.stem for p in EXAMPLES])
def test_example_builds_cleanly(tmp_path, path):
    import skrf

    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", LossLaneWarning)
        result, files, text, data = build_parts(api.build(path, out=tmp_path / "out", plots=False))
    # an example stays inside every model's validity range: no extrapolation warnings
    assert [str(w.message) for w in caught if issubclass(w.category, LossLaneWarning)] == []
    assert data["points"] == result.f.size and result.f[0] == 0.0
    net = skrf.Network(str(files[0]))
    np.testing.assert_array_equal(net.s, result.network.s)
    assert net.is_passive() and net.is_reciprocal()
    # every budget frequency is quoted in the summary
    budget = result.scenario.budget
    wanted = [] if budget is None else [c.at for c in budget.checks]
    if budget is not None and budget.nyquist is not None:
        wanted.append(budget.nyquist)
    assert sorted(r["at_hz"] for r in data["summary"]) == sorted(wanted)

"""A build computes each thing once: one mixed-mode conversion of a differential channel,
one field solve of a field-solved line, one RLGC evaluation per [lines.*] section."""

from __future__ import annotations

from pathlib import Path

import pytest

from losslane import api, channel
from losslane.network import mixedmode
from losslane.xsection.fieldsolve import solve as fsolve

FIELD_SCENARIO = """
name = "coated lane"

[sweep]
start = "0 Hz"
stop = "20 GHz"
points = 401

[lines.outer]
kind = "microstrip"
width = "6 mil"
height = "3.5 mil"
thickness = "1.4 mil"
dielectric = "low-loss"
solver = "field"
accuracy = "coarse"
coating_thickness = "0.8 mil"
coating_dielectric = "solder-mask"

[lines.inner]
kind = "stripline"
width = "5 mil"
below = "6 mil"
above = "6 mil"
thickness = "0.6 mil"
dielectric = "low-loss"

[[channel]]
line = "outer"
length = "1 in"
[[channel]]
line = "inner"
length = "3 in"
[[channel]]
line = "outer"
length = "0.5 in"

[budget]
data_rate = "16 Gb/s"
max_loss = "20 dB"
[[budget.check]]
at = "4 GHz"
max_loss = "10 dB"
"""


def test_a_demo_build_converts_to_mixed_mode_once(tmp_path, monkeypatch) -> None:
    calls = []
    real = channel.mixed_mode_internal

    def counted(*args, **kwargs):
        calls.append(1)
        return real(*args, **kwargs)

    def user_order(*args, **kwargs):  # a build never needs the file-order conversion
        raise AssertionError("mixed_mode() of a user-ordered matrix called during a build")

    monkeypatch.setattr(channel, "mixed_mode_internal", counted)
    monkeypatch.setattr(mixedmode, "mixed_mode", user_order)
    res = api.demo(tmp_path / "demo", plots=True)
    assert res.channel.nports == 4
    assert len(calls) == 1


def test_a_field_solved_line_is_solved_once_per_build(tmp_path: Path, monkeypatch) -> None:
    scen = tmp_path / "lane.toml"
    scen.write_text(FIELD_SCENARIO, encoding="utf-8")
    evaluated = []
    for cls in (api_section_class("microstrip", "field"), api_section_class("stripline")):
        real = cls.rlgc

        def counted(self, f, _real=real):
            if len(f) == 401:  # on the sweep
                evaluated.append(self.kind)
            return _real(self, f)

        monkeypatch.setattr(cls, "rlgc", counted)
    fsolve.CACHE.clear()
    res = api.build(scen, out=tmp_path / "out", plots=True)
    # two segments share the field-solved section, the budget reads its dB/in: one solve
    # (at the chosen mesh level; no second level for an error estimate)
    assert fsolve.CACHE.solves == 1
    # each [lines.*] section's RLGC on the sweep once, shared by its segments (the
    # budget's dB/in at the check points is its own small evaluation)
    assert sorted(evaluated) == ["microstrip", "stripline"]
    assert res.budget is not None and len(res.budget.points) == 2


def api_section_class(kind: str, solver: str = "closed-form") -> type:
    """The class a spec of ``kind`` builds."""
    spec = {"kind": kind, "width": "5 mil", "thickness": "1 mil", "dielectric": "low-loss"}
    spec |= {"height": "4 mil"} if kind == "microstrip" else {"below": "5 mil", "above": "5 mil"}
    if solver == "field":
        spec |= {"solver": "field", "accuracy": "coarse"}
    return type(api.section(spec))


@pytest.mark.parametrize("single_ended", [True, False])
def test_summary_rows_are_computed_once(tmp_path, monkeypatch, single_ended) -> None:
    from losslane.report import channel as report_channel

    calls = []
    real = report_channel.summary_rows

    def counted(result):
        calls.append(1)
        return real(result)

    monkeypatch.setattr(report_channel, "summary_rows", counted)
    res = api.demo(tmp_path / "d", single_ended=single_ended, plots=False)
    data = res.to_json()
    assert len(calls) == 1 and data["summary"] == res.summary

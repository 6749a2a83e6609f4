"""The report page shows every chart the build wrote (counted in the output directory) and
the common-mode loss and mode conversion at every check point and band; the bands' and
masks' tables; values at the numeric floor printed as "< -200"."""

from __future__ import annotations

import base64
import re
from html import unescape
from pathlib import Path

import pytest
from budget_scenarios import pieces, scenario_text, write
from test_report_html import parse_page

from losslane import api
from losslane.report.channel import build_text
from losslane.report.charts import db_text

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
DEMO_LIMITS = """
[[budget.band]]
name = "main lobe"
start = "1 GHz"
stop = "8 GHz"
max_loss = "16 dB"
min_return_loss = "10 dB"

[[budget.mask]]
name = "conversion"
quantity = "far-end-conversion"
points = [["1 GHz", "30 dB"], ["10 GHz", "25 dB"]]
"""


def _embedded(page: str) -> list[bytes]:
    p = parse_page(page)
    srcs = [v for t, k, v in p.attrs if t == "img" and k == "src"]
    return [base64.b64decode(s.split(",", 1)[1], validate=True) for s in srcs]


@pytest.fixture(scope="module")
def demo_with_limits(tmp_path_factory):
    tmp = tmp_path_factory.mktemp("demo")
    src = api.demo_scenario_path()
    text = src.read_text().replace(
        '"../models/mezzanine-pair.s4p"', repr(str(src.parent.parent / "models/mezzanine-pair.s4p"))
    )
    (tmp / "boards.toml").write_bytes((src.parent / "boards.toml").read_bytes())
    scen = tmp / "lane.toml"
    scen.write_text(text + DEMO_LIMITS, encoding="utf-8")
    built = api.build(scen, out=tmp / "out")
    page = (tmp / "out" / "sensor-lane-report.html").read_text(encoding="utf-8")
    return built, tmp / "out", page


def test_every_png_the_build_wrote_is_on_the_page(demo_with_limits) -> None:
    built, out, page = demo_with_limits
    pngs = sorted(out.glob("*.png"))
    names = {p.name for p in pngs}
    # the differential lane: IL, RL, mixed mode, budget waterfall, ILD, impedance profile,
    # pulse response (no RF views)
    assert len(pngs) == 7 and "sensor-lane-mixed-mode.png" in names
    shown = _embedded(page)
    assert len(shown) == len(pngs)
    assert sorted(shown) == sorted(p.read_bytes() for p in pngs)


def test_page_has_common_mode_and_mode_conversion_numbers(demo_with_limits) -> None:
    built, _, page = demo_with_limits
    cells = set(parse_page(page).cells)
    assert {"common-mode loss (dB)", "Scd21 (dB)", "Scd11 (dB)"} <= cells
    for row in built.summary:  # the Nyquist and check points
        assert db_text(row["common_mode_loss_db"], ".2f", "") in cells
        assert db_text(row["mode_conversion_db"], ".1f", "") in cells
        assert db_text(row["mode_conversion_near_db"], ".1f", "") in cells
    (band,) = built.budget.bands
    cm = band.common_mode_loss
    assert f"{cm.value_db:.2f} @ {cm.at_hz / 1e9:.6g}" in cells
    far = band.far_conversion
    assert f"{-far.value_db:.1f} @ {far.at_hz / 1e9:.6g}" in cells
    # the bands' and masks' tables
    assert {"main lobe", "conversion", "far-end-conversion"} <= cells
    (mask,) = built.budget.masks
    assert f"{mask.worst_margin_db:+.3f} @ {mask.worst_margin_hz / 1e9:.6g}" in cells
    text = unescape(page)
    assert "Bands" in text and "Limit masks" in text


def test_rf_example_page_and_files(tmp_path) -> None:
    out = tmp_path / "ku"
    built = api.build(EXAMPLES / "ku-feed-band.toml", out=out)
    pngs = sorted(out.glob("*.png"))
    stems = sorted(p.name.removeprefix("ku-feed-") for p in pngs)
    # no ILD chart: the fit does not apply to a DC-blocked feed (a high-pass); no data
    # rate, so the step response rather than a pulse
    assert stems == [
        "budget.png",
        "focus.png",
        "impedance-profile.png",
        "insertion-loss.png",
        "phase-delay.png",
        "return-loss.png",
        "smith.png",
        "step.png",
        "vswr.png",
    ]
    page = (out / "ku-feed-report.html").read_text(encoding="utf-8")
    assert sorted(_embedded(page)) == sorted(p.read_bytes() for p in pngs)
    assert "does not apply" in unescape(page)
    # the example's point: every point check passes, the band fails
    b = built.budget
    assert all(p.passed for p in b.points) and not b.bands[0].passed and not b.passed


def test_the_numeric_floor_prints_as_a_bound(tmp_path) -> None:
    # a symmetric pair converts no mode: Scd21 sits at the rounding floor
    pair = (
        '[lines.pair]\nkind = "stripline-pair"\nwidth = "5 mil"\nspacing = "7 mil"\n'
        'thickness = "0.6 mil"\nbelow = "6 mil"\nabove = "6 mil"\ndielectric = "core"\n'
    )
    scen = write(
        tmp_path,
        scenario_text(
            pieces("pair", ["3 in"]),
            '[budget]\n[[budget.check]]\nat = "5 GHz"\nmax_loss = "10 dB"\n',
            extra=pair,
        ),
    )
    built = api.build(scen, out=tmp_path / "o", plots=False)
    (row,) = built.summary
    assert row["mode_conversion_db"] < -200
    text = build_text(built)
    line = next(ln for ln in text.splitlines() if re.match(r"^\s+5\s", ln))
    assert line.count("< -200") == 2  # Scd21 and Scd11, both at the floor
    assert "< -200" in unescape((tmp_path / "o" / "test-lane-report.html").read_text())

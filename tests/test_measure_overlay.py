"""A measured Touchstone file beside a build ([compare] in a scenario): charts, report and
numbers show the measurement, the model and their difference.

Outside references, named beside each check:
* a build compared with its own Touchstone output is the same S-parameters, so every
  difference is zero (identity);
* scikit-rf's ``Network.renormalize`` (power waves) for a measurement on another reference
  impedance, and its Touchstone reader;
* 20 log10 arithmetic: a measurement scaled by 1.05 reads 20 log10(1.05) = 0.4238 dB less
  insertion and return loss;
* IEEE Std 370-2020 passivity: a file scaled by 1.05 is not passive, and is reported so
  (network.quality), not repaired;
* the generator of the shipped coupons (tools/make_coupons.py): the 9 in coupon modelled
  with the fitted library reproduces its measurement;
* RFC 8259 JSON (no NaN or Infinity).
"""

from __future__ import annotations

import json
import warnings
from pathlib import Path

import numpy as np
import pytest
from cli_helpers import run
from test_report_html import parse_page

from losslane import LossLaneError, LossLaneWarning, api

ROOT = Path(__file__).resolve().parents[1]
EXAMPLE = ROOT / "examples" / "coupons" / "coupon-9in.toml"

SINGLE = """
name = "overlay lane"

[sweep]
start = "0 Hz"
stop = "{stop}"
step = "50 MHz"

[dielectrics.core]
dk = 3.7
df = 0.009
at = "10 GHz"

[lines.host]
kind = "microstrip"
width = "6 mil"
thickness = "1.4 mil"
height = "3.5 mil"
dielectric = "core"

[[channel]]
line = "host"
length = "3 in"

[[channel]]
via = {{ barrel = "40 mil", stub = "8 mil", impedance = "42 ohm", dielectric = "core" }}

[[channel]]
line = "host"
length = "2 in"

[budget]
data_rate = "16 Gb/s"
max_loss = "10 dB"
[[budget.check]]
at = "12 GHz"
max_loss = "12 dB"
"""

PAIR = """
name = "overlay pair"

[sweep]
start = "0 Hz"
stop = "20 GHz"
step = "50 MHz"

[ports]
order = "in-out-in-out"

[dielectrics.core]
dk = 3.6
df = 0.008
at = "10 GHz"

[lines.pair]
kind = "stripline-pair"
width = "5 mil"
spacing = "7 mil"
thickness = "0.6 mil"
below = "6 mil"
above = "6 mil"
dielectric = "core"

[[channel]]
line = "pair"
length = "4 in"

[[channel]]
capacitor = {{ value = "100 nF", esl = "0.3 nH", esr = "20 mohm" }}

[[channel]]
line = "pair"
length = "2 in"
"""


def strict(text: str) -> dict:
    def refuse(name):
        raise ValueError(f"non-standard JSON constant {name}")

    return json.loads(text, parse_constant=refuse)


def _scenario(tmp_path: Path, name: str, text: str, compare: str = "") -> Path:
    p = tmp_path / name
    p.write_text(text + ("\n[compare]\n" + compare if compare else ""), encoding="utf-8")
    return p


def quiet_build(path, out, plots=False):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        return api.build(path, out=out, plots=plots)


@pytest.fixture(scope="module")
def single(tmp_path_factory):
    """A single-ended build and its Touchstone output."""
    d = tmp_path_factory.mktemp("single")
    built = quiet_build(_scenario(d, "lane.toml", SINGLE.format(stop="20 GHz")), d / "first")
    return d, Path(built.to_json()["touchstone"])


def test_own_output_as_measurement_shows_zero_difference(capsys, single):
    d, touch = single
    sc = _scenario(
        d,
        "compared.toml",
        SINGLE.format(stop="20 GHz"),
        f'measured = "first/{touch.name}"\nlabel = "itself <as> & measured"\n',
    )
    out = d / "second"
    rc, text, err = run(capsys, "build", str(sc), "--out", str(out), "--json")
    assert rc == 0, err
    data = strict(text)
    m = data["measured"]
    # the same S-parameters: every difference is zero (identity)
    assert m["difference"]["insertion_loss_max_abs_db"] == 0.0
    assert m["difference"]["return_loss_in_max_abs_db"] == 0.0
    assert m["difference"]["return_loss_out_max_abs_db"] == 0.0
    assert (
        m["label"] == "itself <as> & measured" and m["ports"] == 2 and m["mode"] == "single-ended"
    )
    assert m["common_band_hz"] == [0.0, 20e9] and m["points"] == 401
    assert m["quality"]["passivity_level"] == "good"
    # numbers at the check points (Nyquist 8 GHz, the 12 GHz check)
    assert [r["at_hz"] for r in m["checks"]] == [8e9, 12e9]
    for r, s in zip(m["checks"], data["summary"], strict=True):
        assert r["insertion_loss_difference_db"] == 0.0
        assert r["measured_insertion_loss_db"] == pytest.approx(s["insertion_loss_db"], abs=1e-12)
    names = {Path(p).name for p in data["files"]}
    assert {"overlay-lane-measured.csv", "overlay-lane-measured-difference.png"} <= names
    page = (out / "overlay-lane-report.html").read_text(encoding="utf-8")
    parsed = parse_page(page)  # valid, balanced HTML (the report page's own check)
    assert "Model against measurement" in page and touch.name in page
    assert "itself &lt;as&gt; &amp; measured" in page  # the label, escaped
    imgs = [v for t, k, v in parsed.attrs if t == "img" and k == "src"]
    pngs = [p for p in data["files"] if p.endswith(".png")]
    # IL, RL, the focused band, a 2-port's phase/delay, VSWR and Smith charts, budget, ILD,
    # the difference chart, the impedance profile and the pulse response
    assert len(imgs) == len(pngs) == 11
    assert any(p.endswith("-measured-difference.png") for p in pngs)
    assert "Model minus measurement: insertion and return loss" in page
    # the api result is what the command printed
    again = quiet_build(sc, d / "third").to_json()["measured"]
    assert again == {**m, "file": again["file"]} and again["file"] == m["file"]


def test_text_output_of_the_comparison(capsys, single):
    d, touch = single
    sc = _scenario(d, "text.toml", SINGLE.format(stop="20 GHz"), f'measured = "first/{touch.name}"')
    rc, text, err = run(capsys, "build", str(sc), "--out", str(d / "text-out"), "--no-plots")
    assert rc == 0, err
    assert "model against measurement" in text and "IEEE 370 quality" in text
    assert "largest 0 dB" in text


def test_measurement_on_another_reference_and_grid(single, tmp_path):
    import skrf

    d, touch = single
    net = skrf.Network(str(touch))
    other = net[::4]  # every 4th point (200 MHz steps), renormalised to 40 ohm by scikit-rf
    other.renormalize(40.0)
    from losslane.network.touchstone import write_touchstone

    other.name = "measured"
    write_touchstone(other, tmp_path / "meas.s2p")
    sc = _scenario(tmp_path, "lane.toml", SINGLE.format(stop="20 GHz"), 'measured = "meas.s2p"')
    built = quiet_build(sc, tmp_path / "out")
    ov = built.overlay
    assert ov.f.size == 101 and ov.reference_ohm == 50.0
    # back on 50 ohm (scikit-rf's renormalisation undone by ours): the model again; at DC
    # only to the ~1e-4 dB that scikit-rf's regularisation of its singular S -> Z leaves
    assert np.max(np.abs(ov.difference_il_db[1:])) < 1e-9
    assert np.max(np.abs(ov.difference_rl_in_db[1:])) < 1e-9
    assert np.max(np.abs(ov.difference_rl_in_db[0])) < 1e-3
    # a wider measurement than the sweep: compared where both exist
    wide = quiet_build(
        _scenario(tmp_path, "wide.toml", SINGLE.format(stop="30 GHz")), tmp_path / "wide"
    )
    sc2 = _scenario(
        tmp_path,
        "narrow.toml",
        SINGLE.format(stop="20 GHz"),
        f'measured = "wide/{Path(wide.to_json()["touchstone"]).name}"',
    )
    ov2 = quiet_build(sc2, tmp_path / "narrow").overlay
    assert ov2.to_json()["band_hz"] == [0.0, 30e9]
    assert ov2.to_json()["common_band_hz"] == [0.0, 20e9]
    assert np.max(np.abs(ov2.difference_il_db)) < 1e-9


@pytest.mark.parametrize("factor", [1.05, 2.0])
def test_a_non_passive_measurement_is_reported_not_repaired(single, tmp_path, factor):
    import skrf

    from losslane.network.touchstone import write_touchstone

    d, touch = single
    net = skrf.Network(str(touch))
    net.s = net.s * factor
    net.name = "hot"
    write_touchstone(net, tmp_path / "hot.s2p")
    sc = _scenario(tmp_path, "lane.toml", SINGLE.format(stop="20 GHz"), 'measured = "hot.s2p"')
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", LossLaneWarning)
        built = api.build(sc, out=tmp_path / "out", plots=False)
    ov = built.overlay
    # IEEE 370: singular values above 1 are not passive; the metric reports it
    assert ov.quality.max_singular_value == pytest.approx(factor * 0.99, rel=0.02)
    assert ov.quality.passivity < 100.0
    messages = [str(w.message) for w in caught if issubclass(w.category, LossLaneWarning)]
    warned = [m for m in messages if "hot.s2p" in m and "passivity" in m]
    if ov.quality.passivity_level in ("good", "acceptable"):
        assert warned == []  # reported in the outputs, no warning at an acceptable level
    else:
        assert warned and any("passivity" in m for m in built.warnings)  # in the report too
    assert factor < 1.5 or ov.quality.passivity_level == "poor"
    # never repaired: the data as written, 20 log10(factor) dB above the model everywhere
    shift = 20 * np.log10(factor)
    np.testing.assert_allclose(ov.difference_il_db, shift, rtol=1e-9)
    np.testing.assert_allclose(ov.difference_rl_in_db[1:], shift, rtol=1e-6)


def test_differential_measurement_in_the_scenarios_port_order(tmp_path):
    first = quiet_build(_scenario(tmp_path, "pair.toml", PAIR.format()), tmp_path / "first")
    touch = Path(first.to_json()["touchstone"])
    assert touch.suffix == ".s4p"
    same = quiet_build(
        _scenario(tmp_path, "same.toml", PAIR.format(), f'measured = "first/{touch.name}"'),
        tmp_path / "same",
    )
    ov = same.overlay
    assert ov.mode == "differential" and ov.order == "in-out-in-out"
    assert np.max(np.abs(ov.difference_il_db)) < 1e-12
    # the wrong numbering reads other terms as Sdd21: a large difference, not the model
    wrong = quiet_build(
        _scenario(
            tmp_path,
            "wrong.toml",
            PAIR.format(),
            f'measured = "first/{touch.name}"\norder = "in-in-out-out"',
        ),
        tmp_path / "wrong",
    )
    assert np.max(np.abs(wrong.overlay.difference_il_db)) > 3.0


def test_the_shipped_coupon_scenario_reproduces_its_measurement(tmp_path):
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", LossLaneWarning)
        built = api.build(EXAMPLE, out=tmp_path / "out", plots=True)
    assert [str(w.message) for w in caught if issubclass(w.category, LossLaneWarning)] == []
    ov = built.overlay
    # the measured 9 in coupon was made by tools/make_coupons.py with the true materials and
    # 1e-4 noise; the model with the fitted library agrees within 0.01 dB over 0.1..40 GHz
    assert ov.f.size == 400 and ov.common.all()
    assert np.max(np.abs(ov.difference_il_db)) < 0.01
    assert np.max(np.abs(ov.difference_rl_in_db)) < 0.05
    assert built.channel.insertion_loss_db[-1] > 40  # through 40 GHz: a demanding check
    strict(json.dumps(built.to_json()))


# ----------------------------------------------------------------------- bad input


@pytest.mark.parametrize(
    ("compare", "named"),
    [
        ('measured = "missing.s2p"', "[compare].measured = 'missing.s2p'"),
        ('file = "x.s2p"', "[compare]: unknown key 'file'"),
        ("measured = 5", "[compare].measured = 5"),
        ('measured = "first/overlay-lane.s2p"\norder = "1-2-3-4"', "[compare].order"),
        ('measured = "lane.toml"', "[compare].measured = 'lane.toml'"),
    ],
)
def test_bad_compare_section_exits_2_and_writes_nothing(capsys, single, compare, named):
    d, _ = single
    sc = _scenario(d, "bad.toml", SINGLE.format(stop="20 GHz"), compare)
    before = sorted(p.name for p in d.iterdir())
    rc, out, err = run(capsys, "build", str(sc), "--out", str(d / "bad-out"))
    assert rc == 2 and named in err and out == ""
    assert sorted(p.name for p in d.iterdir()) == before  # no output, no staging left


def test_measurement_of_another_channel_is_refused_by_shape(tmp_path):
    first = quiet_build(_scenario(tmp_path, "pair.toml", PAIR.format()), tmp_path / "first")
    touch = Path(first.to_json()["touchstone"])
    sc = _scenario(
        tmp_path, "lane.toml", SINGLE.format(stop="20 GHz"), f'measured = "first/{touch.name}"'
    )
    with pytest.raises(LossLaneError, match=r"\[compare\]\.measured = '.*s4p' has 4 ports"):
        quiet_build(sc, tmp_path / "out")
    assert not (tmp_path / "out").exists()


def test_measurement_without_common_frequencies_is_an_error(tmp_path):
    import skrf

    from losslane.network.touchstone import write_touchstone

    freq = skrf.Frequency(30, 40, 11, unit="GHz")
    net = skrf.Network(
        frequency=freq, s=np.tile([[0.1, 0.9], [0.9, 0.1]], (11, 1, 1)), z0=50, name="high"
    )
    write_touchstone(net, tmp_path / "high.s2p")
    sc = _scenario(tmp_path, "lane.toml", SINGLE.format(stop="20 GHz"), 'measured = "high.s2p"')
    with pytest.raises(LossLaneError, match="no frequency in common"):
        quiet_build(sc, tmp_path / "out")
    assert not (tmp_path / "out").exists()

"""`losslane inspect` and `api.inspect` on files we did not make and on our own output.

Outside references, named beside each check: scikit-rf (its media write the files; its
``passivity`` and ``reciprocity`` matrices check the metrics' inputs; ``scipy.signal``'s
``find_peaks``/``peak_widths`` check the profile features), the lattice diagram of a
lossless line (textbook: reflection rho = (Z2 - Z1)/(Z2 + Z1) at one-way delay tau seen at
2 tau; transmission 1 - rho^2 through a section), TEM delay sqrt(Dk)/c, IEEE Std
370-2020's metric formulas applied by hand, RFC 8259 (JSON has no NaN or Infinity).
"""

from __future__ import annotations

import base64
import json
import math

import numpy as np
import pytest
from cli_helpers import run, run_json
from test_report_html import parse_page

from losslane import api
from losslane.errors import LossLaneError
from losslane.units import INCH

C0 = 299_792_458.0  # m/s, exact (SI)
DK = 3.7
DPM = math.sqrt(DK) / C0  # TEM delay per metre, eps_eff = Dk (homogeneous line)
F = np.linspace(10e6, 40e9, 4000)  # starts at 10 MHz, as measured files do


def strict_json(text: str):
    """json.loads that refuses NaN and Infinity (not JSON, RFC 8259)."""

    def refuse(name):
        raise AssertionError(f"{name} in JSON output")

    return json.loads(text, parse_constant=refuse)


def skrf_steps(path, z_section: float = 65.0, f=F):
    """A 2-port written by scikit-rf from its own media: 2 in of 50 ohm, 1 in of
    ``z_section``, 2 in of 50 ohm (lossless TEM, eps = Dk), cascaded by scikit-rf."""
    import skrf
    from skrf.media import DefinedGammaZ0

    freq = skrf.Frequency.from_f(f, unit="Hz")
    gamma = 2j * np.pi * f * DPM
    lines = [
        DefinedGammaZ0(freq, z0_port=50.0, z0=z, gamma=gamma).line(length, unit="m")
        for z, length in ((50.0, 2 * INCH), (z_section, 1 * INCH), (50.0, 2 * INCH))
    ]
    net = skrf.network.cascade_list(lines)
    net.write_touchstone(str(path))
    return str(path) + ".s2p"


@pytest.fixture(scope="module")
def steps_file(tmp_path_factory):
    return skrf_steps(tmp_path_factory.mktemp("skrf") / "steps")


@pytest.fixture(scope="module")
def steps_json(steps_file):
    # a 40 ps edge (1.6 / f_max): its truncation ringing is nil, so a pulse's top is flat
    res = api.inspect(steps_file, rise_time="40ps", data_rate="10Gb/s", delay_per_in=DPM * INCH)
    return res.to_json()


# ---------------------------------------------------------------- a file we did not make


def test_skrf_file_is_passive_reciprocal_and_causal(steps_json, steps_file):
    import skrf

    q = steps_json["quality"]
    # lossless cascade of lines: S unitary (scikit-rf's passivity matrix sqrt(S^H S) squared
    # is S^H S; its largest eigenvalue is the largest singular value squared)
    net = skrf.Network(steps_file)
    shs = skrf.network.passivity(net.s) ** 2
    sv = np.sqrt(np.max(np.linalg.eigvalsh(shs), axis=1))
    assert q["max_singular_value"] == pytest.approx(float(np.max(sv)), abs=1e-9)
    assert (q["passivity"], q["reciprocity"]) == (100.0, 100.0)
    assert (q["passivity_level"], q["reciprocity_level"], q["causality_level"]) == ("good",) * 3
    assert q["passivity_failures_hz"] == []


def test_skrf_file_profile_shows_the_section_where_the_lattice_diagram_puts_it(steps_json):
    # lattice diagram: the 65-ohm section from the round trip 2 tau_lead to
    # 2 (tau_lead + tau_section), at 65 ohm; behind it 50 ohm again (rho^3 off, 50.2 ohm)
    p = steps_json["tdr"][0]
    assert (p["port"], p["mode"]) == (1, "single-ended")
    t1, t2 = 4 * INCH * DPM, 6 * INCH * DPM
    tr = steps_json["rise_time_s"]
    peaks = [x for x in p["features"] if x["kind"] == "peak" and x["prominence_ohm"] > 5]
    assert len(peaks) == 1, p["features"]
    (sec,) = peaks
    assert t1 < sec["time_s"] < t2
    assert sec["impedance_ohm"] == pytest.approx(65.0, rel=0.005)
    assert sec["deviation_ohm"] == pytest.approx(15.0, abs=0.35)
    # the section's width at half its height is its round trip 2 tau (the half level in Z
    # lies a few % off the half step in rho, Z being non-linear in rho: < 0.1 rise time)
    assert sec["width_s"] == pytest.approx(t2 - t1, abs=0.25 * tr)
    # distances from the one-way delay per inch: the section lies 2..3 in from port 1
    assert 2.0 < sec["distance_m"] / INCH < 3.0
    t = np.asarray(p["time_s"])
    np.testing.assert_allclose(np.asarray(p["distance_m"]), t / (2 * DPM), rtol=1e-12)


def test_skrf_file_step_delay_and_pulse_follow_the_lattice_diagram(steps_json):
    (st,) = steps_json["step"]
    tdr_t = steps_json["tdr"][0]["time_s"]
    dt = tdr_t[1] - tdr_t[0]
    # TEM delay of 5 in (sqrt(Dk)/c), within one time step
    assert st["path"] == "S21"
    assert st["delay_s"] == pytest.approx(5 * INCH * DPM, abs=dt)
    pulse = steps_json["pulse"]
    assert pulse["ui_s"] == pytest.approx(1e-10, rel=1e-12)
    # the direct path through the section transmits (1 + rho)(1 - rho) = 1 - rho^2 (its
    # echoes arrive 2 tau_section = 3.2 UI later); a Gaussian-edged pulse one UI wide
    # peaks at 2 Phi(UI / 2 sigma) - 1 (normal distribution; sigma = rise / 2.5631; the
    # 40 ps edge has no truncation ringing)
    from scipy.stats import norm

    assert steps_json["ringing"] < 1e-4
    rho = (65.0 - 50.0) / (65.0 + 50.0)
    sigma = steps_json["rise_time_s"] / (2 * norm.ppf(0.9))
    top = 2 * norm.cdf(0.5 * pulse["ui_s"] / sigma) - 1
    assert pulse["main_cursor"] == pytest.approx((1 - rho**2) * top, rel=2e-4)
    assert pulse["main_cursor_time_s"] == pytest.approx(5 * INCH * DPM + 0.5e-10, abs=2 * dt)
    # the 10 MHz start is extrapolated to 0 Hz, and said
    assert any("extrapolated" in n for n in steps_json["notes"])


def test_profile_features_equal_scipy_find_peaks(steps_file):
    # scipy.signal's prominence and half-prominence width (an independent implementation)
    from scipy.signal import find_peaks, peak_widths

    res = api.inspect(steps_file, rise_time="40ps")
    prof = res.inspection.time.tdr[0]
    keep = prof.time_s >= -prof.rise_time_s
    t, z = prof.time_s[keep], prof.impedance_ohm[keep]
    want = []
    for sign in (1.0, -1.0):
        idx, props = find_peaks(sign * z, prominence=1.0)
        data = (props["prominences"], props["left_bases"], props["right_bases"])
        widths = peak_widths(sign * z, idx, rel_height=0.5, prominence_data=data)[0]
        want += [
            (t[i], pr, w * (t[1] - t[0])) for i, pr, w in zip(idx, data[0], widths, strict=True)
        ]
    got = [(x.time_s, x.prominence_ohm, x.width_s) for x in res.inspection.features[0]]
    assert len(got) == len(want) >= 1
    np.testing.assert_allclose(sorted(got), sorted(want), rtol=1e-12, atol=1e-20)


def test_a_one_port_open_stub_gives_a_strict_json_profile(tmp_path, capsys):
    # scikit-rf: 1 in of 50-ohm line ending in an open; the profile jumps to an open
    # (rho -> 1) at the round trip 2 tau (lattice diagram), bounded, never Infinity
    import skrf
    from skrf.media import DefinedGammaZ0

    freq = skrf.Frequency.from_f(F, unit="Hz")
    med = DefinedGammaZ0(freq, z0_port=50.0, z0=50.0, gamma=2j * np.pi * F * DPM)
    (med.line(1 * INCH, unit="m") ** med.open()).write_touchstone(str(tmp_path / "stub"))
    code, out, err = run(capsys, "inspect", str(tmp_path / "stub.s1p"), "--json")
    assert code == 0, err
    data = strict_json(out)
    assert data["ports"] == 1 and data["step"] == [] and data["pulse"] is None
    assert data["quality"]["reciprocity"] == 100.0  # a 1-port has no transfer terms
    p = data["tdr"][0]
    t, z = np.asarray(p["time_s"]), np.asarray(p["impedance_ohm"])
    late = t > 2 * INCH * DPM + 3 * data["rise_time_s"]
    assert np.all(z[late] > 1e3) and np.all(np.isfinite(z))
    early = (t > 0.3 * INCH * DPM) & (t < 2 * INCH * DPM - 3 * data["rise_time_s"])
    np.testing.assert_allclose(z[early], 50.0, rtol=0.01)


# ---------------------------------------------------------------- judged, never refused


def _thru(f: np.ndarray, loss: float = 0.9) -> np.ndarray:
    tau = 0.5e-9
    s = np.zeros((f.size, 2, 2), complex)
    s[:, 1, 0] = s[:, 0, 1] = loss * np.exp(-2j * np.pi * f * tau)
    return s


def _write(tmp_path, s: np.ndarray, name: str, f=F) -> str:
    import skrf

    net = skrf.Network(frequency=skrf.Frequency.from_f(f, unit="Hz"), s=s, z0=50.0)
    net.write_touchstone(str(tmp_path / name))
    return str(tmp_path / f"{name}.s2p")


def test_gain_at_known_points_is_reported_with_the_hand_computed_metric(tmp_path, capsys):
    # IEEE 370-2020 by hand: PM = 1.01 at k points, PW = (1.01 - 1.00001) / 0.1 each,
    # metric = (N - k PW) / N x 100; the file is judged, not refused (exit 0)
    s = _thru(F)
    bad = np.r_[100:110, 300]
    s[bad, 1, 0] *= 1.01 / 0.9
    s[bad, 0, 1] = s[bad, 1, 0]
    path = _write(tmp_path, s, "gain")
    data = run_json(capsys, "inspect", path)
    n, k = F.size, bad.size
    want = (n - k * (1.01 - 1.00001) / 0.1) / n * 100
    q = data["quality"]
    assert q["passivity"] == pytest.approx(want, rel=1e-9)
    assert q["max_singular_value"] == pytest.approx(1.01, rel=1e-9)
    np.testing.assert_allclose(q["passivity_failures_hz"], F[bad], rtol=1e-12)
    code, text, _ = run(capsys, "inspect", path)
    assert code == 0
    assert f"NOT passive at {k} of {n} points" in text
    assert f"{F[100] / 1e9:.6g}..{F[109] / 1e9:.6g} GHz" in text
    assert f"{F[300] / 1e9:.6g} GHz" in text


def test_non_reciprocal_file_is_reported_not_refused(tmp_path, capsys):
    # S12 = S21 + 0.02: RM = 2 x 0.02 / (2 x 1) (scikit-rf's |S - S^T| summed), RW =
    # (0.02 - 1e-6) / 0.1, metric (N - N RW) / N x 100 = 80.001: "inconclusive" (a build's
    # import policy would refuse this file; inspect judges it)
    import skrf

    s = _thru(F)
    s[:, 0, 1] += 0.02
    path = _write(tmp_path, s, "skewed")
    rm = np.sum(np.abs(skrf.network.reciprocity(s)), axis=(1, 2)) / 2
    np.testing.assert_allclose(rm, 0.02, rtol=1e-12)
    q = run_json(capsys, "inspect", path)["quality"]
    assert q["reciprocity"] == pytest.approx((1 - (0.02 - 1e-6) / 0.1) * 100, rel=1e-6)
    assert q["reciprocity_level"] == "inconclusive"


# ---------------------------------------------------------------- our own output


@pytest.fixture(scope="module")
def demo_out(tmp_path_factory):
    out = tmp_path_factory.mktemp("demo") / "out"
    res = api.demo(out, plots=False)
    return res, out / "sensor-lane.s4p"


def test_demo_output_inspected_scores_as_the_build_reported(demo_out, capsys):
    import skrf

    res, path = demo_out
    data = run_json(capsys, "inspect", str(path), "--data-rate", "16Gb/s")
    q = data["quality"]
    # our models are passive and reciprocal: IEEE 370 passivity and reciprocity 100
    assert (q["passivity"], q["reciprocity"]) == (100.0, 100.0)
    assert q["causality_level"] == "good"
    # scikit-rf's |S - S^T| of the file: at rounding level
    assert float(np.max(skrf.network.reciprocity(skrf.Network(str(path)).s).real)) < 1e-12
    # the build reported the same metrics for the S-parameters it wrote (RI form, full
    # precision: the file reads back to the same numbers)
    built = res.to_json()
    for key in ("passivity", "reciprocity", "causality"):
        assert built["quality"][key] == pytest.approx(q[key], rel=1e-12), key
    assert built["quality"]["worst_causality_entry"] == q["worst_causality_entry"]
    assert [s["path"] for s in data["step"]] == ["Sdd21", "S31", "S42"]
    for a, b in zip(data["step"], built["time_domain"]["step"], strict=True):
        assert a["delay_s"] == pytest.approx(b["delay_s"], rel=1e-9)
    assert data["skew_s"] == pytest.approx(built["time_domain"]["skew_s"], abs=1e-15)
    assert data["pulse"]["path"] == "Sdd21"
    # the differential profiles are referred to 2 Z_ref
    assert [(p["port"], p["mode"], p["reference_ohm"]) for p in data["tdr"][4:]] == [
        (1, "differential", 100.0),
        (2, "differential", 100.0),
    ]


def test_json_keys_are_the_contract(demo_out, capsys):
    _, path = demo_out
    code, out, err = run(capsys, "inspect", str(path), "--data-rate", "32Gb/s", "--json")
    assert code == 0, err
    assert out.count("\n") == 1  # one JSON object, nothing else on stdout
    data = strict_json(out)
    assert {"file", "quality", "tdr", "step", "pulse", "skew_s", "files"} <= set(data)
    assert {
        "passivity",
        "reciprocity",
        "causality",
        "passivity_level",
        "reciprocity_level",
        "causality_level",
        "worst_causality_entry",
        "negligible_entries",
    } <= set(data["quality"])
    for p in data["tdr"]:
        assert {"port", "mode", "time_s", "impedance_ohm"} <= set(p)
        assert p["mode"] in ("single-ended", "differential")
        assert len(p["time_s"]) == len(p["impedance_ohm"])
    for s in data["step"]:
        assert {"path", "delay_s", "rise_time_s"} <= set(s)
    assert {
        "path",
        "data_rate_bps",
        "ui_s",
        "time_s",
        "volts",
        "main_cursor",
        "pre_cursor",
        "post_cursors",
    } <= set(data["pulse"])
    assert isinstance(data["skew_s"], float)
    assert data["file"] == str(path) and data["files"] == []


def test_api_result_equals_the_command_json(demo_out, capsys):
    _, path = demo_out
    got = api.inspect(path, order="in-in-out-out", rise_time="50ps", data_rate="25Gb/s")
    want = run_json(capsys, "inspect", str(path), "--rise-time", "50ps", "--data-rate", "25Gb/s")
    assert json.loads(json.dumps(got.to_json())) == want
    assert want["rise_time_s"] == pytest.approx(50e-12, rel=1e-3)


def test_out_writes_charts_and_a_self_contained_page(demo_out, tmp_path, capsys):
    _, path = demo_out
    out = tmp_path / "views"
    data = run_json(capsys, "inspect", str(path), "--data-rate", "16Gb/s", "--out", str(out))
    names = sorted(p.name for p in out.iterdir())
    assert names == [
        "sensor-lane-inspect-profile.png",
        "sensor-lane-inspect-pulse.png",
        "sensor-lane-inspect-step.png",
        "sensor-lane-inspect.html",
    ]
    assert sorted(data["files"]) == sorted(str(out / n) for n in names)
    pngs = {p.read_bytes() for p in out.glob("*.png")}
    assert all(b[:8] == b"\x89PNG\r\n\x1a\n" for b in pngs)  # PNG signature (ISO/IEC 15948)
    page = parse_page((out / "sensor-lane-inspect.html").read_text(encoding="utf-8"))
    imgs = [v for t, k, v in page.attrs if t == "img" and k == "src"]
    assert {base64.b64decode(v.split(",", 1)[1]) for v in imgs} == pngs
    assert "script" not in page.tags and "link" not in page.tags
    assert {"passivity", "reciprocity", "causality", "Sdd21"} <= {
        c.split(" (")[0] for c in page.cells
    }
    # nothing staged is left beside the output directory
    assert [p.name for p in tmp_path.iterdir()] == ["views"]


def test_a_failed_output_leaves_nothing(demo_out, tmp_path, monkeypatch):
    from losslane.report import inspect as report_inspect

    def broken(*args, **kwargs):
        raise RuntimeError("disk full")

    monkeypatch.setattr(report_inspect, "pulse_chart", broken)
    _, path = demo_out
    with pytest.raises(RuntimeError):
        api.inspect(path, data_rate="16Gb/s", out=tmp_path / "views")
    assert list(tmp_path.iterdir()) == []


# ---------------------------------------------------------------- bad input


def test_bad_input_names_the_option(demo_out, tmp_path, capsys):
    _, path = demo_out
    cases = [
        (["--rise-time", "10ps"], "--rise-time = '10ps'"),
        (["--rise-time", "30"], "a bare number is not a time"),
        (["--data-rate", "0Gb/s"], "--data-rate = 0.0: must be > 0"),
        (["--z-ref", "-50ohm"], "--z-ref"),
        (["--delay-per-in", "170 ohm"], "--delay-per-in"),
        (["--out", str(path)], "is an existing file"),
    ]
    for extra, message in cases:
        code, out, err = run(capsys, "inspect", str(path), *extra)
        assert code == 2 and out == "", extra
        assert message in err, (extra, err)
    code, _, err = run(capsys, "inspect", str(tmp_path / "missing.s2p"))
    assert code == 2 and "does not exist" in err
    code, _, err = run(capsys, "inspect", str(path), "--modulation", "pam8")
    assert code == 2 and "pam8" in err
    with pytest.raises(LossLaneError, match="modulation = 'pam8'"):
        api.inspect(path, modulation="pam8")
    with pytest.raises(LossLaneError, match="order = 'out-in'"):
        api.inspect(path, order="out-in")


def test_a_three_port_file_is_refused_with_the_port_count(tmp_path, capsys):
    import skrf

    s = np.zeros((F.size, 3, 3), complex)
    s[:, 1, 0] = s[:, 0, 1] = 0.5
    skrf.Network(frequency=skrf.Frequency.from_f(F, unit="Hz"), s=s, z0=50).write_touchstone(
        str(tmp_path / "tee")
    )
    code, _, err = run(capsys, "inspect", str(tmp_path / "tee.s3p"))
    assert code == 2 and "3 ports" in err and ".s4p" in err


def test_transform_lengths_are_scipys_fast_real_lengths():
    # the time-domain transform sizes itself like scipy.fft.next_fast_len(n, real=True)
    # (5-smooth numbers) without importing scipy.fft
    from scipy.fft import next_fast_len

    from losslane.network.timedomain import fast_length

    rng = np.random.default_rng(14)
    for n in [*range(1, 2000), *rng.integers(2000, 10**8, 500).tolist()]:
        assert fast_length(n) == next_fast_len(n, real=True), n

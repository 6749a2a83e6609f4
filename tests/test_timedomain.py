"""Time-domain views against outside references: the normal distribution (the Gaussian
edge), textbook transmission-line and circuit solutions (lattice diagrams, a lumped shunt
capacitor, a first-order low-pass), TEM delay from eps_eff, and scikit-rf's DC
extrapolation. The lines are lossless with a constant Dk, so nothing but the geometry
moves a profile."""

from __future__ import annotations

import json
import warnings

import numpy as np
import pytest
from scipy.optimize import brentq
from scipy.stats import norm

from losslane.errors import LossLaneError, LossLaneWarning
from losslane.materials.dielectric import ConstantDielectric, WidebandDebye
from losslane.network import LineSegment, ShuntCapacitor, Via, build_network
from losslane.network.timedomain import (
    GAUSSIAN_RISE,
    crossing,
    dc_value,
    impedance_profile,
    pulse_response,
    step_response,
    stimulus_sigma,
    through_pulse,
    through_step,
    time_domain,
    uniform_spectrum,
)
from losslane.units import INCH, MIL
from losslane.xsection import Microstrip, Stripline, StriplinePair
from losslane.xsection.rlgc import C0

pytestmark = pytest.mark.filterwarnings("ignore:stripline.* thickness = 0")

DK = 3.7
LOSSLESS = ConstantDielectric(DK, 0.0)
DELAY_PER_M = np.sqrt(DK) / C0  # TEM: eps_eff = Dk in a homogeneous stripline
F40 = np.linspace(0.0, 40e9, 4001)  # 10 MHz step


def stripline(width_mil: float) -> Stripline:
    """A lossless stripline (zero-thickness strip, Df = 0) between planes 12 mil apart."""
    return Stripline(
        width=width_mil * MIL, below=6 * MIL, above=6 * MIL, thickness=0.0, dielectric=LOSSLESS
    )


def z0_of(section) -> float:
    """The line model's own characteristic impedance sqrt(L/C) (lossless: constant)."""
    r = section.rlgc(np.array([1e9]))
    return float(np.sqrt(r.l[0, 0, 0] / r.c[0, 0, 0]))


LEAD = stripline(6.5)  # 49.95 ohm in the stripline model
with warnings.catch_warnings():
    warnings.simplefilter("ignore", LossLaneWarning)  # zero thickness: no conductor loss
    Z_LEAD = z0_of(LEAD)


def emg(t, sigma, tau):
    """exp(sigma^2/(2 tau^2) - t/tau) Phi(t/sigma - sigma/tau): the response e^{-t/tau} u(t)
    convolved with a Gaussian edge of sigma (the exponentially modified Gaussian), in log
    form so that it cannot overflow."""
    return np.exp(sigma**2 / (2 * tau**2) - t / tau + norm.logcdf(t / sigma - sigma / tau))


# ---------------------------------------------------------------- the stimulus


def test_stimulus_is_a_gaussian_edge_of_the_requested_rise_time():
    # normal distribution: a Gaussian edge of sigma is Phi(t/sigma), its 10-90 % rise time
    # 2 x 1.2816 sigma (handbook quantile); at 2/f_max the cut-off at f_max is negligible
    tr = 2 / 40e9
    w = step_response(F40, np.ones(F40.size), rise_time=tr)
    sigma = tr / GAUSSIAN_RISE
    np.testing.assert_allclose(w.values, norm.cdf(w.time_s / sigma), atol=1e-6)
    assert w.rise_time_s == pytest.approx(tr, rel=1e-4)
    assert w.ringing < 1e-5
    assert GAUSSIAN_RISE == pytest.approx(2 * norm.ppf(0.9), rel=1e-15)


def test_default_rise_time_and_ringing_are_as_stated():
    # the documented default: 0.75 / f_max, ringing below 1 % of the step; the cut-off
    # edge keeps the requested 10-90 % time (measured on the stimulus itself)
    w = step_response(F40, np.ones(F40.size))
    assert w.rise_time_s == pytest.approx(0.75 / 40e9, rel=1e-3)
    assert 0 < w.ringing < 0.01
    t10 = crossing(w.time_s, w.values, 0.1)
    t90 = crossing(w.time_s, w.values, 0.9)
    assert t90 - t10 == pytest.approx(0.75 / 40e9, rel=1e-3)
    dt = w.time_s[1] - w.time_s[0]
    assert crossing(w.time_s, w.values, 0.5) == pytest.approx(0.0, abs=0.01 * dt)  # zero phase


def test_short_rise_time_warns_and_too_short_is_an_error():
    with pytest.warns(LossLaneWarning, match="rings by"):
        step_response(F40, np.ones(F40.size), rise_time=0.6 / 40e9)
    with pytest.raises(LossLaneError, match="rise_time = .* must be >= 1.25e-11 s"):
        step_response(F40, np.ones(F40.size), rise_time=0.4 / 40e9)
    with pytest.raises(LossLaneError, match="rise_time"):
        step_response(F40, np.ones(F40.size), rise_time=-1e-12)


def test_stimulus_sigma_is_exact_where_the_cut_off_does_not_matter():
    assert stimulus_sigma(3 / 40e9, 40e9) == pytest.approx(3 / 40e9 / GAUSSIAN_RISE, rel=1e-12)
    # near the default the cut lengthens the edge: sigma is solved a little smaller
    assert stimulus_sigma(0.75 / 40e9, 40e9) < 0.75 / 40e9 / GAUSSIAN_RISE


# ---------------------------------------------------------------- impedance profile


@pytest.mark.parametrize("width_mil", [4.0, 10.0])
def test_profile_of_a_section_reaches_its_impedance_at_twice_its_delay(width_mil):
    # a 50-ohm line, 1 in of another impedance, 50 ohm again, matched. Lattice diagram
    # (any transmission-line text): rho = Gamma1 = (Zs - Z0)/(Zs + Z0) from the round trip
    # 2 tau_lead until 2 (tau_lead + tau_s), then Gamma1 - (1 - Gamma1^2) Gamma1 = Gamma1^3;
    # TEM delay tau = length sqrt(eps_eff)/c, eps_eff = Dk
    section = stripline(width_mil)
    zs = z0_of(section)
    lead, sec = 2 * INCH, 1 * INCH
    blocks = [LineSegment(LEAD, lead), LineSegment(section, sec), LineSegment(LEAD, lead)]
    net = build_network(blocks, F40, Z_LEAD)
    p = impedance_profile(F40, net.s[:, 0, 0], Z_LEAD, delay_per_m=DELAY_PER_M)
    t, tr = p.time_s, p.rise_time_s
    dt = t[1] - t[0]
    t1, t2 = 2 * lead * DELAY_PER_M, 2 * (lead + sec) * DELAY_PER_M
    assert tr < 0.15 * (t2 - t1)  # the rise time is short against the section
    inside = (t > t1 + 3 * tr) & (t < t2 - 3 * tr)
    assert np.max(np.abs(p.impedance_ohm[inside] - zs)) <= 0.01 * zs  # the issue's 1 %
    assert np.max(np.abs(p.impedance_ohm[inside] - zs)) <= 0.003 * zs  # measured: 0.2 %
    g1 = (zs - Z_LEAD) / (zs + Z_LEAD)
    # the section's front edge (halfway to Gamma1) at the round trip 2 tau_lead
    assert crossing(t, p.reflection, 0.5 * g1, g1 > 0) == pytest.approx(t1, abs=dt)
    after = (t > t2 + 3 * tr) & (t < t2 + 2 * sec * DELAY_PER_M - 3 * tr)
    assert np.max(np.abs(p.reflection[after] - g1**3)) < 1e-3
    # one-way distance = time x velocity / 2: the edge at the lead's length
    d_edge = np.interp(t1, t, p.distance_m)
    assert d_edge == pytest.approx(lead, rel=1e-12)
    # before the edge the matched lead shows its own impedance, but for the edge's ringing:
    # at most the stated stimulus ringing times the edge (Z - Z_ref ~ 2 Z_ref rho)
    lead_part = (t > 3 * tr) & (t < t1 - 3 * tr)
    bound = 2 * Z_LEAD * p.ringing * abs(g1)
    assert np.max(np.abs(p.impedance_ohm[lead_part] - Z_LEAD)) < bound


def test_shunt_capacitor_dip_matches_the_lumped_solution():
    # circuit theory (e.g. Pozar, shunt element between matched lines): S11 =
    # -j w C Z / (2 + j w C Z), so the reflected step is rho(t) = -exp(-t/tau) u(t),
    # tau = C Z / 2, and its area is -tau exactly; the issue's approximation: the dip's
    # area on the round-trip axis is about C Z^2 (Z - Z_ref ~ 2 Z_ref rho for small rho)
    c = 0.05e-12
    tr = 35e-12
    lead = 1 * INCH
    net = build_network(
        [LineSegment(LEAD, lead), ShuntCapacitor(c), LineSegment(LEAD, lead)], F40, Z_LEAD
    )
    p = impedance_profile(F40, net.s[:, 0, 0], Z_LEAD, rise_time=tr)
    t = p.time_s
    dt = t[1] - t[0]
    tau = c * Z_LEAD / 2
    sigma = stimulus_sigma(tr, F40[-1])
    t0 = 2 * lead * DELAY_PER_M
    np.testing.assert_allclose(p.reflection, -emg(t - t0, sigma, tau), atol=2e-4)
    assert np.sum(p.reflection) * dt == pytest.approx(-tau, rel=2e-3)
    area = np.sum(p.impedance_ohm - Z_LEAD) * dt
    assert area == pytest.approx(-c * Z_LEAD**2, rel=0.05)  # the issue's approximation
    assert t[np.argmin(p.impedance_ohm)] == pytest.approx(t0, abs=tr)


def test_open_stub_via_shows_its_notch_signature():
    # a via whose unused barrel is an open stub of the line's impedance Z. Lattice diagram:
    # at the junction the step sees Z || Z = Z/2 (rho = -1/3) for the stub's round trip
    # 2 tau_s; each return from the open end adds (2/3)(2/3)(-1/3)^k, so the levels are
    # rho_k = (-1/3)^(k+1): -1/3, +1/9, -1/27 in successive windows of 2 tau_s; the
    # same stub gives the quarter-wave notch at c / (4 l_s sqrt(eps)) in S21
    f = np.linspace(0.0, 100e9, 10001)
    barrel, stub, lead = 60 * MIL, 300 * MIL, 1 * INCH
    via = Via(barrel, stub, Z_LEAD, LOSSLESS)
    net = build_network([LineSegment(LEAD, lead), via, LineSegment(LEAD, lead)], f, Z_LEAD)
    p = impedance_profile(f, net.s[:, 0, 0], Z_LEAD)
    t, tr = p.time_s, p.rise_time_s
    ts = stub * DELAY_PER_M
    t0 = 2 * (lead + barrel) * DELAY_PER_M
    for k in range(3):
        window = (t > t0 + 2 * k * ts + 3 * tr) & (t < t0 + 2 * (k + 1) * ts - 3 * tr)
        assert np.max(np.abs(p.reflection[window] - (-1 / 3) ** (k + 1))) < 3e-3, k
    dip = (t > t0 + 3 * tr) & (t < t0 + 2 * ts - 3 * tr)
    np.testing.assert_allclose(p.impedance_ohm[dip], Z_LEAD / 2, rtol=0.01)
    # the dip is as wide as the stub's round trip: from its falling to its rising edge
    fall = crossing(t, p.reflection, -1 / 6, rising=False)
    rise = crossing(t[t > fall + 3 * tr], p.reflection[t > fall + 3 * tr], -1 / 9)
    assert rise - fall == pytest.approx(2 * ts, abs=2 * (t[1] - t[0]))
    first = f < 10e9  # the first (quarter-wave) notch, not its odd harmonics
    notch = f[first][np.argmin(np.abs(net.s[first, 1, 0]))]
    assert notch == pytest.approx(C0 / (4 * stub * np.sqrt(DK)), rel=0.02)


# ---------------------------------------------------------------- step and skew


def test_matched_line_step_delay_and_rise_time():
    # TEM delay = length x sqrt(eps_eff) / c (eps_eff = Dk); a lossless matched line only
    # delays the step, so the output rise time is the stimulus'
    length = 5 * INCH
    net = build_network([LineSegment(LEAD, length)], F40, Z_LEAD)
    st = through_step(F40, net.s[:, 1, 0])
    dt = st.time_s[1] - st.time_s[0]
    assert st.delay_s == pytest.approx(length * DELAY_PER_M, abs=dt)
    assert abs(st.delay_s - length * DELAY_PER_M) < 0.01 * dt  # measured: far below a step
    assert st.rise_time_s == pytest.approx(st.stimulus_rise_time_s, rel=1e-3)
    assert st.final == pytest.approx(1.0, abs=1e-12)


def _pair_of_legs(length_a: float, length_b: float, f: np.ndarray) -> np.ndarray:
    """An uncoupled pair of matched lossless legs as a 4-port in in-in-out-out order."""
    s = np.zeros((f.size, 4, 4), complex)
    for leg, length in enumerate((length_a, length_b)):
        s21 = build_network([LineSegment(LEAD, length)], f, Z_LEAD).s
        s[:, leg, leg] = s21[:, 0, 0]
        s[:, 2 + leg, 2 + leg] = s21[:, 1, 1]
        s[:, 2 + leg, leg] = s21[:, 1, 0]
        s[:, leg, 2 + leg] = s21[:, 0, 1]
    return s


@pytest.mark.parametrize("order", ["in-in-out-out", "in-out-in-out"])
def test_skew_of_a_pair_is_the_delay_of_the_length_difference(order):
    # TEM delay of the extra 0.3 in: 0.3 in x sqrt(Dk) / c
    from losslane.network.ports import to_order

    s = to_order(_pair_of_legs(4 * INCH, 4.3 * INCH, F40), 2, order)
    rep = time_domain(F40, s, Z_LEAD, order)
    dt = rep.step[0].time_s[1] - rep.step[0].time_s[0]
    assert rep.skew_s == pytest.approx(0.3 * INCH * DELAY_PER_M, abs=dt)
    names = [st.path for st in rep.step]
    assert names == (
        ["Sdd21", "S31", "S42"] if order == "in-in-out-out" else ["Sdd21", "S21", "S43"]
    )
    # uncoupled legs: Sdd21 = (S31 + S42)/2 (Bockelman-Eisenstadt), so the differential
    # step rises in two half steps, at 0.5 between the legs' arrivals
    sdd = rep.step[0]
    between = np.interp(4.15 * INCH * DELAY_PER_M, sdd.time_s, sdd.volts)
    assert between == pytest.approx(0.5, abs=0.01)


def test_first_order_low_pass_step_and_pulse_cursors():
    # a shunt capacitor between matched ports is a first-order low-pass (circuit theory):
    # S21 = 1 / (1 + j w tau), tau = C Z / 2; its step response to a Gaussian edge is
    # Phi(t/sigma) - EMG(t), and a one-UI pulse gives s(t) - s(t - UI)
    tau = 10e-12
    z = 50.0
    f = np.linspace(0.0, 400e9, 8001)
    net = build_network([ShuntCapacitor(2 * tau / z)], f, z)
    tr = 5e-12
    sigma = stimulus_sigma(tr, f[-1])

    def s_ref(t):
        return norm.cdf(t / sigma) - emg(t, sigma, tau)

    st = through_step(f, net.s[:, 1, 0], rise_time=tr)
    np.testing.assert_allclose(st.volts, s_ref(st.time_s), atol=2e-5)
    t50 = brentq(lambda t: s_ref(t) - 0.5, -tr, 10 * tau, xtol=1e-18)
    assert st.delay_s == pytest.approx(t50, abs=1e-3 * tr)

    rate = 32e9
    ui = 1 / rate
    pu = through_pulse(f, net.s[:, 1, 0], rate, "nrz", rise_time=tr)
    assert pu.ui_s == ui

    def p_ref(t):
        return s_ref(t) - s_ref(t - ui)

    np.testing.assert_allclose(pu.volts, p_ref(pu.time_s), atol=2e-5)
    dense = np.linspace(0, 3 * ui, 300001)
    tm = dense[np.argmax(p_ref(dense))]
    assert pu.main_cursor_time_s == pytest.approx(tm, abs=0.01 * tr)
    assert pu.main_cursor == pytest.approx(p_ref(tm), abs=1e-4)
    # the cursors are the response one UI before and 1..5 UI after the main cursor's time
    t_main = pu.main_cursor_time_s
    assert pu.pre_cursor == pytest.approx(p_ref(t_main - ui), abs=1e-4)
    np.testing.assert_allclose(pu.post_cursors, p_ref(t_main + ui * np.arange(1, 6)), atol=1e-4)
    # the post-cursors of a first-order system fall by e^{-UI/tau} per UI (ratio of the
    # exponential tails, exact once the edge is past; the later ones are below 1e-5)
    ratio = np.array(pu.post_cursors[2:4]) / np.array(pu.post_cursors[1:3])
    np.testing.assert_allclose(ratio, np.exp(-ui / tau), rtol=1e-3)


def test_pam4_pulse_is_one_symbol_wide():
    # common practice: PAM4 carries 2 bits per symbol, so one UI = 2 / data rate
    net = build_network([LineSegment(LEAD, 2 * INCH)], F40, Z_LEAD)
    pu = through_pulse(F40, net.s[:, 1, 0], 56e9, "pam4")
    assert pu.ui_s == pytest.approx(2 / 56e9, rel=1e-15)
    # a lossless matched line passes the pulse whole: the main cursor is its full height,
    # one UI later the pulse is over
    assert pu.main_cursor == pytest.approx(1.0, abs=0.01)
    assert abs(pu.post_cursors[0]) < 0.01 and abs(pu.pre_cursor) < 0.01
    # the pulse's middle arrives after the line's delay
    assert pu.main_cursor_time_s == pytest.approx(2 * INCH * DELAY_PER_M + pu.ui_s / 2, abs=2e-12)


def test_pulse_equals_difference_of_delayed_steps():
    # linearity: the response to a pulse of width w is s(t) - s(t - w)
    f = F40
    h = build_network([LineSegment(LEAD, 1 * INCH), ShuntCapacitor(0.3e-12)], f, 50.0).s[:, 1, 0]
    w = 40e-12
    p = pulse_response(f, h, w)
    s = step_response(f, h)
    np.testing.assert_allclose(
        p.values, s.values - np.interp(s.time_s - w, s.time_s, s.values), atol=2e-3
    )


# ---------------------------------------------------------------- grids


def _lossy_channel(f):
    core = WidebandDebye(3.7, 0.009, 10e9)
    ms = Microstrip(width=6 * MIL, height=3.5 * MIL, thickness=1.4 * MIL, dielectric=core)
    sl = Stripline(
        width=5 * MIL, below=6 * MIL, above=6 * MIL, thickness=0.6 * MIL, dielectric=core
    )
    blocks = [
        LineSegment(ms, 1 * INCH),
        ShuntCapacitor(0.15e-12),
        Via(55 * MIL, 10 * MIL, 45.0, core),
        LineSegment(sl, 8 * INCH),
        LineSegment(ms, 0.5 * INCH),
    ]
    return build_network(blocks, f, 50.0)


def test_dc_point_is_the_estimate_of_scikit_rf():
    # scikit-rf's Network.extrapolate_to_dc (linear in magnitude and phase, real part) is
    # the outside reference for the DC estimate of data that start at 10 MHz
    import skrf

    net = _lossy_channel(F40)
    cut = skrf.Network(frequency=skrf.Frequency.from_f(F40[1:], unit="Hz"), s=net.s[1:], z0=50)
    ref = cut.extrapolate_to_dc(kind="linear").s[0]
    np.testing.assert_allclose(dc_value(F40[1:], net.s[1:]), ref.real, rtol=0, atol=1e-12)
    spec = uniform_spectrum(F40[1:], net.s[1:])
    np.testing.assert_allclose(spec.f, F40, rtol=0, atol=1e-3)
    np.testing.assert_array_equal(spec.values[1:], net.s[1:])
    assert "extrapolated" in spec.notes[0]


def test_data_from_10_mhz_give_the_profile_of_the_data_with_dc():
    # stated tolerance: a file starting at 10 MHz gives the impedance profiles of the same
    # data with their true DC point within 0.02 ohm over the profiles' span (measured
    # 0.003 ohm; the DC-set level long after the channel's round trip differs by 0.08 ohm)
    # and the same delay within one time step
    net = _lossy_channel(F40)
    full = time_domain(F40, net.s, 50.0)
    cut = time_domain(F40[1:], net.s[1:], 50.0)
    assert any("extrapolated" in n for n in cut.notes)
    assert not any("extrapolated" in n for n in full.notes)
    for a, b in zip(full.tdr, cut.tdr, strict=True):
        n = min(a.time_s.size, b.time_s.size)
        np.testing.assert_array_equal(a.time_s[:n], b.time_s[:n])
        assert np.max(np.abs(a.impedance_ohm[:n] - b.impedance_ohm[:n])) < 0.02
    dt = full.step[0].time_s[1] - full.step[0].time_s[0]
    assert cut.step[0].delay_s == pytest.approx(full.step[0].delay_s, abs=dt)


def test_non_uniform_grid_is_resampled_and_keeps_the_delay():
    # TEM delay of a matched line, from data on a grid whose step doubles halfway and on a
    # uniform grid that does not start at a whole step
    length = 3 * INCH
    f = np.concatenate([np.linspace(0, 20e9, 2001), np.linspace(20.02e9, 40e9, 1000)])
    net = build_network([LineSegment(LEAD, length)], f, Z_LEAD)
    st = through_step(f, net.s[:, 1, 0])
    assert any("resampled" in n for n in st.notes)
    dt = st.time_s[1] - st.time_s[0]
    assert st.delay_s == pytest.approx(length * DELAY_PER_M, abs=dt)
    f2 = 0.3e6 + np.arange(4000) * 10e6
    net2 = build_network([LineSegment(LEAD, length)], f2, Z_LEAD)
    st2 = through_step(f2, net2.s[:, 1, 0])
    assert any("not starting at a whole step" in n for n in st2.notes)
    assert any("extrapolated" in n for n in st2.notes)
    assert st2.delay_s == pytest.approx(length * DELAY_PER_M, abs=st2.time_s[1] - st2.time_s[0])
    # a uniform grid from 30 MHz in 10 MHz steps: only the two points below are filled in
    f3 = F40[3:]
    net3 = build_network([LineSegment(LEAD, length)], f3, Z_LEAD)
    spec = uniform_spectrum(f3, net3.s[:, 1, 0])
    np.testing.assert_allclose(spec.f, F40, rtol=0, atol=1e-3)
    np.testing.assert_array_equal(spec.values[3:], net3.s[:, 1, 0])
    assert any("2 grid point(s) between 0 Hz" in n for n in spec.notes)
    st3 = through_step(f3, net3.s[:, 1, 0])
    assert st3.delay_s == pytest.approx(length * DELAY_PER_M, abs=st3.time_s[1] - st3.time_s[0])


# ---------------------------------------------------------------- whole networks


def test_differential_profile_of_a_coupled_pair_is_its_odd_mode_impedance_doubled():
    # coupled stripline (Cohn, 1955): Z_diff = 2 Z_odd; Sdd11 is referred to 2 Z_ref
    # (Bockelman-Eisenstadt), so the differential profile's plateau is the model's Z_diff
    pair = StriplinePair(
        width=4.5 * MIL,
        spacing=6 * MIL,
        below=6 * MIL,
        above=6 * MIL,
        thickness=0.0,
        dielectric=LOSSLESS,
    )
    z_diff = float(pair.line_values(np.array([1e9])).impedance[0])
    length = 3 * INCH
    net = build_network([LineSegment(pair, length)], F40, 50.0)
    rep = time_domain(F40, net.s, 50.0)
    (d1,) = [p for p in rep.tdr if p.mode == "differential" and p.port == 1]
    assert d1.reference_ohm == 100.0
    t, tr = d1.time_s, d1.rise_time_s
    plateau = (t > 3 * tr) & (t < 2 * length * DELAY_PER_M - 3 * tr)
    np.testing.assert_allclose(d1.impedance_ohm[plateau], z_diff, rtol=0.01)
    # both legs alike: no skew
    assert rep.skew_s == pytest.approx(0.0, abs=1e-15)


def test_time_domain_json_has_the_issues_shapes():
    net = _lossy_channel(F40)
    rep = time_domain(F40, net.s, 50.0, data_rate=32e9, delay_per_m=DELAY_PER_M)
    out = json.loads(json.dumps(rep.to_json(), allow_nan=False))
    assert [(p["port"], p["mode"]) for p in out["tdr"]] == [
        (1, "single-ended"),
        (2, "single-ended"),
    ]
    for p in out["tdr"]:
        assert {"port", "mode", "time_s", "impedance_ohm", "distance_m"} <= set(p)
        assert len(p["time_s"]) == len(p["impedance_ohm"])
    assert [s["path"] for s in out["step"]] == ["S21"]
    assert {"path", "delay_s", "rise_time_s"} <= set(out["step"][0])
    assert {
        "path",
        "data_rate_bps",
        "ui_s",
        "time_s",
        "volts",
        "main_cursor",
        "pre_cursor",
        "post_cursors",
    } <= set(out["pulse"])
    assert out["skew_s"] is None
    s4 = _pair_of_legs(2 * INCH, 2 * INCH, F40)
    out4 = time_domain(F40, s4, Z_LEAD, data_rate=56e9, modulation="pam4").to_json()
    assert [(p["port"], p["mode"]) for p in out4["tdr"]] == [
        (1, "single-ended"),
        (2, "single-ended"),
        (3, "single-ended"),
        (4, "single-ended"),
        (1, "differential"),
        (2, "differential"),
    ]
    assert out4["pulse"]["path"] == "Sdd21"
    assert isinstance(out4["skew_s"], float)
    json.dumps(out4, allow_nan=False)


def test_profiles_of_a_network_span_its_round_trip():
    # every feature of a channel, its far end included, lies within the round trip of its
    # through delay: the profiles run to 1.25 round trips (+ 10 rise times)
    net = _lossy_channel(F40)
    rep = time_domain(F40, net.s, 50.0)
    end = rep.tdr[0].time_s[-1]
    assert end == pytest.approx(2.5 * rep.step[0].delay_s + 10 * rep.rise_time_s, abs=5e-12)


def test_bad_input_is_named():
    s = _pair_of_legs(1 * INCH, 1 * INCH, F40)
    with pytest.raises(LossLaneError, match="modulation = 'pam8'"):
        time_domain(F40, s, 50.0, data_rate=10e9, modulation="pam8")
    with pytest.raises(LossLaneError, match="data_rate = 0"):
        time_domain(F40, s, 50.0, data_rate=0)
    with pytest.raises(LossLaneError, match="one reference impedance"):
        time_domain(F40, s, [50.0, 50.0, 45.0, 50.0])
    with pytest.raises(LossLaneError, match="2-port or 4-port"):
        time_domain(F40, s[:, :3, :3], 50.0)
    with pytest.raises(LossLaneError, match="order"):
        time_domain(F40, s, 50.0, order="out-in")
    with pytest.raises(LossLaneError, match="strictly increasing"):
        through_step(F40[::-1], s[:, 2, 0])
    bad = s[:, 2, 0].copy()
    bad[7] = np.inf
    with pytest.raises(LossLaneError, match="not finite"):
        through_step(F40, bad)
    with pytest.raises(LossLaneError, match="reflection"):
        impedance_profile(F40, s[:, :2, 0])
    with pytest.raises(LossLaneError, match="z_ref"):
        impedance_profile(F40, s[:, 0, 0], z_ref=-50)


def test_file_written_by_scikit_rf_from_its_own_media(tmp_path):
    # an independent network: scikit-rf's DefinedGammaZ0 lines (50, 65, 50 ohm, lossless
    # TEM, eps = Dk) cascaded by scikit-rf, written to and read from a Touchstone file,
    # starting at 10 MHz as measured files do. IEEE 370-2020 metrics: 100, 100, good; the
    # lattice diagram: the 65-ohm section from the round trip 2 tau_lead on
    import skrf
    from skrf.media import DefinedGammaZ0

    from losslane.network.quality import quality

    f = F40[1:]
    freq = skrf.Frequency.from_f(f, unit="Hz")
    gamma = 2j * np.pi * f * DELAY_PER_M
    lines = [
        DefinedGammaZ0(freq, z0_port=50.0, z0=z, gamma=gamma).line(length, unit="m")
        for z, length in ((50.0, 2 * INCH), (65.0, 1 * INCH), (50.0, 2 * INCH))
    ]
    skrf.network.cascade_list(lines).write_touchstone(str(tmp_path / "steps"))
    net = skrf.Network(str(tmp_path / "steps.s2p"))
    q = quality(net.f, net.s)
    assert (q.passivity, q.reciprocity) == (100.0, 100.0)
    assert q.causality_level == "good", q.causality
    rep = time_domain(net.f, net.s, 50.0)
    assert any("extrapolated" in n for n in rep.notes)
    p = rep.tdr[0]
    t, tr = p.time_s, p.rise_time_s
    t1, t2 = 4 * INCH * DELAY_PER_M, 6 * INCH * DELAY_PER_M
    inside = (t > t1 + 3 * tr) & (t < t2 - 3 * tr)
    np.testing.assert_allclose(p.impedance_ohm[inside], 65.0, rtol=0.003)
    assert rep.step[0].delay_s == pytest.approx(5 * INCH * DELAY_PER_M, abs=t[1] - t[0])

"""Integrated crosstalk noise: the formula against a hand computation, its parts against
their own derivations, and the NEXT/FEXT extraction from a hand-made S-parameter set.

Sources: the ICN form of IEEE 802.3's backplane/cable annexes (Annex 69B, recalled from
memory -- see the README); the power spectral density of a random NRZ symbol stream,
A^2 T sinc^2(f T), and its integral A^2 (Parseval; any communications text); the step
response of a second-order Butterworth low-pass from scipy.signal (independent
implementation) for the constant 0.2365 of f_t = 0.2365 / T_t; the mixed-mode transform
of Bockelman and Eisenstadt (IEEE Trans. MTT 43(7), 1995) and scikit-rf's own conversion.
"""

from __future__ import annotations

import math
from types import SimpleNamespace

import numpy as np
import pytest

from losslane.crosstalk.coupling import couplings, mode_ports
from losslane.crosstalk.evaluate import evaluate_crosstalk
from losslane.crosstalk.noise import BUTTERWORTH_RISE, icn, weighting
from losslane.crosstalk.settings import CrosstalkSettings
from losslane.network.mixedmode import mode_transform
from losslane.xsection.group import GroupTrace, members_of, pairs_of

BAUD = 25.78125e9


def test_butterworth_constant_matches_scipy_step_response():
    # 1 / (1 + (f/f_t)^4) is |H|^2 of a 2nd-order Butterworth with 3 dB at f_t; its 20-80 %
    # rise time times f_t is the 0.2365 of the ICN weighting (scipy.signal, independent)
    from scipy import signal

    b, a = signal.butter(2, 2 * np.pi * 1.0, analog=True)
    t = np.linspace(0.0, 2.0, 400_001)
    _, y = signal.step((b, a), T=t)
    rise = t[np.argmax(y >= 0.8)] - t[np.argmax(y >= 0.2)]
    assert rise == pytest.approx(BUTTERWORTH_RISE, abs=2e-4)
    w, h = signal.freqs(b, a, worN=2 * np.pi * np.array([0.3, 1.0, 2.5]))
    f = w / (2 * np.pi)
    expect = weighting(f, 1.0, 1.0, BUTTERWORTH_RISE, None) / np.sinc(f) ** 2
    assert np.abs(h) ** 2 == pytest.approx(expect, rel=1e-12)


def test_flat_crosstalk_without_filters_gives_amplitude_times_coupling():
    # integral of A^2/f_b sinc^2(f/f_b) over all f is A^2 (Parseval: the symbol stream's
    # variance), so a flat |X| gives sigma = A |X|; the tail beyond 200 f_b holds
    # 2/(pi^2 200) ~ 0.1 % of the power
    f = np.linspace(0.0, 200 * BAUD, 400_001)
    x = 0.01
    w = weighting(f, 0.6, BAUD, None, None)
    from losslane.crosstalk.noise import integrated_noise

    sigma = integrated_noise(f, w, np.full(f.shape, x**2))
    tail = 2 / (np.pi**2 * 200)
    assert sigma == pytest.approx(0.6 * x * math.sqrt(1 - tail), rel=2e-3)


def hand_icn(f, nxt, fxt, a_nt, a_ft, t_nt, t_ft, fr, fb):
    """The formula written out point by point, as a reader would compute it by hand."""
    df = f[1] - f[0]
    sn = sf = 0.0
    for fn, xn, xf in zip(f, nxt, fxt, strict=True):
        if fn <= 0:
            continue
        x = math.pi * fn / fb
        sinc2 = (math.sin(x) / x) ** 2
        rx = 1.0 / (1.0 + (fn / fr) ** 8)
        wn = a_nt**2 / fb * sinc2 / (1.0 + (fn / (0.2365 / t_nt)) ** 4) * rx
        wf = a_ft**2 / fb * sinc2 / (1.0 + (fn / (0.2365 / t_ft)) ** 4) * rx
        sn += wn * 10 ** (-xn / 10)
        sf += wf * 10 ** (-xf / 10)
    near = math.sqrt(2 * df * sn)
    far = math.sqrt(2 * df * sf)
    return near, far, math.sqrt(near**2 + far**2)


def hand_made_channel(f, nxt, fxt, traces):
    """An 2n-port S with known differential NEXT and FEXT from the aggressor pair 'a' into
    the victim pair 'v' (built in mixed mode, converted to single-ended ports with the
    orthonormal Bockelman-Eisenstadt transform)."""
    members = members_of(traces)
    n = sum(len(m.conductors) for m in members)
    m = mode_transform(n, pairs_of(members))
    ports = mode_ports(members)
    smm = np.zeros((f.size, 2 * n, 2 * n), complex)
    delay = np.exp(-2j * np.pi * f * 1e-9)
    for near, far in ports.values():
        smm[:, far, near] = smm[:, near, far] = 0.5 * delay
    vn, vf = ports["v"]
    an, af = ports["a"]
    smm[:, vn, an] = smm[:, an, vn] = nxt
    smm[:, vf, af] = smm[:, af, vf] = nxt
    smm[:, vf, an] = smm[:, an, vf] = fxt
    smm[:, vn, af] = smm[:, af, vn] = fxt
    s = m.T @ smm @ m
    return members, s


def test_icn_of_a_hand_made_s_parameter_set_equals_the_hand_computation():
    f = np.linspace(0.0, 30e9, 3001)
    # known NEXT and FEXT: a NEXT ripple around -40 dB, a FEXT growing like f
    nxt = 0.01 * (1 + 0.5 * np.cos(2 * np.pi * f / 3e9)) * np.exp(-1j * f / 1e9)
    fxt = 0.004 * (f / 10e9) * np.exp(-2j * np.pi * f * 1e-9)
    traces = (GroupTrace("a", 1e-4, 1e-4), GroupTrace("v", 1e-4, 1e-4, 5e-4))
    members, s = hand_made_channel(f, nxt, fxt, traces)
    settings = CrosstalkSettings("v", ("a",), 0.6, 0.4, 20e-12, 30e-12, 19e9)
    scenario = SimpleNamespace(
        crosstalk=settings,
        ports=SimpleNamespace(reference=50.0),
        budget=SimpleNamespace(
            data_rate=2 * BAUD,
            baud=BAUD,
            nyquist=BAUD / 2,
            checks=(),
            max_icn=2e-3,
        ),
    )
    channel = SimpleNamespace(scenario=scenario, members=members, f=f, s=s)
    xt = evaluate_crosstalk(channel)
    c = xt.couplings[0]
    assert c.next == pytest.approx(nxt, abs=1e-15)
    assert c.fext == pytest.approx(fxt, abs=1e-15)
    assert c.mode == "differential to differential"
    nx_db = -20 * np.log10(np.abs(nxt))
    fx_db = -20 * np.log10(np.maximum(np.abs(fxt), 1e-300))
    near, far, total = hand_icn(f, nx_db, fx_db, 0.6, 0.4, 20e-12, 30e-12, 19e9, BAUD)
    assert xt.noise.near == pytest.approx(near, rel=1e-12)
    assert xt.noise.far == pytest.approx(far, rel=1e-12)
    assert xt.icn == pytest.approx(total, rel=1e-12)
    data = xt.to_json()
    assert data["icn_mv"] == pytest.approx(1e3 * total, rel=1e-12)
    assert data["passed"] is (total <= 2e-3)
    # isolation at the check point (Nyquist), read on the sweep
    k = int(np.argmin(np.abs(f - BAUD / 2)))
    expect = float(np.interp(BAUD / 2, f[k - 1 : k + 2], nx_db[k - 1 : k + 2]))
    assert data["aggressors"][0]["next_db"][0] == pytest.approx(expect, rel=1e-9)
    # ICR = power-sum crosstalk loss - insertion loss (victim through 0.5: 6.02 dB)
    ps = -10 * np.log10(np.abs(nxt) ** 2 + np.abs(fxt) ** 2)
    icr = float(np.interp(BAUD / 2, f, ps - 20 * np.log10(2)))
    assert data["icr_at_nyquist_db"] == pytest.approx(icr, abs=1e-9)


def test_single_trace_into_pair_is_single_ended_to_differential():
    # a single-ended aggressor 'a' (conductor 0) next to the victim pair 'v' (1, 2): the
    # coupling into d = (P - N)/sqrt 2 from port a is (S_Pa - S_Na)/sqrt 2
    traces = (GroupTrace("a", 1e-4), GroupTrace("v", 1e-4, 1e-4, 5e-4))
    rng = np.random.default_rng(7)
    s = rng.normal(size=(2, 6, 6)) * 0.05 + 1j * rng.normal(size=(2, 6, 6)) * 0.05
    s = 0.5 * (s + np.swapaxes(s, 1, 2))
    (c,) = couplings(s, 50.0, members_of(traces), "v", ["a"])
    assert c.mode == "single-ended to differential"
    # the victim's receiver is at the far end (ports 3..5): NEXT from the aggressor's far
    # end (port 3), FEXT from its near end (port 0)
    assert c.next == pytest.approx((s[:, 4, 3] - s[:, 5, 3]) / np.sqrt(2), abs=1e-15)
    assert c.fext == pytest.approx((s[:, 4, 0] - s[:, 5, 0]) / np.sqrt(2), abs=1e-15)
    assert c.next_tx == pytest.approx((s[:, 1, 0] - s[:, 2, 0]) / np.sqrt(2), abs=1e-15)


def test_pair_to_pair_coupling_agrees_with_scikit_rf_mixed_mode():
    import skrf

    f = np.array([1e9, 3e9, 7e9])
    traces = (GroupTrace("a", 1e-4, 1e-4), GroupTrace("v", 1e-4, 1e-4, 5e-4))
    rng = np.random.default_rng(3)
    s = rng.normal(size=(3, 8, 8)) * 0.05 + 1j * rng.normal(size=(3, 8, 8)) * 0.05
    s = 0.5 * (s + np.swapaxes(s, 1, 2))
    (c,) = couplings(s, 50.0, members_of(traces), "v", ["a"])
    # scikit-rf's se2gmm(p=4) pairs consecutive ports (0, 1), (2, 3), ... into d0..d3 and
    # c0..c3: our internal order (aP aN vP vN near, then far) gives d0 = a near,
    # d1 = v near, d2 = a far, d3 = v far
    net = skrf.Network(frequency=skrf.Frequency.from_f(f, unit="Hz"), s=s, z0=50)
    net.se2gmm(p=4)
    mm = net.s
    assert c.next == pytest.approx(mm[:, 3, 2], abs=1e-12)
    assert c.fext == pytest.approx(mm[:, 3, 0], abs=1e-12)
    assert c.next_tx == pytest.approx(mm[:, 1, 0], abs=1e-12)


def test_noise_sum_needs_a_uniform_sweep():
    from losslane.errors import LossLaneError

    f = np.array([0.0, 1e9, 3e9])
    with pytest.raises(LossLaneError, match="uniform frequency step"):
        icn(f, np.ones(3), np.ones(3), 1e10, 1, 1, 1e-11, 1e-11, 1e10)

"""Transmission-line blocks against closed forms and independent implementations."""

from __future__ import annotations

import numpy as np
import pytest
import scipy.linalg

from losslane.materials.dielectric import ConstantDielectric, WidebandDebye
from losslane.network import LineSegment, abcd_to_s, block_network, cascade
from losslane.network.line import UniformLine, modal_scaled_abcd
from losslane.network.scaled import ScaledABCD
from losslane.units import INCH, MIL
from losslane.xsection import RLGC, Stripline

Z0 = 50.0


def hand_rlgc(f, r=8.0, l=330e-9, g_tan=0.01, c=130e-12) -> RLGC:
    """A made-up single line (values typical of a 50-ohm board trace)."""
    f = np.asarray(f, float)
    n = f.size
    return RLGC.single(f, np.full(n, r), np.full(n, l), 2 * np.pi * f * c * g_tan, np.full(n, c))


def stripline(df=0.01) -> Stripline:
    return Stripline(
        width=5 * MIL,
        below=6 * MIL,
        above=6 * MIL,
        thickness=0.6 * MIL,
        dielectric=ConstantDielectric(3.7, df),
    )


def pozar_s(z, y, length, z0):
    """Textbook S of a line of Zc between two z0 ports (D. M. Pozar, *Microwave
    Engineering*, the ABCD -> S conversion applied to a line section):
    S21 = 1 / (cosh gl + (Zc/Z0 + Z0/Zc)/2 sinh gl), S11 = (Zc/Z0 - Z0/Zc)/2 sinh gl * S21."""
    gamma = np.sqrt(z * y)
    zc = np.sqrt(z / y)
    ch, sh = np.cosh(gamma * length), np.sinh(gamma * length)
    s21 = 1.0 / (ch + 0.5 * (zc / z0 + z0 / zc) * sh)
    s11 = 0.5 * (zc / z0 - z0 / zc) * sh * s21
    return s11, s21


def test_lossless_matched_line_is_pure_delay():
    # TEM line theory: a lossless line terminated in sqrt(L/C) has |S21| = 1, S11 = 0 and
    # phase delay beta l = omega sqrt(L C) l (Pozar, Microwave Engineering, ch. 2)
    f = np.linspace(0, 40e9, 401)
    l_pul, c_pul = 330e-9, 132e-12
    rl = RLGC.single(
        f, np.zeros(f.size), np.full(f.size, l_pul), np.zeros(f.size), np.full(f.size, c_pul)
    )
    length = 0.1
    s = LineSegment(rl, length).s(f, np.sqrt(l_pul / c_pul))
    np.testing.assert_allclose(np.abs(s[:, 1, 0]), 1.0, atol=1e-13)
    np.testing.assert_allclose(np.abs(s[:, 0, 0]), 0.0, atol=1e-13)
    beta_l = 2 * np.pi * f * np.sqrt(l_pul * c_pul) * length
    phase = -np.unwrap(np.angle(s[:, 1, 0]))
    np.testing.assert_allclose(phase, beta_l, rtol=1e-12, atol=1e-12)


def test_lossy_line_matches_textbook_closed_form():
    # Pozar, Microwave Engineering: S of a lossy line section between Z0 ports
    f = np.linspace(1e6, 40e9, 301)
    rl = hand_rlgc(f)
    length = 0.25
    s = LineSegment(rl, length).s(f, Z0)
    s11, s21 = pozar_s(rl.z()[:, 0, 0], rl.y()[:, 0, 0], length, Z0)
    np.testing.assert_allclose(s[:, 1, 0], s21, rtol=1e-11)
    np.testing.assert_allclose(s[:, 0, 1], s21, rtol=1e-11)
    np.testing.assert_allclose(s[:, 0, 0], s11, rtol=1e-10, atol=1e-14)
    np.testing.assert_allclose(s[:, 1, 1], s11, rtol=1e-10, atol=1e-14)


def test_line_matches_scikit_rf_media_line():
    # scikit-rf's own line model (DefinedGammaZ0.line) is an independent implementation
    import skrf
    from skrf.media import DefinedGammaZ0

    f = np.linspace(10e6, 30e9, 201)
    sec = stripline()
    rl = sec.rlgc(f)
    length = 3 * INCH
    freq = skrf.Frequency.from_f(f, unit="Hz")
    media = DefinedGammaZ0(freq, z0_port=Z0, gamma=rl.gamma(), z0=rl.zc())
    ref = media.line(length, unit="m")
    ours = block_network(LineSegment(sec, length), f, Z0)
    np.testing.assert_allclose(ours.s, ref.s, rtol=1e-10, atol=1e-13)


def test_length_additivity():
    # a uniform line's chain matrix is exp(H l), so 2 in = 1 in followed by 1 in (exact)
    f = np.linspace(0, 50e9, 501)
    sec = stripline()
    one = LineSegment(sec, 1 * INCH)
    two = LineSegment(sec, 2 * INCH)
    s2 = abcd_to_s(cascade([two], f), Z0)
    s11 = abcd_to_s(cascade([one, one], f), Z0)
    assert np.max(np.abs(s2 - s11)) < 1e-9


def test_dc_point_is_series_resistance():
    # DC circuit theory: a series resistance R between two Z0 ports gives
    # S21 = 2 Z0 / (2 Z0 + R), S11 = R / (2 Z0 + R)
    f = np.array([0.0, 1e6, 1e9])
    sec = stripline()
    length = 10 * INCH
    r_dc = sec.rlgc(f).r[0, 0, 0]
    s = LineSegment(sec, length).s(f, Z0)
    r = r_dc * length
    assert s[0, 1, 0] == pytest.approx(2 * Z0 / (2 * Z0 + r), rel=1e-14)
    assert s[0, 0, 0] == pytest.approx(r / (2 * Z0 + r), rel=1e-13)
    assert s[0, 1, 0].imag == 0.0
    t = LineSegment(sec, length).abcd(f)[0]
    # exact DC limit of the chain matrix: A = D = 1, B = R l, C = 0
    np.testing.assert_array_equal(t, np.array([[1, r], [0, 1]], dtype=complex))


@pytest.mark.parametrize("length", [2.0, 100.0])
def test_very_long_line_stays_finite_and_passive(length):
    # 2 m at 100 GHz (~hundreds of dB) and an absurd 100 m (alpha l ~ 1000s of Np):
    # the result must be finite and passive; once exp(-2 gamma l) is negligible the
    # input sees the line's own impedance, S11 = (Zc - Z0)/(Zc + Z0) (textbook:
    # input impedance of an infinitely long line).
    f = np.array([0.0, 1e9, 25e9, 100e9])
    sec = Stripline(
        width=5 * MIL,
        below=6 * MIL,
        above=6 * MIL,
        thickness=0.6 * MIL,
        dielectric=WidebandDebye(3.7, 0.02, 10e9),
    )
    chain = cascade([LineSegment(sec, length)], f)
    net = block_network(LineSegment(sec, length), f, Z0)
    assert np.all(np.isfinite(net.s))
    assert net.is_passive()
    assert net.is_reciprocal()
    alpha_l = sec.rlgc(f).gamma().real * length
    assert alpha_l[-1] > (60 if length == 2 else 1000)
    zc = sec.rlgc(f).zc()[-1]
    assert net.s[-1, 0, 0] == pytest.approx((zc - Z0) / (zc + Z0), rel=1e-12)
    # S21 itself (or its underflow to 0): |S21| = exp(-alpha l) up to the mismatch
    # factor; the log-domain loss is exact even where |S21| underflows
    from losslane.network import transmission_db

    db = transmission_db(chain, Z0)[:, 0, 0]
    assert np.all(np.isfinite(db))
    np.testing.assert_allclose(-db[-1], alpha_l[-1] * 20 / np.log(10), rtol=1e-3)


def test_modal_reduces_to_closed_form():
    # the modal decomposition with n = 1 must equal the closed form a single line takes
    # (the production path, UniformLine), to 1e-12
    f = np.linspace(0, 60e9, 301)
    rl = stripline().rlgc(f)
    line = UniformLine.from_rlgc(rl)
    for length in (1e-4, 0.05, 1.0, 30.0):
        one = line.scaled_abcd(length)
        modal = ScaledABCD.reciprocal(*modal_scaled_abcd(rl.z(), rl.y(), length))
        # the same T = exp(log_scale) matrix, whatever power of two each normalised to
        np.testing.assert_allclose(modal.log_scale, one.log_scale, rtol=1e-12, atol=1.0)
        m1 = one.matrix
        mm = modal.matrix * np.exp(modal.log_scale - one.log_scale)[:, None, None]
        err = np.max(np.abs(mm - m1), axis=(1, 2)) / np.max(np.abs(m1), axis=(1, 2))
        assert np.max(err) < 1e-12


def pair_matrices(f):
    """A hand-made symmetric coupled pair: self and mutual terms from even/odd values."""
    n = f.size
    even = dict(r=9.0, l=420e-9, c=95e-12, tan=0.008)
    odd = dict(r=11.0, l=290e-9, c=150e-12, tan=0.012)

    def mat(e, o):
        out = np.empty((n, 2, 2))
        out[:, 0, 0] = out[:, 1, 1] = (e + o) / 2
        out[:, 0, 1] = out[:, 1, 0] = (e - o) / 2
        return out

    w = 2 * np.pi * f
    parts = {}
    for k in ("r", "l", "c"):
        parts[k] = mat(np.full(n, even[k]), np.full(n, odd[k]))
    parts["g"] = mat(w * even["c"] * even["tan"], w * odd["c"] * odd["tan"])
    rl = RLGC(f, parts["r"], parts["l"], parts["g"], parts["c"])
    singles = {
        m: hand_rlgc(f, r=v["r"], l=v["l"], g_tan=v["tan"], c=v["c"])
        for m, v in (("even", even), ("odd", odd))
    }
    return rl, singles


def test_symmetric_pair_decouples_into_even_and_odd():
    # symmetric pair theory: with equal port references the even/odd combinations of the
    # 4-port blocks [[p, q], [q, p]] are the single-line S of the even (Z11 + Z12) and odd
    # (Z11 - Z12) modes (C. R. Paul, Analysis of Multiconductor Transmission Lines)
    f = np.linspace(0, 40e9, 201)
    rl, singles = pair_matrices(f)
    length = 0.12
    net = block_network(LineSegment(rl, length), f, Z0)
    assert net.is_reciprocal()
    assert net.is_passive()
    s = net.s
    se = block_network(LineSegment(singles["even"], length), f, Z0).s
    so = block_network(LineSegment(singles["odd"], length), f, Z0).s
    for (i, j), (a, b) in {(0, 0): (0, 0), (1, 0): (2, 0), (0, 1): (0, 2), (1, 1): (2, 2)}.items():
        p = s[:, a, b]
        q = s[:, a + 1, b]
        np.testing.assert_allclose(p + q, se[:, i, j], rtol=1e-11, atol=1e-13)
        np.testing.assert_allclose(p - q, so[:, i, j], rtol=1e-11, atol=1e-13)


def test_pair_dc_is_exact():
    # DC limit of the telegrapher solution: A = D = I, B = R l, C = 0 (exact)
    f = np.array([0.0, 1e9])
    rl, _ = pair_matrices(f)
    t = LineSegment(rl, 0.3).abcd(f)[0]
    expect = np.eye(4, dtype=complex)
    expect[:2, 2:] = rl.r[0] * 0.3
    np.testing.assert_array_equal(t, expect)


def asymmetric_three_line(f):
    """Three unequal coupled lines (as a field solver could return), made up."""
    n = f.size
    w = 2 * np.pi * f
    l = np.array([[400, 90, 30], [90, 360, 70], [30, 70, 380]]) * 1e-9
    c = np.array([[120, -25, -6], [-25, 140, -18], [-6, -18, 110]]) * 1e-12
    r0 = np.array([[7, 1.5, 0.4], [1.5, 9, 1.1], [0.4, 1.1, 8]])
    rs = np.sqrt(np.maximum(f, 1.0) / 1e9)[:, None, None]  # skin-effect-like growth
    r = r0[None] * (1 + rs)
    g = w[:, None, None] * c[None] * 0.01
    return RLGC(f, r, np.broadcast_to(l, (n, 3, 3)).copy(), g, np.broadcast_to(c, (n, 3, 3)).copy())


def test_modal_matches_matrix_exponential():
    # the exact solution of the telegrapher's equations is T = expm(H l),
    # H = [[0, Z], [Y, 0]]; scipy's Pade matrix exponential is an independent check
    f = np.linspace(0, 20e9, 41)
    rl = asymmetric_three_line(f)
    length = 0.05
    t = LineSegment(rl, length).abcd(f)
    h = np.zeros((f.size, 6, 6), dtype=complex)
    h[:, :3, 3:] = rl.z() * length
    h[:, 3:, :3] = rl.y() * length
    ref = scipy.linalg.expm(h)
    err = np.max(np.abs(t - ref), axis=(1, 2)) / np.max(np.abs(ref), axis=(1, 2))
    assert np.max(err) < 1e-11
    net = block_network(LineSegment(rl, length), f, Z0)
    assert net.is_reciprocal()
    assert net.is_passive()


def test_modal_fallback_equals_eigen_path():
    # forcing the matrix-exponential fallback everywhere must give the eigen result
    f = np.linspace(0, 20e9, 21)
    rl = asymmetric_three_line(f)
    m1, s1 = modal_scaled_abcd(rl.z(), rl.y(), 0.2)
    m2, s2 = modal_scaled_abcd(rl.z(), rl.y(), 0.2, cond_limit=0.0)
    np.testing.assert_array_equal(s1, s2)
    assert np.max(np.abs(m1 - m2)) < 1e-11


def test_rlgc_on_another_grid_is_an_error():
    from losslane.errors import LossLaneError

    rl = hand_rlgc(np.linspace(0, 1e9, 11))
    with pytest.raises(LossLaneError, match="sweep"):
        LineSegment(rl, 0.1, "host").abcd(np.linspace(0, 2e9, 11))
    with pytest.raises(LossLaneError, match="length"):
        LineSegment(rl, -1.0)

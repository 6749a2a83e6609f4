"""Dielectric models against the Kramers-Kronig relations and scikit-rf's independent
implementation of the wideband (Djordjevic-Sarkar) Debye model."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import quad

from losslane.errors import LossLaneError, LossLaneWarning
from losslane.materials.dielectric import ConstantDielectric, WidebandDebye, make_dielectric

CASES = [(3.7, 0.009, 10e9), (4.2, 0.02, 1e9), (3.0, 0.0013, 10e9), (2.2, 0.0009, 10e9)]


@pytest.mark.parametrize(("dk", "df", "at"), CASES)
def test_fit_reproduces_dk_and_df_at_the_fit_frequency(dk: float, df: float, at: float) -> None:
    # Djordjevic et al., IEEE T-EMC 43(4) 2001: the model is fitted to one (Dk, Df) pair
    d = WidebandDebye(dk, df, at)
    got_dk, got_df = d.dk_df(np.array([at]))
    assert got_dk[0] == pytest.approx(dk, rel=1e-12)
    assert got_df[0] == pytest.approx(df, rel=1e-12, abs=1e-15)


@pytest.mark.parametrize(("dk", "df", "at"), CASES)
def test_static_permittivity_is_finite_and_real(dk: float, df: float, at: float) -> None:
    # a sum of Debye relaxations has a finite, real static permittivity (Djordjevic 2001)
    d = WidebandDebye(dk, df, at)
    e0 = d.eps(np.array([0.0]))[0]
    assert np.isfinite(e0.real) and e0.imag == 0.0
    assert e0.real == pytest.approx(d.eps_static, rel=1e-12)
    # and falls monotonically with frequency (every Debye term does)
    f = np.concatenate([[0.0], np.geomspace(1e3, 1e12, 50)])
    assert np.all(np.diff(d.eps(f).real) < 0)
    assert d.eps_inf < dk < d.eps_static


def _kramers_kronig_real(d: WidebandDebye, f: float) -> float:
    """eps'(w) - eps_inf = (2/pi) P int_0^inf w' eps''(w') / (w'^2 - w^2) dw'.

    The Kramers-Kronig relation (e.g. J. D. Jackson, Classical Electrodynamics, 3rd ed.,
    sec. 7.10), written in frequency (the transform is scale-free). The pole at f' = f is
    taken by QUADPACK's Cauchy principal-value rule (weight='cauchy') on [f/2, 2f]; the
    rest is integrated in ln f' from 1 mHz (where eps'' ~ f' makes the remainder ~1e-10 of
    the result) to 1e20 Hz (eps'' ~ 1/f' above f_high, remainder ~1e-8 relative).
    """

    def eps2(x: float) -> float:
        return float(-d.eps(np.array([x]))[0].imag)

    a, b = f / 2, 2 * f
    middle, _ = quad(
        lambda x: x * eps2(x) / (x + f), a, b, weight="cauchy", wvar=f, epsabs=0, epsrel=1e-11
    )

    def in_log(u: float) -> float:
        x = np.exp(u)
        return x * x * eps2(x) / (x * x - f * f)

    low, _ = quad(in_log, np.log(1e-3), np.log(a), epsabs=0, epsrel=1e-11, limit=400)
    high, _ = quad(in_log, np.log(b), np.log(1e20), epsabs=0, epsrel=1e-11, limit=400)
    return 2 / np.pi * (low + middle + high)


@pytest.mark.filterwarnings("ignore::losslane.errors.LossLaneWarning")  # quad probes > f_high
@pytest.mark.parametrize("f", [1e6, 1e8, 1e9, 1e10, 1e11])
def test_real_part_follows_from_imaginary_part_by_kramers_kronig(f: float) -> None:
    # causality (Kramers-Kronig; Djordjevic et al. 2001 state their model satisfies it):
    # the real part is recovered from the imaginary part to 1e-7 of eps' - eps_inf
    d = WidebandDebye(3.7, 0.009, 10e9)
    expected = d.eps(np.array([f]))[0].real - d.eps_inf
    assert _kramers_kronig_real(d, f) == pytest.approx(expected, rel=1e-7)


def test_constant_model_is_flagged_non_causal() -> None:
    # a frequency-independent Df has no Kramers-Kronig partner of finite, constant Dk (the
    # transform of a constant eps'' diverges logarithmically; Djordjevic 2001, intro), so the
    # model must say it is not causal and must hold its values at every frequency
    d = ConstantDielectric(3.7, 0.009)
    assert d.causal is False and WidebandDebye(3.7, 0.009, 1e9).causal is True
    e = d.eps(np.array([0.0, 1e9, 1e12]))
    np.testing.assert_array_equal(e, np.full(3, 3.7 * (1 - 0.009j)))


@pytest.mark.parametrize(("dk", "df", "at"), CASES)
def test_matches_scikit_rf_djordjevic_svensson(dk: float, df: float, at: float) -> None:
    # scikit-rf's MLine carries its own implementation of the same model (diel=
    # 'djordjevicsvensson', Djordjevic 2001 / Svensson-Dermer 2001) with the same corner
    # frequencies 1 kHz and 1 THz: the complex permittivities agree to rounding
    import skrf as rf
    from skrf.media import MLine

    f = np.geomspace(1e3, 1e12, 37)
    freq = rf.Frequency.from_f(f, unit="Hz")
    ml = MLine(
        freq,
        w=1e-3,
        h=1e-3,
        ep_r=dk,
        tand=df,
        diel="djordjevicsvensson",
        f_low=1e3,
        f_high=1e12,
        f_epr_tand=at,
    )
    ours = WidebandDebye(dk, df, at, f_low=1e3, f_high=1e12).eps(f)
    np.testing.assert_allclose(ours.real, ml.ep_r_f.real, rtol=1e-12)
    np.testing.assert_allclose(ours.imag, ml.ep_r_f.imag, rtol=1e-10, atol=1e-15)


def test_dk_falls_linearly_with_log_frequency_between_the_corners() -> None:
    # the defining property of the wideband Debye model (Djordjevic 2001): between the
    # corners eps' drops by the same amount per decade, delta_eps / (m2 - m1)
    d = WidebandDebye(4.0, 0.015, 1e9)
    f = np.array([1e6, 1e7, 1e8, 1e9])
    steps = -np.diff(d.eps(f).real)
    np.testing.assert_allclose(steps, d.delta_eps / 9.0, rtol=1e-3)


@pytest.mark.parametrize(
    ("kwargs", "fragment"),
    [
        ({"dk": 0.5, "df": 0.01, "at": 1e9}, "dk = 0.5"),
        ({"dk": float("nan"), "df": 0.01, "at": 1e9}, "dk"),
        ({"dk": 3.7, "df": -0.01, "at": 1e9}, "df = -0.01"),
        ({"dk": 3.7, "df": 1.0, "at": 1e9}, "df = 1.0"),
        ({"dk": 3.7, "df": 0.01, "at": 1e13}, "between the model's corners"),
        ({"dk": 3.7, "df": 0.01, "at": 1e9, "f_low": 1e9, "f_high": 1e6}, "f_low"),
        ({"dk": 1.05, "df": 0.2, "at": 1e9}, "below 1"),
    ],
)
def test_impossible_dielectrics_are_errors(kwargs: dict, fragment: str) -> None:
    with pytest.raises(LossLaneError, match=fragment):
        WidebandDebye(**kwargs)


def test_constant_dielectric_checks_and_factory() -> None:
    with pytest.raises(LossLaneError, match="dk"):
        ConstantDielectric(0.9)
    with pytest.raises(LossLaneError, match="df"):
        ConstantDielectric(3.0, 1.5)
    with pytest.raises(LossLaneError, match="at"):
        make_dielectric(3.7, 0.01, None, "wideband-debye")
    with pytest.raises(LossLaneError, match="unknown"):
        make_dielectric(3.7, 0.01, 1e9, "lorentz")
    assert make_dielectric(3.7, 0.01, None, "constant").eps(np.array([5e9]))[0] == pytest.approx(
        3.7 * (1 - 0.01j)
    )


def test_frequency_outside_the_corners_warns() -> None:
    d = WidebandDebye(3.7, 0.009, 10e9)
    with pytest.warns(LossLaneWarning, match="frequency"):
        d.eps(np.array([1e9, 5e12]))

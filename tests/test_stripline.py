"""Stripline against Cohn's exact zero-thickness solution, Wheeler's 1978 thickness
formula, the parallel-plate combination for offset strips, and the TEM rules of thumb."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from reported import properties
from scipy.constants import c as C_LIGHT
from scipy.constants import mu_0
from scipy.special import ellipkm1

from losslane.errors import LossLaneError, LossLaneWarning
from losslane.materials.dielectric import ConstantDielectric, WidebandDebye
from losslane.xsection.stripline import Stripline

MIL = 25.4e-6
ETA0 = mu_0 * C_LIGHT  # free-space wave impedance, 376.73 ohm (CODATA via scipy)
F = np.array([1e8, 1e9, 1e10])
#: the model with its field-solver correction off: the published formulas checked here
#: (the correction is checked against the field solver in tests/test_accuracy_static.py)
PUBLISHED = Stripline.published()


def cohn_z0(w: float, b: float, er: float) -> float:
    """S. B. Cohn, IRE Trans. MTT 2, 1954 (exact, conformal mapping):
    Z0 = (eta0 / (4 sqrt(er))) K(k)/K(k'), k = sech(pi w / 2b), k' = tanh(pi w / 2b).

    Cohn writes eta0/4 as 30 pi (eta0 ~ 120 pi); the exact constant is used here, the two
    differ by 0.07 %. K is evaluated with scipy's ellipkm1 (K(1 - p)) from p = 1 - m so
    neither modulus loses digits as it approaches 1.
    """
    x = np.pi * w / (2 * b)
    k_k = ellipkm1(np.tanh(x) ** 2)  # K(m = sech^2 x), since 1 - sech^2 = tanh^2
    k_kp = ellipkm1(1 / np.cosh(x) ** 2)  # K(m = tanh^2 x)
    return float(ETA0 / (4 * np.sqrt(er)) * k_k / k_kp)


def wheeler_z0(w: float, b: float, t: float, er: float) -> float:
    """H. A. Wheeler, "Transmission-line properties of a strip line between parallel
    planes", IEEE Trans. MTT 26(11), 1978 (as reproduced in Wadell, Transmission Line
    Design Handbook, 1991, sec. 3.5):

    Z0 = (eta0 / (4 pi sqrt(er))) ln{1 + (4/(pi W')) [(8/(pi W')) + sqrt((8/(pi W'))^2 + 6.27)]}
    W' = w/(b - t) + dW/(b - t),
    dW/(b - t) = x/(pi (1 - x)) {1 - 0.5 ln[(x/(2 - x))^2 + (0.0796 x/(w/b + 1.1 x))^m]},
    m = 2 / (1 + (2/3) x/(1 - x)), x = t/b.

    Wheeler writes the constant as 30 (eta0 ~ 120 pi); the exact eta0/(4 pi) is used here.
    Quoted accuracy 0.5 % (from memory) for w'/(b - t) < 10.
    """
    x = t / b
    wp = w / (b - t)
    if x > 0:
        m = 2 / (1 + 2 / 3 * x / (1 - x))
        wp += (
            x
            / (np.pi * (1 - x))
            * (1 - 0.5 * np.log((x / (2 - x)) ** 2 + (0.0796 * x / (w / b + 1.1 * x)) ** m))
        )
    a = 8 / (np.pi * wp)
    log = np.log(1 + 4 / (np.pi * wp) * (a + np.sqrt(a * a + 6.27)))
    return float(ETA0 / (4 * np.pi * np.sqrt(er)) * log)


def z0_of(line: Stripline, f: np.ndarray = F) -> np.ndarray:
    # the mode's field impedance (no internal inductance); with thickness 0 it is also
    # the reported sqrt(L/C)
    return line.modes(f)["single"].z0


@pytest.mark.parametrize("wb", [0.05, 0.1, 0.2, 0.35, 0.5, 1.0, 2.0, 5.0])
@pytest.mark.parametrize("er", [1.0, 3.7])
def test_zero_thickness_centred_stripline_is_cohns_exact_value(wb: float, er: float) -> None:
    b = 0.5e-3
    line = PUBLISHED(wb * b, b / 2, b / 2, 0.0, ConstantDielectric(er))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)  # "thickness 0: no conductor loss"
        z = z0_of(line)
        zr = np.sqrt(line.rlgc(F).scalar()[1] / line.rlgc(F).scalar()[3])
    np.testing.assert_allclose(z, cohn_z0(wb * b, b, er), rtol=1e-9)
    np.testing.assert_allclose(zr, cohn_z0(wb * b, b, er), rtol=1e-9)


def test_wheelers_formula_as_written_agrees_with_cohn_at_zero_thickness() -> None:
    # a check of the test's own Wheeler formula: at t = 0 it must sit within its quoted
    # 0.5 % of the exact value over its range
    b = 1.0
    for wb in (0.05, 0.1, 0.3, 0.5, 1.0, 2.0, 5.0):
        assert wheeler_z0(wb * b, b, 0.0, 1.0) == pytest.approx(cohn_z0(wb * b, b, 1.0), rel=5e-3)


@pytest.mark.parametrize("wb", [0.1, 0.35, 0.5, 1.0, 2.0])
@pytest.mark.parametrize("tb", [0.02, 0.05, 0.1, 0.2, 0.25])
def test_thickness_follows_wheeler(wb: float, tb: float) -> None:
    # losslane scales Cohn's exact value by Wheeler's ratio Z_W(t)/Z_W(0):
    # (1) the ratio itself is Wheeler's, to rounding; (2) the absolute value stays within
    # Wheeler's quoted 0.5 % of Wheeler's own formula
    b = 0.5e-3
    w, t = wb * b, tb * b
    er = 3.7
    line = PUBLISHED(w, (b - t) / 2, (b - t) / 2, t, ConstantDielectric(er))
    flat = PUBLISHED(w, b / 2, b / 2, 0.0, ConstantDielectric(er))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        z_t, z_0 = z0_of(line)[0], z0_of(flat)[0]
    ratio_w = wheeler_z0(w, b, t, er) / wheeler_z0(w, b, 0.0, er)
    assert z_t / z_0 == pytest.approx(ratio_w, rel=1e-9)
    assert z_t == pytest.approx(wheeler_z0(w, b, t, er), rel=5e-3)
    assert z_t < z_0  # a thick strip has more capacitance


@pytest.mark.parametrize(("below", "above"), [(3.0, 5.0), (4.0, 9.0), (5.0, 12.0), (6.0, 6.5)])
def test_offset_stripline_is_the_parallel_combination(below: float, above: float) -> None:
    # offset strip = two centred striplines of spacings 2 h1 and 2 h2 in parallel:
    # Z = 2 Z1 Z2 / (Z1 + Z2) (common practice; Wadell 1991 sec. 3.6). Exact zero-thickness
    # halves from Cohn's formula above.
    w = 5 * MIL
    er = 3.3
    h1, h2 = below * MIL, above * MIL
    z1, z2 = cohn_z0(w, 2 * h1, er), cohn_z0(w, 2 * h2, er)
    line = PUBLISHED(w, h1, h2, 0.0, ConstantDielectric(er))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        z = z0_of(line)
    np.testing.assert_allclose(z, 2 * z1 * z2 / (z1 + z2), rtol=1e-9)


def test_offset_stripline_with_thickness_combines_centred_lines() -> None:
    # the same rule with a thick strip: halves of spacing 2 h + t (Wadell 1991 sec. 3.6),
    # each a centred line with thickness
    w, t, h1, h2 = 5 * MIL, 0.6 * MIL, 4 * MIL, 9 * MIL
    d = ConstantDielectric(3.3)
    z1 = z0_of(PUBLISHED(w, h1, h1, t, d))[0]
    z2 = z0_of(PUBLISHED(w, h2, h2, t, d))[0]
    z = z0_of(PUBLISHED(w, h1, h2, t, d))[0]
    assert z == pytest.approx(2 * z1 * z2 / (z1 + z2), rel=1e-12)
    # an offset strip sits between the two centred lines it is made of
    assert z1 < z < z2


@pytest.mark.parametrize("dk", [1.0, 2.2, 3.0, 3.7, 4.5])
def test_tem_delay_is_84_7_ps_per_inch_times_root_dk(dk: float) -> None:
    # TEM delay = sqrt(Dk)/c: 0.0254 m / c = 84.7253 ps per inch (exact from c), here
    # written 84.7 sqrt(Dk) as in the trade. Thickness 0: no internal inductance.
    line = Stripline(5 * MIL, 5 * MIL, 5 * MIL, 0.0, ConstantDielectric(dk))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        delay = np.array(properties(line, F)["delay_ps_per_in"])
    exact = 0.0254 / C_LIGHT * 1e12 * np.sqrt(dk)
    np.testing.assert_allclose(delay, exact, rtol=1e-12)
    np.testing.assert_allclose(delay, 84.7 * np.sqrt(dk), rtol=5e-4)  # rule's rounding


def test_delay_of_a_thick_lossy_stripline_at_high_frequency() -> None:
    # with copper and a wideband Debye laminate, far above the skin-effect corner the delay
    # is still sqrt(Dk(f))/c within the internal-inductance share (< 0.5 % at 30 GHz)
    d = WidebandDebye(3.7, 0.009, 10e9)
    line = Stripline(5 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, d)
    f = np.array([10e9, 30e9])
    delay = np.array(properties(line, f)["delay_ps_per_in"])
    dk = d.eps(f).real
    exact = 0.0254 / C_LIGHT * 1e12 * np.sqrt(dk)
    assert np.all(delay >= exact) and np.all(delay <= exact * 1.005)


@pytest.mark.parametrize(("dk", "df"), [(3.0, 0.0013), (3.7, 0.009), (4.2, 0.02)])
def test_dielectric_loss_rule_of_thumb(dk: float, df: float) -> None:
    # TEM dielectric attenuation alpha = pi f sqrt(Dk) Df / c in Np/m for small Df (e.g.
    # Pozar eq. 2.80 with beta = 2 pi f sqrt(Dk)/c); in dB that is 8.686 pi = 27.29 dB per
    # wavelength per unit of Df sqrt(Dk). Per inch and per GHz: 27.29 * 0.0254 m / 0.29979 m
    # (the free-space wavelength at 1 GHz) = 2.312 dB/in per (GHz * Df * sqrt(Dk)), which
    # the trade rounds to 2.3 (common practice).
    const = 20 / np.log(10) * np.pi * 0.0254 / C_LIGHT * 1e9
    assert const == pytest.approx(2.3119, abs=1e-4)
    line = Stripline(5 * MIL, 5 * MIL, 5 * MIL, 0.0, ConstantDielectric(dk, df))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        p = properties(line, F)
    loss = np.array(p["dielectric_db_per_in"])
    ghz = F / 1e9
    # exact value differs from the small-Df formula by a relative (Df^2)/8 or so
    np.testing.assert_allclose(loss, const * ghz * df * np.sqrt(dk), rtol=df**2)
    # the 2.3 rule is 0.5 % low; 1 % covers its rounding
    np.testing.assert_allclose(loss, 2.3 * ghz * df * np.sqrt(dk), rtol=1e-2)
    assert p["conductor_db_per_in"] == pytest.approx([0.0, 0.0, 0.0], abs=1e-15)


def test_validity_warnings_name_the_parameter() -> None:
    # Wheeler 1978 range t/b <= 0.25 (from memory), and the field-solver correction's box:
    # w/b >= 0.02, the nearer plane at least 5 % of below + above away
    d = ConstantDielectric(3.7)
    with pytest.warns(LossLaneWarning, match="thickness/spacing"):
        Stripline(5 * MIL, 1 * MIL, 1 * MIL, 1.4 * MIL, d).modes(F)
    with pytest.warns(LossLaneWarning, match="width/spacing"):
        Stripline(0.2 * MIL, 5 * MIL, 9 * MIL, 0.3 * MIL, d).modes(F)
    with pytest.warns(LossLaneWarning, match="nearer plane"):
        Stripline(5 * MIL, 0.3 * MIL, 9 * MIL, 0.3 * MIL, d).modes(F)
    with pytest.warns(LossLaneWarning, match="thickness = 0"):
        Stripline(5 * MIL, 5 * MIL, 5 * MIL, 0.0, d).modes(F)
    with warnings.catch_warnings():
        warnings.simplefilter("error", LossLaneWarning)  # an ordinary line is quiet
        Stripline(5 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, d).modes(F)


@pytest.mark.parametrize(
    ("args", "key"),
    [
        ((0.0, 5 * MIL, 5 * MIL, 0.6 * MIL), "width"),
        ((-5 * MIL, 5 * MIL, 5 * MIL, 0.6 * MIL), "width"),
        ((5 * MIL, 0.0, 5 * MIL, 0.6 * MIL), "below"),
        ((5 * MIL, 5 * MIL, -1 * MIL, 0.6 * MIL), "above"),
        ((5 * MIL, 5 * MIL, 5 * MIL, -0.1 * MIL), "thickness"),
        ((float("nan"), 5 * MIL, 5 * MIL, 0.6 * MIL), "width"),
    ],
)
def test_impossible_geometry_is_an_error(args: tuple, key: str) -> None:
    with pytest.raises(LossLaneError, match=key):
        Stripline(*args, ConstantDielectric(3.7))

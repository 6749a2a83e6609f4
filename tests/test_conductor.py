"""Conductors and the resistance/inductance of whole lines against handbook values, exact
DC hand calculations, the exact slab impedance and the parallel-plate limit."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from reported import properties

from losslane.errors import LossLaneError, LossLaneWarning
from losslane.materials.conductor import (
    COPPER,
    MU0,
    Conductor,
    internal_impedance,
    return_impedance,
    sheet_return,
)
from losslane.materials.dielectric import ConstantDielectric, WidebandDebye
from losslane.materials.library import load_library
from losslane.materials.roughness import FinishLayer, Graded, Groiss, Hammerstad, Huray, Smooth
from losslane.xsection.base import Metal
from losslane.xsection.coplanar import Cpw, Gcpw
from losslane.xsection.microstrip import Microstrip
from losslane.xsection.rlgc import C0
from losslane.xsection.stripline import Stripline

MIL = 25.4e-6
SIGMA = 5.8e7
FR = WidebandDebye(3.7, 0.009, 10e9)


def test_copper_skin_depth_at_1ghz() -> None:
    # handbook value: copper (5.8e7 S/m) skin depth 2.09 um at 1 GHz, quoted to 3 digits
    assert COPPER.sigma == 5.8e7  # annealed copper, 100 % IACS (handbook)
    assert COPPER.skin_depth(1e9) == pytest.approx(2.09e-6, abs=0.005e-6)
    # and it scales as 1/sqrt(f): 0.66 um at 10 GHz
    assert COPPER.skin_depth(10e9) == pytest.approx(0.661e-6, abs=0.005e-6)


def test_skin_depth_and_surface_resistance_match_scikit_rf() -> None:
    from skrf.tlineFunctions import skin_depth, surface_resistivity

    f = np.geomspace(1e3, 1e12, 19)
    np.testing.assert_allclose(COPPER.skin_depth(f), skin_depth(f, 1 / SIGMA, 1.0), rtol=1e-9)
    np.testing.assert_allclose(
        COPPER.surface_resistance(f), surface_resistivity(f, 1 / SIGMA, 1.0), rtol=1e-9
    )
    assert np.isinf(COPPER.skin_depth(np.array([0.0]))[0])


def test_internal_impedance_is_the_exact_slab_formula() -> None:
    # internal impedance of a conducting slab with current on its faces:
    # Z = (k/sigma) G coth(k tau), k = (1 + j)/delta (e.g. Ramo, Whinnery, Van Duzer, Fields
    # and Waves in Communication Electronics, 1994, sec. 4.12), written here independently
    g, tau = 1.0 / 150e-6, 17e-6
    f = np.geomspace(1e3, 1e12, 28)
    r, li = internal_impedance(f, COPPER, g, tau)
    k = (1 + 1j) / COPPER.skin_depth(f)
    z = k / SIGMA * g / np.tanh(k * tau)
    np.testing.assert_allclose(r, z.real, rtol=1e-9)
    np.testing.assert_allclose(li, z.imag / (2 * np.pi * f), rtol=1e-9)


def test_internal_impedance_limits() -> None:
    g, tau = 1.0 / 150e-6, 17e-6
    r, li = internal_impedance(np.array([0.0, 1e12]), COPPER, g, tau)
    # DC: the slab's resistance G/(sigma tau), internal inductance mu G tau / 3 (the
    # small-argument expansion of coth)
    assert r[0] == pytest.approx(g / (SIGMA * tau), rel=1e-12)
    assert li[0] == pytest.approx(MU0 * g * tau / 3, rel=1e-12)
    # high frequency: Wheeler's skin-effect result Z -> (1 + j) Rs G (Proc. IRE 30, 1942)
    rs = COPPER.surface_resistance(1e12)
    assert r[1] == pytest.approx(rs * g, rel=1e-6)
    assert li[1] * 2 * np.pi * 1e12 == pytest.approx(rs * g, rel=1e-6)
    # roughness scales only what lies above the DC resistance (losslane's documented rule,
    # which keeps DC exact whatever the foil): R - R_dc -> K (R - R_dc)
    r2, _ = internal_impedance(np.array([0.0, 1e12]), COPPER, g, tau, np.array([1.7, 1.7]))
    assert r2[0] == r[0]
    assert r2[1] - r2[0] == pytest.approx(1.7 * (r[1] - r[0]), rel=1e-12)
    with pytest.raises(LossLaneError):
        internal_impedance(np.array([1.0]), COPPER, g, 0.0)


# --- DC resistance of whole lines -------------------------------------------------------


def huge_planes() -> Metal:
    return Metal(plane_thickness=1e3)  # return planes 1 km thick: no DC resistance left


@pytest.mark.parametrize(
    "build",
    [
        lambda m: Microstrip(6 * MIL, 3.5 * MIL, 1.4 * MIL, FR, m),
        lambda m: Stripline(5 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, FR, m),
        lambda m: Stripline(5 * MIL, 4 * MIL, 9 * MIL, 0.6 * MIL, FR, m),
    ],
    ids=["microstrip", "stripline", "offset-stripline"],
)
def test_dc_resistance_is_the_strip_alone_when_the_planes_are_thick(build) -> None:
    # hand calculation: a rectangular strip has R = 1/(sigma w t) per metre
    line = build(huge_planes())
    w, t = line.width, line.thickness
    r0 = line.rlgc(np.array([0.0])).r[0, 0, 0]
    assert r0 == pytest.approx(1 / (SIGMA * w * t), rel=1e-7)
    # and the same with a rough foil: roughness must not touch the DC value
    rough = build(Metal(foil=Huray.from_surface_ratio(1e-6, 2.4), plane_thickness=1e3))
    assert rough.rlgc(np.array([0.0])).r[0, 0, 0] == pytest.approx(r0, rel=1e-12)


def test_coplanar_dc_resistance_is_the_strip_alone() -> None:
    # hand calculation 1/(sigma w t): the coplanar grounds and the lower plane are wide
    # conductors whose DC resistance per unit length is negligible (losslane's stated
    # convention, materials.conductor.internal_impedance with wide=True)
    for grounded in (False, True):
        cp = (Gcpw if grounded else Cpw)(10 * MIL, 5 * MIL, 10 * MIL, 1.4 * MIL, FR, Metal())
        r0 = cp.rlgc(np.array([0.0])).r[0, 0, 0]
        strip = 1 / (SIGMA * cp.width * cp.thickness)
        assert r0 == pytest.approx(strip, rel=1e-12)


@pytest.mark.filterwarnings("ignore:microstrip:losslane.errors.LossLaneWarning")  # w/h > 100
@pytest.mark.parametrize("u", [1.0, 100.0, 300.0])
@pytest.mark.parametrize("tp", [17e-6, 35e-6, 70e-6])
def test_microstrip_dc_resistance_is_the_strip_for_any_plane(u: float, tp: float) -> None:
    # hand calculation 1/(sigma w t) whatever the plane's thickness: a plane wider than the
    # trace spreads its DC current over its whole width (a 1 oz plane 25 mm wide has
    # 0.02 ohm/m against the strip's ohms per metre), taken as 0
    h, t = 0.1e-3, 35e-6
    w = u * h
    line = Microstrip(w, h, t, FR, Metal(plane_thickness=tp))
    r0 = line.rlgc(np.array([0.0])).r[0, 0, 0]
    assert r0 == pytest.approx(1 / (SIGMA * w * t), rel=1e-12)


def filament_over_slab(f: float, h: float, t: float) -> complex:
    """Exact internal impedance per metre of the return slab under a line current: a
    filament at height h over a conducting slab of thickness t (air below it), by the
    spectral (Fourier) solution of the 2-D vector-potential problem, integrated here
    numerically. Per transverse wavenumber kappa the slab reflects the filament's field
    with 1 + Gamma = 2 kappa / (kappa + Y), Y = g (g tanh(g t) + kappa)/(g + kappa tanh(g t))
    its input admittance, g = sqrt(kappa^2 + j w mu0 sigma) (transmission-line form of the
    slab; e.g. J. R. Wait, *Electromagnetic Waves in Stratified Media*, for the layered
    half-space), and Z = (j w mu0 / pi) int exp(-2 kappa h) / (kappa + Y) dkappa."""
    from scipy.integrate import quad

    w = 2 * np.pi * f
    k2 = 1j * w * MU0 * SIGMA

    def integrand(kap: float) -> complex:
        g = np.sqrt(kap * kap + k2)
        th = np.tanh(g * t)
        y = g * (g * th + kap) / (g + kap * th)
        return np.exp(-2 * kap * h) / (kap + y)

    re = quad(lambda k: integrand(k).real, 0, np.inf, limit=400, epsrel=1e-10)[0]
    im = quad(lambda k: integrand(k).imag, 0, np.inf, limit=400, epsrel=1e-10)[0]
    return 1j * w * MU0 / np.pi * (re + 1j * im)


@pytest.mark.parametrize("t", [17.4e-6, 34.8e-6])
def test_return_plane_against_the_exact_slab_solution(t: float) -> None:
    # the closed form (k of the slab taken as (1 + j)/delta) against the exact spectral
    # solution, 1 kHz .. 10 GHz, for a plane with G = 1/(2 pi h), h = 3.5 mil
    h = 3.5 * MIL
    g = 1.0 / (2 * np.pi * h)
    f = np.array([1e3, 1e4, 1e5, 1e6, 3e6, 1e7, 1e8, 1e9, 1e10])
    r, l_int = sheet_return(f, COPPER, g, t, floor=0.0)
    z = np.array([filament_over_slab(fi, h, t) for fi in f])
    # measured: R within 4.3 %, X within 3.8 % (largest where delta ~ t), 1e-4 above 1 GHz
    np.testing.assert_allclose(r, z.real, rtol=0.05)
    np.testing.assert_allclose(2 * np.pi * f * l_int, z.imag, rtol=0.045)
    np.testing.assert_allclose(r[-2:], z.real[-2:], rtol=1e-3)


def test_return_plane_limits() -> None:
    # each limit computed by hand: R(0) = 0; at high frequency Wheeler's (1 + j) Rs G
    # (Proc. IRE 30, 1942); while delta > t but the current is held under the line, the
    # thin sheet G/(sigma t); where the current spreads across the plane, w mu0 / 4 (the
    # 2-D low-frequency limit of a line over a resistive sheet, from the exact solution
    # above as kappa -> 0); and the parts of a return share it in proportion to G
    g, t = 1400.0, 35e-6
    f = np.array([0.0, 1e12])
    r, l_int = sheet_return(f, COPPER, g, t)
    assert r[0] == 0.0 and np.isfinite(l_int[0]) and l_int[0] > 0
    rs = np.sqrt(np.pi * 1e12 * MU0 / SIGMA)
    assert r[1] == pytest.approx(rs * g, rel=1e-3)
    assert l_int[1] * 2 * np.pi * 1e12 == pytest.approx(rs * g, rel=1e-3)
    # thin sheet: a 0.2 um plane at 1 GHz (delta = 2.1 um), 1 mm under the line
    # (|c1| = 92, so the current is held under it): G/(sigma t) within 1/|c1|
    g_far = 1.0 / (2 * np.pi * 1e-3)
    r, _ = sheet_return(np.array([1e9]), COPPER, g_far, 0.2e-6)
    assert r[0] == pytest.approx(g_far / (SIGMA * 0.2e-6), rel=0.015)
    r, _ = sheet_return(np.array([10.0]), COPPER, g, t, floor=0.0)
    assert r[0] == pytest.approx(2 * np.pi * 10.0 * MU0 / 4, rel=0.02)
    # monotone: R rises with frequency, L_int falls
    ff = np.geomspace(1.0, 1e12, 400)
    r, l_int = sheet_return(ff, COPPER, g, t)
    assert np.all(np.diff(r) > 0) and np.all(np.diff(l_int) < 0)
    # two planes of one return: each part gets K_i (G_i / G) Z_sheet(G, t_i)
    parts = return_impedance(ff, COPPER, [(600.0, t, 1.0), (800.0, t, 1.0)])
    whole, _ = sheet_return(ff, COPPER, 1400.0, t)
    np.testing.assert_allclose(parts[0][0] + parts[1][0], whole, rtol=1e-12)
    np.testing.assert_allclose(parts[0][0] / parts[1][0], 0.75, rtol=1e-12)


def test_wide_stripline_resistance_tends_to_the_parallel_plate_value() -> None:
    # parallel-plate limit (e.g. Pozar, Microwave Engineering, sec. 2.7): a strip of width
    # w >> b between two planes is two parallel-plate lines; with the current split over
    # both faces and both planes, R = Rs / w per metre. The edges move it by up to twice
    # the fringing share (w_eff - w)/w, w_eff = eta0 b / (4 Z_air) from Cohn's exact
    # zero-thickness impedance (S. B. Cohn, IRE Trans. MTT 2, 1954).
    from scipy.special import ellipkm1  # K(1 - p): keeps precision when k' -> 1

    b, t = 0.5e-3, 5e-6
    f = np.array([10e9, 100e9])  # skin depth 0.66 and 0.21 um, far below t
    rs = COPPER.surface_resistance(f)
    devs = []
    for wb in (5.0, 20.0, 50.0):
        w = wb * b
        line = Stripline(w, (b - t) / 2, (b - t) / 2, t, ConstantDielectric(1.0))
        r = line.rlgc(f).r[:, 0, 0]
        x = np.pi * w / (2 * b)
        z_air = MU0 * C0 / 4 * ellipkm1(np.tanh(x) ** 2) / ellipkm1(1 / np.cosh(x) ** 2)
        share = (MU0 * C0 * b / (4 * z_air) - w) / w
        dev = np.abs(r / (rs / w) - 1)
        assert np.all(dev <= 2 * share)
        devs.append(dev.max())
    assert devs[0] > devs[1] > devs[2]


def test_wide_microstrip_resistance_tends_to_the_parallel_plate_value() -> None:
    # parallel-plate limit (Pozar sec. 2.7): strip underside and plane each carry the
    # current over width w, R = 2 Rs / w. The current spreads past the edges, which lowers
    # R by up to twice the fringing share (w_eff - w)/w, w_eff = eta0 h / Z_air
    # (Hammerstad-Jensen 1980 air-line impedance).
    from losslane.xsection.microstrip import z_air_thin

    h, t = 0.1e-3, 17e-6
    f = np.array([10e9, 100e9])
    rs = COPPER.surface_resistance(f)
    devs = []
    for u in (10.0, 30.0, 100.0):
        w = u * h
        line = Microstrip(w, h, t, ConstantDielectric(1.0))
        r = line.rlgc(f).r[:, 0, 0]
        share = (MU0 * C0 * h / float(z_air_thin(u)) - w) / w
        ratio = r / (2 * rs / w)
        assert np.all((1 - 2 * share <= ratio) & (ratio <= 1))
        devs.append(np.abs(ratio - 1).max())
    assert devs[0] > devs[1] > devs[2]


def test_inductance_falls_with_frequency_toward_the_external_value() -> None:
    # skin effect: the internal inductance is finite at DC and shrinks as the current moves
    # to the surface (Wheeler 1942); with a frequency-independent dielectric the external
    # inductance Z0 sqrt(eps_eff)/c of a stripline is constant
    line = Stripline(5 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, ConstantDielectric(3.7, 0.009))
    f = np.concatenate([[0.0], np.geomspace(1e3, 1e12, 300)])
    m = line.modes(f)["single"]
    l_ext = m.z0 * np.sqrt(m.eps_eff) / C0
    assert np.all(np.isfinite(m.l))
    assert np.all(np.diff(m.l) <= 0)
    assert m.l[0] > 1.05 * l_ext[0]  # DC internal inductance is a visible share
    assert m.l[-1] == pytest.approx(l_ext[-1], rel=2e-3)
    assert np.all(m.l >= l_ext)


def test_microstrip_inductance_approaches_external_at_high_frequency() -> None:
    line = Microstrip(6 * MIL, 3.5 * MIL, 1.4 * MIL, FR)
    f = np.array([0.0, 1e6, 1e9, 1e12])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)  # 1 THz is past Kirschning-Jansen
        m = line.modes(f)["single"]
    l_ext = m.z0 * np.sqrt(m.eps_eff) / C0
    li = m.l - l_ext
    assert np.all(np.isfinite(li)) and np.all(li > 0)
    assert np.all(np.diff(li) < 0)
    assert li[-1] < 2e-3 * m.l[-1]


# --- finite everywhere -----------------------------------------------------------------

FOILS = {
    "smooth": Smooth(),
    "hammerstad": Hammerstad(2e-6),
    "groiss": Groiss(0.6e-6),
    "huray": Huray.from_surface_ratio(0.5e-6, 1.0, matte_ratio=1.2),
    "graded": Graded(0.3e-6, (FinishLayer(41e6, 0.05e-6), FinishLayer(14.5e6, 4e-6))),
}

KINDS = {
    "microstrip": lambda m: Microstrip(6 * MIL, 3.5 * MIL, 1.4 * MIL, FR, m),
    "stripline": lambda m: Stripline(5 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, FR, m),
    "offset-stripline": lambda m: Stripline(5 * MIL, 4 * MIL, 9 * MIL, 0.6 * MIL, FR, m),
    "cpw": lambda m: Cpw(10 * MIL, 5 * MIL, 10 * MIL, 1.4 * MIL, FR, m),
    "gcpw": lambda m: Gcpw(10 * MIL, 5 * MIL, 10 * MIL, 1.4 * MIL, FR, m),
}


@pytest.mark.filterwarnings("ignore::losslane.errors.LossLaneWarning")  # 1 THz: past ranges
@pytest.mark.parametrize("foil", list(FOILS), ids=list(FOILS))
@pytest.mark.parametrize("kind", list(KINDS), ids=list(KINDS))
def test_rlgc_finite_at_dc_and_at_1_thz(kind: str, foil: str) -> None:
    # DC is a legal frequency with exact DC results (series resistance, no dielectric
    # loss), and nothing overflows at 1 THz (project rule; time-domain tools need DC)
    line = KINDS[kind](Metal(foil=FOILS[foil]))
    f = np.array([0.0, 1e12])
    rl = line.rlgc(f)
    for a in (rl.r, rl.l, rl.g, rl.c):
        assert np.all(np.isfinite(a))
    r, l, g, c = rl.scalar()
    assert g[0] == 0.0
    assert np.all(r > 0) and np.all(l > 0) and np.all(c > 0) and g[1] > 0
    assert r[1] > r[0]
    props = properties(line, f)
    for key in ("z0_ohm", "eps_eff", "delay_ps_per_in", "loss_db_per_in"):
        assert all(np.isfinite(props[key])), key
    assert props["loss_db_per_in"][0] == 0.0 or props["loss_db_per_in"][0] < 1e-12


def test_library_foils_all_build_lines() -> None:
    lib = load_library()
    f = np.array([0.0, 1e9, 28e9])
    for name, foil in lib.foils.items():
        line = Microstrip(6 * MIL, 3.5 * MIL, 1.4 * MIL, FR, Metal(foil=foil))
        rl = line.rlgc(f)
        assert np.all(np.isfinite(rl.r)) and np.all(rl.r > 0), name


def test_conductivity_scales_dc_resistance() -> None:
    # R_dc = 1/(sigma w t): halving sigma doubles it (hand calculation)
    a = Microstrip(6 * MIL, 3.5 * MIL, 1.4 * MIL, FR, huge_planes())
    b = Microstrip(
        6 * MIL, 3.5 * MIL, 1.4 * MIL, FR, Metal(conductor=Conductor(2.9e7), plane_thickness=1e3)
    )
    ra = a.rlgc(np.array([0.0])).r[0, 0, 0]
    rb = b.rlgc(np.array([0.0])).r[0, 0, 0]
    assert rb == pytest.approx(2 * ra, rel=1e-7)

"""Copper roughness factors against their published formulas and limits, and the graded
(plated) surface against scikit-rf's surface_impedance."""

from __future__ import annotations

import numpy as np
import pytest

from losslane.errors import LossLaneError
from losslane.materials.conductor import COPPER, MU0, Conductor
from losslane.materials.roughness import (
    FinishLayer,
    Graded,
    Groiss,
    Hammerstad,
    Huray,
    Smooth,
)

F = np.array([0.0, 1.0, 1e6, 1e8, 1e9, 3e9, 1e10, 3e10, 1e11, 1e12])
SIGMA = 5.8e7


def delta(f: np.ndarray, sigma: float = SIGMA) -> np.ndarray:
    # skin depth 1/sqrt(pi f mu0 sigma) (any electromagnetics text, e.g. Ramo-Whinnery-Van
    # Duzer, Fields and Waves in Communication Electronics, 1994)
    with np.errstate(divide="ignore"):
        return 1.0 / np.sqrt(np.pi * f * MU0 * sigma)


@pytest.mark.parametrize("rq", [0.1e-6, 0.6e-6, 2e-6, 5e-6])
def test_hammerstad_formula(rq: float) -> None:
    # E. Hammerstad, F. Bekkadal, Microstrip Handbook, 1975: K = 1 + (2/pi) atan(1.4 (Rq/d)^2)
    d = delta(F[1:])
    expected = 1 + 2 / np.pi * np.arctan(1.4 * (rq / d) ** 2)
    np.testing.assert_allclose(Hammerstad(rq).factor(F[1:], COPPER), expected, rtol=1e-13)


@pytest.mark.parametrize("rq", [0.1e-6, 0.6e-6, 2e-6, 5e-6])
def test_groiss_formula(rq: float) -> None:
    # S. Groiss et al., EMC Zurich 1996: K = 1 + exp(-(d / (2 Rq))^1.6)
    d = delta(F[1:])
    expected = 1 + np.exp(-((d / (2 * rq)) ** 1.6))
    np.testing.assert_allclose(Groiss(rq).factor(F[1:], COPPER), expected, rtol=1e-13)


def test_huray_formula() -> None:
    # P. G. Huray, The Foundations of Signal Integrity, Wiley 2009 (formula from memory):
    # K = A_matte/A_flat + (3/2) sum_i SR_i / (1 + d/a_i + d^2/(2 a_i^2))
    spheres = ((0.5e-6, 1.2), (1.5e-6, 0.4))
    model = Huray(spheres, matte_ratio=1.1)
    d = delta(F[1:])
    expected = 1.1 + sum(1.5 * sr / (1 + d / a + d**2 / (2 * a * a)) for a, sr in spheres)
    np.testing.assert_allclose(model.factor(F[1:], COPPER), expected, rtol=1e-13)


def test_huray_from_counts_is_the_surface_ratio() -> None:
    # surface ratio SR = N 4 pi a^2 / A_flat (Huray 2009, from memory): 10 spheres of
    # 0.5 um radius on a 10 um x 10 um tile
    a, n, tile = 0.5e-6, 10, 100e-12
    model = Huray.from_counts(a, n, tile)
    assert model.spheres[0][1] == pytest.approx(n * 4 * np.pi * a * a / tile, rel=1e-14)


MODELS = [
    Smooth(),
    Hammerstad(1e-6),
    Groiss(1e-6),
    Huray.from_surface_ratio(0.5e-6, 1.0),
    Graded(0.0),
    Graded(1e-6),
]


@pytest.mark.parametrize("model", MODELS, ids=lambda m: f"{m.model}")
def test_every_model_tends_to_one_at_low_frequency(model) -> None:
    # the skin depth dwarfs the roughness at low frequency, so the surface looks smooth
    # (Hammerstad 1975, Groiss 1996, Huray 2009 with a flat base): K -> 1; K(0) = 1 exactly
    k = np.asarray(model.factor(np.array([0.0, 1.0, 1e3]), COPPER))
    assert np.all(np.isfinite(k))
    assert k[0] == 1.0
    np.testing.assert_allclose(k[1:], 1.0, atol=1e-6)


@pytest.mark.parametrize("model", [Hammerstad(1e-6), Groiss(1e-6)], ids=["hammerstad", "groiss"])
def test_hammerstad_and_groiss_saturate_at_two(model) -> None:
    # both published factors double the smooth loss when the skin depth is far below Rq
    # (Hammerstad & Bekkadal 1975; Groiss 1996)
    k = model.factor(np.array([1e12, 1e15, 1e18]), COPPER)
    assert np.all(np.diff(k) > 0) and np.all(k < 2)
    assert k[-1] == pytest.approx(2.0, abs=1e-6)
    assert model.saturation() == 2.0


def test_huray_saturates_at_matte_plus_three_halves_of_the_surface_ratio() -> None:
    # Huray 2009 (from memory): K -> A_matte/A_flat + (3/2) sum SR_i as delta -> 0
    model = Huray(((0.5e-6, 1.2), (1.5e-6, 0.4)), matte_ratio=1.1)
    limit = 1.1 + 1.5 * (1.2 + 0.4)
    assert model.saturation() == pytest.approx(limit, rel=1e-14)
    assert model.factor(np.array([1e20]), COPPER)[0] == pytest.approx(limit, rel=1e-5)
    # a matte base keeps its area ratio at low frequency (the formula's first term); the
    # conductor model applies K only above the DC resistance, so DC stays exact
    assert model.factor(np.array([1.0]), COPPER)[0] == pytest.approx(1.1, rel=1e-6)


@pytest.mark.parametrize("model", MODELS[1:4], ids=lambda m: f"{m.model}")
def test_factor_rises_monotonically_with_frequency(model) -> None:
    f = np.geomspace(1e3, 1e13, 200)
    assert np.all(np.diff(np.real(model.factor(f, COPPER))) >= 0)


ETA0 = MU0 * 299_792_458.0


def _skrf_raw(f: np.ndarray, mats: list[dict], rq: float, locs) -> np.ndarray:
    from skrf.tlineFunctions import surface_impedance

    return surface_impedance(f, mats, rms_roughness=rq, boundary_loc=locs)


def _to_skrf_reference(zs_mean: np.ndarray, f: np.ndarray, rq: float, eps_out: float = 1.0):
    """Carry a surface impedance from the mean plane out to scikit-rf's reference plane.

    scikit-rf refers its Zs to the start of its computation span, 5 rms heights out in the
    outside medium (``x_start`` in its source), while losslane's K refers to the mean plane
    where the smooth copper surface lies. The input impedance of a lossless line of length
    d terminated in Z_L is Z_in = eta (Z_L + j eta tan(beta d)) / (eta + j Z_L tan(beta d))
    (D. M. Pozar, Microwave Engineering, 4th ed., eq. 2.44).
    """
    eta = ETA0 / np.sqrt(eps_out)
    tan = np.tan(2 * np.pi * f * np.sqrt(eps_out) / 299_792_458.0 * 5 * rq)
    return eta * (zs_mean + 1j * eta * tan) / (eta + 1j * zs_mean * tan)


def _smooth_zs(f: np.ndarray) -> np.ndarray:
    # (1 + j) Rs of smooth base copper, Rs = sqrt(pi f mu0 / sigma)
    return (1 + 1j) * np.sqrt(np.pi * f * MU0 / SIGMA)


def test_graded_without_layers_or_roughness_is_smooth_copper() -> None:
    # scikit-rf's surface_impedance reduces to the classic (1 + j) Rs for one smooth
    # conductor (its documentation); the remainder is the copper's displacement current,
    # omega eps0 / sigma < 1e-6 below 1 THz
    f = np.geomspace(1e6, 1e12, 13)
    k = Graded(0.0).factor(f, COPPER)
    np.testing.assert_allclose(k, 1.0, atol=1e-6)


@pytest.mark.parametrize("rq", [0.3e-6, 1e-6])
def test_graded_finish_matches_scikit_rf_surface_impedance(rq: float) -> None:
    # a gold flash over nickel over copper (Tegowski et al., IEEE T-MTT 71(2) 2023; Gold &
    # Helmreich, EuMC 2016, as implemented by scikit-rf): losslane's tabulated factor at
    # frequencies off its table grid, carried to scikit-rf's reference plane, against
    # scikit-rf's direct result; 1e-5 covers scikit-rf's own 1e-6 refinement tolerance on
    # both sides and the table's spline
    layers = (FinishLayer(41e6, 0.05e-6, name="gold"), FinishLayer(14.5e6, 4e-6, name="nickel"))
    model = Graded(rq, layers)
    sweep = np.geomspace(4e6, 40e9, 4001)
    probe = np.array([3.31e7, 1.73e8, 1.07e9, 7.7e9, 2.93e10])
    # evaluate on the sweep (builds the table for 4 MHz..40 GHz) and the probes inside it
    k = model.factor(np.concatenate([sweep, probe]), COPPER)[-probe.size :]
    mats = [{"ep_r": 1.0}, {"sigma": 41e6}, {"sigma": 14.5e6}, {"sigma": SIGMA}]
    expected = _skrf_raw(probe, mats, rq, [0.0, 0.05e-6, 4.05e-6])
    np.testing.assert_allclose(
        _to_skrf_reference(k * _smooth_zs(probe), probe, rq), expected, rtol=1e-5
    )
    # the finish is lossier than copper: Re Zs above Rs from a few hundred MHz up
    assert np.all(expected.real[2:] > _smooth_zs(probe).real[2:])


@pytest.mark.parametrize("eps_out", [1.0, 3.5])
def test_rough_bare_copper_matches_scikit_rf(eps_out: float) -> None:
    # the treated side of a foil faces the laminate (outside_dk = its Dk)
    f = np.array([1e8, 2.2e9, 1.3e10, 6.7e10])
    k = Graded(1e-6, outside_dk=eps_out).factor(f, COPPER)
    expected = _skrf_raw(f, [{"ep_r": eps_out}, {"sigma": SIGMA}], 1e-6, 0.0)
    np.testing.assert_allclose(
        _to_skrf_reference(k * _smooth_zs(f), f, 1e-6, eps_out), expected, rtol=1e-5
    )


@pytest.mark.parametrize("rq", [0.3e-6, 1e-6, 2e-6])
def test_graded_roughness_is_second_order_while_the_skin_depth_is_large(rq: float) -> None:
    # a height distribution symmetric about the mean plane removes as much metal below it
    # as it adds above it, so the first-order change of Zs cancels and K - 1 = O((rq/d)^2)
    # while the skin depth d is large (perturbation of the 1-D skin-effect equation, e.g.
    # Ramo-Whinnery-Van Duzer sec. 4.12). Referred to a plane 5 rq out in the air, K - 1
    # would instead be 5 (1 + j) rq/d, the reactance of that air slab.
    f = np.array([1e3, 1e5, 1e6, 1e7])
    d = delta(f)
    keep = d >= 10 * rq
    k = Graded(rq).factor(f[keep], COPPER)
    assert np.all(np.abs(k - 1) <= 3 * (rq / d[keep]) ** 2)
    # and the resistance itself is never below smooth copper's
    f = np.geomspace(1e6, 1e11, 30)
    k = Graded(rq).factor(f, COPPER)
    assert np.all((k * (1 + 1j)).real >= 1 - 1e-9)


@pytest.mark.parametrize(
    "build",
    [
        lambda: Hammerstad(0.0),
        lambda: Groiss(-1e-6),
        lambda: Huray(()),
        lambda: Huray(((0.0, 1.0),)),
        lambda: Huray(((0.5e-6, -1.0),)),
        lambda: Huray(((0.5e-6, 1.0),), matte_ratio=0.9),
        lambda: Graded(-1e-6),
        lambda: Graded(0.0, (FinishLayer(41e6, 0.0),)),
        lambda: Graded(0.0, (FinishLayer(0.0, 1e-6),)),
        lambda: Huray.from_counts(0.5e-6, 10, 0.0),
        lambda: Conductor(sigma=0.0),
        lambda: Conductor(mu_r=0.5),
    ],
)
def test_impossible_roughness_is_an_error(build) -> None:
    with pytest.raises(LossLaneError):
        build()

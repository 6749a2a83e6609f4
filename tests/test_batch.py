"""The vectorized evaluation path (xsection.batch) against scalar calls of the models.

The closed-form models have one implementation that takes scalars or arrays of geometry
samples; these checks guard its broadcasting (and the batch plumbing: Dk scaling, main
mode, impedance, warnings and errors). They compare the project's code with itself; the
outside references for the models themselves are in the model tests. Each sample of a
batch call must equal the scalar model built with that sample's geometry, to rounding.
"""

from __future__ import annotations

import dataclasses
import warnings

import numpy as np
import pytest
from reported import properties

from losslane.errors import LossLaneError, LossLaneWarning
from losslane.materials.library import load_library
from losslane.xsection import Cpw, Gcpw, Metal, Microstrip, Stripline
from losslane.xsection.batch import evaluate
from losslane.xsection.microstrip_pair import MicrostripPair
from losslane.xsection.stripline_pair import StriplinePair

MIL = 25.4e-6
LIB = load_library()
F = np.array([0.0, 1e6, 1e9, 10e9, 28e9, 56e9])


def sections(foil: str) -> list:
    m = Metal(foil=LIB.foil(foil))
    d = LIB.dielectric("low-loss")
    return [
        Microstrip(6 * MIL, 3.5 * MIL, 1.4 * MIL, d, m),
        Microstrip(6 * MIL, 3.5 * MIL, 0.0, d, m),
        Stripline(5 * MIL, 5 * MIL, 5 * MIL, 0.6 * MIL, d, m),
        Stripline(5 * MIL, 4 * MIL, 7 * MIL, 0.6 * MIL, d, m),
        Stripline(5 * MIL, 4 * MIL, 7 * MIL, 0.0, d, m),
        Cpw(10 * MIL, 5 * MIL, 20 * MIL, 1.4 * MIL, d, m),
        Gcpw(10 * MIL, 5 * MIL, 8 * MIL, 1.4 * MIL, d, m),
    ]


def scalar(sec, f: np.ndarray) -> tuple:
    mode = sec.modes(f)["single"]
    return mode, properties(sec, f)


@pytest.mark.parametrize("foil", ["smooth", "standard-ed", "very-low-profile-rq"])
def test_batch_equals_scalar_models(foil: str) -> None:
    rng = np.random.default_rng(7)
    for sec in sections(foil):
        geo = sec.dimension_values()
        n = 12
        samples = {k: v * (1 + 0.2 * rng.uniform(-1, 1, n)) for k, v in geo.items()}
        if isinstance(sec, Stripline) and sec.below == sec.above:
            samples["above"] = samples["below"].copy()  # keep the centred formula in play
        scale = 1 + 0.05 * rng.uniform(-1, 1, n)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", LossLaneWarning)
            res = evaluate(sec, F, dk_scale=scale, **samples)
            total, cond, diel = res.loss_db_per_in()
            for i in range(n):
                d = dataclasses.replace(sec.dielectric, dk=sec.dielectric.dk * scale[i])
                one = dataclasses.replace(
                    sec, dielectric=d, **{k: float(v[i]) for k, v in samples.items()}
                )
                mode, nums = scalar(one, F)
                for got, want in (
                    (res.r[i], mode.r),
                    (res.l[i], mode.l),
                    (res.g[i], mode.g),
                    (res.c[i], mode.c),
                    (res.eps_eff[i], mode.eps_eff),
                    (res.impedance[i], nums["z0_ohm"]),
                    (total[i], nums["loss_db_per_in"]),
                    (cond[i], nums["conductor_db_per_in"]),
                    (diel[i], nums["dielectric_db_per_in"]),
                ):
                    np.testing.assert_allclose(
                        got, want, rtol=1e-9, atol=1e-15, err_msg=f"{sec.kind} {foil} sample {i}"
                    )


def test_dk_scale_equals_a_refit_at_the_scaled_dk() -> None:
    # The wideband Debye fit is linear in Dk at fixed Df: scaling eps(f) is the refit.
    d = LIB.dielectric("low-loss")
    refit = dataclasses.replace(d, dk=d.dk * 1.07)
    np.testing.assert_allclose(refit.eps(F), d.eps(F) * 1.07, rtol=1e-12)


class _Unvectorized(Microstrip):
    """A model that implements ``modes`` itself takes the per-sample path (stands in for
    the field-solver kinds)."""

    def modes(self, f):
        return super().modes(f)


def test_per_sample_fallback_matches_vectorized_path() -> None:
    base = sections("standard-ed")[0]
    slow = _Unvectorized(base.width, base.height, base.thickness, base.dielectric, base.metal)
    assert type(base).vectorized() and not type(slow).vectorized()
    w = base.width * np.array([0.9, 1.0, 1.1])
    done = []
    a = evaluate(base, F[1:], width=w)
    b = evaluate(slow, F[1:], width=w, progress=done.append)
    np.testing.assert_allclose(b.impedance, a.impedance, rtol=1e-12)
    np.testing.assert_allclose(b.loss_db_per_in()[0], a.loss_db_per_in()[0], rtol=1e-12)
    assert done[-1] == 3


def test_bad_samples_are_errors() -> None:
    sec = sections("smooth")[0]
    with pytest.raises(LossLaneError, match="width"):
        evaluate(sec, F, width=np.array([1e-4, -1e-5]))
    with pytest.raises(LossLaneError, match="not a dimension"):
        evaluate(sec, F, gap=1e-4)
    with pytest.raises(LossLaneError, match="same length"):
        evaluate(sec, F, width=np.ones(3) * 1e-4, height=np.ones(2) * 1e-4)


def test_dc_and_extreme_frequencies_stay_finite() -> None:
    sec = sections("standard-ed")[2]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        res = evaluate(sec, np.array([0.0, 1e3, 1e12]), width=sec.width * np.array([0.5, 2.0]))
    for a in (res.impedance, res.r, res.l, res.g, res.c, *res.loss_db_per_in()):
        assert np.all(np.isfinite(a))
    assert np.all(res.g[:, 0] == 0)  # no dielectric loss at DC


def pair_sections(foil: str) -> list:
    m = Metal(foil=LIB.foil(foil))
    d = LIB.dielectric("low-loss")
    return [
        MicrostripPair(5 * MIL, 7 * MIL, 3.5 * MIL, 1.4 * MIL, d, m),
        MicrostripPair(5 * MIL, 7 * MIL, 3.5 * MIL, 0.0, d, m),
        StriplinePair(5 * MIL, 7 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, d, m),
        StriplinePair(5 * MIL, 7 * MIL, 4 * MIL, 8 * MIL, 0.6 * MIL, d, m),
        StriplinePair(5 * MIL, 7 * MIL, 4 * MIL, 8 * MIL, 0.0, d, m),
    ]


@pytest.mark.parametrize("foil", ["smooth", "standard-ed"])
def test_pair_batch_equals_scalar_models(foil: str) -> None:
    # the batch reports a pair's differential mode: the odd mode, with Z_diff = 2 Z_odd
    rng = np.random.default_rng(11)
    for sec in pair_sections(foil):
        assert type(sec).vectorized()
        geo = sec.dimension_values()
        n = 8
        samples = {k: v * (1 + 0.2 * rng.uniform(-1, 1, n)) for k, v in geo.items()}
        if isinstance(sec, StriplinePair) and sec.below == sec.above:
            samples["above"] = samples["below"].copy()  # keep the centred formula in play
        scale = 1 + 0.05 * rng.uniform(-1, 1, n)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", LossLaneWarning)
            res = evaluate(sec, F, dk_scale=scale, **samples)
            total, cond, diel = res.loss_db_per_in()
            assert res.differential
            for i in range(n):
                d = dataclasses.replace(sec.dielectric, dk=sec.dielectric.dk * scale[i])
                one = dataclasses.replace(
                    sec, dielectric=d, **{k: float(v[i]) for k, v in samples.items()}
                )
                odd = one.modes(F)["odd"]
                props = properties(one, F)
                for got, want in (
                    (res.r[i], odd.r),
                    (res.l[i], odd.l),
                    (res.g[i], odd.g),
                    (res.c[i], odd.c),
                    (res.eps_eff[i], props["eps_eff_odd"]),
                    (res.impedance[i], props["z_diff_ohm"]),
                    (total[i], props["loss_db_per_in"]),
                    (cond[i], props["conductor_db_per_in"]),
                    (diel[i], props["dielectric_db_per_in"]),
                ):
                    np.testing.assert_allclose(
                        got, want, rtol=1e-9, atol=1e-15, err_msg=f"{sec.kind} {foil} sample {i}"
                    )


def test_validity_warnings_fire_when_any_sample_is_outside() -> None:
    # one sample of three beyond the microstrip's validity box (w/h <= 50): the batch warns
    # with the message the scalar model gives for that sample
    ms = sections("smooth")[0]
    w = ms.width * np.array([1.0, 1.1, 70.0])
    head = r"microstrip \(Hammerstad-Jensen, field-solver correction\): width/height = "
    with pytest.warns(LossLaneWarning, match=head + "1.714..120 is outside"):
        evaluate(ms, F[1:], width=w)
    with pytest.warns(LossLaneWarning, match=head + "120 is outside"):
        dataclasses.replace(ms, width=float(w[2])).modes(F[1:])
    # the offset range (the trace's distance to the nearer plane at least 5 % of
    # below + above) fires for the one sample that sits too close to a plane
    sl = sections("smooth")[2]  # centred
    narrow = np.full(3, 1.0 * MIL)  # w/b = 0.09, inside the box
    with warnings.catch_warnings():
        warnings.simplefilter("error", LossLaneWarning)
        evaluate(sl, F[1:], width=narrow)
        evaluate(sl, F[1:], width=narrow, above=sl.above * np.array([1.0, 1.0, 1.2]))
    with pytest.warns(LossLaneWarning, match="offset stripline"):
        evaluate(sl, F[1:], width=narrow, above=sl.above * np.array([1.0, 1.0, 25.0]))


def test_model_errors_fire_for_any_sample() -> None:
    cpw = sections("smooth")[5]
    # one sample whose gap is one and a half times the copper's thickness: finite (the
    # side walls' capacitance keeps the gap open at any thickness), with the warning of
    # the correction's box t/gap <= 0.5
    gap = cpw.gap * np.array([1.0, 0.3])
    with pytest.warns(LossLaneWarning, match="thickness/gap"):
        res = evaluate(cpw, F, gap=gap)
    assert np.all(np.isfinite(res.impedance))
    assert np.all(res.impedance[1] < res.impedance[0])
    # a zero thickness means no conductor loss at all, so samples must agree on it
    ms = sections("smooth")[0]
    with pytest.raises(LossLaneError, match="mix zero and non-zero"):
        evaluate(ms, F, thickness=np.array([ms.thickness, 0.0]))
    with pytest.warns(LossLaneWarning, match="thickness = 0"):
        res = evaluate(ms, F, thickness=np.zeros(2))
    assert np.all(res.r == 0)

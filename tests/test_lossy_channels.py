"""Very lossy channels stay passive and reciprocal (IEEE 370-2020 definitions: the largest
singular value of S at most 1, S equal to its transpose), whatever the loss and whatever
mixes the modes: hundreds to thousands of dB of microns-wide pairs over metres, with a
connector model that couples the two legs in the middle."""

from __future__ import annotations

import warnings

import numpy as np
import pytest

from losslane.channel import build_channel
from losslane.network import LineSegment, build_network
from losslane.scenario import parse_scenario
from losslane.units import INCH
from losslane.xsection import RLGC

CONNECTOR = "{models}/mezzanine-pair.s4p"

SCENARIO = """
name = "lossy pair"
[sweep]
start = "0 Hz"
stop = "{stop}"
points = 101
[lines.p]
kind = "{kind}"
width = "{width}"
spacing = "{width}"
{heights}
thickness = "5 um"
dielectric = "epoxy-glass-standard"
{solver}
[[channel]]
line = "p"
length = "{length}"
[[channel]]
capacitor = {{ value = "100 nF" }}
[[channel]]
touchstone = "{connector}"
[[channel]]
line = "p"
length = "{length}"
"""


def models() -> str:
    from importlib import resources

    return str(resources.files("losslane").joinpath("data", "models"))


def assert_passive_reciprocal(s: np.ndarray) -> None:
    assert np.all(np.isfinite(s))
    sv = np.linalg.svd(s, compute_uv=False)[:, 0]
    assert sv.max() <= 1 + 1e-9
    assert np.max(np.abs(s - np.swapaxes(s, 1, 2))) <= 1e-9


@pytest.mark.parametrize("kind", ["microstrip-pair", "stripline-pair"])
@pytest.mark.parametrize("length", ["2 m", "10 m"])
@pytest.mark.parametrize("solver", ["closed-form", "field"])
def test_lossy_pairs_with_a_mode_mixing_connector(kind, length, solver) -> None:
    heights = (
        'height = "20 um"' if kind == "microstrip-pair" else 'below = "20 um"\nabove = "30 um"'
    )
    text = SCENARIO.format(
        stop="40 GHz",
        kind=kind,
        width="10 um",
        heights=heights,
        solver='solver = "field"\naccuracy = "coarse"' if solver == "field" else "",
        length=length,
        connector=CONNECTOR.format(models=models()),
    )
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # a field-solved micro-line may leave quasi-TEM
        res = build_channel(parse_scenario(text))
    assert_passive_reciprocal(res.s)
    loss = res.insertion_loss_db
    assert np.all(np.isfinite(loss)) and np.all(loss >= 0) and np.all(loss <= 6000.0)
    # thousands of dB at the top of the band: the loss is reported, up to the 6000 dB floor
    assert loss[-1] > 700


@pytest.mark.parametrize("modes_known", [True, False])
def test_modes_of_very_different_loss_in_one_line(modes_known: bool) -> None:
    # a made-up pair whose modes lose about 20 Np and 130 Np over the line at 1 GHz: the S
    # of the line alone is the per-mode result (Paul, modal decomposition: each mode a
    # single line between the same references), with the modes known (a symmetric pair's
    # fixed transform) or found by eigen-decomposition. A port entry holds both modes'
    # transmissions, so the weaker one is there to rounding of the stronger (1e-15 of
    # it): far below anything a simulator or the passivity check can see.
    from losslane.xsection.base import PAIR_TRANSFORM

    f = np.array([1e9, 5e9])
    n = f.size
    re, ro, l_e, l_o, c_e, c_o = 5e3, 1e5, 420e-9, 290e-9, 95e-12, 150e-12

    def mat(e, o):
        out = np.empty((n, 2, 2))
        out[:, 0, 0] = out[:, 1, 1] = (e + o) / 2
        out[:, 0, 1] = out[:, 1, 0] = (e - o) / 2
        return out

    zero = np.zeros(n)
    transform = PAIR_TRANSFORM if modes_known else None
    rl = RLGC(f, mat(re, ro), mat(l_e, l_o), mat(zero, zero), mat(c_e, c_o), transform)
    s = build_network([LineSegment(rl, 0.6)], f, 50.0).s
    assert_passive_reciprocal(s)
    w = 2 * np.pi * f
    for (r, l_, c), sign in (((re, l_e, c_e), 1.0), ((ro, l_o, c_o), -1.0)):
        z, y = r + 1j * w * l_, 1j * w * c
        g, zc = np.sqrt(z * y) * 0.6, np.sqrt(z / y)
        # textbook S21 of a single line between 50-ohm ports (Pozar)
        s21 = 1.0 / (np.cosh(g) + 0.5 * (zc / 50 + 50 / zc) * np.sinh(g))
        # the mode's transmission from the port matrix: (S31 +- S32 +- S41 + S42) / 2
        got = 0.5 * (s[:, 2, 0] + sign * s[:, 2, 1] + sign * s[:, 3, 0] + s[:, 3, 1])
        scale = np.max(np.abs(s[:, 2:, :2]), axis=(1, 2))
        np.testing.assert_allclose(got, s21, rtol=1e-9, atol=1e-15 * scale.min())


def test_single_ended_line_of_the_same_loss_is_exact() -> None:
    # one conductor, 3000 dB: |S21| underflows to 0, S11 is the line's own reflection
    f = np.array([1e9])
    rl = RLGC.single(f, np.array([2e5]), np.array([330e-9]), np.array([0.0]), np.array([130e-12]))
    s = build_network([LineSegment(rl, 10 * INCH)], f, 50.0).s
    assert_passive_reciprocal(s)
    z, y = 2e5 + 2j * np.pi * 1e9 * 330e-9, 2j * np.pi * 1e9 * 130e-12
    zc = np.sqrt(z / y)
    np.testing.assert_allclose(s[0, 0, 0], (zc - 50) / (zc + 50), rtol=1e-12)

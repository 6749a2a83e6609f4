"""Round conductors in an antipad (losslane.xsection.round): the via barrel's
cross-section.

Outside references (exact solutions of 2-D electrostatics):
* coaxial line: C = 2 pi eps / ln(D/d), Z = 60/sqrt(eps_r) ln(D/d) (S. Ramo, J. R.
  Whinnery, T. Van Duzer, *Fields and Waves in Communication Electronics*); the
  textbook's "60" is eta0 / 2 pi = 59.96 rounded;
* eccentric coaxial line: Z = (eta0 / 2 pi) / sqrt(eps_r) acosh((D^2 + d^2 - 4 c^2) /
  (2 D d)) for a conductor off centre by c (B. C. Wadell, *Transmission Line Design
  Handbook*, 1991; from memory, and checked here to reduce to the coaxial form at c = 0);
* two thin wires of diameter d, p apart, in a grounded round shield of diameter D:
  by the method of images (a line charge at s from the axis of a grounded cylinder of
  radius R has its image at R^2 / s; Ramo et al.), per line
  Z_odd = (eta0 / 2 pi) ln((2 p / d) (D^2 - p^2) / (D^2 + p^2)),
  Z_even = (eta0 / 2 pi) ln((R^4 - s^4) / (R^2 (d / 2) p)), s = p / 2, R = D / 2 --
  exact as d / p -> 0 (derived here from the image construction).
"""

from __future__ import annotations

import numpy as np
import pytest

from losslane.errors import LossLaneError
from losslane.xsection.rlgc import ETA0
from losslane.xsection.round import (
    circle,
    coax_capacitance,
    coax_impedance,
    maxwell_capacitance,
    mode_capacitances,
    mode_impedance,
    opening_capacitance,
)

MIL = 25.4e-6
K = ETA0 / (2 * np.pi)  # 59.96 ohm


def test_coax_formula_and_its_rounded_textbook_form():
    d, big, dk = 8 * MIL, 26 * MIL, 3.6
    z = coax_impedance(d, big, dk)
    assert z == pytest.approx(K / np.sqrt(dk) * np.log(big / d), rel=1e-15, abs=0)
    # the textbook's 60 ohm is eta0 / 2 pi rounded up by 0.07 %
    assert z == pytest.approx(60 / np.sqrt(dk) * np.log(big / d), rel=8e-4, abs=0)
    assert mode_impedance(coax_capacitance(d, big), dk) == pytest.approx(z, rel=1e-13, abs=0)


@pytest.mark.parametrize("panels", [80, 160])
def test_boundary_elements_reproduce_the_coaxial_line(panels):
    d, big = 8 * MIL, 26 * MIL
    c = maxwell_capacitance(
        [circle(0, 0, d / 2, panels), circle(0, 0, big / 2, 2 * panels)], [False, True]
    )
    # within 0.5 % of the exact coaxial capacitance (measured: 8e-5 at 80, 2e-5 at 160)
    assert c[0, 0] == pytest.approx(coax_capacitance(d, big), rel=1e-4, abs=0)


@pytest.mark.parametrize("offset_mil", [0.5, 2.0, 5.0])
@pytest.mark.parametrize("panels, tol", [(64, 2e-4), (160, 5e-5)])
def test_an_eccentric_barrel_matches_the_exact_solution(offset_mil, panels, tol):
    # measured: 1.3e-4 at the default 64 panels per barrel, 2e-5 at 160
    d, big, c = 8 * MIL, 26 * MIL, offset_mil * MIL
    z = mode_impedance(opening_capacitance(d, big, offset=c, panels=panels)[0, 0], 1.0)
    exact = K * np.arccosh((big**2 + d**2 - 4 * c**2) / (2 * big * d))
    assert z == pytest.approx(exact, rel=tol, abs=0)


def test_a_thin_wire_pair_in_a_round_shield_matches_the_image_solution():
    d, p, big = 0.3 * MIL, 30 * MIL, 80 * MIL
    contours = [
        circle(-p / 2, 0, d / 2, 160),
        circle(p / 2, 0, d / 2, 160),
        circle(0, 0, big / 2, 480),
    ]
    m = mode_capacitances(maxwell_capacitance(contours, [False, False, True]))
    z_odd, z_even = mode_impedance(m["odd"], 1.0), mode_impedance(m["even"], 1.0)
    r, s = big / 2, p / 2
    odd = K * np.log((2 * p / d) * (big**2 - p**2) / (big**2 + p**2))
    even = K * np.log((r**4 - s**4) / (r**2 * (d / 2) * p))
    # exact for d/p -> 0; at d/p = 0.01 the wires' own proximity is below 1e-4
    assert z_odd == pytest.approx(odd, rel=5e-4, abs=0)
    assert z_even == pytest.approx(even, rel=5e-4, abs=0)


def test_pair_layouts():
    d, big, p = 8 * MIL, 26 * MIL, 30 * MIL
    # round antipads one per barrel: two coaxial lines, no coupling
    m = mode_capacitances(opening_capacitance(d, big, p, "round"))
    assert m["odd"] == m["even"] == pytest.approx(coax_capacitance(d, big), rel=1e-15, abs=0)
    # one oblong opening (wider than each barrel's round antipad): each barrel sees its
    # ground farther away than in a coaxial line, and the odd mode, which also couples
    # barrel to barrel, has more capacitance than the even mode
    m = mode_capacitances(opening_capacitance(d, big, p, "oblong"))
    assert coax_capacitance(d, big) > m["odd"] > m["even"]
    with pytest.raises(LossLaneError, match="overlap"):
        opening_capacitance(d, big, 20 * MIL, "round")
    with pytest.raises(LossLaneError, match="touch"):
        opening_capacitance(d, big, 6 * MIL, "oblong")

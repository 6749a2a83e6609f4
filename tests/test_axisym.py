"""Axisymmetric electrostatics of a via (losslane.xsection.fieldsolve.axisym).

Outside references:
* a barrel inside a closed coaxial cylinder: C = 2 pi eps h / ln(b/a) over a height h
  (exact; S. Ramo, J. R. Whinnery, T. Van Duzer, *Fields and Waves in Communication
  Electronics*);
* a pad overlapping the planes around it by an annulus: the parallel-plate capacitance
  eps A / h of the overlap is the limit as h -> 0; the fringing at the edges adds of the
  order of eps (a + b ln(1/h)) per unit edge length (the textbook parallel-plate
  capacitor with fringing fields; common practice), so the relative excess falls by a
  factor between 1/2 and 1 each time the gap halves.
"""

from __future__ import annotations

import numpy as np
import pytest

from losslane.errors import LossLaneError
from losslane.xsection.fieldsolve.axisym import (
    EPS0,
    AxiBand,
    AxiVia,
    capacitance,
    pad_capacitance,
)

MIL = 25.4e-6


@pytest.mark.parametrize("accuracy, tol", [("coarse", 1e-4), ("normal", 1e-5)])
def test_barrel_in_a_closed_coaxial_cylinder(accuracy, tol):
    a, b, h, er = 4 * MIL, 13 * MIL, 20 * MIL, 3.5
    via = AxiVia((AxiBand(h, er, ground_from=b),), a, 0.0, h, 2 * b)
    exact = 2 * np.pi * EPS0 * er * h / np.log(b / a)
    assert capacitance(via, accuracy) == pytest.approx(exact, rel=tol, abs=0)


def _overlap(h: float, accuracy: str = "normal") -> tuple[float, float]:
    pad, anti = 30 * MIL, 10 * MIL  # radii: the pad overlaps both planes by an annulus
    bands = (
        AxiBand(1.2 * MIL, 1.0, ground_from=anti),
        AxiBand(h, 1.0),
        AxiBand(0.6 * MIL, 1.0, signal_to=pad),
        AxiBand(h, 1.0),
        AxiBand(1.2 * MIL, 1.0, ground_from=anti),
    )
    height = sum(b.thickness for b in bands)
    via = AxiVia(bands, 4 * MIL, 0.0, height, pad + 20 * MIL)
    c = pad_capacitance(via, 2, accuracy)
    plates = 2 * EPS0 * np.pi * (pad**2 - anti**2) / h  # both faces of the pad
    return c, plates


def test_a_pad_over_the_planes_tends_to_the_parallel_plate_capacitance():
    excess = []
    for h in (4 * MIL, 2 * MIL, 1 * MIL):
        c, plates = _overlap(h)
        assert c > plates  # fringing only adds
        excess.append(c / plates - 1)
    # measured: 18 %, 12 %, 7.9 %: the excess falls toward the parallel-plate limit
    assert excess[1] < 0.15
    for a, b in zip(excess[:-1], excess[1:], strict=True):
        assert 0.5 < b / a < 0.75


def test_pad_capacitance_settles_with_the_mesh():
    # measured on this geometry: coarse 1.7 %, normal 0.26 % above the fine solution
    coarse, _ = _overlap(2 * MIL, "coarse")
    normal, _ = _overlap(2 * MIL, "normal")
    fine, _ = _overlap(2 * MIL, "fine")
    assert coarse == pytest.approx(fine, rel=2.5e-2, abs=0)
    assert normal == pytest.approx(fine, rel=5e-3, abs=0)
    # each capacitance is an upper bound (the energy minimum over a subspace); the excess
    # converges from above here too
    assert coarse > normal > fine


def test_inputs_are_checked():
    with pytest.raises(LossLaneError, match="no plane"):
        capacitance(AxiVia((AxiBand(1e-3, 1.0),), 1e-4, 0.0, 1e-3, 1e-3))
    with pytest.raises(LossLaneError, match="wider than the drill"):
        capacitance(AxiVia((AxiBand(1e-3, 1.0, ground_from=5e-5),), 1e-4, 0.0, 1e-3, 1e-3))

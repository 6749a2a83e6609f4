"""Property checks: physical laws that must hold for any valid line or channel."""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from losslane.network import LineSegment, SeriesCapacitor, ShuntCapacitor, abcd_to_s, cascade
from losslane.xsection import RLGC

F = np.array([0.0, 1e6, 1e8, 1e9, 1e10, 5e10, 1e11])
Z0 = 50.0


def line(r, l_nh, c_pf, tan, length):
    n = F.size
    c = np.full(n, c_pf * 1e-12)
    return LineSegment(
        RLGC.single(F, np.full(n, r), np.full(n, l_nh * 1e-9), 2 * np.pi * F * c * tan, c),
        length,
    )


def singular_values(s):
    return np.linalg.svd(s, compute_uv=False)


@settings(max_examples=60, deadline=None)
@given(
    r=st.floats(0, 500),
    l_nh=st.floats(50, 2000),
    c_pf=st.floats(20, 400),
    tan=st.floats(0, 0.05),
    length=st.floats(1e-5, 300),
    cap=st.floats(1e-13, 1e-5),
)
def test_lines_with_loss_are_passive_and_reciprocal(r, l_nh, c_pf, tan, length, cap):
    # IEEE 370-2020: passive means no singular value of S above 1; a line with R, G >= 0
    # is passive and reciprocal (S = S^T) at every frequency, however long or lossy
    blocks = [line(r, l_nh, c_pf, tan, length), SeriesCapacitor(cap), ShuntCapacitor(cap)]
    s = abcd_to_s(cascade(blocks, F), Z0)
    assert np.all(np.isfinite(s))
    assert np.max(singular_values(s)) <= 1 + 1e-12
    np.testing.assert_allclose(s, np.swapaxes(s, 1, 2), rtol=1e-9, atol=1e-15)


@settings(max_examples=40, deadline=None)
@given(
    r=st.floats(0, 50),
    l_nh=st.floats(100, 1000),
    c_pf=st.floats(50, 300),
    tan=st.floats(0, 0.03),
    a=st.floats(1e-4, 2),
    b=st.floats(1e-4, 2),
)
def test_length_additivity_property(r, l_nh, c_pf, tan, a, b):
    # uniform-line theory: T(a + b) = T(a) T(b) for any split of the length
    whole = abcd_to_s(cascade([line(r, l_nh, c_pf, tan, a + b)], F), Z0)
    split = abcd_to_s(cascade([line(r, l_nh, c_pf, tan, a), line(r, l_nh, c_pf, tan, b)], F), Z0)
    assert np.max(np.abs(whole - split)) < 1e-9

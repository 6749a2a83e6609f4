"""Property-based checks over valid geometries (hypothesis): the directions every
transmission-line text states -- a wider strip has lower impedance, a farther return
plane a higher one, and loss grows with the loss tangent and with copper roughness."""

from __future__ import annotations

import warnings

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from reported import properties

from losslane.errors import LossLaneWarning
from losslane.materials.dielectric import WidebandDebye
from losslane.materials.roughness import Hammerstad, Huray
from losslane.xsection.base import Metal
from losslane.xsection.coplanar import Cpw, Gcpw
from losslane.xsection.microstrip import Microstrip
from losslane.xsection.stripline import Stripline

MIL = 25.4e-6
F = np.array([1e9, 10e9])
FAST = settings(max_examples=40, deadline=None)

mils = st.floats(min_value=2.0, max_value=30.0)
dks = st.floats(min_value=2.0, max_value=10.0)
grow = st.floats(min_value=1.05, max_value=2.0)
thick = st.floats(min_value=0.3, max_value=1.4)


def z0(line) -> np.ndarray:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)  # extrapolated corners are allowed
        return line.modes(F)["single"].z0


def loss(line) -> np.ndarray:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        return np.array(properties(line, F)["loss_db_per_in"])


def diel(dk: float, df: float = 0.005) -> WidebandDebye:
    return WidebandDebye(dk, df, 10e9)


@FAST
@given(w=mils, h=mils, t=thick, dk=dks, k=grow)
def test_microstrip_z0_falls_with_width_and_rises_with_height(w, h, t, dk, k) -> None:
    d = diel(dk)
    base = z0(Microstrip(w * MIL, h * MIL, t * MIL, d))
    assert np.all(z0(Microstrip(k * w * MIL, h * MIL, t * MIL, d)) < base)
    assert np.all(z0(Microstrip(w * MIL, k * h * MIL, t * MIL, d)) > base)


@FAST
@given(w=mils, lo=mils, hi=mils, t=thick, dk=dks, k=grow)
def test_stripline_z0_falls_with_width_and_rises_with_plane_distance(w, lo, hi, t, dk, k) -> None:
    d = diel(dk)
    base = z0(Stripline(w * MIL, lo * MIL, hi * MIL, t * MIL, d))
    assert np.all(z0(Stripline(k * w * MIL, lo * MIL, hi * MIL, t * MIL, d)) < base)
    assert np.all(z0(Stripline(w * MIL, k * lo * MIL, hi * MIL, t * MIL, d)) > base)
    assert np.all(z0(Stripline(w * MIL, lo * MIL, k * hi * MIL, t * MIL, d)) > base)


@FAST
@given(
    w=mils,
    gap=st.floats(min_value=3.0, max_value=20.0),
    h=mils,
    dk=dks,
    k=grow,
    grounded=st.booleans(),
)
def test_coplanar_z0_falls_with_width_and_rises_with_gap(w, gap, h, dk, k, grounded) -> None:
    t = 0.5  # mil; thin enough for every gap drawn (Delta < gap)
    d = diel(dk)
    base = z0((Gcpw if grounded else Cpw)(w * MIL, gap * MIL, h * MIL, t * MIL, d))
    assert np.all(
        z0((Gcpw if grounded else Cpw)(k * w * MIL, gap * MIL, h * MIL, t * MIL, d)) < base
    )
    assert np.all(
        z0((Gcpw if grounded else Cpw)(w * MIL, k * gap * MIL, h * MIL, t * MIL, d)) > base
    )
    taller = z0((Gcpw if grounded else Cpw)(w * MIL, gap * MIL, k * h * MIL, t * MIL, d))
    if grounded:
        # the lower return plane moves away: higher impedance (Ghione & Naldi 1983)
        assert np.all(taller > base)
    else:
        # no lower plane: a thicker substrate only holds more field in the dielectric,
        # eps_eff rises toward (er + 1)/2 and the impedance falls (Ghione & Naldi 1984)
        assert np.all(taller < base)


KINDS = {
    "microstrip": lambda d, m: Microstrip(6 * MIL, 3.5 * MIL, 1.4 * MIL, d, m),
    "stripline": lambda d, m: Stripline(5 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, d, m),
    "offset": lambda d, m: Stripline(5 * MIL, 4 * MIL, 8 * MIL, 0.6 * MIL, d, m),
    "cpw": lambda d, m: Cpw(10 * MIL, 5 * MIL, 10 * MIL, 1.4 * MIL, d, m),
    "gcpw": lambda d, m: Gcpw(10 * MIL, 5 * MIL, 10 * MIL, 1.4 * MIL, d, m),
}


@FAST
@given(
    kind=st.sampled_from(list(KINDS)), dk=st.floats(2.5, 5.0), df=st.floats(0.0005, 0.02), k=grow
)
def test_loss_grows_with_df(kind, dk, df, k) -> None:
    build = KINDS[kind]
    assert np.all(loss(build(diel(dk, k * df), Metal())) > loss(build(diel(dk, df), Metal())))


@FAST
@given(kind=st.sampled_from(list(KINDS)), rq=st.floats(0.1e-6, 3e-6), k=grow)
def test_loss_grows_with_roughness(kind, rq, k) -> None:
    build = KINDS[kind]
    d = diel(3.7, 0.009)
    smooth = loss(build(d, Metal()))
    rough = loss(build(d, Metal(foil=Hammerstad(rq))))
    rougher = loss(build(d, Metal(foil=Hammerstad(k * rq))))
    assert np.all(rough > smooth) and np.all(rougher > rough)


@FAST
@given(
    kind=st.sampled_from(list(KINDS)),
    radius=st.floats(0.2e-6, 1.5e-6),
    ratio=st.floats(0.2, 3.0),
    k=grow,
)
def test_loss_grows_with_huray_surface_ratio(kind, radius, ratio, k) -> None:
    build = KINDS[kind]
    d = diel(3.7, 0.009)
    a = loss(build(d, Metal(foil=Huray.from_surface_ratio(radius, ratio))))
    b = loss(build(d, Metal(foil=Huray.from_surface_ratio(radius, k * ratio))))
    assert np.all(b > a)

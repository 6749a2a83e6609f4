"""Synthetic test coupons for the extraction and fit tests: a bare line between two
different, asymmetric launches, at several lengths (all values invented)."""

from __future__ import annotations

import numpy as np

from losslane.materials.conductor import Conductor
from losslane.materials.dielectric import WidebandDebye
from losslane.materials.roughness import Hammerstad, Huray
from losslane.network import LineSegment, SeriesRL, ShuntCapacitor, build_network
from losslane.units import INCH, MIL
from losslane.xsection import Microstrip, MicrostripPair, Stripline, StriplinePair
from losslane.xsection.base import Metal

F = np.linspace(0.0, 40e9, 801)  # 50 MHz steps, with the DC point
LAMINATE = WidebandDebye(3.7, 0.01, 10e9, name="test laminate")
OTHER = WidebandDebye(3.3, 0.004, 10e9, name="launch laminate")


def stripline(dielectric=LAMINATE, foil=None, sigma: float = 5.8e7) -> Stripline:
    """A ~50 ohm centred stripline (5.5 mil wide, 6 mil to each plane, 0.6 mil copper)."""
    metal = Metal(conductor=Conductor(sigma), foil=foil or Hammerstad(0.8e-6))
    return Stripline(5.5 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, dielectric, metal)


def microstrip(foil=None) -> Microstrip:
    metal = Metal(foil=foil or Huray.from_surface_ratio(0.5e-6, 1.6))
    return Microstrip(7 * MIL, 4 * MIL, 1.4 * MIL, LAMINATE, metal)


def stripline_pair() -> StriplinePair:
    metal = Metal(foil=Huray.from_surface_ratio(0.5e-6, 1.6))
    return StriplinePair(4.5 * MIL, 7 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, LAMINATE, metal)


def _launch_line() -> Microstrip:
    """A wide (~35 ohm) pad-like microstrip on another laminate: the launches' short lines."""
    return Microstrip(14 * MIL, 4 * MIL, 1.4 * MIL, OTHER)


def _launch_pair() -> MicrostripPair:
    return MicrostripPair(9 * MIL, 5 * MIL, 4 * MIL, 1.4 * MIL, OTHER)


def launches(kind: str = "a", n: int = 1) -> tuple[list, list]:
    """(near-end blocks, far-end blocks): different at the two ends, and the two kinds
    differ from each other; each has a series inductance, a shunt capacitance and a
    short line of another impedance."""
    pad = _launch_line() if n == 1 else _launch_pair()
    if kind == "a":
        near = [SeriesRL(0.2, 0.30e-9, n=n), ShuntCapacitor(0.25e-12, n=n), LineSegment(pad, 2e-3)]
        far = [LineSegment(pad, 3.5e-3), ShuntCapacitor(0.40e-12, n=n), SeriesRL(0, 0.15e-9, n=n)]
    elif kind == "b":
        near = [ShuntCapacitor(0.6e-12, n=n), LineSegment(pad, 5e-3), SeriesRL(0.5, 0.5e-9, n=n)]
        far = [SeriesRL(0.1, 0.05e-9, n=n), LineSegment(pad, 1e-3), ShuntCapacitor(0.1e-12, n=n)]
    elif kind == "matched":  # small parasitics only: the simple-difference case
        near = [ShuntCapacitor(0.02e-12, n=n), SeriesRL(0, 0.02e-9, n=n)]
        far = [SeriesRL(0, 0.03e-9, n=n), ShuntCapacitor(0.03e-12, n=n)]
    else:
        raise ValueError(kind)
    return near, far


def coupons(section, lengths, f=F, kind: str = "a", order: str = "in-in-out-out") -> list:
    """One skrf.Network per length: launch, ``length`` of ``section``, launch (50 ohm)."""
    n = getattr(section, "n_conductors", 1)
    near, far = launches(kind, n)
    return [
        build_network(near + [LineSegment(section, ln)] + far, f, 50.0, f"{ln / INCH:g} in", order)
        for ln in lengths
    ]


def with_noise(nets, relative: float, seed: int) -> list[tuple]:
    """(f, S) with circular complex noise of E|dS|^2 = (relative |S|)^2 on every entry."""
    rng = np.random.default_rng(seed)
    out = []
    for net in nets:
        s = np.asarray(net.s)
        noise = rng.standard_normal(s.shape) + 1j * rng.standard_normal(s.shape)
        out.append((np.asarray(net.f), s * (1 + relative * noise / np.sqrt(2))))
    return out

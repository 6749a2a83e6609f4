"""Channels shared by the network tests (made-up geometries; typical board values)."""

from __future__ import annotations

import numpy as np

from losslane.materials.dielectric import ConstantDielectric, WidebandDebye
from losslane.network import LineSegment, SeriesCapacitor, SeriesRL, ShuntCapacitor, Via
from losslane.units import INCH, MIL
from losslane.xsection import RLGC, Microstrip, Stripline


def single_channel(length_scale=1.0):
    core = WidebandDebye(3.7, 0.009, 10e9)
    ms = Microstrip(width=6 * MIL, height=3.5 * MIL, thickness=1.4 * MIL, dielectric=core)
    sl = Stripline(
        width=5 * MIL, below=6 * MIL, above=6 * MIL, thickness=0.6 * MIL, dielectric=core
    )
    return [
        LineSegment(ms, 1.2 * INCH * length_scale, "breakout"),
        ShuntCapacitor(0.15e-12, name="pad"),
        SeriesCapacitor(100e-9, esl=0.4e-9, esr=0.01, name="ac cap"),
        Via(55 * MIL, 10 * MIL, 45.0, core),
        LineSegment(sl, 6 * INCH * length_scale, "route"),
        SeriesRL(0.5, 0.2e-9, name="connector"),
        Via(40 * MIL, 25 * MIL, 48.0, 3.7),
        LineSegment(ms, 0.8 * INCH * length_scale, "launch"),
    ]


def pair_rlgc(f):
    n = f.size
    w = 2 * np.pi * f

    def mat(e, o):
        out = np.empty((n, 2, 2))
        out[:, 0, 0] = out[:, 1, 1] = (e + o) / 2
        out[:, 0, 1] = out[:, 1, 0] = (e - o) / 2
        return out

    r = mat(np.full(n, 9.0), np.full(n, 12.0))
    l = mat(np.full(n, 400e-9), np.full(n, 300e-9))
    c = mat(np.full(n, 100e-12), np.full(n, 145e-12))
    g = mat(w * 100e-12 * 0.008, w * 145e-12 * 0.01)
    return RLGC(f, r, l, g, c)


def pair_channel(f):
    rl = pair_rlgc(f)
    return [
        LineSegment(rl, 0.05, "pair a"),
        SeriesCapacitor(100e-9, esl=0.3e-9, n=2),
        Via(55 * MIL, 12 * MIL, 45.0, ConstantDielectric(3.7, 0.01), n=2),
        LineSegment(rl, 0.2, "pair b"),
        ShuntCapacitor(0.1e-12, n=2),
    ]

"""Coupon extraction and material fit speed.

Targets (in-process, after a warm-up call, medians of repeats):
* ``extract_line`` of three 2-port coupons on 4000 frequency points (10 MHz .. 40 GHz)
  <= 0.3 s (the continuation is a Python loop over frequency; the error propagation
  converts 8 perturbed chain-matrix stacks per coupon);
* ``fit_materials`` of Dk, Df and a Hammerstad rq over that band <= 3 s (least squares
  from five starts, the weakest direction's profile and the final Jacobian).
"""

from __future__ import annotations

import warnings

from benchkit import median_time

REPEATS = 5
FIT_REPEATS = 3


def run() -> list[tuple[str, float, float | None, str]]:
    import numpy as np

    from losslane.errors import LossLaneWarning
    from losslane.materials.dielectric import WidebandDebye
    from losslane.materials.roughness import Hammerstad
    from losslane.measure import extract_line, fit_materials
    from losslane.network import LineSegment, SeriesRL, ShuntCapacitor, build_network
    from losslane.units import INCH, MIL
    from losslane.xsection import Stripline
    from losslane.xsection.base import Metal

    f = np.arange(1, 4001) * 10e6
    line = Stripline(
        5.5 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, WidebandDebye(3.7, 0.01, 10e9),
        Metal(foil=Hammerstad(0.8e-6)),
    )  # fmt: skip
    near = [SeriesRL(0.1, 0.2e-9), ShuntCapacitor(0.3e-12)]
    far = [ShuntCapacitor(0.25e-12), SeriesRL(0.0, 0.3e-9)]
    lengths = [2 * INCH, 5 * INCH, 9 * INCH]
    nets = [build_network(near + [LineSegment(line, ln)] + far, f, 50.0) for ln in lengths]
    start = Stripline(
        5.5 * MIL, 6 * MIL, 6 * MIL, 0.6 * MIL, WidebandDebye(3.4, 0.02, 10e9),
        Metal(foil=Hammerstad(2e-6)),
    )  # fmt: skip
    rows = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        ext = extract_line(nets, lengths)
        t_ext = median_time(lambda: extract_line(nets, lengths), REPEATS)
        rows.append(("extract_line, 3 coupons x 4000 points", 1e3 * t_ext, 300.0, "ms"))
        fit_materials(ext, start, ("dk", "df", "rq"))
        t_fit = median_time(lambda: fit_materials(ext, start, ("dk", "df", "rq")), FIT_REPEATS)
        rows.append(("fit_materials dk, df, rq over 4000 points", t_fit, 3.0, "s"))
    return rows

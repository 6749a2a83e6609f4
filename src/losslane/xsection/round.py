"""Round conductors in an opening of the planes: the per-unit-length capacitances of a via
barrel, or a pair of barrels, inside its antipad (the cross-section of a via where it
passes a plane), in a homogeneous dielectric.

* One barrel of diameter d centred in a round antipad of diameter D is a coaxial line:
  C = 2 pi eps / ln(D/d), Z = 60/sqrt(eps_r) ln(D/d) ohm (S. Ramo, J. R. Whinnery,
  T. Van Duzer, *Fields and Waves in Communication Electronics*; any microwave text) --
  exact, used as it is (with eta0 / 2 pi = 59.96 ohm, of which the textbook's 60 is the
  rounding, 0.07 % high).
* Any other layout -- a pair of barrels ``pitch`` apart (centre to centre) in an oblong
  (stadium) antipad of width D around both, or a barrel off centre -- is solved by a 2-D
  electrostatic boundary-element method: the surface charge on every contour (barrels and
  the antipad's edge, held at 0) as constant densities on straight panels, collocation at
  the panel midpoints, each panel's logarithmic potential integrated in closed form. The
  Maxwell capacitance matrix follows from the charges; for a homogeneous dielectric
  C = eps_r C_0 and L = mu0 eps0 C_0^-1. Measured accuracy (tests/test_round.py): the
  coaxial exact solution within 2e-5 at the default panel
  count.

Lengths in metres; capacitances per metre in vacuum (multiply by eps_r).
"""

from __future__ import annotations

import numpy as np

from losslane.errors import LossLaneError
from losslane.xsection.rlgc import C0, EPS0, ETA0

#: the antipad shapes of a pair
SHAPES = ("oblong", "round")


def coax_capacitance(drill: float, antipad: float) -> float:
    """C_0 = 2 pi eps0 / ln(D/d) per metre of a centred barrel (exact, vacuum)."""
    _check(drill, antipad)
    return 2 * np.pi * EPS0 / np.log(antipad / drill)


def coax_impedance(drill: float, antipad: float, dk: float) -> float:
    """Z = eta0 / (2 pi sqrt(eps_r)) ln(D/d) (Ramo-Whinnery; eta0 / 2 pi = 59.96 ohm, the
    textbook's "60"), ohm."""
    _check(drill, antipad)
    return ETA0 / (2 * np.pi * np.sqrt(dk)) * np.log(antipad / drill)


def _check(drill: float, antipad: float) -> None:
    if not (np.isfinite(drill) and np.isfinite(antipad) and 0 < drill < antipad):
        raise LossLaneError(
            f"via: drill = {drill:g} m and antipad = {antipad:g} m; the antipad must be wider "
            "than the drill (0 < drill < antipad)"
        )


def circle(cx: float, cy: float, radius: float, panels: int) -> np.ndarray:
    """Vertices (K+1, 2) of a closed polygon of ``panels`` equal chords on the circle,
    counter-clockwise, the radius scaled so the polygon's area equals the circle's."""
    k = np.arange(panels + 1) * 2 * np.pi / panels
    r = radius * np.sqrt(2 * np.pi / (panels * np.sin(2 * np.pi / panels)))
    return np.column_stack([cx + r * np.cos(k), cy + r * np.sin(k)])


def stadium(half_length: float, radius: float, panels: int) -> np.ndarray:
    """Vertices of an oblong opening: half-circles of ``radius`` centred at x =
    +-``half_length`` joined by straight edges at y = +-radius; ``panels`` panels spread
    evenly along its length."""
    arc = np.pi * radius
    straight = 2 * half_length
    per = (2 * arc + 2 * straight) / panels
    n_arc = max(8, int(round(arc / per)))
    n_line = max(1, int(round(straight / per))) if straight > 0 else 0
    pts = []
    t = np.linspace(-np.pi / 2, np.pi / 2, n_arc + 1)
    pts.append(np.column_stack([half_length + radius * np.cos(t), radius * np.sin(t)]))
    if n_line:
        x = np.linspace(half_length, -half_length, n_line + 1)[1:-1]
        pts.append(np.column_stack([x, np.full(x.shape, radius)]))
    t = np.linspace(np.pi / 2, 3 * np.pi / 2, n_arc + 1)
    pts.append(np.column_stack([-half_length + radius * np.cos(t), radius * np.sin(t)]))
    if n_line:
        x = np.linspace(-half_length, half_length, n_line + 1)[1:-1]
        pts.append(np.column_stack([x, np.full(x.shape, -radius)]))
    poly = np.vstack(pts)
    return np.vstack([poly, poly[:1]])


def _panel_potential(p: np.ndarray, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """-(1/2 pi) int ln|p - y| ds_y over the straight panels a -> b, for every point p:
    (P, 2) x (Q, 2) -> (P, Q); the integral in closed form."""
    d = b - a
    length = np.hypot(d[:, 0], d[:, 1])
    t = d / length[:, None]
    rel = p[:, None, :] - a[None, :, :]
    u = rel[..., 0] * t[None, :, 0] + rel[..., 1] * t[None, :, 1]
    h = np.abs(rel[..., 0] * t[None, :, 1] - rel[..., 1] * t[None, :, 0])

    def prim(x: np.ndarray) -> np.ndarray:
        r2 = x * x + h * h
        with np.errstate(divide="ignore", invalid="ignore"):
            lg = np.where(r2 > 0, 0.5 * x * np.log(np.where(r2 > 0, r2, 1.0)), 0.0)
        return lg - x + h * np.arctan2(x, h)

    return -(prim(length[None, :] - u) - prim(-u)) / (2 * np.pi)


def maxwell_capacitance(contours: list[np.ndarray], grounded: list[bool]) -> np.ndarray:
    """The Maxwell capacitance matrix (n, n) per metre in vacuum of the conductors whose
    closed polygons are ``contours`` ((K+1, 2) vertices each, metres); ``grounded``
    contours are held at 0 and do not count among the n conductors. Boundary elements
    (see the module docstring)."""
    scale = max(float(np.ptp(np.vstack(c), axis=0).max()) for c in contours)
    a = np.vstack([c[:-1] for c in contours]) / scale
    b = np.vstack([c[1:] for c in contours]) / scale
    owner = np.concatenate([np.full(len(c) - 1, k) for k, c in enumerate(contours)])
    mid = 0.5 * (a + b)
    lengths = np.hypot(*(b - a).T)
    g = _panel_potential(mid, a, b) / EPS0
    signals = [k for k, gr in enumerate(grounded) if not gr]
    rhs = np.stack([(owner == k).astype(float) for k in signals], axis=1)
    sigma = np.linalg.solve(g, rhs)
    q = lengths[:, None] * sigma
    return np.array([[q[owner == i, j].sum() for j in range(len(signals))] for i in signals])


def opening_capacitance(
    drill: float,
    antipad: float,
    pitch: float | None = None,
    shape: str = "oblong",
    offset: float = 0.0,
    panels: int = 64,
) -> np.ndarray:
    """C_0 (n, n) per metre in vacuum of one barrel (``pitch`` None; off centre by
    ``offset``) or a pair of barrels ``pitch`` apart in their antipad: ``shape`` "oblong"
    (one stadium opening of width ``antipad`` around both) or "round" (a round opening of
    ``antipad`` around each barrel; the openings must not overlap)."""
    _check(drill, antipad)
    r, big = drill / 2, antipad / 2
    if pitch is None:
        if offset == 0.0:
            return np.array([[coax_capacitance(drill, antipad)]])
        if not abs(offset) + r < big:
            raise LossLaneError("via: the barrel off centre reaches the antipad's edge")
        contours = [circle(offset, 0.0, r, panels), circle(0.0, 0.0, big, 2 * panels)]
        return maxwell_capacitance(contours, [False, True])
    if shape not in SHAPES:
        raise LossLaneError(f"via: antipad_shape = {shape!r}; valid: {', '.join(SHAPES)}")
    if not pitch > drill:
        raise LossLaneError(
            f"via: pitch = {pitch:g} m must exceed the drill ({drill:g} m): the barrels touch"
        )
    if shape == "round":
        if not pitch >= antipad:
            raise LossLaneError(
                f"via: round antipads of {antipad:g} m around barrels {pitch:g} m apart "
                'overlap; use antipad_shape = "oblong" or a larger pitch'
            )
        c = coax_capacitance(drill, antipad)
        return np.array([[c, 0.0], [0.0, c]])
    s = pitch / 2
    contours = [
        circle(-s, 0.0, r, panels),
        circle(s, 0.0, r, panels),
        stadium(s, big, 3 * panels),
    ]
    return maxwell_capacitance(contours, [False, False, True])


def mode_capacitances(c0: np.ndarray) -> dict[str, float]:
    """Per-line modal vacuum capacitances: 'single' of one barrel, 'even' and 'odd'
    (C11 + C12 and C11 - C12, C12 < 0 in Maxwell form) of a symmetric pair."""
    if c0.shape == (1, 1):
        return {"single": float(c0[0, 0])}
    c11 = 0.5 * (c0[0, 0] + c0[1, 1])
    c12 = 0.5 * (c0[0, 1] + c0[1, 0])
    return {"even": float(c11 + c12), "odd": float(c11 - c12)}


def mode_impedance(c_air: float, dk: float) -> float:
    """Z = 1 / (c0 sqrt(eps_r) C_0) of a TEM mode with vacuum capacitance ``c_air``."""
    return 1.0 / (C0 * np.sqrt(dk) * c_air)


__all__ = [
    "SHAPES",
    "coax_capacitance",
    "coax_impedance",
    "maxwell_capacitance",
    "mode_capacitances",
    "mode_impedance",
    "opening_capacitance",
]

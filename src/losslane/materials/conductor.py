"""Conductors: conductivity, skin depth, surface impedance, and the internal impedance of a
line's conductors from DC to full skin effect: a signal strip (``strip_impedance``, exact
DC resistance, a transition fitted to the eddy-current field solution) and the return path
of planes and coplanar grounds (``return_impedance``, a closed-form solution of a slab under
a line current)."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from losslane.errors import LossLaneError

MU0 = 4e-7 * np.pi * (1 + 5.5e-10)  # CODATA 2018 value of the vacuum permeability
EULER_GAMMA = 0.5772156649015329


@dataclass(frozen=True)
class Conductor:
    """A good conductor of conductivity ``sigma`` (S/m) and relative permeability ``mu_r``.

    The default is annealed copper, 5.8e7 S/m (100 % IACS, handbook value).
    """

    sigma: float = 5.8e7
    mu_r: float = 1.0
    name: str = "copper"

    def __post_init__(self) -> None:
        if not np.isfinite(self.sigma) or self.sigma <= 0:
            raise LossLaneError(
                f"conductor {self.name!r}: conductivity = {self.sigma!r} S/m; "
                "valid values are > 0 (copper 5.8e7 S/m)"
            )
        if not np.isfinite(self.mu_r) or self.mu_r < 1:
            raise LossLaneError(
                f"conductor {self.name!r}: mu_r = {self.mu_r!r}; valid values are >= 1"
            )

    def skin_depth(self, f: np.ndarray) -> np.ndarray:
        """delta = 1/sqrt(pi f mu sigma); infinite at DC."""
        f = np.asarray(f, dtype=float)
        with np.errstate(divide="ignore"):
            return 1.0 / np.sqrt(np.pi * f * MU0 * self.mu_r * self.sigma)

    def surface_resistance(self, f: np.ndarray) -> np.ndarray:
        """R_s = 1/(sigma delta) = sqrt(pi f mu / sigma), in ohm per square."""
        f = np.asarray(f, dtype=float)
        return np.sqrt(np.pi * f * MU0 * self.mu_r / self.sigma)

    def surface_impedance(self, f: np.ndarray) -> np.ndarray:
        """Z_s = (1 + j) R_s of a smooth, thick conductor."""
        return (1 + 1j) * self.surface_resistance(f)


COPPER = Conductor()


def _coth_excess(x2: np.ndarray) -> np.ndarray:
    """h = (x coth x - 1) / x^2 as a function of x^2 (complex), exact at x = 0, no overflow."""
    x2 = np.asarray(x2, dtype=complex)
    out = np.empty_like(x2)
    small = np.abs(x2) < 2.5e-3
    xs = x2[small]
    out[small] = 1 / 3 - xs / 45 + 2 * xs**2 / 945
    x = np.sqrt(x2[~small])
    out[~small] = (x / np.tanh(x) - 1) / x2[~small]
    return out


def internal_impedance(
    f: np.ndarray,
    conductor: Conductor,
    geometry_factor: ArrayLike,
    depth: ArrayLike,
    roughness: ArrayLike = 1.0,
) -> tuple[np.ndarray, np.ndarray]:
    """Internal resistance and inductance per unit length (R, L_int) of a conducting slab
    of half-thickness ``depth`` tau carrying current on its faces:
    Z_int = (k / sigma) G coth(k tau), k = (1 + j)/delta, the exact slab solution
    (Ramo, Whinnery, Van Duzer), with ``geometry_factor`` G Wheeler's factor, so that
    Z -> (1 + j) R_s G at high frequency (Proc. IRE 30, 1942) and G/(sigma tau) at DC;
    the internal inductance at DC is mu G tau / 3. ``roughness`` K(f) scales the part
    above the DC resistance: Z = R_dc (1 + K (k tau coth(k tau) - 1)).

    The first term of the strip model (``strip_impedance``) is this slab. G and tau may
    be arrays (e.g. one value per geometry sample, shape (S, 1)) that broadcast against
    ``f``; where G = 0 the result is 0.
    """
    f = np.asarray(f, dtype=float)
    gf = np.asarray(geometry_factor, dtype=float)
    depth = np.asarray(depth, dtype=float)
    live = gf != 0.0
    bad = live & ~(np.isfinite(depth) & (depth > 0))
    if np.any(bad):
        shown = depth if depth.ndim == 0 else np.broadcast_to(depth, bad.shape)[bad][0]
        raise LossLaneError(f"conductor depth {float(shown)!r} m must be > 0")
    tau = np.where(live, depth, 1.0)
    mu = MU0 * conductor.mu_r
    omega = 2 * np.pi * f
    x2 = 1j * omega * mu * conductor.sigma * tau**2
    kh = np.asarray(roughness) * _coth_excess(x2)
    r_dc = np.where(live, gf, 0.0) / (conductor.sigma * tau)
    # Z = r_dc (1 + K x^2 h(x^2)) and x^2 = j w mu sigma tau^2, so both parts stay finite at DC
    resistance = r_dc * (1.0 - omega * mu * conductor.sigma * tau**2 * kh.imag)
    inductance = r_dc * mu * conductor.sigma * tau**2 * kh.real
    return resistance, inductance


#: the least value of |c1| in ``sheet_return``: the return current's spreading at the lowest
#: frequencies is capped near 140 h (a plane about 100 structure sizes wide, as in the
#: eddy-current solver's default); an infinitely wide plane would make the 2-D inductance
#: diverge at DC
SPREAD_FLOOR = 0.04


def exp_e1(c: ArrayLike) -> np.ndarray:
    """e^c E1(c) for complex c off the negative real axis (E1 the exponential integral,
    principal branch), to about
    1e-12 and without overflow: the asymptotic series 1/c - 1/c^2 + 2/c^3 - ... for
    |c| > 40 (fewer terms the larger |c|), the continued fraction
    1/(c + 1 - 1/(c + 3 - 4/(c + 5 - ...))) for 2 < |c| <= 40, and the power series
    E1(c) = -gamma - ln c - sum (-c)^n / (n n!) for |c| <= 2 and, in the left half-plane,
    |c| <= 16 (Abramowitz and Stegun, 5.1.11, 5.1.22, 5.1.51). Accurate for
    |arg c| < 175 degrees (the modal returns of a pair reach about 160)."""
    c = np.asarray(c, dtype=complex)
    out = np.empty_like(c)
    a = np.abs(c)
    for lo, hi, terms in ((40.0, 200.0, 14), (200.0, np.inf, 7)):
        sel = (a > lo) & (a <= hi)
        if np.any(sel):
            u = 1.0 / c[sel]
            acc = np.ones_like(u)
            for n in range(terms - 1, 0, -1):  # Horner: 1 - u (1 - 2 u (1 - 3 u ...))
                acc = 1.0 - n * u * acc
            out[sel] = u * acc
    for lo, hi, depth in ((2.0, 8.0, 60), (8.0, 40.0, 24)):
        sel = (a > lo) & (a <= hi)
        if np.any(sel):
            cm = c[sel]
            t = np.zeros_like(cm)
            for k in range(depth, 0, -1):
                t = k * k / (cm + (2 * k + 1) - t)
            out[sel] = 1.0 / (cm + 1.0 - t)
    # the power series also serves the left half-plane up to |c| = 16, where its terms
    # do not cancel and the continued fraction converges slowly (near the cut)
    sel = (a <= 2.0) | ((a <= 16.0) & (c.real < 0))
    if np.any(sel):
        cs = c[sel]
        total = np.zeros_like(cs)
        term = np.ones_like(cs)
        for n in range(1, 26 if np.all(np.abs(cs) <= 2.0) else 80):
            term = -term * cs / n
            total = total - term / n
        out[sel] = np.exp(cs) * (-EULER_GAMMA - np.log(cs) + total)
    return out


def sheet_return(
    f: np.ndarray,
    conductor: Conductor,
    geometry_factor: ArrayLike,
    thickness: ArrayLike,
    floor: float = SPREAD_FLOOR,
    pair: tuple[ArrayLike, ArrayLike, float] | None = None,
) -> tuple[np.ndarray, np.ndarray]:
    """Internal resistance and inductance per unit length (R, L_int) of a wide return
    conductor of ``thickness`` whose Wheeler factor is G = ``geometry_factor``, from DC to
    full skin effect.

    The return is a conducting slab under a line current at the height h = 1/(2 pi G) at
    which a filament over a perfect plane has that factor. Its exact spectral solution
    (each transverse wavenumber kappa of the field reflected by the slab,
    Z = (j w mu / pi) int exp(-2 kappa h) / (kappa + Y(kappa)) dkappa, Y the slab's input
    admittance) has, with the slab's propagation constant taken as k = (1 + j)/delta
    (exact for a thin slab, and for kappa << 1/delta), the closed form

        Z = (j w mu / 2 pi) S,  S = e^c1 E1(c1) + e^c2 E1(c2),
        c1 = 2 h k tanh(k t / 2),  c2 = 2 h k coth(k t / 2),

    so R = -(w mu / 2 pi) Im S and L_int = (mu / 2 pi) Re S. Its limits: Wheeler's
    (1 + j) Rs G when delta << t; the thin sheet of resistance G/(sigma t) while the
    current is held under the line by induction (delta > t, |c1| >> 1); and w mu / 4 when
    the current spreads across the plane (|c1| << 1, the 2-D low-frequency limit,
    independent of the metal). The spreading is capped by ``floor`` (c1 -> c1 + floor),
    which keeps the inductance finite at DC; R(0) = 0.
    Where G = 0 the result is 0.

    ``pair`` = (h, d, sign): the return of one mode of a symmetric pair, two line currents
    at the height h, d apart, in phase (sign +1, even) or opposed (-1, odd); the result is
    per line. The spectrum of the two currents carries the factor 1 + sign cos(kappa d),
    and cos(kappa d) e^(-2 kappa h) = Re e^(-kappa (2h - j d)), so

        S_pair = S(2h) + (sign / 2) (S(2h - j d) + S(2h + j d)),

    S(H) the sum above with c1, c2 scaled by H / 2h (the floor with them: the odd mode's
    spreading terms cancel, leaving the loop of the two lines, mu/(4 pi) ln(1 + d^2/4h^2)
    at DC). At high frequency its factor is (1 + sign 4h^2/(4h^2 + d^2)) / (2 pi h),
    the image solution of two filaments (``pair_return_shape`` picks h and d to match the
    modes' Wheeler factors). G then only marks where the group is live.
    """
    f = np.asarray(f, dtype=float)
    gf = np.asarray(geometry_factor, dtype=float)
    tp = np.asarray(thickness, dtype=float)
    mu = MU0 * conductor.mu_r
    omega = 2 * np.pi * f
    live = gf > 0
    if pair is None:
        h = 1.0 / (2 * np.pi * np.where(live, gf, 1.0))
    else:
        h = np.asarray(pair[0], float)
    k = np.sqrt(1j * omega * mu * conductor.sigma)
    x = 0.5 * k * tp
    small = np.abs(x) < 1e-6
    xs = np.where(small, 1.0, x)
    # tanh(x) and coth(x), with their series where x -> 0 (DC)
    th = np.where(small, x, np.tanh(xs))
    c1 = 2 * h * k * th + floor
    c2 = np.where(small, 4 * h / tp + 2 * h * k * x / 3, 2 * h * k / np.where(small, 1.0, th))
    c1, c2 = np.broadcast_arrays(c1, c2)
    total = exp_e1(c1) + exp_e1(c2)
    if pair is not None:
        ratio = np.asarray(pair[1], float) / (2 * h)
        for q in (1 - 1j * ratio, 1 + 1j * ratio):
            total = total + 0.5 * pair[2] * (exp_e1(c1 * q) + exp_e1(c2 * q))
    y = mu / (2 * np.pi) * live * total  # Z / (j w)
    return -omega * y.imag, y.real


def pair_return_shape(g_even: ArrayLike, g_odd: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """(h, d) of two line currents over a plane whose per-line Wheeler factors are the
    return path's ``g_even`` and ``g_odd`` (the sums over its parts): by the image
    solution G_even + G_odd = 1 / (pi h) and (G_even - G_odd)/(G_even + G_odd) =
    4h^2/(4h^2 + d^2). Modes that the returns cannot tell apart get d far beyond h."""
    ge, go = np.asarray(g_even, float), np.asarray(g_odd, float)
    total = np.where(ge + go > 0, ge + go, 1.0)
    h = 1.0 / (np.pi * total)
    rho = np.clip((ge - go) / total, 1e-9, 1.0 - 1e-9)
    return h, 2 * h * np.sqrt((1.0 - rho) / rho)


def filament_between_planes(
    g_lower: ArrayLike, g_upper: ArrayLike
) -> tuple[np.ndarray, np.ndarray]:
    """Heights (h1, h2) above the lower and below the upper plane of a line current between
    two perfectly conducting planes whose Wheeler factors are ``g_lower`` and ``g_upper``.

    By conformal mapping the current on the lower plane is
    J(x) = (I / 2b) sin(theta) / (cosh(pi x / b) - cos(theta)), theta = pi h1 / b,
    b = h1 + h2, so that G_lower = int J^2 / I^2 = (1 + (pi - theta) cot(theta)) / (2 pi b)
    and G_upper = (1 - theta cot(theta)) / (2 pi b); theta follows from their ratio
    (bisection: the ratio falls from infinity to 0 as theta goes from 0 to pi), then b."""
    g1, g2 = np.broadcast_arrays(np.asarray(g_lower, float), np.asarray(g_upper, float))
    ratio = g1 / np.where(g2 > 0, g2, 1.0)
    lo, hi = np.full(ratio.shape, 1e-9), np.full(ratio.shape, np.pi - 1e-9)
    for _ in range(60):
        th = 0.5 * (lo + hi)
        cot = 1.0 / np.tan(th)
        big = (1.0 + (np.pi - th) * cot) > ratio * (1.0 - th * cot)
        lo, hi = np.where(big, th, lo), np.where(big, hi, th)
    th = 0.5 * (lo + hi)
    b = (1.0 + (np.pi - th) / np.tan(th)) / (2 * np.pi * np.where(g1 > 0, g1, 1.0))
    return b * th / np.pi, b * (1.0 - th / np.pi)


#: nodes of the transverse wavenumber in ``two_plane_excess`` (trapezoid in ln kappa; 48
#: nodes are within 1e-5 of a 4000-node sum), how many (sample, frequency) points are
#: summed at once, and the sweeps (more points than ``TWO_PLANE_GRID``) summed on a grid
TWO_PLANE_NODES = 48
TWO_PLANE_CHUNK = 16384
TWO_PLANE_GRID = 200
TWO_PLANE_PER_DECADE = 16


def two_plane_excess(
    f: np.ndarray,
    conductor: Conductor,
    factors: tuple[ArrayLike, ArrayLike],
    thickness: tuple[ArrayLike, ArrayLike],
    floor: float = SPREAD_FLOOR,
) -> tuple[np.ndarray, np.ndarray]:
    """What a return of two planes (a stripline's) has beyond ``sheet_return``'s single
    sheet per plane, as (Delta S_1, Delta S_2) with Z_i = (j w mu / 2 pi) Delta S_i: the
    exact spectral solution of a line current between two thin conducting sheets,

        S2 = int [F(Gamma1, Gamma2) - F(-1, -1)] dkappa / kappa,
        F = (Gamma1 e1 + Gamma2 e2 + 2 Gamma1 Gamma2 eb) / (1 - Gamma1 Gamma2 eb),
        e_i = exp(-2 kappa h_i),  eb = e1 e2,  Gamma_i = -a_i / (a_i + 2 kappa),
        a_i = j w mu sigma t_i + floor / h,  h = 1 / (2 pi (G1 + G2))

    (a source between two reflectors; each sheet reflects the transverse wavenumber kappa
    by Gamma_i), with the current at the heights (h1, h2) whose image solution gives the
    planes' Wheeler ``factors`` (G1, G2) (``filament_between_planes``), less the thin-sheet
    limit of what ``sheet_return`` gives the two planes, sum_i (G_i / G) e^c_i E1(c_i),
    c_i = a_i h. The planes couple through the space between them while their current
    spreads, which the single sheets miss (a stripline's inductance was up to 2 % low at
    1-3 MHz against the eddy-current solution). Both tend to the same image solution at
    high frequency, so Delta S -> 0 there. The excess is shared by G_i / G. Summed on
    ``TWO_PLANE_NODES`` nodes of ln kappa (trapezoid), ``TWO_PLANE_CHUNK`` points at a
    time; a long sweep (more than ``TWO_PLANE_GRID`` frequencies) is summed on a grid of
    ``TWO_PLANE_PER_DECADE`` frequencies per decade and interpolated in ln f (Delta S is a
    smooth function of ln f; the interpolation moves it by about 1e-3 of itself)."""
    f = np.asarray(f, float)
    if f.ndim != 1 or f.size <= TWO_PLANE_GRID or not np.any(f > 0):
        return _two_plane_sum(f, conductor, factors, thickness, floor)
    pos = f[f > 0]
    lo, hi = np.log10(pos.min()), np.log10(pos.max())
    n = max(2, int(np.ceil((hi - lo) * TWO_PLANE_PER_DECADE)) + 1)
    grid = np.concatenate([[0.0], np.logspace(lo, hi, n)])
    on_grid = _two_plane_sum(grid, conductor, factors, thickness, floor)
    # interpolation in ln f on the grid's last axis (0 Hz is a grid point of its own)
    x = np.log(grid[1:])
    xf = np.log(np.where(f > 0, f, grid[1]))
    j = np.clip(np.searchsorted(x, xf), 1, x.size - 1)
    wgt = np.clip((xf - x[j - 1]) / (x[j] - x[j - 1]), 0.0, 1.0)
    out = []
    for part in on_grid:
        vals = part[..., 1:]
        y = vals[..., j - 1] * (1 - wgt) + vals[..., j] * wgt
        out.append(np.where(f > 0, y, part[..., :1]))
    return out[0], out[1]


def _two_plane_sum(
    f: np.ndarray,
    conductor: Conductor,
    factors: tuple[ArrayLike, ArrayLike],
    thickness: tuple[ArrayLike, ArrayLike],
    floor: float,
) -> tuple[np.ndarray, np.ndarray]:
    """``two_plane_excess`` summed at every point of ``f`` (broadcast with the factors)."""
    f = np.asarray(f, float)
    g1, g2, t1, t2 = (np.asarray(v, float) for v in (*factors, *thickness))
    shape = np.broadcast_shapes(f.shape, g1.shape, g2.shape, t1.shape, t2.shape)
    ff, g1, g2, t1, t2 = (np.broadcast_to(v, shape).ravel() for v in (f, g1, g2, t1, t2))
    h1, h2 = filament_between_planes(g1, g2)
    h = 1.0 / (2 * np.pi * (g1 + g2))
    mu = MU0 * conductor.mu_r
    u = np.linspace(np.log(1e-5), np.log(60.0), TWO_PLANE_NODES)  # kappa * min(h1, h2)
    w = np.full(u.size, u[1] - u[0])
    w[[0, -1]] *= 0.5
    total = np.empty(ff.size, complex)
    for lo in range(0, ff.size, TWO_PLANE_CHUNK):
        sl = slice(lo, lo + TWO_PLANE_CHUNK)
        kap = np.exp(u)[None, :] / np.minimum(h1[sl], h2[sl])[:, None]
        jw = 1j * 2 * np.pi * ff[sl] * mu * conductor.sigma
        a1 = jw * t1[sl] + floor / h[sl]
        a2 = jw * t2[sl] + floor / h[sl]
        r1 = -a1[:, None] / (a1[:, None] + 2 * kap)
        r2 = -a2[:, None] / (a2[:, None] + 2 * kap)
        e1 = np.exp(-2 * kap * h1[sl][:, None])
        e2 = np.exp(-2 * kap * h2[sl][:, None])
        eb = e1 * e2
        sheets = (r1 * e1 + r2 * e2 + 2 * r1 * r2 * eb) / (1 - r1 * r2 * eb)
        perfect = (2 * eb - e1 - e2) / (1 - eb)
        two = (sheets - perfect) @ w
        g = g1[sl] + g2[sl]
        one = (g1[sl] * exp_e1(a1 * h[sl]) + g2[sl] * exp_e1(a2 * h[sl])) / g
        total[sl] = two - one
    share = g1 / (g1 + g2)
    return (share * total).reshape(shape), ((1 - share) * total).reshape(shape)


def return_impedance(
    f: np.ndarray,
    conductor: Conductor,
    parts: list[tuple[ArrayLike, ArrayLike, ArrayLike]],
    floor: float = SPREAD_FLOOR,
    pair: tuple[ArrayLike, ArrayLike, float] | None = None,
    two_planes: bool = False,
) -> list[tuple[np.ndarray, np.ndarray]]:
    """Resistance and internal inductance per unit length (R_i, L_i) of each part of a
    line's return path, ``parts`` = [(G_i, thickness_i, roughness K_i)]: its planes and
    coplanar grounds, all joined at the line's ends.

    At high frequency each part carries its own share of the current and its loss is
    K_i Rs G_i; where the current spreads (below the skin-effect regime) the parts act
    as one return, since the field reaches through them all. Both follow from treating
    the return as one sheet of factor G = sum G_i (``sheet_return``) whose impedance each
    part takes in the proportion G_i / G, with its own thickness and roughness:
    Z_i = K_i (G_i / G) Z_sheet(G, t_i). One part: Z = K Z_sheet(G, t). K may be complex
    (a plated stack). ``pair``: (h, d, sign) of one mode of a symmetric pair (see
    ``sheet_return``); each part then takes its share of that mode's return.
    ``two_planes``: the two parts are the planes above and below a single line (a
    stripline), which couple while their current spreads (``two_plane_excess``).
    """
    f = np.asarray(f, dtype=float)
    if not parts:
        return []
    g_total = sum(np.asarray(g, float) for g, _, _ in parts)
    safe = np.where(g_total > 0, g_total, 1.0)
    omega = 2 * np.pi * f
    out = []
    sheets: dict = {}
    excess = (0.0, 0.0)
    if two_planes and pair is None and len(parts) == 2:
        excess = two_plane_excess(
            f, conductor, (parts[0][0], parts[1][0]), (parts[0][1], parts[1][1]), floor
        )
    mu = MU0 * conductor.mu_r
    for n, (g, t, k) in enumerate(parts):
        key = float(t) if np.ndim(t) == 0 else id(t)
        if key not in sheets:  # parts of one thickness share the sheet's impedance
            sheets[key] = sheet_return(f, conductor, g_total, t, floor, pair)
        r, l_int = sheets[key]
        share = np.asarray(g, float) / safe
        # K (complex for a plated stack) scales the impedance: Z / (j w) = L - j R / w
        # -> K (L - j R / w), kept in that form so that DC stays finite
        with np.errstate(invalid="ignore", divide="ignore"):
            r_over_w = np.where(omega > 0, r / np.where(omega > 0, omega, 1.0), 0.0)
        y = np.asarray(k) * (share * (l_int - 1j * r_over_w) + mu / (2 * np.pi) * excess[n])
        out.append((-omega * y.imag, y.real))
    return out


# BEGIN fitted strip transition (written by tools/fit_strip_transition.py; do not edit)
#: knots of ln(width/thickness) and the fitted ln(alpha), ln(d) there; eps = (e0 + e1 ln(w/t)
#: + e2 ln(w/h)) / (1 + (w/(8 h))^2); see ``transition_shape``
TRANSITION_KNOTS = (0.089841, 0.783445, 1.476820, 2.169968, 2.863343, 3.556205)
TRANSITION_ALPHA = (0.289147, 0.410691, 0.782687, 0.933952, 1.068534, 1.235857)
TRANSITION_D = (1.744842, 1.539324, 0.809265, 0.758454, 0.829902, 0.948750)
TRANSITION_EPS = (0.006333, 0.004179, 0.016855)
TRANSITION_NOTE = (
    "51 eddy-current solves (microstrip and stripline, 0.5-2 oz strips, 1 oz planes); strip "
    "R within 4.5 % for 0.1 <= tau/delta <= 25"
)
# END fitted strip transition

#: the proximity w/h above which the high-frequency deficit fades (see ``transition_shape``)
PROXIMITY_FADE = 8.0

# BEGIN fitted transition correction (written by tools/fit_strip_transition.py; do not edit)
#: tau/delta of the poles; the box of (ln(w/t), ln(w/h)) fitted; one row of
#: coefficients (of 1, a, p, a^2, a p, p^2, r, r a, r p) per band between adjacent
#: poles
CORRECTION_POLES: tuple[float, ...] = (
    0.250000,
    0.406813,
    0.661986,
    1.077217,
    1.752903,
    2.852412,
    4.641589,
    7.553028,
    12.290670,
    20.000000,
)
CORRECTION_BOX: tuple[tuple[float, float], tuple[float, float]] = (
    (0.090597, 3.556333),
    (-0.653926, 1.487220),
)
CORRECTION: tuple[tuple[float, ...], ...] = (
    (-0.002436, -0.005456, 0.019792, 0.000618, 0.005623, -0.023205, 0.000601, 0.000403, 0.004699),
    (-0.017816, 0.025699, -0.082975, 0.000923, -0.023247, 0.155001, -0.029415, 0.005763, -0.020815),
    (0.024370, 0.014328, 0.184000, -0.021700, 0.000325, -0.318736, 0.094884, -0.035215, 0.007168),
    (0.106860, -0.140477, -0.374291, 0.050611, 0.062403, 0.336778, -0.112533, 0.075820, 0.051194),
    (
        -0.070756,
        -0.054487,
        0.442309,
        0.021193,
        -0.075927,
        -0.469951,
        0.165666,
        -0.080202,
        -0.061458,
    ),
    (0.167456, 0.462751, -0.875563, -0.192907, 0.303676, 0.523607, 0.031307, -0.037558, 0.095405),
    (0.020728, -0.659785, 1.389358, 0.257485, -0.515557, -1.068028, -0.123871, 0.058622, -0.140580),
    (0.854703, 0.291356, -1.176990, -0.249559, 0.700457, 0.588657, -0.580084, 0.404109, 0.195079),
    (-2.199568, 1.020736, 1.086148, -0.050800, -0.752639, -0.053307, 1.016712, -0.805326, 0.225980),
)
CORRECTION_NOTE = (
    "minimax over 75 eddy-current solves (64 inside the declared ranges): strip R within "
    "2.0 % inside, 6.5 % outside, 0.05 <= tau/delta <= 40"
)
# END fitted transition correction


def correction_features(
    aspect: ArrayLike, proximity: ArrayLike, balance: ArrayLike = 0.0
) -> list[np.ndarray]:
    """The terms of the correction's coefficients: 1, a, p, a^2, a p, p^2 with
    a = ln(w/t) and p = ln(w/h) held inside the fitted box (``CORRECTION_BOX``), and
    r, r a, r p with r the nearer plane's distance over the farther's (0 for one plane;
    1 for a centred stripline)."""
    (a_lo, a_hi), (p_lo, p_hi) = CORRECTION_BOX
    a = np.clip(np.log(np.asarray(aspect, float)), a_lo, a_hi)
    p = np.clip(np.log(np.asarray(proximity, float)), p_lo, p_hi)
    r = np.clip(np.asarray(balance, float), 0.0, 1.0)
    return [np.ones_like(a), a, p, a * a, a * p, p * p, r * np.ones_like(a), r * a, r * p]


def transition_correction(
    s: np.ndarray, aspect: ArrayLike, proximity: ArrayLike, balance: ArrayLike = 0.0
) -> np.ndarray:
    """The fitted correction to ``strip_impedance``'s (Phi - 1)/s: a sum of band-pass terms
    c_k (1/(s + p_k) - 1/(s + p_(k+1))), with the poles p_k = 2 x_k^2 at fixed
    tau/delta = x_k (``CORRECTION_POLES``) and each c_k a quadratic in ln(w/t) and
    ln(w/h), plus terms in the planes' balance (``correction_features``). Each term is a
    causal rational function that vanishes at DC and at high frequency, so the DC
    resistance and Wheeler's limit stay exact and R and L_int stay a causal pair; 0 where
    nothing is fitted. Beyond the fitted w/h it fades as h/w."""
    if not CORRECTION:
        return np.zeros(1)
    feats = correction_features(aspect, proximity, balance)
    poles = [2.0 * x * x for x in CORRECTION_POLES]
    out = 0.0
    for k, row in enumerate(CORRECTION):
        ck = sum(b * v for b, v in zip(row, feats, strict=True))
        out = out + ck * (1.0 / (s + poles[k]) - 1.0 / (s + poles[k + 1]))
    # beyond the box's widest strips it fades as h/w: the edges' share of the current,
    # where the strip's transition departs from the slab's, falls so (parallel plates)
    widest = np.exp(CORRECTION_BOX[1][1])
    return np.asarray(out) * np.minimum(1.0, widest / np.asarray(proximity, float))


def transition_shape(
    aspect: ArrayLike, proximity: ArrayLike
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(alpha, d, eps) of ``strip_impedance`` for a strip of width/thickness ``aspect``
    whose width is ``proximity`` times its distance to the nearest plane (the fitted
    functions, clamped to the fitted range of w/t)."""
    la = np.log(np.asarray(aspect, float))
    lp = np.log(np.asarray(proximity, float))
    alpha = np.exp(np.interp(la, TRANSITION_KNOTS, TRANSITION_ALPHA))
    d = np.exp(np.interp(la, TRANSITION_KNOTS, TRANSITION_D))
    e0, e1, e2 = TRANSITION_EPS
    lo, hi = TRANSITION_KNOTS[0], TRANSITION_KNOTS[-1]
    # fitted over w/h 0.5 .. 3; it fades for wide strips (the edges' share of the
    # current, where the deficit arises, falls as h/w: the parallel-plate limit)
    eps = e0 + e1 * np.clip(la, lo, hi) + e2 * np.clip(lp, np.log(0.5), np.log(3.0))
    prox = np.exp(lp)
    return alpha, d, eps / (1.0 + (prox / PROXIMITY_FADE) ** 2)


def strip_impedance(
    f: np.ndarray,
    conductor: Conductor,
    geometry_factor: ArrayLike,
    depth: ArrayLike,
    roughness: ArrayLike = 1.0,
    aspect: ArrayLike = 4.0,
    proximity: ArrayLike = 1.5,
    corrected: bool = True,
    balance: ArrayLike = 0.0,
) -> tuple[np.ndarray, np.ndarray]:
    """Internal resistance and inductance per unit length (R, L_int) of a signal strip
    from DC through the skin-effect transition.

    ``geometry_factor`` G is Wheeler's factor of the strip (R -> Rs G at high frequency,
    Proc. IRE 30, 1942) and ``depth`` tau = G * area, so that G/(sigma tau) is the exact
    DC resistance R_dc. With s = j w mu sigma tau^2 the normalised impedance is

        Phi(s) = (1/alpha) z coth z + (1 - 1/alpha) / (1 + s/d),   z^2 = alpha^2 s,

    the exact impedance of a slab of depth alpha tau that carries the skin current
    (Ramo, Whinnery, Van Duzer) plus the part of the DC resistance that the current's
    crowding toward the surfaces bypasses; both are positive-real, so R and L_int form a
    causal pair. Phi(0) = 1 and Phi -> sqrt(s) = Rs G (1 + j)/R_dc at high frequency. The
    shape (alpha, d) and a small high-frequency deficit eps (the closed forms' G against the
    field solution with conductors meshed) are fitted functions of w/t (``aspect``) and of
    w/h (``proximity``, h the distance to the nearer plane) from the eddy-current solver
    (``transition_shape``; tools/fit_strip_transition.py). Then

        Z = R_dc (1 + K ((1 - eps) (Phi - 1) + s C(s))),

    with ``roughness`` K(f) scaling the part above the DC resistance, as for every
    conductor (DC exact whatever the foil), and C(s) the fitted correction
    (``transition_correction``; ``corrected=False`` leaves it out, for strips that are not
    over planes; ``balance`` the nearer plane's distance over the farther's): the
    slab-plus-relaxation family cannot follow the eddy-current R of a wide thin strip
    (whose R/R_dc climbs slowly for a decade before the skin effect) nor of copper about as
    thick as wide between close planes, and with the correction the strip's R is within
    2 % of the eddy-current solution over the fitting geometries inside the declared ranges
    (``CORRECTION_NOTE``). Where G = 0 the result is 0.
    """
    f = np.asarray(f, dtype=float)
    gf = np.asarray(geometry_factor, dtype=float)
    depth = np.asarray(depth, dtype=float)
    live = gf != 0.0
    bad = live & ~(np.isfinite(depth) & (depth > 0))
    if np.any(bad):
        shown = depth if depth.ndim == 0 else np.broadcast_to(depth, bad.shape)[bad][0]
        raise LossLaneError(f"conductor depth {float(shown)!r} m must be > 0")
    tau = np.where(live, depth, 1.0)
    alpha, d, eps = transition_shape(aspect, proximity)
    mu = MU0 * conductor.mu_r
    omega = 2 * np.pi * f
    a = mu * conductor.sigma * tau**2  # s = j w a
    s = 1j * omega * a
    # (Phi - 1)/s, finite at DC: alpha h(alpha^2 s) - (1 - 1/alpha)/(d + s), h from coth
    q = alpha * _coth_excess(alpha * alpha * s) - (1.0 - 1.0 / alpha) / (d + s)
    q = (1.0 - eps) * q
    if corrected:
        q = q + transition_correction(s, aspect, proximity, balance)
    q = np.asarray(roughness) * q
    r_dc = np.where(live, gf, 0.0) / (conductor.sigma * tau)
    # Z = r_dc (1 + s q), s = j w a
    resistance = r_dc * (1.0 - omega * a * q.imag)
    inductance = r_dc * a * q.real
    return resistance, inductance

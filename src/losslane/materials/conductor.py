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


def return_impedance(
    f: np.ndarray,
    conductor: Conductor,
    parts: list[tuple[ArrayLike, ArrayLike, ArrayLike]],
    floor: float = SPREAD_FLOOR,
    pair: tuple[ArrayLike, ArrayLike, float] | None = None,
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
    """
    f = np.asarray(f, dtype=float)
    if not parts:
        return []
    g_total = sum(np.asarray(g, float) for g, _, _ in parts)
    safe = np.where(g_total > 0, g_total, 1.0)
    omega = 2 * np.pi * f
    out = []
    sheets: dict = {}
    for g, t, k in parts:
        key = float(t) if np.ndim(t) == 0 else id(t)
        if key not in sheets:  # parts of one thickness share the sheet's impedance
            sheets[key] = sheet_return(f, conductor, g_total, t, floor, pair)
        r, l_int = sheets[key]
        share = np.asarray(g, float) / safe
        # K (complex for a plated stack) scales the impedance: Z / (j w) = L - j R / w
        # -> K (L - j R / w), kept in that form so that DC stays finite
        with np.errstate(invalid="ignore", divide="ignore"):
            r_over_w = np.where(omega > 0, r / np.where(omega > 0, omega, 1.0), 0.0)
        y = share * np.asarray(k) * (l_int - 1j * r_over_w)
        out.append((-omega * y.imag, y.real))
    return out


# BEGIN fitted strip transition (written by tools/fit_strip_transition.py; do not edit)
#: knots of ln(width/thickness) and the fitted ln(alpha), ln(d) there; eps = (e0 + e1 ln(w/t)
#: + e2 ln(w/h)) / (1 + (w/(8 h))^2); see ``transition_shape``
TRANSITION_KNOTS = (0.089841, 0.783445, 1.476820, 2.169968, 2.863343, 3.556205)
TRANSITION_ALPHA = (0.294286, 0.419831, 0.792211, 0.939910, 1.071729, 1.235835)
TRANSITION_D = (1.741970, 1.517869, 0.800383, 0.754119, 0.827599, 0.948698)
TRANSITION_EPS = (0.005913, 0.004323, 0.016209)
TRANSITION_NOTE = (
    "51 eddy-current solves (microstrip and stripline, 0.5-2 oz strips, 1 oz planes); strip "
    "R within 4.5 % for 0.1 <= tau/delta <= 25"
)
# END fitted strip transition

#: the proximity w/h above which the high-frequency deficit fades (see ``transition_shape``)
PROXIMITY_FADE = 8.0


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

        Z = R_dc (1 + K (1 - eps) (Phi - 1)),

    with ``roughness`` K(f) scaling the part above the DC resistance, as for every
    conductor (DC exact whatever the foil). Where G = 0 the result is 0.
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
    q = np.asarray(roughness) * (1.0 - eps) * q
    r_dc = np.where(live, gf, 0.0) / (conductor.sigma * tau)
    # Z = r_dc (1 + s q), s = j w a
    resistance = r_dc * (1.0 - omega * a * q.imag)
    inductance = r_dc * a * q.real
    return resistance, inductance

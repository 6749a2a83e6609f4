"""Independent numerical solutions for the coupled-line tests (not used by the library).

* ``sda_capacitance``: a spectral-domain Galerkin method of moments for two zero-thickness
  strips in a layered medium (the textbook spectral-domain approach of T. Itoh and
  R. Mittra, 1970s), with Chebyshev basis functions carrying Maxwell's edge singularity,
  whose Fourier transforms are Bessel functions: the transform of T_n(x/a)/sqrt(1-(x/a)^2)
  is pi a (-j)^n J_n(beta a).
* ``fd_capacitance``: a five-point finite-difference Laplace solution (the same matrix as
  linear finite elements on right triangles, so the discrete energy is an upper bound of
  the true one) for thick rectangular strips between two planes, with Richardson
  extrapolation over three grids.

Both return the capacitance per unit length of ONE strip in the even (+1, +1) or odd
(+1, -1) excitation, so Z = 1/(c0 sqrt(C C_air)) and eps_eff = C / C_air.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla
from scipy.special import jv

EPS0 = 8.8541878128e-12  # CODATA 2018
C0 = 299_792_458.0


def green_microstrip(h: float, er: float) -> Callable[[np.ndarray], np.ndarray]:
    """Spectral potential of a line charge on a grounded slab (thickness h, eps_r), air
    above: 1 / (eps0 |beta| (1 + eps_r coth(|beta| h)))."""
    return lambda b: 1.0 / (EPS0 * b * (1.0 + er / np.tanh(b * h)))


def green_stripline(b_sp: float) -> Callable[[np.ndarray], np.ndarray]:
    """Line charge midway between two planes b_sp apart, homogeneous air."""
    return lambda b: 1.0 / (EPS0 * b * 2.0 / np.tanh(b * b_sp / 2.0))


def sda_capacitance(
    w: float,
    s: float,
    green: Callable[[np.ndarray], np.ndarray],
    mode: str,
    n_basis: int = 6,
    beta_max_a: float = 2000.0,
    points: int = 40001,
) -> float:
    """Capacitance (F/m) of one of two zero-thickness strips of width w, gap s."""
    a = w / 2.0
    x0 = s / 2.0 + a
    t = np.linspace(0.0, 1.0, points)
    ba = beta_max_a * t * t  # beta * a, dense near 0 where the kernel is smooth
    beta = np.maximum(ba / a, 1e-12 / a)
    dbeta_dt = 2.0 * beta_max_a * t / a
    n = np.arange(n_basis)[:, None]
    arg = beta * x0 + n * np.pi / 2.0
    # transform of the symmetric / antisymmetric pair of basis functions (real)
    pair = 2.0 * a * np.pi * jv(n, ba) * (np.cos(arg) if mode == "even" else np.sin(arg))
    integrand = green(beta) * pair[:, None, :] * pair[None, :, :]
    k = np.trapezoid(integrand * dbeta_dt, t, axis=-1) / np.pi
    # tail beyond beta_max: the integrand falls as 1/beta^2 on average
    tail = beta > 0.8 * beta[-1]
    mean = np.trapezoid((integrand * beta**2)[..., tail], beta[tail], axis=-1)
    k += mean / (beta[tail][-1] - beta[tail][0]) / beta[-1] / np.pi
    rhs = np.zeros(n_basis)
    rhs[0] = 2.0 * np.pi * a  # Galerkin test of V = 1 on both strips
    coef = np.linalg.solve(k, rhs)
    return float(coef[0] * np.pi * a)


def sda_microstrip(w: float, s: float, h: float, er: float, mode: str) -> tuple[float, float]:
    """(Z0, eps_eff) of one mode of a zero-thickness coupled microstrip."""
    c = sda_capacitance(w, s, green_microstrip(h, er), mode)
    ca = sda_capacitance(w, s, green_microstrip(h, 1.0), mode)
    return 1.0 / (C0 * np.sqrt(c * ca)), c / ca


def _fd_once(w: float, s: float, b: float, t: float, cells: int, mode: str, margin: float) -> float:
    """Capacitance of one strip of a centred thick pair, air, on a square grid of b/cells.

    Quarter domain: x >= 0 from the symmetry plane between the strips (odd: V = 0;
    even: no flux), y >= 0 from the strips' mid-plane (no flux) up to the plane at b/2.
    """
    d = b / cells
    ny = round(b / 2 / d)
    i0, iw, jt = round(s / 2 / d), round(w / d), round(t / 2 / d)
    for got, want in ((i0 * d, s / 2), (iw * d, w), (jt * d, t / 2)):
        if abs(got - want) > 1e-9 * b:
            raise ValueError("geometry not on the grid")
    nx = i0 + iw + round(margin * b / d)
    i, j = np.meshgrid(np.arange(nx + 1), np.arange(ny + 1), indexing="ij")
    node = i * (ny + 1) + j
    strip = (i >= i0) & (i <= i0 + iw) & (j <= jt)
    fixed = strip | (j == ny) | (i == nx)
    if mode == "odd":
        fixed |= i == 0
    value = strip.astype(float).ravel()
    fixed = fixed.ravel()
    # edges along the symmetry lines belong half to this quarter
    ha, hb = node[:-1, :].ravel(), node[1:, :].ravel()
    hw = np.where(j[:-1, :] == 0, 0.5, 1.0).ravel()
    va, vb = node[:, :-1].ravel(), node[:, 1:].ravel()
    vw = np.where(i[:, :-1] == 0, 0.5, 1.0).ravel()
    ea, eb, ew = np.concatenate([ha, va]), np.concatenate([hb, vb]), np.concatenate([hw, vw])
    n = node.size
    lap = sp.coo_matrix(
        (np.concatenate([ew, ew, -ew, -ew]), (np.r_[ea, eb, ea, eb], np.r_[ea, eb, eb, ea])),
        shape=(n, n),
    ).tocsr()
    free = ~fixed
    phi = value.copy()
    phi[free] = spla.spsolve(lap[free][:, free].tocsc(), -lap[free][:, fixed] @ value[fixed])
    energy = np.sum(ew * (phi[ea] - phi[eb]) ** 2)  # times eps0/2 is the quarter's energy
    # whole structure: 4 quarters; mode energy = C per strip (two strips at |V| = 1)
    return float(2.0 * EPS0 * energy)


def fd_stripline_pair(
    w: float, s: float, b: float, t: float, mode: str, grids: tuple[int, int, int] = (40, 80, 160)
) -> float:
    """Air-filled Z of one mode of a centred thick stripline pair, Richardson-extrapolated
    (the observed order is printed by the convergence test: ~1 for t = 0, ~4/3 thick)."""
    c1, c2, c3 = (_fd_once(w, s, b, t, g, mode, 3.0) for g in grids)
    r = (c1 - c2) / (c2 - c3)
    c = c3 - (c2 - c3) / (r - 1.0)
    return 1.0 / (C0 * c)


def _graded_axis(breaks: list[float], step: float, far: float, grow: float = 1.25) -> np.ndarray:
    """Uniform spacing <= step between the break points, then geometric growth to far."""
    pts = [breaks[0]]
    for a, b in zip(breaks[:-1], breaks[1:], strict=True):
        n = max(1, int(np.ceil((b - a) / step - 1e-9)))
        pts += list(np.linspace(a, b, n + 1)[1:])
    while pts[-1] < far:
        step *= grow
        pts.append(pts[-1] + step)
    return np.array(pts)


def _bisect(x: np.ndarray, times: int) -> np.ndarray:
    for _ in range(times):
        x = np.sort(np.concatenate([x, (x[:-1] + x[1:]) / 2]))
    return x


def _fd_microstrip_once(
    w: float, s: float, h: float, t: float, er: float, mode: str, level: int, far: float
) -> float:
    """Capacitance of one strip of a thick coupled microstrip on a graded rectilinear grid
    (half domain x >= 0; ground plane y = 0; grounded box walls `far` away)."""
    step = min(0.1 * h, w / 4, s / 2)
    xs = _bisect(_graded_axis([0, s / 2, s / 2 + w, s / 2 + w + 2 * h], step, far), level)
    yb = [0.0, h] + ([h + t] if t > 0 else []) + [h + t + 2 * h]
    ys = _bisect(_graded_axis(yb, step, far), level)
    nx, ny = len(xs), len(ys)
    dx, dy = np.diff(xs), np.diff(ys)
    eps_row = np.where((ys[:-1] + ys[1:]) / 2 < h, er, 1.0)  # per row of cells
    i, j = np.meshgrid(np.arange(nx), np.arange(ny), indexing="ij")
    node = i * ny + j
    tol = 1e-9 * h
    x, y = xs[i], ys[j]
    strip = (x >= s / 2 - tol) & (x <= s / 2 + w + tol) & (y >= h - tol) & (y <= h + t + tol)
    fixed = strip | (j == 0) | (j == ny - 1) | (i == nx - 1)
    if mode == "odd":
        fixed |= i == 0
    value = strip.astype(float).ravel()
    fixed = fixed.ravel()
    # conductance of each grid edge: the adjacent cells' eps times width/length
    jh = j[:-1, :]
    below = np.where(jh > 0, eps_row[np.maximum(jh - 1, 0)] * dy[np.maximum(jh - 1, 0)], 0)
    above = np.where(jh < ny - 1, eps_row[np.minimum(jh, ny - 2)] * dy[np.minimum(jh, ny - 2)], 0)
    hw = ((below + above) / 2 / dx[i[:-1, :]]).ravel()
    iv = i[:, :-1]
    left = np.where(iv > 0, dx[np.maximum(iv - 1, 0)], 0)
    right = np.where(iv < nx - 1, dx[np.minimum(iv, nx - 2)], 0)
    vw = (eps_row[j[:, :-1]] * (left + right) / 2 / dy[j[:, :-1]]).ravel()
    ea = np.concatenate([node[:-1, :].ravel(), node[:, :-1].ravel()])
    eb = np.concatenate([node[1:, :].ravel(), node[:, 1:].ravel()])
    ew = np.concatenate([hw, vw])
    n = node.size
    lap = sp.coo_matrix(
        (np.concatenate([ew, ew, -ew, -ew]), (np.r_[ea, eb, ea, eb], np.r_[ea, eb, eb, ea])),
        shape=(n, n),
    ).tocsr()
    free = ~fixed
    phi = value.copy()
    phi[free] = spla.spsolve(lap[free][:, free].tocsc(), -lap[free][:, fixed] @ value[fixed])
    # half domain energy * 2 = mode energy = C per strip (two strips at |V| = 1)
    return float(EPS0 * np.sum(ew * (phi[ea] - phi[eb]) ** 2))


def fd_microstrip_pair(
    w: float, s: float, h: float, t: float, er: float, mode: str, far: float = 30.0
) -> tuple[float, float]:
    """(Z0, eps_eff) of one mode of a thick coupled microstrip, Richardson-extrapolated
    over three nested grids."""

    def extrapolated(eps_r: float) -> float:
        c1, c2, c3 = (_fd_microstrip_once(w, s, h, t, eps_r, mode, k, far * h) for k in (0, 1, 2))
        r = (c1 - c2) / (c2 - c3)
        return c3 - (c2 - c3) / (r - 1.0)

    c, ca = extrapolated(er), extrapolated(1.0)
    return 1.0 / (C0 * np.sqrt(c * ca)), c / ca

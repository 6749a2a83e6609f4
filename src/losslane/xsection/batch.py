"""Vectorized evaluation of a cross-section over many geometry samples at once.

The closed-form models (``Microstrip``, ``Stripline``, ``Coplanar``) take one geometry;
sizing and tolerance Monte Carlo need the same model at thousands of geometries.
:func:`evaluate` takes a nominal section plus geometry arrays of shape (S,) (and a Dk
scale of shape (S,)) and a frequency array (F,), and returns the main mode's R, L, G, C,
impedance and loss as (S, F) arrays in one numpy call -- no Python loop over samples.

The formulas are the models' own: where a model helper is already elementwise
(Hammerstad-Jensen, Kirschning-Jansen, Jansen-Kirschning, Cohn's K(k)/K(k'), Frankel) it
is called directly; the few helpers written with scalar branches (the thickness
corrections, Wheeler's 1978 stripline formula, the offset-stripline combination, the
coplanar conformal mappings, the slab internal impedance) have elementwise twins here
with the same expressions. ``tests/test_batch.py`` holds the two paths equal to 1e-9.

Kinds without a vectorized evaluator (differential pairs, the field solver) fall back to
one model call per sample, with the same result shape; :func:`is_vectorized` tells
which path a section takes.

A Dk variation scales the laminate's complex permittivity: eps(f) -> s * eps(f). For
both dielectric models this is exactly a refit at Dk' = s Dk with the same Df and the
same frequency (the wideband Debye fit is linear in Dk at fixed Df), so the Df curve
and causality are kept.
"""

from __future__ import annotations

import dataclasses
import warnings
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from losslane.errors import LossLaneError, LossLaneWarning, check_range, warn
from losslane.materials.conductor import MU0, Conductor, _coth_excess
from losslane.materials.dielectric import Dielectric
from losslane.units import INCH
from losslane.xsection.base import CrossSection
from losslane.xsection.coplanar import Coplanar, frankel_eps, k_over_kp, ratio_sinh, ratio_tanh
from losslane.xsection.microstrip import Microstrip, hj_eps_eff, hj_z_air, jk_z0, kj_eps_eff
from losslane.xsection.rlgc import C0, ETA0, NP_TO_DB, attenuation_split, filling_factor
from losslane.xsection.stripline import Stripline, k_ratio_sech

#: geometry keys a section may carry (the scenario keys; dataclass fields of the models)
GEOMETRY_KEYS = ("width", "spacing", "height", "below", "above", "gap", "thickness")


@dataclass(frozen=True)
class LineArrays:
    """The main mode of S geometry samples over F frequencies; every array is (S, F).

    ``impedance`` is what ``losslane line`` reports as the line's impedance: the lossless
    sqrt(L/C) (internal inductance and dispersion included) of a single-ended line, or
    the differential impedance 2 sqrt(L_odd/C_odd) of a pair. The losses are those of
    the same mode (the differential mode of a pair), in Np/m.
    """

    f: np.ndarray
    impedance: np.ndarray
    eps_eff: np.ndarray
    r: np.ndarray
    l: np.ndarray
    g: np.ndarray
    c: np.ndarray
    differential: bool = False

    @property
    def samples(self) -> int:
        return self.impedance.shape[0]

    def attenuation(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Total, conductor and dielectric attenuation, Np/m, (S, F) each."""
        return attenuation_split(self.r, self.l, self.g, self.c, self.f[None, :])

    def loss_db_per_in(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Total, conductor and dielectric loss in dB per inch, (S, F) each."""
        k = NP_TO_DB * INCH
        total, cond, diel = self.attenuation()
        return total * k, cond * k, diel * k


def scaled_dielectric(d: Dielectric, scale: float) -> Dielectric:
    """``d`` with its permittivity scaled by ``scale`` (Dk -> scale Dk, same Df curve)."""
    if scale == 1.0:
        return d
    if not dataclasses.is_dataclass(d) or "dk" not in {x.name for x in dataclasses.fields(d)}:
        raise LossLaneError(f"dielectric {getattr(d, 'name', d)!r} cannot be rescaled in Dk")
    return dataclasses.replace(d, dk=d.dk * scale)


def nominal_geometry(section: CrossSection) -> dict[str, float]:
    """The section's geometry as {scenario key: metres} (its dataclass fields only, so a
    derived property such as a stripline's plane spacing is not taken for a dimension)."""
    fields = (
        {f.name for f in dataclasses.fields(section)}
        if dataclasses.is_dataclass(section)
        else set()
    )
    out = {}
    for key in GEOMETRY_KEYS:
        v = getattr(section, key, None) if key in fields else None
        if isinstance(v, (int, float)) and not isinstance(v, bool):
            out[key] = float(v)
    return out


def is_vectorized(section: CrossSection) -> bool:
    """True when ``evaluate`` handles ``section`` in one array call (no per-sample loop)."""
    return type(section) in _EVALUATORS


def evaluate(
    section: CrossSection,
    f: np.ndarray | float,
    *,
    dk_scale: np.ndarray | float | None = None,
    progress: Callable[[int], None] | None = None,
    **geometry: np.ndarray | float,
) -> LineArrays:
    """The main mode of ``section`` with geometry overrides, over frequency ``f`` (Hz).

    ``geometry`` overrides the section's dimensions by key (``width``, ``height``,
    ``below``, ``above``, ``gap``, ``spacing``, ``thickness``; metres), each a scalar or
    an array of shape (S,); ``dk_scale`` scales the laminate's permittivity (S,).
    Arrays broadcast to one sample axis. ``progress(n)`` is called with the number of
    samples done, on the per-sample fallback path only.
    """
    f = np.atleast_1d(np.asarray(f, float))
    nominal = nominal_geometry(section)
    for key in geometry:
        if key not in nominal:
            raise LossLaneError(
                f"{section.kind}: {key!r} is not a dimension of this line; its dimensions "
                f"are {', '.join(nominal)}"
            )
    arrays = {k: np.atleast_1d(np.asarray(v, float)) for k, v in geometry.items()}
    scale = np.atleast_1d(np.asarray(1.0 if dk_scale is None else dk_scale, float))
    try:
        n = np.broadcast_shapes(scale.shape, *(a.shape for a in arrays.values()))
    except ValueError:
        raise LossLaneError("geometry sample arrays must all have the same length") from None
    if len(n) != 1:
        raise LossLaneError("geometry samples must be one-dimensional arrays")
    geo = {
        k: np.broadcast_to(arrays.get(k, np.asarray([v])), n).astype(float)
        for k, v in nominal.items()
    }
    scale = np.broadcast_to(scale, n).astype(float)
    for key, v in geo.items():
        bad = ~np.isfinite(v) | ((v < 0) if key == "thickness" else (v <= 0))
        if np.any(bad):
            raise LossLaneError(
                f"{section.kind}: {key} = {v[bad][0]!r} m is not a valid length; it must be "
                f"{'>= 0' if key == 'thickness' else '> 0'}"
            )
    if np.any(~np.isfinite(scale) | (scale * section.dielectric.dk < 1.0)):
        raise LossLaneError(
            f"{section.kind}: a Dk sample falls below 1 (air); use a smaller Dk tolerance"
        )
    if is_vectorized(section):
        col = {k: v[:, None] for k, v in geo.items()}
        return _EVALUATORS[type(section)](section, f, col, scale[:, None])
    return _per_sample(section, f, geo, scale, progress)


# --- the per-sample fallback -------------------------------------------------------------


def _per_sample(
    section: CrossSection,
    f: np.ndarray,
    geo: dict[str, np.ndarray],
    scale: np.ndarray,
    progress: Callable[[int], None] | None,
) -> LineArrays:
    s = scale.shape[0]
    pair = section.n_conductors == 2
    names = ("eps_eff", "r", "l", "g", "c")
    out = {k: np.empty((s, f.size)) for k in names}
    nominal = nominal_geometry(section)
    caught_all: list[warnings.WarningMessage] = []
    step = max(1, s // 100)
    for i in range(s):
        changes = {k: float(v[i]) for k, v in geo.items() if float(v[i]) != nominal[k]}
        d = scaled_dielectric(section.dielectric, float(scale[i]))
        sec = (
            dataclasses.replace(section, dielectric=d, **changes)
            if (changes or d is not section.dielectric)
            else section
        )
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", LossLaneWarning)
            mode = sec.modes(f)["odd" if pair else "single"]
        caught_all.extend(caught)
        for k in names:
            out[k][i] = getattr(mode, k)
        if progress is not None and ((i + 1) % step == 0 or i + 1 == s):
            progress(i + 1)
    _reissue(caught_all, s)
    z = np.sqrt(out["l"] / out["c"]) * (2.0 if pair else 1.0)
    return LineArrays(f, z, out["eps_eff"], out["r"], out["l"], out["g"], out["c"], pair)


def _reissue(caught: list[warnings.WarningMessage], samples: int) -> None:
    """One warning per model parameter, not one per sample."""
    groups: dict[str, list[str]] = {}
    for w in caught:
        if issubclass(w.category, LossLaneWarning):
            msg = str(w.message)
            groups.setdefault(msg.split(" = ")[0], []).append(msg)
    for msgs in groups.values():
        extra = f" ({len(msgs)} of {samples} samples)" if samples > 1 else ""
        warn(msgs[0] + extra)


# --- elementwise pieces shared by the vectorized evaluators ------------------------------


def _internal(
    f: np.ndarray, conductor: Conductor, gf: np.ndarray, depth: np.ndarray, k: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Elementwise twin of ``materials.conductor.internal_impedance`` (same formula)."""
    mu = MU0 * conductor.mu_r
    omega = 2 * np.pi * f
    live = (gf != 0) & (depth > 0)
    tau = np.where(live, depth, 1.0)
    x2 = 1j * omega * mu * conductor.sigma * tau**2
    kh = np.asarray(k) * _coth_excess(x2)
    r_dc = np.where(live, gf, 0.0) / (conductor.sigma * tau)
    r = r_dc * (1.0 - omega * mu * conductor.sigma * tau**2 * kh.imag)
    l_int = r_dc * mu * conductor.sigma * tau**2 * kh.real
    return r, l_int


def _wheeler(
    z_air: Callable[..., np.ndarray],
    p: tuple,
    recede: Callable[[tuple, np.ndarray], tuple],
    scale: np.ndarray,
) -> np.ndarray:
    """Elementwise twin of ``rlgc.wheeler_factor`` (central difference, step 1e-4 scale)."""
    dn = 1e-4 * scale
    dz = z_air(*recede(p, dn)) - z_air(*recede(p, -dn))
    return dz / (2 * dn) / ETA0


def _assemble(
    section: CrossSection,
    f: np.ndarray,
    eps_r: np.ndarray,
    eps_eff: np.ndarray,
    z0: np.ndarray,
    groups: list,
    q: np.ndarray | None = None,
) -> LineArrays:
    """Elementwise twin of ``rlgc.assemble_mode``; ``groups`` = [(G, depth, roughness)]."""
    omega = 2 * np.pi * f
    shape = np.broadcast_shapes(eps_eff.shape, z0.shape, (1, f.size))
    eps_eff = np.broadcast_to(eps_eff, shape)
    z0 = np.broadcast_to(z0, shape)
    root = np.sqrt(eps_eff)
    l_ext = z0 * root / C0
    c = root / (z0 * C0)
    if q is None:
        q = filling_factor(eps_eff, eps_r.real)
    g = omega * c * (q * (-eps_r.imag)) / eps_eff
    r = np.zeros(shape)
    l_int = np.zeros(shape)
    conductor = section.metal.conductor
    for gf, depth, rough in groups:
        k = rough.factor(f, conductor)
        dr, dl = _internal(f, conductor, gf, depth, k)
        r = r + dr
        l_int = l_int + dl
    l = l_ext + l_int
    return LineArrays(f, np.sqrt(l / c), np.array(eps_eff), r, l, g, c)


def _thickness_warning(kind: str, t: np.ndarray, example: str) -> bool:
    """True when the strip has thickness; warns like the scalar models when it has none."""
    if np.all(t == 0):
        warn(
            f"{kind}: thickness = 0, so the strip's conductor loss is not modelled "
            f"(give the copper thickness, e.g. {example})"
        )
        return False
    if np.any(t == 0):
        raise LossLaneError(f"{kind}: thickness samples mix zero and non-zero values")
    return True


# --- microstrip ----------------------------------------------------------------------------


def _hj_thickness(
    u: np.ndarray, t_h: np.ndarray, er: np.ndarray | float
) -> tuple[np.ndarray, np.ndarray]:
    """Elementwise twin of ``microstrip.hj_thickness``."""
    er = np.asarray(er, float)
    pos = t_h > 0
    th = np.where(pos, t_h, 1.0)
    du1 = th / np.pi * np.log(1.0 + 4.0 * np.e / (th / np.tanh(np.sqrt(6.517 * u)) ** 2))
    du1 = np.where(pos, du1, 0.0)
    dur = 0.5 * (1.0 + 1.0 / np.cosh(np.sqrt(np.maximum(er - 1.0, 0.0)))) * du1
    return u + du1, u + dur


def _ms_z_air(w: np.ndarray, h: np.ndarray, t: np.ndarray) -> np.ndarray:
    u1, _ = _hj_thickness(w / h, t / h, 1.0)
    return hj_z_air(u1)


def _microstrip(sec, f: np.ndarray, g: dict, scale: np.ndarray) -> LineArrays:
    w, h, t = g["width"], g["height"], g["thickness"]
    eps_r = sec.dielectric.eps(f)[None, :] * scale
    er = eps_r.real
    u = w / h
    fn = f * 1e-9 * h * 1e3
    check_range("microstrip (Hammerstad-Jensen)", "width/height", u, 0.01, 100)
    check_range("microstrip (Hammerstad-Jensen)", "dk", er, 1, 128)
    check_range("microstrip (Hammerstad-Jensen thickness)", "thickness/height", t / h, 0, 0.5)
    if np.any(f > 0):
        name = "microstrip dispersion (Kirschning-Jansen)"
        check_range(name, "width/height", u, 0.1, 100)
        check_range(name, "dk", er, 1, 20)
        check_range(name, "height/wavelength", fn / (C0 * 1e-6), 0, 0.13)
    u1, ur = _hj_thickness(u, t / h, er)
    e_r = hj_eps_eff(ur, er)
    z_r = hj_z_air(ur)
    z00 = z_r / np.sqrt(e_r)
    eps0 = e_r * (hj_z_air(u1) / z_r) ** 2
    eps_f = kj_eps_eff(u, er, eps0, fn)
    z0 = jk_z0(u, er, eps0, eps_f, z00, fn)
    groups = []
    if _thickness_warning("microstrip", t, "'1.4 mil' or '1 oz'"):
        p = (w, h, t)
        scale_ = np.minimum(np.minimum(w, h), t)
        g_strip = _wheeler(
            _ms_z_air, p, lambda p, d: (p[0] - 2 * d, p[1] + d, p[2] - 2 * d), scale_
        )
        g_plane = _wheeler(_ms_z_air, p, lambda p, d: (p[0], p[1] + d, p[2]), scale_)
        m = sec.metal
        groups = [(g_strip, g_strip * w * t, m.foil), (g_plane, m.plane_thickness, m.planes)]
    return _assemble(sec, f, eps_r, eps_f, z0, groups)


# --- stripline -----------------------------------------------------------------------------


def _cohn_z_air(w: np.ndarray, b: np.ndarray) -> np.ndarray:
    return ETA0 / 4.0 * k_ratio_sech(np.pi * w / (2.0 * b))


def _wheeler_z_air(w: np.ndarray, b: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Elementwise twin of ``stripline.wheeler_z_air``."""
    pos = t / b > 0
    x = np.where(pos, t / b, 0.5)
    m = 6.0 / (3.0 + 2.0 * x / (1.0 - x))
    dw = (
        x
        / (np.pi * (1.0 - x))
        * (1.0 - 0.5 * np.log((x / (2.0 - x)) ** 2 + (0.0796 * x / (w / b + 1.1 * x)) ** m))
    ) * (b - t)
    dw = np.where(pos, dw, 0.0)
    wp = (w + dw) / (b - t)
    a = 8.0 / (np.pi * wp)
    return ETA0 / (4 * np.pi) * np.log(1.0 + 4.0 / (np.pi * wp) * (a + np.sqrt(a * a + 6.27)))


def _centred_z_air(w: np.ndarray, b: np.ndarray, t: np.ndarray) -> np.ndarray:
    z = _cohn_z_air(w, b)
    ratio = _wheeler_z_air(w, b, t) / _wheeler_z_air(w, b, np.zeros_like(t))
    return z * np.where(t > 0, ratio, 1.0)


def _sl_z_air(w: np.ndarray, below: np.ndarray, above: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Elementwise twin of ``stripline.stripline_z_air`` (centred or offset)."""
    centred = np.abs(below - above) <= 1e-12 * (below + above)
    zc = _centred_z_air(w, below + above + t, t)
    z1 = _centred_z_air(w, 2 * below + t, t)
    z2 = _centred_z_air(w, 2 * above + t, t)
    return np.where(centred, zc, 2 * z1 * z2 / (z1 + z2))


def _stripline(sec, f: np.ndarray, g: dict, scale: np.ndarray) -> LineArrays:
    w, lo, hi, t = g["width"], g["below"], g["above"], g["thickness"]
    b = lo + hi + t
    if np.any(t > 0):
        check_range("stripline (Wheeler thickness)", "thickness/spacing", (t / b)[t > 0], 0, 0.25)
    offset = np.abs(lo - hi) > 1e-9 * b
    if np.any(offset):
        check_range(
            "offset stripline", "width/(spacing - thickness)", (w / (b - t))[offset], 0.35, None
        )
    eps_r = sec.dielectric.eps(f)[None, :] * scale
    er = eps_r.real
    z0 = _sl_z_air(w, lo, hi, t) / np.sqrt(er)
    groups = []
    if _thickness_warning("stripline", t, "'0.6 mil' or '0.5 oz'"):
        p = (w, lo, hi, t)
        sc = np.minimum(np.minimum(w, lo), np.minimum(hi, t))
        g_strip = _wheeler(
            _sl_z_air, p, lambda p, d: (p[0] - 2 * d, p[1] + d, p[2] + d, p[3] - 2 * d), sc
        )
        g_low = _wheeler(_sl_z_air, p, lambda p, d: (p[0], p[1] + d, p[2], p[3]), sc)
        g_high = _wheeler(_sl_z_air, p, lambda p, d: (p[0], p[1], p[2] + d, p[3]), sc)
        m = sec.metal
        groups = [
            (g_strip, g_strip * w * t, m.foil),
            (g_low, m.plane_thickness, m.planes),
            (g_high, m.plane_thickness, m.planes),
        ]
    return _assemble(sec, f, eps_r, er, z0, groups, q=np.ones(er.shape))


# --- coplanar ------------------------------------------------------------------------------


def _delta(w: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Elementwise twin of ``coplanar.thickness_delta``."""
    pos = t > 0
    tt = np.where(pos, t, 1.0)
    return np.where(pos, 1.25 * tt / np.pi * (1.0 + np.log(4.0 * np.pi * w / tt)), 0.0)


def _cpw_z_air(w, gap, t, h, grounded: bool) -> np.ndarray:
    d = _delta(w, t)
    r0 = k_over_kp((w + d) / (w + 2 * gap - d))
    if not grounded:
        return ETA0 / (4.0 * r0)
    a, b = w / 2.0, w / 2.0 + gap
    r3 = ratio_tanh(a, b, h)
    return ETA0 / (2.0 * (r0 + r3))


def _cpw_eps_q(w, gap, t, h, er, grounded: bool) -> np.ndarray:
    """Elementwise twin of ``coplanar.cpw_eps_quasi_static``."""
    a, b = w / 2.0, w / 2.0 + gap
    r0z = k_over_kp(a / b)
    if grounded:
        r3 = ratio_tanh(a, b, h)
        eps = 1.0 + r3 / (r0z + r3) * (er - 1.0)
    else:
        r1 = ratio_sinh(a, b, h)
        eps = 1.0 + (er - 1.0) / 2.0 * r1 / r0z
    x = 0.7 * t / gap
    return np.where(t > 0, eps - (eps - 1.0) * x / (r0z + x), eps)


def _coplanar(sec, f: np.ndarray, g: dict, scale: np.ndarray) -> LineArrays:
    w, s, t, h = g["width"], g["gap"], g["thickness"], g["height"]
    grounded = sec.grounded
    kind = sec.kind
    # Gupta's widened strip needs its modulus k0 = (w + D)/(w + 2 gap - D) below 1, i.e.
    # D < gap (the scalar model checks only D < 2 gap and returns NaN in between)
    if np.any(_delta(w, t) >= s):
        raise LossLaneError(
            f"{kind}: the copper is too thick for the gap: the thickness "
            "correction (Gupta et al.) widens the strip by more than the gap; "
            "use a wider --gap, thinner copper or a narrower strip"
        )
    eps_r = sec.dielectric.eps(f)[None, :] * scale
    er = eps_r.real
    check_range(f"{kind} (conformal mapping)", "thickness/gap", t / s, 0, 0.5)
    if np.any(f > 0):
        disp = f"{kind} dispersion (Frankel)"
        check_range(disp, "width/height", w / h, 0.1, 5)
        check_range(disp, "width/gap", w / s, 0.1, 5)
        check_range(disp, "dk", er, 1.5, 50)
        f_te = C0 / (4.0 * h * np.sqrt(np.maximum(er - 1.0, 1e-12)))
        check_range(disp, "f/f_TE", f / f_te, 0, 10)
    eps_q = _cpw_eps_q(w, s, t, h, er, grounded)
    eps_f = frankel_eps(w, s, h, er, eps_q, f)
    z0 = _cpw_z_air(w, s, t, h, grounded) / np.sqrt(eps_f)
    groups = []
    if _thickness_warning(kind, t, "'1.4 mil' or '1 oz'"):
        za = lambda w_, s_, t_, h_: _cpw_z_air(w_, s_, t_, h_, grounded)  # noqa: E731
        p = (w, s, t, h)
        sc = np.minimum(np.minimum(w, s), t)
        g_sig = _wheeler(za, p, lambda p, d: (p[0] - 2 * d, p[1] + d, p[2] - d, p[3]), sc)
        g_cop = _wheeler(za, p, lambda p, d: (p[0], p[1] + d, p[2] - d, p[3]), sc)
        m = sec.metal
        groups = [(g_sig, g_sig * w * t, m.foil), (g_cop, t / 2.0, m.foil)]
        if grounded:
            g_pl = _wheeler(za, p, lambda p, d: (p[0], p[1], p[2], p[3] + d), np.minimum(sc, h))
            groups.append((g_pl, m.plane_thickness, m.planes))
    return _assemble(sec, f, eps_r, eps_f, z0, groups)


#: exact model class -> vectorized evaluator (subclasses, e.g. a field-solved variant,
#: take the per-sample path)
_EVALUATORS: dict[type, Callable[..., LineArrays]] = {
    Microstrip: _microstrip,
    Stripline: _stripline,
    Coplanar: _coplanar,
}

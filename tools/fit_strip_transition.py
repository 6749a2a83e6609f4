"""Fit the strip's DC-to-skin transition of the closed-form conductor model to the
eddy-current field solution (``xsection.fieldsolve.eddy``).

For a grid of smooth-copper microstrips and striplines (strips 0.5-2 oz, 3-24 mil wide;
1 oz planes) the eddy-current solver gives the power dissipated in the strip from 1 kHz to
10 GHz. ``materials.conductor.strip_impedance`` writes the strip's impedance as

    Phi(s) = (1/alpha) z coth z + (1 - 1/alpha)/(1 + s/d),  z^2 = alpha^2 s,
    Z = R_dc (1 + (1 - eps)(Phi - 1)),  s = j w mu sigma tau^2,  tau = G * area,

and this tool fits alpha and d as piecewise-linear functions of ln(w/t) (knots below) and
eps = (e0 + e1 ln(w/t) + e2 ln(w/h)) / (1 + (w/(8 h))^2) by least squares on
R_strip(model) / R_strip(eddy) - 1 over 0.1 <= tau/delta <= 25; then the correction
added to (Phi - 1)/s (``materials.conductor.transition_correction``: band-pass terms
between fixed poles, coefficients quadratic in ln(w/t) and ln(w/h) plus terms in the
planes' balance) by a minimax linear
program over the typical grid and the thick-copper corner (``corner_set``), and prints
the worst deviations per geometry and the whole line's R and L against the eddy
solution.

    python tools/fit_strip_transition.py            # fit and print
    python tools/fit_strip_transition.py --write    # and rewrite both blocks of conductor.py

Eddy solves are kept in ``--cache`` (a pickle, written as the run goes). About 15 minutes
for the 51 typical and 24 corner geometries on the two-core development machine
(1 kHz .. 10 GHz, 25 points).
"""

from __future__ import annotations

import argparse
import itertools
import json
import pickle
import re
import sys
import time
import warnings
from pathlib import Path

import numpy as np

from losslane.materials import conductor as cond
from losslane.materials.conductor import MU0
from losslane.materials.dielectric import ConstantDielectric
from losslane.units import MIL, OZ_COPPER
from losslane.xsection.base import Metal
from losslane.xsection.fieldsolve import Geometry, Layer, Trace
from losslane.xsection.fieldsolve.eddy import eddy_impedance
from losslane.xsection.microstrip import Microstrip
from losslane.xsection.rlgc import group_impedances
from losslane.xsection.stripline import Stripline

AIR = ConstantDielectric(1.0, name="air")
F = np.array(
    [0, 1e3, 1e4, 3e4, 1e5, 2e5, 5e5, 1e6, 2e6, 3e6, 5e6, 7e6, 1e7, 1.5e7, 2e7, 3e7, 5e7, 7e7]
    + [1e8, 1.5e8, 2e8, 3e8, 5e8, 1e9, 3e9, 1e10]
)
#: ln(w/t) of the fitted strips' aspects (3-24 mil wide in 0.5-2 oz copper)
KNOTS = np.log([1.094, 2.189, 4.379, 8.758, 17.52, 35.03])
#: weight of the knots' second differences in the least squares (keeps alpha(w/t) and
#: d(w/t) smooth between the fitted aspects)
SMOOTH = 0.02
#: weight of the line's inductance 1-10 MHz against the strip's resistance in the fit
WEIGHT_L = 2.0


def microstrip(w: float, h: float, t_oz: float, p_oz: float):
    """(label, closed form, eddy geometry, plane thickness); lengths in mil, copper in oz."""
    w_, h_, t, tp = w * MIL, h * MIL, t_oz * OZ_COPPER, p_oz * OZ_COPPER
    cf = Microstrip(w_, h_, t, AIR, Metal(plane_thickness=tp))
    geom = Geometry((Layer(h_, AIR),), (Trace.centred(0.0, w_, h_, t),))
    return (("microstrip", w, h, t_oz, p_oz), cf, geom, tp)


def stripline(w: float, lo: float, hi: float, t_oz: float, p_oz: float):
    w_, lo_, hi_, t, tp = w * MIL, lo * MIL, hi * MIL, t_oz * OZ_COPPER, p_oz * OZ_COPPER
    cf = Stripline(w_, lo_, hi_, t, AIR, Metal(plane_thickness=tp))
    geom = Geometry(
        (Layer(lo_, AIR), Layer(t + hi_, AIR)), (Trace.centred(0.0, w_, lo_, t),), True, True
    )
    return (("stripline", w, lo, hi, t_oz, p_oz), cf, geom, tp)


def corner_set() -> list:
    """Geometries of the thick-copper corner of the declared ranges (strips about as thick
    as wide, t/b to 0.24, t/h to 0.48): the correction is fitted to them as well (with the
    planes' balance among its terms; without it, fitting them raised the error on typical
    geometries), the shape is not."""
    out = []
    for t_oz, aspect, ratio in itertools.product([1, 2], [1.3, 2.0], [0.2, 0.24]):
        tm = t_oz * OZ_COPPER / MIL
        b = tm / ratio
        for off in (0.5, 0.35):
            lo = off * (b - tm)
            out.append(
                stripline(round(aspect * tm, 3), round(lo, 3), round(b - tm - lo, 3), t_oz, 1)
            )
    for t_oz, aspect, ratio in itertools.product([1, 2], [1.3, 2.0], [0.4, 0.48]):
        tm = t_oz * OZ_COPPER / MIL
        out.append(microstrip(round(aspect * tm, 3), round(tm / ratio, 3), t_oz, 1))
    return out


def training_set() -> list:
    out = []
    for w, t_oz, wh in itertools.product([3, 6, 12, 24], [0.5, 1, 2], [0.7, 2.0]):
        out.append(microstrip(w, round(w / wh, 3), t_oz, 1))
    for w, t_oz, (wb, off) in itertools.product(
        [3, 6, 12], [0.5, 1, 2], [(0.6, 0.5), (0.3, 0.5), (0.6, 0.3)]
    ):
        b = w / wb
        tm = t_oz * OZ_COPPER / MIL
        lo = off * (b - tm)
        out.append(stripline(w, round(lo, 3), round(b - tm - lo, 3), t_oz, 1))
    return out


def solve(cases: list, store: Path) -> dict:
    """{label: eddy results}, from ``store`` where already solved."""
    done = pickle.loads(store.read_bytes()) if store.exists() else {}
    t0 = time.time()
    for i, (label, _, geom, tp) in enumerate(cases):
        if label in done:
            continue
        res = eddy_impedance(geom, F, plane_thickness=tp, estimate=False)
        done[label] = {
            "r": res.r[:, 0, 0],
            "l": res.l[:, 0, 0],
            "strip": res.losses[res.names[0]][:, 0, 0],
            "planes": sum(v[:, 0, 0] for k, v in res.losses.items() if k.endswith("plane")),
        }
        store.parent.mkdir(parents=True, exist_ok=True)
        store.write_bytes(pickle.dumps(done))
        print(
            f"\r  {i + 1}/{len(cases)} eddy solves, {time.time() - t0:.0f} s",
            end="",
            file=sys.stderr,
        )
    print(file=sys.stderr)
    return done


def strip_data(cases: list, solved: dict) -> list:
    """Per geometry: tau/delta, the eddy strip R / R_dc, the shape inputs, and for the
    inductance from 1 MHz: the eddy L and what the closed form has besides the strip's
    internal inductance (external and the planes'); ``band`` marks 1-10 MHz, where the
    shape's own fit weighs the inductance."""
    rows = []
    f = F[1:]
    hf = f >= 1e6
    for label, cf, _, _ in cases:
        dims = [np.asarray(getattr(cf, k), float) for k in cf.dimensions]
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            groups = cf._groups(*dims)
            rl = cf.rlgc(f[hf])
        g = groups[0]
        l_strip = group_impedances(f[hf], groups)[0][1]
        tau = float(g.depth)
        r_dc = 1.0 / (cf.metal.conductor.sigma * cf.width * cf.thickness)
        delta = cf.metal.conductor.skin_depth(f)
        rows.append(
            {
                "label": label,
                "x": tau / delta,
                "y": solved[label]["strip"][1:] / r_dc,
                "aspect": float(g.aspect),
                "proximity": float(g.proximity),
                "balance": float(g.balance),
                "inside": declared(label),
                "x_l": tau / delta[hf],
                "band": f[hf] <= 1e7,
                "l_rest": rl.l[:, 0, 0] - l_strip,
                "l_eddy": solved[label]["l"][1:][hf],
                "l_scale": r_dc * cf.metal.conductor.sigma * MU0 * tau**2,
            }
        )
    return rows


def model_inductance(x, alpha, d, eps):
    """Im Z / (w R_dc mu sigma tau^2) of the strip model at tau/delta = x: Re Q."""
    s = 2j * x * x
    z2 = alpha * alpha * s
    z = np.sqrt(z2)
    h = (z / np.tanh(z) - 1) / z2
    q = alpha * h - (1 - 1 / alpha) / (d + s)
    return (1 - eps) * q.real


def model_ratio(x, alpha, d, eps):
    """Re Z / R_dc of the strip model at tau/delta = x."""
    s = 2j * x * x
    z = np.sqrt(alpha * alpha * s)
    phi = (z / np.tanh(z)) / alpha + (1 - 1 / alpha) / (1 + s / d)
    return 1 + (1 - eps) * (phi.real - 1)


#: tau/delta of the correction's poles (log-spaced over the transition)
CORRECTION_POLES = np.logspace(np.log10(0.25), np.log10(20.0), 10)
#: weight of the geometries outside the models' declared ranges in the correction's fit
WEIGHT_OUTSIDE = 0.3
#: the line's inductance error (from 1 MHz) that the correction may reach where the
#: shape alone is closer
L_ALLOWED = 0.012


def correction_terms(
    x: np.ndarray, aspect: float, proximity: float, balance: float = 0.0
) -> np.ndarray:
    """The correction's basis at tau/delta = x: one complex column per (pole, feature),
    the term's contribution to (Phi - 1)/s."""
    s = 2j * np.asarray(x)[:, None] ** 2
    poles = 2 * CORRECTION_POLES**2
    band = 1 / (s + poles[:-1]) - 1 / (s + poles[1:])
    feats = np.array([float(v) for v in cond.correction_features(aspect, proximity, balance)])
    return np.einsum("fk,j->fkj", band, feats).reshape(len(x), -1)


def declared(label: tuple) -> bool:
    """Whether a fitting geometry lies inside its model's declared ranges."""
    from conductor_accuracy_table import declared as inside

    if label[0] == "microstrip":
        _, w, h, t_oz, _ = label
        return inside(
            "microstrip", {"width": w * MIL, "height": h * MIL, "thickness": t_oz * OZ_COPPER}
        )
    _, w, lo, hi, t_oz, _ = label
    dims = {"width": w * MIL, "below": lo * MIL, "above": hi * MIL, "thickness": t_oz * OZ_COPPER}
    return inside("stripline", dims)


def shape(q: np.ndarray, aspect: float, proximity: float):
    n = len(KNOTS)
    la, lp = np.log(aspect), np.log(proximity)
    alpha = np.exp(np.interp(la, KNOTS, q[:n]))
    d = np.exp(np.interp(la, KNOTS, q[n : 2 * n]))
    e0, e1, e2 = q[2 * n :]
    eps = e0 + e1 * np.clip(la, KNOTS[0], KNOTS[-1]) + e2 * np.clip(lp, np.log(0.5), np.log(3))
    return alpha, d, eps / (1 + (proximity / cond.PROXIMITY_FADE) ** 2)


def fit(rows: list) -> np.ndarray:
    from scipy.optimize import least_squares

    n = len(KNOTS)

    def resid(q):
        out = []
        for r in rows:
            sel = (r["x"] > 0.1) & (r["x"] < 25)
            a, d, e = shape(q, r["aspect"], r["proximity"])
            out.append(model_ratio(r["x"][sel], a, d, e) / r["y"][sel] - 1)
            b = r["band"]
            a_l = model_inductance(r["x_l"][b], a, d, e) * r["l_scale"]
            out.append(WEIGHT_L * ((r["l_rest"][b] + a_l) / r["l_eddy"][b] - 1))
        out.append(SMOOTH * np.diff(q[:n], 2))
        out.append(SMOOTH * np.diff(q[n : 2 * n], 2))
        return np.concatenate(out)

    q0 = np.concatenate([np.full(n, np.log(2.0)), np.full(n, np.log(2.5)), [0.01, 0.005, 0.0]])
    lo = np.concatenate([np.zeros(n), np.full(n, np.log(0.2)), [-0.05, -0.05, -0.05]])
    hi = np.concatenate([np.full(n, np.log(6.0)), np.full(n, np.log(50.0)), [0.05, 0.05, 0.05]])
    return least_squares(resid, q0, bounds=(lo, hi)).x


def strip_design(r: dict) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Over 0.05 <= tau/delta <= 40 of one geometry: the eddy strip R / R_dc, the fitted
    shape's, and the correction's real basis columns (its contribution to R / R_dc)."""
    sel = (r["x"] > 0.05) & (r["x"] < 40)
    x = r["x"][sel]
    a, d, e = cond.transition_shape(r["aspect"], r["proximity"])
    terms = 2j * x[:, None] ** 2 * correction_terms(x, r["aspect"], r["proximity"], r["balance"])
    return r["y"][sel], model_ratio(x, a, d, e), terms.real


def fit_correction(rows: list) -> np.ndarray:
    """The correction's coefficients, (poles - 1) x features: a minimax fit (linear
    program) of the strip's R / R_eddy - 1 (0.05 <= tau/delta <= 40), the geometries
    outside the declared ranges weighing ``WEIGHT_OUTSIDE``, under the constraint that
    the line's L / L_eddy - 1 from 1 MHz grows nowhere beyond the larger of its value
    without the correction and ``L_ALLOWED``."""
    from scipy.optimize import linprog

    r_rows, r_y, l_rows, l_y, l_bound = [], [], [], [], []
    for r in rows:
        w = 1.0 if r["inside"] else WEIGHT_OUTSIDE
        y, base, terms = strip_design(r)
        r_rows.append(w * terms / y[:, None])
        r_y.append(w * (1 - base / y))
        a, d, e = cond.transition_shape(r["aspect"], r["proximity"])
        lx = r["x_l"]
        l_model = r["l_rest"] + model_inductance(lx, a, d, e) * r["l_scale"]
        terms = correction_terms(lx, r["aspect"], r["proximity"], r["balance"]).real * r["l_scale"]
        l_rows.append(terms / r["l_eddy"][:, None])
        l_y.append(1 - l_model / r["l_eddy"])
        l_bound.append(np.maximum(np.abs(l_y[-1]), L_ALLOWED))
    m, y = np.vstack(r_rows), np.concatenate(r_y)
    ml, yl, bl = np.vstack(l_rows), np.concatenate(l_y), np.concatenate(l_bound)
    n = m.shape[1]
    one, zero = np.ones((len(y), 1)), np.zeros((len(yl), 1))
    cost = np.zeros(n + 1)
    cost[-1] = 1.0
    # the correction leaves the strip's DC internal inductance alone: its (Phi - 1)/s at
    # s = 0, sum_k c_k (1/p_k - 1/p_(k+1)), vanishes for every feature
    poles = 2 * CORRECTION_POLES**2
    dc = 1 / poles[:-1] - 1 / poles[1:]
    nf = n // len(dc)
    eq = np.zeros((nf, n + 1))
    for j in range(nf):
        eq[j, j:n:nf] = dc
    res = linprog(
        cost,
        A_ub=np.block([[m, -one], [-m, -one], [ml, zero], [-ml, zero]]),
        b_ub=np.concatenate([y, -y, bl + yl, bl - yl]),
        A_eq=eq,
        b_eq=np.zeros(nf),
        bounds=[(-5.0, 5.0)] * n + [(0.0, None)],
        method="highs",
    )
    if not res.success:
        raise SystemExit(f"the correction's fit failed: {res.message}")
    return res.x[:n].reshape(len(CORRECTION_POLES) - 1, -1)


def write_block(q: np.ndarray, note: str) -> Path:
    n = len(KNOTS)
    return _replace_block(
        "fitted strip transition",
        [
            "#: knots of ln(width/thickness) and the fitted ln(alpha), ln(d) there; eps = (e0 + "
            "e1 ln(w/t)",
            "#: + e2 ln(w/h)) / (1 + (w/(8 h))^2); see ``transition_shape``",
            "TRANSITION_KNOTS = (" + ", ".join(f"{v:.6f}" for v in KNOTS) + ")",
            "TRANSITION_ALPHA = (" + ", ".join(f"{v:.6f}" for v in q[:n]) + ")",
            "TRANSITION_D = (" + ", ".join(f"{v:.6f}" for v in q[n : 2 * n]) + ")",
            "TRANSITION_EPS = (" + ", ".join(f"{v:.6f}" for v in q[2 * n :]) + ")",
            "TRANSITION_NOTE = (",
            *(f"    {json.dumps(part)}" for part in _wrap(note)),
            ")",
        ],
    )


def write_correction(c: np.ndarray, box: tuple, note: str) -> Path:
    (a_lo, a_hi), (p_lo, p_hi) = box
    return _replace_block(
        "fitted transition correction",
        [
            "#: tau/delta of the poles; the box of (ln(w/t), ln(w/h)) fitted; one row of",
            "#: coefficients (of 1, a, p, a^2, a p, p^2, r, r a, r p) per band between adjacent",
            "#: poles",
            "CORRECTION_POLES: tuple[float, ...] = ("
            + ", ".join(f"{v:.6f}" for v in CORRECTION_POLES)
            + ")",
            "CORRECTION_BOX: tuple[tuple[float, float], tuple[float, float]] = (",
            f"    ({a_lo:.6f}, {a_hi:.6f}),",
            f"    ({p_lo:.6f}, {p_hi:.6f}),",
            ")",
            "CORRECTION: tuple[tuple[float, ...], ...] = (",
            *("    (" + ", ".join(f"{v:.6f}" for v in row) + ")," for row in c),
            ")",
            "CORRECTION_NOTE = (",
            *(f"    {json.dumps(part)}" for part in _wrap(note)),
            ")",
        ],
    )


def _replace_block(name: str, body: list[str]) -> Path:
    """Rewrite the generated block ``name`` of materials/conductor.py."""
    head = f"# BEGIN {name} (written by tools/fit_strip_transition.py; do not edit)"
    text = "\n".join([head, *body, f"# END {name}"])
    path = Path(cond.__file__)
    src = path.read_text()
    pat = re.compile(rf"^# BEGIN {re.escape(name)} .*?^# END {re.escape(name)}$", re.S | re.M)
    path.write_text(pat.sub(lambda _: text, src, count=1))
    return path


def _wrap(text: str, width: int = 86) -> list[str]:
    lines, line = [], ""
    for w in text.split():
        if line and len(line) + len(w) + 1 > width:
            lines.append(line + " ")
            line = ""
        line = f"{line} {w}" if line else w
    return lines + [line]


def line_errors(cases: list, solved: dict) -> list:
    """Per geometry: the worst |R/R_eddy - 1| (1 kHz .. 10 GHz) and |L/L_eddy - 1|
    (1 MHz .. 10 GHz) of the whole closed-form line."""
    out = []
    for label, cf, _, _ in cases:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            rl = cf.rlgc(F)
        e = solved[label]
        dr = rl.r[1:, 0, 0] / e["r"][1:] - 1
        sel = F >= 1e6
        dl = rl.l[sel, 0, 0] / e["l"][sel] - 1
        out.append((label, float(np.abs(dr).max()), float(np.abs(dl).max())))
    return out


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--write", action="store_true")
    ap.add_argument("--cache", default="/tmp/losslane-fit-cache/strip-transition.pickle")
    args = ap.parse_args()
    cases, corners = training_set(), corner_set()
    solved = solve(cases + corners, Path(args.cache))
    rows = strip_data(cases, solved)
    q = fit(rows)  # the shape: the typical grid only
    n = len(KNOTS)
    cond.TRANSITION_KNOTS = tuple(KNOTS)
    cond.TRANSITION_ALPHA, cond.TRANSITION_D = tuple(q[:n]), tuple(q[n : 2 * n])
    cond.TRANSITION_EPS = tuple(q[2 * n :])
    worst = strip_errors(rows, None)
    note = (
        f"{len(rows)} eddy-current solves (microstrip and stripline, 0.5-2 oz strips, 1 oz "
        f"planes); strip R within {100 * worst.max():.1f} % for 0.1 <= tau/delta <= 25"
    )
    print(note)
    rows = rows + strip_data(corners, solved)  # the correction: both sets
    worst = strip_errors(rows, None)
    la = [np.log(r["aspect"]) for r in rows]
    lp = [np.log(r["proximity"]) for r in rows]
    box = ((min(la), max(la)), (min(lp), max(lp)))
    cond.CORRECTION_POLES, cond.CORRECTION_BOX = tuple(CORRECTION_POLES), box
    cond.CORRECTION = ()
    c = fit_correction(rows)
    cond.CORRECTION = tuple(tuple(row) for row in c)
    after = strip_errors(rows, c)
    inside = np.array([r["inside"] for r in rows])
    for r, e0, e1, ok in zip(rows, worst, after, inside, strict=True):
        print(
            f"{r['label']}{'' if ok else ' (outside the declared ranges)'}: w/t "
            f"{r['aspect']:5.2f}, strip R worst {100 * e0:.2f} %, corrected {100 * e1:.2f} %"
        )
    note_c = (
        f"minimax over {len(rows)} eddy-current solves ({int(inside.sum())} inside the "
        f"declared ranges): strip R within {100 * after[inside].max():.1f} % inside, "
        f"{100 * after[~inside].max():.1f} % outside, 0.05 <= tau/delta <= 40"
    )
    print(note_c)
    if args.write:
        print(f"wrote {write_block(q, note)}")
        print(f"wrote {write_correction(c, box, note_c)}")
    for label, er, el in line_errors(cases + corners, solved):
        where = "" if declared(label) else " (outside the declared ranges)"
        print(f"{label}{where}: whole line R {100 * er:.2f} %, L (>= 1 MHz) {100 * el:.2f} %")


def strip_errors(rows: list, c: np.ndarray | None) -> np.ndarray:
    """Per geometry: the strip's worst |R / R_eddy - 1| over 0.05 <= tau/delta <= 40, with
    the correction ``c`` (None: the fitted shape alone)."""
    out = []
    for r in rows:
        y, ratio, terms = strip_design(r)
        if c is not None:
            ratio = ratio + terms @ c.ravel()
        out.append(np.abs(ratio / y - 1).max())
    return np.array(out)


if __name__ == "__main__":
    main()

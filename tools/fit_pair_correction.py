"""Fit the pair correction of the closed-form conductor model to the eddy-current field
solution (``xsection.fieldsolve.eddy``).

A strip of a coupled microstrip or stripline carries, per mode, the single line's
transition and correction (``materials.conductor.strip_impedance``, fitted by
tools/fit_strip_transition.py) and on top of it ``materials.conductor.pair_correction``:
the same band-pass terms between the same poles, with coefficients linear in
ln(w/t), ln(w/h), ln(s/w) and each of them times the mode's sign. For a grid of smooth-copper
pairs (4 and 12 mil strips, 0.5 and 2 oz, w/h 0.7 and 1.6, s/w 0.5, 1.2 and 3; 1 oz
planes) the eddy-current solver gives the modal power in the strips from 1 kHz to 10 GHz;
this tool fits the coefficients by a minimax linear program on the strips' modal
R / R_eddy - 1 (0.05 <= tau/delta <= 40; geometries outside the declared ranges weigh
0.3), under the constraint that each mode's L / L_eddy - 1 from 1 MHz grows nowhere
beyond the larger of its value without the correction and 1.2 %, then prints the worst
deviations per geometry and mode.

    python tools/fit_pair_correction.py            # fit and print
    python tools/fit_pair_correction.py --write    # and rewrite the block in conductor.py

Eddy solves are kept in ``--cache`` (a pickle, written as the run goes). About 10 minutes
for the 48 pairs on the two-core development machine.
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
from conductor_accuracy_table import declared
from fit_strip_transition import F, _wrap

from losslane.materials import conductor as cond
from losslane.materials.conductor import MU0
from losslane.materials.dielectric import ConstantDielectric
from losslane.units import MIL, OZ_COPPER
from losslane.xsection import registry
from losslane.xsection.base import Metal
from losslane.xsection.fieldsolve.layouts import FieldOptions
from losslane.xsection.fieldsolve.section import FieldSection
from losslane.xsection.rlgc import group_impedances

AIR = ConstantDielectric(1.0, name="air")
#: the modal transform of a symmetric pair (even, odd), as in ``xsection.base``
MODAL = np.array([[1.0, 1.0], [1.0, -1.0]]) / np.sqrt(2.0)
MODES = (("even", 1.0), ("odd", -1.0))
WEIGHT_OUTSIDE = 0.3
L_ALLOWED = 0.012


def training_set() -> list[tuple[str, tuple]]:
    """(kind, dimensions as sorted (key, value) pairs: lengths in mil, thickness in oz)."""
    out = []
    for kind in ("microstrip-pair", "stripline-pair"):
        for w, t_oz, wh, sw in itertools.product([4, 12], [0.5, 2], [0.7, 1.6], [0.5, 1.2, 3.0]):
            h = w / wh
            dims = {"width": w, "spacing": round(sw * w, 3), "thickness": t_oz}
            if kind == "microstrip-pair":
                dims["height"] = round(h, 3)
            else:
                dims |= {"below": round(h, 3), "above": round(1.4 * h, 3)}
            out.append((kind, tuple(sorted(dims.items()))))
    return out


def si(items: tuple) -> dict:
    return {k: v * (OZ_COPPER if k == "thickness" else MIL) for k, v in items}


def solve(cases: list, store: Path) -> dict:
    """{case: {mode: eddy modal strip and plane losses, R, L}}, from ``store`` where solved."""
    done = pickle.loads(store.read_bytes()) if store.exists() else {}
    t0 = time.time()
    for i, (kind, items) in enumerate(cases):
        if (kind, items) in done:
            continue
        sec = FieldSection.from_model(
            registry.model(kind), si(items), FieldOptions(AIR), Metal(plane_thickness=OZ_COPPER)
        )
        e = sec.eddy(F, estimate=False)
        rec = {}
        for k, (mode, _) in enumerate(MODES):
            v = MODAL[:, k]

            def modal(m, v=v):
                return np.einsum("i,fij,j->f", v, m, v)

            rec[mode] = {
                "strip": sum(modal(x) for n, x in e.losses.items() if not n.endswith("plane")),
                "planes": sum(modal(x) for n, x in e.losses.items() if n.endswith("plane")),
                "r": modal(e.r),
                "l": modal(e.l),
            }
        done[(kind, items)] = rec
        store.parent.mkdir(parents=True, exist_ok=True)
        store.write_bytes(pickle.dumps(done))
        print(
            f"\r  {i + 1}/{len(cases)} eddy solves, {time.time() - t0:.0f} s",
            end="",
            file=sys.stderr,
        )
    print(file=sys.stderr)
    return done


def rows_of(cases: list, solved: dict) -> list[dict]:
    """Per case and mode: tau/delta, the eddy strip R / R_dc and the closed form's (without
    the pair correction), the shape inputs, and for L from 1 MHz what the closed form has
    besides the strip's internal inductance."""
    f = F[1:]
    hf = f >= 1e6
    out = []
    for kind, items in cases:
        dims = si(items)
        cls = registry.model(kind)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            line = cls(**dims, dielectric=AIR, metal=Metal(plane_thickness=OZ_COPPER))
            groups = line._groups(*[np.asarray(getattr(line, k), float) for k in line.dimensions])
            rl = line.rlgc(f[hf])
        r_dc = 1.0 / (line.metal.conductor.sigma * dims["width"] * dims["thickness"])
        for k, (mode, sign) in enumerate(MODES):
            g = groups[mode][0]
            zs = group_impedances(f, groups[mode])
            tau = float(g.depth)
            v = MODAL[:, k]
            l_cf = np.einsum("i,fij,j->f", v, rl.l, v)
            out.append(
                {
                    "case": (kind, items),
                    "mode": mode,
                    "inside": declared(kind, dims),
                    "x": tau / line.metal.conductor.skin_depth(f),
                    "y": solved[(kind, items)][mode]["strip"][1:] / r_dc,
                    "base": zs[0][0] / r_dc,
                    "feats": [
                        float(x) for x in cond.pair_features(g.aspect, g.proximity, g.spacing, sign)
                    ],
                    "x_l": tau / line.metal.conductor.skin_depth(f[hf]),
                    "l_cf": l_cf,
                    "l_eddy": solved[(kind, items)][mode]["l"][1:][hf],
                    "l_scale": r_dc * line.metal.conductor.sigma * MU0 * tau**2,
                    "r_line": solved[(kind, items)][mode]["r"][1:],
                }
            )
    return out


def terms(x: np.ndarray, feats: list[float]) -> np.ndarray:
    """The correction's basis at tau/delta = x: one complex column per (band, feature),
    the term's contribution to (Phi - 1)/s."""
    s = 2j * np.asarray(x)[:, None] ** 2
    poles = 2 * np.asarray(cond.CORRECTION_POLES) ** 2
    band = 1 / (s + poles[:-1]) - 1 / (s + poles[1:])
    return np.einsum("fk,j->fkj", band, np.asarray(feats)).reshape(len(x), -1)


def fit(rows: list) -> np.ndarray:
    from scipy.optimize import linprog

    r_rows, r_y, l_rows, l_y, l_bound = [], [], [], [], []
    for r in rows:
        w = 1.0 if r["inside"] else WEIGHT_OUTSIDE
        sel = (r["x"] > 0.05) & (r["x"] < 40)
        x = r["x"][sel]
        b = (2j * x[:, None] ** 2 * terms(x, r["feats"])).real
        r_rows.append(w * b / r["y"][sel][:, None])
        r_y.append(w * (1 - r["base"][sel] / r["y"][sel]))
        lt = terms(r["x_l"], r["feats"]).real * r["l_scale"]
        l_rows.append(lt / r["l_eddy"][:, None])
        l_y.append(1 - r["l_cf"] / r["l_eddy"])
        l_bound.append(np.maximum(np.abs(l_y[-1]), L_ALLOWED))
    m, y = np.vstack(r_rows), np.concatenate(r_y)
    ml, yl, bl = np.vstack(l_rows), np.concatenate(l_y), np.concatenate(l_bound)
    n = m.shape[1]
    nb = len(cond.CORRECTION_POLES) - 1
    nf = n // nb
    # no change of the DC internal inductance: sum_k c_k (1/p_k - 1/p_(k+1)) = 0
    poles = 2 * np.asarray(cond.CORRECTION_POLES) ** 2
    dc = 1 / poles[:-1] - 1 / poles[1:]
    eq = np.zeros((nf, n + 1))
    for j in range(nf):
        eq[j, j:n:nf] = dc
    one, zero = np.ones((len(y), 1)), np.zeros((len(yl), 1))
    cost = np.zeros(n + 1)
    cost[-1] = 1.0
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
        raise SystemExit(f"the pair correction's fit failed: {res.message}")
    return res.x[:n].reshape(nb, nf)


def write_block(c: np.ndarray, box: tuple, note: str) -> Path:
    name = "fitted pair correction"
    body = [
        f"# BEGIN {name} (written by tools/fit_pair_correction.py; do not edit)",
        "PAIR_BOX: tuple[tuple[float, float], tuple[float, float], tuple[float, float]] = (",
        *(f"    ({lo:.6f}, {hi:.6f})," for lo, hi in box),
        ")",
        "PAIR_CORRECTION: tuple[tuple[float, ...], ...] = (",
        *("    (" + ", ".join(f"{v:.6f}" for v in row) + ")," for row in c),
        ")",
        "PAIR_NOTE = (",
        *(f"    {json.dumps(part)}" for part in _wrap(note)),
        ")",
        f"# END {name}",
    ]
    path = Path(cond.__file__)
    src = path.read_text()
    pat = re.compile(rf"^# BEGIN {re.escape(name)} .*?^# END {re.escape(name)}$", re.S | re.M)
    path.write_text(pat.sub(lambda _: "\n".join(body), src, count=1))
    return path


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--write", action="store_true")
    ap.add_argument("--cache", default="/tmp/losslane-fit-cache/pair-correction.pickle")
    args = ap.parse_args()
    cases = training_set()
    solved = solve(cases, Path(args.cache))
    # the box: the fitted pairs' ln(w/t), ln(w/h), ln(s/w)
    cond.PAIR_CORRECTION = ()
    cond.PAIR_BOX = ((-9.0, 9.0), (-9.0, 9.0), (-9.0, 9.0))
    rows = rows_of(cases, solved)
    a = [r["feats"][1] for r in rows]
    p = [r["feats"][2] for r in rows]
    g = [r["feats"][3] for r in rows]
    box = ((min(a), max(a)), (min(p), max(p)), (min(g), max(g)))
    c = fit(rows)
    cond.PAIR_BOX, cond.PAIR_CORRECTION = box, tuple(tuple(row) for row in c)
    worst_in = worst_out = 0.0
    for r in rows_of(cases, solved):
        sel = (r["x"] > 0.05) & (r["x"] < 40)
        dr = np.abs(r["base"][sel] / r["y"][sel] - 1).max()
        dl = np.abs(r["l_cf"] / r["l_eddy"] - 1).max()
        if r["inside"]:
            worst_in = max(worst_in, dr)
        else:
            worst_out = max(worst_out, dr)
        where = "" if r["inside"] else " (outside the declared ranges)"
        print(f"{r['case']} {r['mode']}{where}: strip R {100 * dr:.2f} %, line L {100 * dl:.2f} %")
    note = (
        f"minimax over {len(cases)} eddy-current solves of pairs, both modes: strip R within "
        f"{100 * worst_in:.1f} % inside the declared ranges, {100 * worst_out:.1f} % outside"
    )
    print(note)
    if args.write:
        print(f"wrote {write_block(c, box, note)}")


if __name__ == "__main__":
    main()

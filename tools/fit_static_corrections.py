"""Fit (or check) a closed-form model's field-solver correction of its quasi-static results.

For a line kind whose class carries a ``correction`` (``xsection.fitted.StaticCorrection``)
this runs the 2-D field solver on a grid of Chebyshev nodes of the correction's
dimensionless parameters, compares the model's published formulas
(``published_static``) with the solved air-filled capacitance C0 and the filling factor
q = (eps_eff - 1)/(dk - 1) of every mode, fits the logarithms of the ratios by
tensor-product Chebyshev series (least squares) and prints the residuals. One solve at
dk = 4 serves every dk: the solver's reduced model gives C(dk) to about 2e-6.

    python tools/fit_static_corrections.py microstrip-pair            # fit, print residuals
    python tools/fit_static_corrections.py microstrip-pair --write    # and rewrite the block
    python tools/fit_static_corrections.py microstrip-pair --check 40 # 40 random points at
                                                                      # the fine setting

``--write`` replaces the text between the ``# BEGIN fitted`` and ``# END fitted`` lines
of the model's module. Solves are kept in ``--cache`` (a pickle per kind and setting,
written as the run goes) so that refits with other degrees, or an interrupted run, do not
solve again. ``--jobs 2`` solves in two processes.
Times on the two-core development machine: microstrip about 2 min, the 4-parameter kinds
20-40 min.
"""

from __future__ import annotations

import argparse
import importlib
import itertools
import json
import re
import sys
import time
import warnings
import zlib
from pathlib import Path

import numpy as np

from losslane.materials.dielectric import ConstantDielectric
from losslane.xsection import registry
from losslane.xsection.fieldsolve.layouts import FieldOptions
from losslane.xsection.fieldsolve.section import complex_capacitance
from losslane.xsection.fieldsolve.solve import LEVELS, solve_level
from losslane.xsection.fitted import Axis, chebyshev
from losslane.xsection.rlgc import C0

#: the dk of the electrostatic solve (every other dk from the solver's reduced model)
DK_REF = 4.0

#: per kind: degrees of the air series (one per geometry axis), of the fill series (the
#: geometry axes, then dk), and the nodes per axis (more than the degree: least squares)
PLAN: dict[str, dict] = {
    "microstrip": {"air": (10, 6), "fill": (10, 6, 4), "nodes": (16, 10), "dk_nodes": 7},
    "microstrip-pair": {
        "air": (7, 7, 4),
        "fill": (7, 7, 4, 4),
        "nodes": (9, 9, 6),
        "dk_nodes": 7,
    },
    "cpw": {
        "air": (7, 7, 4),
        "fill": (7, 7, 4, 4),
        "loss": (7, 7, 4),
        "nodes": (9, 9, 6),
        "dk_nodes": 7,
    },
    "gcpw": {
        "air": (7, 7, 4),
        "fill": (7, 7, 4, 4),
        "loss": (7, 7, 4),
        "nodes": (9, 9, 6),
        "dk_nodes": 7,
    },
    "stripline": {"air": (8, 5, 4), "nodes": (11, 7, 6)},
    "stripline-pair": {"air": (8, 8, 5, 3), "nodes": (11, 11, 7, 5)},
}


def nodes(axis: Axis, count: int) -> np.ndarray:
    """Chebyshev nodes (first kind) of ``axis``, as parameter values."""
    x = np.cos(np.pi * (np.arange(count) + 0.5) / count)[::-1]
    if axis.scale == "log":
        lo, hi = np.log(axis.low), np.log(axis.high)
        return np.exp(0.5 * (lo + hi) + 0.5 * (hi - lo) * x)
    if axis.scale == "sqrt":
        return axis.high * ((x + 1.0) / 2.0) ** 2
    return 0.5 * (axis.low + axis.high) + 0.5 * (axis.high - axis.low) * x


def mode_values(sol, eps_regions: np.ndarray, modes: tuple[str, ...]) -> dict:
    """{mode: (C0, C(dk) over the dk list)} from one solve, and under "groups" each
    conductor group's Wheeler factor (1/m, its first diagonal entry)."""
    cc = complex_capacitance(sol, eps_regions).real  # (K, n, n)
    c0 = sol.c0
    out: dict = {"groups": {g.name: float(g.matrix[0, 0]) for g in sol.groups}}
    for m in modes:
        if m == "single":
            out[m] = (c0[0, 0], cc[:, 0, 0])
        else:
            s = 1.0 if m == "even" else -1.0
            out[m] = (
                0.5 * (c0[0, 0] + c0[1, 1]) + s * c0[0, 1],
                0.5 * (cc[:, 0, 0] + cc[:, 1, 1]) + s * cc[:, 0, 1],
            )
    return out


def solve_point(args):
    """Solve one grid point: (kind, params, dk list, level) -> {mode: (C0, C(dk))}."""
    kind, params, dks, level = args
    cls = registry.model(kind)
    dims = cls.static_dimensions(params)
    geom = cls.field_geometry(dims, FieldOptions(ConstantDielectric(DK_REF)))
    sol = solve_level(geom, level)
    eps = np.array(
        [np.ones(len(dks)) if d is None else np.asarray(dks, float) for _, d in geom.regions()],
        dtype=complex,
    )
    return mode_values(sol, eps, modes_of(cls))


def modes_of(cls) -> tuple[str, ...]:
    return tuple(cls.correction.air)


def loss_targets(cls, points: list, solved: list) -> dict:
    """{model group: ln(G_field * length) (P,)} for a kind with ``loss_groups``: the
    field solver's Wheeler factor of each conductor group made dimensionless by the
    kind's ``loss_length`` (the model uses these instead of its own recession)."""
    mapping = getattr(cls, "loss_groups", None)
    if not mapping:
        return {}
    out: dict = {g: [] for g in mapping}
    for p, res in zip(points, solved, strict=True):
        dims = cls.static_dimensions(p)
        length = float(dims[cls.loss_length])
        for g, name in mapping.items():
            if name in res["groups"]:
                out[g].append(np.log(res["groups"][name] * length))
    return {g: np.array(v) for g, v in out.items() if len(v) == len(points)}


def solve_all(
    kind: str, points: list, dks: np.ndarray, level: int, jobs: int, store: Path | None = None
) -> list:
    """Every point's solve, in order; with ``store`` (a pickle) the solves done so far are
    kept there and reused, so an interrupted run resumes."""
    import pickle

    done: dict = {}
    if store is not None and store.exists():
        done = pickle.loads(store.read_bytes())
    keys = [tuple(float(v) for v in p) for p in points]
    todo = [k for k in dict.fromkeys(keys) if k not in done]
    tasks = [(kind, k, dks, level) for k in todo]
    t0 = time.time()

    def keep(i: int, key: tuple, res: dict) -> None:
        done[key] = res
        _progress(i, len(tasks), t0)
        if store is not None and ((i + 1) % 10 == 0 or i + 1 == len(tasks)):
            store.parent.mkdir(parents=True, exist_ok=True)
            tmp = store.with_suffix(".tmp")
            tmp.write_bytes(pickle.dumps(done))
            tmp.replace(store)

    if jobs > 1 and tasks:
        from multiprocessing import Pool

        with Pool(jobs) as pool:
            for i, r in enumerate(pool.imap(solve_point, tasks, chunksize=1)):
                keep(i, todo[i], r)
    else:
        for i, t in enumerate(tasks):
            keep(i, todo[i], solve_point(t))
    if tasks:
        print(file=sys.stderr)
    return [done[k] for k in keys]


def _progress(i: int, n: int, t0: float) -> None:
    if (i + 1) % 10 == 0 or i + 1 == n:
        print(f"\r  {i + 1}/{n} solves, {time.time() - t0:.0f} s", end="", file=sys.stderr)


def targets(cls, points: list, dks: np.ndarray, solved: list) -> tuple[dict, np.ndarray]:
    """{mode: (air (P,), fill (P, K))}: the logarithms the series (times the weights)
    fit, against the model's base (published formulas; a pair's with the single line's
    correction), and the weights (P,) (1; a pair's coupling)."""
    modes = modes_of(cls)
    out = {m: ([], []) for m in modes}
    weights = []
    for p, res in zip(points, solved, strict=True):
        dims = cls.static_dimensions(p)
        weights.append(float(np.ravel(cls.correction_weight(dims))[0]))
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            pub = cls.base_static(dims, dks)
        for m in modes:
            c0f, cf = res[m]
            z_air_pub, eps_pub = (np.asarray(v, float) for v in pub[m])
            z_air_field = 1.0 / (C0 * c0f)
            out[m][0].append(float(np.ravel(z_air_pub)[0] / z_air_field))
            q_field = (cf / c0f - 1.0) / (dks - 1.0)
            q_pub = (np.broadcast_to(eps_pub, dks.shape) - 1.0) / (dks - 1.0)
            out[m][1].append(q_field / q_pub)
    logs = {m: (np.log(np.array(a)), np.log(np.array(f))) for m, (a, f) in out.items()}
    return logs, np.array(weights)


def design(axes: tuple[Axis, ...], degrees: tuple[int, ...], values: list[np.ndarray]):
    """The least-squares matrix: products of the Chebyshev polynomials of each axis."""
    cols = None
    for ax, d, v in zip(axes, degrees, values, strict=True):
        t = chebyshev(ax.unit(v), d)  # (P, d + 1)
        cols = t if cols is None else np.einsum("pa,pb->pab", cols, t).reshape(len(v), -1)
    return cols


#: ridge on the coefficients of a weighted fit: where a pair's weight (its coupling) is
#: tiny the data leave the series free; this keeps it small there
RIDGE = 1e-3


def fit(axes, degrees, values, y, weight=None) -> np.ndarray:
    """Least squares of weight * series = y (weight 1: the series itself; with weights,
    a small ridge on the coefficients)."""
    a = design(axes, degrees, values)
    if weight is not None:
        a = a * weight[:, None]
        ridge = RIDGE * np.sqrt(len(y) / a.shape[1]) * np.max(np.abs(weight))
        a = np.vstack([a, ridge * np.eye(a.shape[1])])
        y = np.concatenate([y, np.zeros(a.shape[1])])
    coef, *_ = np.linalg.lstsq(a, y, rcond=None)
    return coef.reshape(tuple(d + 1 for d in degrees))


def grid_values(points: list, dks: np.ndarray | None):
    """Per axis the parameter value of every (point[, dk]) row."""
    p = np.array(points)
    if dks is None:
        return [p[:, i] for i in range(p.shape[1])]
    k = len(dks)
    return [np.repeat(p[:, i], k) for i in range(p.shape[1])] + [np.tile(dks, len(p))]


def errors(cls, corr, points: list, dks: np.ndarray, solved: list) -> dict:
    """Worst |Z0/Z0_field - 1| and |eps/eps_field - 1| per mode of the corrected model."""
    out = {}
    for m in modes_of(cls):
        ez, ee = 0.0, 0.0
        for p, res in zip(points, solved, strict=True):
            dims = cls.static_dimensions(p)
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                z_air, eps = cls.corrected_static(dims, dks)[m]
            c0f, cf = res[m]
            eps_f = cf / c0f
            z_f = 1.0 / (C0 * np.sqrt(cf * c0f))
            z = z_air / np.sqrt(eps)
            ez = max(ez, float(np.max(np.abs(z / z_f - 1))))
            ee = max(ee, float(np.max(np.abs(eps / eps_f - 1))))
        out[m] = (ez, ee)
    return out


def format_array(a: np.ndarray, indent: int) -> str:
    """(shape, text): the coefficients to 5 significant digits in C order, wrapped."""
    words = [f"{v:.5g}" for v in np.ravel(a)]
    lines, line = [], ""
    for w in words:
        if len(line) + len(w) + 1 > 88 - indent:
            lines.append(line)
            line = ""
        line = f"{line} {w}" if line else w
    lines.append(line)
    pad = " " * indent
    body = "\n".join(pad + ln for ln in lines)
    out = " " * (indent - 4)
    return f'(\n{pad}{tuple(a.shape)},\n{pad}"""\n{body}\n{pad}""",\n{out})'


def block(
    kind: str, name: str, corr_air: dict, corr_fill: dict, note: str, loss: dict | None = None
) -> str:
    lines = [
        f"# BEGIN fitted {kind} (written by tools/fit_static_corrections.py; do not edit)",
        f"{name} = StaticCorrection.of(",
        "    AXES,",
        "    DK_AXIS," if corr_fill else "    None,",
        "    air={",
    ]
    for m, c in corr_air.items():
        lines.append(f'        "{m}": {format_array(c, 12)},')
    lines.append("    },")
    if corr_fill:
        lines.append("    fill={")
        for m, c in corr_fill.items():
            lines.append(f'        "{m}": {format_array(c, 12)},')
        lines.append("    },")
    if loss:
        lines.append("    loss={")
        for g, c in loss.items():
            lines.append(f'        "{g}": {format_array(c, 12)},')
        lines.append("    },")
    words = note.split()
    text, line = [], ""
    for w in words:
        if len(line) + len(w) + 1 > 84:
            text.append(line)
            line = ""
        line = f"{line} {w}" if line else w
    text.append(line)
    lines.append("    note=(")
    for i, ln in enumerate(text):
        lines.append("        " + json.dumps(ln + (" " if i < len(text) - 1 else "")))
    lines.append("    ),")
    lines.append(")")
    lines.append(f"# END fitted {kind}")
    return "\n".join(lines)


def block_pattern(kind: str) -> re.Pattern:
    k = re.escape(kind)
    return re.compile(
        rf"^# BEGIN fitted {k} .*?^(\w+) = StaticCorrection.*?^# END fitted {k}$", re.S | re.M
    )


def write_block(cls, kind: str, make) -> Path:
    """Replace the kind's block in its model's module by ``make(name)``."""
    mod = importlib.import_module(cls.__module__)
    path = Path(mod.__file__)
    src = path.read_text()
    m = block_pattern(kind).search(src)
    if m is None:
        raise SystemExit(f"{path}: no '# BEGIN fitted {kind}' ... '# END fitted {kind}' block")
    path.write_text(src[: m.start()] + make(m.group(1)) + src[m.end() :])
    return path


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("kind", choices=sorted(PLAN))
    ap.add_argument("--accuracy", default="normal", choices=sorted(LEVELS))
    ap.add_argument("--write", action="store_true")
    ap.add_argument("--check", type=int, default=0, help="random points checked at 'fine'")
    ap.add_argument("--jobs", type=int, default=1)
    ap.add_argument("--cache", default="/tmp/losslane-fit-cache")
    ap.add_argument("--seed", type=int, default=12)
    args = ap.parse_args()
    cls = registry.model(args.kind)
    plan = PLAN[args.kind]
    corr = cls.correction
    axes = corr.axes
    homogeneous = corr.dk is None
    dks = None if homogeneous else nodes(corr.dk, plan["dk_nodes"])
    solve_dks = np.array([DK_REF]) if homogeneous else dks
    grid = [nodes(a, n) for a, n in zip(axes, plan["nodes"], strict=True)]
    points = list(itertools.product(*grid))
    tag = ("groups",) if "loss" in plan else ()
    key = zlib.crc32(repr((axes, list(solve_dks)) + tag).encode())
    store = Path(args.cache) / f"{args.kind}-{args.accuracy}-{key:08x}.pickle"
    solved = solve_all(args.kind, points, solve_dks, LEVELS[args.accuracy], args.jobs, store)
    tg, wts = targets(cls, points, solve_dks, solved)
    air, fill = {}, {}
    for m, (a, f) in tg.items():
        air[m] = fit(axes, plan["air"], grid_values(points, None), a, wts)
        if not homogeneous:
            w_f = np.repeat(wts, len(dks))
            fill[m] = fit(axes + (corr.dk,), plan["fill"], grid_values(points, dks), f.ravel(), w_f)
        print(
            f"{m}: published formulas against the solver: air-filled C0 "
            f"{100 * np.min(np.expm1(a)):+.2f} .. {100 * np.max(np.expm1(a)):+.2f} %"
            + (
                ""
                if homogeneous
                else f", filling factor {100 * np.min(np.expm1(f)):+.2f} .. "
                f"{100 * np.max(np.expm1(f)):+.2f} %"
            )
        )
    from losslane.xsection.fitted import StaticCorrection

    loss = {}
    if "loss" in plan:
        for g, y in loss_targets(cls, points, solved).items():
            loss[g] = fit(axes, plan["loss"], grid_values(points, None), y)
            fitted = design(axes, plan["loss"], grid_values(points, None)) @ loss[g].ravel()
            worst = 100 * np.max(np.abs(np.expm1(fitted - y)))
            print(f"{g}: Wheeler factor fitted within {worst:.2f} %")
    new = StaticCorrection.of(axes, corr.dk, air, fill, loss=loss)
    cls.correction = new  # the class reads its correction through this attribute
    train = errors(cls, new, points, solve_dks, solved)
    summary = "; ".join(
        f"{m} Z0 {100 * ez:.3f} %, eps_eff {100 * ee:.3f} %" for m, (ez, ee) in train.items()
    )
    print(f"worst on the {len(points)} fitted points: {summary}")
    note = f"{len(points)} solves at accuracy {args.accuracy!r}; worst deviation on them: {summary}"
    if args.check:
        rng = np.random.default_rng(args.seed)
        pts = []
        for _ in range(args.check):
            p = []
            for ax in axes:
                u = rng.uniform(-1, 1)
                if ax.scale == "log":
                    lo, hi = np.log(ax.low), np.log(ax.high)
                    p.append(float(np.exp(0.5 * (lo + hi) + 0.5 * (hi - lo) * u)))
                elif ax.scale == "sqrt":
                    p.append(float(ax.high * ((u + 1) / 2) ** 2))
                else:
                    p.append(float(0.5 * (ax.low + ax.high) + 0.5 * (ax.high - ax.low) * u))
            pts.append(tuple(p))
        cdks = np.array([DK_REF]) if homogeneous else np.array([1.5, 2.2, 3.5, 4.5, 10.0, 16.0])
        store = Path(args.cache) / f"{args.kind}-check-{key:08x}.pickle"
        res = solve_all(args.kind, pts, cdks, LEVELS["fine"], args.jobs, store)
        chk = errors(cls, new, pts, cdks, res)
        line = "; ".join(
            f"{m} Z0 {100 * ez:.3f} %, eps_eff {100 * ee:.3f} %" for m, (ez, ee) in chk.items()
        )
        print(f"worst on {len(pts)} random points against 'fine' solves: {line}")
        note += f"; on {len(pts)} random points against 'fine' solves: {line}"
    if args.write:
        path = write_block(
            cls, args.kind, lambda name: block(args.kind, name, air, fill, note, loss)
        )
        print(f"wrote {path}")


if __name__ == "__main__":
    main()

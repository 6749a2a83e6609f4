"""A sweep's outputs besides its table: the terminal summary (how many cases, the range of
each result column, the best and worst cases by a chosen column) and the charts (a result
against one varied parameter, grouped by another; a histogram for random sweeps)."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from losslane.report.charts import pyplot, save_figure, user_text
from losslane.report.text import CAUTION, table


def numeric_columns(tbl, skip: set[str]) -> list[str]:
    import pyarrow as pa

    out = []
    for name, col in zip(tbl.column_names, tbl.columns, strict=True):
        if name in skip or name == "error":
            continue
        if pa.types.is_floating(col.type) or pa.types.is_integer(col.type):
            out.append(name)
    return out


def rank_column(result) -> str | None:
    """The column the summary ranks by: the plan's ``rank``, else the loss at the highest
    frequency of a cross-section sweep, else a build's margin."""
    plan, tbl = result.plan, result.table
    if plan.rank:
        return plan.rank if plan.rank in tbl.column_names else None
    if plan.base is not None and plan.at:
        top = max(range(len(plan.at)), key=lambda i: plan.at_hz[i])
        name = "loss_db_per_in_" + "".join(plan.at[top].split())
        return name if name in tbl.column_names else None
    return "margin_db" if "margin_db" in tbl.column_names else None


def summary(result) -> dict:
    """Ranges of the result columns and the best/worst cases by the rank column."""
    tbl = result.table
    varied = set(result.varied_columns)
    ranges = {}
    for name in numeric_columns(tbl, varied):
        v = np.asarray(tbl.column(name).to_numpy(zero_copy_only=False), float)
        v = v[np.isfinite(v)]
        if v.size:
            ranges[name] = {"min": float(v.min()), "max": float(v.max())}
    out: dict = {"ranges": ranges, "rank": rank_column(result), "best": None, "worst": None}
    col = out["rank"]
    if col is not None:
        v = np.asarray(tbl.column(col).to_numpy(zero_copy_only=False), float)
        ok = np.flatnonzero(np.isfinite(v))
        if ok.size:
            lower_better = not col.startswith("margin")
            order = ok[np.argsort(v[ok])]
            best, worst = (order[0], order[-1]) if lower_better else (order[-1], order[0])
            keys = [c for c in result.varied_columns if not c.endswith("_m")]
            for label, i in (("best", best), ("worst", worst)):
                out[label] = {
                    "case": int(i) + 1,
                    col: float(v[i]),
                    **{k: tbl.column(k)[int(i)].as_py() for k in keys},
                }
    return out


def sweep_text(result) -> str:
    s = summary(result)
    lines = [
        f"{result.plan.name}: {result.cases} cases, {result.failed} failed; table {result.out}"
    ]
    rows = [[k, f"{v['min']:.6g}", f"{v['max']:.6g}"] for k, v in s["ranges"].items()]
    if rows:
        lines += ["", table(["column", "min", "max"], ["", "", ""], rows, left=1)]
    if s["rank"] and s["best"]:
        lines += ["", f"ranked by {s['rank']}"]
        for label in ("best", "worst"):
            r = s[label]
            vals = ", ".join(f"{k} {v}" for k, v in r.items() if k not in ("case", s["rank"]))
            lines.append(f"  {label}: case {r['case']} ({vals}): {r[s['rank']]:.6g}")
    if "model" in result.table.column_names:
        from collections import Counter

        used = Counter(v for v in result.table.column("model").to_pylist() if v is not None)
        lines += ["", "models: " + ", ".join(f"{k} {n} cases" for k, n in sorted(used.items()))]
    if result.warnings:
        lines += ["", "warnings met (the models' validity ranges):"]
        lines += [f"  {w}" for w in result.warnings[:10]]
        if len(result.warnings) > 10:
            lines.append(f"  ... and {len(result.warnings) - 10} more")
    if result.charts:
        lines += ["", "charts:"] + [f"  {p}" for p in result.charts]
    lines += ["", CAUTION]
    return "\n".join(lines)


def _x_values(plan, tbl, x: str) -> tuple[list, str]:
    """The x column for a chart and its axis label: a length in the unit its values are
    written in (mil, um, ...), else the column as it is."""
    import re

    param = next((p for p in plan.parameters if p.key == x), None)
    if f"{x}_m" not in tbl.column_names or param is None or not param.values:
        return tbl.column(x).to_pylist(), x
    m = re.fullmatch(
        r"\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*", str(param.values[0])
    )
    metres = tbl.column(f"{x}_m").to_pylist()
    if m is None or not m.group(2) or param.si is None or float(m.group(1)) == 0:
        return metres, f"{x} (m)"
    factor = param.si[0] / float(m.group(1))
    return [None if v is None else v / factor for v in metres], f"{x} ({m.group(2)})"


def _safe(column: str) -> str:
    """A column name as part of a file name: what is not a letter, digit, dot, dash or
    underscore becomes a dash (a key written with a slash stays in the folder)."""
    import re

    return re.sub(r"[^A-Za-z0-9._-]+", "-", column)


@user_text
def sweep_charts(result, stem: Path) -> list[Path]:
    """A result against one varied parameter grouped by another (the plan's ``chart``, or
    the rank column against the first varied parameter), and for random sweeps a
    histogram of the rank column. Written next to the table."""
    plan, tbl = result.plan, result.table
    out: list[Path] = []
    col = rank_column(result)
    spec = plan.chart or {}
    y = spec.get("y") or col
    x = spec.get("x") or next((p.key for p in plan.parameters if p.kind != "random"), None)
    group = spec.get("group")
    plt = pyplot()
    if y in tbl.column_names and x is not None and x in tbl.column_names:
        xs, xlabel = _x_values(plan, tbl, x)
        ys = tbl.column(y).to_pylist()
        gs = tbl.column(group).to_pylist() if group in (tbl.column_names if group else []) else None
        # one line per combination of the other varied keys, coloured by the group
        tied = {k for g in plan.together if x in g or group in g for k in g}  # go with x/group
        others = [
            p.key
            for p in plan.parameters
            if p.kind != "random"
            and p.key not in (x, group)
            and p.key not in tied
            and p.key in tbl.column_names
        ]
        rest = (
            list(zip(*(tbl.column(k).to_pylist() for k in others), strict=True)) if others else None
        )
        fig, ax = plt.subplots(figsize=(8.0, 4.6), dpi=110)
        try:
            colours = plt.rcParams["axes.prop_cycle"].by_key()["color"]
            keys = list(dict.fromkeys(gs)) if gs else [None]
            for n, g in enumerate(keys):
                colour = colours[n % len(colours)]
                lines: dict = {}
                for i, (a, b) in enumerate(zip(xs, ys, strict=True)):
                    if (gs is None or gs[i] == g) and a is not None and b is not None:
                        lines.setdefault(rest[i] if rest else None, []).append((a, b))
                for k, pts in enumerate(lines.values()):
                    pts.sort(key=lambda p: p[0])
                    label = (str(g) if g is not None else y) if k == 0 else None
                    ax.plot(*zip(*pts, strict=True), "o-", ms=3, lw=1.0, color=colour, label=label)
            ax.set_xlabel(xlabel)
            ax.set_ylabel(y)
            ax.grid(True, alpha=0.3)
            ax.legend(fontsize=7, title=group)
            heading = f"{plan.name}: {y} against {x}"
            if others:
                heading += f"\n(one line per {', '.join(others)})"
            ax.set_title(heading, fontsize=10)
            fig.tight_layout()
            out.append(save_figure(fig, stem.with_name(f"{stem.name}-{_safe(y)}.png")))
        finally:
            plt.close(fig)
    if plan.random and col in tbl.column_names:
        v = np.asarray(tbl.column(col).to_numpy(zero_copy_only=False), float)
        v = v[np.isfinite(v)]
        if v.size:
            fig, ax = plt.subplots(figsize=(7.0, 4.0), dpi=110)
            try:
                ax.hist(v, bins=min(60, max(10, int(np.sqrt(v.size)))), color="#4a7fb5")
                ax.set_xlabel(col)
                ax.set_ylabel("cases")
                ax.grid(True, alpha=0.3)
                fig.tight_layout()
                name = f"{stem.name}-{_safe(col)}-histogram.png"
                out.append(save_figure(fig, stem.with_name(name)))
            finally:
                plt.close(fig)
    return out

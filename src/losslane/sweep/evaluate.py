"""Evaluating a chunk of a sweep's cases into table columns (what one task does, on any
worker). A chunk carries the plan (with every file it needs as contents) and a range of
case numbers; it returns {column: list} with one entry per case, and the distinct
validity warnings met.

Cross-section cases that differ only in dimensions are evaluated together in one array
call of the model (the batch path of `losslane spread`) and reported with the arithmetic
of `losslane line --json`, so a row equals the single-case command's numbers. Cases the
model refuses, and field-solved cases, are evaluated one by one; a refused case records
its error and the others go on.
"""

from __future__ import annotations

import copy
import tempfile
import tomllib
import warnings
from pathlib import Path

import numpy as np

from losslane.errors import LossLaneError, LossLaneWarning
from losslane.sweep.plan import Plan

#: line --json keys that are not per-frequency columns
_NOT_COLUMNS = ("kind", "frequencies_hz", "rlgc", "solver", "field_solver", "eps_eff_modes")


def freq_label(written: str) -> str:
    """A frequency as written in the plan, without spaces: "1 GHz" -> "1GHz"."""
    return "".join(str(written).split())


def case_values(plan: Plan, case: int) -> dict[str, object]:
    """{key: the value of case ``case`` as written} (random draws as metres)."""
    idx = plan.indices(case)
    out: dict[str, object] = {}
    for p in plan.parameters:
        if p.kind == "random":
            out[p.key] = f"{plan.random[p.key][idx[p.key]]!r} m"
        else:
            out[p.key] = p.values[idx[p.key]]
    return out


def _one_type(values: tuple) -> list:
    """A list's values in one column type, so that every part of the table agrees: whole
    and decimal numbers as decimals, and a list that mixes text with other values as text
    (``true``/``false`` as TOML writes them)."""
    types = {type(v) for v in values}
    if types <= {int, float}:
        return [float(v) for v in values] if float in types else list(values)
    if len(types) == 1:
        return list(values)
    return [str(v).lower() if isinstance(v, bool) else str(v) for v in values]


def value_columns(plan: Plan, idx: dict[str, np.ndarray]) -> dict[str, list | np.ndarray]:
    """The varied columns of the cases whose value indices are ``idx``: each key's value
    as written, and lengths also in metres (``<key>_m``)."""
    cols: dict[str, list | np.ndarray] = {}
    for p in plan.parameters:
        i = idx[p.key]
        if p.kind == "random":
            si = plan.random[p.key][i]
            cols[p.key] = [f"{v!r} m" for v in si.tolist()]
            cols[f"{p.key}_m"] = si
        else:
            values = np.asarray(_one_type(p.values), dtype=object)
            cols[p.key] = values[i].tolist()
            if p.length and p.si is not None:
                cols[f"{p.key}_m"] = np.asarray(p.si, float)[i]
    return cols


def _materialise(plan: Plan, directory: Path) -> dict[str, str]:
    """Write the plan's files into ``directory`` under the names the plan and its
    scenario use. A name that would land outside it (an absolute path, ``..``) is written
    inside under another name: returns {name as written: name used}, for the references
    to be rewritten (nothing is ever written outside ``directory``)."""
    root = directory.resolve()
    aliases: dict[str, str] = {}
    for k, (name, data) in enumerate(plan.files.items()):
        target = (directory / name).resolve()
        if not target.is_relative_to(root) or target == root:
            used = f"outside-{k}/{Path(name).name or 'file'}"
            aliases[name] = used
            target = directory / used
        target.parent.mkdir(parents=True, exist_ok=True)
        target.write_bytes(data)
    return aliases


def _renamed(data: dict, aliases: dict[str, str]) -> None:
    """Point a scenario's file references (``library``, ``touchstone`` segments, ``[compare]
    measured``) at the names the files were written under."""
    if not aliases:
        return
    libs = data.get("library")
    if isinstance(libs, str):
        data["library"] = aliases.get(libs, libs)
    elif isinstance(libs, list):
        data["library"] = [aliases.get(x, x) if isinstance(x, str) else x for x in libs]
    for seg in data.get("channel", []) if isinstance(data.get("channel"), list) else []:
        if isinstance(seg, dict) and isinstance(seg.get("touchstone"), str):
            seg["touchstone"] = aliases.get(seg["touchstone"], seg["touchstone"])
    compare = data.get("compare")
    if isinstance(compare, dict) and isinstance(compare.get("measured"), str):
        compare["measured"] = aliases.get(compare["measured"], compare["measured"])


# --- cross-section cases -------------------------------------------------------------------


def _line_columns(json_obj: dict, at: tuple[str, ...]) -> dict[str, object]:
    """One case's result columns from its `line --json` object."""
    out: dict[str, object] = {}
    for key, value in json_obj.items():
        if key in _NOT_COLUMNS or not isinstance(value, list):
            continue
        for written, v in zip(at, value, strict=True):
            out[f"{key}_{freq_label(written)}"] = v
    return out


def _group_columns(
    plan: Plan, spec: dict, dims: dict[str, np.ndarray], library
) -> dict[str, np.ndarray]:
    """Result columns of cases that share ``spec`` but their dimensions ``dims`` ((S,)
    metres each), in one array call of the model, with the arithmetic of `line --json`
    (``report.line.line_arrays``); raises LossLaneError if the model refuses any case."""
    from losslane.report.line import line_arrays
    from losslane.spec import python_where
    from losslane.xsection.base import LineValues, check_dimensions, mode_values
    from losslane.xsection.factory import section_from_spec

    first_spec = dict(spec)
    first_spec.update({k: f"{float(v[0])!r} m" for k, v in dims.items()})
    first = section_from_spec(first_spec, python_where("sweep"), library.dielectric, library.foil)
    cls = type(first)
    check_dimensions(cls.kind, dims)
    f = np.asarray(plan.at_hz, float)
    arrays = {k: v[:, None] for k, v in dims.items()}
    modes = first.mode_arrays(f, first.dielectric.eps(f), **arrays)
    main = mode_values(modes["single" if cls.n_conductors == 1 else "odd"], f)
    even = mode_values(modes["even"], f) if cls.n_conductors == 2 else None
    values = line_arrays(LineValues(cls.kind, f, None, main, even))
    out: dict[str, np.ndarray] = {}
    for key, a in values.items():
        a = np.broadcast_to(a, (len(next(iter(dims.values()))), f.size))
        for j, written in enumerate(plan.at):
            col = a[:, j]
            if key.startswith("zc_"):
                col = np.where(np.isfinite(col), col, np.nan)
            out[f"{key}_{freq_label(written)}"] = col
    return out


def _one_line(spec: dict, plan: Plan, library, stackups=None) -> tuple[dict, str]:
    """One case's result columns and the model that produced them ("closed-form" or
    "field"); a line on a stackup ``layer`` is placed as a scenario's [lines.*] would be
    (``xsection.on_layer``), with ``stackups`` (name -> Stackup)."""
    from losslane.report.line import line_json
    from losslane.spec import python_where
    from losslane.xsection.factory import section_from_spec
    from losslane.xsection.on_layer import on_layer, section_on_layer, solver_of

    if on_layer(spec):
        sec, model = section_on_layer(
            "sweep", spec, "[base]", stackups or {}, library.dielectric, library.foil
        )
        solver = model.solver
    else:
        sec = section_from_spec(spec, python_where("sweep"), library.dielectric, library.foil)
        solver = solver_of(sec)
    values = sec.line_values(np.asarray(plan.at_hz, float))
    report = getattr(sec, "solver_report", None)
    return _line_columns(line_json(values, report() if report else None), plan.at), solver


def _dimension_arrays(plan: Plan, idx: dict[str, np.ndarray], members: np.ndarray, dims):
    """{dimension: (S,) metres} of the group's cases: varied ones from the plan (parsed
    once), the others the base's value."""
    from losslane.units import parse_quantity

    out = {}
    for key in dims:
        p = next((q for q in plan.parameters if q.key == key), None)
        if p is None:
            v = (
                parse_quantity(plan.base[key], "length", f"[base].{key}")
                if key in plan.base
                else None
            )
            if v is None:
                return None
            out[key] = np.full(members.size, v)
        elif p.kind == "random":
            out[key] = plan.random[key][idx[key][members]]
        elif p.si is not None:
            out[key] = np.asarray(p.si, float)[idx[key][members]]
        else:
            return None
    return out


def line_chunk(
    plan: Plan, cases: list[int], directory: Path, aliases: dict[str, str] | None = None
) -> tuple[dict, list[str]]:
    """Result columns (and ``error``) of cross-section cases, as {column: list}
    (``aliases``: the names the plan's files were written under, see ``_materialise``)."""
    from losslane.materials.library import load_library
    from losslane.xsection import registry

    aliases = aliases or {}
    library = load_library(
        [directory / aliases.get(f"library/{name}", f"library/{name}") for name in plan.libraries]
    )
    layered = "layer" in plan.base or any(p.key == "layer" for p in plan.parameters)
    stackups = None
    if layered:
        from losslane.stackup import board_stackups

        stackups = board_stackups(plan.boards, library, library.dielectric, library.foil)
    case_arr = np.asarray(cases, dtype=np.int64)
    idx = plan.index_arrays(case_arr)
    n = case_arr.size
    # cases that share every parameter but the kind's dimensions go together
    kinds = {str(plan.base["kind"])}
    kinds |= {str(v) for p in plan.parameters if p.key == "kind" for v in p.values}
    dims_union: set[str] = set()
    for k in kinds:
        try:
            dims_union |= set(registry.model(k).dimensions)
        except LossLaneError:
            pass
    grouping = [p for p in plan.parameters if p.key not in dims_union]
    if grouping:
        keys = np.stack([idx[p.key] for p in grouping], axis=1)
        _, group_of = np.unique(keys, axis=0, return_inverse=True)
        group_of = np.asarray(group_of).reshape(-1)
    else:
        group_of = np.zeros(n, dtype=np.int64)
    columns: dict[str, np.ndarray | list] = {}
    errors: list = [None] * n
    models: list | None = [None] * n if layered else None  # which model, per case

    def put(name: str, members: np.ndarray, values) -> None:
        if name not in columns:
            columns[name] = np.full(n, np.nan)
        columns[name][members] = values

    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", LossLaneWarning)
        for g in np.unique(group_of):
            members = np.flatnonzero(group_of == g)
            spec = dict(plan.base)
            spec.update(case_values(plan, int(case_arr[members[0]])))
            try:
                cls = registry.model(str(spec.get("kind")), "kind")
            except LossLaneError as exc:
                for i in members:
                    errors[i] = str(exc)
                continue
            fast = spec.get("solver", "closed-form") != "field" and cls.vectorized()
            fast = fast and not layered
            dims = _dimension_arrays(plan, idx, members, cls.dimensions) if fast else None
            if dims is not None:
                try:
                    for name, values in _group_columns(plan, spec, dims, library).items():
                        put(name, members, values)
                    continue
                except LossLaneError:
                    pass  # one of them is refused: evaluate them one by one
            for i in members:
                one = dict(plan.base)
                one.update(case_values(plan, int(case_arr[i])))
                try:
                    values, solver = _one_line(one, plan, library, stackups)
                    for name, value in values.items():
                        put(name, np.array([i]), np.nan if value is None else value)
                    if models is not None:
                        models[i] = solver
                except LossLaneError as exc:
                    errors[i] = str(exc)
    out: dict = value_columns(plan, idx)
    for name, col in columns.items():
        out[name] = [None if v != v else v for v in col.tolist()]  # NaN -> null
    if models is not None:
        out["model"] = models
    out["error"] = errors
    return out, list(dict.fromkeys(str(w.message) for w in caught))


# --- scenario cases ------------------------------------------------------------------------


def set_path(data: dict, key: str, value: object) -> None:
    """Set the dotted ``key`` ("lines.host.width", "channel.3.length") in scenario
    tables ``data``; a LossLaneError names the key when its path does not exist."""
    parts = key.split(".")
    node = data
    for n, part in enumerate(parts[:-1]):
        where = ".".join(parts[: n + 1])
        if isinstance(node, list):
            if not part.isdigit() or not 1 <= int(part) <= len(node):
                raise LossLaneError(
                    f'[vary]."{key}": {where} is not a segment (counted from 1, 1..{len(node)})'
                )
            node = node[int(part) - 1]
        elif isinstance(node, dict) and part in node:
            node = node[part]
        else:
            raise LossLaneError(f'[vary]."{key}": the scenario has no {where}')
    if not isinstance(node, dict):
        raise LossLaneError(f'[vary]."{key}": {".".join(parts[:-1])} is not a table')
    node[parts[-1]] = value


#: the build --json values a scenario case reports (column: path in the object)
BUILD_COLUMNS = {
    "passed": ("budget", "passed"),
    "margin_db": ("budget", "margin_db"),
    "loss_at_nyquist_db": ("budget", "total_db"),
    "nyquist_hz": ("budget", "nyquist_hz"),
    "fit_a0_db": ("fit", "a0_db"),
    "fit_a1_db_per_sqrt_ghz": ("fit", "a1_db_per_sqrt_ghz"),
    "fit_a2_db_per_ghz": ("fit", "a2_db_per_ghz"),
    "fit_a4_db_per_ghz2": ("fit", "a4_db_per_ghz2"),
    "fitted_loss_at_nyquist_db": ("fit", "fitted_loss_at_nyquist_db"),
    "ild_peak_db": ("fit", "ild_peak_db"),
    "ild_rms_db": ("fit", "ild_rms_db"),
    "guaranteed_passive_reciprocal": ("guaranteed_passive_reciprocal",),
    "passivity": ("quality", "passivity"),
    "reciprocity": ("quality", "reciprocity"),
    "causality": ("quality", "causality"),
    "skew_s": ("time_domain", "skew_s"),
    "icn_mv": ("crosstalk", "icn_mv"),
    "icr_at_nyquist_db": ("crosstalk", "icr_at_nyquist_db"),
}


def build_columns(data: dict) -> dict[str, object]:
    """A scenario case's result columns from its `build --json` object."""
    out: dict[str, object] = {}
    for col, path in BUILD_COLUMNS.items():
        node: object = data
        for p in path:
            node = node.get(p) if isinstance(node, dict) else None
        out[col] = node
    budget = data.get("budget") or {}
    for k, chk in enumerate(budget.get("checks", []), start=1):
        out[f"check{k}_loss_db"] = chk.get("loss_db")
        out[f"check{k}_return_loss_db"] = chk.get("return_loss_db")
        out[f"check{k}_passed"] = chk.get("passed")
    for k, band in enumerate(budget.get("bands", []) or [], start=1):
        out[f"band{k}_worst_loss_db"] = band.get("worst_loss_db")
        out[f"band{k}_worst_return_loss_db"] = band.get("worst_return_loss_db")
        out[f"band{k}_passed"] = band.get("passed")
    for k, mask in enumerate(budget.get("masks", []) or [], start=1):
        out[f"mask{k}_worst_margin_db"] = mask.get("worst_margin_db")
        out[f"mask{k}_passed"] = mask.get("passed")
    return out


def build_case(
    plan: Plan, case: int, directory: Path, aliases: dict[str, str] | None = None
) -> tuple[dict, bytes | None, str]:
    """One scenario case: its columns, its Touchstone text if asked, and its name."""
    from losslane.api import build_result
    from losslane.scenario import scenario_from_data

    text = plan.files[plan.scenario].decode("utf-8")
    data = copy.deepcopy(tomllib.loads(text))
    for key, value in case_values(plan, case).items():
        set_path(data, key, value)
    _renamed(data, aliases or {})
    sc = scenario_from_data(data, directory, directory / plan.scenario, text)
    res = build_result(sc)
    touch = None
    if plan.touchstone:
        from losslane.network.touchstone import touchstone_text

        touch = touchstone_text(res.channel.network, scenario=sc.name, order=sc.ports.order).encode(
            "latin-1", "replace"
        )
    return build_columns(res.to_json()), touch, f"s{res.channel.nports}p"


def scenario_chunk(
    plan: Plan, cases: list[int], directory: Path, aliases: dict[str, str] | None = None
) -> tuple[dict, list, dict]:
    """Result columns (and ``error``) of scenario cases, the warnings, and the Touchstone
    texts of the cases when the plan asks for them."""
    rows: list[dict] = []
    files: dict[int, tuple[bytes, str]] = {}
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", LossLaneWarning)
        for c in cases:
            try:
                cols, touch, ext = build_case(plan, c, directory, aliases)
                rows.append(cols)
                if touch is not None:
                    files[c] = (touch, ext)
            except LossLaneError as exc:
                rows.append({"error": str(exc)})
    out: dict = value_columns(plan, plan.index_arrays(np.asarray(cases, dtype=np.int64)))
    for name in dict.fromkeys(k for r in rows for k in r if k != "error"):
        out[name] = [r.get(name) for r in rows]
    out["error"] = [r.get("error") for r in rows]
    return out, list(dict.fromkeys(str(w.message) for w in caught)), files


def evaluate_chunk(plan: Plan, cases: list[int]) -> dict:
    """Everything a task returns: {"cases", "columns" (varied and result columns, one
    entry per case, ``error`` last), "warnings", "files" (case -> (Touchstone bytes,
    extension))}."""
    from threadpoolctl import threadpool_limits

    # one thread of linear algebra per task: the workers are the parallelism
    with threadpool_limits(1), tempfile.TemporaryDirectory(prefix="losslane-sweep-") as d:
        directory = Path(d)
        aliases = _materialise(plan, directory)
        if plan.base is not None:
            columns, messages = line_chunk(plan, cases, directory, aliases)
            files: dict = {}
        else:
            columns, messages, files = scenario_chunk(plan, cases, directory, aliases)
    return {"cases": list(cases), "columns": columns, "warnings": messages, "files": files}


__all__ = ["build_columns", "evaluate_chunk", "freq_label", "set_path"]

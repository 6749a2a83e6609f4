"""A sweep plan (TOML) -> a validated :class:`Plan`: the base (a cross-section with the keys
of a [lines.*] section, or a scenario file), the parameters to vary and how they combine,
and what to report. Every error names the key, the value and what is valid.

Plan keys (see the README, "Design sweeps"):

* ``[base]`` -- a cross-section: ``kind`` and the keys of a [lines.*] section; or
  ``scenario = "lane.toml"`` -- a channel, each case a build;
* ``[vary]`` -- per key: a list of values as written (``["4 mil", "5 mil"]``), a range
  ``{ start, stop, step }`` or ``{ start, stop, points }`` (both ends included; a step must
  divide the range), or random samples ``{ nominal, tolerance, distribution }`` (the
  tolerance a length or a percentage, the distribution "normal" -- tolerance = 3 sigma --
  or "uniform", as `losslane spread` takes them; ``samples`` draws per combination of
  the other parameters, ``seed`` for the generator). With a scenario base the keys are
  dotted paths into it: ``"lines.host.width"``, ``"channel.3.length"`` (segments counted
  from 1), ``"channel.2.via.stub"``, ``"budget.data_rate"``;
* ``combine = "product"`` (default: every combination) or ``"zip"`` (the lists side by
  side, all of one length); ``together = [["layer", "kind"], ...]``: groups of keys whose
  lists (of one length) are walked side by side inside the product;
* ``[stackup]`` / ``[stackups.NAME]`` (or a library file's): the board a cross-section on
  a ``layer`` takes its heights, copper and laminate from (as in a scenario);
* ``[results]`` -- ``at`` (the frequencies of the per-frequency columns of a cross-section
  sweep), ``touchstone = true`` (a scenario sweep writes each case's files),
  ``rank`` (a result column the summary ranks the cases by), ``chart = { x, y, group }``;
* ``library = [...]`` -- material library files; ``scheduler``, ``workers``, ``chunk``.
"""

from __future__ import annotations

import hashlib
import math
import tomllib
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from losslane.errors import LossLaneError
from losslane.spec import check_keys, flag, suggest
from losslane.units import parse_frequency, parse_quantity

TOP_KEYS = (
    "name",
    "note",
    "base",
    "scenario",
    "vary",
    "results",
    "library",
    "combine",
    "samples",
    "seed",
    "scheduler",
    "workers",
    "chunk",
    "together",
    "stackup",
    "stackups",
)
COMBINE = ("product", "zip")
DISTRIBUTIONS = ("normal", "uniform")
MAX_CASES = 10_000_000


@dataclass(frozen=True)
class Parameter:
    """One varied key: its ``values`` as written (lists and ranges), or random draws
    ``samples`` (SI floats) around ``nominal``; ``kind`` is "list", "range" or "random";
    ``length`` says whether the values are lengths (a metres column is added)."""

    key: str
    kind: str
    values: tuple = ()
    si: tuple | None = None  # parsed values (lengths in m) where they are quantities
    length: bool = False
    nominal: str | None = None
    tolerance: str | None = None
    distribution: str = "normal"


@dataclass(frozen=True)
class Plan:
    """A validated plan. ``files`` holds every file the cases need, as {relative name:
    bytes} (the scenario, its libraries and imported models, the plan's libraries), so a
    worker needs no shared file system."""

    path: Path | None
    name: str
    base: dict | None
    scenario: str | None  # the scenario's file name (its contents in ``files``)
    parameters: tuple[Parameter, ...]
    combine: str
    samples: int
    seed: int
    at: tuple[str, ...]
    at_hz: tuple[float, ...]
    touchstone: bool
    rank: str | None
    chart: dict | None
    libraries: tuple[str, ...]
    files: dict[str, bytes] = field(repr=False)
    scheduler: str | None = None
    workers: int | None = None
    chunk: int | None = None
    random: dict[str, np.ndarray] = field(default_factory=dict, repr=False)
    #: groups of keys walked side by side inside the product (``together``)
    together: tuple[tuple[str, ...], ...] = ()
    #: the plan's own ``stackup`` / ``stackups`` tables, as written
    boards: dict = field(default_factory=dict)

    @property
    def grid(self) -> tuple[Parameter, ...]:
        """The list and range parameters (combined by ``combine``)."""
        return tuple(p for p in self.parameters if p.kind != "random")

    @property
    def axes(self) -> tuple[tuple[Parameter, ...], ...]:
        """The grid's axes: one per list or range, a ``together`` group sharing one (all of
        them one axis with ``combine = "zip"``)."""
        grid = self.grid
        if self.combine == "zip":
            return (grid,) if grid else ()
        axes: list[list[Parameter]] = []
        where: dict[tuple[str, ...], int] = {}
        for p in grid:
            group = next((g for g in self.together if p.key in g), None)
            if group is not None and group in where:
                axes[where[group]].append(p)
                continue
            if group is not None:
                where[group] = len(axes)
            axes.append([p])
        return tuple(tuple(a) for a in axes)

    @property
    def shape(self) -> tuple[int, ...]:
        return tuple(len(a[0].values) for a in self.axes) or (1,)

    @property
    def combinations(self) -> int:
        return int(np.prod(self.shape))

    @property
    def cases(self) -> int:
        return self.combinations * (self.samples if self.random else 1)

    def indices(self, case: int) -> dict[str, int]:
        """{key: index into its values} of case number ``case`` (random keys: the draw)."""
        combo, draw = divmod(case, self.samples) if self.random else (case, 0)
        idx = np.unravel_index(combo, self.shape) if self.grid else ()
        out = {p.key: int(i) for a, i in zip(self.axes, idx, strict=True) for p in a}
        for key in self.random:
            out[key] = combo * self.samples + draw
        return out

    def index_arrays(self, cases: np.ndarray) -> dict[str, np.ndarray]:
        """:meth:`indices` of many cases at once: {key: int array}."""
        cases = np.asarray(cases, dtype=np.int64)
        if self.random:
            combo, draw = np.divmod(cases, self.samples)
        else:
            combo, draw = cases, np.zeros_like(cases)
        idx = np.unravel_index(combo, self.shape) if self.grid else ()
        out = {p.key: np.asarray(i) for a, i in zip(self.axes, idx, strict=True) for p in a}
        for key in self.random:
            out[key] = combo * self.samples + draw
        return out

    def fingerprint(self) -> str:
        """A digest of everything the results depend on (a resumed run must match)."""
        h = hashlib.sha256()
        h.update(repr((self.base, self.scenario, self.parameters, self.combine)).encode())
        h.update(repr((self.samples, self.seed, self.at, self.touchstone)).encode())
        h.update(repr((self.together, self.boards)).encode())
        for name in sorted(self.files):
            h.update(name.encode())
            h.update(self.files[name])
        for key in sorted(self.random):
            h.update(self.random[key].tobytes())
        return h.hexdigest()


def _where(key: str) -> str:
    return f"[vary].{key}" if "." not in key else f'[vary]."{key}"'


def _length_like(text: object) -> bool:
    """Whether a written value is a length (parses as one)."""
    if not isinstance(text, str):
        return False
    try:
        parse_quantity(text, "length", "value")
        return True
    except LossLaneError:
        return False


def _range(key: str, spec: Mapping) -> tuple[tuple, tuple]:
    """A range's values as written (formatted in the unit of its start) and in SI."""
    w = _where(key)
    check_keys(w, spec, ("start", "stop", "step", "points"), required=("start", "stop"))
    if ("step" in spec) == ("points" in spec):
        raise LossLaneError(f"{w}: give exactly one of step or points")
    kind = _quantity_kind(spec["start"])
    if kind is None:
        raise LossLaneError(
            f"{w}.start = {spec['start']!r}: a range needs quantities with units "
            '(e.g. start = "3 mil", stop = "5 mil", step = "1 mil")'
        )
    start = parse_quantity(spec["start"], kind, f"{w}.start")
    stop = parse_quantity(spec["stop"], kind, f"{w}.stop")
    if not stop > start:
        raise LossLaneError(f"{w}.stop = {spec['stop']!r}: must be above start ({spec['start']!r})")
    if "step" in spec:
        step = parse_quantity(spec["step"], kind, f"{w}.step")
        if not step > 0:
            raise LossLaneError(f"{w}.step = {spec['step']!r}: must be > 0")
        n = (stop - start) / step
        if abs(n - round(n)) > 1e-6 * max(1.0, n) or n > MAX_CASES:
            raise LossLaneError(
                f"{w}.step = {spec['step']!r} does not divide {spec['start']!r}..{spec['stop']!r}"
                " into whole steps; adjust stop or step, or give points"
            )
        points = int(round(n)) + 1
    else:
        points = spec["points"]
        if isinstance(points, bool) or not isinstance(points, int) or not 2 <= points <= MAX_CASES:
            raise LossLaneError(f"{w}.points = {points!r}: expected a whole number >= 2")
    si = np.linspace(start, stop, points)
    unit_text, factor = _unit_of(spec["start"], kind, start)
    written = tuple(f"{v / factor:.10g} {unit_text}".strip() for v in si)
    return written, tuple(float(v) for v in si)


def _quantity_kind(value: object) -> str | None:
    for kind in ("length", "frequency", "resistance", "data rate", "decibel"):
        try:
            parse_quantity(value, kind, "value")
            return kind
        except LossLaneError:
            continue
    return None


def _unit_of(text: str, kind: str, value: float) -> tuple[str, float]:
    """The unit a quantity was written in and its factor to SI."""
    import re

    m = re.fullmatch(r"\s*[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?\s*(.*?)\s*", str(text))
    unit = m.group(1) if m else ""
    number = float(str(text).strip()[: len(str(text).strip()) - len(unit)] or 0) if unit else 0
    factor = value / number if number else 1.0
    return unit, factor


def _parameter(key: str, spec: object, samples: int | None) -> Parameter:
    w = _where(key)
    if isinstance(spec, list):
        if not spec:
            raise LossLaneError(f"{w} = []: an empty list; give at least one value")
        values = tuple(spec)
        length = all(_length_like(v) for v in values)
        si = tuple(parse_quantity(v, "length", w) for v in values) if length else None
        return Parameter(key, "list", values, si, length)
    if isinstance(spec, Mapping):
        if "nominal" in spec:
            check_keys(w, spec, ("nominal", "tolerance", "distribution"), ("nominal", "tolerance"))
            dist = spec.get("distribution", "normal")
            if dist not in DISTRIBUTIONS:
                raise LossLaneError(
                    f"{w}.distribution = {dist!r}: valid values are "
                    + ", ".join(repr(d) for d in DISTRIBUTIONS)
                )
            if samples is None:
                raise LossLaneError(
                    f"{w}: random values need samples = N at the top of the plan (draws per "
                    "combination of the other parameters)"
                )
            if not _length_like(spec["nominal"]):
                raise LossLaneError(
                    f"{w}.nominal = {spec['nominal']!r}: random values are lengths with a unit"
                )
            return Parameter(
                key,
                "random",
                length=True,
                nominal=spec["nominal"],
                tolerance=str(spec["tolerance"]),
                distribution=dist,
            )
        written, si = _range(key, spec)
        return Parameter(key, "range", written, si, _length_like(spec["start"]))
    raise LossLaneError(
        f"{w} = {spec!r}: expected a list of values, a range {{ start, stop, step }} or "
        "random values { nominal, tolerance, distribution }"
    )


def _draws(p: Parameter, count: int, rng: np.random.Generator) -> np.ndarray:
    from losslane.design.spread import parse_tolerance

    nominal = parse_quantity(p.nominal, "length", f"{_where(p.key)}.nominal")
    tol = parse_tolerance(p.tolerance, p.key, nominal)
    if p.distribution == "normal":
        dev = rng.standard_normal(count) * (tol / 3.0)
    else:
        dev = rng.uniform(-tol, tol, count)
    values = nominal + dev
    if np.any(values <= 0):
        raise LossLaneError(
            f"{_where(p.key)}: {int(np.sum(values <= 0))} of {count} samples fall at or below "
            "zero; give a smaller tolerance"
        )
    return values


def _read(path: Path, what: str) -> bytes:
    from losslane.userfiles import read_bytes

    if not path.exists():
        raise LossLaneError(f"{what} {str(path)!r} does not exist (paths are relative to the plan)")
    return read_bytes(path, what)  # a directory, a device, no permission: named


def _scenario_files(path: Path, files: dict[str, bytes]) -> None:
    """The scenario and every file it names (libraries, imported models, the measurement
    of ``[compare]``), by the names it uses, relative to it. Entries of the wrong type are
    left for the scenario reader, which names them in each case."""
    text = _read(path, "scenario file")
    files[path.name] = text
    try:
        data = tomllib.loads(text.decode("utf-8"))
    except (UnicodeDecodeError, tomllib.TOMLDecodeError) as exc:
        raise LossLaneError(f"scenario file {str(path)!r}: not valid TOML: {exc}") from None
    libs = data.get("library", [])
    libs = [libs] if isinstance(libs, str) else libs if isinstance(libs, list) else []
    named = [("library file", x) for x in libs]
    channel = data.get("channel", [])
    if isinstance(channel, list):
        segments = [seg for seg in channel if isinstance(seg, Mapping)]
        named += [("touchstone file", seg.get("touchstone")) for seg in segments]
    compare = data.get("compare")
    if isinstance(compare, Mapping):
        named.append(("measured file", compare.get("measured")))
    for what, name in named:
        if isinstance(name, str) and name and "\x00" not in name:
            files[name] = _read(path.parent / name, what)


def parse_plan(source: str, base_dir: Path | str = ".", path: Path | None = None) -> Plan:
    """A plan from its TOML text (files named in it are read relative to ``base_dir``)."""
    try:
        data = tomllib.loads(source)
    except tomllib.TOMLDecodeError as exc:
        raise LossLaneError(f"{path or 'plan'}: not valid TOML: {exc}") from None
    base_dir = Path(base_dir)
    check_keys("plan", data, TOP_KEYS)
    if ("base" in data) == ("scenario" in data):
        raise LossLaneError(
            'plan: give either a [base] cross-section or scenario = "lane.toml", not both '
            "and not neither"
        )
    if "vary" not in data or not isinstance(data["vary"], Mapping) or not data["vary"]:
        raise LossLaneError("plan: missing [vary]: the keys to vary and their values")
    combine = data.get("combine", "product")
    if combine not in COMBINE:
        raise LossLaneError(
            f"plan: combine = {combine!r}: valid values are " + ", ".join(map(repr, COMBINE))
        )
    samples = data.get("samples")
    if samples is not None and (
        isinstance(samples, bool) or not isinstance(samples, int) or not 1 <= samples <= MAX_CASES
    ):
        raise LossLaneError(f"plan: samples = {samples!r}: expected a whole number >= 1")
    seed = data.get("seed", 1)
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        raise LossLaneError(f"plan: seed = {seed!r}: expected a whole number >= 0")
    engine = _engine(data)
    files: dict[str, bytes] = {}
    libraries = _texts("plan: library", data.get("library", []), '["materials.toml"]')
    for lib in libraries:
        files[f"library/{lib}"] = _read(base_dir / lib, "library file")
    base = scenario = None
    if "base" in data:
        if not isinstance(data["base"], Mapping):
            raise LossLaneError(
                f"[base] = {data['base']!r}: expected a table with a line kind and its keys "
                '(kind = "microstrip", ...)'
            )
        base = dict(data["base"])
        if "kind" not in base:
            raise LossLaneError('[base]: missing kind (a line kind, e.g. "microstrip")')
    else:
        name = data["scenario"]
        if not isinstance(name, str) or not name.strip() or "\x00" in name:
            raise LossLaneError(
                f'plan: scenario = {name!r}: expected a file name, e.g. "lane.toml"'
            )
        scen_path = base_dir / name
        _scenario_files(scen_path, files)
        scenario = scen_path.name
    params = tuple(_parameter(str(k), v, samples) for k, v in data["vary"].items())
    if base is not None:
        from losslane import api
        from losslane.xsection import registry

        allowed = set(base) | set(api.length_keys()) | {"kind", "dielectric", "foil"}
        allowed |= {"plane_foil", "conductivity", "solver"} | set(api.field_keys())
        allowed |= {"layer", "stackup"}
        for p in params:
            if p.key not in allowed:
                raise LossLaneError(
                    f"{_where(p.key)}: unknown parameter; {suggest(p.key, sorted(allowed))}"
                )
        kinds = [
            v for v in ([base["kind"]] + [x for p in params if p.key == "kind" for x in p.values])
        ]
        from losslane.xsection.factory import NOTE_KEY, spec_keys

        known = {NOTE_KEY, "layer", "stackup"}  # a line on a stackup layer
        for k in kinds:
            known |= set(spec_keys(registry.model(str(k), "[base].kind"), "field"))
        check_keys("[base]", base, sorted(known))  # a typo is a bad plan, not a failed case
    else:
        for p in params:
            if "." not in p.key:
                raise LossLaneError(
                    f"{_where(p.key)}: a scenario sweep varies dotted keys such as "
                    '"lines.host.width" or "channel.3.length"'
                )
    grid = [p for p in params if p.kind != "random"]
    together = _together(data.get("together", []), params, combine)
    if base is None and any(k in data for k in ("stackup", "stackups")):
        raise LossLaneError(
            "plan: [stackup] belongs in the scenario (or its library) of a scenario sweep"
        )
    if combine == "zip" and len({len(p.values) for p in grid}) > 1:
        sizes = ", ".join(f"{p.key}: {len(p.values)}" for p in grid)
        raise LossLaneError(f'plan: combine = "zip" needs lists of one length ({sizes})')
    randoms = [p for p in params if p.kind == "random"]
    results = data.get("results", {})
    if not isinstance(results, Mapping):
        raise LossLaneError("[results]: expected a table")
    check_keys("[results]", results, ("at", "touchstone", "rank", "chart"))
    at = _texts("[results].at", results.get("at", []), '["1 GHz", "28 GHz"]')
    if base is not None and not at:
        raise LossLaneError(
            '[results]: missing at, the frequencies of the columns (e.g. ["1 GHz"])'
        )
    at_hz = tuple(parse_frequency(a, "[results].at") for a in at)
    if any(not math.isfinite(x) or x < 0 for x in at_hz):
        raise LossLaneError(f"[results].at = {at!r}: frequencies are >= 0 Hz")
    touchstone = flag(
        "[results]", results, "touchstone", False, "true: each case's Touchstone file is written"
    )
    rank = results.get("rank")
    if rank is not None and (not isinstance(rank, str) or not rank.strip()):
        raise LossLaneError(f"[results].rank = {rank!r}: expected a column name")
    chart = results.get("chart")
    if chart is not None:
        if not isinstance(chart, Mapping):
            raise LossLaneError("[results].chart: expected { x, y, group }")
        check_keys("[results].chart", chart, ("x", "y", "group"), required=("x", "y"))
        for k, v in chart.items():
            if not isinstance(v, str) or not v.strip():
                raise LossLaneError(f"[results].chart.{k} = {v!r}: expected a column name")
    if "name" in data and (not isinstance(data["name"], str) or not data["name"].strip()):
        raise LossLaneError(f"plan: name = {data['name']!r}: expected a non-empty text")
    boards = {k: data[k] for k in ("stackup", "stackups") if k in data}
    if boards:
        _check_boards(boards, libraries, base_dir)
    plan = Plan(
        path,
        str(data.get("name") or (path.stem if path else "sweep")),
        base,
        scenario,
        params,
        combine,
        int(samples or 1),
        int(seed),
        tuple(str(a) for a in at),
        at_hz,
        touchstone,
        rank,
        dict(chart) if chart else None,
        tuple(libraries),
        files,
        *engine,
        together=together,
        boards=boards,
    )
    if plan.combinations * (samples if randoms else 1) > MAX_CASES:
        raise LossLaneError(f"plan: {plan.cases} cases is more than the {MAX_CASES} allowed")
    if randoms:
        rng = np.random.default_rng(plan.seed)
        total = plan.combinations * plan.samples
        plan.random.update({p.key: _draws(p, total, rng) for p in randoms})
    return plan


def _texts(key: str, value: object, example: str) -> list[str]:
    """A text or a list of texts (file names, frequencies): a LossLaneError naming ``key``
    otherwise."""
    items = [value] if isinstance(value, str) else value
    if not isinstance(items, list) or not all(isinstance(x, str) and x for x in items):
        raise LossLaneError(
            f"{key} = {value!r}: expected a text or a list of texts, e.g. {example}"
        )
    if any("\x00" in x for x in items):
        raise LossLaneError(f"{key} = {value!r}: a text cannot hold a NUL character")
    return list(items)


def _engine(data: Mapping) -> tuple[str | None, int | None, int | None]:
    """The plan's ``scheduler`` (an address), ``workers`` (>= 0) and ``chunk`` (>= 1)."""
    scheduler = data.get("scheduler")
    if scheduler is not None and (not isinstance(scheduler, str) or not scheduler.strip()):
        raise LossLaneError(
            f'plan: scheduler = {scheduler!r}: expected an address, e.g. "tcp://host:8786"'
        )
    out: list = [scheduler]
    for key, low in (("workers", 0), ("chunk", 1)):
        v = data.get(key)
        if v is not None and (isinstance(v, bool) or not isinstance(v, int) or v < low):
            raise LossLaneError(f"plan: {key} = {v!r}: expected a whole number >= {low}")
        out.append(v)
    return out[0], out[1], out[2]


def _check_boards(boards: Mapping, libraries: list[str], base_dir: Path) -> None:
    """The plan's own stackups, read now (with its library files) so that a bad board is
    refused before any case runs."""
    from losslane.materials.library import load_library
    from losslane.stackup import board_stackups

    library = load_library([base_dir / name for name in libraries])
    board_stackups(boards, library, library.dielectric, library.foil)


def _together(spec: object, params: tuple[Parameter, ...], combine: str) -> tuple:
    """``together``: groups of varied keys (lists or ranges of one length) walked side by
    side inside the product."""
    if spec in ([], None):
        return ()
    w = "plan: together"
    if not isinstance(spec, list) or not all(isinstance(g, list) for g in spec):
        raise LossLaneError(
            f'{w} = {spec!r}: expected a list of key lists, e.g. [["layer", "kind"]]'
        )
    if combine == "zip":
        raise LossLaneError(f'{w}: with combine = "zip" every key already goes together')
    by_key = {p.key: p for p in params}
    seen: set[str] = set()
    groups = []
    for g in spec:
        if len(g) < 2:
            raise LossLaneError(f"{w}: {g!r}: a group names at least two keys of [vary]")
        if not all(isinstance(key, str) for key in g):
            raise LossLaneError(f"{w}: {g!r}: a group is a list of keys of [vary] (texts)")
        for key in g:
            p = by_key.get(key)
            if p is None:
                raise LossLaneError(
                    f"{w}: {key!r} is not varied; {suggest(str(key), sorted(by_key))}"
                )
            if p.kind == "random":
                raise LossLaneError(f"{w}: {key!r} has random values; group lists or ranges")
            if key in seen:
                raise LossLaneError(f"{w}: {key!r} is in two groups")
            seen.add(key)
        sizes = {len(by_key[k].values) for k in g}
        if len(sizes) > 1:
            listed = ", ".join(f"{k}: {len(by_key[k].values)}" for k in g)
            raise LossLaneError(
                f"{w}: {g!r} go side by side, so need lists of one length ({listed})"
            )
        groups.append(tuple(str(k) for k in g))
    return tuple(groups)


def load_plan(path: str | Path) -> Plan:
    p = Path(path)
    if not p.is_file():
        raise LossLaneError(f"plan file {str(p)!r} does not exist")
    try:
        text = p.read_text(encoding="utf-8")
    except UnicodeDecodeError:
        raise LossLaneError(f"plan file {str(p)!r} is not UTF-8 text") from None
    return parse_plan(text, p.parent, p)


__all__ = ["Parameter", "Plan", "load_plan", "parse_plan"]

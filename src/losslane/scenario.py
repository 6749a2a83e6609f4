"""The scenario file (TOML) -> validated objects. Every error names the section, the key and
the value, and says what would be valid; unknown keys are errors with the closest valid key
suggested, so a typo is never silently ignored. Paths are relative to the scenario file.

The format is documented in the README ("Writing a scenario").
"""

from __future__ import annotations

import dataclasses
import re
import tomllib
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from losslane.bandspec import Band, Mask, parse_bands, parse_masks, parse_min_return_loss
from losslane.crosstalk.settings import CrosstalkSettings, channel_members, parse_crosstalk
from losslane.errors import LossLaneError
from losslane.materials.dielectric import Dielectric
from losslane.materials.library import Library, dielectric_from_spec, foil_from_spec, load_library
from losslane.materials.roughness import Roughness
from losslane.network.ports import DEFAULT_ORDER, ORDERS
from losslane.plotspec import PlotOptions, parse_plots
from losslane.signalling import MODULATIONS, baud_rate, nyquist_frequency
from losslane.spec import check_keys, dimension, flag, quantity, suggest, text
from losslane.stackup import Stackup, board_stackups
from losslane.timesettings import TimeSettings, parse_time
from losslane.units import parse_quantity
from losslane.userfiles import check_readable
from losslane.via_geometry import DrillVia, drill_via, is_drill_form
from losslane.xsection.base import CrossSection
from losslane.xsection.factory import section_from_spec
from losslane.xsection.on_layer import LineModel, line_model, on_layer, section_on_layer

TOP_KEYS = (
    "name",
    "note",
    "library",
    "sweep",
    "ports",
    "dielectrics",
    "foils",
    "lines",
    "channel",
    "budget",
    "compare",
    "crosstalk",
    "time",
    "stackup",
    "stackups",
    "plots",
)
SEGMENT_TYPES = ("line", "via", "capacitor", "series", "shunt", "touchstone")
MAX_POINTS = 200_001


@dataclass(frozen=True)
class Sweep:
    start: float
    stop: float
    step: float | None
    points: int

    def frequencies(self) -> np.ndarray:
        return np.linspace(self.start, self.stop, self.points)


@dataclass(frozen=True)
class Ports:
    reference: float = 50.0
    order: str = "in-in-out-out"


@dataclass(frozen=True)
class Segment:
    """One [[channel]] entry: ``type`` is one of SEGMENT_TYPES; ``values`` the parsed SI
    quantities; ``section`` the cross-section of a line; ``path`` an imported file."""

    index: int
    type: str
    name: str
    values: dict[str, float] = field(default_factory=dict)
    section: CrossSection | None = None
    line: str | None = None
    dielectric: Dielectric | None = None
    path: Path | None = None
    order: str | None = None
    as_is: bool = False
    #: a via from its drill geometry on a stackup (None: the explicit form)
    drill: DrillVia | None = None
    #: a pair segment's skew: ("length", m) or ("time", s); leg P longer when > 0
    skew: tuple[str, float] | None = None

    @property
    def where(self) -> str:
        return f"[[channel]] #{self.index + 1} ({self.name})"


@dataclass(frozen=True)
class Check:
    at: float
    max_loss: float | None
    min_return_loss: float | None


@dataclass(frozen=True)
class Budget:
    data_rate: float | None
    modulation: str
    max_loss: float | None
    checks: tuple[Check, ...]
    fit_start: float | None = None
    fit_stop: float | None = None
    #: limit on the integrated crosstalk noise (V), for channels on group lines
    max_icn: float | None = None
    # bands and limit masks (losslane.bandspec); min_return_loss holds over a default band
    bands: tuple[Band, ...] = ()
    masks: tuple[Mask, ...] = ()
    min_return_loss: float | None = None
    fit: bool = True  # False: no fitted insertion loss ([budget] fit = false)

    @property
    def baud(self) -> float | None:
        return None if self.data_rate is None else baud_rate(self.data_rate, self.modulation)

    @property
    def nyquist(self) -> float | None:
        """Nyquist frequency = baud rate / 2 (common practice)."""
        if self.data_rate is None:
            return None
        return nyquist_frequency(self.data_rate, self.modulation)


@dataclass(frozen=True)
class Comparison:
    """The [compare] section: a measured Touchstone file of the same channel (``path``,
    resolved), its 4-port numbering (``order``; None: the scenario's) and a ``label``."""

    path: Path
    order: str | None = None
    label: str | None = None


@dataclass
class Scenario:
    name: str
    path: Path | None
    sweep: Sweep
    ports: Ports
    lines: dict[str, CrossSection]
    channel: list[Segment]
    budget: Budget | None
    library: Library
    dielectrics: dict[str, Dielectric]
    foils: dict[str, Roughness]
    source_text: str = ""
    compare: Comparison | None = None
    crosstalk: CrosstalkSettings | None = None
    time: TimeSettings = field(default_factory=TimeSettings)  # the [time] section
    #: the boards (``losslane.stackup``): "" is the unnamed [stackup]
    stackups: dict[str, Stackup] = field(default_factory=dict)
    #: per [lines.*] name: its kind, the model used and where it sits
    line_models: dict[str, LineModel] = field(default_factory=dict)
    plots: PlotOptions = field(default_factory=PlotOptions)

    @property
    def conductors(self) -> int:
        """1 for a single-ended (2-port) channel, 2 for a differential (4-port) one, n for a
        channel on group lines (a 2n-port)."""
        return _conductors(self.channel)

    @property
    def members(self) -> tuple:
        """The traces of a channel on group lines (``xsection.group.Member``), else ()."""
        return channel_members(self.channel)

    def frequencies(self) -> np.ndarray:
        return self.sweep.frequencies()


def _conductors(channel: list[Segment]) -> int:
    members = channel_members(channel)
    if members:
        return sum(len(m.conductors) for m in members)
    n = None
    first = None
    for seg in channel:
        if seg.section is None:
            continue
        if n is None:
            n, first = seg.section.n_conductors, seg
        elif seg.section.n_conductors != n:
            kinds = {1: "single-ended", 2: "differential pair"}
            raise LossLaneError(
                f"{seg.where}: line {seg.line!r} is a {kinds.get(seg.section.n_conductors)} "
                f"but {first.where} ({first.line!r}) is a {kinds.get(n)}; a channel is either "
                "all single-ended (2-port) or all pairs (4-port)"
            )
    return n or 1


def _resolver(what: str, own: Mapping, library: Mapping) -> Callable[[str, str], Any]:
    """Name -> entry: the scenario's own [<what>s] first, then the library."""

    def resolve(n: str, where: str):
        if n in own:
            return own[n]
        if n in library:
            return library[n]
        raise LossLaneError(
            f"{where} = {n!r}: unknown {what}; not in [{what}s] nor in the library; "
            f"{suggest(n, [*own, *library])}"
        )

    return resolve


def load_scenario(path: str | Path) -> Scenario:
    """Read and validate a scenario file."""
    from losslane.userfiles import read_text

    p = Path(path)
    return parse_scenario(read_text(p, "scenario file"), base=p.parent, path=p)


def parse_scenario(source: str, base: Path | str = ".", path: Path | None = None) -> Scenario:
    try:
        data = tomllib.loads(source)
    except tomllib.TOMLDecodeError as exc:
        where = str(path) if path else "scenario"
        raise LossLaneError(f"{where}: not valid TOML: {exc}") from None
    return scenario_from_data(data, base, path, source)


def scenario_from_data(
    data: Mapping, base: Path | str = ".", path: Path | None = None, source: str = ""
) -> Scenario:
    """A scenario from its parsed TOML tables (what a sweep varies); ``source`` is the text
    echoed in the report."""
    base = Path(base)
    check_keys("scenario", data, TOP_KEYS)
    if "sweep" not in data:
        raise LossLaneError(
            "scenario: missing the [sweep] section (start, stop and step or points, e.g. "
            'start = "0 Hz", stop = "20 GHz", step = "10 MHz")'
        )
    if "channel" not in data:
        raise LossLaneError(
            "scenario: missing the [[channel]] segments (one [[channel]] table per segment, "
            "in order from the transmitter)"
        )
    name = data.get("name") or (path.stem if path else "channel")
    if not isinstance(name, str) or not name.strip():
        raise LossLaneError(f"scenario: name = {name!r}: expected a non-empty text")

    libs = data.get("library", [])
    if isinstance(libs, str):
        libs = [libs]
    if not isinstance(libs, list) or not all(isinstance(x, str) for x in libs):
        raise LossLaneError(
            f"scenario: library = {libs!r}: expected a file name or a list of file names"
        )
    library = load_library([base / x for x in libs])

    dielectrics: dict[str, Dielectric] = {}
    for dname, spec in _tables(data, "dielectrics").items():
        dielectrics[dname] = dielectric_from_spec(dname, spec, f"[dielectrics.{dname}]")
    foils: dict[str, Roughness] = {}
    for fname, spec in _tables(data, "foils").items():
        foils[fname] = foil_from_spec(fname, spec, f"[foils.{fname}]")

    resolve_dielectric = _resolver("dielectric", dielectrics, library.dielectrics)
    resolve_foil = _resolver("foil", foils, library.foils)

    stackups = board_stackups(data, library, resolve_dielectric, resolve_foil)
    lines, line_models = _lines(data, stackups, resolve_dielectric, resolve_foil)

    sweep = _sweep(data["sweep"])
    ports = _ports(data.get("ports", {}))
    channel = _channel(data["channel"], lines, base, resolve_dielectric, stackups)
    budget = _budget(data["budget"]) if "budget" in data else None
    compare = _compare(data["compare"], base) if "compare" in data else None
    crosstalk = _crosstalk(data, channel, budget)
    sc = Scenario(
        name=name.strip(),
        path=path,
        sweep=sweep,
        ports=ports,
        lines=lines,
        channel=channel,
        budget=budget,
        library=library,
        dielectrics=dielectrics,
        foils=foils,
        source_text=source,
        compare=compare,
        crosstalk=crosstalk,
        time=parse_time(data.get("time", {}), sweep.stop, frequencies=sweep.frequencies()),
        stackups=stackups,
        line_models=line_models,
        plots=parse_plots(data["plots"]) if "plots" in data else PlotOptions(),
    )
    _check_pair_keys(channel, sc.conductors)  # also: mixing single-ended and pairs
    return sc


def _lines(
    data: Mapping, stackups: dict[str, Stackup], resolve_dielectric, resolve_foil
) -> tuple[dict[str, CrossSection], dict[str, LineModel]]:
    """Each [lines.*] section's cross-section (explicit heights, or a stackup layer) and
    its report (kind, model used, placement)."""
    lines: dict[str, CrossSection] = {}
    models: dict[str, LineModel] = {}
    for lname, spec in _tables(data, "lines").items():
        where = f"[lines.{lname}]"
        if on_layer(spec):
            lines[lname], models[lname] = section_on_layer(
                lname, spec, where, stackups, resolve_dielectric, resolve_foil
            )
        else:
            lines[lname] = section_from_spec(spec, where, resolve_dielectric, resolve_foil)
            models[lname] = line_model(lname, lines[lname])
    return lines, models


def _tables(data: Mapping, key: str) -> dict[str, Mapping]:
    value = data.get(key, {})
    if not isinstance(value, Mapping):
        raise LossLaneError(f"[{key}]: expected a table of named entries, e.g. [{key}.core]")
    for name, spec in value.items():
        if not isinstance(spec, Mapping):
            raise LossLaneError(f"[{key}.{name}]: expected a table of keys, got {spec!r}")
    return dict(value)


def _sweep(spec: object) -> Sweep:
    where = "[sweep]"
    if not isinstance(spec, Mapping):
        raise LossLaneError(f"{where}: expected a table with start, stop and step or points")
    check_keys(where, spec, ("start", "stop", "step", "points"), required=("start", "stop"))
    start = quantity(where, spec, "start", "frequency", required=True)
    stop = quantity(where, spec, "stop", "frequency", required=True)
    if start < 0:
        raise LossLaneError(f"{where}.start = {spec['start']!r}: must be >= 0 Hz")
    if stop <= start:
        raise LossLaneError(
            f"{where}.stop = {spec['stop']!r}: must be above start ({spec['start']!r})"
        )
    if ("step" in spec) == ("points" in spec):
        raise LossLaneError(
            f'{where}: give exactly one of step (e.g. "10 MHz") or points (e.g. 4001)'
        )
    if "step" in spec:
        step = quantity(where, spec, "step", "frequency", required=True)
        if step <= 0:
            raise LossLaneError(f"{where}.step = {spec['step']!r}: must be > 0 Hz")
        n = (stop - start) / step
        if not n < MAX_POINTS:  # also an overflow to inf: never converted to int
            raise LossLaneError(
                f"{where}.step = {spec['step']!r}: {spec['start']!r}..{spec['stop']!r} in "
                f"steps of {step:g} Hz is {n + 1:.4g} frequency points, more than the "
                f"{MAX_POINTS} allowed; use a coarser step"
            )
        if abs(n - round(n)) > 1e-6 * max(1.0, n):
            raise LossLaneError(
                f"{where}.step = {spec['step']!r} does not divide the range "
                f"{spec['start']!r}..{spec['stop']!r} into whole steps; "
                "adjust stop or step, or give points"
            )
        points = int(round(n)) + 1
    else:
        pts = spec["points"]
        if isinstance(pts, bool) or not isinstance(pts, int) or pts < 2:
            raise LossLaneError(f"{where}.points = {pts!r}: expected a whole number >= 2")
        points, step = pts, None
    if points > MAX_POINTS:
        key = f"{where}.step = {spec['step']!r}" if step else f"{where}.points = {points}"
        raise LossLaneError(
            f"{key}: {points} frequency points is more than the "
            f"{MAX_POINTS} allowed; use a coarser step"
        )
    return Sweep(start, stop, step, points)


def _ports(spec: object) -> Ports:
    where = "[ports]"
    if not isinstance(spec, Mapping):
        raise LossLaneError(f"{where}: expected a table with reference and order")
    check_keys(where, spec, ("reference", "order"))
    ref = quantity(where, spec, "reference", "resistance", default=50.0)
    if ref <= 0:
        raise LossLaneError(f"{where}.reference = {spec['reference']!r}: must be > 0 ohm")
    order = text(where, spec, "order", ORDERS, DEFAULT_ORDER)
    return Ports(ref, order)


_SEGMENT_KEYS = {
    "line": ("line", "length", "name", "skew"),
    "via": ("via", "name"),
    "capacitor": ("capacitor", "name"),
    "series": ("series", "name"),
    "shunt": ("shunt", "name"),
    "touchstone": ("touchstone", "name", "order", "as_is"),
}


def _channel(
    entries: object,
    lines: dict[str, CrossSection],
    base: Path,
    resolve_dielectric,
    stackups: Mapping[str, Stackup] | None = None,
) -> list[Segment]:
    if not isinstance(entries, list) or not entries:
        raise LossLaneError(
            "[[channel]]: expected one or more [[channel]] segments, in order from the transmitter"
        )
    out = []
    for i, entry in enumerate(entries):
        where = f"[[channel]] #{i + 1}"
        if not isinstance(entry, Mapping):
            raise LossLaneError(f"{where}: expected a table")
        types = [t for t in SEGMENT_TYPES if t in entry]
        if len(types) != 1:
            allowed = ", ".join(SEGMENT_TYPES)
            if not types:
                check_keys(where, entry, SEGMENT_TYPES + ("length", "name", "order"))
            raise LossLaneError(
                f"{where}: give exactly one of {allowed} (found {', '.join(types) or 'none'})"
            )
        kind = types[0]
        check_keys(where, entry, _SEGMENT_KEYS[kind])
        name = entry.get("name")
        if name is not None and (not isinstance(name, str) or not name.strip()):
            raise LossLaneError(f"{where}.name = {name!r}: expected a non-empty text")
        out.append(
            _segment(i, kind, entry, where, name, lines, base, resolve_dielectric, stackups or {})
        )
    # repeated labels would make the budget ambiguous: number them
    names = [s.name for s in out]
    return [
        dataclasses.replace(s, name=f"{s.name} ({names[: i + 1].count(s.name)})")
        if names.count(s.name) > 1
        else s
        for i, s in enumerate(out)
    ]


def _segment(
    i: int,
    kind: str,
    entry: Mapping,
    where: str,
    name: str | None,
    lines: dict[str, CrossSection],
    base: Path,
    resolve_dielectric,
    stackups: Mapping[str, Stackup] | None = None,
) -> Segment:
    if kind == "line":
        lname = entry["line"]
        if not isinstance(lname, str) or lname not in lines:
            raise LossLaneError(
                f"{where}.line = {lname!r}: no such [lines.*] section; {suggest(str(lname), lines)}"
            )
        length = quantity(where, entry, "length", "length", required=True)
        if length <= 0:
            raise LossLaneError(f"{where}.length = {entry['length']!r}: must be > 0")
        skew = _skew(where, entry) if "skew" in entry else None
        return Segment(
            i,
            "line",
            name or lname,
            {"length": length},
            section=lines[lname],
            line=lname,
            skew=skew,
        )
    body = entry[kind]
    w = f"{where}.{kind}"
    if kind == "touchstone":
        if isinstance(body, str):
            fname, order = body, entry.get("order")
        else:
            raise LossLaneError(
                f'{w} = {body!r}: expected a file name, e.g. "models/connector.s4p"'
            )
        if order is not None and order not in ORDERS:
            raise LossLaneError(
                f"{where}.order = {order!r}: valid values are {', '.join(repr(o) for o in ORDERS)}"
            )
        if "\x00" in fname:
            raise LossLaneError(f"{w} = {fname!r}: a file name cannot hold a NUL character")
        p = (base / fname).resolve()
        if not p.exists():
            raise LossLaneError(
                f"{w} = {fname!r}: file {str(p)!r} does not exist (paths are "
                "relative to the scenario file)"
            )
        check_readable(p, f"{w} = {fname!r}: touchstone file")  # a directory, a device
        if not re.search(r"\.s\d+p$", p.name, re.IGNORECASE):
            raise LossLaneError(f"{w} = {fname!r}: expected a Touchstone file (.s2p, .s4p)")
        as_is = flag(
            where,
            entry,
            "as_is",
            False,
            "true accepts a file that is not passive or reciprocal as it is",
        )
        return Segment(i, "touchstone", name or p.stem, path=p, order=order, as_is=as_is)
    if not isinstance(body, Mapping):
        raise LossLaneError(f"{w} = {body!r}: expected an inline table, e.g. {kind} = {{ ... }}")
    if kind == "via":
        return _via_segment(i, body, w, name, resolve_dielectric, stackups)
    if kind == "capacitor":
        check_keys(w, body, ("value", "esl", "esr"), required=("value",))
        vals = {
            "value": quantity(w, body, "value", "capacitance", required=True),
            "esl": quantity(w, body, "esl", "inductance", default=0.0),
            "esr": quantity(w, body, "esr", "resistance", default=0.0),
        }
        if vals["value"] <= 0 or vals["esl"] < 0 or vals["esr"] < 0:
            raise LossLaneError(f"{w}: value must be > 0, esl and esr >= 0 (got {dict(body)})")
        return Segment(i, "capacitor", name or "capacitor", vals)
    if kind == "series":
        check_keys(w, body, ("resistance", "inductance"))
        vals = {
            "resistance": quantity(w, body, "resistance", "resistance", default=0.0),
            "inductance": quantity(w, body, "inductance", "inductance", default=0.0),
        }
        if vals["resistance"] < 0 or vals["inductance"] < 0 or not any(vals.values()):
            raise LossLaneError(f"{w}: give resistance and/or inductance, >= 0 (got {dict(body)})")
        return Segment(i, "series", name or "series part", vals)
    check_keys(w, body, ("capacitance",), required=("capacitance",))
    vals = {"capacitance": quantity(w, body, "capacitance", "capacitance", required=True)}
    if vals["capacitance"] <= 0:
        raise LossLaneError(f"{w}.capacitance = {body['capacitance']!r}: must be > 0")
    return Segment(i, "shunt", name or "shunt capacitance", vals)


def _crosstalk(data: Mapping, channel: list[Segment], budget: Budget | None):
    """The [crosstalk] table of a channel on group lines (required there, refused
    elsewhere); such a channel numbers its ports in-in-out-out only."""
    members = channel_members(channel)
    if budget is not None and budget.max_icn is not None and not members:
        raise LossLaneError(
            "[budget].max_icn: the integrated crosstalk noise needs a channel on group lines "
            '(kind "stripline-group" or "microstrip-group") and a [crosstalk] victim'
        )
    if "crosstalk" not in data:
        if members:
            raise LossLaneError(
                "[crosstalk]: the channel runs on group lines; name the trace judged, e.g. "
                f"[crosstalk] victim = {members[0].name!r} "
                f"(traces: {', '.join(m.name for m in members)})"
            )
        return None
    settings = parse_crosstalk(data["crosstalk"], members)
    order = data.get("ports", {}).get("order") if isinstance(data.get("ports"), Mapping) else None
    if order is not None and order != DEFAULT_ORDER:
        raise LossLaneError(
            f"[ports].order = {order!r}: a channel on group lines numbers its ports "
            f"{DEFAULT_ORDER!r} only (1..n near ends in the traces' order, n+1..2n far ends)"
        )
    return settings


def _via_segment(
    i: int, body: Mapping, w: str, name: str | None, resolve_dielectric, stackups
) -> Segment:
    """A via: the drill form on a stackup (``via_geometry``) or the explicit form."""
    skew = _skew(w, body) if "skew" in body else None
    if is_drill_form(body):
        drill = drill_via(body, w, stackups)
        vals = {"barrel": drill.barrel_length, "stub": drill.stub_below_length}
        return Segment(i, "via", name or "via", vals, drill=drill, skew=skew)
    check_keys(
        w,
        body,
        ("barrel", "stub", "impedance", "dielectric", "skew"),
        required=("barrel", "impedance", "dielectric"),
    )
    vals = {
        "barrel": dimension(w, body, "barrel", required=True),
        "stub": dimension(w, body, "stub", default=0.0, zero_ok=True),
        "impedance": quantity(w, body, "impedance", "resistance", required=True),
    }
    if vals["barrel"] <= 0 or vals["stub"] < 0 or vals["impedance"] <= 0:
        raise LossLaneError(
            f"{w}: barrel and impedance must be > 0 and stub >= 0 (got {dict(body)})"
        )
    d = body["dielectric"]
    if not isinstance(d, str):
        raise LossLaneError(f"{w}.dielectric = {d!r}: expected a dielectric name")
    return Segment(
        i,
        "via",
        name or "via",
        vals,
        dielectric=resolve_dielectric(d, f"{w}.dielectric"),
        skew=skew,
    )


def _skew(where: str, table: Mapping) -> tuple[str, float]:
    """``skew``: a length ("5 mil") or a time ("1 ps"); leg P longer, negative: leg N."""
    value = table["skew"]
    for kind in ("length", "time"):
        try:
            return kind, parse_quantity(value, kind, f"{where}.skew")
        except LossLaneError:
            continue
    raise LossLaneError(
        f'{where}.skew = {value!r}: expected a length ("5 mil") or a time ("1 ps"); leg P is '
        "longer by that much, a negative value makes leg N longer"
    )


def _check_pair_keys(channel: list[Segment], n: int) -> None:
    """Keys that only pairs (or only single-ended channels) take."""
    for seg in channel:
        if seg.skew is not None and n != 2:
            raise LossLaneError(
                f"{seg.where}: skew is the length difference between the legs of a pair; this "
                "channel is single-ended"
            )
        if seg.drill is not None and (seg.drill.pitch is not None) != (n == 2):
            need = (
                "a via pair needs pitch (centre to centre of its barrels)"
                if n == 2
                else "pitch is for the via pairs of a differential channel; this one is "
                "single-ended"
            )
            raise LossLaneError(f"{seg.where}: {need}")


def _budget(spec: object) -> Budget:
    where = "[budget]"
    if not isinstance(spec, Mapping):
        raise LossLaneError(f"{where}: expected a table")
    check_keys(
        where,
        spec,
        ("data_rate", "modulation", "max_loss", "check", "fit_start", "fit_stop", "max_icn")
        + ("band", "mask", "min_return_loss", "fit"),
    )
    rate = quantity(where, spec, "data_rate", "data rate")
    if rate is not None and rate <= 0:
        raise LossLaneError(f"{where}.data_rate = {spec['data_rate']!r}: must be > 0")
    modulation = text(where, spec, "modulation", MODULATIONS, "nrz")
    max_loss = quantity(where, spec, "max_loss", "decibel")
    if max_loss is not None and rate is None:
        raise LossLaneError(
            f'{where}: max_loss is the allowance at Nyquist and needs data_rate (e.g. "32 Gb/s")'
        )
    checks = []
    raw = spec.get("check", [])
    if not isinstance(raw, list):
        raise LossLaneError(f"{where}.check: expected [[budget.check]] entries")
    for i, c in enumerate(raw):
        w = f"[[budget.check]] #{i + 1}"
        if not isinstance(c, Mapping):
            raise LossLaneError(f"{w}: expected a table")
        check_keys(w, c, ("at", "max_loss", "min_return_loss"), required=("at",))
        chk = Check(
            quantity(w, c, "at", "frequency", required=True),
            quantity(w, c, "max_loss", "decibel"),
            quantity(w, c, "min_return_loss", "decibel"),
        )
        if chk.max_loss is None and chk.min_return_loss is None:
            raise LossLaneError(f"{w}: give max_loss and/or min_return_loss")
        checks.append(chk)
    fit_start = quantity(where, spec, "fit_start", "frequency")
    fit_stop = quantity(where, spec, "fit_stop", "frequency")
    max_icn = quantity(where, spec, "max_icn", "voltage")
    if max_icn is not None and (max_icn <= 0 or rate is None):
        raise LossLaneError(
            f"{where}.max_icn = {spec['max_icn']!r}: the limit on the integrated crosstalk "
            'noise is > 0 V (e.g. "5 mV") and needs data_rate'
        )
    fit = flag(where, spec, "fit", True, "false: no fitted insertion loss")
    return Budget(
        rate,
        modulation,
        max_loss,
        tuple(checks),
        fit_start,
        fit_stop,
        max_icn,
        parse_bands(spec),
        parse_masks(spec),
        parse_min_return_loss(spec),
        fit,
    )


def _compare(spec: object, base: Path) -> Comparison:
    """[compare]: ``measured`` (a Touchstone file, relative to the scenario file), ``order``
    (its 4-port numbering) and ``label``. Only the file's existence and name are checked
    here; its contents are measurement data, read and reported at build time."""
    where = "[compare]"
    if not isinstance(spec, Mapping):
        raise LossLaneError(f'{where}: expected a table, e.g. [compare] measured = "coupon.s4p"')
    check_keys(where, spec, ("measured", "order", "label"), required=("measured",))
    fname = spec["measured"]
    if not isinstance(fname, str) or not fname.strip():
        raise LossLaneError(
            f'{where}.measured = {fname!r}: expected a file name, e.g. "coupon.s4p"'
        )
    p = (base / fname).resolve()
    if not p.is_file():
        raise LossLaneError(
            f"{where}.measured = {fname!r}: file {str(p)!r} does not exist (paths are "
            "relative to the scenario file)"
        )
    if not re.search(r"\.s\d+p$", p.name, re.IGNORECASE):
        raise LossLaneError(
            f"{where}.measured = {fname!r}: expected a Touchstone file (.s2p, .s4p)"
        )
    order = spec.get("order")
    if order is not None and order not in ORDERS:
        raise LossLaneError(
            f"{where}.order = {order!r}: valid values are {', '.join(repr(o) for o in ORDERS)}"
        )
    label = spec.get("label")
    if label is not None and (not isinstance(label, str) or not label.strip()):
        raise LossLaneError(f"{where}.label = {label!r}: expected a non-empty text")
    return Comparison(p, order, label.strip() if label else None)


__all__ = [
    "Budget",
    "Check",
    "Comparison",
    "Ports",
    "Scenario",
    "Segment",
    "Sweep",
    "load_scenario",
    "parse_scenario",
    "scenario_from_data",
]

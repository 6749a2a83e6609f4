"""Hypothesis strategies for the hostile-input suite, boards and groups: stackups
(``[stackup]`` / ``[stackups.NAME]``), lines on their layers, vias from drill geometry,
skew on pair segments, and channels on group lines with ``[crosstalk]``.

Every valid scenario is built from its own description of the board (which copper layer
is a plane, which laminate sits where), not from the code under test: a line is put on a
layer only where its kind fits (an outer layer over a plane for the kinds routed over one
plane, an inner layer between two planes for striplines), and the field solver is asked
for (at its coarsest accuracy, to keep ``make test`` short) exactly where the README says
a line needs it (a solder mask over it, or laminates of more than one kind between the
trace and its planes). Broken ones come from ``hostile_strategies.broken_scenario``.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from hostile_strategies import (
    DIELECTRICS,
    FOILS,
    MIL,
    NAME_TEXT,
    Case,
    _grid,
    add_sections,
    length,
    line_spec,
    sweep_spec,
    toml_text,
)
from hypothesis import strategies as st

#: laminates of a generated board (the mask is its own class)
LAMINATES = [d for d in DIELECTRICS if d != "solder-mask"]
OUTER_KINDS = {1: ("microstrip", "gcpw"), 2: ("microstrip-pair",)}
INNER_KINDS = {1: ("stripline",), 2: ("stripline-pair",)}


@dataclass
class Board:
    """A generated stackup: its ``layers`` as written, and per layer its role ("signal",
    "plane", "dielectric", "mask") and laminate (dielectric layers and masks)."""

    name: str  # "" for [stackup]
    layers: list[dict]

    def role(self, i: int) -> str:
        ly = self.layers[i]
        return ly.get("conductor") or ("mask" if "mask" in ly else "dielectric")

    @property
    def copper(self) -> list[int]:
        return [i for i in range(len(self.layers)) if self.role(i) in ("signal", "plane")]

    def fill(self, i: int) -> str:
        """The laminate filling copper layer ``i`` (its ``fill`` side, else the other)."""
        side = self.layers[i].get("fill", "above")
        for s in (side, "below" if side == "above" else "above"):
            j = i - 1 if s == "above" else i + 1
            if 0 <= j < len(self.layers) and self.role(j) == "dielectric":
                return self.layers[j]["dielectric"]
        raise AssertionError(i)

    def walk(self, i: int, step: int) -> list[str] | None:
        """The laminates from copper layer ``i`` to the next plane in direction ``step``
        (None: no plane that way)."""
        out = []
        j = i + step
        while 0 <= j < len(self.layers):
            r = self.role(j)
            if r == "plane":
                return out
            if r == "mask":
                return None
            out.append(self.layers[j]["dielectric"] if r == "dielectric" else self.fill(j))
            j += step
        return None

    def place(self, i: int) -> tuple[str, bool] | None:
        """Where a line on signal layer ``i`` may go: ("outer" | "inner", whether it needs
        the field solver), or None (no reference plane where one is needed)."""
        cu = self.copper
        if i == cu[0] or i == cu[-1]:
            side = self.walk(i, +1 if i == cu[0] else -1)
            if side is None:
                return None
            masked = self.role(0 if i == cu[0] else len(self.layers) - 1) == "mask"
            return "outer", masked or len(set(side)) > 1
        below, above = self.walk(i, +1), self.walk(i, -1)
        if below is None or above is None:
            return None
        return "inner", len(set(below + above)) > 1

    @property
    def signals(self) -> list[int]:
        return [i for i in range(len(self.layers)) if self.role(i) == "signal"]

    def names(self) -> list[str]:
        return [ly["name"] for ly in self.layers]


@st.composite
def board(draw, name: str = "", dielectrics: list[str] | None = None) -> Board:
    """A valid stackup: copper and laminate alternating (one or two sheets between copper
    layers), at least one plane, solder masks outside now and then."""
    lams = dielectrics or LAMINATES
    n_cu = draw(st.integers(2, 6))
    roles = [draw(st.sampled_from(["signal", "signal", "plane"])) for _ in range(n_cu)]
    if "plane" not in roles:
        roles[draw(st.integers(0, n_cu - 1))] = "plane"
    one = draw(st.sampled_from(lams))
    mixed = draw(st.integers(0, 2)) == 0

    def laminate() -> str:
        return draw(st.sampled_from(lams)) if mixed else one

    layers: list[dict] = []
    if draw(st.integers(0, 3)) == 0:
        layers.append({"name": "mask-top", "mask": "solder-mask", "thickness": "0.7 mil"})
    for k, role in enumerate(roles):
        ly: dict = {"name": f"L{k + 1}", "conductor": role}
        how = draw(st.sampled_from(["length", "length", "oz", "weight"]))
        if how == "length":
            ly["thickness"] = draw(length(0.3, 2.0))
        elif how == "oz":
            ly["thickness"] = draw(st.sampled_from(["0.5 oz", "1 oz"]))
        else:
            ly["weight"] = draw(st.sampled_from(["0.5 oz", "1 oz", "2 oz"]))
        if draw(st.booleans()):
            ly["foil"] = draw(st.sampled_from(FOILS))
        if draw(st.integers(0, 3)) == 0:
            ly["fill"] = draw(st.sampled_from(["above", "below"]))
        if draw(st.integers(0, 5)) == 0:
            ly["note"] = draw(NAME_TEXT)
        layers.append(ly)
        if k < n_cu - 1:
            for j in range(draw(st.sampled_from([1, 1, 1, 2]))):
                layers.append(
                    {
                        "name": f"d{k + 1}{'ab'[j]}",
                        "dielectric": laminate(),
                        "thickness": draw(length(2.0, 12.0)),
                    }
                )
    if draw(st.integers(0, 3)) == 0:
        layers.append({"name": "mask-bottom", "mask": "solder-mask", "thickness": "0.6 mil"})
    return Board(name, layers)


def _field_keys(draw, spec: dict, field: bool) -> None:
    """The field solver at its coarsest accuracy where the line needs it (or asks)."""
    if field:
        spec["accuracy"] = "coarse"
        if draw(st.integers(0, 3)) == 0:
            spec["etch_factor"] = draw(st.sampled_from([2.0, 3.5, 10.0]))


@st.composite
def layer_line(draw, b: Board, conductors: int, stackup: str | None) -> dict | None:
    """A [lines.*] spec on a routable signal layer of ``b`` (None: the board has none)."""
    spots = [(i, b.place(i)) for i in b.signals]
    spots = [(i, p) for i, p in spots if p is not None]
    if not spots:
        return None
    i, (where, field) = draw(st.sampled_from(spots))
    kinds = OUTER_KINDS if where == "outer" else INNER_KINDS
    kind = draw(st.sampled_from(kinds[conductors]))
    spec: dict = {"kind": kind, "layer": b.layers[i]["name"]}
    if stackup is not None:
        spec["stackup"] = stackup
    spec["width"] = draw(length(3.0, 12.0))
    if conductors == 2:
        spec["spacing"] = draw(length(4.0, 15.0))
    if kind == "gcpw":  # wide enough for the layer's copper (up to 2 oz) to keep it open
        spec["gap"] = draw(length(12.0, 20.0))
    extra = draw(st.sampled_from(["none", "none", "foil", "thickness", "dielectric", "plane"]))
    if extra == "foil":
        spec["foil"] = draw(st.sampled_from(FOILS))
    elif extra == "thickness":
        spec["thickness"] = draw(length(0.3, 1.0))
    elif extra == "dielectric":
        spec["dielectric"] = draw(st.sampled_from(LAMINATES))  # one laminate around it
        field = where == "outer" and _masked(b, i)
    elif extra == "plane":
        spec["plane_thickness"] = draw(length(0.5, 1.5))
        spec["plane_foil"] = draw(st.sampled_from(FOILS))
    if not field and draw(st.integers(0, 5)) == 0:
        spec["solver"] = "field"
        field = True
    _field_keys(draw, spec, field)
    return spec


def _masked(b: Board, i: int) -> bool:
    cu = b.copper
    end = 0 if i == cu[0] else len(b.layers) - 1
    return b.role(end) == "mask"


@st.composite
def drill_via(draw, b: Board, pair: bool, stackup: str | None) -> dict | None:
    """``via = { from, to, drill, antipad, ... }`` between two signal layers of ``b``."""
    sig = b.signals
    if len(sig) < 2:
        return None
    a, z = sorted(draw(st.lists(st.sampled_from(sig), min_size=2, max_size=2, unique=True)))
    drill = draw(st.floats(6.0, 14.0))
    pad = drill + draw(st.floats(3.0, 14.0))
    antipad = max(drill, pad) + draw(st.floats(-4.0, 16.0))
    antipad = max(antipad, drill + 2.0)
    via: dict = {
        "from": b.layers[a]["name"],
        "to": b.layers[z]["name"],
        "drill": f"{drill:.4g} mil",
        "antipad": f"{antipad:.4g} mil",
    }
    if stackup is not None:
        via["stackup"] = stackup
    if draw(st.booleans()):
        via["pad"] = f"{pad:.4g} mil"
    cu = b.copper
    below = [j for j in range(z + 1, len(b.layers)) if b.role(j) != "mask"]
    end = draw(st.sampled_from(["through", "backdrill", "stub", "blind"]))
    if end == "backdrill" and below:
        via["backdrill"] = b.layers[draw(st.sampled_from(below))]["name"]
    elif end == "stub" and z != cu[-1]:
        # no stub, or one of at least 1 % of the room (never a subnormal length)
        share = draw(st.one_of(st.just(0.0), st.floats(0.01, 1.0)))
        via["stub"] = f"{share * _room_mil(b, z) * 0.999:.4g} mil"
    elif end == "blind":
        via["blind"] = True
    if draw(st.integers(0, 3)) == 0:
        via["upward"] = True
    if pair:
        shape = draw(st.sampled_from([None, "oblong", "round"]))
        low = max(drill, pad if "pad" in via else drill) + 1.0
        if shape == "round":
            low = max(low, antipad)
            via["antipad_shape"] = "round"
        elif shape == "oblong":
            via["antipad_shape"] = "oblong"
        via["pitch"] = f"{low + draw(st.floats(0.5, 20.0)):.4g} mil"
        if draw(st.booleans()):
            via["skew"] = draw(skew())
    return via


def _mil_of(text: str) -> float:
    from losslane.units import parse_length

    return parse_length(text) / MIL


def _room_mil(b: Board, z: int) -> float:
    """mil from the centre of copper layer ``z`` to the board's bottom face."""
    cu = b.copper
    thick = [_mil_of(ly.get("thickness") or ly.get("weight")) for ly in b.layers]
    return thick[z] / 2 + sum(thick[z + 1 : cu[-1] + 1])


@st.composite
def skew(draw) -> str:
    """A pair's skew: a length or a time, either leg longer."""
    sign = draw(st.sampled_from(["", "-"]))
    if draw(st.booleans()):
        return f"{sign}{draw(st.floats(0.1, 20.0)):.3g} mil"
    return f"{sign}{draw(st.floats(0.05, 5.0)):.3g} ps"


@st.composite
def stackup_scenario(draw) -> Case:
    """A valid scenario on one or two stackups: lines on their layers (and sometimes one
    written with explicit heights), vias from drill geometry and explicit ones, lumped
    parts, skew on a pair's segments; the optional sections as for any scenario."""
    diff = draw(st.integers(0, 2)) == 0
    conductors = 2 if diff else 1
    doc: dict = {}
    sweep = draw(sweep_spec())
    doc["sweep"] = sweep
    f = _grid(sweep)
    z0 = float(draw(st.integers(40, 60)))
    if z0 != 50:
        doc["ports"] = {"reference": f"{z0:g} ohm"}
    named = draw(st.integers(0, 2)) == 0
    boards = [draw(board("host"))] + ([draw(board("module"))] if draw(st.booleans()) else [])
    files: dict = {}
    if not named:
        boards = boards[:1]
        boards[0].name = ""
        doc["stackup"] = {"layers": boards[0].layers}
    else:
        doc["stackups"] = {b.name: {"layers": b.layers} for b in boards}
    if draw(st.integers(0, 3)) == 0:  # the boards in a library file the scenario names
        files["boards.toml"] = toml_text(
            {k: doc.pop(k) for k in ("stackup", "stackups") if k in doc}
        )
        doc["library"] = ["boards.toml"]
    lines: dict = {}
    for k in range(draw(st.integers(1, 3))):
        b = draw(st.sampled_from(boards))
        ref = b.name if (named and (len(boards) > 1 or draw(st.booleans()))) else None
        spec = draw(layer_line(b, conductors, ref))
        if spec is not None:
            lines[f"t{k}"] = spec
    if not lines or draw(st.integers(0, 4)) == 0:  # one written with explicit heights
        from hostile_strategies import PAIRS, SINGLE

        kind = draw(st.sampled_from(PAIRS if diff else SINGLE))
        lines["plain"] = draw(line_spec(kind, DIELECTRICS, FOILS))
    doc["lines"] = lines
    channel: list[dict] = []
    names = list(lines)
    kinds = ["line"] + [
        draw(st.sampled_from(["line", "drill", "drill", "via", "capacitor", "shunt", "series"]))
        for _ in range(draw(st.integers(0, 4)))
    ]
    for kind in draw(st.permutations(kinds)):
        seg: dict | None = None
        if kind == "line":
            seg = {"line": draw(st.sampled_from(names)), "length": draw(length(50, 3000))}
            if diff and draw(st.integers(0, 2)) == 0:
                seg["skew"] = draw(skew())
        elif kind == "drill":
            b = draw(st.sampled_from(boards))
            ref = b.name if (named and (len(boards) > 1 or draw(st.booleans()))) else None
            via = draw(drill_via(b, diff, ref))
            if via is not None:
                seg = {"via": via}
        elif kind == "via":
            seg = {
                "via": {
                    "barrel": draw(length(5, 80)),
                    "impedance": f"{draw(st.floats(35, 55)):.4g} ohm",
                    "dielectric": draw(st.sampled_from(LAMINATES)),
                }
            }
            if diff and draw(st.integers(0, 3)) == 0:
                seg["via"]["skew"] = draw(skew())
        elif kind == "capacitor":
            seg = {"capacitor": {"value": f"{draw(st.floats(1, 200)):.4g} nF"}}
        elif kind == "shunt":
            seg = {"shunt": {"capacitance": f"{draw(st.floats(0.01, 0.5)):.3g} pF"}}
        else:
            seg = {"series": {"inductance": f"{draw(st.floats(0.01, 0.5)):.3g} nH"}}
        if seg is not None:
            channel.append(seg)
    doc["channel"] = channel
    add_sections(draw, doc, files, f, any("capacitor" in s for s in channel), diff, z0)
    return Case(doc, files, diff)


# --- groups of traces and crosstalk ------------------------------------------------------


@st.composite
def traces(draw, names: list[str], pairs: list[bool]) -> list[dict]:
    """A group's traces, left to right, with the given names and pair flags."""
    out = []
    for k, (name, pair) in enumerate(zip(names, pairs, strict=True)):
        tr: dict = {"name": name, "width": draw(length(3.0, 8.0))}
        if pair:
            tr["spacing"] = draw(length(4.0, 10.0))
        if k:
            tr["gap"] = draw(length(5.0, 25.0))
        out.append(tr)
    return out


@st.composite
def group_scenario(draw) -> Case:
    """A valid channel on group lines (a 2n-port) with its [crosstalk] table: group line
    segments with the same traces, explicit vias and lumped parts (one per conductor), a
    budget that may limit the integrated crosstalk noise. The field solver runs at its
    coarsest accuracy."""
    n = draw(st.integers(2, 3))
    names = draw(
        st.lists(
            st.sampled_from(["a", "b", "vic", "agg", "clk", "lane 2"]),
            min_size=n,
            max_size=n,
            unique=True,
        )
    )
    pairs = [draw(st.booleans()) for _ in names]
    conductors = sum(2 if p else 1 for p in pairs)
    doc: dict = {}
    step = draw(st.sampled_from([100, 200, 250]))  # MHz: a few dozen points
    points = draw(st.integers(10, 80))
    start = draw(st.sampled_from([0, 0, step]))
    doc["sweep"] = {
        "start": f"{start} MHz",
        "stop": f"{start + step * points} MHz",
        "step": f"{step} MHz",
    }
    f = np.linspace(start * 1e6, (start + step * points) * 1e6, points + 1)
    z0 = float(draw(st.integers(40, 60)))
    doc["ports"] = {"reference": f"{z0:g} ohm"}
    if draw(st.booleans()):
        doc["ports"]["order"] = "in-in-out-out"
    kind = draw(st.sampled_from(["stripline-group", "microstrip-group"]))
    lines: dict = {}
    on_board = draw(st.integers(0, 3)) == 0
    b = draw(board()) if on_board else None
    spot = None
    if b is not None:
        want = "outer" if kind == "microstrip-group" else "inner"
        spots = [i for i in b.signals if (b.place(i) or ("", False))[0] == want]
        if spots:
            spot = draw(st.sampled_from(spots))
            doc["stackup"] = {"layers": b.layers}
    for k in range(draw(st.integers(1, 2))):
        spec: dict = {"kind": kind}
        if spot is not None:
            spec["layer"] = b.layers[spot]["name"]
        else:
            spec["thickness"] = draw(length(0.3, 1.4))
            if kind == "stripline-group":
                spec["below"] = draw(length(3.0, 10.0))
                spec["above"] = draw(length(3.0, 10.0))
            else:
                spec["height"] = draw(length(2.0, 8.0))
            spec["dielectric"] = draw(st.sampled_from(LAMINATES))
        if draw(st.booleans()):
            spec["foil"] = draw(st.sampled_from(FOILS))
        spec["accuracy"] = "coarse"
        spec["traces"] = draw(traces(names, pairs))
        lines[f"g{k}"] = spec
    doc["lines"] = lines
    channel: list[dict] = []
    kinds = ["line"] + [
        draw(st.sampled_from(["line", "via", "capacitor", "shunt"]))
        for _ in range(draw(st.integers(0, 2)))
    ]
    for seg_kind in draw(st.permutations(kinds)):
        if seg_kind == "line":
            seg = {"line": draw(st.sampled_from(list(lines))), "length": draw(length(100, 3000))}
        elif seg_kind == "via":
            seg = {
                "via": {
                    "barrel": draw(length(10, 60)),
                    "stub": draw(length(1, 20)) if draw(st.booleans()) else "0 mil",
                    "impedance": f"{draw(st.floats(35, 55)):.4g} ohm",
                    "dielectric": draw(st.sampled_from(LAMINATES)),
                }
            }
        elif seg_kind == "capacitor":
            seg = {"capacitor": {"value": f"{draw(st.floats(1, 200)):.4g} nF"}}
        else:
            seg = {"shunt": {"capacitance": f"{draw(st.floats(0.01, 0.3)):.3g} pF"}}
        channel.append(seg)
    doc["channel"] = channel
    victim = draw(st.sampled_from(names))
    xt: dict = {"victim": victim}
    others = [x for x in names if x != victim]
    if draw(st.booleans()):
        xt["aggressors"] = draw(st.lists(st.sampled_from(others), min_size=1, unique=True))
    for key, lo, hi, unit in (
        ("near_amplitude", 100, 1500, "mV"),
        ("far_amplitude", 100, 1500, "mV"),
        ("near_transition", 5, 60, "ps"),
        ("far_transition", 5, 60, "ps"),
    ):
        if draw(st.integers(0, 3)) == 0:
            xt[key] = f"{draw(st.floats(lo, hi)):.4g} {unit}"
    if draw(st.integers(0, 3)) == 0:
        xt["receiver_bandwidth"] = f"{draw(st.floats(1, 40)):.4g} GHz"
    doc["crosstalk"] = xt
    dc_block = any("capacitor" in s for s in channel)
    if draw(st.booleans()):
        from hostile_strategies import budget_spec

        budget = draw(budget_spec(f, dc_block, False))
        if "data_rate" in budget and draw(st.booleans()):
            budget["max_icn"] = f"{draw(st.floats(0.5, 50)):.3g} mV"
        doc["budget"] = budget
    return Case(doc, {}, False, nports=2 * conductors)

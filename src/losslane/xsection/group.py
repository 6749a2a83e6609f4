"""Groups of traces on one layer: several single-ended traces and differential pairs side
by side, in stripline or microstrip, solved by the 2-D field solver.

A group line (``kind = "stripline-group"`` or ``"microstrip-group"``) is the cross-section
of a bus: a list of traces from left to right, each a single-ended trace or a pair
(``spacing`` given), each after the previous one at an edge-to-edge ``gap``. Its n
signal conductors (a pair counts two) give the (N, n, n) per-unit-length R, L, G, C of
the field solver (``xsection.fieldsolve``): Maxwell capacitance matrix (C_ij < 0 for
i != j), inductance matrix from the vacuum capacitance, conductor loss by Wheeler's rule
per conductor, the laminate's causal dielectric model, roughness -- exactly as for one
trace. There is no closed form: the published closed forms cover one trace or one
symmetric pair only (a closed form for two coupled single-ended traces is not offered).

Vertical keys are those of the single-trace kinds, so a stackup layer can fill them:
``height`` (microstrip-group: trace bottom to the plane) or ``below``/``above``
(stripline-group: trace to the lower/upper plane), with ``thickness``. The field solver's
keys apply too (``etch_factor``, ``dielectric_above``, ``coating_*`` for microstrip,
``accuracy``); ``top_width`` does not (the traces have different widths: give the
process's ``etch_factor``).

Conductor order (the line's matrices, and the ports of a channel on it): the traces in
their order, a pair's P (left) conductor before its N (right) one.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping
from dataclasses import dataclass, field
from functools import cached_property
from typing import TYPE_CHECKING, ClassVar

import numpy as np

from losslane.errors import LossLaneError
from losslane.materials.dielectric import Dielectric
from losslane.xsection.base import CrossSection, LineValues, Metal
from losslane.xsection.rlgc import NP_TO_DB, RLGC, attenuation_split

if TYPE_CHECKING:
    from losslane.xsection.fieldsolve.geometry import Geometry
    from losslane.xsection.fieldsolve.layouts import FieldOptions
    from losslane.xsection.fieldsolve.section import FieldSection

TRACE_KEYS = ("name", "width", "spacing", "gap")
INCH = 25.4e-3


@dataclass(frozen=True)
class GroupTrace:
    """One trace of a group: ``width`` (m), ``spacing`` (m, edge to edge inside a pair;
    None for a single-ended trace), ``gap`` (m, edge to edge from the previous trace; 0
    for the first)."""

    name: str
    width: float
    spacing: float | None = None
    gap: float = 0.0

    @property
    def pair(self) -> bool:
        return self.spacing is not None

    @property
    def span(self) -> float:
        """Edge to edge across the trace (both conductors of a pair)."""
        return 2 * self.width + self.spacing if self.pair else self.width


@dataclass(frozen=True)
class Member:
    """A trace of a group as the line's conductors: ``conductors`` holds one index, or a
    pair's (P, N) indices."""

    name: str
    conductors: tuple[int, ...]

    @property
    def pair(self) -> bool:
        return len(self.conductors) == 2


def members_of(traces: tuple[GroupTrace, ...]) -> tuple[Member, ...]:
    """The conductor indices of each trace: in the traces' order, P before N."""
    out, k = [], 0
    for tr in traces:
        m = 2 if tr.pair else 1
        out.append(Member(tr.name, tuple(range(k, k + m))))
        k += m
    return tuple(out)


def pairs_of(members: tuple[Member, ...]) -> tuple[tuple[int, int], ...]:
    """The conductor pairs (P, N) of the members that are pairs."""
    return tuple((m.conductors[0], m.conductors[1]) for m in members if m.pair)


def member(members: tuple[Member, ...], name: str, key: str = "victim") -> Member:
    """The member called ``name``; a LossLaneError naming ``key`` and the trace names."""
    for m in members:
        if m.name == name:
            return m
    from losslane.spec import suggest

    raise LossLaneError(
        f"{key} = {name!r}: no trace of that name in the group; "
        f"{suggest(str(name), [m.name for m in members])}"
    )


def parse_traces(spec: Mapping, where: str) -> tuple[GroupTrace, ...]:
    """The ``traces`` list of a group spec: tables with name, width, and spacing (a pair)
    and gap (required from the second trace on), lengths with units."""
    from losslane.limits import check_dimension
    from losslane.spec import check_keys, key_name, quantity

    raw = spec.get("traces")
    w_all = key_name(where, "traces")
    example = (
        '[{ name = "a", width = "5 mil", spacing = "7 mil" }, '
        '{ name = "b", width = "5 mil", gap = "15 mil" }]'
    )
    if not isinstance(raw, (list, tuple)) or not raw:
        raise LossLaneError(
            f"{w_all} = {raw!r}: expected a list of traces from left to right, e.g. {example}"
        )
    out: list[GroupTrace] = []
    for i, entry in enumerate(raw):
        w = f"{w_all}[{i + 1}]"
        if not isinstance(entry, Mapping):
            raise LossLaneError(f"{w} = {entry!r}: expected an inline table, e.g. {example}")
        check_keys(w, entry, TRACE_KEYS, required=("name", "width"))
        name = entry["name"]
        if not isinstance(name, str) or not name.strip():
            raise LossLaneError(f"{w}.name = {name!r}: expected a non-empty text")
        name = name.strip()
        if any(t.name == name for t in out):
            raise LossLaneError(f"{w}.name = {name!r}: another trace has that name; names differ")
        width = quantity(w, entry, "width", "length", required=True)
        spacing = quantity(w, entry, "spacing", "length")
        gap = quantity(w, entry, "gap", "length")
        for key, v in (("width", width), ("spacing", spacing), ("gap", gap)):
            if v is not None and v > 0:  # a board dimension: 1 nm .. 1 m (signs below)
                check_dimension(v, f"{w}.{key}", entry[key])
        if not width > 0:
            raise LossLaneError(f"{w}.width = {entry['width']!r}: a trace needs width > 0")
        if spacing is not None and not spacing > 0:
            raise LossLaneError(
                f"{w}.spacing = {entry['spacing']!r}: a pair needs spacing > 0 (edge to edge)"
            )
        if i == 0 and gap is not None:
            raise LossLaneError(
                f"{w}.gap = {entry['gap']!r}: the first trace has no previous trace; gap is "
                "the edge-to-edge distance from the previous trace (leave it out here)"
            )
        if i > 0:
            if gap is None:
                raise LossLaneError(
                    f'{w}: missing gap (edge to edge from trace {out[-1].name!r}, e.g. "15 mil")'
                )
            if not gap > 0:
                raise LossLaneError(f"{w}.gap = {entry['gap']!r}: traces need a gap > 0")
        out.append(GroupTrace(name, width, spacing, 0.0 if gap is None else gap))
    return tuple(out)


def group_traces(
    traces: tuple[GroupTrace, ...], y: float, thickness: float, options: FieldOptions | None
) -> tuple:
    """The field solver's signal conductors of ``traces`` at height ``y``: left to right,
    centred on x = 0, a pair's P then N, each etched by ``options.etch_factor``."""
    from losslane.xsection.fieldsolve.geometry import Trace

    out = []
    x = 0.0
    for k, tr in enumerate(traces):
        if k:
            x += tr.gap
        top = None if options is None else options.top({"width": tr.width, "thickness": thickness})
        if tr.pair:
            out.append((x + tr.width / 2, tr.width, top, f"{tr.name} P"))
            out.append((x + 1.5 * tr.width + tr.spacing, tr.width, top, f"{tr.name} N"))
        else:
            out.append((x + tr.width / 2, tr.width, top, tr.name))
        x += tr.span
    mid = x / 2
    return tuple(Trace.centred(xc - mid, w, y, thickness, top, name) for xc, w, top, name in out)


@dataclass(frozen=True)
class _Group(CrossSection):
    """What both group kinds share (see the module docstring)."""

    traces: tuple[GroupTrace, ...] = ()
    options: FieldOptions | None = field(default=None, compare=False)
    accuracy: str = "normal"

    default_solver: ClassVar[str] = "field"
    closed_form: ClassVar[bool] = False
    #: the traces list has no command-line form: the kinds live in scenario files
    command_line: ClassVar[bool] = False

    def __post_init__(self) -> None:
        super().__post_init__()
        if not self.traces:
            raise LossLaneError(f"{self.kind}: a group needs at least one trace")

    # -- the spec -------------------------------------------------------------------
    @classmethod
    def spec_keys(cls) -> tuple[str, ...]:
        return cls.dimensions + ("traces",)

    @classmethod
    def dimensions_from_spec(cls, spec: Mapping, where) -> dict:
        dims = super().dimensions_from_spec(spec, where)
        dims["traces"] = parse_traces(spec, where)
        return dims

    @classmethod
    def from_spec_parts(
        cls, dims: Mapping, dielectric: Dielectric, metal: Metal, spec: Mapping, where, solver: str
    ) -> _Group:
        """The section from a checked spec (the factory's hook for kinds that build their
        own section): the field solver's options from ``spec`` (dielectric names already
        resolved), ``top_width`` refused."""
        from losslane.spec import key_name
        from losslane.xsection.fieldsolve.options import field_options

        if solver != "field":
            raise LossLaneError(
                f"{key_name(where, 'solver')} = {solver!r}: kind {cls.kind!r} has no closed "
                "form; it is solved by the field solver (solver = 'field', the default)"
            )
        if "top_width" in spec:
            raise LossLaneError(
                f"{key_name(where, 'top_width')}: the traces of a group have their own widths; "
                "give the etching as etch_factor (2 thickness / (width - top width))"
            )
        traces = dims["traces"]
        lengths = {k: float(v) for k, v in dims.items() if k != "traces"}
        narrowest = min(t.width for t in traces)
        options, accuracy = field_options(
            cls, {**lengths, "width": narrowest}, dielectric, spec, where
        )
        try:
            section = cls(
                **lengths,
                dielectric=dielectric,
                metal=metal,
                traces=traces,
                options=options,
                accuracy=accuracy,
            )
            _ = section.geometry  # overlapping or misplaced traces are input errors now
        except LossLaneError as exc:
            raise LossLaneError(f"{where}: {exc}") from None
        return section

    # -- what the group is ------------------------------------------------------------
    @property
    def n_conductors(self) -> int:  # type: ignore[override]
        return sum(2 if t.pair else 1 for t in self.traces)

    @property
    def members(self) -> tuple[Member, ...]:
        return members_of(self.traces)

    @property
    def pairs(self) -> tuple[tuple[int, int], ...]:
        return pairs_of(self.members)

    def layout(self) -> tuple[tuple[str, bool], ...]:
        """(name, is a pair) of each trace: what two group lines of one channel share."""
        return tuple((t.name, t.pair) for t in self.traces)

    def _options(self) -> FieldOptions:
        from losslane.xsection.fieldsolve.layouts import FieldOptions

        return self.options if self.options is not None else FieldOptions(self.dielectric)

    @cached_property
    def geometry(self) -> Geometry:
        dims = {**self.dimension_values(), "traces": self.traces}
        return self.field_geometry(dims, self._options())

    @cached_property
    def field(self) -> FieldSection:
        """The field-solved section of the group's geometry (the solver's own bounded cache
        keeps the solution)."""
        from losslane.xsection.fieldsolve.section import FieldSection

        return FieldSection(self.geometry, self.metal, self.accuracy, self.kind)

    def replace(self, **changes) -> _Group:
        new = dataclasses.replace(self, **changes)
        if "dielectric" in changes and self.options is not None:
            opts = dataclasses.replace(self.options, dielectric=changes["dielectric"])
            new = dataclasses.replace(new, options=opts)
        return new

    # -- the model interface ------------------------------------------------------------
    def rlgc(self, f: np.ndarray) -> RLGC:
        """The (N, n, n) R, L, G, C of the group from the field solver."""
        f = np.atleast_1d(np.asarray(f, float))
        fs = self.field
        sol = fs.solution()
        self.check_quasi_static(f)
        fs._warn_lossless(sol)
        r, l, g, c, _ = fs.matrices(f, sol)
        return RLGC(f, r, l, g, c)

    def coupling_size(self) -> float:
        """The size that the quasi-static limit applies to: the largest distance the field
        crosses between conductors -- the stack's height, a trace's (or pair's) span, a
        gap between neighbours. The group's whole width is not it: the coupling of a
        trace to the ones beyond its neighbours is weaker than to those."""
        g = self.geometry
        return max([g.stack_top] + [t.span for t in self.traces] + [t.gap for t in self.traces])

    def check_quasi_static(self, f: np.ndarray) -> None:
        """Quasi-TEM holds while ``coupling_size`` is small against the wavelength in the
        densest dielectric (common practice: below a tenth of it)."""
        from losslane.errors import check_range

        g = self.geometry
        dk = max([1.0] + [float(np.max(d.eps(f).real)) for _, d in g.regions() if d is not None])
        size = self.coupling_size() * np.sqrt(dk) * np.max(f, initial=0.0) / 299_792_458.0
        check_range(f"{self.kind} (quasi-static)", "conductor spacing/wavelength", size, 0, 0.1)

    def modes(self, f: np.ndarray):
        return self.field.modes(f)

    def _rlgc(self, f: np.ndarray, modes) -> RLGC:
        return self.rlgc(f)

    def line_values(self, f: np.ndarray) -> LineValues:
        return dataclasses.replace(self.field.line_values(f), kind=self.kind)

    def solver_report(self) -> dict:
        return self.field.solver_report()

    def attenuation_db_per_in(self, f: np.ndarray) -> np.ndarray:
        if self.n_conductors <= 2:
            return super().attenuation_db_per_in(f)
        raise LossLaneError(
            f"{self.kind}: a group of {self.n_conductors} conductors has no single main mode; "
            "ask for one trace's loss (trace_db_per_in)"
        )

    def trace_rlgc(self, f: np.ndarray, name: str) -> RLGC:
        """The R, L, G, C of trace ``name`` alone: the sub-matrices over its conductors,
        the other conductors held at the reference potential (quiet neighbours)."""
        m = member(self.members, name, "trace")
        idx = np.array(m.conductors)
        full = self.rlgc(f)
        pick = np.ix_(np.arange(full.f.size), idx, idx)
        return RLGC(full.f, full.r[pick], full.l[pick], full.g[pick], full.c[pick])

    def trace_db_per_in(self, f: np.ndarray, name: str) -> np.ndarray:
        """Attenuation (dB per inch) of trace ``name``'s main mode with its neighbours
        quiet: the single trace's mode, or a pair's differential (odd) mode from the mean
        self terms and the mutual terms of its 2 x 2 sub-matrices."""
        f = np.atleast_1d(np.asarray(f, float))
        sub = self.trace_rlgc(f, name)
        if sub.n == 1:
            r, l, g, c = sub.scalar()
        else:

            def odd(a: np.ndarray) -> np.ndarray:
                return 0.5 * (a[:, 0, 0] + a[:, 1, 1]) - a[:, 0, 1]

            r, l, g, c = odd(sub.r), odd(sub.l), odd(sub.g), odd(sub.c)
        return attenuation_split(r, l, g, c, f)[0] * NP_TO_DB * INCH


@dataclass(frozen=True)
class StriplineGroup(_Group):
    """Traces and pairs side by side between two planes (field solver): the core of
    ``below`` under the traces, the prepreg of ``thickness + above`` embedding them
    (``dielectric_above`` when it differs)."""

    below: float = 0.0
    above: float = 0.0
    thickness: float = 0.0
    dielectric: Dielectric | None = None
    metal: Metal = field(default_factory=Metal)

    kind: ClassVar[str] = "stripline-group"
    dimensions: ClassVar[tuple[str, ...]] = ("below", "above", "thickness")
    outer_layer: ClassVar[bool] = False

    @classmethod
    def field_geometry(cls, dims: Mapping, options) -> Geometry:
        from losslane.xsection.fieldsolve.geometry import Geometry
        from losslane.xsection.fieldsolve.layouts import layers_between_planes

        lo, hi, t = dims["below"], dims["above"], dims["thickness"]
        layers = layers_between_planes(lo, hi, t, options)
        return Geometry(layers, group_traces(dims["traces"], lo, t, options), True, True)


@dataclass(frozen=True)
class MicrostripGroup(_Group):
    """Traces and pairs side by side on one layer of ``height`` over the plane, air (or
    a coating) above (field solver)."""

    height: float = 0.0
    thickness: float = 0.0
    dielectric: Dielectric | None = None
    metal: Metal = field(default_factory=Metal)

    kind: ClassVar[str] = "microstrip-group"
    dimensions: ClassVar[tuple[str, ...]] = ("height", "thickness")
    outer_layer: ClassVar[bool] = True

    @classmethod
    def field_geometry(cls, dims: Mapping, options) -> Geometry:
        from losslane.xsection.fieldsolve.geometry import Geometry
        from losslane.xsection.fieldsolve.layouts import layers_over_plane

        h, t = dims["height"], dims["thickness"]
        traces = group_traces(dims["traces"], h, t, options)
        return Geometry(layers_over_plane(h, options), traces, True, False, options.coating)


def is_group(section: object) -> bool:
    """Whether a cross-section is a group of traces."""
    return isinstance(section, _Group)


__all__ = [
    "GroupTrace",
    "Member",
    "MicrostripGroup",
    "StriplineGroup",
    "group_traces",
    "is_group",
    "member",
    "members_of",
    "pairs_of",
    "parse_traces",
]

"""A via from its drill geometry on a stackup: the lengths of its barrel and stubs, the
dielectric of each piece, and the local layers around each functional pad.

Keys of ``via = { ... }`` (the drill form; the explicit form ``barrel``, ``stub``,
``impedance``, ``dielectric`` is read by the scenario as before):

* ``from``, ``to``: the signal layers where the traces join the via (``from`` above
  ``to``: the stackup lists layers top to bottom); a signal that travels up the via
  (entering at ``to``, leaving at ``from``) adds ``upward = true``;
* ``drill``: the finished hole's diameter (the barrel's outer copper surface);
  ``antipad``: the diameter of the clearance opening in every plane; ``pad``: the
  diameter of the functional pads on ``from`` and ``to`` (optional: without it, no pad
  capacitance);
* ``backdrill = "L9"``: the barrel is drilled away from the board's bottom face up to and
  including layer L9 (its stub ends at L9's top face); or ``stub = "8 mil"``: the
  remaining stub below ``to`` directly; neither: the stub runs to the bottom face;
* ``blind = true``: the hole starts at the entry layer (a blind or buried via: no barrel
  above ``from``); otherwise a via entering at an inner layer has the barrel above it as
  a second stub, up to the board's top face;
* pairs: ``pitch`` (centre to centre) and ``antipad_shape`` = "oblong" (default: one
  opening of width ``antipad`` around both barrels) or "round" (one per barrel);
  ``skew`` (a length or a time: leg P longer; negative, leg N); ``stackup`` names the
  board when the scenario has several.

Convention of lengths: positions along the hole are the centres of copper layers and
the faces of the board. The barrel runs from the centre of ``from`` to the centre of
``to``. A stub runs from the centre of its layer to the end of the plated hole: the top
face of the top copper (or of the back-drilled layer), the bottom face of the bottom
copper. Where ``from`` is the top copper layer there is no stub above (its half copper
thickness is part of the pad), likewise below a ``to`` on the bottom copper. Each piece
of barrel lies in the dielectric of the layer it crosses; in a copper layer (a plane's
antipad, another signal layer's clearance) in that layer's fill dielectric.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from losslane.errors import LossLaneError
from losslane.materials.dielectric import Dielectric
from losslane.spec import check_keys, dimension, flag, text
from losslane.stackup import StackLayer, Stackup, choose

#: the drill form's keys
DRILL_KEYS = (
    "from",
    "to",
    "drill",
    "antipad",
    "pad",
    "backdrill",
    "stub",
    "blind",
    "pitch",
    "antipad_shape",
    "skew",
    "stackup",
    "upward",
)
SHAPES = ("oblong", "round")


@dataclass(frozen=True)
class Piece:
    """A length of barrel in one dielectric (the layers it crosses)."""

    length: float
    dielectric: Dielectric
    layers: tuple[str, ...]


@dataclass(frozen=True)
class DrillVia:
    """A via's drill geometry resolved on its stackup (see the module docstring).

    ``hole_top`` / ``hole_bottom``: depths (m, from the top copper's top face) of the
    plated hole's ends; ``barrel``: the pieces from the entry centre down to the exit
    centre; ``stub_above`` / ``stub_below``: the pieces from the entry (exit) centre to
    the hole's end, nearest first (empty: no stub)."""

    stackup: Stackup
    entry: StackLayer
    exit: StackLayer
    drill: float
    antipad: float
    pad: float | None
    pitch: float | None
    shape: str
    hole_top: float
    hole_bottom: float
    backdrill: str | None
    barrel: tuple[Piece, ...]
    stub_above: tuple[Piece, ...]
    stub_below: tuple[Piece, ...]
    upward: bool = False

    @property
    def barrel_length(self) -> float:
        return float(sum(p.length for p in self.barrel))

    @property
    def stub_above_length(self) -> float:
        return float(sum(p.length for p in self.stub_above))

    @property
    def stub_below_length(self) -> float:
        return float(sum(p.length for p in self.stub_below))


def is_drill_form(body: Mapping) -> bool:
    """Whether a ``via = {...}`` table uses the drill form (it names layers)."""
    return "from" in body or "to" in body or "drill" in body


def pieces(st: Stackup, top: float, bottom: float) -> tuple[Piece, ...]:
    """The barrel between depths ``top`` < ``bottom`` as pieces per dielectric, top down
    (adjacent layers of the same dielectric joined)."""
    out: list[Piece] = []
    for ly in st.layers:
        if ly.role == "mask":
            continue
        a, b = max(top, st.depth_top(ly.name)), min(bottom, st.depth_bottom(ly.name))
        if b - a <= 1e-12 * st.thickness:
            continue
        d = st.fill_dielectric(ly).dielectric if ly.copper else ly.dielectric
        if out and out[-1].dielectric == d:
            prev = out[-1]
            out[-1] = Piece(prev.length + (b - a), d, prev.layers + (ly.name,))
        else:
            out.append(Piece(b - a, d, (ly.name,)))
    return tuple(out)


def drill_via(
    body: Mapping, where: str, stackups: Mapping[str, Stackup], pair: bool | None = None
) -> DrillVia:
    """The drill form of ``via = {...}`` (``where`` names it) on its stackup."""
    check_keys(where, body, DRILL_KEYS, required=("from", "to", "drill", "antipad"))
    st = choose(stackups, body.get("stackup"), f"{where}.stackup", where)
    entry = _signal(st, body["from"], f"{where}.from")
    exit_ = _signal(st, body["to"], f"{where}.to")
    if entry.index >= exit_.index:
        same = entry.index == exit_.index
        raise LossLaneError(
            f"{where}: from = {entry.name!r} "
            + ("is the same layer as" if same else "lies below")
            + f" to = {exit_.name!r} in {st.label}; a via is written from the upper layer to "
            "the lower one (the stackup lists layers top to bottom); for a signal that travels "
            "up, add upward = true"
        )
    drill = _length(where, body, "drill")
    antipad = _length(where, body, "antipad")
    if not antipad > drill:
        raise LossLaneError(
            f"{where}.antipad = {body['antipad']!r}: the antipad must be wider than the drill "
            f"({body['drill']!r})"
        )
    pad = _length(where, body, "pad") if "pad" in body else None
    if pad is not None and not pad > drill:
        raise LossLaneError(
            f"{where}.pad = {body['pad']!r}: a pad must be wider than the drill ({body['drill']!r})"
        )
    pitch = _length(where, body, "pitch") if "pitch" in body else None
    shape = text(where, body, "antipad_shape", SHAPES, "oblong")
    if pitch is not None:
        if not pitch > drill:
            raise LossLaneError(
                f"{where}.pitch = {body['pitch']!r}: the barrels would touch; the pitch "
                f"(centre to centre) must exceed the drill ({body['drill']!r})"
            )
        if shape == "round" and not pitch >= antipad:
            raise LossLaneError(
                f"{where}.antipad_shape = 'round': round antipads of {body['antipad']!r} "
                f"around barrels {body['pitch']!r} apart overlap; use 'oblong' or a larger pitch"
            )
        if pad is not None and not pitch > pad:
            raise LossLaneError(
                f"{where}.pitch = {body['pitch']!r}: the pads ({body['pad']!r}) would touch"
            )
    elif "antipad_shape" in body:
        raise LossLaneError(f"{where}.antipad_shape: only a via pair (with pitch) has a shape")
    upward = flag(
        where, body, "upward", False, "true: the signal enters at 'to' and leaves at 'from'"
    )
    blind = flag(
        where, body, "blind", False, "true: the hole starts at the entry layer, no barrel above it"
    )
    cu = st.copper
    top_face = st.depth_top(cu[0].name)
    bottom_face = st.depth_bottom(cu[-1].name)
    c_in, c_out = st.depth_centre(entry.name), st.depth_centre(exit_.name)
    hole_top = c_in if (blind or entry is cu[0]) else top_face
    hole_bottom, backdrill = _hole_bottom(body, where, st, exit_, c_out, bottom_face)
    return DrillVia(
        st,
        entry,
        exit_,
        drill,
        antipad,
        pad,
        pitch,
        shape,
        hole_top,
        hole_bottom,
        backdrill,
        pieces(st, c_in, c_out),
        pieces(st, hole_top, c_in)[::-1] if hole_top < c_in else (),
        pieces(st, c_out, hole_bottom) if hole_bottom > c_out else (),
        upward,
    )


def _hole_bottom(
    body: Mapping, where: str, st: Stackup, exit_: StackLayer, c_out: float, bottom_face: float
) -> tuple[float, str | None]:
    last = st.copper[-1]
    if "backdrill" in body and "stub" in body:
        raise LossLaneError(
            f"{where}: give backdrill (the deepest layer drilled away) or stub (the remaining "
            "length), not both"
        )
    if "backdrill" in body:
        bd = st.layer(body["backdrill"], f"{where}.backdrill")
        if bd.role == "mask":
            raise LossLaneError(
                f"{where}.backdrill = {bd.name!r}: a solder mask; name the deepest laminate "
                "layer the back-drill removes"
            )
        if bd.index <= exit_.index:
            what = (
                "is the exit layer" if bd is exit_ else f"lies above the exit layer {exit_.name!r}"
            )
            raise LossLaneError(
                f"{where}.backdrill = {bd.name!r} {what} in {st.label}; a back-drill removes the "
                f"barrel below the exit layer, so name a layer below {exit_.name!r}"
            )
        return st.depth_top(bd.name), bd.name
    if "stub" in body:
        stub = dimension(where, body, "stub", required=True, zero_ok=True)
        room = bottom_face - c_out if exit_ is not last else 0.0
        if stub < 0 or stub > room + 1e-12 * st.thickness:
            raise LossLaneError(
                f"{where}.stub = {body['stub']!r}: the stub below {exit_.name!r} must be "
                f">= 0 and at most {room / 25.4e-6:.4g} mil (to the board's bottom face)"
            )
        return c_out + stub, None
    return (bottom_face if exit_ is not last else c_out), None


def _signal(st: Stackup, name: object, key: str) -> StackLayer:
    ly = st.layer(name, key)
    if ly.role != "signal":
        what = "a plane" if ly.role == "plane" else f"a {ly.role} layer"
        raise LossLaneError(
            f"{key} = {ly.name!r} is {what} in {st.label}; a via joins traces on signal layers"
        )
    return ly


def _length(where: str, body: Mapping, key: str) -> float:
    v = dimension(where, body, key, required=True)  # a board dimension: 1 nm .. 1 m
    if not v > 0:
        raise LossLaneError(f"{where}.{key} = {body[key]!r}: must be > 0")
    return v


def pad_window(via: DrillVia, layer: StackLayer, f_ref: float = 5e9):
    """The axisymmetric model (``fieldsolve.axisym.AxiVia``) around the pad on ``layer``
    and the index of its band: from the nearest plane below to the nearest plane above
    (both included), air (and the mask) beyond an outer layer; the hole's part in that
    window; real permittivities at ``f_ref``."""
    import numpy as np

    from losslane.xsection.fieldsolve.axisym import AxiBand, AxiVia

    st = via.stackup
    layers = list(st.layers)
    i = layer.index
    lo = next((k for k in range(i + 1, len(layers)) if layers[k].role == "plane"), None)
    hi = next((k for k in range(i - 1, -1, -1) if layers[k].role == "plane"), None)
    start = 0 if hi is None else hi
    stop = len(layers) - 1 if lo is None else lo
    chosen = layers[start : stop + 1]

    def eps(d: Dielectric) -> float:
        return float(np.real(d.eps(np.array([f_ref]))[0]))

    def outer_fill(ly: StackLayer) -> float:
        mask = st.layers[0] if ly is st.copper[0] else st.layers[-1]
        return eps(mask.dielectric) if mask.role == "mask" else 1.0

    bands_top_down = []
    for ly in chosen:
        if ly.role in ("dielectric", "mask"):
            bands_top_down.append(AxiBand(ly.thickness, eps(ly.dielectric), name=ly.name))
            continue
        outer = ly is st.copper[0] or ly is st.copper[-1]
        fill = outer_fill(ly) if outer else eps(st.fill_dielectric(ly).dielectric)
        if ly.role == "plane":
            bands_top_down.append(
                AxiBand(ly.thickness, fill, ground_from=via.antipad / 2, name=ly.name)
            )
        elif ly is layer:
            bands_top_down.append(AxiBand(ly.thickness, fill, signal_to=via.pad / 2, name=ly.name))
        else:
            bands_top_down.append(AxiBand(ly.thickness, fill, name=ly.name))
    span = float(sum(b.thickness for b in bands_top_down))
    air = 4.0 * max(span, via.antipad)
    top_air = hi is None
    bottom_air = lo is None
    if top_air:
        bands_top_down.insert(0, AxiBand(air, 1.0, name="air above"))
    if bottom_air:
        bands_top_down.append(AxiBand(air, 1.0, name="air below"))
    bands = tuple(bands_top_down[::-1])
    height = float(sum(b.thickness for b in bands))
    # depth of the window's top face
    top_depth = st.depth_top(chosen[0].name) - (air if top_air else 0.0)
    z_of = lambda depth: height - (depth - top_depth)  # noqa: E731
    b_top = min(height, z_of(via.hole_top))
    b_bot = max(0.0, z_of(via.hole_bottom))
    pad_band = (
        len(bands)
        - 1
        - bands_top_down.index(next(b for b in bands_top_down if b.name == layer.name))
    )
    radius = max(via.antipad, via.pad or 0.0) / 2 + 6.0 * max(span, via.antipad)
    return AxiVia(bands, via.drill / 2, b_bot, b_top, radius), pad_band


__all__ = ["DRILL_KEYS", "DrillVia", "Piece", "drill_via", "is_drill_form", "pad_window", "pieces"]

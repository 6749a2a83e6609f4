"""Hypothesis strategies for the hostile-input suite: scenario dictionaries (valid ones and
one-mutation breakages of them), Touchstone texts (valid lossy-line models and their
corruptions) and command-line options.

Valid channels are kept to moderate loss (lines of at most a few inches, sweeps to 40 GHz:
well under 100 dB), where every output must be finite, passive and reciprocal to 1e-9.

When a later issue adds keys, segment types or commands, extend ``line_spec``,
``segment``, ``MUTATIONS`` and ``line_options`` here (the contributor guide says so).
"""

from __future__ import annotations

import json
import re
from dataclasses import dataclass, field

import numpy as np
from hypothesis import strategies as st

from losslane.bandspec import QUANTITIES
from losslane.materials.library import load_library
from losslane.network.ports import ORDERS
from losslane.xsection import registry

LIBRARY = load_library()
DIELECTRICS = sorted(n for n in LIBRARY.dielectrics if n != "air")
FOILS = sorted(LIBRARY.foils)
SINGLE = [k for k in registry.kinds() if registry.model(k, "kind").n_conductors == 1]
PAIRS = [k for k in registry.kinds() if registry.model(k, "kind").n_conductors == 2]
MIL = 25.4e-6  # m, exact (1959 agreement)

# --- a TOML writer for the generated dictionaries ---------------------------------------

_BARE = re.compile(r"^[A-Za-z0-9_-]+$")


def _key(k: str) -> str:
    return k if _BARE.match(k) else _string(k)


def _string(s: str) -> str:
    # JSON escapes are TOML escapes, except that TOML needs DEL escaped too
    return json.dumps(s, ensure_ascii=False).replace("\x7f", "\\u007f")


def _value(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    if isinstance(v, float):
        if v != v:
            return "nan"
        if v in (float("inf"), float("-inf")):
            return "inf" if v > 0 else "-inf"
        return repr(v)
    if isinstance(v, str):
        return _string(v)
    if isinstance(v, dict):
        return "{ " + ", ".join(f"{_key(k)} = {_value(x)}" for k, x in v.items()) + " }"
    if isinstance(v, (list, tuple)):
        return "[" + ", ".join(_value(x) for x in v) + "]"
    raise TypeError(v)


def _tables_of(v) -> bool:
    return isinstance(v, list) and bool(v) and all(isinstance(x, dict) for x in v)


def _table(path: list[str], d: dict, out: list[str]) -> None:
    scalars = {k: v for k, v in d.items() if not isinstance(v, dict) and not _tables_of(v)}
    subs = {k: v for k, v in d.items() if k not in scalars}
    if scalars or not subs:
        out.append(f"[{'.'.join(_key(p) for p in path)}]")
        out += [f"{_key(k)} = {_value(v)}" for k, v in scalars.items()]
    for k, v in subs.items():
        if isinstance(v, dict):
            _table(path + [k], v, out)
        else:
            _array(path + [k], v, out)


def _array(path: list[str], items: list[dict], out: list[str]) -> None:
    for item in items:
        out.append(f"[[{'.'.join(_key(p) for p in path)}]]")
        later = {}
        for k, v in item.items():
            if _tables_of(v) and k == "check":
                later[k] = v
            else:
                out.append(f"{_key(k)} = {_value(v)}")
        for k, v in later.items():
            _array(path + [k], v, out)


def toml_text(doc: dict) -> str:
    """``doc`` as TOML: scalars, then tables; lists of tables as arrays of tables, tables
    inside them inline (as a scenario's segments are written)."""
    out: list[str] = []
    tables = {}
    for k, v in doc.items():
        if isinstance(v, dict) or _tables_of(v):
            tables[k] = v
        else:
            out.append(f"{_key(k)} = {_value(v)}")
    for k, v in tables.items():
        if isinstance(v, dict):
            _table([k], v, out)
        else:
            _array([k], v, out)
    return "\n".join(out) + "\n"


# --- values ------------------------------------------------------------------------------

_LENGTH_UNITS = {"mil": MIL, "mm": 1e-3, "um": 1e-6, "in": 25.4e-3}


@st.composite
def length(draw, lo_mil: float, hi_mil: float) -> str:
    """A length between ``lo_mil`` and ``hi_mil`` mil, written in a random unit."""
    v = draw(st.floats(lo_mil, hi_mil, allow_nan=False))
    unit = draw(st.sampled_from(sorted(_LENGTH_UNITS)))
    sep = draw(st.sampled_from(["", " ", "\u00a0"]))
    return f"{v * MIL / _LENGTH_UNITS[unit]:.6g}{sep}{unit}"


#: values that are wrong for almost any key: types, garbage, absurd magnitudes, NaN
HOSTILE = st.one_of(
    st.sampled_from(
        [
            3,
            -1,
            0,
            2.5,
            True,
            float("nan"),
            float("inf"),
            -float("inf"),
            [],
            [1, "a"],
            {},
            {"x": 1},
            "",
            " ",
            "abc",
            "nan mil",
            "inf GHz",
            "1e30 mil",
            "1e-300 m",
            "1e400 mil",
            "-5 mil",
            "0 mil",
            "5 furlong",
            "1..2 mil",
            "\uff15 mil",
            "\u0665 GHz",
            "5 mil mil",
            "1e30 GHz",
            "-1 GHz",
            "1e-300 Hz",
            "1e-300 S/m",
            "1e30 S/m",
            "0 ohm",
            "-50 ohm",
            "1e300 nF",
            "1e300 dB",
            "-3 dB",
            "1e300 Gb/s",
            "x" * 300,
            "a\u0000b",
            "$\\frac{$",
        ]
    ),
    st.text(max_size=12),
    st.floats(),
    st.integers(),
)

#: values at the edges of the input limits: refused where they do not fit the key, and
#: where they do, the build must still give finite, passive, reciprocal outputs
EXTREME = st.sampled_from(
    [
        "1 nm",
        "0.99 m",
        "9 km",
        "1 um",
        "10 THz",
        "0.001 Hz",
        "1 Hz",
        "1e-6 ohm",
        "1e9 ohm",
        "1e-18 F",
        "1 F",
        "1e-18 H",
        "1 H",
        "1e3 S/m",
        "1e12 S/m",
        "1000 dB",
        "0.001 dB",
        "20 Tb/s",
        "1 b/s",
        1.0,
        100.0,
        0.999,
        2,
        200001,
    ]
)

#: free text for names and labels (no lone surrogates, which are not text)
NAME_TEXT = st.text(
    st.characters(blacklist_categories=("Cs",), blacklist_characters="\x00"),
    min_size=1,
    max_size=80,
)


# --- scenario pieces -----------------------------------------------------------------------


def ZERO_OR(lo: float, hi: float):  # noqa: N802 (reads as a strategy constant)
    """0, or a value in [lo, hi]: no denormal-sized parts (those are refused by the input
    limits, which the broken-scenario strategies exercise)."""
    return st.one_of(st.just(0.0), st.floats(lo, hi))


@st.composite
def dielectric_spec(draw) -> dict:
    spec = {"dk": draw(st.floats(2.0, 6.0)), "df": draw(st.floats(0.0, 0.02))}
    if draw(st.booleans()):
        spec["at"] = f"{draw(st.integers(1, 20))} GHz"
    else:
        spec["model"] = "constant"
    return spec


@st.composite
def foil_spec(draw) -> dict:
    model = draw(st.sampled_from(["none", "hammerstad", "groiss", "huray"]))
    spec: dict = {"model": model}
    if model in ("hammerstad", "groiss"):
        spec["rq"] = f"{draw(st.floats(0.1, 2.0)):.4g} um"
    elif model == "huray":
        spec["radius"] = f"{draw(st.floats(0.2, 1.0)):.4g} um"
        spec["surface_ratio"] = draw(st.floats(0.5, 3.0))
    return spec


_DIMS = {
    "width": (3.0, 20.0),
    "height": (2.0, 20.0),
    "thickness": (0.3, 2.0),
    "gap": (3.0, 15.0),
    "spacing": (4.0, 20.0),
    "below": (3.0, 15.0),
    "above": (3.0, 15.0),
}


def _mil(text: str) -> float:
    """A length written by ``length`` back in mil."""
    m = re.match(r"([0-9.e+-]+)\s*([a-z]+)", text)
    return float(m.group(1)) * _LENGTH_UNITS[m.group(2)] / MIL


@st.composite
def line_spec(draw, kind: str, dielectrics: list[str], foils: list[str]) -> dict:
    cls = registry.model(kind, "kind")
    spec: dict = {"kind": kind}
    for key in cls.dimensions:
        lo, hi = _DIMS[key]
        # thin enough for the strip's thickness widening (Gupta et al.) to keep the gap open
        if key == "thickness" and "gap" in spec:
            hi = min(hi, 0.25 * _mil(spec["gap"]))
        spec[key] = draw(length(lo, hi))
    spec["dielectric"] = draw(st.sampled_from(dielectrics))
    if draw(st.booleans()):
        spec["foil"] = draw(st.sampled_from(foils))
    if draw(st.integers(0, 4)) == 0:
        spec["conductivity"] = f"{draw(st.floats(1e7, 6e7)):.4g} S/m"
    return spec


def lossy_line_s(f: np.ndarray, zc: float, z0: float, alpha: float, delay: float) -> np.ndarray:
    """S (N, 2, 2) of a uniform line of characteristic impedance ``zc`` between ``z0``
    references, attenuation ``alpha`` Np per sqrt(GHz) and ``delay`` s (the textbook
    two-port of a transmission line: Pozar, Microwave Engineering, ABCD of a line section
    converted to S). Lossy, so passive with margin; reciprocal by construction."""
    gl = alpha * np.sqrt(f / 1e9) + alpha * 1e-3 + 1j * 2 * np.pi * f * delay
    ch, sh = np.cosh(gl), np.sinh(gl)
    d = 2 * zc * z0 * ch + (zc**2 + z0**2) * sh
    s11 = (zc**2 - z0**2) * sh / d
    s21 = 2 * zc * z0 / d
    s = np.empty((f.size, 2, 2), dtype=complex)
    s[:, 0, 0] = s[:, 1, 1] = s11
    s[:, 0, 1] = s[:, 1, 0] = s21
    return s


def _format(value: complex, form: str) -> tuple[str, str]:
    if form == "ri":
        return repr(value.real), repr(value.imag)
    mag, ang = abs(value), float(np.degrees(np.angle(value)))
    if form == "db":
        return repr(float(20 * np.log10(max(mag, 1e-300)))), repr(ang)
    return repr(mag), repr(ang)


def touchstone_text(
    f: np.ndarray, s: np.ndarray, form: str, unit: str, version: int, z0: float
) -> str:
    """A Touchstone text of ``s`` (N, P, P) at ``f`` (Hz) (Touchstone 1.1 / 2.0 layout:
    2-port rows as S11 S21 S12 S22, larger ones row by row)."""
    scale = {"Hz": 1.0, "kHz": 1e3, "MHz": 1e6, "GHz": 1e9}[unit]
    n = s.shape[1]
    out = ["! a made-up lossy line model"]
    if version == 2:
        out += ["[Version] 2.0", f"# {unit} S {form.upper()} R {z0:g}", f"[Number of Ports] {n}"]
        if n == 2:
            out.append("[Two-Port Data Order] 21_12")
        out += [f"[Number of Frequencies] {f.size}", "[Network Data]"]
    else:
        out.append(f"# {unit} S {form.upper()} R {z0:g}")
    for k in range(f.size):
        if n == 2:
            order = [(0, 0), (1, 0), (0, 1), (1, 1)]
            nums = [x for a, b in order for x in _format(complex(s[k, a, b]), form)]
            out.append(" ".join([repr(float(f[k] / scale)), *nums]))
        else:
            for a in range(n):
                nums = [x for b in range(n) for x in _format(complex(s[k, a, b]), form)]
                head = [repr(float(f[k] / scale))] if a == 0 else []
                for c in range(0, len(nums), 8):
                    out.append(" ".join((head if c == 0 else []) + nums[c : c + 8]))
    if version == 2:
        out.append("[End]")
    return "\n".join(out) + "\n"


@st.composite
def model_file(draw, nports: int, f_top: float, z0: float, gain: float = 0.0, inside=None) -> str:
    """A valid Touchstone text of a lossy line (2-port) or two lines of a pair (4-port,
    numbered in-in-out-out), from 0 Hz to at least ``f_top``; ``gain`` scales S by
    1 + gain (a measurement's calibration error: not passive). ``inside`` = (lo, hi): at
    least one point lies there (a measurement to compare with a sweep over lo..hi)."""
    points = draw(st.integers(2, 30))
    top = f_top * draw(st.floats(1.0, 1.5))
    f = np.linspace(0.0, top, points)
    if points > 2 and draw(st.booleans()):
        f = np.unique(np.round(f, 0))
        f[-1] = max(f[-1], np.ceil(f_top))
    if inside is not None and not np.any((f >= inside[0]) & (f <= inside[1])):
        f = np.unique(np.append(f, 0.5 * (inside[0] + inside[1])))
    lines = [
        lossy_line_s(
            f,
            draw(st.floats(35.0, 70.0)),
            z0,
            draw(st.floats(0.001, 0.2)),
            draw(st.floats(1e-12, 2e-10)),
        )
        for _ in range(nports // 2)
    ]
    if nports == 2:
        s = lines[0]
    else:
        s = np.zeros((f.size, 4, 4), dtype=complex)
        for leg, ls in enumerate(lines):  # in-in-out-out: leg k runs port k -> port k + 2
            idx = [leg, leg + 2]
            s[np.ix_(range(f.size), idx, idx)] = ls
    s = s * (1.0 + gain)
    form = draw(st.sampled_from(["ri", "ma", "db"]))
    unit = draw(st.sampled_from(["Hz", "MHz", "GHz"]))
    if unit != "Hz":
        scale = {"MHz": 1e6, "GHz": 1e9}[unit]
        f = f / scale * scale  # written as f / scale: the file's own rounding
    return touchstone_text(f, s, form, unit, draw(st.sampled_from([1, 2])), z0)


@dataclass
class Case:
    """A generated scenario: its dictionary, the extra files beside it, whether it is a
    differential channel, and (for broken ones) the key a refusal must name."""

    doc: dict
    files: dict[str, str | bytes] = field(default_factory=dict)
    differential: bool = False
    key: str | None = None
    what: str = "valid"
    #: other keys a refusal may name instead of ``key`` (a renamed layer or trace is
    #: refused where it is referred to)
    also: tuple[str, ...] = ()
    #: a channel on group lines (2n-port): its port count
    nports: int | None = None
    #: whether an imported file was accepted as it is (no 1e-9 guarantee)
    as_is: bool = False


@st.composite
def sweep_spec(draw) -> dict:
    step = draw(st.sampled_from([10, 20, 25, 50, 100, 250]))  # MHz
    n = draw(st.integers(1, min(300, 40_000 // step)))
    start = draw(st.sampled_from([0, 0, 0, step]))
    stop = start + n * step
    if draw(st.booleans()):
        return {"start": f"{start} MHz", "stop": f"{stop} MHz", "step": f"{step} MHz"}
    return {"start": f"{start} MHz", "stop": f"{stop / 1000:g} GHz", "points": n + 1}


def _grid(sweep: dict) -> np.ndarray:
    start = float(sweep["start"].split()[0]) * 1e6
    stop_num, stop_unit = sweep["stop"].split()
    stop = float(stop_num) * (1e9 if stop_unit == "GHz" else 1e6)
    n = (
        sweep["points"]
        if "points" in sweep
        else round((stop - start) / 1e6 / float(sweep["step"].split()[0])) + 1
    )
    return np.linspace(start, stop, n)


@st.composite
def valid_scenario(draw) -> Case:
    diff = draw(st.integers(0, 3)) == 0
    doc: dict = {}
    if draw(st.booleans()):
        doc["name"] = draw(NAME_TEXT.filter(lambda s: s.strip()))
    sweep = draw(sweep_spec())
    doc["sweep"] = sweep
    f = _grid(sweep)
    z0 = float(draw(st.integers(30, 75)))
    ports: dict = {}
    if z0 != 50 or draw(st.booleans()):
        ports["reference"] = f"{z0:g} ohm"
    if diff and draw(st.booleans()):
        ports["order"] = draw(st.sampled_from(ORDERS))
    if ports:
        doc["ports"] = ports
    dielectrics = list(DIELECTRICS)
    if draw(st.booleans()):
        doc["dielectrics"] = {"core": draw(dielectric_spec())}
        dielectrics.append("core")
    foils = list(FOILS)
    if draw(st.booleans()):
        doc["foils"] = {"own": draw(foil_spec())}
        foils.append("own")
    kinds = PAIRS if diff else SINGLE
    names = [f"l{i}" for i in range(draw(st.integers(1, 2)))]
    doc["lines"] = {
        n: draw(line_spec(draw(st.sampled_from(kinds)), dielectrics, foils)) for n in names
    }
    files: dict[str, str | bytes] = {}
    channel = []
    n_seg = draw(st.integers(1, 5))
    kinds_of = ["line"] + [
        draw(st.sampled_from(["line", "line", "via", "capacitor", "series", "shunt", "touchstone"]))
        for _ in range(n_seg - 1)
    ]
    for i, kind in enumerate(draw(st.permutations(kinds_of))):
        seg: dict
        if kind == "line":
            seg = {"line": draw(st.sampled_from(names)), "length": draw(length(50, 4000))}
        elif kind == "via":
            seg = {
                "via": {
                    "barrel": draw(length(5, 120)),
                    "stub": draw(length(1, 60)) if draw(st.booleans()) else "0 mil",
                    "impedance": f"{draw(st.floats(30, 60)):.4g} ohm",
                    "dielectric": draw(st.sampled_from(dielectrics)),
                }
            }
        elif kind == "capacitor":
            seg = {
                "capacitor": {
                    "value": f"{draw(st.floats(1, 1000)):.4g} nF",
                    "esl": f"{draw(ZERO_OR(0.01, 1)):.3g} nH",
                    "esr": f"{draw(ZERO_OR(0.001, 1)):.3g} ohm",
                }
            }
        elif kind == "series":
            seg = {"series": {"resistance": f"{draw(st.floats(0.01, 2)):.3g} ohm"}}
            if draw(st.booleans()):
                seg["series"]["inductance"] = f"{draw(ZERO_OR(0.01, 1)):.3g} nH"
        elif kind == "shunt":
            seg = {"shunt": {"capacitance": f"{draw(st.floats(0.01, 1)):.3g} pF"}}
        else:
            nports = 4 if diff else 2
            fname = f"m{i}.s{nports}p"
            # now and then a file with gain, accepted as it is (no 1e-9 guarantee then)
            as_is = draw(st.integers(0, 5)) == 0
            files[fname] = draw(model_file(nports, float(f[-1]), z0, gain=0.02 if as_is else 0))
            seg = {"touchstone": fname}
            if as_is:
                seg["as_is"] = True
            if diff:
                seg["order"] = "in-in-out-out"
        if draw(st.integers(0, 3)) == 0:
            seg["name"] = draw(NAME_TEXT.filter(lambda s: s.strip()))
        channel.append(seg)
    doc["channel"] = channel
    add_sections(draw, doc, files, f, any("capacitor" in s for s in channel), diff, z0)
    return Case(doc, files, diff, as_is=any(s.get("as_is") for s in channel))


def add_sections(draw, doc: dict, files: dict, f: np.ndarray, dc_block: bool, diff: bool, z0):
    """The optional sections of a valid scenario: [budget], [plots], [time], [compare]."""
    if draw(st.booleans()):
        doc["budget"] = draw(budget_spec(f, dc_block, diff))
    if draw(st.integers(0, 3)) == 0:
        doc["plots"] = draw(plots_spec(f))
    if draw(st.integers(0, 3)) == 0:
        doc["time"] = draw(time_spec(f))
    if draw(st.integers(0, 4)) == 0:
        nports = 4 if diff else 2
        # a measurement: data, not a block (it may hold a little gain and need not cover
        # the sweep)
        fname = f"measured.s{nports}p"
        reach = draw(st.floats(0.3, 1.2)) if f[0] == 0 else draw(st.floats(1.0, 1.2))
        gain = draw(st.sampled_from([0, 0, 1e-3]))
        span = (float(f[0]), float(f[-1]))
        files[fname] = draw(model_file(nports, float(f[-1]) * reach, z0, gain=gain, inside=span))
        compare: dict = {"measured": fname}
        if diff and draw(st.booleans()):
            compare["order"] = draw(st.sampled_from(ORDERS))
        if draw(st.booleans()):
            compare["label"] = draw(NAME_TEXT.filter(lambda s: s.strip()))
        doc["compare"] = compare


def _ghz(x: float) -> str:
    return f"{float(x) / 1e9:.12g} GHz"


@st.composite
def budget_spec(draw, f: np.ndarray, dc_block: bool, differential: bool = False) -> dict:
    """A ``[budget]`` that fits the sweep ``f``: Nyquist and check points, bands, masks,
    the default-band ``min_return_loss``, a fit band or ``fit = false``."""
    budget: dict = {}
    # points read through an unbounded DC point are refused: stay above f[1] then
    # (the first sweep point above DC included: values there are read with DC's weight 0)
    if dc_block and f[0] == 0:
        choices = f[f > f[1]]
    else:
        choices = f
    if choices[choices > 0].size and draw(st.booleans()):
        nyq = float(draw(st.sampled_from(choices[choices > 0])))
        budget["data_rate"] = f"{2 * nyq / 1e9:.12g} Gb/s"
        if draw(st.booleans()):
            budget["max_loss"] = f"{draw(st.floats(0.5, 80)):.3g} dB"
    checks = []
    for _ in range(draw(st.integers(0, 2))):
        if not choices.size:
            break
        c = {"at": _ghz(draw(st.sampled_from(choices)))}
        if draw(st.booleans()):
            c["max_loss"] = f"{draw(st.floats(0.5, 80)):.3g} dB"
        else:
            c["min_return_loss"] = f"{draw(st.floats(1, 30)):.3g} dB"
        checks.append(c)
    if checks:
        budget["check"] = checks
    bands = []
    for _ in range(draw(st.integers(0, 2))):
        i, j = sorted(draw(st.lists(st.integers(0, f.size - 1), min_size=2, max_size=2)))
        band: dict = {"start": _ghz(f[i]), "stop": _ghz(f[j])}
        limits = draw(st.sampled_from(["loss", "return", "both"]))
        if limits != "return":
            band["max_loss"] = f"{draw(st.floats(0.1, 80)):.3g} dB"
        if limits != "loss":
            band["min_return_loss"] = f"{draw(st.floats(1, 30)):.3g} dB"
        if draw(st.booleans()):
            band["name"] = draw(NAME_TEXT.filter(lambda s: s.strip()))
        bands.append(band)
    if bands:
        budget["band"] = bands
    masks = []
    quantities = [q for q, (_, diff) in QUANTITIES.items() if differential or not diff]
    for _ in range(draw(st.integers(0, 2))):
        log_f = f[-1] > 0 and draw(st.booleans())
        pool = f[f > 0] if log_f else f
        if pool.size < 2:
            break
        i, j = sorted(draw(st.lists(st.integers(0, pool.size - 1), min_size=2, max_size=2)))
        if i == j:
            continue
        # corners in between: on the sweep's grid or off it, in whole kHz
        inner = (
            draw(
                st.lists(
                    st.integers(int(pool[i] / 1e3) + 1, max(int(pool[j] / 1e3) - 1, 0)),
                    max_size=2,
                    unique=True,
                )
            )
            if pool[j] - pool[i] > 2e3
            else []
        )
        inner = sorted(1e3 * x for x in inner)
        freqs = [float(pool[i])] + [x for x in inner if pool[i] < x < pool[j]] + [float(pool[j])]
        freqs = [x for k, x in enumerate(freqs) if k == 0 or x > freqs[k - 1] * (1 + 1e-9)]
        if len(freqs) < 2:
            continue
        mask: dict = {
            "quantity": draw(st.sampled_from(quantities)),
            "points": [[_ghz(x), f"{draw(st.floats(0.01, 90)):.4g} dB"] for x in freqs],
        }
        if log_f or draw(st.booleans()):
            mask["interpolation"] = "log-frequency" if log_f else "linear"
        if draw(st.booleans()):
            mask["name"] = draw(NAME_TEXT.filter(lambda s: s.strip()))
        masks.append(mask)
    if masks:
        budget["mask"] = masks
    if draw(st.integers(0, 3)) == 0:
        budget["min_return_loss"] = f"{draw(st.floats(1, 30)):.3g} dB"
    fit = draw(st.sampled_from(["default", "default", "off", "band"]))
    if fit == "off":
        budget["fit"] = False
    elif fit == "band":
        lo = 1 if (dc_block and f[0] == 0) else 0
        if f.size - lo >= 8:  # the four-term fit needs 8 points in its band
            i = draw(st.integers(lo, f.size - 8))
            j = draw(st.integers(i + 7, f.size - 1))
            budget["fit_start"], budget["fit_stop"] = _ghz(f[i]), _ghz(f[j])
    return budget  # may be empty: a [budget] section that judges nothing


@st.composite
def plots_spec(draw, f: np.ndarray) -> dict:
    """A ``[plots]`` section that fits the sweep ``f`` (uniform, at least 2 points)."""
    spec: dict = {}
    step = float(f[1] - f[0])
    if f.size >= 2 and draw(st.booleans()):
        i, j = sorted(
            draw(st.lists(st.integers(0, f.size - 1), min_size=2, max_size=2, unique=True))
        )
        spec["focus"] = [_ghz(f[i]), _ghz(f[j])]
    if draw(st.booleans()):
        lo = draw(st.floats(0, 20))
        spec["loss_range"] = [f"{lo:.3g} dB", f"{lo + draw(st.floats(0.5, 60)):.3g} dB"]
    if draw(st.booleans()):
        spec["auto_focus"] = draw(st.booleans())
    half = (f[-1] - f[0]) / 2
    if half >= step and draw(st.booleans()):
        k = draw(st.integers(1, max(1, int(half // step))))
        spec["delay_aperture"] = f"{k * step / 1e6:.12g} MHz"
    if draw(st.booleans()):
        spec["rf_views"] = draw(st.booleans())
    return spec


@st.composite
def time_spec(draw, f: np.ndarray) -> dict:
    """A ``[time]`` section: a rise time the sweep carries (>= 0.5 / stop), a data rate and
    its modulation."""
    spec: dict = {}
    stop = float(f[-1])
    window = 1.0 / float(f[1] - f[0])  # the time window 1 / step
    if draw(st.booleans()):
        longest = min(20.0 / stop, 0.49 * window)
        if longest > 0.51 / stop:
            rise = draw(st.floats(0.51 / stop, longest))
            spec["rise_time"] = f"{rise * 1e12:.6g} ps"
    if draw(st.booleans()):
        modulation = draw(st.sampled_from(["nrz", "pam4"]))
        lowest = 7.01 * (2 if modulation == "pam4" else 1) / window  # 7 unit intervals
        spec["data_rate"] = f"{max(draw(st.floats(0.05, 2.0)) * stop, lowest) / 1e9:.6g} Gb/s"
        if modulation == "pam4" or draw(st.booleans()):
            spec["modulation"] = modulation
    return spec


# --- breaking a valid scenario -----------------------------------------------------------


def _paths(doc, prefix=()) -> list[tuple]:
    """Every key path of ``doc`` (dict keys and list indices)."""
    out = []
    if isinstance(doc, dict):
        for k, v in doc.items():
            out.append(prefix + (k,))
            out += _paths(v, prefix + (k,))
    elif isinstance(doc, list):
        for i, v in enumerate(doc):
            out += _paths(v, prefix + (i,))
    return out


def _get(doc, path):
    for p in path:
        doc = doc[p]
    return doc


def _leaf_key(path: tuple) -> str:
    """The last named key of a path (list indices skipped)."""
    return next(str(p) for p in reversed(path) if isinstance(p, str))


#: keys whose removal is a "missing" error (the rest have defaults or are optional)
REQUIRED = {
    ("sweep", "start"),
    ("sweep", "stop"),
    ("lines", "*", "kind"),
    ("lines", "*", "dielectric"),
    ("lines", "*", "width"),
    ("lines", "*", "thickness"),
    ("lines", "*", "traces"),
    ("lines", "*", "traces", "*", "name"),
    ("lines", "*", "traces", "*", "width"),
    ("lines", "*", "traces", "*", "gap"),
    ("dielectrics", "*", "dk"),
    ("channel", "*", "length"),
    ("channel", "*", "via", "barrel"),
    ("channel", "*", "via", "impedance"),
    ("channel", "*", "via", "dielectric"),
    ("channel", "*", "via", "from"),
    ("channel", "*", "via", "to"),
    ("channel", "*", "via", "drill"),
    ("channel", "*", "via", "antipad"),
    ("channel", "*", "capacitor", "value"),
    ("channel", "*", "shunt", "capacitance"),
    ("budget", "check", "*", "at"),
    ("budget", "band", "*", "start"),
    ("budget", "band", "*", "stop"),
    ("budget", "mask", "*", "quantity"),
    ("budget", "mask", "*", "points"),
    ("compare", "measured"),
    ("crosstalk", "victim"),
    ("stackup", "layers"),
    ("stackups", "*", "layers"),
    ("stackup", "layers", "*", "name"),
    ("stackups", "*", "layers", "*", "name"),
    ("stackup", "layers", "*", "thickness"),
    ("stackups", "*", "layers", "*", "thickness"),
}
#: keys a stackup supplies to a line on a layer (optional there)
_FROM_LAYER = ("thickness", "dielectric")
#: where a refusal may name another key than the one broken: names referred to elsewhere,
#: and layer properties that a line on the layer or a via through it reports
_ALSO = {
    ("stackup", "layers", "*", "name"): ("layer", "from", "to", "backdrill"),
    ("stackup", "layers", "*", "conductor"): ("layer", "from", "to", "backdrill", "kind"),
    ("stackup", "layers", "*", "thickness"): ("layer", "from", "to", "backdrill", "stub"),
    ("stackup", "layers", "*", "weight"): ("layer", "from", "to", "backdrill", "stub"),
    ("lines", "*", "traces", "*", "name"): ("victim", "aggressors", "traces"),
    ("lines", "*", "traces", "*", "spacing"): ("traces",),
}


def _pattern(path: tuple) -> tuple:
    out = []
    for i, p in enumerate(path):
        parent_is_named = i > 0 and path[i - 1] in ("lines", "dielectrics", "foils", "stackups")
        out.append("*" if isinstance(p, int) or parent_is_named else p)
    return tuple(out)


def _required(doc: dict, path: tuple) -> bool:
    """Whether removing ``path`` must be refused as a missing key."""
    pat = _pattern(path)
    if pat not in REQUIRED:
        return False
    if pat[0] == "lines" and len(pat) == 3 and pat[2] in _FROM_LAYER:
        return "layer" not in _get(doc, path[:2])  # a stackup layer supplies it
    if pat[-1] == "thickness" and "layers" in pat:
        return "conductor" not in _get(doc, path[:-1])  # copper: thickness or weight
    return True


def _also(path: tuple) -> tuple[str, ...]:
    pat = _pattern(path)
    if pat[0] == "stackups":
        pat = ("stackup",) + pat[2:]
    return _ALSO.get(pat, ())


#: the top-level sections a "section" mutation replaces
SECTIONS = (
    "sweep",
    "ports",
    "lines",
    "dielectrics",
    "channel",
    "budget",
    "plots",
    "time",
    "compare",
    "stackup",
    "stackups",
    "crosstalk",
)


@st.composite
def broken_scenario(draw, valid=None) -> Case:
    """A valid scenario (from ``valid``, default :func:`valid_scenario`) with one thing
    broken: a required key removed, a value replaced by a hostile one, an unknown key
    added, or a section of the wrong type."""
    import copy
    import dataclasses

    case = draw(valid if valid is not None else valid_scenario())
    doc = copy.deepcopy(case.doc)
    how = draw(st.sampled_from(["remove", "replace", "replace", "unknown", "section"]))
    paths = _paths(doc)

    def broken(key: str, what: str, also: tuple[str, ...] = ()) -> Case:
        return dataclasses.replace(case, doc=doc, key=key, what=what, also=also)

    if how == "remove":
        required = [p for p in paths if _required(doc, p)]
        if required:
            path = draw(st.sampled_from(required))
            del _get(doc, path[:-1])[path[-1]]
            return broken(_leaf_key(path), "missing")
        how = "replace"
    if how == "replace":
        leaves = [p for p in paths if not isinstance(_get(doc, p), (dict, list))]
        path = draw(st.sampled_from(leaves))
        _get(doc, path[:-1])[path[-1]] = draw(st.one_of(HOSTILE, EXTREME))
        return broken(_leaf_key(path), "replaced", _also(path))
    if how == "unknown":
        tables = [p for p in paths if isinstance(_get(doc, p), dict)]
        path = draw(st.sampled_from(tables)) if tables else ()
        bad = draw(st.sampled_from(["widht", "stpo", "lenght", "refrence", "zz", "Kind"]))
        _get(doc, path)[bad] = "1 mil"
        return broken(bad, "unknown")
    top = draw(st.sampled_from(SECTIONS))
    doc[top] = draw(st.sampled_from([3, "x", [], [1], {}, True]))
    return broken(top, "section")


# --- Touchstone texts ----------------------------------------------------------------------


@dataclass
class TouchstoneCase:
    text: str
    name: str
    valid: bool
    what: str
    needle: str | None = None  # a phrase the refusal must hold


@st.composite
def touchstone_case(draw) -> TouchstoneCase:
    """A valid Touchstone text, or one broken in a way a reader must refuse."""
    nports = draw(st.sampled_from([2, 2, 4]))
    text = draw(model_file(nports, draw(st.floats(1e9, 40e9)), 50.0))
    name = f"part.s{nports}p"
    lines = text.split("\n")
    data = [i for i, ln in enumerate(lines) if ln[:1].isdigit()]
    how = draw(
        st.sampled_from(
            [
                "valid",
                "truncate",
                "nan",
                "inf",
                "huge",
                "reference",
                "decrease",
                "duplicate",
                "ports",
                "count",
                "garbage",
            ]
        )
    )
    if how == "valid":
        return TouchstoneCase(text, name, True, how)
    if how == "truncate":
        cut = draw(st.integers(1, max(1, len(text.rstrip()) - 1)))
        short = text.rstrip()[: len(text.rstrip()) - cut]
        return TouchstoneCase(short + "\n", name, False, how)
    if how in ("nan", "inf", "huge"):
        i = draw(st.sampled_from(data))
        toks = lines[i].split()
        j = draw(st.integers(1 if lines[i][:1].isdigit() else 0, len(toks) - 1))
        toks[j] = {
            "nan": "nan",
            "inf": draw(st.sampled_from(["inf", "-inf", "1e400"])),
            "huge": "1e308",
        }[how]
        lines[i] = " ".join(toks)
        needle = "is not a finite number" if how != "huge" else None
        return TouchstoneCase("\n".join(lines), name, False, how, needle)
    if how == "reference":
        bad = draw(st.sampled_from(["0", "-50", "nan", "0.0"]))
        return TouchstoneCase(text.replace("R 50", f"R {bad}", 1), name, False, how, "reference")
    if how in ("decrease", "duplicate"):
        freq_lines = [i for i in data if _is_row_start(lines, i, nports)]
        if len(freq_lines) < 2:
            return TouchstoneCase(text, name, True, "valid")
        a = draw(st.integers(1, len(freq_lines) - 1))
        prev_f = lines[freq_lines[a - 1]].split()[0]
        toks = lines[freq_lines[a]].split()
        toks[0] = prev_f if how == "duplicate" else repr(float(prev_f) / 2 - 1)
        lines[freq_lines[a]] = " ".join(toks)
        needle = "frequencies must increase" if float(toks[0]) >= 0 else "is negative"
        return TouchstoneCase("\n".join(lines), name, False, how, needle)
    if how == "ports":
        other = draw(st.sampled_from([p for p in (1, 2, 3, 4) if p != nports]))
        return TouchstoneCase(text, f"part.s{other}p", "[Version]" in text, how)
    if how == "count":
        if "[Number of Frequencies]" not in text:
            return TouchstoneCase(text, name, True, "valid")
        n = int(re.search(r"\[Number of Frequencies\] (\d+)", text).group(1))
        m = draw(st.integers(0, 100).filter(lambda k: k != n))
        out = text.replace(f"[Number of Frequencies] {n}", f"[Number of Frequencies] {m}")
        return TouchstoneCase(out, name, False, how, "[Number of Frequencies]")
    i = draw(st.sampled_from(data))
    lines.insert(i + 1, draw(st.sampled_from(["x y z", "1 2 3", "1e9 abc", "#", "[Foo] 1"])))
    return TouchstoneCase("\n".join(lines), name, False, how)


def _is_row_start(lines: list[str], i: int, nports: int) -> bool:
    """Line ``i`` starts a frequency row (the first line of a row holds the frequency)."""
    if nports == 2:
        return True
    n_tokens = 1 + 2 * nports * nports
    count = 0
    for k, ln in enumerate(lines):
        if not ln[:1].isdigit() and ln[:1] != "-":
            continue
        if k == i:
            return count % n_tokens == 0
        count += len(ln.split())
    return False


# --- command options ------------------------------------------------------------------------

LENGTH_OR_HOSTILE = st.one_of(length(1.0, 30.0), length(1.0, 30.0), HOSTILE.map(str))


@st.composite
def line_options(draw) -> list[str]:
    """``losslane line KIND ...`` options: mostly plausible, some hostile."""
    # the kinds with command-line options (groups of traces live in scenario files only)
    on_cli = tuple(
        k for k in registry.kinds() if getattr(registry.model(k, "kind"), "command_line", True)
    )
    kind = draw(st.sampled_from(on_cli + ("coax", "")))
    argv = ["line", kind]
    cls = registry.model(kind, "kind") if kind in registry.kinds() else None
    keys = list(cls.dimensions) if cls else ["width", "height", "thickness"]
    if draw(st.integers(0, 4)) == 0:
        keys.append(draw(st.sampled_from(["gap", "spacing", "below", "plane-thickness"])))
    for key in keys:
        if draw(st.integers(0, 9)) == 0:
            continue  # a missing option
        value = (
            draw(length(*_DIMS.get(key, (1.0, 5.0))))
            if draw(st.integers(0, 2))
            else draw(LENGTH_OR_HOSTILE)
        )
        argv += [f"--{key.replace('_', '-')}", value]
    if draw(st.booleans()):
        argv += ["--dielectric", draw(st.sampled_from([*DIELECTRICS, "nope", ""]))]
    else:
        argv += ["--dk", draw(st.one_of(st.sampled_from(["3.5", "1", "100"]), HOSTILE.map(str)))]
        argv += ["--df", draw(st.sampled_from(["0.01", "0", "0.5", "-1", "1", "nan", "x"]))]
        argv += ["--dk-at", draw(st.sampled_from(["10GHz", "1 GHz", "0Hz", "-1GHz", "x"]))]
    if draw(st.booleans()):
        argv += ["--foil", draw(st.sampled_from([*FOILS, "nope"]))]
    if draw(st.integers(0, 4)) == 0:
        argv += ["--conductivity", draw(st.one_of(st.just("5.8e7"), HOSTILE.map(str)))]
    at = draw(
        st.one_of(
            st.sampled_from(["1GHz", "0Hz,1GHz,10GHz", "1,10,28GHz", "40 GHz", "10THz"]),
            HOSTILE.map(str),
        )
    )
    argv += ["--at", at, "--json"]
    return argv

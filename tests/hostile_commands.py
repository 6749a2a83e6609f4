"""Hypothesis strategies for the hostile-input suite, commands: the options of
``losslane inspect``, ``extract``, ``fit`` and ``sweep`` with the files they read, mostly
plausible, some hostile.

A generated case is a :class:`CommandCase`: the files to write into a scratch directory
(names relative to it), the command's arguments (``{dir}`` stands for that directory) and
the options a refusal may name (the option, or the file by its path). Coupons for
``extract`` and ``fit`` are made-up lossy lines of one cross-section at several lengths
(the textbook line two-port of ``hostile_strategies.lossy_line_s``), sharing one
frequency grid; sweep plans vary a cross-section (on explicit heights or on a stackup
layer) or a scenario (dotted keys), run in-process (``--workers 0``).
"""

from __future__ import annotations

import copy
from dataclasses import dataclass, field

import numpy as np
from hostile_boards import LAMINATES, board, stackup_scenario
from hostile_strategies import (
    _DIMS,
    DIELECTRICS,
    FOILS,
    HOSTILE,
    PAIRS,
    SINGLE,
    _get,
    _leaf_key,
    _paths,
    length,
    line_spec,
    lossy_line_s,
    toml_text,
    touchstone_text,
    valid_scenario,
)
from hypothesis import strategies as st

HOSTILE_TEXT = HOSTILE.map(str)


@dataclass
class CommandCase:
    """A command to run: ``files`` to write first, ``argv`` with ``{dir}`` for the scratch
    directory, and what a refusal may name (``keys``: options, keys or file names).
    ``valid``: the inputs are meant to succeed (exit 0)."""

    argv: list[str]
    files: dict[str, str | bytes] = field(default_factory=dict)
    keys: tuple[str, ...] = ()
    valid: bool = True
    what: str = "valid"
    #: a sweep: the number of cases a valid plan has
    cases: int | None = None
    #: refusals a valid case may still meet, where the data cannot give an answer (the
    #: phrases their messages hold)
    may_refuse: tuple[str, ...] = ()


def _maybe_hostile(draw, good, hostile=HOSTILE_TEXT, odds: int = 6):
    """``good`` most of the time, a hostile text one time in ``odds``."""
    if draw(st.integers(0, odds - 1)) == 0:
        return draw(hostile), False
    return draw(good), True


# --- inspect ---------------------------------------------------------------------------


def one_port_text(f: np.ndarray, s11: np.ndarray, z0: float) -> str:
    out = ["! a made-up reflection", f"# Hz S RI R {z0:g}"]
    out += [
        f"{float(x)!r} {float(v.real)!r} {float(v.imag)!r}" for x, v in zip(f, s11, strict=True)
    ]
    return "\n".join(out) + "\n"


@st.composite
def inspected_file(draw) -> tuple[str, int, np.ndarray]:
    """A valid Touchstone text to inspect: (text, ports, its frequencies). 1-port: the
    reflection of a lossy line; 2- and 4-port: a lossy line, or the two legs of a pair
    (in-in-out-out)."""
    nports = draw(st.sampled_from([1, 2, 2, 4]))
    top = draw(st.sampled_from([5e9, 20e9, 40e9]))
    f = np.linspace(draw(st.sampled_from([0.0, 0.0, 1e7])), top, draw(st.integers(3, 200)))
    line = lossy_line_s(
        f,
        draw(st.floats(35.0, 70.0)),
        50.0,
        draw(st.floats(0.001, 0.1)),
        draw(st.floats(1e-11, 5e-10)),
    )
    if nports == 1:
        return one_port_text(f, line[:, 0, 0] + 0.5 * line[:, 1, 0] ** 2, 50.0), 1, f
    s = line
    if nports == 4:
        s = np.zeros((f.size, 4, 4), dtype=complex)
        for leg in range(2):
            idx = [leg, leg + 2]
            s[np.ix_(range(f.size), idx, idx)] = line
    form = draw(st.sampled_from(["ri", "ma", "db"]))
    return touchstone_text(f, s, form, "Hz", draw(st.sampled_from([1, 2])), 50.0), nports, f


@st.composite
def inspect_case(draw) -> CommandCase:
    """``losslane inspect FILE`` with its options."""
    text, nports, f = draw(inspected_file())
    name = f"part.s{nports}p"
    files = {name: text}
    argv = ["inspect", f"{{dir}}/{name}", "--json"]
    ok = True
    keys = [name]
    if nports == 4 and draw(st.booleans()):
        argv += ["--order", "in-in-out-out"]
    top = float(f[-1])
    window = 1.0 / float(np.median(np.diff(f)))  # the time window 1 / step
    longest = min(10.0 / top, 0.45 * window)
    rises = st.floats(0.75 / top, max(longest, 0.75 / top)).map(lambda t: f"{t * 1e12:.6g}ps")
    modulation = draw(st.sampled_from(["nrz", "pam4"]))
    lowest = 7.1 * (2 if modulation == "pam4" else 1) / window
    rates = st.floats(max(0.1 * top, lowest), max(2.0 * top, lowest)).map(
        lambda r: f"{r / 1e9:.6g}Gb/s"
    )
    for opt, good in (
        ("--rise-time", rises),
        ("--data-rate", rates),
        ("--delay-per-in", st.floats(100.0, 250.0).map(lambda v: f"{v:.4g}ps")),
        ("--z-ref", st.sampled_from(["50ohm", "42.5 ohm", "100ohm"])),
    ):
        if draw(st.booleans()):
            value, fine = _maybe_hostile(draw, good)
            argv += [opt, value]
            keys.append(opt)
            ok = ok and fine
    if "--data-rate" in argv:
        argv += ["--modulation", modulation]
    if draw(st.integers(0, 3)) == 0:
        out, fine = _maybe_hostile(
            draw,
            st.sampled_from(["{dir}/views", "{dir}"]),
            st.sampled_from(["", "{dir}/no/such/dir", f"{{dir}}/{name}/x", "/proc/x", "a\x00b"]),
            odds=3,
        )
        argv += ["--out", out]
        keys.append("--out")
        ok = ok and fine
    return CommandCase(argv, files, tuple(keys), ok, "valid" if ok else "hostile")


# --- coupons: extract and fit ------------------------------------------------------------


@dataclass(frozen=True)
class Line:
    """A made-up uniform line: impedance, attenuation (Np per sqrt(GHz) per inch) and
    delay per inch."""

    zc: float
    alpha: float
    delay: float


def coupon_s(f: np.ndarray, line: Line, inches: float, nports: int, z0: float) -> np.ndarray:
    """S of a coupon of ``inches`` of ``line`` (a pair: two uncoupled legs, numbered
    in-in-out-out)."""
    s2 = lossy_line_s(f, line.zc, z0, line.alpha * inches, line.delay * inches)
    if nports == 2:
        return s2
    s = np.zeros((f.size, 4, 4), dtype=complex)
    for leg in range(2):
        idx = [leg, leg + 2]
        s[np.ix_(range(f.size), idx, idx)] = s2
    return s


@st.composite
def coupons(draw, nports: int | None = None) -> tuple[dict[str, str], list[float], int]:
    """Two or three coupon files of one line at different lengths on one grid: (files,
    lengths in inches, ports)."""
    nports = nports or draw(st.sampled_from([2, 2, 4]))
    line = Line(
        draw(st.floats(42.0, 58.0)), draw(st.floats(0.002, 0.03)), draw(st.floats(140e-12, 190e-12))
    )
    f = np.linspace(1e8, draw(st.sampled_from([10e9, 20e9])), draw(st.integers(40, 160)))
    inches = draw(
        st.lists(
            st.sampled_from([1.0, 2.0, 3.0, 5.0, 6.0, 9.0]), min_size=2, max_size=3, unique=True
        )
    )
    form = draw(st.sampled_from(["ri", "ma", "db"]))
    files = {
        f"c{k}.s{nports}p": touchstone_text(
            f, coupon_s(f, line, x, nports, 50.0), form, "Hz", 1, 50.0
        )
        for k, x in enumerate(inches)
    }
    return files, inches, nports


@st.composite
def lengths_option(draw, inches: list[float]) -> tuple[str, bool]:
    """``--lengths`` for coupons of ``inches``: right, or wrong (count, equal, no unit)."""
    how = draw(
        st.sampled_from(
            ["in"] * 4 + ["mixed"] * 3 + ["mm"] * 3 + ["short", "equal", "bare", "hostile"]
        )
    )
    if how == "in":
        return ",".join(f"{x:g}" for x in inches) + "in", True
    if how == "mixed":
        return ",".join(f"{x:g}in" for x in inches), True
    if how == "mm":
        return ",".join(f"{x * 25.4:g}mm" for x in inches), True
    if how == "short":
        return ",".join(f"{x:g}in" for x in inches[:-1]), False
    if how == "equal":
        return ",".join("2in" for _ in inches), False
    if how == "bare":
        return ",".join(f"{x:g}" for x in inches), False
    return draw(HOSTILE_TEXT), False


@st.composite
def coupon_options(draw, nports: int) -> tuple[list[str], list[str], bool]:
    """The options ``extract`` and ``fit`` share (besides --lengths): (argv, keys, ok)."""
    argv: list[str] = []
    keys: list[str] = []
    ok = True
    if nports == 4 and draw(st.booleans()):
        order = draw(st.sampled_from(["in-in-out-out", "in-in-out-out", "in-out-in-out"]))
        argv += ["--order", order]
        keys.append("--order")
        ok = ok and order == "in-in-out-out"  # how the coupons are numbered
    if draw(st.integers(0, 3)) == 0:
        valid = ["single-ended"] if nports == 2 else ["differential", "common"]
        mode, fine = _maybe_hostile(
            draw, st.sampled_from(valid), st.sampled_from(["single-ended", "differential", "x"]), 2
        )
        fine = mode in valid
        argv += ["--mode", mode]
        keys.append("--mode")
        ok = ok and fine
    for opt, good in (
        ("--noise", st.sampled_from(["1e-3", "0.01", "0"])),
        ("--noise-floor", st.sampled_from(["1e-5", "1e-4"])),
    ):
        if draw(st.integers(0, 3)) == 0:
            value, fine = _maybe_hostile(
                draw, good, st.sampled_from(["nan", "inf", "-1", "x", ""]), 3
            )
            argv += [opt, value]
            keys.append(opt)
            ok = ok and fine
    return argv, keys, ok


@st.composite
def extract_case(draw) -> CommandCase:
    """``losslane extract FILES --lengths ...`` with its options (coupons valid or one of
    them replaced by a wrong file)."""
    files, inches, nports = draw(coupons())
    names = list(files)
    ok = True
    keys = ["--lengths", "FILE", *names]
    broken = draw(st.integers(0, 4)) == 0
    if broken:  # one coupon on another grid, of other ports, or missing
        how = draw(st.sampled_from(["grid", "ports", "missing", "directory"]))
        victim = draw(st.sampled_from(names))
        keys.append(victim)
        if how == "grid":
            f = np.linspace(2e8, 10e9, 33)
            s = coupon_s(f, Line(50, 0.01, 1.6e-10), 4.0, nports, 50.0)
            files[victim] = touchstone_text(f, s, "ri", "Hz", 1, 50.0)
        elif how == "ports":
            other = 4 if nports == 2 else 2
            f = np.linspace(1e8, 10e9, 40)
            del files[victim]
            victim = victim.replace(f"s{nports}p", f"s{other}p")
            names = [victim if n.startswith(victim[:2]) else n for n in names]
            files[victim] = touchstone_text(
                f, coupon_s(f, Line(50, 0.01, 1.6e-10), 4.0, other, 50.0), "ri", "Hz", 1, 50.0
            )
            keys.append(victim)
        elif how == "missing":
            del files[victim]
        else:
            files[victim + "/x"] = "not a coupon"
            del files[victim]
        ok = False
    lengths, fine = draw(lengths_option(inches))
    ok = ok and fine
    argv = ["extract", *[f"{{dir}}/{n}" for n in names], "--lengths", lengths]
    more, more_keys, fine = draw(coupon_options(nports))
    argv += more
    keys += more_keys
    ok = ok and fine
    if draw(st.booleans()):
        at, fine = _maybe_hostile(
            draw,
            st.sampled_from(["1GHz", "1,5GHz", "2 GHz,8GHz"]),
            st.sampled_from(["50GHz", "0Hz", "-1GHz", "x", ""]),
            3,
        )
        argv += ["--at", at]
        keys.append("--at")
        ok = ok and fine
    if draw(st.integers(0, 3)) == 0:
        out, fine = _maybe_hostile(
            draw, st.just("{dir}/ext"), st.sampled_from(["", "{dir}/no/such/x", "/proc/x"]), 3
        )
        argv += ["--out", out]
        keys.append("--out")
        ok = ok and fine
        if draw(st.integers(0, 2)):
            argv.append("--no-plots")
    argv.append("--json")
    return CommandCase(argv, files, tuple(keys), ok, "broken file" if broken else "options")


#: what `fit --vary` may name: the dielectric, the conductivity, and per foil model its
#: roughness parameters
VARY = ["dk", "df", "conductivity"]
FOIL_VARY = {
    "none": [],
    "hammerstad": ["rq"],
    "groiss": ["rq"],
    "huray": ["radius", "surface_ratio"],
}


def _foil_model(name: str | None) -> str:
    from hostile_strategies import LIBRARY

    return "none" if name is None else getattr(LIBRARY.foils[name], "model", "none")


@st.composite
def fit_case(draw) -> CommandCase:
    """``losslane fit FILES --lengths ... KIND ...`` (or ``--scenario --line``): valid, or
    with one thing wrong (an option's value, a parameter the foil does not have, a line
    the scenario does not hold)."""
    files, inches, nports = draw(coupons())
    names = list(files)
    broken = draw(st.integers(0, 2)) == 0
    fault = draw(st.sampled_from(["lengths", "vary", "band", "line", "names", "noise", "out"]))
    fault = fault if broken else None
    if fault == "lengths":
        lengths, _ = draw(lengths_option(inches).filter(lambda x: not x[1]))
    else:
        lengths = ",".join(f"{x:g}" for x in inches) + "in"
    keys = ["--lengths", "FILE", "KIND", "--vary", "--foil", "--foil-model", *names]
    argv = ["fit", *[f"{{dir}}/{n}" for n in names], "--lengths", lengths]
    kind = draw(st.sampled_from(SINGLE if nports == 2 else PAIRS))
    foils = [f for f in FOILS if _foil_model(f) != "graded"]  # a graded foil is not fitted
    spec = draw(line_spec(kind, DIELECTRICS, foils))
    if fault == "line" or draw(st.integers(0, 3)) == 0:  # the line of a scenario
        doc = {
            "sweep": {"start": "0 Hz", "stop": "1 GHz", "points": 3},
            "lines": {"coupon": spec},
            "channel": [{"line": "coupon", "length": "1 in"}],
        }
        files["coupon.toml"] = toml_text(doc)
        line = "nope" if fault == "line" else "coupon"
        argv += ["--scenario", "{dir}/coupon.toml", "--line", line]
        keys += ["--scenario", "--line", "coupon.toml"]
    else:
        argv.append(kind)
        for key in registry_dimensions(kind):
            argv += [f"--{key}", spec[key]]
        argv += ["--dielectric", spec["dielectric"]]
        if "foil" in spec:
            argv += ["--foil", spec["foil"]]
        if "conductivity" in spec:
            argv += ["--conductivity", spec["conductivity"]]
    model = _foil_model(spec.get("foil"))
    if draw(st.integers(0, 3)) == 0:  # another roughness model, its parameters varied
        model = draw(st.sampled_from(["hammerstad", "groiss", "huray"]))
        argv += ["--foil-model", model]
    pool = VARY + FOIL_VARY[model]
    vary = draw(st.lists(st.sampled_from(pool), min_size=1, max_size=3, unique=True))
    if model != _foil_model(spec.get("foil")) and not set(FOIL_VARY[model]) & set(vary):
        vary.append(FOIL_VARY[model][0])
    if fault == "vary":
        others = [p for v in FOIL_VARY.values() for p in v if p not in FOIL_VARY[model]]
        vary.append(draw(st.sampled_from(["width", "x", "", *others])))
    argv += ["--vary", ",".join(vary)]
    if fault == "band" or draw(st.integers(0, 3)) == 0:
        good = st.sampled_from(["1GHz,8GHz", "0.5GHz,9GHz"])
        bad = st.sampled_from(["8GHz,1GHz", "0Hz,1GHz", "50GHz,60GHz", "1GHz", "x,y"])
        argv += ["--band", draw(bad if fault == "band" else good)]
        keys.append("--band")
    if fault in ("names", "out") or draw(st.integers(0, 3)) == 0:
        lib = "{dir}/fitted.toml"
        if fault == "out":
            lib = draw(st.sampled_from(["{dir}/no/such/x.toml", "{dir}", ""]))
        argv += ["--write-library", lib]
        keys.append("--write-library")
        if fault == "names" or draw(st.booleans()):
            bad = st.sampled_from(["a,b,c", ",", ""])
            argv += [
                "--names",
                draw(bad if fault == "names" else st.sampled_from(["lam,cu", "lam"])),
            ]
            keys.append("--names")
    if fault == "noise":
        opt = draw(st.sampled_from(["--noise", "--noise-floor"]))
        argv += [opt, draw(st.sampled_from(["nan", "inf", "-1", "x", ""]))]
        keys.append(opt)
    elif draw(st.integers(0, 3)) == 0:
        argv += ["--noise", draw(st.sampled_from(["1e-3", "0.01"]))]
    argv.append("--json")
    # coupons whose lengths differ too little for their loss: every point flagged
    data = ("the extraction's usable band holds",)
    return CommandCase(argv, files, tuple(keys), fault is None, fault or "valid", may_refuse=data)


def registry_dimensions(kind: str) -> tuple[str, ...]:
    from losslane.xsection import registry

    return registry.model(kind, "kind").dimensions


# --- sweep plans -------------------------------------------------------------------------


def _values(draw, key: str, count: int) -> list[str]:
    lo, hi = _DIMS.get(key, (1.0, 10.0))
    return draw(st.lists(length(lo, hi), min_size=count, max_size=count, unique=True))


@st.composite
def section_plan(draw) -> tuple[dict, dict[str, str | bytes], int]:
    """A plan over a cross-section with explicit heights: (plan, files, cases)."""
    kind = draw(st.sampled_from(SINGLE + PAIRS))
    base = draw(line_spec(kind, DIELECTRICS, FOILS))
    dims = list(registry_dimensions(kind))
    varied = draw(
        st.lists(
            st.sampled_from(dims + ["dielectric", "foil"]), min_size=1, max_size=3, unique=True
        )
    )
    vary: dict = {}
    sizes = []
    for key in varied:
        n = draw(st.integers(1, 3))
        if key == "dielectric":
            vary[key] = draw(
                st.lists(st.sampled_from(LAMINATES), min_size=n, max_size=n, unique=True)
            )
        elif key == "foil":
            vary[key] = draw(st.lists(st.sampled_from(FOILS), min_size=n, max_size=n, unique=True))
        elif key == "thickness" and "gap" in base:
            vary[key] = [base[key]]  # the coplanar gap bounds it (see line_spec)
        elif draw(st.integers(0, 2)) == 0:
            lo, hi = _DIMS[key]
            a = draw(st.floats(lo, (lo + hi) / 2))
            b = draw(st.floats(a + 0.5, hi))
            vary[key] = {
                "start": f"{a:.4g} mil",
                "stop": f"{b:.4g} mil",
                "points": draw(st.integers(2, 3)),
            }
        else:
            vary[key] = _values(draw, key, n)
        sizes.append(len(vary[key]) if isinstance(vary[key], list) else vary[key]["points"])
    plan: dict = {
        "name": draw(st.sampled_from(["table", "a sweep", "x"])),
        "base": base,
        "vary": vary,
    }
    plan["results"] = {
        "at": draw(
            st.lists(
                st.sampled_from(["1 GHz", "10 GHz", "28 GHz", "0 Hz"]),
                min_size=1,
                max_size=3,
                unique=True,
            )
        )
    }
    cases = int(np.prod(sizes))
    lists = [k for k, v in vary.items() if isinstance(v, list)]
    if len(lists) >= 2 and draw(st.booleans()):
        a, b = lists[:2]
        m = min(len(vary[a]), len(vary[b]))
        vary[a], vary[b] = vary[a][:m], vary[b][:m]
        plan["together"] = [[a, b]]
        cases = int(
            np.prod(
                [len(v) if isinstance(v, list) else v["points"] for k, v in vary.items() if k != b]
            )
        )
    random_key = next((k for k in dims if k not in vary and k != "thickness"), None)
    if random_key and draw(st.integers(0, 3)) == 0:
        vary[random_key] = {
            "nominal": base[random_key],
            "tolerance": "5%",
            "distribution": draw(st.sampled_from(["normal", "uniform"])),
        }
        plan["samples"] = draw(st.integers(1, 3))
        plan["seed"] = draw(st.integers(0, 100))
        cases *= plan["samples"]
    if draw(st.booleans()):
        plan["results"]["rank"] = f"z0_ohm_{plan['results']['at'][0].replace(' ', '')}"
    return plan, {}, cases


@st.composite
def layer_plan(draw) -> tuple[dict, dict[str, str | bytes], int]:
    """A plan over lines on the layers of the plan's own stackup."""
    b = draw(board())
    spots = [(i, b.place(i)) for i in b.signals]
    spots = [(b.layers[i]["name"], p[0]) for i, p in spots if p is not None]
    if not spots:
        return draw(section_plan())
    chosen = draw(st.lists(st.sampled_from(spots), min_size=1, max_size=3, unique=True))
    kinds = ["microstrip" if where == "outer" else "stripline" for _, where in chosen]
    base = {"kind": kinds[0], "layer": chosen[0][0], "width": draw(length(3.0, 10.0))}
    if draw(st.booleans()):  # every case field-solved, at the coarsest accuracy
        base.update(solver="field", accuracy="coarse")
    vary: dict = {"layer": [n for n, _ in chosen], "kind": kinds}
    widths = _values(draw, "width", draw(st.integers(1, 2)))
    vary["width"] = widths
    plan = {
        "name": "layers",
        "stackup": {"layers": b.layers},
        "base": base,
        "vary": vary,
        "together": [["layer", "kind"]],
        "results": {"at": ["1 GHz", "10 GHz"]},
    }
    return plan, {}, len(chosen) * len(widths)


@st.composite
def scenario_plan(draw) -> tuple[dict, dict[str, str | bytes], int]:
    """A plan over a scenario: dotted keys into its lines, segments and budget."""
    case = draw(st.one_of(valid_scenario(), stackup_scenario()))
    files = dict(case.files)
    doc = case.doc
    files["lane.toml"] = toml_text(doc)
    choices: list[tuple[str, list[str]]] = []
    for i, seg in enumerate(doc["channel"], start=1):
        if "length" in seg:
            choices.append((f"channel.{i}.length", ["1 in", "2.5 in", "0.5 in"]))
        if "via" in seg and "stub" in seg["via"] and "barrel" in seg["via"]:
            choices.append((f"channel.{i}.via.stub", ["0 mil", "10 mil", "30 mil"]))
    for name, spec in doc["lines"].items():
        if "width" in spec:
            lo, hi = (3.0, 12.0)
            choices.append(
                (f"lines.{name}.width", [f"{lo + k * (hi - lo) / 3:.3g} mil" for k in range(3)])
            )
    if not choices:
        choices.append(("channel.1.name", ["a", "b"]))
    picked = draw(
        st.lists(st.sampled_from(choices), min_size=1, max_size=2, unique_by=lambda c: c[0])
    )
    vary = {}
    sizes = []
    for key, values in picked:
        n = draw(st.integers(1, 2))
        vary[key] = values[:n]
        sizes.append(n)
    plan: dict = {"name": "lane cases", "scenario": "lane.toml", "vary": vary}
    if draw(st.integers(0, 3)) == 0:
        plan["results"] = {"touchstone": True}
    return plan, files, int(np.prod(sizes))


@st.composite
def sweep_case(draw) -> CommandCase:
    """``losslane sweep PLAN --workers 0`` of a valid plan."""
    plan, files, cases = draw(
        st.one_of(section_plan(), section_plan(), layer_plan(), scenario_plan())
    )
    files = dict(files)
    files["plan.toml"] = toml_text(plan)
    out = draw(st.sampled_from(["table.parquet", "table.csv"]))
    argv = ["sweep", "{dir}/plan.toml", "--workers", "0", "--out", f"{{dir}}/{out}", "--json"]
    if draw(st.integers(0, 2)):
        argv.append("--no-plots")
    return CommandCase(argv, files, ("plan",), True, "valid", cases=cases)


#: plan keys whose removal is a "missing" error
PLAN_REQUIRED = {("vary",), ("base", "kind"), ("results", "at")}


@st.composite
def broken_sweep_case(draw) -> CommandCase:
    """A valid sweep plan with one thing broken (a required key removed, a value replaced
    by a hostile one, an unknown key, a section of the wrong type), or a bad option."""
    from hostile_strategies import EXTREME

    plan, files, cases = draw(st.one_of(section_plan(), layer_plan(), scenario_plan()))
    plan = copy.deepcopy(plan)
    how = draw(st.sampled_from(["remove", "replace", "replace", "unknown", "section", "option"]))
    paths = _paths(plan)
    key = "plan"
    out = "{dir}/table.parquet"
    workers = "0"
    if how == "remove":
        required = [p for p in paths if p in PLAN_REQUIRED]
        if required:
            path = draw(st.sampled_from(required))
            del _get(plan, path[:-1])[path[-1]]
            key = _leaf_key(path)
        else:
            how = "replace"
    if how == "replace":
        leaves = [p for p in paths if not isinstance(_get(plan, p), (dict, list))]
        leaves += [p for p in paths if isinstance(_get(plan, p), list)]
        path = draw(st.sampled_from(leaves))
        _get(plan, path[:-1])[path[-1]] = draw(
            st.one_of(
                HOSTILE,
                EXTREME,
                st.sampled_from(
                    [["1 mil", 3], [[1]], [{}], {"start": "1 mil"}, {"nominal": "x"}, ["nope"]]
                ),
            )
        )
        key = _leaf_key(path)
    elif how == "unknown":
        tables = [p for p in paths if isinstance(_get(plan, p), dict)] + [()]
        path = draw(st.sampled_from(tables))
        bad = draw(st.sampled_from(["widht", "zz", "Kind", "resluts"]))
        _get(plan, path)[bad] = "1 mil"
        key = bad
    elif how == "section":
        key = draw(
            st.sampled_from(
                [
                    "vary",
                    "results",
                    "base",
                    "together",
                    "library",
                    "stackup",
                    "samples",
                    "seed",
                    "combine",
                    "chunk",
                    "workers",
                    "scheduler",
                ]
            )
        )
        plan[key] = draw(st.sampled_from([3, "x", [], [1], {}, True, -1]))
    elif how == "option":
        which = draw(st.sampled_from(["out", "workers"]))
        key = f"--{which}"
        if which == "out":
            out = draw(
                st.sampled_from(["{dir}/t.txt", "{dir}/no/such/t.csv", "", "{dir}", "/proc/t.csv"])
            )
        else:
            workers = draw(st.sampled_from(["-1", "x", "1.5"]))
    files = dict(files)
    files["plan.toml"] = toml_text(plan)
    argv = ["sweep", "{dir}/plan.toml", "--workers", workers, "--out", out, "--json", "--no-plots"]
    keys = (key, key.rstrip("s")) if key.endswith("s") else (key,)  # "layers": "layer #2"
    return CommandCase(argv, files, keys, False, how)

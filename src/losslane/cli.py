"""The `losslane` command line: parse, call the library, print. Nothing here computes.

Heavy modules (numpy, scipy, scikit-rf, matplotlib) are imported inside the commands so
that ``losslane --help`` starts fast.
"""

from __future__ import annotations

import contextlib
import sys
import warnings
from collections.abc import Iterator

import click

from losslane import __version__
from losslane.errors import LossLaneError, LossLaneWarning


@contextlib.contextmanager
def _warnings_to_stderr() -> Iterator[None]:
    """Show each model warning once on stderr, after the command's output."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", LossLaneWarning)
        try:
            yield
        finally:
            seen: set[str] = set()
            for w in caught:
                if issubclass(w.category, LossLaneWarning):
                    msg = str(w.message)
                    if msg not in seen:
                        seen.add(msg)
                        click.echo(f"warning: {msg}", err=True)


@click.group(context_settings={"help_option_names": ["-h", "--help"], "max_content_width": 100})
@click.version_option(__version__, prog_name="losslane")
def cli() -> None:
    """Loss, impedance and S-parameters of printed-board interconnect.

    Results are estimates from published models: confirm them against the fabricator's
    stackup and measured test coupons.
    """


def _options(*decorators):
    """One decorator applying ``decorators`` so that they show in --help in the order given."""

    def apply(func):
        for decorate in reversed(decorators):
            func = decorate(func)
        return func

    return apply


_JSON_OPTION = click.option(
    "--json", "as_json", is_flag=True, help="print one JSON object instead of tables"
)
_LIBRARY_OPTION = click.option(
    "--library",
    "library_files",
    multiple=True,
    metavar="FILE",
    help="extra library file(s) with [dielectrics.*] / [foils.*] entries",
)
_SOLVER_OPTION = click.option(
    "--solver",
    type=click.Choice(["closed-form", "field"]),
    default="closed-form",
    show_default=True,
    help="closed-form models or the 2-D field solver",
)
_NO_PLOTS_OPTION = click.option("--no-plots", is_flag=True, help="skip the PNG plots")


def _at_option(help: str, default: str = "1GHz,10GHz,28GHz", metavar: str = "FREQS"):
    return click.option(
        "--at", "at", default=default, show_default=True, metavar=metavar, help=help
    )


def _plot_options(default: str, help: str, no_plot_help: str):
    """--plot FILE (a chart written by default) and --no-plot."""
    return _options(
        click.option(
            "--plot", "plot", default=default, show_default=True, metavar="FILE", help=help
        ),
        click.option("--no-plot", is_flag=True, help=no_plot_help),
    )


LENGTH_OPTIONS = (
    "width",
    "thickness",
    "height",
    "below",
    "above",
    "gap",
    "spacing",
    "plane_thickness",
)


_geometry_options = _options(
    *(
        click.option(
            f"--{name.replace('_', '-')}",
            name,
            metavar="LENGTH",
            help=f"{name.replace('_', ' ')} with a unit, e.g. 5mil, 0.127mm",
        )
        for name in LENGTH_OPTIONS
    )
)


_material_options = _options(
    click.option("--dk", type=float, help="relative permittivity of the dielectric"),
    click.option("--df", type=float, help="loss tangent of the dielectric (default 0)"),
    click.option("--dk-at", metavar="FREQ", help="frequency of the --dk/--df values"),
    click.option(
        "--dielectric-model",
        type=click.Choice(["wideband-debye", "constant"]),
        default="wideband-debye",
        show_default=True,
        help="causal wideband Debye fit, or constant (non-causal)",
    ),
    click.option(
        "--dielectric",
        "dielectric_name",
        metavar="NAME",
        help="a dielectric from the library (see `losslane materials`)",
    ),
    click.option("--foil", metavar="NAME", help="a copper foil from the library"),
    click.option(
        "--roughness-model",
        type=click.Choice(["none", "hammerstad", "groiss"]),
        help="roughness model with --rq, instead of --foil",
    ),
    click.option("--rq", metavar="LENGTH", help="RMS roughness for --roughness-model"),
    click.option(
        "--conductivity",
        metavar="S/m",
        help="conductor conductivity (default copper, 5.8e7 S/m)",
    ),
    _LIBRARY_OPTION,
)


#: what every line-family command takes to describe the cross-section
_section_options = _options(_geometry_options, _material_options, _SOLVER_OPTION)

#: field-solver options of `losslane line`: the scenario keys of the same names
#: (``fieldsolve.keys.EXTRA_KEYS``), and --plot
_field_options = _options(
    click.option(
        "--top-width",
        "top_width",
        metavar="LENGTH",
        help="field solver: top width of an etched trace (width is the base)",
    ),
    click.option(
        "--etch-factor",
        "etch_factor",
        type=float,
        help="field solver: 2 x thickness / (width - top width)",
    ),
    click.option(
        "--coating-thickness",
        "coating_thickness",
        metavar="LENGTH",
        help="field solver: solder-mask thickness over the outer layer",
    ),
    click.option(
        "--coating-dielectric",
        "coating_dielectric",
        metavar="NAME",
        help="field solver: the coating's dielectric (e.g. solder-mask)",
    ),
    click.option(
        "--dielectric-above",
        "dielectric_above",
        metavar="NAME",
        help="field solver: stripline prepreg above the trace, if not --dielectric",
    ),
    click.option(
        "--accuracy",
        type=click.Choice(["coarse", "normal", "fine"]),
        help="field solver: mesh setting (default normal)",
    ),
    click.option(
        "--plot",
        "plot",
        metavar="FILE",
        help="field solver: draw the cross-section and its field (.png/.svg/.pdf)",
    ),
)


def line_spec(kind: str, options: dict, where) -> dict:
    """Scenario-style spec from the `line`-family options (shared by size/compare/spread)."""
    from losslane.materials.dielectric import make_dielectric
    from losslane.materials.library import foil_from_spec
    from losslane.units import parse_frequency
    from losslane.xsection.fieldsolve.keys import EXTRA_KEYS

    spec: dict = {"kind": kind}
    for name in LENGTH_OPTIONS:
        if options.get(name) is not None:
            spec[name] = options[name]
    dk, name = options.get("dk"), options.get("dielectric_name")
    if dk is not None and name is not None:
        raise LossLaneError("give either --dielectric NAME or --dk/--df/--dk-at, not both")
    if dk is None and name is None:
        raise LossLaneError(
            "missing dielectric: give --dk (with --df and --dk-at) or "
            "--dielectric NAME (see `losslane materials`)"
        )
    if dk is not None:
        df = options.get("df") or 0.0
        if not dk >= 1.0:
            raise LossLaneError(
                f"--dk = {dk!r}: a relative permittivity is >= 1 (air 1, board laminates 2.5..5)"
            )
        if not 0.0 <= df < 1.0:
            raise LossLaneError(
                f"--df = {df!r}: a loss tangent lies in 0 <= df < 1 (laminates 0.001..0.03)"
            )
        model = options.get("dielectric_model", "wideband-debye")
        at = options.get("dk_at")
        if at is None and model == "wideband-debye":
            raise LossLaneError(
                "--dk-at is missing: the frequency at which --dk/--df hold "
                "(e.g. 10GHz); or use --dielectric-model constant"
            )
        spec["dielectric"] = make_dielectric(
            dk,
            options.get("df") or 0.0,
            parse_frequency(at, "--dk-at") if at else None,
            model,
            "dielectric",
        )
    else:
        spec["dielectric"] = name
        if options.get("df") is not None or options.get("dk_at") is not None:
            raise LossLaneError("--df/--dk-at go with --dk, not with --dielectric NAME")
    rmodel, rq, foil = options.get("roughness_model"), options.get("rq"), options.get("foil")
    if foil is not None and rmodel is not None:
        raise LossLaneError("give either --foil NAME or --roughness-model/--rq, not both")
    if rmodel is not None:
        fs = {"model": rmodel}
        if rq is not None:
            fs["rq"] = rq
        elif rmodel != "none":
            raise LossLaneError(f"--roughness-model {rmodel} needs --rq (e.g. 0.5um)")
        spec["foil"] = foil_from_spec(rmodel, fs, where)
    elif rq is not None:
        raise LossLaneError("--rq needs --roughness-model hammerstad or groiss")
    elif foil is not None:
        spec["foil"] = foil
    if options.get("conductivity") is not None:
        spec["conductivity"] = options["conductivity"]
    if options.get("solver") is not None:
        spec["solver"] = options["solver"]
    for name in EXTRA_KEYS:
        if options.get(name) is not None:
            spec[name] = options[name]
    return spec


def _library(options: dict):
    """The material library with the --library files (taken out of ``options``)."""
    from losslane.materials.library import load_library

    return load_library(options.pop("library_files"))


def _line_section(kind: str, options: dict, where, lib):
    """The cross-section the line-family options describe, names resolved in ``lib``."""
    from losslane.xsection.factory import section_from_spec

    return section_from_spec(line_spec(kind, options, where), where, lib.dielectric, lib.foil)


def _echo(out: dict, as_json: bool, table) -> None:
    """``out`` as one JSON object on stdout, or the text ``table(out)``."""
    import json

    click.echo(json.dumps(out) if as_json else table(out))


@cli.command("line")
@click.argument("kind")
@_section_options
@_at_option("frequencies, comma-separated (e.g. 1GHz,10GHz or 1,10,28GHz)")
@_JSON_OPTION
@_field_options
def line_command(kind: str, at: str, as_json: bool, plot: str | None = None, **options) -> None:
    """Impedance, delay, loss per inch and RLGC of one cross-section.

    KIND is microstrip, stripline, cpw, gcpw, microstrip-pair or stripline-pair.
    """
    from losslane.report.tables import line_table
    from losslane.spec import cli_where
    from losslane.units import parse_frequency_list
    from losslane.xsection.factory import section_from_spec

    where = cli_where("losslane line")
    with _warnings_to_stderr():
        lib = _library(options)
        spec = line_spec(kind, options, where)
        freqs = parse_frequency_list(at, "--at")
        section = section_from_spec(spec, where, lib.dielectric, lib.foil)
        props = section.properties(freqs)
        if plot is not None:
            from losslane.report.section_plot import plot_section

            plot_section(section, plot, "--plot")
        _echo(props, as_json, lambda p: line_table(p, describe(section)))


def describe(section) -> str:
    """One heading line naming the cross-section, its geometry and materials."""
    parts = [_stackup(section)]
    d = section.dielectric
    if d.model == "constant":
        parts.append(f"Dk {d.dk:g} Df {d.df:g} (constant, non-causal)")
    else:
        parts.append(f"Dk {d.dk:g} Df {d.df:g} at {d.at / 1e9:g} GHz (wideband Debye)")
    metal = getattr(section, "metal", None)
    if metal is not None:
        parts.append(f"foil {metal.foil.model}")
    report = getattr(section, "solver_report", None)
    if report is not None:
        est = report()["error_estimate"].get("z0")
        parts.append(
            f"field solver ({section.accuracy}"
            + ("" if est is None else f", estimated error of Z0 {100 * est:.2g} %")
            + ")"
        )
    return ", ".join(parts)


# --- design helpers: size, compare, spread, materials --------------------------------------


def _placeholder(options: dict, key: str, command: str) -> None:
    """Fill the dimension a design command solves for; the user must not give it."""
    if options.get(key) is not None:
        raise LossLaneError(
            f"--{key} is what `{command}` solves for; leave it out"
            + (" (or solve the other dimension with --vary)" if key in ("width", "spacing") else "")
        )
    # any length the model accepts: it only seeds the section and is replaced by the solution
    options[key] = options.get("height") or options.get("below") or options.get("gap") or "5mil"


def _names(value: str, key: str) -> list[str]:
    names = [s.strip() for s in value.split(",")]
    if not value.strip() or any(not s for s in names):
        raise LossLaneError(
            f"{key} = {value!r}: expected comma-separated names, e.g. low-loss,very-low-loss"
        )
    return list(dict.fromkeys(names))


def _stackup(section, skip: tuple[str, ...] = ()) -> str:
    """The kind and the input dimensions in mil: a closed-form model's fields or a field-
    solved section's labels, not a derived value such as a stripline's plane spacing."""
    from losslane.units import MIL
    from losslane.xsection.batch import nominal_geometry

    given = {**nominal_geometry(section), **dict(getattr(section, "labels", ()))}
    parts = [section.kind]
    for key in ("width", "spacing", "gap", "height", "below", "above", "thickness"):
        if key in given and key not in skip:
            parts.append(f"{key} {given[key] / MIL:.4g} mil")
    return ", ".join(parts)


#: spread shows a progress bar above this many sample-frequency evaluations (about 1.5 s
#: of the vectorized models; the per-sample path counts 10 000 per sample)
PROGRESS_WORK = 1_000_000


def _progress(samples: int, work: int):
    """A stderr progress bar for long runs (never on stdout), else a no-op context."""
    if work < PROGRESS_WORK:
        return contextlib.nullcontext(None)
    return click.progressbar(length=samples, label="sampling", file=sys.stderr)


@cli.command("size")
@click.argument("kind")
@click.option(
    "--target",
    required=True,
    metavar="OHMS",
    help="target impedance: Z0 of a single line, Z_diff of a pair (50ohm or 50)",
)
@click.option(
    "--vary",
    type=click.Choice(["width", "spacing"]),
    default="width",
    show_default=True,
    help="the dimension solved (spacing: pairs, at the given "
    "--width; width of a pair: at the given --spacing)",
)
@_at_option("frequency at which the target impedance holds", default="1GHz", metavar="FREQ")
@click.option(
    "--loss-at",
    metavar="FREQS",
    help="frequencies of the reported loss per inch (default: the --at frequency)",
)
@_section_options
@_JSON_OPTION
def size_command(
    kind: str, target: str, vary: str, at: str, loss_at: str | None, as_json: bool, **options
) -> None:
    """Trace width (or pair spacing) for a target impedance.

    The impedance is the one `losslane line` reports (Z0, or Z_diff of a pair) at --at,
    1 GHz unless given. Prints the solved dimension, the achieved impedance, its
    sensitivity to width, dielectric height and Dk, and the loss per inch. A target the
    model cannot reach inside its validity range is an error that says which way to move.
    """
    from losslane.design.sizing import parse_target, size
    from losslane.report.design_tables import size_table
    from losslane.spec import cli_where
    from losslane.units import parse_frequency, parse_frequency_list
    from losslane.xsection.factory import KINDS

    where = cli_where("losslane size")
    with _warnings_to_stderr():
        z = parse_target(target)
        f0 = parse_frequency(at, "--at")
        floss = parse_frequency_list(loss_at, "--loss-at") if loss_at else None
        lib = _library(options)
        ks = KINDS.get(kind)
        if ks is not None and vary not in ks.required + ks.optional:
            raise LossLaneError(
                f"--vary {vary}: {kind} has no {vary}; the spacing is solved "
                "only for pairs (microstrip-pair, stripline-pair)"
            )
        _placeholder(options, vary, "losslane size")
        section = _line_section(kind, options, where, lib)
        solved = size(section, z, at=f0, vary=vary, loss_at=floss)
        _echo(
            solved.to_json(),
            as_json,
            lambda r: size_table(r, describe_solved(solved.section, vary)),
        )


def describe_solved(section, vary: str) -> str:
    """The ``describe`` heading with the solved dimension marked."""
    parts = describe(section).split(", ")
    return ", ".join(p + " (solved)" if p.startswith(vary + " ") else p for p in parts)


@cli.command("compare")
@click.argument("kind")
@click.option(
    "--materials",
    required=True,
    metavar="A,B,...",
    help="dielectrics from the library to compare (see `losslane materials`)",
)
@click.option(
    "--foils", metavar="X,Y,...", help="foils to compare (default: --foil, or smooth copper)"
)
@click.option(
    "--target",
    required=True,
    metavar="OHMS",
    help="every candidate is re-sized to this impedance (Z0, or Z_diff of a pair)",
)
@_at_option("frequencies of the loss table")
@click.option(
    "--size-at",
    default="1GHz",
    show_default=True,
    metavar="FREQ",
    help="frequency at which the target impedance holds",
)
@_plot_options(
    "losslane-compare.png", "chart of dB/in against frequency (PNG)", "do not write the chart"
)
@_section_options
@_JSON_OPTION
def compare_command(
    kind: str,
    materials: str,
    foils: str | None,
    target: str,
    at: str,
    size_at: str,
    plot: str,
    no_plot: bool,
    as_json: bool,
    **options,
) -> None:
    """Compare dielectrics and foils at equal impedance.

    Each material x foil is re-sized to --target (a lower-Dk laminate gets a wider
    trace), then its loss per inch at --at is split into conductor and dielectric parts.
    Rows are sorted by loss at the highest frequency, lowest first; the chart shows dB/in
    against frequency for every candidate.
    """
    from losslane.design.compare import compare
    from losslane.design.sizing import parse_target
    from losslane.report.design_tables import compare_table
    from losslane.report.plots import loss_comparison_chart
    from losslane.spec import cli_where
    from losslane.units import parse_frequency, parse_frequency_list

    where = cli_where("losslane compare")
    with _warnings_to_stderr():
        z = parse_target(target)
        freqs = parse_frequency_list(at, "--at")
        f0 = parse_frequency(size_at, "--size-at")
        lib = _library(options)
        if options.get("dk") is not None or options.get("dielectric_name") is not None:
            raise LossLaneError(
                "compare takes its dielectrics from --materials; leave out "
                "--dk/--dielectric (add your own with --library FILE)"
            )
        mats = {n: lib.dielectric(n, "--materials") for n in _names(materials, "--materials")}
        options["dielectric_name"] = next(iter(mats))
        _placeholder(options, "width", "losslane compare")
        section = _line_section(kind, options, where, lib)
        if foils is not None:
            if options.get("foil") or options.get("roughness_model"):
                raise LossLaneError("give either --foils X,Y or --foil/--roughness-model")
            foil_map = {n: lib.foil(n, "--foils") for n in _names(foils, "--foils")}
        else:
            label = options.get("foil") or (
                f"{options['roughness_model']} {options.get('rq') or ''}".strip()
                if options.get("roughness_model")
                else "smooth"
            )
            foil_map = {label: section.metal.foil}
        result = compare(section, mats, foil_map, z, freqs, size_at=f0)
        out = result.to_json()
        if not no_plot:
            what = "Z_diff" if out["impedance"] == "z_diff" else "Z0"
            title = (
                f"{_stackup(section, ('width',))}; each re-sized to {what} = {z:g} ohm "
                f"at {f0 / 1e9:g} GHz"
            )
            curves = [
                (
                    f"{c.material} / {c.foil} (w {c.section.width / 25.4e-6:.3g} mil)",
                    c.curve_f,
                    c.curve_db_per_in,
                )
                for c in result.candidates
            ]
            out["plot"] = str(
                loss_comparison_chart(
                    curves,
                    plot,
                    title,
                    freqs,
                    [c.material for c in result.candidates],
                    [c.foil for c in result.candidates],
                )
            )
        _echo(out, as_json, lambda o: compare_table(o, _stackup(section, ("width",))))


_TOL_KEYS = ("width", "height", "below", "above", "thickness", "gap", "spacing", "dk")


_tolerance_options = _options(
    *(
        click.option(
            f"--{key}-tol",
            f"{key}_tol",
            metavar="TOL",
            help="+/- Dk deviation, e.g. 0.1 or 3%"
            if key == "dk"
            else f"+/- {key} tolerance, a length (0.5mil) or a percentage (10%)",
        )
        for key in _TOL_KEYS
    )
)


@cli.command("spread")
@click.argument("kind")
@_tolerance_options
@click.option(
    "--distribution",
    type=click.Choice(["normal", "uniform"]),
    default="normal",
    show_default=True,
    help="normal: each +/- tolerance is 3 sigma; uniform: samples fill the +/- interval evenly",
)
@click.option("--samples", type=int, default=10000, show_default=True, help="Monte Carlo samples")
@click.option(
    "--seed",
    type=int,
    default=1,
    show_default=True,
    help="random seed (the same seed gives the same numbers)",
)
@_at_option("frequencies of the impedance and loss statistics")
@click.option(
    "--target",
    metavar="OHMS",
    help="impedance the band is centred on "
    "(default: the nominal line's impedance at each frequency)",
)
@click.option(
    "--band",
    default="10%",
    show_default=True,
    metavar="TOL",
    help="accepted +/- band around the target: a percentage or ohms (5ohm)",
)
@_plot_options(
    "losslane-spread.png", "histograms of impedance and loss (PNG)", "do not write the histograms"
)
@_section_options
@_JSON_OPTION
def spread_command(
    kind: str,
    distribution: str,
    samples: int,
    seed: int,
    at: str,
    target: str | None,
    band: str,
    plot: str,
    no_plot: bool,
    as_json: bool,
    **options,
) -> None:
    """Tolerance Monte Carlo of impedance and loss.

    Give the nominal line like `losslane line` and a +/- tolerance per parameter
    (--width-tol, --height-tol or, for stripline, --below-tol/--above-tol,
    --thickness-tol, --dk-tol, ...). With --distribution normal (default) the +/- value
    is 3 sigma. Prints mean, standard deviation, 1st/99th percentiles and the share of
    samples outside the --band around the target, and writes histograms.
    """
    from losslane.design.sizing import parse_target
    from losslane.design.spread import parse_tolerance, spread
    from losslane.report.design_tables import spread_table
    from losslane.report.plots import spread_histograms
    from losslane.spec import cli_where
    from losslane.units import parse_frequency_list
    from losslane.xsection.batch import is_vectorized, nominal_geometry

    where = cli_where("losslane spread")
    with _warnings_to_stderr():
        tol_text = {k: options.pop(f"{k}_tol") for k in _TOL_KEYS}
        freqs = parse_frequency_list(at, "--at")
        z = parse_target(target) if target is not None else None
        frac, ohm = _parse_band(band)
        section = _line_section(kind, options, where, _library(options))
        geo = nominal_geometry(section)
        tols = {}
        for key, value in tol_text.items():
            if value is None:
                continue
            nominal = section.dielectric.dk if key == "dk" else geo.get(key, 0.0)
            tols[key] = parse_tolerance(value, key, nominal)
        work = samples * len(freqs) if is_vectorized(section) else samples * 10_000
        with _progress(samples, work) as bar:
            done = [0]

            def advance(n: int) -> None:
                if bar is not None:
                    bar.update(n - done[0])
                    done[0] = n

            result = spread(
                section,
                tols,
                freqs,
                samples=samples,
                seed=seed,
                distribution=distribution,
                target=z,
                band=frac if frac is not None else 0.1,
                band_ohm=ohm,
                progress=advance,
            )
        out = result.to_json()
        if not no_plot:
            what = "Z_diff" if result.differential else "Z0"
            i_z = 0
            i_l = int(max(range(len(freqs)), key=lambda i: freqs[i]))
            title = f"{_stackup(section)}; {samples} samples, {distribution}" + (
                " (tolerance = 3 sigma)" if distribution == "normal" else ""
            )
            out["plot"] = str(
                spread_histograms(
                    result.impedance[:, i_z],
                    f"{what} at {freqs[i_z] / 1e9:g} GHz (ohm)",
                    float(result.target[i_z]),
                    float(result.band[i_z]),
                    result.loss[:, i_l],
                    f"loss at {freqs[i_l] / 1e9:g} GHz (dB/in)",
                    plot,
                    title,
                )
            )
        _echo(out, as_json, lambda o: spread_table(o, describe(section)))


def _parse_band(value: str) -> tuple[float | None, float | None]:
    """--band as (fraction, None) from "10%" or (None, ohm) from "5ohm"."""
    import re

    from losslane.units import parse_resistance

    m = re.fullmatch(r"\s*(\d+\.?\d*|\.\d+)\s*%\s*", value)
    if m:
        frac = float(m.group(1)) / 100.0
        if not 0 < frac < 1:
            raise LossLaneError(f"--band = {value!r}: a percentage between 0 and 100")
        return frac, None
    try:
        float(value)
    except ValueError:
        ohm = parse_resistance(value, "--band")
        if ohm <= 0:
            raise LossLaneError(f"--band = {value!r}: must be > 0 ohm") from None
        return None, ohm
    raise LossLaneError(f"--band = {value!r}: write a percentage (10%) or ohms (5ohm)")


@cli.command("materials")
@_LIBRARY_OPTION
@click.option(
    "--scenario",
    "scenario_files",
    multiple=True,
    metavar="FILE",
    help="list a scenario file's own [dielectrics.*] / [foils.*] entries too",
)
@_JSON_OPTION
def materials_command(
    library_files: tuple[str, ...], scenario_files: tuple[str, ...], as_json: bool
) -> None:
    """The dielectric and foil library, as a table.

    Dielectrics with class, Dk, Df and their frequency; foils with model and parameters.

    Bundled entries are typical values of generic material classes; --library and
    --scenario files add or override entries.
    """
    from losslane.materials.catalog import catalog
    from losslane.report.design_tables import materials_table

    with _warnings_to_stderr():
        _echo(catalog(library_files, scenario_files), as_json, materials_table)


@cli.command("build")
@click.argument("scenario", type=click.Path(dir_okay=False))
@click.option("--out", "out", metavar="DIR", help="output directory (default: ./<scenario name>)")
@click.option(
    "--touchstone-version",
    type=click.Choice(["1", "2"]),
    default="1",
    show_default=True,
    help="Touchstone file format version",
)
@click.option(
    "--form",
    type=click.Choice(["ri", "ma", "db"]),
    default="ri",
    show_default=True,
    help="number form in the Touchstone file: real/imag, magnitude/angle, dB/angle",
)
@_NO_PLOTS_OPTION
@_JSON_OPTION
@click.option(
    "--strict",
    is_flag=True,
    help="exit with code 1 when a budget check fails (files are still written)",
)
def build_command(
    scenario: str,
    out: str | None,
    touchstone_version: str,
    form: str,
    no_plots: bool,
    as_json: bool,
    strict: bool,
) -> None:
    """Build a channel from a scenario file: Touchstone file, plots, the loss budget, a
    report page and a summary."""
    from losslane.api import build

    with _warnings_to_stderr():
        result, files, text, data = build(
            scenario, out=out, version=int(touchstone_version), form=form, plots=not no_plots
        )
        _echo(data, as_json, lambda _: text)
    if strict and data["budget"] is not None and not data["budget"]["passed"]:
        click.echo("budget check failed (--strict): exit code 1", err=True)
        raise SystemExit(1)


@cli.command("demo")
@click.option(
    "--out",
    "out",
    default="losslane-demo",
    show_default=True,
    metavar="DIR",
    help="output directory",
)
@click.option(
    "--single-ended",
    is_flag=True,
    help="the single-ended (2-port) variant instead of the differential pair",
)
@_NO_PLOTS_OPTION
@_JSON_OPTION
def demo_command(out: str, single_ended: bool, no_plots: bool, as_json: bool) -> None:
    """Build the bundled example channel end to end: a differential sensor-to-processor
    lane over two boards and a mezzanine connector (.s4p and mixed-mode plots)."""
    from losslane.api import build, demo_scenario_path

    with _warnings_to_stderr():
        path = demo_scenario_path(single_ended)
        result, files, text, data = build(path, out=out, plots=not no_plots)
        _echo(data, as_json, lambda _: f"demo scenario: {path}\n{text}")


def main(argv: list[str] | None = None) -> int:
    """Console entry point: bad input is one line on stderr and exit code 2."""
    try:
        cli.main(args=argv, prog_name="losslane", standalone_mode=False)
    except LossLaneError as exc:
        click.echo(f"error: {exc}", err=True)
        return 2
    except click.exceptions.Abort:
        click.echo("aborted", err=True)
        return 1
    except click.ClickException as exc:
        exc.show()
        return exc.exit_code
    except click.exceptions.Exit as exc:
        return exc.exit_code
    except SystemExit as exc:  # strict-mode exits raised by commands
        return int(exc.code or 0)
    return 0


if __name__ == "__main__":
    sys.exit(main())


def entry() -> None:
    sys.exit(main())

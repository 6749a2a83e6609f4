"""The `losslane` command line: parse the options, call one ``api`` function, render its
result through ``losslane.report``. Nothing here computes.

The options that describe a cross-section come from the line-kind registry (through
``api``); they are made when a command runs or shows its help, so ``losslane --help``
imports no numerics. Heavy modules are imported inside the commands.
"""

from __future__ import annotations

import contextlib
import os
import sys
import warnings
from collections.abc import Callable, Iterator

import click

from losslane import api
from losslane.errors import LossLaneError, LossLaneWarning
from losslane.report.output import check_output_file


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
@click.version_option(api.__version__, prog_name="losslane")
def cli() -> None:
    """Loss, impedance and S-parameters of printed-board interconnect.

    Results are estimates from published models: confirm them against the fabricator's
    stackup and measured test coupons.
    """


# --- options ------------------------------------------------------------------------------


class _StrictNumber(click.ParamType):
    """A plain number option read as the unit parser reads numbers (``units.parse_number``:
    ASCII digits only, never NaN or infinite); ``whole`` for counts and seeds."""

    def __init__(self, whole: bool = False) -> None:
        self.whole = whole
        self.name = "integer" if whole else "number"

    def convert(self, value, param, ctx):
        import re

        from losslane.units import parse_number

        if isinstance(value, (int, float)) and not isinstance(value, bool):
            return value
        key = param.opts[0] if param is not None and param.opts else "value"
        if self.whole:
            if not re.fullmatch(r"\s*[+-]?[0-9]+\s*", str(value)):
                parse_number(value, key)  # names foreign digits and other non-numbers
                raise LossLaneError(f"{key} = {value!r}: expected a whole number")
            return int(value)
        return parse_number(value, key)


_NUMBER = _StrictNumber()
_WHOLE = _StrictNumber(whole=True)


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
_NO_PLOTS_OPTION = click.option("--no-plots", is_flag=True, help="skip the PNG plots")
# checked by the api (check_order), whose refusal names the option and the valid values
_ORDER_OPTION = click.option(
    "--order",
    default="in-in-out-out",
    show_default=True,
    metavar="ORDER",
    help="4-port numbering: in-in-out-out (legs 1->3 and 2->4) or in-out-in-out "
    "(legs 1->2 and 3->4)",
)
_SKIP_FIT_OPTION = click.option(
    "--skip-fit",
    is_flag=True,
    help="no fitted insertion loss / ILD (as [budget] fit = false; also without a [budget])",
)


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


#: the laminate and copper of a cross-section (api.MATERIAL_OPTIONS, as options)
_material_options = _options(
    click.option("--dk", type=_NUMBER, help="relative permittivity of the dielectric"),
    click.option("--df", type=_NUMBER, help="loss tangent of the dielectric (default 0)"),
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
        "dielectric",
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
    click.option(
        "--solver",
        type=click.Choice(["closed-form", "field"]),
        default="closed-form",
        show_default=True,
        help="closed-form models or the 2-D field solver",
    ),
)

#: how the field solver's options show (their names come from api.field_keys()):
#: (metavar or click type, help)
_FIELD_HELP = {
    "top_width": ("LENGTH", "top width of an etched trace (width is the base)"),
    "etch_factor": (_NUMBER, "2 x thickness / (width - top width)"),
    "coating_thickness": ("LENGTH", "solder-mask thickness over the outer layer"),
    "coating_dielectric": ("NAME", "the coating's dielectric (e.g. solder-mask)"),
    "dielectric_above": ("NAME", "stripline prepreg above the trace, if not --dielectric"),
    "accuracy": (None, "mesh setting (default normal)"),
}


def _length_options() -> list[click.Option]:
    return [
        click.Option(
            [f"--{name.replace('_', '-')}", name],
            metavar="LENGTH",
            help=f"{name.replace('_', ' ')} with a unit, e.g. 5mil, 0.127mm",
        )
        for name in api.length_keys()
    ]


def _field_options() -> list[click.Option]:
    out = []
    for name in api.field_keys():
        kind, text = _FIELD_HELP.get(name, ("VALUE", name.replace("_", " ")))
        if name == "accuracy":
            kw = {"type": click.Choice(api.accuracies())}
        elif isinstance(kind, str):
            kw = {"metavar": kind}
        else:
            kw = {"type": kind}
        opt = click.Option(
            [f"--{name.replace('_', '-')}", name], help="field solver: " + text, **kw
        )
        out.append(opt)
    return out


def _tolerance_options() -> list[click.Option]:
    return [
        click.Option(
            [f"--{key.replace('_', '-')}-tol", f"{key}_tol"],
            metavar="TOL",
            help="+/- Dk deviation, e.g. 0.1 or 3%"
            if key == "dk"
            else f"+/- {key} tolerance, a length (0.5mil) or a percentage (10%)",
        )
        for key in api.tolerance_keys()
    ]


class _RegistryCommand(click.Command):
    """A command whose cross-section options come from the line-kind registry: they are
    made the first time the command parses its arguments or shows its help."""

    def __init__(self, *args, registry_options: Callable[[], list] = list, **kwargs) -> None:
        super().__init__(*args, **kwargs)
        self._registry_options = registry_options
        self._made = False

    def get_params(self, ctx: click.Context) -> list[click.Parameter]:
        if not self._made:
            self._made = True
            # after the KIND argument, before the command's own options
            self.params[1:1] = self._registry_options()
            if self.help:
                self.help = self.help.replace("{kinds}", ", ".join(api.kinds()))
        return super().get_params(ctx)


def _section_command(name: str, extra: Callable[[], list] = list):
    """A command taking KIND and the registry's cross-section options (plus ``extra``)."""
    return cli.command(
        name,
        cls=_RegistryCommand,
        registry_options=lambda: _length_options() + extra(),
    )


def _section(options: dict) -> dict:
    """The cross-section keywords of ``api`` from the parsed options (Nones dropped)."""
    return {k: v for k, v in options.items() if v is not None}


def _echo(out: dict, as_json: bool, table: Callable[[dict], str]) -> None:
    """``out`` as one strict JSON object on stdout (no NaN or Infinity: see
    ``report.strict_json``), or the text ``table(out)``."""
    from losslane.report.strict_json import dumps

    click.echo(dumps(out) if as_json else table(out))


# --- commands -------------------------------------------------------------------------


@_section_command("line", extra=_field_options)
@click.argument("kind")
@_material_options
@_at_option("frequencies, comma-separated (e.g. 1GHz,10GHz or 1,10,28GHz)")
@_JSON_OPTION
@click.option(
    "--plot",
    "plot",
    metavar="FILE",
    help="field solver: draw the cross-section and its field (.png/.svg/.pdf)",
)
def line_command(kind: str, at: str, as_json: bool, plot: str | None, **options) -> None:
    """Impedance, delay, loss per inch and RLGC of one cross-section.

    KIND is one of: {kinds}.
    """
    from losslane.report.line import describe, line_table

    if plot is not None:
        check_output_file(plot, "--plot")  # before any work
    with _warnings_to_stderr():
        result = api.line(kind, at=at, where=api.cli_where("losslane line"), **_section(options))
        if plot is not None:
            from losslane.report.line_picture import plot_section

            plot_section(result.section, plot, "--plot")
        _echo(result.to_json(), as_json, lambda p: line_table(p, describe(result.section)))


@_section_command("size", extra=_field_options)
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
@_material_options
@_JSON_OPTION
def size_command(
    kind: str, target: str, vary: str, at: str, loss_at: str | None, as_json: bool, **options
) -> None:
    """Trace width (or pair spacing) for a target impedance.

    The impedance is the one `losslane line` reports (Z0, or Z_diff of a pair) at --at,
    1 GHz unless given. Prints the solved dimension, the achieved impedance, its
    sensitivity to width, dielectric height and Dk, and the loss per inch. A target the
    model cannot reach inside its validity range is an error that says which way to move.
    KIND is one of: {kinds}.
    """
    from losslane.report.design import size_table
    from losslane.report.line import describe_solved

    with _warnings_to_stderr():
        res = api.size(
            kind,
            target,
            vary=vary,
            at=at,
            loss_at=loss_at,
            where=api.cli_where("losslane size"),
            **_section(options),
        )
        _echo(res.to_json(), as_json, lambda r: size_table(r, describe_solved(res.section, vary)))


@_section_command("compare", extra=_field_options)
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
@_material_options
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
    from losslane.report.design import compare_chart, compare_table
    from losslane.report.line import stackup

    if not no_plot:
        check_output_file(plot, "--plot")  # before any work
    with _warnings_to_stderr():
        res = api.compare(
            kind,
            materials,
            target,
            foils=foils,
            at=at,
            size_at=size_at,
            where=api.cli_where("losslane compare"),
            **_section(options),
        )
        out = res.to_json()
        if not no_plot:
            out["plot"] = str(compare_chart(res, plot))
        heading = stackup(res.candidates[0].section, ("width",))
        _echo(out, as_json, lambda o: compare_table(o, heading))


@contextlib.contextmanager
def _progress_bar(label: str) -> Iterator[Callable[[int, int], None]]:
    """A callback ``progress(done, total)`` drawing a progress bar on stderr (never on
    stdout) from its first call on."""
    bar = None

    def progress(done: int, total: int) -> None:
        nonlocal bar
        if bar is None:
            bar = click.progressbar(length=total, label=label, file=sys.stderr)
            bar.__enter__()
        bar.update(done - bar.pos)

    try:
        yield progress
    finally:
        if bar is not None:
            bar.__exit__(None, None, None)


@_section_command("spread", extra=lambda: _tolerance_options() + _field_options())
@click.argument("kind")
@click.option(
    "--distribution",
    type=click.Choice(["normal", "uniform"]),
    default="normal",
    show_default=True,
    help="normal: each +/- tolerance is 3 sigma; uniform: samples fill the +/- interval evenly",
)
@click.option(
    "--samples", type=_WHOLE, default=10000, show_default=True, help="Monte Carlo samples"
)
@click.option(
    "--seed",
    type=_WHOLE,
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
@_material_options
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
    from losslane.report.design import spread_chart, spread_table
    from losslane.report.line import describe

    if not no_plot:
        check_output_file(plot, "--plot")  # before any work
    tol_keys = [k for k in options if k.endswith("_tol")]
    tolerances = {k[: -len("_tol")]: options.pop(k) for k in tol_keys}
    with _warnings_to_stderr(), _progress_bar("sampling") as progress:
        res = api.spread(
            kind,
            tolerances,
            samples=samples,
            seed=seed,
            distribution=distribution,
            at=at,
            target=target,
            band=band,
            progress=progress,
            where=api.cli_where("losslane spread"),
            **_section(options),
        )
        out = res.to_json()
        if not no_plot:
            out["plot"] = str(spread_chart(res, res.section, plot))
        _echo(out, as_json, lambda o: spread_table(o, describe(res.section)))


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
    from losslane.report.design import materials_table

    with _warnings_to_stderr():
        _echo(api.materials(library_files, scenario_files).to_json(), as_json, materials_table)


@cli.command("build")
@click.argument("scenario", metavar="SCENARIO")  # checked by the scenario reader
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
@_SKIP_FIT_OPTION
@_JSON_OPTION
@click.option(
    "--strict",
    is_flag=True,
    help="exit with code 1 when a budget check, band or mask fails (files are still written)",
)
def build_command(
    scenario: str,
    out: str | None,
    touchstone_version: str,
    form: str,
    no_plots: bool,
    skip_fit: bool,
    as_json: bool,
    strict: bool,
) -> None:
    """Build a channel from a scenario file: Touchstone file, plots, the loss budget, a
    report page and a summary."""
    from losslane.report.channel import build_text

    with _warnings_to_stderr():
        res = api.build(
            scenario,
            out=out,
            version=int(touchstone_version),
            form=form,
            plots=not no_plots,
            skip_fit=skip_fit,
        )
        _echo(res.to_json(), as_json, lambda _: build_text(res))
    if strict and res.passed is False:
        click.echo("budget check, band or mask failed (--strict): exit code 1", err=True)
        raise SystemExit(1)


# --- measured coupons ------------------------------------------------------------------


def _coupon_options(func):
    """The options shared by `extract` and `fit`: the coupons' lengths, numbering, mode
    and noise model."""
    return _options(
        click.option(
            "--lengths",
            required=True,
            metavar="L1,L2,...",
            help="each file's line length with a unit, in the order of the files "
            "(e.g. 2in,6in or 2,5,9in)",
        ),
        _ORDER_OPTION,
        click.option(
            "--mode",
            metavar="MODE",
            help="single-ended (2-port files), differential (default for 4-port files) or common",
        ),
        click.option(
            "--noise",
            type=float,
            help="relative noise of each measured S-parameter (default 1e-3); sets the "
            "weights, uncertainties and flags",
        ),
        click.option(
            "--noise-floor",
            type=float,
            help="absolute noise floor of each S-parameter (default 1e-5)",
        ),
    )(func)


@cli.command("extract")
@click.argument("files", nargs=-1, required=True, metavar="FILE FILE [FILE ...]")
@_coupon_options
@click.option(
    "--at",
    "at",
    metavar="FREQS",
    help="frequencies of the headline values (default 1, 10 and 28 GHz, those measured)",
)
@click.option("--out", "out", metavar="DIR", help="write the charts and the curves (CSV) into DIR")
@_NO_PLOTS_OPTION
@_JSON_OPTION
def extract_command(
    files: tuple[str, ...],
    lengths: str,
    order: str,
    mode: str | None,
    noise: float | None,
    noise_floor: float | None,
    at: str | None,
    out: str | None,
    no_plots: bool,
    as_json: bool,
) -> None:
    """Loss per inch and eps_eff of a line from coupons of two or more lengths.

    FILE: Touchstone files of the same line at different lengths with identical launches
    (2-port lines, or 4-port pairs in --order). The launches are removed by the two-line
    eigenvalue method; with three or more lengths every pair is combined, weighted by its
    uncertainty. Each point is flagged where the data cannot determine it; the usable band
    is the longest unflagged run. The files' passivity and reciprocity are reported, never
    repaired.
    """
    from losslane.report.measure import extract_text

    with _warnings_to_stderr():
        res = api.extract(
            files,
            lengths,
            order=order,
            mode=mode,
            at=at,
            noise=noise,
            noise_floor=noise_floor,
            out=out,
            plots=not no_plots,
            where=api.cli_where("losslane extract"),
        )
        _echo(res.to_json(), as_json, lambda _: extract_text(res))


@_section_command("fit", extra=_field_options)
@click.argument("args", nargs=-1, required=True, metavar="FILE FILE [FILE ...] [KIND]")
@_coupon_options
@click.option(
    "--scenario",
    "scenario",
    metavar="FILE",
    help="take the cross-section from a scenario file's [lines.NAME] (with --line)",
)
@click.option("--line", "line_name", metavar="NAME", help="the [lines.NAME] of --scenario")
@click.option(
    "--vary",
    default="dk,df,rq",
    show_default=True,
    metavar="P1,P2,...",
    help="parameters to fit: dk, df, rq, radius, surface_ratio, conductivity "
    "(the rest are held as given)",
)
@click.option(
    "--band",
    metavar="START,STOP",
    help="frequency band of the fit (default: the extraction's usable band)",
)
@click.option(
    "--foil-model",
    type=click.Choice(["none", "hammerstad", "groiss", "huray"]),
    help="roughness model to fit (default the line's foil; radius/surface_ratio imply "
    "huray, rq hammerstad)",
)
@click.option(
    "--write-library",
    metavar="FILE",
    help="write the fitted dielectric and foil as a library TOML file",
)
@click.option(
    "--names",
    default="fitted,fitted-foil",
    show_default=True,
    metavar="DIELECTRIC,FOIL",
    help="entry names in the --write-library file",
)
@click.option("--out", "out", metavar="DIR", help="write the charts and the curves (CSV) into DIR")
@_NO_PLOTS_OPTION
@_material_options
@_JSON_OPTION
def fit_command(
    args: tuple[str, ...],
    lengths: str,
    order: str,
    mode: str | None,
    noise: float | None,
    noise_floor: float | None,
    scenario: str | None,
    line_name: str | None,
    vary: str,
    band: str | None,
    foil_model: str | None,
    write_library: str | None,
    names: str,
    out: str | None,
    no_plots: bool,
    as_json: bool,
    **options,
) -> None:
    """Fit Dk, Df, roughness and conductivity of a line to measured coupons.

    FILE: coupons as for `losslane extract`. The line they were built on: KIND (one of:
    {kinds}) with the geometry and material options of `losslane line` (the materials
    are the starting values and what is held fixed), or --scenario FILE --line NAME.
    Prints the fitted values with their standard uncertainties from the fit and says when
    the band cannot separate them; --write-library saves them for scenarios
    (library = ["FILE"]).
    """
    from losslane.report.measure import fit_text

    files, kind = list(args), None
    kinds = api.kinds()
    if len(files) > 1 and files[-1] in kinds:
        kind = files.pop()
    elif len(files) > 1 and files[0] in kinds and not os.path.exists(files[0]):
        kind = files.pop(0)  # KIND written first: accepted too
    with _warnings_to_stderr():
        res = api.fit(
            files,
            lengths,
            kind,
            vary=vary,
            band=band,
            scenario=scenario,
            line=line_name,
            foil_model=foil_model,
            order=order,
            mode=mode,
            noise=noise,
            noise_floor=noise_floor,
            write_library=write_library,
            names=names,
            out=out,
            plots=not no_plots,
            where=api.cli_where("losslane fit"),
            **_section(options),
        )
        _echo(res.to_json(), as_json, lambda _: fit_text(res))


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
@_SKIP_FIT_OPTION
@_JSON_OPTION
def demo_command(
    out: str, single_ended: bool, no_plots: bool, skip_fit: bool, as_json: bool
) -> None:
    """Build the bundled example channel end to end: a differential sensor-to-processor
    lane over two boards and a mezzanine connector (.s4p and mixed-mode plots)."""
    from losslane.report.channel import build_text

    with _warnings_to_stderr():
        res = api.demo(out, single_ended, plots=not no_plots, skip_fit=skip_fit)
        path = api.demo_scenario_path(single_ended)
        _echo(res.to_json(), as_json, lambda _: f"demo scenario: {path}\n{build_text(res)}")


@cli.command("sweep")
@click.argument("plan", type=click.Path(dir_okay=False))
@click.option("--out", "out", metavar="FILE", help="the table: .parquet (default) or .csv")
@click.option(
    "--workers",
    type=int,
    help="worker processes of the local cluster (default: the machine's cores; 0: run here)",
)
@click.option("--scheduler", metavar="ADDRESS", help="run on the dask cluster at ADDRESS")
@_NO_PLOTS_OPTION
@_JSON_OPTION
def sweep_command(
    plan: str,
    out: str | None,
    workers: int | None,
    scheduler: str | None,
    no_plots: bool,
    as_json: bool,
) -> None:
    """Run a sweep plan on dask.distributed: every combination of the varied keys of a
    cross-section (a `line` evaluation per case) or a scenario (a build per case), into one
    table. Exit code 1 when some cases failed (their errors are in the table)."""
    from losslane.report.sweep import sweep_text

    with _warnings_to_stderr(), _progress_bar("cases") as progress:
        res = api.run_sweep(
            plan,
            out,
            workers=workers,
            scheduler=scheduler,
            charts=not no_plots,
            progress=progress,
        )
        _echo(res.to_json(), as_json, lambda _: sweep_text(res))
    if res.failed:
        click.echo(f"{res.failed} of {res.cases} cases failed (see the error column)", err=True)
        raise SystemExit(1)


@cli.command("inspect")
@click.argument("file", type=click.Path(dir_okay=False))
@_ORDER_OPTION
@click.option(
    "--rise-time",
    metavar="TIME",
    help="10-90 % rise time of the stimulus edge, e.g. 30ps (default 0.75 / top frequency)",
)
@click.option("--data-rate", metavar="RATE", help="bit rate of the pulse response, e.g. 32Gb/s")
@click.option(
    "--modulation",
    type=click.Choice(["nrz", "pam4"]),
    default="nrz",
    show_default=True,
    help="symbols of the pulse response (pam4: one symbol carries 2 bits)",
)
@click.option(
    "--delay-per-in",
    metavar="TIME",
    help="one-way delay per inch, e.g. 170ps: adds distances to the impedance profiles",
)
@click.option("--z-ref", metavar="OHMS", help="reference impedance (default: the file's)")
@click.option("--out", "out", metavar="DIR", help="write the charts and a report page into DIR")
@_JSON_OPTION
def inspect_command(
    file: str,
    order: str,
    rise_time: str | None,
    data_rate: str | None,
    modulation: str,
    delay_per_in: str | None,
    z_ref: str | None,
    out: str | None,
    as_json: bool,
) -> None:
    """Judge a Touchstone file and show it in time.

    Prints the IEEE 370 quality metrics (passivity, reciprocity, causality, with levels
    and where passivity fails), the impedance profile at each port (and of the pair, for
    a 4-port) with its peaks and dips, the step responses with delay, rise time and
    intra-pair skew, and with --data-rate the pulse response and its cursors. The data
    are judged as they are: nothing is repaired.
    """
    from losslane.report.inspect import inspect_text

    with _warnings_to_stderr():
        res = api.inspect(
            file,
            order=order,
            rise_time=rise_time,
            data_rate=data_rate,
            modulation=modulation,
            delay_per_in=delay_per_in,
            z_ref=z_ref,
            out=out,
            where=api.cli_where("losslane inspect"),
        )
        _echo(res.to_json(), as_json, lambda _: inspect_text(res))


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


def entry() -> None:
    sys.exit(main())


if __name__ == "__main__":
    sys.exit(main())

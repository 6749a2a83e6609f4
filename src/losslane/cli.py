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


LENGTH_OPTIONS = ("width", "thickness", "height", "below", "above", "gap", "spacing",
                  "plane_thickness")


def _geometry_options(func):
    for name in reversed(LENGTH_OPTIONS):
        func = click.option(f"--{name.replace('_', '-')}", name, metavar="LENGTH",
                            help=f"{name.replace('_', ' ')} with a unit, e.g. 5mil, 0.127mm")(func)
    return func


def _material_options(func):
    opts = [
        click.option("--dk", type=float, help="relative permittivity of the dielectric"),
        click.option("--df", type=float, help="loss tangent of the dielectric (default 0)"),
        click.option("--dk-at", metavar="FREQ", help="frequency of the --dk/--df values"),
        click.option("--dielectric-model", type=click.Choice(["wideband-debye", "constant"]),
                     default="wideband-debye", show_default=True,
                     help="causal wideband Debye fit, or constant (non-causal)"),
        click.option("--dielectric", "dielectric_name", metavar="NAME",
                     help="a dielectric from the library (see `losslane materials`)"),
        click.option("--foil", metavar="NAME", help="a copper foil from the library"),
        click.option("--roughness-model", type=click.Choice(["none", "hammerstad", "groiss"]),
                     help="roughness model with --rq, instead of --foil"),
        click.option("--rq", metavar="LENGTH", help="RMS roughness for --roughness-model"),
        click.option("--conductivity", metavar="S/m", help="conductor conductivity "
                     "(default copper, 5.8e7 S/m)"),
        click.option("--library", "library_files", multiple=True, metavar="FILE",
                     help="extra library file(s) with [dielectrics.*] / [foils.*] entries"),
    ]
    for opt in reversed(opts):
        func = opt(func)
    return func


#: field-solver options of `losslane line` (scenario keys of the same names)
FIELD_OPTIONS = ("top_width", "etch_factor", "coating_thickness", "coating_dielectric",
                 "dielectric_above", "accuracy")


def _field_options(func):
    opts = [
        click.option("--top-width", "top_width", metavar="LENGTH",
                     help="field solver: top width of an etched trace (width is the base)"),
        click.option("--etch-factor", "etch_factor", type=float,
                     help="field solver: 2 x thickness / (width - top width)"),
        click.option("--coating-thickness", "coating_thickness", metavar="LENGTH",
                     help="field solver: solder-mask thickness over the outer layer"),
        click.option("--coating-dielectric", "coating_dielectric", metavar="NAME",
                     help="field solver: the coating's dielectric (e.g. solder-mask)"),
        click.option("--dielectric-above", "dielectric_above", metavar="NAME",
                     help="field solver: stripline prepreg above the trace, if not --dielectric"),
        click.option("--accuracy", type=click.Choice(["coarse", "normal", "fine"]),
                     help="field solver: mesh setting (default normal)"),
        click.option("--plot", "plot", metavar="FILE",
                     help="field solver: draw the cross-section and its field (.png/.svg/.pdf)"),
    ]
    for opt in reversed(opts):
        func = opt(func)
    return func


def line_spec(kind: str, options: dict, where) -> dict:
    """Scenario-style spec from the `line`-family options (shared by size/compare/spread)."""
    from losslane.materials.dielectric import make_dielectric
    from losslane.materials.library import foil_from_spec
    from losslane.units import parse_frequency

    spec: dict = {"kind": kind}
    for name in LENGTH_OPTIONS:
        if options.get(name) is not None:
            spec[name] = options[name]
    dk, name = options.get("dk"), options.get("dielectric_name")
    if dk is not None and name is not None:
        raise LossLaneError("give either --dielectric NAME or --dk/--df/--dk-at, not both")
    if dk is None and name is None:
        raise LossLaneError("missing dielectric: give --dk (with --df and --dk-at) or "
                            "--dielectric NAME (see `losslane materials`)")
    if dk is not None:
        model = options.get("dielectric_model", "wideband-debye")
        at = options.get("dk_at")
        if at is None and model == "wideband-debye":
            raise LossLaneError("--dk-at is missing: the frequency at which --dk/--df hold "
                                "(e.g. 10GHz); or use --dielectric-model constant")
        spec["dielectric"] = make_dielectric(dk, options.get("df") or 0.0,
                                             parse_frequency(at, "--dk-at") if at else None,
                                             model, "dielectric")
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
    for name in FIELD_OPTIONS:
        if options.get(name) is not None:
            spec[name] = options[name]
    return spec


@cli.command("line")
@click.argument("kind")
@_geometry_options
@_material_options
@click.option("--solver", type=click.Choice(["closed-form", "field"]), default="closed-form",
              show_default=True, help="closed-form models or the 2-D field solver")
@click.option("--at", "at", default="1GHz,10GHz,28GHz", show_default=True, metavar="FREQS",
              help="frequencies, comma-separated (e.g. 1GHz,10GHz or 1,10,28GHz)")
@click.option("--json", "as_json", is_flag=True, help="print one JSON object instead of tables")
@_field_options
def line_command(kind: str, at: str, as_json: bool, plot: str | None = None,
                 **options) -> None:
    """Impedance, delay, loss per inch and RLGC of one cross-section.

    KIND is microstrip, stripline, cpw, gcpw, microstrip-pair or stripline-pair.
    """
    import json

    from losslane.materials.library import load_library
    from losslane.report.tables import line_table
    from losslane.spec import cli_where
    from losslane.units import parse_frequency_list
    from losslane.xsection.factory import section_from_spec

    where = cli_where("losslane line")
    with _warnings_to_stderr():
        lib = load_library(options.pop("library_files"))
        spec = line_spec(kind, options, where)
        freqs = parse_frequency_list(at, "--at")
        section = section_from_spec(spec, where, lib.dielectric, lib.foil)
        props = section.properties(freqs)
        if plot is not None:
            from losslane.report.section_plot import plot_section

            plot_section(section, plot, "--plot")
        if as_json:
            click.echo(json.dumps(props))
        else:
            click.echo(line_table(props, describe(section)))


def describe(section) -> str:
    """One heading line naming the cross-section, its geometry and materials."""
    from losslane.units import MIL

    parts = [section.kind]
    for key in ("width", "spacing", "gap", "height", "below", "above", "thickness"):
        v = getattr(section, key, None)
        if isinstance(v, float):
            parts.append(f"{key} {v / MIL:.4g} mil")
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
        parts.append(f"field solver ({section.accuracy}"
                     + ("" if est is None else f", estimated error of Z0 {100 * est:.2g} %")
                     + ")")
    return ", ".join(parts)


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

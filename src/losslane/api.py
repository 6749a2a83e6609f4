"""The Python front end: one function per command, each returning a result object whose
``to_json()`` is what the command prints with ``--json``. The command line parses its
options, calls one of these and renders the result (``losslane.report``); a notebook user
calls the same functions.

Cross-sections are described as on the command line and in scenario files: the kind, its
dimensions as text with units (``width="6 mil"``), the laminate (a library ``dielectric``
name or object, or ``dk``/``df``/``dk_at``), the copper (``foil`` or
``roughness_model``/``rq``, ``conductivity``, ``plane_foil``, ``plane_thickness``) and,
with ``solver="field"``, the field solver's keys. Error messages name the keys as the
caller wrote them (keyword arguments here, options on the command line).

Heavy modules are imported inside the functions (start-up time of the command line).
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

from losslane import __version__
from losslane.errors import LossLaneError
from losslane.spec import Where, cli_where, python_where

__all__ = [
    "BuildResult",
    "InspectResult",
    "LineResult",
    "MaterialsResult",
    "Where",
    "__version__",
    "build",
    "cli_where",
    "ExtractResult",
    "FitResult",
    "compare",
    "demo",
    "extract",
    "fit",
    "demo_scenario_path",
    "inspect",
    "line",
    "materials",
    "section",
    "size",
    "spread",
    "run_sweep",
    "sweep",
]

if TYPE_CHECKING:
    from losslane.budget import ChannelBudget, FitOff, LossFit
    from losslane.channel import ChannelResult
    from losslane.design.compare import CompareResult
    from losslane.design.sizing import SizeResult
    from losslane.design.spread import SpreadResult
    from losslane.materials.library import Library
    from losslane.measure.extract import LineExtraction
    from losslane.measure.fit import MaterialFit
    from losslane.measure.overlay import MeasuredOverlay
    from losslane.network.inspection import Inspection
    from losslane.xsection.base import CrossSection, LineValues


# --- what the command line reads to make its options (no numerics imported) -------------


def kinds() -> tuple[str, ...]:
    """The line kinds, from the registry."""
    from losslane.xsection import registry

    return registry.kinds()


def length_keys() -> tuple[str, ...]:
    """Every length key a cross-section takes: the kinds' dimensions, then the planes'."""
    from losslane.xsection import registry

    return registry.dimension_keys() + ("plane_thickness",)


def tolerance_keys() -> tuple[str, ...]:
    """Every key ``spread`` takes a tolerance on (each kind its own subset)."""
    from losslane.xsection import registry

    return registry.dimension_keys() + ("dk",)


def field_keys() -> tuple[str, ...]:
    """The field solver's own keys (``solver="field"``)."""
    from losslane.xsection.fieldsolve.keys import EXTRA_KEYS

    return EXTRA_KEYS


def accuracies() -> tuple[str, ...]:
    """The field solver's mesh settings."""
    from losslane.xsection.fieldsolve.keys import ACCURACIES

    return ACCURACIES


#: the material keywords of every cross-section call (beyond dimensions and solver keys)
MATERIAL_OPTIONS = (
    "dk",
    "df",
    "dk_at",
    "dielectric",
    "dielectric_model",
    "foil",
    "roughness_model",
    "rq",
    "conductivity",
    "plane_foil",
    "solver",
)


# --- cross-sections ---------------------------------------------------------------------


def section(spec: Mapping, where: str = "line", library: Library | None = None) -> CrossSection:
    """A cross-section from scenario-style keys (``kind``, dimensions with units, names
    resolved in the material library)."""
    from losslane.materials.library import load_library
    from losslane.xsection.factory import section_from_spec

    lib = library or load_library()
    return section_from_spec(spec, where, lib.dielectric, lib.foil)


def _section_spec(kind: str, options: Mapping[str, Any], where: Where) -> dict:
    """Scenario-style keys from the keyword options of a cross-section call (dimensions
    and solver keys pass through; the laminate and the copper are checked and built)."""
    from losslane.limits import DF, DK
    from losslane.materials.dielectric import Dielectric, make_dielectric
    from losslane.materials.library import foil_from_spec
    from losslane.units import parse_frequency

    k = where.key
    opts = {key: v for key, v in options.items() if v is not None}
    spec: dict = {"kind": kind}
    dk, name = opts.pop("dk", None), opts.pop("dielectric", None)
    df, dk_at = opts.pop("df", None), opts.pop("dk_at", None)
    model = opts.pop("dielectric_model", "wideband-debye")
    if dk is not None and name is not None:
        raise LossLaneError(
            f"give either {k('dielectric')} NAME or {k('dk')}/{k('df')}/{k('dk_at')}, not both"
        )
    if dk is None and name is None:
        raise LossLaneError(
            f"missing dielectric: give {k('dk')} (with {k('df')} and {k('dk_at')}) or "
            f"{k('dielectric')} NAME (see `losslane materials`)"
        )
    if dk is not None:
        df = 0.0 if df is None else df
        if not DK[0] <= dk <= DK[1]:
            raise LossLaneError(
                f"{k('dk')} = {dk!r}: a relative permittivity is >= {DK[0]:g} and <= {DK[1]:g} "
                "(air 1, board laminates 2.5..5; Input limits)"
            )
        if not DF[0] <= df < DF[1]:
            raise LossLaneError(
                f"{k('df')} = {df!r}: a loss tangent lies in 0 <= df < 1 (laminates 0.001..0.03)"
            )
        if dk_at is None and model == "wideband-debye":
            raise LossLaneError(
                f"{k('dk_at')} is missing: the frequency at which {k('dk')}/{k('df')} hold "
                f"(e.g. 10GHz); or use {where.setting('dielectric_model', 'constant')}"
            )
        at_hz = parse_frequency(dk_at, k("dk_at")) if dk_at is not None else None
        try:
            spec["dielectric"] = make_dielectric(dk, df, at_hz, model, "dielectric")
        except LossLaneError as exc:  # name the options the laminate came from
            given = [where.setting("dk", dk), where.setting("df", df)]
            if dk_at is not None:
                given.append(where.setting("dk_at", dk_at))
            raise LossLaneError(f"{', '.join(given)}: {exc}") from None
    else:
        if df is not None or dk_at is not None:
            raise LossLaneError(
                f"{k('df')}/{k('dk_at')} go with {k('dk')}, not with {k('dielectric')} NAME"
            )
        spec["dielectric"] = name if isinstance(name, (str, Dielectric)) else str(name)
    rmodel, rq, foil = (
        opts.pop("roughness_model", None),
        opts.pop("rq", None),
        opts.pop("foil", None),
    )
    if foil is not None and rmodel is not None:
        raise LossLaneError(
            f"give either {k('foil')} NAME or {k('roughness_model')}/{k('rq')}, not both"
        )
    if rmodel is not None:
        fs = {"model": rmodel}
        if rq is not None:
            fs["rq"] = rq
        elif rmodel != "none":
            raise LossLaneError(
                f"{where.setting('roughness_model', rmodel)} needs {k('rq')} (e.g. 0.5um)"
            )
        spec["foil"] = foil_from_spec(rmodel, fs, where)
    elif rq is not None:
        raise LossLaneError(f"{k('rq')} needs {k('roughness_model')} hammerstad or groiss")
    elif foil is not None:
        spec["foil"] = foil
    spec.update(opts)  # dimensions, conductivity, plane keys, solver and its keys
    return spec


def _library(library_files: Iterable[Path | str]) -> Library:
    from losslane.materials.library import load_library

    return load_library(library_files)


def _make_section(kind: str, options: Mapping[str, Any], where: Where, lib: Library):
    from losslane.xsection.factory import section_from_spec

    return section_from_spec(_section_spec(kind, options, where), where, lib.dielectric, lib.foil)


def _digits(value: Any, key: str) -> Any:
    """``value`` unchanged if it is not text in foreign digits (``units.check_digits``)."""
    from losslane.units import check_digits

    if isinstance(value, str):
        check_digits(value, key)
    return value


def _where(where: Where | None, function: str) -> Where:
    return where if where is not None else python_where(function)


@dataclass(frozen=True)
class LineResult:
    """One cross-section at some frequencies: the section and its line values."""

    section: CrossSection
    values: LineValues

    def to_json(self) -> dict:
        """The `losslane line --json` object."""
        from losslane.report.line import line_json

        report = getattr(self.section, "solver_report", None)
        model = getattr(self.section, "model_report", None)
        return line_json(
            self.values,
            report() if report is not None else None,
            model() if report is None and model is not None else None,
        )


def line(
    kind: str,
    *,
    at: str | Iterable[str] = "1GHz,10GHz,28GHz",
    library_files: Iterable[Path | str] = (),
    where: Where | None = None,
    **options: Any,
) -> LineResult:
    """Impedance, delay, loss per inch and RLGC of one cross-section at ``at``.

    ``options``: the dimensions with units (``width="6mil"``), the material keywords
    (``dielectric``/``dk``, ``df``, ``dk_at``, ``dielectric_model``, ``foil`` or
    ``roughness_model`` with ``rq``, ``conductivity``, ``plane_foil``,
    ``plane_thickness``) and ``solver="field"`` with the solver's keys.
    """
    from losslane.units import parse_frequency_list

    where = _where(where, "line")
    freqs = parse_frequency_list(at, where.key("at"))
    sec = _make_section(kind, options, where, _library(library_files))
    return LineResult(sec, sec.line_values(freqs))


def _placeholder(kind: str, options: dict, key: str, where: Where, command: str) -> None:
    """Fill the dimension a design command solves for; the caller must not give it."""
    from losslane.xsection import registry

    if options.get(key) is not None:
        raise LossLaneError(
            f"{where.key(key)} is what `{command}` solves for; leave it out"
            + (
                f" (or solve the other dimension with {where.key('vary')})"
                if key in ("width", "spacing")
                else ""
            )
        )
    cls = registry.model(kind, where.key("kind"))
    if key not in cls.dimensions:
        raise LossLaneError(
            f"{where.setting('vary', key)}: {kind} has no {key}; the spacing is solved "
            "only for pairs (microstrip-pair, stripline-pair)"
        )
    # any length the model accepts: it only seeds the section and is replaced by the solution
    options[key] = next(
        (options[k] for k in ("height", "below", "gap") if options.get(k) is not None), "5mil"
    )


def size(
    kind: str,
    target: str | float,
    *,
    vary: str = "width",
    at: str = "1GHz",
    loss_at: str | Iterable[str] | None = None,
    library_files: Iterable[Path | str] = (),
    where: Where | None = None,
    **options: Any,
) -> SizeResult:
    """Solve ``vary`` (width, or a pair's spacing) for ``target`` ohm at ``at``: Z0 of a
    single line, Z_diff of a pair. ``options`` as for :func:`line`, without ``vary``."""
    from losslane.design.sizing import parse_target
    from losslane.design.sizing import size as size_
    from losslane.units import parse_frequency, parse_frequency_list

    where = _where(where, "size")
    z = parse_target(_digits(target, where.key("target")), where.key("target"))
    f0 = parse_frequency(at, where.key("at"))
    floss = parse_frequency_list(loss_at, where.key("loss_at")) if loss_at else None
    lib = _library(library_files)
    options = dict(options)
    _placeholder(kind, options, vary, where, "losslane size" if where.cli else "size()")
    sec = _make_section(kind, options, where, lib)
    return size_(sec, z, at=f0, vary=vary, loss_at=floss, where=where)


def _names(value: str | Iterable[str], key: str) -> list[str]:
    if isinstance(value, str):
        names = [s.strip() for s in value.split(",")]
        bad = not value.strip() or any(not s for s in names)
    else:
        names = [str(s).strip() for s in value]
        bad = not names or any(not s for s in names)
    if bad:
        raise LossLaneError(
            f"{key} = {value!r}: expected comma-separated names, e.g. low-loss,very-low-loss"
        )
    return list(dict.fromkeys(names))


def compare(
    kind: str,
    materials: str | Iterable[str],
    target: str | float,
    *,
    foils: str | Iterable[str] | None = None,
    at: str | Iterable[str] = "1GHz,10GHz,28GHz",
    size_at: str = "1GHz",
    library_files: Iterable[Path | str] = (),
    where: Where | None = None,
    **options: Any,
) -> CompareResult:
    """Re-size the cross-section to ``target`` ohm for every dielectric of ``materials``
    times every foil of ``foils`` (default: ``foil``, ``roughness_model``/``rq``, or smooth
    copper), and tabulate each one's loss per inch at ``at``."""
    from losslane.design.compare import compare as compare_
    from losslane.design.sizing import parse_target
    from losslane.units import parse_frequency, parse_frequency_list

    where = _where(where, "compare")
    k = where.key
    z = parse_target(_digits(target, k("target")), k("target"))
    freqs = parse_frequency_list(at, k("at"))
    f0 = parse_frequency(size_at, k("size_at"))
    if not f0 > 0:  # checked here: the sizing it is passed to names its own key, `at`
        raise LossLaneError(
            f"{where.setting('size_at', size_at)}: size at a frequency above 0 Hz (e.g. "
            "1GHz); at DC the impedance carries the full internal inductance"
        )
    lib = _library(library_files)
    if options.get("dk") is not None or options.get("dielectric") is not None:
        raise LossLaneError(
            f"compare takes its dielectrics from {k('materials')}; leave out "
            f"{k('dk')}/{k('dielectric')} (add your own with "
            f"{'--library FILE' if where.cli else 'library_files'})"
        )
    mats = {n: lib.dielectric(n, k("materials")) for n in _names(materials, k("materials"))}
    options = dict(options, dielectric=next(iter(mats.values())))
    _placeholder(kind, options, "width", where, "losslane compare" if where.cli else "compare()")
    sec = _make_section(kind, options, where, lib)
    if foils is not None:
        if options.get("foil") or options.get("roughness_model"):
            raise LossLaneError(
                f"give either {k('foils')} X,Y or {k('foil')}/{k('roughness_model')}"
            )
        foil_map = {n: lib.foil(n, k("foils")) for n in _names(foils, k("foils"))}
    else:
        label = options.get("foil") or (
            f"{options['roughness_model']} {options.get('rq') or ''}".strip()
            if options.get("roughness_model")
            else "smooth"
        )
        foil_map = {str(label): sec.metal.foil}
    return compare_(sec, mats, foil_map, z, freqs, size_at=f0, where=where)


def parse_band(value: str | float, key: str = "band") -> tuple[float | None, float | None]:
    """An accepted band as (fraction, None) from "10%" or a fraction 0.1, or (None, ohm)
    from "5ohm"."""
    import re

    from losslane.units import parse_resistance

    if isinstance(value, (int, float)) and not isinstance(value, bool):
        if not 0 < value < 1:
            raise LossLaneError(f"{key} = {value!r}: a fraction between 0 and 1 (e.g. 0.1)")
        return float(value), None
    _digits(value, key)
    m = re.fullmatch(r"\s*(\d+\.?\d*|\.\d+)\s*%\s*", str(value))
    if m:
        frac = float(m.group(1)) / 100.0
        if not 0 < frac < 1:
            raise LossLaneError(f"{key} = {value!r}: a percentage between 0 and 100")
        return frac, None
    try:
        float(value)
    except ValueError:
        ohm = parse_resistance(value, key)
        if ohm <= 0:
            raise LossLaneError(f"{key} = {value!r}: must be > 0 ohm") from None
        return None, ohm
    raise LossLaneError(f"{key} = {value!r}: write a percentage (10%) or ohms (5ohm)")


#: spread reports progress above this many sample-frequency evaluations (about 1.5 s of
#: the vectorized models; the per-sample path counts 10 000 per sample)
PROGRESS_WORK = 1_000_000


def spread(
    kind: str,
    tolerances: Mapping[str, str | float],
    *,
    samples: int = 10_000,
    seed: int = 1,
    distribution: str = "normal",
    at: str | Iterable[str] = "1GHz",
    target: str | float | None = None,
    band: str | float = "10%",
    library_files: Iterable[Path | str] = (),
    progress: Callable[[int], None] | None = None,
    where: Where | None = None,
    **options: Any,
) -> SpreadResult:
    """Tolerance Monte Carlo of impedance and loss: ``tolerances`` maps a key (a dimension
    of the kind, or ``dk``) to its +/- value (``"0.5mil"``, ``"10%"``, ``0.1`` for Dk).
    ``band``: the accepted band around the target ("10%", "5ohm" or a fraction).
    ``progress(done, total)`` is called with the number of samples done, for runs long
    enough to deserve a progress bar (``PROGRESS_WORK``)."""
    from losslane.design.sizing import parse_target
    from losslane.design.spread import parse_tolerance
    from losslane.design.spread import spread as spread_
    from losslane.units import parse_frequency_list

    where = _where(where, "spread")
    freqs = parse_frequency_list(at, where.key("at"))
    z = (
        parse_target(_digits(target, where.key("target")), where.key("target"))
        if target is not None
        else None
    )
    frac, ohm = parse_band(band, where.key("band"))
    sec = _make_section(kind, options, where, _library(library_files))
    geo = sec.dimension_values()
    work = samples * len(freqs) if type(sec).vectorized() else samples * 10_000
    report = None
    if progress is not None and work >= PROGRESS_WORK:

        def report(done: int) -> None:
            progress(done, samples)

    tols = {}
    for key, value in tolerances.items():
        if value is None:
            continue
        nominal = sec.dielectric.dk if key == "dk" else geo.get(key, 0.0)
        _digits(value, where.tolerance(key))
        tols[key] = parse_tolerance(value, key, nominal, where)
    return spread_(
        sec,
        tols,
        freqs,
        samples=samples,
        seed=seed,
        distribution=distribution,
        target=z,
        band=frac if frac is not None else 0.1,
        band_ohm=ohm,
        progress=report,
        where=where,
    )


# --- the material library -----------------------------------------------------------------


@dataclass(frozen=True)
class MaterialsResult:
    """The library listing: dielectrics and foils with their source."""

    listing: dict

    def to_json(self) -> dict:
        return self.listing


def materials(
    library_files: Iterable[Path | str] = (), scenario_files: Iterable[Path | str] = ()
) -> MaterialsResult:
    """The dielectric and foil library (``--library`` and ``--scenario`` files added)."""
    from losslane.materials.catalog import catalog

    return MaterialsResult(catalog(library_files, scenario_files))


# --- channels ---------------------------------------------------------------------------


@dataclass
class BuildResult:
    """A built scenario: the channel, its budget and fit, the summary rows at the quoted
    frequencies, the files written, and the crosstalk of a channel on group lines
    (``crosstalk.evaluate.CrosstalkResult``, else None)."""

    channel: ChannelResult
    budget: ChannelBudget | None
    fit: LossFit | FitOff | None
    summary: list[dict]
    files: list[Path] = field(default_factory=list)
    overlay: MeasuredOverlay | None = None
    crosstalk: Any = None
    views: Inspection | None = None  # quality and time-domain views of the written S

    @property
    def warnings(self) -> list[str]:
        return self.channel.warnings

    @property
    def passed(self) -> bool | None:
        """The budget's verdict with the crosstalk noise limit's (None without a [budget])."""
        if self.budget is None:
            return None
        return self.budget.passed and self.crosstalk_passed is not False

    @property
    def crosstalk_passed(self) -> bool | None:
        """The integrated crosstalk noise within [budget] max_icn (None: not judged)."""
        return None if self.crosstalk is None else self.crosstalk.passed

    def to_json(self) -> dict:
        """The `losslane build --json` object."""
        from losslane.report.channel import summary_json
        from losslane.report.models import lines_json, skews_json, vias_json

        data = summary_json(self.channel, self.summary, self.files)
        budget = self.budget
        nyq = budget.nyquist.at if budget is not None and budget.nyquist is not None else None
        data["budget"] = None if budget is None else budget.to_json()
        data["fit"] = None if self.fit is None else self.fit.to_json(nyq)
        data["crosstalk"] = None if self.crosstalk is None else self.crosstalk.to_json()
        data["warnings"] = list(self.warnings)
        data["measured"] = None if self.overlay is None else self.overlay.to_json()
        from losslane.report.timeviews import build_json

        data.update(build_json(self.views))
        data["lines"] = lines_json(self.channel)
        data["vias"] = vias_json(self.channel)
        data["skews"] = skews_json(self.channel)
        return data


def demo_scenario_path(single_ended: bool = False) -> Path:
    """The bundled demo scenario file (the differential lane, or its single-ended variant)."""
    from importlib import resources

    name = "sensor-lane-single.toml" if single_ended else "sensor-lane.toml"
    return Path(str(resources.files("losslane").joinpath("data", "demo", name)))


def build(
    scenario: str | Path,
    out: str | Path | None = None,
    version: int = 1,
    form: str = "ri",
    plots: bool = True,
    skip_fit: bool = False,
) -> BuildResult:
    """Build a scenario file: the Touchstone file, charts, the loss budget, the report
    page, written into ``out`` (default ``./<scenario name>``). ``skip_fit`` turns the
    fitted insertion loss off (as ``[budget] fit = false`` does, also without a [budget]).

    Model warnings raised on the way are kept in ``BuildResult.warnings`` (and listed in
    the report) and then re-issued, so callers still see them.
    """
    import warnings

    from losslane.bands import validate_limits
    from losslane.budget import validate
    from losslane.errors import LossLaneWarning, warn
    from losslane.plotspec import check_plots
    from losslane.report.channel import prepare_out_dir, write_build
    from losslane.report.output import MAX_STEM, file_stem
    from losslane.scenario import load_scenario

    caught: list = []
    try:
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", LossLaneWarning)
            sc = load_scenario(scenario)
            points = validate(sc)  # budget frequencies against the sweep, before any work
            validate_limits(sc)  # bands and masks likewise
            check_plots(sc.plots, sc.frequencies())
            stem, cut = file_stem(sc.name)
            if cut:
                warn(
                    f"name is {len(sc.name)} characters long; the output files are named "
                    f"{stem!r}... (file stems are cut to {MAX_STEM} characters)"
                )
            out_dir = prepare_out_dir(out if out is not None else stem)
            result = build_result(sc, points, skip_fit=skip_fit)
    finally:
        # outside the recording block, so the caller's own filters see them again
        messages = _reissue(caught, LossLaneWarning)
    result.channel.warnings = messages
    result.files = write_build(
        result.channel,
        result.budget,
        result.fit,
        result.summary,
        out_dir,
        version,
        form,
        plots,
        overlay=result.overlay,
        crosstalk=result.crosstalk,
        views=result.views,
    )
    return result


def build_result(scenario, points=None, skip_fit: bool = False) -> BuildResult:
    """The channel, budget, fit and summary of a loaded scenario
    (``scenario.Scenario``), without writing files: what ``build`` writes out, and what a
    sweep evaluates per case. ``points``: the budget's check points if already found;
    ``skip_fit``: no fitted insertion loss."""
    from losslane.budget import FitOff, evaluate_budget, fit_channel, validate
    from losslane.channel import build_channel
    from losslane.channel_views import channel_inspection
    from losslane.report.channel import summary_frequencies, summary_rows

    if points is None:
        from losslane.bands import validate_limits

        points = validate(scenario)
        validate_limits(scenario)
    channel = build_channel(scenario)
    budget = evaluate_budget(channel, points=points)
    fit = fit_channel(channel, enabled=not skip_fit)
    if fit is None:
        fit = FitOff("the sweep is too coarse for the four-term fit")
    overlay = crosstalk = None  # imported only when the scenario asks for them
    if scenario.compare is not None:
        from losslane.measure.overlay import measured_overlay

        overlay = measured_overlay(channel, summary_frequencies(channel))
    if scenario.crosstalk is not None:
        from losslane.crosstalk.evaluate import evaluate_crosstalk

        crosstalk = evaluate_crosstalk(channel)
    views = channel_inspection(channel)
    return BuildResult(
        channel,
        budget,
        fit,
        summary_rows(channel),
        overlay=overlay,
        crosstalk=crosstalk,
        views=views,
    )


def demo(
    out: str | Path = "losslane-demo",
    single_ended: bool = False,
    plots: bool = True,
    skip_fit: bool = False,
) -> BuildResult:
    """Build the bundled example channel (see :func:`demo_scenario_path`)."""
    return build(demo_scenario_path(single_ended), out=out, plots=plots, skip_fit=skip_fit)


def _reissue(caught: list, category: type) -> list[str]:
    """Re-issue recorded warnings outside the recording block; return the distinct
    messages of ``category``, in order."""
    import warnings

    messages: list[str] = []
    for w in caught:
        if issubclass(w.category, category):
            msg = str(w.message)
            if msg not in messages:
                messages.append(msg)
                warnings.warn(msg, category, stacklevel=3)
        else:
            warnings.warn_explicit(w.message, w.category, w.filename, w.lineno, source=w.source)
    return messages


# --- sweeps -----------------------------------------------------------------------------


@dataclass
class SweepResult:
    """A finished sweep: its plan, the table (pyarrow; one row per case, the varied
    columns then the result columns and ``error``), where it was written, the charts and
    the distinct warnings met."""

    plan: Any
    table: Any
    out: Path | None
    warnings: list[str] = field(default_factory=list)
    charts: list[Path] = field(default_factory=list)

    @property
    def cases(self) -> int:
        return self.table.num_rows

    @property
    def failed(self) -> int:
        return self.cases - self.table.column("error").null_count

    @property
    def varied_columns(self) -> list[str]:
        names = []
        for p in self.plan.parameters:
            names.append(p.key)
            if f"{p.key}_m" in self.table.column_names:
                names.append(f"{p.key}_m")
        return names

    def to_json(self) -> dict:
        """The `losslane sweep --json` object: the counts, the output, the columns and
        the summary (ranges, best and worst cases)."""
        from losslane.report.sweep import summary

        return {
            "plan": self.plan.name,
            "cases": self.cases,
            "failed": self.failed,
            "out": None if self.out is None else str(self.out),
            "columns": list(self.table.column_names),
            "summary": summary(self),
            "charts": [str(p) for p in self.charts],
            "warnings": list(self.warnings),
        }

    def to_pandas(self):
        return self.table.to_pandas()


def run_sweep(
    plan: str | Path,
    out: str | Path | None = None,
    *,
    workers: int | None = None,
    scheduler: str | None = None,
    charts: bool = True,
    progress: Callable[[int, int], None] | None = None,
) -> SweepResult:
    """Run the sweep plan file ``plan`` on dask.distributed (a local cluster of
    ``workers`` processes, default the machine's cores; ``workers=0`` in this process; or
    the cluster at ``scheduler``) into ``out`` (.parquet or .csv; default
    ``<plan name>.parquet`` beside nothing but the current directory). Finished chunks
    are kept in ``<out>.parts/`` so that a re-run resumes. ``progress(done, total)``."""
    from losslane.report.sweep import sweep_charts
    from losslane.sweep.plan import load_plan
    from losslane.sweep.run import run, write_table

    p = load_plan(plan)
    from losslane.report.channel import slug
    from losslane.report.output import check_output_file

    target = Path(out) if out is not None else Path(f"{slug(p.name)}.parquet")
    if target.suffix.lower() not in (".parquet", ".csv"):
        raise LossLaneError(f"--out {str(target)!r}: the table is written as .parquet or .csv")
    check_output_file(target, "--out", None)  # the one rule of output locations
    if workers is not None and (isinstance(workers, bool) or workers < 0):
        raise LossLaneError(f"--workers = {workers!r}: expected a whole number >= 0")
    table, warned = run(p, target, workers=workers, scheduler=scheduler, progress=progress)
    write_table(table, target)
    result = SweepResult(p, table, target, warned)
    if charts:
        result.charts = sweep_charts(result, target.with_suffix(""))
    return result


def sweep(plan: str | Path, out: str | Path | None = None, **options: Any):
    """The table of a sweep plan: a pandas DataFrame if pandas is installed, else the
    pyarrow table (see :func:`run_sweep` for the options)."""
    if out is None:
        import tempfile

        with tempfile.TemporaryDirectory() as d:
            result = run_sweep(plan, Path(d) / "sweep.parquet", charts=False, **options)
    else:
        result = run_sweep(plan, out, **options)
    try:
        return result.to_pandas()
    except ImportError:
        return result.table


# --- measured coupons -----------------------------------------------------------------

#: the headline frequencies of ``extract`` when none are given (those inside the band)
EXTRACT_AT = (1e9, 10e9, 28e9)


def _length_list(value: str | Iterable[str], key: str) -> list[float]:
    """Lengths with units from ``"2in,5in,9in"`` (a unit on the last item applies to bare
    numbers before it: ``"2,5,9 in"``) or a list of texts."""
    import re

    from losslane.units import parse_length

    if not isinstance(value, str):
        items = [str(v) for v in value] if isinstance(value, Iterable) else [value]
        return [parse_length(v, key) for v in items]
    items = [s.strip() for s in value.split(",")]
    if not value.strip() or any(not s for s in items):
        raise LossLaneError(f"{key} = {value!r}: expected comma-separated lengths, e.g. 2in,6in")
    unit = re.match(r"^[-+0-9.eE\s]*?([A-Za-z].*)$", items[-1])
    bare = re.compile(r"^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$")
    out = []
    for item in items:
        if bare.match(item) and unit is not None:
            item = f"{item} {unit.group(1)}"
        out.append(parse_length(item, key))
    return out


def _coupons(files: Iterable[str | Path], where: Where) -> list:
    """The coupon files read as networks named by their file names."""
    from losslane.network.touchstone import read_touchstone

    what = "FILE" if where.cli else "files"
    paths = [Path(files)] if isinstance(files, str | Path) else [Path(p) for p in files]
    if len(paths) < 2:
        raise LossLaneError(
            f"{what}: {len(paths)} coupon file(s) given; the extraction needs at least two "
            "Touchstone files of the same line at different lengths"
        )
    nets = []
    for p in paths:
        if not p.is_file():
            raise LossLaneError(f"{what} {str(p)!r} does not exist (or is not a file)")
        net = read_touchstone(p)
        net.name = p.name
        nets.append(net)
    return nets


def _extraction(
    files, lengths, order: str, mode: str | None, at, noise, noise_floor, where: Where
) -> LineExtraction:
    import dataclasses

    import numpy as np

    from losslane.measure.extract import MODES, NOISE_FLOOR, NOISE_RELATIVE, extract_line
    from losslane.network.ports import check_order
    from losslane.units import parse_frequency_list

    k = where.key
    check_order(order, k("order"))
    if mode is not None and mode not in MODES:
        raise LossLaneError(
            f"{where.setting('mode', mode)} is not valid; valid: {', '.join(MODES)}"
        )
    lens = _length_list(lengths, k("lengths"))
    freqs = parse_frequency_list(at, k("at")) if at is not None else None
    noise_values = {}
    for key, value, default in (
        ("noise", noise, NOISE_RELATIVE),
        ("noise_floor", noise_floor, NOISE_FLOOR),
    ):
        value = default if value is None else value
        try:
            value = float(value)
        except (TypeError, ValueError):
            raise LossLaneError(f"{k(key)} = {value!r}: expected a number >= 0") from None
        if not value >= 0 or not np.isfinite(value):
            raise LossLaneError(f"{k(key)} = {value!r}: expected a finite number >= 0")
        noise_values[key] = value
    if noise_values["noise"] == 0 and noise_values["noise_floor"] == 0:
        raise LossLaneError(f"{k('noise')} and {k('noise_floor')} are both 0; give one > 0")
    nets = _coupons(files, where)
    if len(lens) != len(nets):
        raise LossLaneError(
            f"{k('lengths')} = {lengths!r}: {len(lens)} length(s) for {len(nets)} files; give "
            "one length per file, in the same order"
        )
    for name, ln in zip((n.name for n in nets), lens, strict=True):
        if ln < 0:
            raise LossLaneError(f"{k('lengths')}: {ln:g} m for {name!r} is not a length >= 0")
    for i in range(len(lens)):
        for j in range(i + 1, len(lens)):
            if abs(lens[i] - lens[j]) <= 1e-6 * max(lens[i], lens[j], 1e-3):
                raise LossLaneError(
                    f"{k('lengths')}: {nets[i].name!r} and {nets[j].name!r} both have length "
                    f"{lens[i]:g} m; the coupons' lengths must differ"
                )
    ports = nets[0].nports
    if mode is not None and (ports == 2) != (mode == "single-ended"):
        valid = "single-ended" if ports == 2 else "differential or common"
        raise LossLaneError(
            f"{where.setting('mode', mode)} does not fit {ports}-port coupons; use {valid}"
        )
    ext = extract_line(
        nets,
        lens,
        mode=mode,
        order=order,
        noise_relative=noise_values["noise"],
        noise_floor=noise_values["noise_floor"],
    )
    lo, hi = float(ext.f[0]), float(ext.f[-1])
    if freqs is None:
        freqs = [x for x in EXTRACT_AT if lo <= x <= hi]
    for x in freqs:
        if not lo * (1 - 1e-12) <= x <= hi * (1 + 1e-12):
            raise LossLaneError(
                f"{k('at')}: {x:g} Hz is outside the extracted band {lo:g}..{hi:g} Hz; "
                "choose frequencies inside the measured band"
            )
    return dataclasses.replace(ext, at_hz=tuple(float(x) for x in freqs))


@dataclass
class ExtractResult:
    """The line extracted from coupons (``measure.extract.LineExtraction``) and the files
    written."""

    extraction: LineExtraction
    files: list[Path] = field(default_factory=list)

    def to_json(self) -> dict:
        """The `losslane extract --json` object."""
        from losslane.report.strict_json import sanitize

        data = self.extraction.to_json()
        data["files"] = [str(p) for p in self.files]
        return sanitize(data)


def extract(
    files: Iterable[str | Path],
    lengths: str | Iterable[str],
    *,
    order: str = "in-in-out-out",
    mode: str | None = None,
    at: str | Iterable[str] | None = None,
    noise: float | None = None,
    noise_floor: float | None = None,
    out: str | Path | None = None,
    plots: bool = True,
    where: Where | None = None,
) -> ExtractResult:
    """Loss per inch, eps_eff and delay of the line common to coupon ``files`` (Touchstone,
    2-port lines or 4-port pairs) of ``lengths`` (``"2in,6in"``), the launches removed
    (two-line / multiline eigenvalue method, :mod:`losslane.measure.extract`).

    ``order``: a 4-port's numbering; ``mode``: "single-ended" (2-ports), "differential"
    (default for 4-ports) or "common"; ``at``: frequencies of the headline values (default
    1, 10 and 28 GHz, those inside the band); ``noise`` (relative) and ``noise_floor``:
    the measurement noise that sets the weights, uncertainties and flags. With ``out``,
    the curves (CSV) and, with ``plots``, two charts are written into that directory.
    """
    from losslane.report.measure import write_extract_files

    where = _where(where, "extract")
    if out is not None:
        from losslane.report.channel import prepare_out_dir

        prepare_out_dir(out)
    ext = _extraction(files, lengths, order, mode, at, noise, noise_floor, where)
    written = write_extract_files(ext, out, plots) if out is not None else []
    return ExtractResult(ext, written)


@dataclass
class FitResult:
    """Materials fitted to coupons: the extraction, the fit (``measure.fit.MaterialFit``),
    the library file written (or None) with its entry names, and the chart files."""

    extraction: LineExtraction
    fit: MaterialFit
    library_file: Path | None = None
    library_names: tuple[str, str] = ("fitted", "fitted-foil")
    files: list[Path] = field(default_factory=list)

    def to_json(self) -> dict:
        """The `losslane fit --json` object."""
        from losslane.report.strict_json import sanitize

        data = self.fit.to_json()
        ext = self.extraction
        data["extraction"] = {
            "mode": ext.mode,
            "usable_band_hz": list(ext.usable_band_hz) if ext.usable_band_hz else None,
            "coupons": [
                {"name": n, "length_m": ln}
                for n, ln in zip(ext.sources, ext.lengths_m, strict=True)
            ],
            "checks": [c.to_json() for c in ext.checks],
        }
        data["library_file"] = None if self.library_file is None else str(self.library_file)
        data["library_names"] = {
            "dielectric": self.library_names[0],
            "foil": self.library_names[1],
        }
        data["files"] = [str(p) for p in self.files]
        return sanitize(data)


#: option values the command line passes by default; they do not count as given options
_DEFAULT_OPTIONS = {"dielectric_model": "wideband-debye", "solver": "closed-form"}


def _fit_section(
    kind: str | None,
    scenario: str | Path | None,
    line_name: str | None,
    options: Mapping[str, Any],
    library_files,
    where: Where,
) -> CrossSection:
    """The cross-section the coupons were built on: KIND and its options, or a
    [lines.NAME] of a scenario file with the scenario's own materials."""
    from losslane.spec import suggest

    k = where.key
    given = [key for key, v in options.items() if v is not None and _DEFAULT_OPTIONS.get(key) != v]
    if scenario is not None or line_name is not None:
        if scenario is None or line_name is None:
            raise LossLaneError(f"give {k('scenario')} FILE together with {k('line')} NAME")
        if kind is not None or given or tuple(library_files):
            extra = ", ".join(
                ([k("kind")] if kind is not None else [])
                + [k(x) for x in given]
                + ([k("library")] if tuple(library_files) else [])
            )
            raise LossLaneError(
                f"{k('scenario')} {scenario} {k('line')} {line_name} takes the cross-section "
                f"and its materials from the scenario; leave out {extra}"
            )
        from losslane.scenario import load_scenario

        sc = load_scenario(scenario)
        if line_name not in sc.lines:
            raise LossLaneError(
                f"{where.setting('line', line_name)}: no [lines.{line_name}] in {scenario}; "
                f"{suggest(str(line_name), sc.lines)}"
            )
        return sc.lines[line_name]
    if kind is None:
        raise LossLaneError(
            f"give the cross-section the coupons were built on: {k('kind')} with its geometry "
            f"and material options (as for `line`), or {k('scenario')} FILE {k('line')} NAME"
        )
    return _make_section(kind, options, where, _library(library_files))


def _fit_foil_model(section, vary: tuple[str, ...], foil_model: str | None, where: Where):
    """The roughness model to fit: ``foil_model``, else the section's, else what ``vary``
    names (radius, surface_ratio: Huray; rq: Hammerstad)."""
    from losslane.measure.fit import FOIL_PARAMETERS

    k = where.key
    own = getattr(section.metal.foil, "model", "none")
    if foil_model is not None and foil_model not in FOIL_PARAMETERS:
        raise LossLaneError(
            f"{where.setting('foil_model', foil_model)} is not valid; valid: "
            f"{', '.join(FOIL_PARAMETERS)}"
        )
    model = foil_model
    if model is None:
        if {"radius", "surface_ratio"} & set(vary):
            model = own if own == "huray" else "huray"
        elif "rq" in vary:
            model = own if own in ("hammerstad", "groiss") else "hammerstad"
        else:
            model = own
    if model not in FOIL_PARAMETERS:
        raise LossLaneError(
            f"the section's foil (model {model!r}) cannot be held in a fit; start from a foil "
            f"of model {', '.join(FOIL_PARAMETERS)} ({k('foil')} NAME or "
            f"{k('roughness_model')}) or name one with {k('foil_model')}"
        )
    for p in vary:
        if p in ("rq", "radius", "surface_ratio") and p not in FOIL_PARAMETERS[model]:
            theirs = ", ".join(FOIL_PARAMETERS[model]) or "none"
            raise LossLaneError(
                f"{k('vary')}: {p!r} is not a parameter of the {model!r} roughness model (its "
                f"parameters: {theirs}); choose {k('foil_model')} or another parameter"
            )
    keys = FOIL_PARAMETERS[model]
    spheres = getattr(section.metal.foil, "spheres", ())
    if model == "huray" and own == "huray" and len(spheres) != 1 and set(keys) & set(vary):
        raise LossLaneError(
            f"{k('vary')}: the Huray fit takes one sphere size; the section's foil has "
            f"{len(spheres)} (hold radius and surface_ratio fixed, or start from a one-size foil)"
        )
    if model != own and keys and not set(keys) & set(vary):
        raise LossLaneError(
            f"{where.setting('foil_model', model)} replaces the section's {own!r} foil, whose "
            f"parameters it cannot take over: add {', '.join(keys)} to {k('vary')}"
        )
    return model


def _fit_message(message: str, where: Where, band_given: bool) -> str:
    """A message of ``measure.fit`` in the caller's words: its keyword names as the
    caller's options (``--band``), and a band the caller did not give as the extraction's."""
    import re

    if not band_given:
        message = re.sub(r"^band = ", "the extraction's usable band ", message)
    names = ("vary", "foil_model", "band", "mode")
    pattern = r"\b(" + "|".join(names) + r")\b(?= = |:)"
    return re.sub(pattern, lambda m: where.key(m.group(1)), message)


def fit(
    files: Iterable[str | Path],
    lengths: str | Iterable[str],
    kind: str | None = None,
    *,
    vary: str | Iterable[str] = "dk,df,rq",
    band: str | Iterable[str] | None = None,
    scenario: str | Path | None = None,
    line: str | None = None,
    foil_model: str | None = None,
    order: str = "in-in-out-out",
    mode: str | None = None,
    noise: float | None = None,
    noise_floor: float | None = None,
    write_library: str | Path | None = None,
    names: str | Iterable[str] = "fitted,fitted-foil",
    out: str | Path | None = None,
    plots: bool = True,
    library_files: Iterable[Path | str] = (),
    where: Where | None = None,
    **options: Any,
) -> FitResult:
    """Fit the materials of the line on coupon ``files`` of ``lengths``: Dk and Df (wideband
    Debye, at the starting dielectric's frequency), the foil's roughness and/or the
    conductivity named in ``vary`` (:mod:`losslane.measure.fit`), the rest held as given.

    The cross-section: ``kind`` with the options of :func:`line` (its materials are the
    starting values), or ``scenario`` and ``line`` (a [lines.*] of that file). ``band``:
    ``"START,STOP"`` (default the extraction's usable band); ``foil_model``: the roughness
    model to fit (default the section's; ``radius``/``surface_ratio`` imply Huray, ``rq``
    Hammerstad). ``write_library``: a library TOML file with the fitted dielectric and
    foil under ``names`` ("DIELECTRIC,FOIL"), for a scenario's ``library = [...]``.
    ``out``: a directory for the charts and the curves (CSV).
    """
    import tomllib

    from losslane.atomic import write_atomic
    from losslane.materials.library import load_library
    from losslane.measure.fit import PARAMETERS, fit_materials
    from losslane.report.measure import write_fit_files
    from losslane.units import parse_frequency_list

    where = _where(where, "fit")
    k = where.key
    raw = [vary] if isinstance(vary, str) else list(vary)
    wanted = [v.strip().replace("-", "_") for item in raw for v in str(item).split(",")]
    if not wanted or any(not v for v in wanted):
        raise LossLaneError(f"{k('vary')} = {vary!r}: expected names such as dk,df,rq")
    for v in wanted:
        if v not in PARAMETERS:
            raise LossLaneError(
                f"{k('vary')}: unknown parameter {v!r}; valid: {', '.join(PARAMETERS)}"
            )
    vary_t = tuple(dict.fromkeys(wanted))
    band_hz = None
    if band is not None:
        b = parse_frequency_list(band, k("band"))
        if len(b) != 2 or not 0 < b[0] < b[1]:
            raise LossLaneError(
                f"{k('band')} = {band!r}: expected START,STOP with 0 < START < STOP "
                "(e.g. 1GHz,30GHz)"
            )
        band_hz = (b[0], b[1])
    entry = _names(names, k("names"))
    if len(entry) == 1:
        entry.append(f"{entry[0]}-foil")
    if len(entry) != 2:
        raise LossLaneError(
            f"{k('names')} = {names!r}: give DIELECTRIC,FOIL (two names for the library entries)"
        )
    lib_path = None
    if write_library is not None:
        lib_path = Path(write_library)
        parent = lib_path.parent if str(lib_path.parent) else Path(".")
        if lib_path.is_dir() or not parent.is_dir():
            raise LossLaneError(
                f"{k('write_library')} {str(lib_path)!r}: give a file name in an existing directory"
            )
    if out is not None:
        from losslane.report.channel import prepare_out_dir

        prepare_out_dir(out)
    section = _fit_section(kind, scenario, line, options, library_files, where)
    model = _fit_foil_model(section, vary_t, foil_model, where)
    ext = _extraction(files, lengths, order, mode, (), noise, noise_floor, where)
    ports = 2 * section.n_conductors
    coupon_ports = 2 if ext.mode == "single-ended" else 4
    if ports != coupon_ports:
        what = {2: "a single line", 4: "a pair"}
        named = f"{k('kind')} {kind}" if kind is not None else f"{k('line')} {line}"
        raise LossLaneError(
            f"the coupons are {coupon_ports}-port files ({what[coupon_ports]}) but the "
            f"cross-section ({named}) is {what.get(ports, f'{ports // 2} conductors')}; "
            f"give the kind of {what[coupon_ports]}"
        )
    if band_hz is not None and (band_hz[1] < ext.f[0] or band_hz[0] > ext.f[-1]):
        raise LossLaneError(
            f"{k('band')} = {band!r} lies outside the measured band {ext.f[0]:g}..{ext.f[-1]:g} Hz"
        )
    usable = ext.usable_band_hz
    if band_hz is None and (usable is None or not usable[0] < usable[1]):
        found = "no point" if usable is None else f"only {usable[0]:g} Hz"
        raise LossLaneError(
            f"the extraction's usable band holds {found} (every other point is flagged: see "
            f"`losslane extract` on these coupons); give {k('band')} START,STOP to choose the "
            "band yourself"
        )
    try:
        result = fit_materials(ext, section, vary_t, band=band_hz, foil_model=model)
    except LossLaneError as exc:  # the fit's keywords, as this caller names them
        raise LossLaneError(_fit_message(str(exc), where, band_hz is not None)) from None
    written = write_fit_files(result, out, plots) if out is not None else []
    if lib_path is not None:
        text_ = result.library_toml(entry[0], entry[1])

        def write(tmp: Path) -> None:
            tmp.write_text(text_, encoding="utf-8")
            tomllib.loads(text_)
            load_library([tmp])  # it loads back as a library, or nothing is written

        write_atomic(lib_path, write)
    return FitResult(ext, result, lib_path, (entry[0], entry[1]), written)


# --- inspecting S-parameters -----------------------------------------------------------


@dataclass
class InspectResult:
    """An inspected S-parameter set: ``inspection`` (its IEEE 370 quality and time-domain
    views), ``source`` (the file, or the network's name) and the ``files`` written."""

    inspection: Inspection
    source: str | None
    files: list[Path] = field(default_factory=list)

    def to_json(self) -> dict:
        """The `losslane inspect --json` object."""
        return {
            "file": self.source,
            **self.inspection.to_json(),
            "files": [str(p) for p in self.files],
        }


def _quantity_arg(value, kind: str, key: str) -> float | None:
    """A keyword given as text with a unit, or as a number in SI units."""
    import math

    from losslane.units import parse_quantity

    if value is None:
        return None
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        v = float(value)
        if not math.isfinite(v):
            raise LossLaneError(f"{key} = {value!r}: not a finite {kind}")
        return v
    return parse_quantity(value, kind, key)


def _file_references(net, where: Where) -> tuple[float, ...]:
    """The per-port reference impedances a network carries (real, positive, the same at
    every frequency), or an error asking for ``z_ref``."""
    import numpy as np

    z0 = np.asarray(net.z0)
    if np.any(z0.imag != 0) or np.any(z0.real <= 0) or np.any(z0 != z0[:1]):
        raise LossLaneError(
            "the data's reference impedance is not one real, positive value per port at "
            f"every frequency; give {where.key('z_ref')} (ohm)"
        )
    return tuple(float(z) for z in z0[0].real)


def _check_time_window(f, rise, rise_time, rate, data_rate, modulation, where: Where) -> None:
    """The stimulus must fit the data's time window 1 / step: a rise time at most half of
    it, a pulse's seven unit intervals all of it."""
    import numpy as np

    from losslane.network.timedomain import longest_rise_time, lowest_data_rate, time_window
    from losslane.timesettings import pulse_span

    f = np.asarray(f, dtype=float)
    if f.size < 2:
        return
    k = where.key
    if rise is not None and rise > longest_rise_time(f):
        raise LossLaneError(
            f"{k('rise_time')} = {rise_time!r}: the data's time window (1 / step) is "
            f"{time_window(f) * 1e9:.4g} ns, and a rise time may fill at most half of it "
            f"({longest_rise_time(f) * 1e9:.4g} ns)"
        )
    if rate is not None and rate < lowest_data_rate(f, modulation):
        raise LossLaneError(
            f"{k('data_rate')} = {data_rate!r}: {pulse_span(time_window(f))}; use a rate of at "
            f"least {lowest_data_rate(f, modulation) / 1e9:.4g} Gb/s"
        )


def inspect(
    path_or_network,
    *,
    order: str = "in-in-out-out",
    rise_time: str | float | None = None,
    data_rate: str | float | None = None,
    modulation: str = "nrz",
    delay_per_in: str | float | None = None,
    z_ref: str | float | None = None,
    out: str | Path | None = None,
    where: Where | None = None,
) -> InspectResult:
    """The IEEE 370 quality and the time-domain views of a Touchstone file (1-, 2- or
    differential 4-port) or a ``skrf.Network``, judged as it is (nothing repaired):

    ``order`` the 4-port numbering; ``rise_time`` the stimulus' 10-90 % rise time
    ("30ps" or seconds; default 0.75 / the top frequency); ``data_rate`` ("32Gb/s" or
    b/s) and ``modulation`` ("nrz", "pam4") for the pulse response (none without a data
    rate); ``delay_per_in`` ("170ps" or seconds per inch) adds one-way distances to the
    impedance profiles; ``z_ref`` overrides the file's reference impedance ("50ohm" or
    ohm); ``out``: a directory for the charts and the report page (none written without).
    """
    from losslane.network.inspection import inspect_network
    from losslane.network.ports import check_order
    from losslane.network.touchstone import read_touchstone
    from losslane.signalling import MODULATIONS
    from losslane.units import INCH

    where = _where(where, "inspect")
    k = where.key
    check_order(order, k("order"))
    if modulation not in MODULATIONS:
        raise LossLaneError(
            f"{where.setting('modulation', modulation)} is not known; valid values are "
            + ", ".join(repr(m) for m in MODULATIONS)
        )
    rise = _quantity_arg(rise_time, "time", k("rise_time"))
    rate = _quantity_arg(data_rate, "data rate", k("data_rate"))
    per_in = _quantity_arg(delay_per_in, "time", k("delay_per_in"))
    zr = _quantity_arg(z_ref, "resistance", k("z_ref"))
    for key, v in (("rise_time", rise), ("data_rate", rate), ("delay_per_in", per_in)):
        if v is not None and not v > 0:
            raise LossLaneError(f"{k(key)} = {v!r}: must be > 0")
    if zr is not None and not zr > 0:
        raise LossLaneError(f"{k('z_ref')} = {zr!r} ohm: must be > 0 ohm")
    if out is not None:
        from losslane.report.channel import prepare_out_dir

        prepare_out_dir(out)  # before any work, as the other commands do
    if isinstance(path_or_network, (str, Path)):
        net = read_touchstone(path_or_network)
        source = str(path_or_network)
        stem_from = Path(path_or_network).stem
    else:
        net = path_or_network
        if not hasattr(net, "s") or not hasattr(net, "f"):
            raise LossLaneError(
                f"inspect: {type(net).__name__} is neither a Touchstone file's path nor a "
                "skrf.Network"
            )
        source = getattr(net, "name", None) or None
        stem_from = source or "network"
    refs = (zr,) if zr is not None else _file_references(net, where)
    if rise is not None and rise < 0.5 / float(net.f[-1]) * (1 - 1e-9):
        raise LossLaneError(
            f"{k('rise_time')} = {rise_time!r}: the data end at {float(net.f[-1]) / 1e9:g} GHz, "
            f"so the rise time must be >= {0.5 / float(net.f[-1]) * 1e12:.4g} ps (0.5 / f_max); "
            f"the default is {0.75 / float(net.f[-1]) * 1e12:.4g} ps"
        )
    _check_time_window(net.f, rise, rise_time, rate, data_rate, modulation, where)
    try:
        insp = inspect_network(
            net.f,
            net.s,
            refs[0] if len(refs) == 1 else refs,
            order,
            rise_time=rise,
            data_rate=rate,
            modulation=modulation,
            delay_per_m=None if per_in is None else per_in / INCH,
        )
    except LossLaneError as exc:  # what the data cannot give: name the file
        if not isinstance(path_or_network, (str, Path)):
            raise
        raise LossLaneError(f"touchstone file {source!r}: {exc}") from None
    result = InspectResult(insp, source)
    if out is not None:
        from losslane.report.channel import slug
        from losslane.report.inspect import write_inspect

        result.files = write_inspect(insp, source, out, slug(stem_from))
    return result

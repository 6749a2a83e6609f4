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
    "LineResult",
    "MaterialsResult",
    "Where",
    "__version__",
    "build",
    "cli_where",
    "compare",
    "demo",
    "demo_scenario_path",
    "line",
    "materials",
    "section",
    "size",
    "spread",
]

if TYPE_CHECKING:
    from losslane.budget import ChannelBudget, LossFit
    from losslane.channel import ChannelResult
    from losslane.design.compare import CompareResult
    from losslane.design.sizing import SizeResult
    from losslane.design.spread import SpreadResult
    from losslane.materials.library import Library
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
        if not dk >= 1.0:
            raise LossLaneError(
                f"{k('dk')} = {dk!r}: a relative permittivity is >= 1 "
                "(air 1, board laminates 2.5..5)"
            )
        if not 0.0 <= df < 1.0:
            raise LossLaneError(
                f"{k('df')} = {df!r}: a loss tangent lies in 0 <= df < 1 (laminates 0.001..0.03)"
            )
        if dk_at is None and model == "wideband-debye":
            raise LossLaneError(
                f"{k('dk_at')} is missing: the frequency at which {k('dk')}/{k('df')} hold "
                f"(e.g. 10GHz); or use {where.setting('dielectric_model', 'constant')}"
            )
        at_hz = parse_frequency(dk_at, k("dk_at")) if dk_at is not None else None
        spec["dielectric"] = make_dielectric(dk, df, at_hz, model, "dielectric")
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
    z = parse_target(target, where.key("target"))
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
    z = parse_target(target, k("target"))
    freqs = parse_frequency_list(at, k("at"))
    f0 = parse_frequency(size_at, k("size_at"))
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
    z = parse_target(target, where.key("target")) if target is not None else None
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
    frequencies, and the files written."""

    channel: ChannelResult
    budget: ChannelBudget | None
    fit: LossFit | None
    summary: list[dict]
    files: list[Path] = field(default_factory=list)

    @property
    def warnings(self) -> list[str]:
        return self.channel.warnings

    @property
    def passed(self) -> bool | None:
        """The budget's verdict (None without a [budget])."""
        return None if self.budget is None else self.budget.passed

    def to_json(self) -> dict:
        """The `losslane build --json` object."""
        from losslane.report.channel import summary_json

        data = summary_json(self.channel, self.summary, self.files)
        budget = self.budget
        nyq = budget.nyquist.at if budget is not None and budget.nyquist is not None else None
        data["budget"] = None if budget is None else budget.to_json()
        data["fit"] = None if self.fit is None else self.fit.to_json(nyq)
        data["warnings"] = list(self.warnings)
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
) -> BuildResult:
    """Build a scenario file: the Touchstone file, charts, the loss budget, the report
    page, written into ``out`` (default ``./<scenario name>``).

    Model warnings raised on the way are kept in ``BuildResult.warnings`` (and listed in
    the report) and then re-issued, so callers still see them.
    """
    import warnings

    from losslane.budget import evaluate_budget, fit_channel, validate
    from losslane.channel import build_channel
    from losslane.errors import LossLaneWarning
    from losslane.report.channel import prepare_out_dir, slug, summary_rows, write_build
    from losslane.scenario import load_scenario

    caught: list = []
    try:
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", LossLaneWarning)
            sc = load_scenario(scenario)
            points = validate(sc)  # budget frequencies against the sweep, before any work
            out_dir = prepare_out_dir(out if out is not None else slug(sc.name))
            channel = build_channel(sc)
            budget = evaluate_budget(channel, points=points)
            fit = fit_channel(channel)
    finally:
        # outside the recording block, so the caller's own filters see them again
        messages = _reissue(caught, LossLaneWarning)
    channel.warnings = messages
    summary = summary_rows(channel)
    result = BuildResult(channel, budget, fit, summary)
    result.files = write_build(channel, budget, fit, summary, out_dir, version, form, plots)
    return result


def demo(
    out: str | Path = "losslane-demo", single_ended: bool = False, plots: bool = True
) -> BuildResult:
    """Build the bundled example channel (see :func:`demo_scenario_path`)."""
    return build(demo_scenario_path(single_ended), out=out, plots=plots)


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

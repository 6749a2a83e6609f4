"""Python entry points that mirror the command-line commands (same inputs, same results)."""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from pathlib import Path

from losslane.errors import LossLaneError
from losslane.materials.dielectric import Dielectric, make_dielectric
from losslane.materials.library import Library, load_library
from losslane.materials.roughness import Roughness
from losslane.spec import Where
from losslane.units import parse_frequency, parse_frequency_list
from losslane.xsection.base import CrossSection
from losslane.xsection.factory import section_from_spec


def make_section(
    spec: Mapping, where: str = "line", library: Library | None = None
) -> CrossSection:
    """A cross-section from scenario-style keys, names resolved in the material library."""
    lib = library or load_library()
    return section_from_spec(spec, where, lib.dielectric, lib.foil)


def line(
    kind: str,
    *,
    at: str | Iterable[str] = "1GHz,10GHz,28GHz",
    dk: float | None = None,
    df: float = 0.0,
    dk_at: str | None = None,
    dielectric: str | Dielectric | None = None,
    dielectric_model: str = "wideband-debye",
    foil: str | Roughness | None = None,
    library_files: Iterable[Path | str] = (),
    where: str | Where = "line",
    **geometry: str,
) -> dict:
    """Properties of one line (the result of ``losslane line --json``).

    ``geometry`` takes the scenario keys with units, e.g. ``width="6 mil"``.
    """
    lib = load_library(library_files)
    material = (dk, df, dk_at, dielectric, dielectric_model, foil)
    section = _design_section(kind, None, lib, where, geometry, *material)
    return section.properties(parse_frequency_list(at, "at"))


def _design_section(
    kind: str,
    placeholder: str | None,
    library: Library,
    where: str | Where,
    geometry: dict,
    dk: float | None = None,
    df: float = 0.0,
    dk_at: str | None = None,
    dielectric: str | Dielectric | None = None,
    dielectric_model: str = "wideband-debye",
    foil: str | Roughness | None = None,
) -> CrossSection:
    """A section from ``line``-style arguments (the material ones in the order of the public
    signatures); ``placeholder`` names the solved dimension."""
    spec: dict = {"kind": kind, **geometry}
    if placeholder is not None:
        if placeholder in spec:
            raise LossLaneError(f"{placeholder} is what is solved for; leave it out")
        spec[placeholder] = next(
            (spec[k] for k in ("height", "below", "gap") if k in spec), "5 mil"
        )
    if dielectric is not None and dk is not None:
        raise LossLaneError("give either a dielectric name or dk/df values, not both")
    if dk is not None:
        at_hz = parse_frequency(dk_at, "dk_at") if dk_at is not None else None
        spec["dielectric"] = make_dielectric(dk, df, at_hz, dielectric_model, "dielectric")
    elif dielectric is not None:
        spec["dielectric"] = dielectric
    if foil is not None:
        spec["foil"] = foil
    return section_from_spec(spec, where, library.dielectric, library.foil)


def size(
    kind: str,
    target: str | float,
    *,
    vary: str = "width",
    at: str = "1GHz",
    loss_at: str | Iterable[str] | None = None,
    dk: float | None = None,
    df: float = 0.0,
    dk_at: str | None = None,
    dielectric: str | Dielectric | None = None,
    dielectric_model: str = "wideband-debye",
    foil: str | Roughness | None = None,
    library_files: Iterable[Path | str] = (),
    **geometry: str,
) -> dict:
    """The result of ``losslane size --json``: solve ``vary`` for ``target`` ohm at ``at``."""
    from losslane.design.sizing import parse_target
    from losslane.design.sizing import size as size_

    lib = load_library(library_files)
    material = (dk, df, dk_at, dielectric, dielectric_model, foil)
    sec = _design_section(kind, vary, lib, "size", geometry, *material)
    floss = parse_frequency_list(loss_at, "loss_at") if loss_at is not None else None
    return size_(
        sec, parse_target(target, "target"), at=parse_frequency(at, "at"), vary=vary, loss_at=floss
    ).to_json()


def compare(
    kind: str,
    materials: Iterable[str],
    target: str | float,
    *,
    foils: Iterable[str] | None = None,
    at: str | Iterable[str] = "1GHz,10GHz,28GHz",
    size_at: str = "1GHz",
    foil: str | Roughness | None = None,
    library_files: Iterable[Path | str] = (),
    **geometry: str,
) -> dict:
    """The result of ``losslane compare --json`` (without the chart)."""
    from losslane.design.compare import compare as compare_
    from losslane.design.sizing import parse_target

    lib = load_library(library_files)
    mats = {n: lib.dielectric(n, "materials") for n in materials}
    first = next(iter(mats.values()), None)
    sec = _design_section(kind, "width", lib, "compare", geometry, dielectric=first, foil=foil)
    foil_map = None if foils is None else {n: lib.foil(n, "foils") for n in foils}
    if foil_map is None and isinstance(foil, str):
        foil_map = {foil: sec.metal.foil}
    return compare_(
        sec,
        mats,
        foil_map,
        parse_target(target, "target"),
        parse_frequency_list(at, "at"),
        size_at=parse_frequency(size_at, "size_at"),
    ).to_json()


def spread(
    kind: str,
    tolerances: Mapping[str, str | float],
    *,
    samples: int = 10_000,
    seed: int = 1,
    distribution: str = "normal",
    at: str | Iterable[str] = "1GHz",
    target: str | float | None = None,
    band: float = 0.10,
    dk: float | None = None,
    df: float = 0.0,
    dk_at: str | None = None,
    dielectric: str | Dielectric | None = None,
    dielectric_model: str = "wideband-debye",
    foil: str | Roughness | None = None,
    library_files: Iterable[Path | str] = (),
    **geometry: str,
) -> dict:
    """The result of ``losslane spread --json`` (without the histograms).

    ``tolerances`` maps a key (width, height, below, above, thickness, gap, spacing, dk) to
    its +/- value, e.g. ``{"width": "0.5 mil", "dk": 0.1, "height": "10%"}``.
    """
    from losslane.design.sizing import parse_target
    from losslane.design.spread import parse_tolerance
    from losslane.design.spread import spread as spread_
    from losslane.xsection.batch import nominal_geometry

    lib = load_library(library_files)
    material = (dk, df, dk_at, dielectric, dielectric_model, foil)
    sec = _design_section(kind, None, lib, "spread", geometry, *material)
    geo = nominal_geometry(sec)
    tols = {
        k: parse_tolerance(v, k, sec.dielectric.dk if k == "dk" else geo.get(k, 0.0))
        for k, v in tolerances.items()
    }
    z = parse_target(target, "target") if target is not None else None
    return spread_(
        sec,
        tols,
        parse_frequency_list(at, "at"),
        samples=samples,
        seed=seed,
        distribution=distribution,
        target=z,
        band=band,
    ).to_json()


def materials(
    library_files: Iterable[Path | str] = (), scenario_files: Iterable[Path | str] = ()
) -> dict:
    """The result of ``losslane materials --json``."""
    from losslane.materials.catalog import catalog

    return catalog(library_files, scenario_files)


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
):
    """Build a scenario file: returns (ChannelResult, files, summary text, summary dict).

    The result of ``losslane build SCENARIO`` (``--json`` prints the dict; its ``budget``
    is null without a [budget] section, ``budget.passed`` is what ``--strict`` gates on).
    Model warnings raised on the way are kept in ``ChannelResult.warnings`` (and listed in
    the report) and then re-issued, so callers still see them.
    """
    import warnings

    from losslane.budget import evaluate_budget, fit_channel, validate
    from losslane.channel import build_channel
    from losslane.errors import LossLaneWarning
    from losslane.report.budget_outputs import budget_writer
    from losslane.report.build_outputs import (
        prepare_out_dir,
        slug,
        summary_json,
        summary_text,
        write_build,
    )
    from losslane.report.tables import budget_text
    from losslane.scenario import load_scenario

    caught: list = []
    try:
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", LossLaneWarning)
            sc = load_scenario(scenario)
            validate(sc)  # budget frequencies against the sweep, before any work
            out_dir = prepare_out_dir(out if out is not None else slug(sc.name))
            result = build_channel(sc)
            budget = evaluate_budget(result)
            fit = fit_channel(result)
    finally:
        # outside the recording block, so the caller's own filters see them again
        messages = _reissue(caught, LossLaneWarning)
    result.warnings = messages
    files = write_build(
        result,
        out_dir,
        version=version,
        form=form,
        plots=plots,
        extra=budget_writer(budget, fit, plots),
    )
    text = summary_text(result, files, sections=[budget_text(budget, fit)])
    data = summary_json(result, files)
    nyq = budget.nyquist.at if budget is not None and budget.nyquist is not None else None
    data["budget"] = None if budget is None else budget.to_json()
    data["fit"] = None if fit is None else fit.to_json(nyq)
    data["warnings"] = list(messages)
    return result, files, text, data


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

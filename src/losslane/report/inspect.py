"""``losslane inspect``: the terminal text of an inspection and its files -- the impedance
profile, step and pulse charts (PNG) and a small self-contained report page.

The files are written into a staging directory beside the output directory (each one
atomically, ``losslane.atomic``) and moved into place only when all are complete, as a
build does, so a failure leaves none behind. Their names carry ``-inspect`` so that
inspecting a build's own output into the build's directory replaces none of its files.
"""

from __future__ import annotations

from html import escape
from pathlib import Path

from losslane import __version__
from losslane.atomic import write_text
from losslane.report.output import write_staged
from losslane.report.page import PAGE_END, figure_html, page_head
from losslane.report.timeviews import (
    profile_chart,
    pulse_chart,
    rate_text,
    step_chart,
    views_html,
    views_text,
)

PAGE_NOTE = (
    "The data are judged as they are: nothing was repaired, symmetrised or extrapolated for "
    "the quality metrics. The time-domain views add what a transform needs (a 0 Hz point, "
    "a uniform grid) and say so in the notes."
)


def heading(insp, source: str | None) -> str:
    """One line: what was inspected."""
    refs = sorted(set(insp.reference_ohm))
    ref = (
        f"{refs[0]:g} ohm"
        if len(refs) == 1
        else "per port " + ", ".join(f"{z:g}" for z in insp.reference_ohm) + " ohm"
    )
    return (
        f"{source or 'network'}: {insp.ports}-port, {insp.points} points "
        f"{insp.start_hz / 1e9:g}..{insp.stop_hz / 1e9:g} GHz, reference {ref}"
        + (f", port order {insp.order}" if insp.order else "")
    )


def inspect_text(result) -> str:
    """The terminal text of an ``api.InspectResult``."""
    out = [heading(result.inspection, result.source), "", views_text(result.inspection)]
    if result.files:
        out += ["", "files written:"] + [f"  {p}" for p in result.files]
    return "\n".join(out)


def _page(insp, source: str | None, title: str, figures: list[tuple[str, bytes]]) -> str:
    parts = page_head(title) + [
        f'<p class="meta">{escape(heading(insp, source))}</p>',
        f'<p class="meta">inspected by losslane {escape(__version__)}</p>',
        f'<p class="caution">{escape(PAGE_NOTE)}</p>',
        '<h2 id="views">Quality and time-domain views</h2>',
        views_html(insp),
        '<h2 id="charts">Charts</h2>',
    ]
    parts += [figure_html(caption, png) for caption, png in figures]
    parts += PAGE_END
    return "\n".join(parts)


def write_inspect(insp, source: str | None, out_dir: Path | str, stem: str) -> list[Path]:
    """Write the charts and the page of ``insp`` (an Inspection of ``source``) into
    ``out_dir`` (created if missing; its parent must exist); returns their final paths."""

    def write(stage: Path) -> list[Path]:
        name = source or stem
        charts = [
            (
                profile_chart(
                    stage / f"{stem}-inspect-profile.png", insp, f"{name}: impedance profile"
                ),
                "Impedance profile at each port (round-trip time)",
            )
        ]
        if insp.time.step:
            charts.append(
                (
                    step_chart(stage / f"{stem}-inspect-step.png", insp, f"{name}: step response"),
                    "Step response of the through paths",
                )
            )
        if insp.time.pulse is not None:
            charts.append(
                (
                    pulse_chart(
                        stage / f"{stem}-inspect-pulse.png",
                        insp,
                        f"{name}: pulse response, {rate_text(insp.time.pulse.data_rate_bps)} "
                        f"{insp.time.pulse.modulation.upper()}",
                    ),
                    "Pulse response of one symbol, with its cursors",
                )
            )
        figures = [(caption, p.read_bytes()) for p, caption in charts]
        page = write_text(
            stage / f"{stem}-inspect.html", _page(insp, source, f"{name}: inspection", figures)
        )
        return [p for p, _ in charts] + [page]

    return write_staged(out_dir, write)


__all__ = ["heading", "inspect_text", "write_inspect"]

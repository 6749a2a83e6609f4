"""What the commands report for a cross-section, for tests that start from a model object."""

from __future__ import annotations

import numpy as np

from losslane import api


def properties(section, f) -> dict:
    """The `losslane line --json` object of ``section`` at ``f`` (Hz)."""
    f = np.atleast_1d(np.asarray(f, dtype=float))
    return api.LineResult(section, section.line_values(f)).to_json()


def build_parts(built) -> tuple:
    """(channel result, files, terminal text, --json object) of an ``api.build`` result."""
    from losslane.report.channel import build_text

    return built.channel, built.files, build_text(built), built.to_json()

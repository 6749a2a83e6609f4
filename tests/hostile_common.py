"""Shared pieces of the hostile-input tests: a small valid scenario, running a build in a
scratch directory, and the checks every outcome must pass (exit code 0 or 2, no traceback,
the offending key named, no files left on failure, strict JSON, finite, passive and
reciprocal S-parameters)."""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np

from losslane.cli import main
from losslane.report.strict_json import loads

# a short single-ended lane on a typical low-loss microstrip (common practice values)
SMALL = """
name = "bench lane"

[sweep]
start = "0 Hz"
stop = "20 GHz"
step = "100 MHz"

[lines.host]
kind = "microstrip"
width = "6 mil"
thickness = "1.4 mil"
height = "3.5 mil"
dielectric = "low-loss"

[[channel]]
line = "host"
length = "2 in"
"""


def files_under(directory: Path) -> set[Path]:
    """Every file and directory below ``directory`` (hidden ones included)."""
    return set(directory.rglob("*"))


def run_cli(capsys, *argv: str) -> tuple[int, str, str]:
    """(exit code, stdout, stderr) of ``losslane ARGV`` run in-process; any exception other
    than the command's own exit propagates (a traceback is a test failure)."""
    rc = main(list(argv))
    cap = capsys.readouterr()
    return rc, cap.out, cap.err


def error_line(err: str) -> str:
    """The one ``error:`` line of a refused command (its stderr may hold warnings too)."""
    lines = [ln for ln in err.splitlines() if ln.startswith("error: ")]
    assert len(lines) == 1, err
    return lines[0]


def strict_json(text: str):
    """``text`` parsed as strict JSON (NaN and Infinity refused)."""
    return loads(text)


def no_nan_reason(doc) -> None:
    """No ``no_value`` reason in ``doc`` is "not a number" (a NaN reached the output)."""
    text = json.dumps(doc)
    assert "not a number" not in text, text[:2000]


def check_network(s: np.ndarray, tol: float = 1e-9) -> None:
    """IEEE 370-2020-style checks of S (N, P, P): finite; passive (largest singular value
    <= 1 + tol at every frequency); reciprocal (max |S - S^T| <= tol)."""
    assert np.all(np.isfinite(s)), "non-finite S"
    sigma = np.linalg.svd(s, compute_uv=False)[:, 0]
    assert float(sigma.max()) <= 1 + tol, f"not passive: sigma_max = {sigma.max()!r}"
    asym = float(np.max(np.abs(s - np.swapaxes(s, 1, 2))))
    assert asym <= tol, f"not reciprocal: max |S - S^T| = {asym!r}"


def finite_tree(doc) -> bool:
    if isinstance(doc, float):
        return math.isfinite(doc)
    if isinstance(doc, dict):
        return all(finite_tree(v) for v in doc.values())
    if isinstance(doc, list):
        return all(finite_tree(v) for v in doc)
    return True

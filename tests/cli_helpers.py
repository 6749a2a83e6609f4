"""Running the command line in-process from tests (one copy for every test module)."""

from __future__ import annotations

import json

from losslane.cli import main


def run(capsys, *argv: str) -> tuple[int, str, str]:
    """(exit code, stdout, stderr) of ``losslane ARGV``."""
    rc = main(list(argv))
    cap = capsys.readouterr()
    return rc, cap.out, cap.err


def run_json(capsys, *argv: str) -> dict:
    """The one JSON object ``losslane ARGV --json`` prints; the command must succeed."""
    rc, out, err = run(capsys, *argv, "--json")
    assert rc == 0, err
    return json.loads(out)

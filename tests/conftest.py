"""Test-wide settings: a NaN reaching a JSON output is an error in every test (the strict
JSON writer raises instead of writing null; see losslane.report.strict_json)."""

from __future__ import annotations

import os

from losslane.report.strict_json import RAISE_ON_NAN

os.environ[RAISE_ON_NAN] = "1"

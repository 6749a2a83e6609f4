"""Reading user-written tables (scenario sections, library entries) strictly: unknown keys
are errors with the closest valid key suggested, and every message names where it was."""

from __future__ import annotations

import difflib
from collections.abc import Iterable, Mapping

from losslane.errors import LossLaneError
from losslane.units import parse_number, parse_quantity


class Where(str):
    """Where a value comes from, for messages in the caller's vocabulary: a TOML section
    (keys shown as ``section.key``), the command line (``--key``) or a Python call
    (``key``, the keyword argument). The text itself names the section, command or
    function."""

    cli: bool = False
    python: bool = False

    def key(self, key: str) -> str:
        if self.cli:
            return "KIND" if key == "kind" else "--" + key.replace("_", "-")
        if self.python:
            return key
        return f"{self}.{key}" if self else key

    def setting(self, key: str, value: object) -> str:
        """``key`` with its ``value`` as the caller wrote it: ``--vary spacing`` on the
        command line, ``vary = 'spacing'`` elsewhere."""
        if self.cli:
            return f"{self.key(key)} {value}"
        return f"{self.key(key)} = {value!r}"

    def tolerance(self, key: str) -> str:
        """The name of the +/- tolerance of ``key``: ``--width-tol`` on the command line,
        ``tolerances['width']`` in Python."""
        if self.cli:
            return f"--{key.replace('_', '-')}-tol"
        return f"tolerances[{key!r}]"


def cli_where(command: str) -> Where:
    w = Where(command)
    w.cli = True
    return w


def python_where(function: str) -> Where:
    w = Where(function)
    w.python = True
    return w


def key_name(where: str, key: str) -> str:
    return where.key(key) if isinstance(where, Where) else (f"{where}.{key}" if where else key)


def check_keys(
    where: str, table: Mapping, allowed: Iterable[str], required: Iterable[str] = ()
) -> None:
    allowed = list(allowed)
    for key in table:
        if key not in allowed:
            close = difflib.get_close_matches(str(key), allowed, n=1, cutoff=0.5)
            hint = f"did you mean {close[0]!r}? " if close else ""
            shown = [
                key_name(where, k) if isinstance(where, Where) and where.cli else k for k in allowed
            ]
            raise LossLaneError(
                f"{where}: unknown key {key!r}; {hint}valid keys: {', '.join(shown)}"
            )
    for key in required:
        if key not in table:
            raise LossLaneError(f"{where}: missing {key_name(where, key)}")


def suggest(name: str, known: Iterable[str]) -> str:
    known = sorted(known)
    close = difflib.get_close_matches(name, known, n=1, cutoff=0.5)
    hint = f"did you mean {close[0]!r}? " if close else ""
    return f"{hint}known: {', '.join(known)}"


def quantity(
    where: str,
    table: Mapping,
    key: str,
    kind: str,
    default: float | None = None,
    required: bool = False,
) -> float | None:
    if key not in table:
        if required:
            raise LossLaneError(f"{where}: missing {key_name(where, key)} (a {kind} with a unit)")
        return default
    return parse_quantity(table[key], kind, key_name(where, key))


def dimension(
    where: str,
    table: Mapping,
    key: str,
    default: float | None = None,
    required: bool = False,
    zero_ok: bool = False,
) -> float | None:
    """A length that draws a board (a cross-section, a via, a foil): parsed as ``quantity``
    and inside ``limits.DIMENSION`` (0 allowed with ``zero_ok``)."""
    from losslane.limits import check_dimension

    value = quantity(where, table, key, "length", default, required)
    if value is None or key not in table:
        return value
    return check_dimension(value, key_name(where, key), table[key], zero_ok)


def number(
    where: str,
    table: Mapping,
    key: str,
    default: float | None = None,
    required: bool = False,
    low: float | None = None,
    high: float | None = None,
    low_open: bool = False,
    high_open: bool = False,
) -> float | None:
    if key not in table:
        if required:
            raise LossLaneError(f"{where}: missing {key_name(where, key)} (a number)")
        return default
    value = table[key]
    v = parse_number(value, key_name(where, key))  # finite, ASCII digits
    bad = (low is not None and (v <= low if low_open else v < low)) or (
        high is not None and (v >= high if high_open else v > high)
    )
    if bad:
        lo = "" if low is None else (f"> {low:g}" if low_open else f">= {low:g}")
        hi = "" if high is None else (f"< {high:g}" if high_open else f"<= {high:g}")
        rng = " and ".join(x for x in (lo, hi) if x)
        raise LossLaneError(f"{key_name(where, key)} = {value!r}: valid values are {rng}")
    return v


def flag(where: str, table: Mapping, key: str, default: bool, meaning: str = "") -> bool:
    """A true/false key; ``meaning`` (e.g. "true: ...") goes into the refusal in brackets."""
    value = table.get(key, default)
    if not isinstance(value, bool):
        why = f" ({meaning})" if meaning else ""
        raise LossLaneError(f"{key_name(where, key)} = {value!r}: expected true or false{why}")
    return value


def text(
    where: str,
    table: Mapping,
    key: str,
    choices: Iterable[str] | None = None,
    default: str | None = None,
    required: bool = False,
) -> str | None:
    if key not in table:
        if required:
            raise LossLaneError(f"{where}: missing {key_name(where, key)}")
        return default
    value = table[key]
    if not isinstance(value, str):
        raise LossLaneError(f"{key_name(where, key)} = {value!r}: expected text")
    if choices is not None:
        choices = list(choices)
        if value not in choices:
            raise LossLaneError(
                f"{key_name(where, key)} = {value!r}: valid values are "
                f"{', '.join(repr(c) for c in choices)}"
            )
    return value

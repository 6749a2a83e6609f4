"""The data of a Touchstone file with their line numbers, and the checks a reader owes its
user that scikit-rf does not make (Touchstone File Format Specification 1.1 and 2.0,
IBIS Open Forum): finite numbers, a positive reference impedance, frequencies that
increase, rows that fit the port count, and a version-2 ``[Number of Frequencies]`` that
matches the rows. Every failure is a LossLaneError naming the file and the line.

:func:`scan_touchstone` reads only the structure (``read_touchstone`` leaves the numbers
to scikit-rf and uses the scan's line numbers to point at bad values).

Layout rules used (from the specification, as recalled): ``!`` starts a comment; the first
``#`` line is the option line ``# <freq unit> <parameter> <format> R <ohms>`` (defaults
GHz S MA R 50); a version-1 file takes its port count from the extension ``.sNp``, and
its 1- and 2-port rows hold one frequency each on one line; every frequency starts a new
line; a version-1 2-port file may end with noise data, which starts at a frequency not
above the last network frequency and has 5 numbers per line. Version 2 names its port
count in ``[Number of Ports]``, its data in ``[Network Data]`` (up to ``[Noise Data]`` or
``[End]``), per-port references in ``[Reference]`` and may store half of a symmetric
matrix (``[Matrix Format] Lower`` or ``Upper``).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from pathlib import Path

from losslane.errors import LossLaneError
from losslane.limits import KIND_RANGES

_UNITS = {"hz": 1.0, "khz": 1e3, "mhz": 1e6, "ghz": 1e9}


@dataclass
class Scan:
    """What the scan found: port count, version, frequencies (Hz) with the line each
    starts on, the reference impedances and the option line's line number."""

    nports: int
    version: int
    frequencies: list[float] = field(default_factory=list)
    lines: list[int] = field(default_factory=list)
    reference: list[float] = field(default_factory=list)
    option_line: int | None = None
    multiplier: float = 1e9  # the option line's frequency unit, in Hz

    def line_of(self, index: int) -> int | None:
        """The line of the ``index``-th frequency row (None if out of range)."""
        return self.lines[index] if 0 <= index < len(self.lines) else None


class _Error:
    def __init__(self, path: Path) -> None:
        self.path = path

    def __call__(self, line: int | None, message: str) -> LossLaneError:
        at = f", line {line}" if line is not None else ""
        return LossLaneError(f"touchstone file '{self.path}'{at}: {message}")


def _float(token: str, line: int, error: _Error, what: str = "entry") -> float:
    try:
        value = float(token)
    except ValueError:
        raise error(line, f"{what} {token!r} is not a number") from None
    if not math.isfinite(value):
        raise error(line, f"{what} {token!r} is not a finite number (NaN and infinity are refused)")
    return value


def _positive_references(values: list[float], line: int, error: _Error, where: str) -> None:
    for v in values:
        if not v > 0:
            raise error(
                line,
                f"reference impedance {v:g} ohm in {where}: a reference impedance must be "
                "> 0 ohm (e.g. R 50)",
            )


def _option_line(text: str, line: int, error: _Error) -> tuple[float, list[float]]:
    """(frequency multiplier, reference impedances) of an option line."""
    toks = text[1:].lower().split()
    mult = 1e9
    refs: list[float] = [50.0]
    i = 0
    while i < len(toks):
        tok = toks[i]
        if tok in _UNITS:
            mult = _UNITS[tok]
        elif tok == "r":
            vals = []
            for t in toks[i + 1 :]:
                if not re.match(r"^[-+0-9.]", t) and t not in ("nan", "inf", "-inf", "+inf"):
                    break
                vals.append(_float(t, line, error, "reference impedance"))
            if not vals:
                raise error(line, "option line: 'R' is not followed by a reference impedance")
            _positive_references(vals, line, error, "the option line")
            refs = vals
            i += len(vals)
        i += 1
    return mult, refs


def _ports_from_name(path: Path) -> int | None:
    m = re.search(r"\.[syzgh](\d+)p$", path.name, re.IGNORECASE)
    return int(m.group(1)) if m else None


def scan_touchstone(text: str, path: str | Path) -> Scan | None:
    """Check the structure of the Touchstone ``text`` read from ``path``; the scan, or
    None when the file's port count cannot be told (left to the reader's own error)."""
    path = Path(path)
    error = _Error(path)
    # line breaks as a text file is read (universal newlines), not str.splitlines, which
    # also breaks at form feeds and Unicode separators that a comment may hold
    raw_lines = text.replace("\r\n", "\n").replace("\r", "\n").split("\n")
    version = 1
    nports = _ports_from_name(path)
    matrix = "full"
    declared: tuple[int, int] | None = None  # ([Number of Frequencies], its line)
    mult = 1e9
    refs: list[float] = [50.0]
    option_line = None
    in_network = True  # version 1: data anywhere after the option line
    in_info = False
    need_refs = 0  # [Reference] values still to read on following lines
    tokens: list[tuple[str, int]] = []
    noise_from: int | None = None

    for number, raw in enumerate(raw_lines, start=1):
        body = raw.partition("!")[0].strip()
        if not body:
            continue
        low = body.lower()
        if in_info:
            if low.startswith("[end information]"):
                in_info = False
            continue
        if body.startswith("#"):
            if option_line is None:
                option_line = number
                mult, refs = _option_line(body, number, error)
            continue
        if body.startswith("["):
            key, _, rest = low.partition("]")
            key = key + "]"
            rest = rest.strip()
            need_refs = 0
            if key == "[version]":
                version = 2
                in_network = False
            elif key == "[number of ports]":
                try:
                    nports = int(rest.split()[0])
                except (ValueError, IndexError):
                    raise error(
                        number, f"[Number of Ports] {rest!r}: expected a whole number"
                    ) from None
            elif key == "[number of frequencies]":
                try:
                    declared = (int(rest.split()[0]), number)
                except (ValueError, IndexError):
                    raise error(
                        number, f"[Number of Frequencies] {rest!r}: expected a whole number"
                    ) from None
            elif key == "[matrix format]":
                matrix = rest.split()[0] if rest else "full"
            elif key == "[reference]":
                vals = [_float(t, number, error, "reference impedance") for t in rest.split()]
                _positive_references(vals, number, error, "[Reference]")
                refs = vals
                need_refs = max((nports or 0) - len(vals), 0)
            elif key == "[network data]":
                in_network = True
            elif key in ("[noise data]", "[end]"):
                in_network = False
            elif key == "[begin information]":
                in_info = True
            continue
        if need_refs:
            vals = [_float(t, number, error, "reference impedance") for t in body.split()]
            _positive_references(vals, number, error, "[Reference]")
            refs += vals
            need_refs = max(need_refs - len(vals), 0)
            continue
        if not in_network:
            continue
        tokens.extend((t, number) for t in body.split())

    if nports is None or nports < 1:
        return None
    size = 1 + (2 * nports * nports if matrix == "full" else nports * (nports + 1))
    scan = Scan(nports, version, reference=refs, option_line=option_line, multiplier=mult)
    lo_hi = KIND_RANGES["frequency"][1]
    one_line_rows = version == 1 and nports <= 2
    per_line: dict[int, int] = {}
    for _, ln in tokens:
        per_line[ln] = per_line.get(ln, 0) + 1
    k = 0
    while k < len(tokens):
        tok, ln = tokens[k]
        if k + size > len(tokens):
            have = len(tokens) - k
            if _noise_start(scan, tok, ln, per_line):
                noise_from = ln
                break
            raise error(
                ln,
                f"the last row has {have} of the {size} numbers a {nports}-port row holds "
                "(the frequency and the complex entries): the file is truncated or its port "
                "count is wrong",
            )
        if k > 0 and tokens[k - 1][1] == ln:
            raise error(
                ln,
                f"a {nports}-port row holds {size} numbers and each frequency starts a new "
                "line, but this line continues the previous row: the row lengths do not fit "
                "the port count (or a number is missing or extra)",
            )
        if one_line_rows and per_line[ln] != size:
            if _noise_start(scan, tok, ln, per_line):
                noise_from = ln
                break
            raise error(
                ln,
                f"this line holds {per_line[ln]} numbers; a {nports}-port row is one line of "
                f"{size} (the frequency and {size // 2} complex entries): wrong port count "
                "(extension) or a truncated row",
            )
        f = _float(tok, ln, error, "frequency") * mult
        if f < 0:
            raise error(ln, f"frequency {tok} is negative")
        if f > lo_hi:
            raise error(
                ln, f"frequency {f:g} Hz lies above the accepted {lo_hi:g} Hz (Input limits)"
            )
        if scan.frequencies and f <= scan.frequencies[-1]:
            if _noise_start(scan, tok, ln, per_line):
                noise_from = ln
                break
            prev, prev_line = scan.frequencies[-1], scan.lines[-1]
            what = "repeats" if f == prev else "is below"
            raise error(
                ln,
                f"frequency {f:g} Hz {what} {prev:g} Hz on line {prev_line}: frequencies "
                "must increase strictly (decreasing or duplicate frequency rows)",
            )
        for t, tl in tokens[k + 1 : k + size]:
            _float(t, tl, error)
        scan.frequencies.append(f)
        scan.lines.append(ln)
        k += size
    if noise_from is not None:
        _check_noise(tokens, noise_from, error)
    if declared is not None and declared[0] != len(scan.frequencies):
        raise error(
            declared[1],
            f"[Number of Frequencies] {declared[0]} does not match the "
            f"{len(scan.frequencies)} frequency rows of [Network Data]",
        )
    return scan


def _noise_start(scan: Scan, tok: str, ln: int, per_line: dict[int, int]) -> bool:
    """True where a version-1 2-port file's noise data begins: a 5-number line whose
    frequency is not above the last network frequency."""
    if scan.version != 1 or scan.nports != 2 or not scan.frequencies or per_line.get(ln) != 5:
        return False
    try:
        f = float(tok) * scan.multiplier
    except ValueError:
        return False
    return math.isfinite(f) and f <= scan.frequencies[-1]


def _check_noise(tokens: list[tuple[str, int]], first_line: int, error: _Error) -> None:
    """Noise rows: 5 finite numbers per line (frequency, NFmin, |Gamma_opt|, angle, Rn)."""
    lines: dict[int, list[str]] = {}
    for t, ln in tokens:
        if ln >= first_line:
            lines.setdefault(ln, []).append(t)
    for ln, toks in lines.items():
        if len(toks) != 5:
            raise error(ln, f"noise data row holds {len(toks)} numbers; a noise row holds 5")
        for t in toks:
            _float(t, ln, error)


__all__ = ["Scan", "scan_touchstone"]

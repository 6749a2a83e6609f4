"""Plain-text tables for the terminal, and the caution every output carries."""

from __future__ import annotations

from collections.abc import Sequence

CAUTION = (
    "Estimates from published models: confirm against the fabricator's stackup and "
    "measured test coupons."
)


def table(
    headers: Sequence[str],
    units: Sequence[str],
    rows: Sequence[Sequence[str]],
    left: int = 0,
) -> str:
    """Columns right-aligned (numbers), the first ``left`` columns left-aligned (names)."""
    cols = (
        list(zip(headers, units, *rows, strict=False))
        if rows
        else list(zip(headers, units, strict=True))
    )
    widths = [max(len(str(c)) for c in col) for col in cols]
    lines = []
    for r in [headers, units, *rows]:
        cells = [
            str(c).ljust(w) if i < left else str(c).rjust(w)
            for i, (c, w) in enumerate(zip(r, widths, strict=True))
        ]
        lines.append("  ".join(cells).rstrip())
    return "\n".join(lines)


def _num(v: float | None, fmt: str) -> str:
    return "-" if v is None else format(v, fmt)


def verdict(passed: bool | None) -> str:
    return "-" if passed is None else ("pass" if passed else "FAIL")

"""Design helpers: trace sizing to a target impedance, material comparison at equal
impedance, and manufacturing-tolerance Monte Carlo. They use the cross-section models
only (through ``losslane.xsection.batch`` for many geometries at once)."""

from losslane.design.compare import CompareResult, compare
from losslane.design.sizing import SearchRange, SizeResult, search_range, sensitivity, size
from losslane.design.spread import SpreadResult, parse_tolerance, spread

__all__ = [
    "CompareResult",
    "SearchRange",
    "SizeResult",
    "SpreadResult",
    "compare",
    "parse_tolerance",
    "search_range",
    "sensitivity",
    "size",
    "spread",
]

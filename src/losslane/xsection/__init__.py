"""Cross-section models: each gives per-unit-length R, L, G, C over frequency.

The kinds users write are listed once, in ``xsection.registry``.
"""

from losslane.xsection.base import CrossSection, LineValues, Metal
from losslane.xsection.coplanar import Coplanar, Cpw, Gcpw
from losslane.xsection.microstrip import Microstrip
from losslane.xsection.microstrip_pair import MicrostripPair
from losslane.xsection.rlgc import RLGC
from losslane.xsection.stripline import Stripline
from losslane.xsection.stripline_pair import StriplinePair

__all__ = [
    "Coplanar",
    "Cpw",
    "CrossSection",
    "Gcpw",
    "LineValues",
    "Metal",
    "Microstrip",
    "MicrostripPair",
    "RLGC",
    "Stripline",
    "StriplinePair",
]

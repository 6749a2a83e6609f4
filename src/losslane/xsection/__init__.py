"""Cross-section models: each gives per-unit-length R, L, G, C over frequency."""

from losslane.xsection.base import CrossSection, Metal
from losslane.xsection.coplanar import CPW, GCPW, Coplanar
from losslane.xsection.microstrip import Microstrip
from losslane.xsection.rlgc import RLGC
from losslane.xsection.stripline import Stripline

__all__ = ["CPW", "GCPW", "Coplanar", "CrossSection", "Metal", "Microstrip", "RLGC", "Stripline"]

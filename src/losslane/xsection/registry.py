"""The line kinds: one list of model classes.

Adding a kind is writing its module (a ``CrossSection`` subclass, see DEVELOPERS.md) and
adding its class to ``MODELS``. Everything else is derived from the classes: the kind
names, the required scenario keys and the command-line options (``dimensions``), which
kinds evaluate many geometry samples in one array call (``vectorized``), the tolerance
keys of ``spread``, the validity ranges (``limits``) and the sizing intervals
(``search``), and which kinds the field solver builds (``solvable``).

Importing this module imports the closed-form models (numpy), never the field solver.
"""

from __future__ import annotations

from losslane.errors import LossLaneError
from losslane.spec import suggest
from losslane.xsection.base import CrossSection
from losslane.xsection.coplanar import Cpw, Gcpw
from losslane.xsection.group import MicrostripGroup, StriplineGroup
from losslane.xsection.microstrip import Microstrip
from losslane.xsection.microstrip_pair import MicrostripPair
from losslane.xsection.stripline import Stripline
from losslane.xsection.stripline_pair import StriplinePair

#: every line kind, in the order help texts list them
MODELS: tuple[type[CrossSection], ...] = (
    Microstrip,
    Stripline,
    Cpw,
    Gcpw,
    MicrostripPair,
    StriplinePair,
    MicrostripGroup,
    StriplineGroup,
)


def kinds() -> tuple[str, ...]:
    return tuple(m.kind for m in MODELS)


def model(kind: str, key: str = "kind") -> type[CrossSection]:
    """The class of ``kind``; a LossLaneError naming ``key`` and the known kinds."""
    for m in MODELS:
        if m.kind == kind:
            return m
    raise LossLaneError(f"{key} = {kind!r}: unknown line kind; {suggest(str(kind), kinds())}")


def dimension_keys() -> tuple[str, ...]:
    """Every kind's length keys, each once, in registry order."""
    return tuple(dict.fromkeys(k for m in MODELS for k in m.dimensions))


def field_kinds() -> tuple[str, ...]:
    """The kinds the 2-D field solver builds."""
    return tuple(m.kind for m in MODELS if m.solvable())


__all__ = ["MODELS", "dimension_keys", "field_kinds", "kinds", "model"]

"""The network layer: channel blocks, their vectorized cascade, S-parameters and
Touchstone files.

* blocks, each with ``abcd(f)`` and ``scaled_abcd(f)`` (the interface in
  :mod:`losslane.network.block`): :mod:`~losslane.network.line` (LineSegment,
  UniformLine), :mod:`~losslane.network.lumped` (SeriesCapacitor, SeriesRL,
  SeriesImpedance, ShuntCapacitor), :mod:`~losslane.network.via` (Via),
  :mod:`~losslane.network.imported` (TouchstoneBlock);
* :mod:`losslane.network.scaled` -- the overflow-free scaled chain-matrix representation
  and S <-> ABCD conversions;
* :mod:`losslane.network.cascade` -- ``cascade``, ``abcd_to_s``, ``to_network``,
  ``build_network``;
* :mod:`losslane.network.ports` -- port orders ("in-in-out-out", "in-out-in-out");
* :mod:`losslane.network.mixedmode` -- mixed-mode S-parameters of pairs;
* :mod:`losslane.network.touchstone` -- ``write_touchstone``, ``read_touchstone``.

skrf is imported only inside the functions that need it.
"""

from losslane.network.block import Block
from losslane.network.cascade import (
    abcd_to_s,
    block_network,
    build_network,
    cascade,
    to_network,
    transmission_db,
)
from losslane.network.imported import TouchstoneBlock
from losslane.network.line import LineSegment, UniformLine
from losslane.network.lumped import SeriesCapacitor, SeriesImpedance, SeriesRL, ShuntCapacitor
from losslane.network.ports import ORDERS, describe_ports, port_names
from losslane.network.scaled import ScaledABCD, s_to_scaled_abcd
from losslane.network.touchstone import read_touchstone, write_touchstone
from losslane.network.via import Via

__all__ = [
    "ORDERS",
    "Block",
    "LineSegment",
    "ScaledABCD",
    "SeriesCapacitor",
    "SeriesImpedance",
    "SeriesRL",
    "ShuntCapacitor",
    "TouchstoneBlock",
    "UniformLine",
    "Via",
    "abcd_to_s",
    "block_network",
    "build_network",
    "cascade",
    "describe_ports",
    "port_names",
    "read_touchstone",
    "s_to_scaled_abcd",
    "to_network",
    "transmission_db",
    "write_touchstone",
]

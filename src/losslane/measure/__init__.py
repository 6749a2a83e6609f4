"""From measured test coupons to line constants and material parameters.

* :mod:`losslane.measure.extract` -- the propagation constant per unit length of the line
  common to coupons of two or more lengths, with identical launches removed (two-line /
  multiline eigenvalue method): ``extract_line`` -> :class:`LineExtraction`;
* :mod:`losslane.measure.fit` -- the dielectric (Dk, Df), foil roughness and conductivity
  that make a cross-section model reproduce an extracted line: ``fit_materials`` ->
  :class:`MaterialFit`, which also writes a library TOML text.

Both return frozen result objects with ``to_json()``; nothing here prints or writes files.
"""

from losslane.measure.extract import LineExtraction, extract_line
from losslane.measure.fit import MaterialFit, fit_materials, line_constants, with_materials

__all__ = [
    "LineExtraction",
    "MaterialFit",
    "extract_line",
    "fit_materials",
    "line_constants",
    "with_materials",
]

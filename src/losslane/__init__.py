"""losslane: loss, impedance and S-parameters of printed-board interconnect.

Results are engineering estimates from published closed-form and numerical
models; confirm them against the fabricator's stackup and measured test coupons.
"""

from losslane.errors import LossLaneError, LossLaneWarning

__version__ = "0.1.0"

__all__ = ["LossLaneError", "LossLaneWarning", "__version__"]

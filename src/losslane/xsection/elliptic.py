"""The ratio of complete elliptic integrals K(k)/K(k') that every conformal-mapping model
(Cohn's stripline and coupled stripline, Wen's and Ghione-Naldi's coplanar lines) needs.

scipy's ``ellipkm1(p)`` is K at parameter 1 - p and keeps its precision as p -> 0, so
K(k)/K(k') = ellipkm1(1 - k^2) / ellipkm1(k^2) stays exact when either modulus nears 1
(a very wide or a very narrow line) provided both k^2 and 1 - k^2 are passed in as
computed without cancellation. scipy.special is imported here, inside the function, so
that importing a model costs no start-up time.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike


def k_ratio(m: ArrayLike, m1: ArrayLike) -> np.ndarray:
    """K(k)/K(k') from m = k^2 and m1 = 1 - k^2, each given accurately (0 < k < 1);
    its reciprocal is K(k')/K(k)."""
    from scipy.special import ellipkm1

    return ellipkm1(np.asarray(m1, float)) / ellipkm1(np.asarray(m, float))


def k_ratio_of_modulus(k: ArrayLike) -> np.ndarray:
    """K(k)/K(k') for a modulus 0 < k < 1 given directly."""
    k = np.asarray(k, float)
    return k_ratio(k * k, (1.0 - k) * (1.0 + k))


__all__ = ["k_ratio", "k_ratio_of_modulus"]

"""An imported S-parameter model (a Touchstone file) as a channel block."""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np

from losslane.errors import LossLaneError, warn
from losslane.network.block import Block, conductors
from losslane.network.cascade import check_sweep
from losslane.network.ports import DEFAULT_ORDER, check_order, port_permutation
from losslane.network.scaled import ScaledABCD, s_to_scaled_abcd
from losslane.network.scatter import renormalize

__all__ = ["TouchstoneBlock", "linear_interpolation"]


def linear_interpolation(x: np.ndarray, xq: np.ndarray, *arrays: np.ndarray) -> list[np.ndarray]:
    """Piecewise-linear interpolation along the first axis of each array (complex values:
    real and imaginary parts alike), from the increasing grid ``x`` to ``xq`` (within
    ``x[0]..x[-1]``). The same as scikit-rf's ``Network.interpolate(kind="linear")`` in its
    default Cartesian coordinates, vectorized over all entries without scipy.interpolate
    (whose import costs a command's start-up more than the interpolation itself)."""
    k = np.clip(np.searchsorted(x, xq, side="right") - 1, 0, x.size - 2)
    w = (xq - x[k]) / (x[k + 1] - x[k])
    out = []
    for a in arrays:
        wb = w.reshape(w.shape + (1,) * (a.ndim - 1))
        out.append(a[k] * (1.0 - wb) + a[k + 1] * wb)
    return out


class TouchstoneBlock(Block):
    """An S-parameter model from a Touchstone file (a connector, a package, a measured
    launch), read with scikit-rf.

    ``n`` is the channel's conductor count: the file must have 2n ports (2 for a
    single-ended channel, 4 for a pair), else a LossLaneError names the file and both
    counts. For 4-port files ``order`` says how the file numbers its ports
    ("in-in-out-out": 1, 2 near ends, 3, 4 far ends; "in-out-in-out": 1 -> 2 is line 1,
    3 -> 4 line 2).

    On a sweep the data are interpolated linearly in real/imaginary parts (what scikit-rf's
    linear interpolation does; a convex combination of passive matrices is passive, so
    interpolation cannot create a passivity violation). A sweep reaching outside the file's
    band is a LossLaneError -- S-parameters are never extrapolated silently -- except
    f = 0: when the sweep asks for DC and the file lacks it, the DC point is extrapolated
    with scikit-rf's ``extrapolate_to_dc`` from the first two points (its imaginary part,
    non-physical at DC, is dropped) and a LossLaneWarning says so; sweep points between 0
    and the file's first frequency are then interpolated towards that DC point. The chain
    matrix uses the file's own reference impedances and carries the file's reverse
    direction exactly (no reciprocity assumed).

    The file's passivity and reciprocity are checked on reading (``check``, see
    :mod:`losslane.network.import_check`): violations within the rounding of its printed
    digits are repaired, larger ones refused unless ``as_is`` accepts the file as it is.
    """

    kind = "touchstone"
    length = 0.0

    def __init__(
        self,
        path: str | os.PathLike,
        name: str | None = None,
        n: int = 1,
        order: str = DEFAULT_ORDER,
        as_is: bool = False,
    ) -> None:
        from losslane.network.import_check import check_import
        from losslane.network.touchstone import read_touchstone

        self.path = Path(path)
        self.name = str(name) if name else self.path.name
        self.n = conductors(f"touchstone '{self.path}'", n)
        self.order = check_order(order, f"touchstone '{self.path}': order")
        net = read_touchstone(self.path)
        if net.nports != 2 * self.n:
            what = {1: "single-ended (2-port)", 2: "differential (4-port)"}.get(
                self.n, f"{2 * self.n}-port (group of traces)"
            )
            raise LossLaneError(
                f"touchstone file '{self.path}' has {net.nports} ports but this {what} "
                f"channel needs {2 * self.n}"
            )
        if len(net.f) < 2:
            raise LossLaneError(
                f"touchstone file '{self.path}' has {len(net.f)} frequency point(s); "
                "at least 2 are needed"
            )
        text = self.path.read_text(encoding="latin-1")
        self.check, fixed = check_import(self.path, np.asarray(net.f), net.s, text, as_is)
        if fixed is not net.s:
            net = net.copy()
            net.s = fixed
        self.network = net

    @property
    def band(self) -> tuple[float, float]:
        f = self.network.f
        return float(f[0]), float(f[-1])

    def _with_dc(self):
        """The file's network with an extrapolated DC point prepended."""
        import skrf

        net = self.network
        two = net[0:2]
        dc = np.real(two.extrapolate_to_dc(points=3, kind="linear").s[0])
        freq = skrf.Frequency.from_f(np.r_[0.0, net.f], unit="Hz")
        return skrf.Network(
            frequency=freq,
            s=np.concatenate([dc[None].astype(complex), net.s]),
            z0=np.concatenate([net.z0[:1], net.z0]),
            name=net.name,
        )

    def sampled(self, f: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """S (N, 2n, 2n) in internal port order and reference impedances (N, 2n) on ``f``."""
        from losslane.units import format_frequency as fmt

        f = check_sweep(f)
        lo, hi = self.band
        sweep = f"{fmt(float(f.min()))}..{fmt(float(f.max()))}"
        band = f"{fmt(lo)}..{fmt(hi)}"
        tol = 1e-9 * hi
        if f.max() > hi + tol:
            raise LossLaneError(
                f"touchstone file '{self.path}' covers {band} but the sweep runs {sweep}; "
                f"end the sweep at or below {fmt(hi)} or supply a file covering it "
                "(S-parameters are not extrapolated)"
            )
        net = self.network
        if lo > 0 and np.any(f == 0):
            net = self._with_dc()
            below = f[(f > 0) & (f < lo - tol)]
            extra = (
                f"; sweep points up to {fmt(float(below.max()))} are interpolated towards it"
                if below.size
                else ""
            )
            warn(
                f"touchstone file '{self.path}' starts at {fmt(lo)}: its DC point is "
                f"extrapolated (scikit-rf extrapolate_to_dc){extra}"
            )
        elif f.min() < lo - tol:
            raise LossLaneError(
                f"touchstone file '{self.path}' covers {band} but the sweep runs {sweep}; "
                f"start the sweep at or above {fmt(lo)} (only f = 0 is extrapolated)"
            )
        fq = np.clip(f, net.f[0], net.f[-1])  # within tol of the band edges
        s, z0 = np.asarray(net.s), np.asarray(net.z0)
        same = fq.shape == net.f.shape and np.array_equal(fq, net.f)
        if not same:
            s, z0 = linear_interpolation(np.asarray(net.f), fq, s, z0)
        if np.any(z0.imag != 0):
            raise LossLaneError(
                f"touchstone file '{self.path}' has complex reference impedances; "
                "only real ones are supported"
            )
        inv = np.argsort(port_permutation(self.n, self.order))  # file port -> internal
        return s[:, inv][:, :, inv], z0.real[:, inv]

    def scaled_abcd(self, f: np.ndarray) -> ScaledABCD:
        s, z = self.sampled(f)
        return s_to_scaled_abcd(s, z)

    def s(self, f: np.ndarray, z_ref: float = 50.0) -> np.ndarray:
        """The file's S on ``f`` in the internal port order, renormalised to ``z_ref``."""
        s, z = self.sampled(f)
        return renormalize(s, z, z_ref)

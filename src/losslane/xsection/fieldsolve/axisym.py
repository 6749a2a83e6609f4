"""Axisymmetric electrostatics of a via: the capacitance of a barrel with its pads among
planes with round antipad openings, and from it the excess capacitance of a pad.

The structure is rotationally symmetric about the barrel's axis: horizontal bands (a
dielectric sheet; a plane, grounded outside its antipad radius; a pad layer, the signal
conductor inside the pad radius) stacked from the bottom up, and the barrel (the signal
conductor, r <= drill / 2) over part of the height. With the signal at 1 V and the planes
at 0 V the potential phi(r, z) minimises the energy W = (1/2) int eps |grad phi|^2 dV,
dV = 2 pi r dr dz; the weak form is int eps r grad(phi) . grad(v) dr dz = 0 for every v
vanishing on the conductors (quadratic triangles, scikit-fem), and the capacitance is
C = 2 W (for 1 V), stationary in phi, so its error is the square of the potential's.
The outer radius and the window's ends are cut with a natural (zero normal field)
boundary: inside an antipad opening that is a barrel continuing as a coaxial line.

A pad's excess capacitance is C(barrel + pad) - C(barrel alone) on the same mesh, so the
discretisation errors of the barrel largely cancel: it is what the pad adds to a via
whose barrel is modelled as a coaxial line. The mesh is a tensor grid in (r, z) through
every conductor edge and band face, graded geometrically toward them. Measured
(tests/test_axisym.py): a barrel in a closed coaxial cylinder gives 2 pi eps / ln(b/a) per
length within 1e-4 at the default accuracy.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from losslane.errors import LossLaneError
from losslane.xsection.fieldsolve.mesh import grade
from losslane.xsection.rlgc import EPS0

#: mesh settings: (first element size as a share of the local feature, growth per unit
#: distance)
GRADING = {"coarse": (0.2, 0.35), "normal": (0.08, 0.2), "fine": (0.03, 0.1)}


@dataclass(frozen=True)
class AxiBand:
    """A horizontal band of ``thickness`` and relative permittivity ``eps_r`` (where no
    conductor is): ``ground_from`` makes it a plane, grounded for r >= that radius;
    ``signal_to`` a pad layer, the signal conductor for r <= that radius."""

    thickness: float
    eps_r: float
    ground_from: float | None = None
    signal_to: float | None = None
    name: str = ""


@dataclass(frozen=True)
class AxiVia:
    """Bands from the bottom up (z = 0 at the bottom of the first), the barrel of
    ``barrel_radius`` from z = ``barrel_bottom`` to ``barrel_top``, the domain out to
    ``radius``."""

    bands: tuple[AxiBand, ...]
    barrel_radius: float
    barrel_bottom: float
    barrel_top: float
    radius: float

    @property
    def faces(self) -> np.ndarray:
        return np.concatenate([[0.0], np.cumsum([b.thickness for b in self.bands])])

    @property
    def height(self) -> float:
        return float(self.faces[-1])

    def validate(self) -> None:
        if not self.bands or any(not b.thickness > 0 for b in self.bands):
            raise LossLaneError("via field solve: every band needs a thickness > 0")
        if not 0 < self.barrel_radius < self.radius:
            raise LossLaneError("via field solve: the barrel must be inside the domain")
        if not 0 <= self.barrel_bottom < self.barrel_top <= self.height + 1e-12 * self.height:
            raise LossLaneError("via field solve: the barrel's ends must lie in the window")
        for b in self.bands:
            if b.ground_from is not None and not b.ground_from > self.barrel_radius:
                raise LossLaneError(
                    f"via field solve: band {b.name!r}: the antipad must be wider than the drill"
                )
        if not any(b.ground_from is not None for b in self.bands):
            raise LossLaneError("via field solve: no plane in the window (nothing to return to)")


def _keys_and_sizes(keys: list[float], sharp: set[float], share: float) -> tuple:
    k = np.unique(np.asarray(keys, float))
    # keys closer than rounding (a barrel ending on a face) are one key
    k = k[np.concatenate([[True], np.diff(k) > 1e-9 * max(1e-30, float(k[-1] - k[0]))])]
    gaps = np.diff(k)
    sizes = np.empty(k.size)
    for i in range(k.size):
        near = [g for g in (gaps[i - 1] if i > 0 else None, gaps[i] if i < gaps.size else None)]
        local = min(g for g in near if g is not None)
        tight = any(abs(k[i] - s) <= 1e-9 * float(k[-1] - k[0]) for s in sharp)
        sizes[i] = local * (share if tight else 0.5)
    return k, sizes


def _grid(via: AxiVia, accuracy: str) -> tuple[np.ndarray, np.ndarray]:
    share, growth = GRADING[accuracy]
    radii = [0.0, via.barrel_radius, via.radius]
    for b in via.bands:
        for r in (b.ground_from, b.signal_to):
            if r is not None:
                radii.append(r)
    sharp_r = set(radii[1:]) - {via.radius}
    zs = list(via.faces) + [via.barrel_bottom, via.barrel_top]
    sharp_z = set(zs)
    kr, sr = _keys_and_sizes(radii, sharp_r, share)
    kz, sz = _keys_and_sizes(zs, sharp_z, share)
    return grade(kr, sr, growth), grade(kz, sz, growth)


def capacitance(via: AxiVia, accuracy: str = "normal") -> float:
    """The signal conductor's capacitance to the planes (F)."""
    return capacitances([via], accuracy)[0]


def capacitances(vias: list[AxiVia], accuracy: str = "normal") -> list[float]:
    """Capacitances of several variants of one structure (the same bands' faces and
    radii, conductors switched on or off) on one shared mesh."""
    from scipy.sparse.linalg import splu
    from skfem import BilinearForm, CellBasis, ElementTriP2, MeshTri, asm

    if accuracy not in GRADING:
        raise LossLaneError(f"accuracy = {accuracy!r}; valid: {', '.join(GRADING)}")
    for v in vias:
        v.validate()
    merged = _union(vias)
    r, z = _grid(merged, accuracy)
    mesh = MeshTri.init_tensor(r, z)
    elem = ElementTriP2()
    basis = CellBasis(mesh, elem)

    @BilinearForm
    def energy(u, v, w):
        return w.x[0] * (u.grad[0] * v.grad[0] + u.grad[1] * v.grad[1])

    faces = merged.faces
    mid_z = mesh.p[1, mesh.t].mean(axis=0)
    band_of = np.clip(np.searchsorted(faces, mid_z) - 1, 0, len(merged.bands) - 1)
    parts = []
    for i in range(len(merged.bands)):
        idx = np.nonzero(band_of == i)[0]
        parts.append(asm(energy, CellBasis(mesh, elem, elements=idx)).tocsr() if idx.size else None)
    x, y = basis.doflocs
    tol = 1e-9 * max(merged.radius, merged.height)
    out = []
    for v in vias:
        k = sum(b.eps_r * p for b, p in zip(v.bands, parts, strict=True) if p is not None)
        sig = (
            (x <= v.barrel_radius + tol) & (y >= v.barrel_bottom - tol) & (y <= v.barrel_top + tol)
        )
        gnd = np.zeros(x.shape, bool)
        for b, z0, z1 in zip(v.bands, faces[:-1], faces[1:], strict=True):
            inside = (y >= z0 - tol) & (y <= z1 + tol)
            if b.signal_to is not None:
                sig |= inside & (x <= b.signal_to + tol)
            if b.ground_from is not None:
                gnd |= inside & (x >= b.ground_from - tol)
        if np.any(sig & gnd):
            raise LossLaneError("via field solve: a pad touches a plane (pad inside the antipad?)")
        u = np.zeros(x.shape)
        u[sig] = 1.0
        fixed = sig | gnd
        free = np.nonzero(~fixed)[0]
        kf = k[free][:, free].tocsc()
        rhs = -(k[free][:, np.nonzero(fixed)[0]] @ u[fixed])
        u[free] = splu(kf, permc_spec="MMD_AT_PLUS_A").solve(rhs)
        out.append(float(2 * np.pi * EPS0 * (u @ (k @ u))))
    return out


def _union(vias: list[AxiVia]) -> AxiVia:
    """A variant with every key radius present (for the shared mesh): the first one, with
    each band's conductor radii taken from whichever variant has them."""
    first = vias[0]
    bands = []
    for i, b in enumerate(first.bands):
        g = next((v.bands[i].ground_from for v in vias if v.bands[i].ground_from), None)
        s = next((v.bands[i].signal_to for v in vias if v.bands[i].signal_to), None)
        bands.append(replace(b, ground_from=g, signal_to=s))
    for v in vias[1:]:
        if len(v.bands) != len(first.bands) or not np.allclose(v.faces, first.faces):
            raise LossLaneError("via field solve: variants must share their bands")
    return replace(first, bands=tuple(bands))


def pad_capacitance(via: AxiVia, pad_band: int, accuracy: str = "normal") -> float:
    """The excess capacitance (F) of the pad in band ``pad_band``: C(with the pad) minus
    C(the barrel alone), on one mesh."""
    if via.bands[pad_band].signal_to is None:
        raise LossLaneError("via field solve: that band has no pad")
    bare = replace(
        via,
        bands=tuple(
            replace(b, signal_to=None) if i == pad_band else b for i, b in enumerate(via.bands)
        ),
    )
    with_pad, without = capacitances([via, bare], accuracy)
    return with_pad - without


__all__ = ["AxiBand", "AxiVia", "capacitance", "capacitances", "pad_capacitance"]

"""The field-solved cross-section: per-unit-length R, L, G, C (N, n, n) over frequency.

From one electrostatic solve at the layers' permittivities at ``F_REF`` (and one in
vacuum) the line constants at any frequency follow without another solve:

* the energy partition F_r = eps0 int_r |grad phi|^2 = dC/d eps_r gives each region's
  share of the field energy; C(eps) is homogeneous of degree one in the permittivities,
  so sum_r eps_r F_r is exact at F_REF and whenever all regions keep their ratios (one
  material everywhere: eps_eff = Dk and G/(omega C) = Df exactly);
* for other frequencies the complex C(f) - j G(f)/omega = C(eps_r(f)) with
  eps_r(f) = eps' - j eps'' of each layer is evaluated by a reduced Galerkin model of the
  potential (the solve's potentials, their sensitivities to each region's
  permittivity, and the vacuum potentials; ``solve.py``). The capacitance is stationary
  in the potential, so the error is the square of the reduced potential's: fourth order
  in the relative changes of the permittivities between regions. Measured on a coated
  microstrip whose mask disperses more than its laminate (10 MHz .. 100 GHz): C within
  1e-5 and G within 3e-5 of a direct solve at each frequency's real permittivities
  (that reference drops terms of order Df^2, which is most of the difference); the
  first-order partition alone would be off by 0.75 % of G at 10 MHz. The loss tangent
  enters exactly (complex permittivities, not a small-Df expansion), so with causal
  layer models C and G form a Kramers-Kronig pair to that accuracy.
* L = L_ext + L_int(f): L_ext = mu0 eps0 C0^-1 from the vacuum capacitance;
* R(f) + j omega L_int(f): per conductor group the surface-current factor G^g of the
  vacuum solution (``solve.py``) with the conductor model of the closed forms
  (``materials.conductor``): each signal conductor by ``strip_impedance`` (its exact DC
  resistance, depth = G * area, joined to the skin effect by the transition fitted to the
  eddy-current solver, shaped by the trace's width/thickness and distance to its return),
  the planes and coplanar grounds as the parts of one return path (``return_impedance``
  in matrix form, ``_return_matrices``; negligible DC resistance), each with the foil's
  roughness factor on the part above DC. ``fieldsolve.eddy`` solves the same conductors
  meshed (proximity, corners and finite planes included) when that matters.

This is a quasi-static (quasi-TEM) model: eps_eff(f) follows the materials' dispersion
only, not the geometric dispersion of microstrip and coplanar lines (the Kirschning-
Jansen / Frankel corrections of the closed forms), which matters above roughly
h / lambda0 > 0.02.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from losslane.errors import LossLaneError, check_range, warn
from losslane.materials.conductor import sheet_return, strip_impedance
from losslane.materials.dielectric import Dielectric
from losslane.xsection.base import CrossSection, LineValues, Metal, check_dimensions
from losslane.xsection.fieldsolve.geometry import F_REF, Geometry
from losslane.xsection.fieldsolve.layouts import FieldOptions
from losslane.xsection.fieldsolve.solve import (
    LEVELS,
    Solution,
    level_of,
    relative_change,
    solve,
)
from losslane.xsection.rlgc import C0, RLGC, Mode


@dataclass(frozen=True)
class FieldSource:
    """How a section was made from a model class (``model.field_geometry``): its
    dimensions (metres) and the solver's options; what ``replace`` rebuilds from."""

    model: type
    dims: tuple[tuple[str, float], ...]
    options: FieldOptions


@dataclass(frozen=True)
class FieldSection(CrossSection):
    """A cross-section solved by the 2-D field solver; ``accuracy`` is 'coarse', 'normal'
    or 'fine' (see ``solve.LEVELS``). Made from a model class (``from_model``: the kind's
    dimensions and options, which ``replace`` varies) or from any ``Geometry``."""

    geometry: Geometry
    metal: Metal = field(default_factory=Metal)
    accuracy: str = "normal"
    kind: str = "field"
    source: FieldSource | None = field(default=None, compare=False)

    def __post_init__(self) -> None:
        level_of(self.accuracy)

    @classmethod
    def from_model(
        cls,
        model: type,
        dims: Mapping[str, float],
        options: FieldOptions,
        metal: Metal,
        accuracy: str = "normal",
    ) -> FieldSection:
        """The section of kind ``model`` at ``dims`` (its ``field_geometry`` layout)."""
        dims = {k: float(dims[k]) for k in model.dimensions}
        source = FieldSource(model, tuple(dims.items()), options)
        return cls(model.field_geometry(dims, options), metal, accuracy, model.kind, source)

    # -- the dimensions, as on the closed-form models ----------------------------------
    @property
    def dimensions(self) -> tuple[str, ...]:  # type: ignore[override]
        return () if self.source is None else tuple(k for k, _ in self.source.dims)

    def dimension_values(self) -> dict[str, float]:
        return {} if self.source is None else dict(self.source.dims)

    @property
    def search(self) -> Mapping:  # type: ignore[override]
        """The model's sizing intervals (the closed forms' validity ranges do not bound
        the solver)."""
        return {} if self.source is None else self.source.model.search

    @property
    def labels(self) -> tuple[tuple[str, float], ...]:
        """The geometry values shown in headings (name, metres): the dimensions and the
        etched trace's top width."""
        if self.source is None:
            return ()
        dims = dict(self.source.dims)
        top = self.source.options.top(dims)
        return tuple(dims.items()) + (() if top is None else (("top_width", float(top)),))

    def __getattr__(self, name: str):
        # the dimensions (width, height...) read as attributes, as on the closed-form models
        if name == "source" or name.startswith("__"):
            raise AttributeError(name)
        source = object.__getattribute__(self, "source")
        if source is not None:
            for key, value in source.dims:
                if key == name:
                    return value
        raise AttributeError(name)

    def replace(self, **changes) -> FieldSection:
        """A copy with dimensions or materials changed, rebuilt by the model's layout."""
        if self.source is None:
            return dataclasses.replace(self, **changes)
        src = self.source
        dims = dict(src.dims)
        for key in changes:
            if key not in dims and key not in ("dielectric", "metal"):
                raise LossLaneError(
                    f"{self.kind}: {key!r} is not a dimension of this line; its dimensions "
                    f"are {', '.join(dims)}"
                )
        dims.update({k: float(v) for k, v in changes.items() if k in dims})
        check_dimensions(self.kind, dims)
        options = src.options
        if "dielectric" in changes:
            options = dataclasses.replace(options, dielectric=changes["dielectric"])
        metal = changes.get("metal", self.metal)
        return FieldSection.from_model(src.model, dims, options, metal, self.accuracy)

    @property
    def n_conductors(self) -> int:  # type: ignore[override]
        return self.geometry.n_conductors

    @property
    def dielectric(self) -> Dielectric:  # type: ignore[override]
        """The dielectric around (or under) the first signal conductor."""
        if self.source is not None:
            return self.source.options.dielectric
        g = self.geometry
        tr = g.signals[0]
        faces = g.interfaces
        idx = int(
            np.clip(np.searchsorted(faces, tr.y + 0.5 * tr.thickness) - 1, 0, len(g.layers) - 1)
        )
        if tr.y >= g.stack_top - g.tol:
            idx = len(g.layers) - 1
        return g.layers[idx].dielectric

    # -- solutions --------------------------------------------------------------------
    def solutions(self) -> tuple[Solution, Solution]:
        """The solution at this accuracy and the next coarser one (for the estimate)."""
        level = level_of(self.accuracy)
        return solve(self.geometry, level), solve(self.geometry, level - 1)

    def solution(self) -> Solution:
        return solve(self.geometry, level_of(self.accuracy))

    def matrices(
        self, f: np.ndarray, sol: Solution | None = None
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """(R, L, G, C, L_ext) as (N, n, n) arrays."""
        f = np.atleast_1d(np.asarray(f, float))
        sol = sol or self.solution()
        n = sol.c0.shape[0]
        omega = 2 * np.pi * f
        eps = np.array(
            [
                np.ones(f.shape, complex) if d is None else d.eps(f)
                for _, d in self.geometry.regions()
            ]
        )  # (regions, N), eps' - j eps''
        cc = complex_capacitance(sol, eps)
        c = cc.real.copy()
        g = -omega[:, None, None] * cc.imag
        l_ext = np.broadcast_to(np.linalg.inv(sol.c0) / C0**2, f.shape + (n, n))
        r = np.zeros(f.shape + (n, n))
        l_int = np.zeros(f.shape + (n, n))
        m = self.metal
        signals = self.geometry.signals
        returns = []
        for grp in sol.groups:
            if grp.kind != "signal":
                returns.append(grp)
                continue
            k = grp.index
            gkk = float(grp.matrix[k, k])
            rough = m.foil.factor(f, m.conductor)
            aspect, proximity, balance, over_planes = _strip_ratios(self.geometry, signals[k])
            rk, lk = strip_impedance(
                f,
                m.conductor,
                gkk,
                gkk * grp.area,
                rough,
                aspect,
                proximity,
                over_planes,
                balance,
            )
            r_dc = 1.0 / (m.conductor.sigma * grp.area)
            shape = grp.matrix / gkk
            r += (rk - r_dc)[:, None, None] * shape
            r[:, k, k] += r_dc
            l_int += lk[:, None, None] * shape
        if returns:
            dr, dl = _return_matrices(f, m, returns)
            r += dr
            l_int += dl
        return r, l_ext + l_int, g, c, np.array(l_ext)

    def check_validity(self, f: np.ndarray) -> None:
        """Quasi-TEM holds while the cross-section is small against the wavelength in its
        densest dielectric (common practice: below a tenth of it)."""
        g = self.geometry
        dk = max([1.0] + [float(np.max(d.eps(f).real)) for _, d in g.regions() if d is not None])
        size = g.scale * np.sqrt(dk) * np.max(f, initial=0.0) / C0
        check_range("field solver (quasi-static)", "cross-section size/wavelength", size, 0, 0.1)

    def _warn_lossless(self, sol: Solution) -> None:
        if sol.lossless:
            warn(
                f"field solver: {', '.join(sol.lossless)} of zero thickness: conductor loss "
                "is not modelled there (the edge current of a zero-thickness strip has "
                "no finite loss); give the copper thickness"
            )

    def rlgc(self, f: np.ndarray) -> RLGC:
        f = np.atleast_1d(np.asarray(f, float))
        sol = self.solution()
        self.check_validity(f)
        self._warn_lossless(sol)
        r, l, g, c, _ = self.matrices(f, sol)
        return RLGC(f, r, l, g, c)

    def _rlgc(self, f: np.ndarray, modes: dict[str, Mode]) -> RLGC:
        # the solved matrices, exact also for a pair that is not symmetric
        return self.rlgc(f)

    def modes(self, f: np.ndarray) -> dict[str, Mode]:
        f = np.atleast_1d(np.asarray(f, float))
        sol = self.solution()
        self.check_validity(f)
        self._warn_lossless(sol)
        return self._modes(f, sol)

    def _modes(self, f: np.ndarray, sol: Solution) -> dict[str, Mode]:
        r, l, g, c, l_ext = self.matrices(f, sol)
        n = c.shape[-1]
        c0 = sol.c0
        if n == 1:
            return {
                "single": _mode(
                    "single",
                    r[:, 0, 0],
                    l[:, 0, 0],
                    g[:, 0, 0],
                    c[:, 0, 0],
                    l_ext[:, 0, 0],
                    float(c0[0, 0]),
                )
            }
        if n != 2:
            raise LossLaneError(
                f"field solver: {n} signal conductors have no even/odd modes; use rlgc() "
                "for the (N, n, n) matrices"
            )
        if abs(c0[0, 0] - c0[1, 1]) > 1e-3 * abs(c0[0, 0]):
            warn(
                "field solver: the pair is not symmetric; its even/odd values use the "
                "mean self terms (the (N, 2, 2) matrices are exact)"
            )

        def split(a: np.ndarray, sign: float) -> np.ndarray:
            return 0.5 * (a[..., 0, 0] + a[..., 1, 1]) + sign * a[..., 0, 1]

        out = {}
        for name, s in (("even", 1.0), ("odd", -1.0)):
            out[name] = _mode(
                name,
                split(r, s),
                split(l, s),
                split(g, s),
                split(c, s),
                split(l_ext, s),
                float(split(c0, s)),
            )
        return out

    def eddy(
        self,
        f: np.ndarray,
        *,
        accuracy: str = "normal",
        plane_width: float | None = None,
        estimate: bool = True,
    ):
        """The eddy-current solution of this cross-section's conductors
        (``fieldsolve.eddy.eddy_impedance``): R(f) and L(f) (N, n, n) with the strip(s),
        planes and grounds meshed, the metal's conductivity and plane thickness. The
        reference for the conductor model where proximity, corners or the DC-to-skin
        transition matter; smooth copper (roughness is not part of it)."""
        from losslane.xsection.fieldsolve.eddy import eddy_impedance

        m = self.metal
        return eddy_impedance(
            self.geometry,
            f,
            conductivity=m.conductor.sigma,
            plane_thickness=m.plane_thickness,
            plane_width=plane_width,
            accuracy=accuracy,
            estimate=estimate,
        )

    # -- reporting --------------------------------------------------------------------
    def error_estimate(self) -> dict:
        """Relative changes from the next coarser mesh setting (frequency independent,
        at the solve's permittivities): the discretisation error estimate."""
        fine, coarse = self.solutions()
        out = {
            "capacitance": relative_change(fine.c_ref, coarse.c_ref),
            "vacuum_capacitance": relative_change(fine.c0, coarse.c0),
        }
        gf = _total_factor(fine)
        gc = _total_factor(coarse)
        out["conductor_loss"] = (
            relative_change(gf, gc) if gf is not None and gc is not None else None
        )
        zf, zc = _static_modes(fine), _static_modes(coarse)
        out["z0"] = max(abs(zf[k][0] / zc[k][0] - 1) for k in zf) if zf else None
        out["eps_eff"] = max(abs(zf[k][1] / zc[k][1] - 1) for k in zf) if zf else None
        return out

    def solver_report(self) -> dict:
        fine = self.solution()
        return {
            "accuracy": self.accuracy,
            "error_estimate": self.error_estimate(),
            "elements": fine.elements,
            "unknowns": fine.unknowns,
            "reference_frequency_hz": F_REF,
            "conductor_loss_omitted": list(fine.lossless),
        }

    def line_values(self, f: np.ndarray) -> LineValues:
        f = np.atleast_1d(np.asarray(f, dtype=float))
        if self.n_conductors <= 2:
            return super().line_values(f)
        rl = self.rlgc(f)
        _, _, _, c, l_ext = self.matrices(f)
        # modal velocities of the lossless line: eigenvalues of L_ext C = eps_eff / c0^2
        lam = np.linalg.eigvals(l_ext @ c).real * C0**2
        return LineValues(self.kind, f, rl, None, eps_eff_modes=np.sort(lam, axis=-1))


def complex_capacitance(sol: Solution, eps: np.ndarray) -> np.ndarray:
    """C - j G/omega (N, n, n) for region permittivities ``eps`` (regions, N), complex,
    from the solve's reduced model: C = P - Q^T R^-1 Q with P, Q, R linear in eps."""
    p = np.einsum("rf,rij->fij", eps, sol.partition)
    if sol.reduced_r.shape[1] == 0:
        return p
    q = np.einsum("rf,rki->fki", eps, sol.reduced_q)
    r = np.einsum("rf,rkl->fkl", eps, sol.reduced_r)
    return p - np.einsum("fki,fkj->fij", q, np.linalg.solve(r, q))


def _strip_ratios(geom: Geometry, tr) -> tuple[float, float, float, bool]:
    """(width/thickness, width over the distance to the nearest return, the nearer
    plane's distance over the farther's, whether the returns are planes only) of a signal
    trace: the shape of its DC-to-skin transition (``materials.conductor.strip_impedance``;
    its fitted correction is for strips over planes, as in the closed forms)."""
    width = tr.x_right - tr.x_left
    planes = []
    if geom.plane_below:
        planes.append(tr.y)
    if geom.plane_above:
        planes.append(geom.stack_top - tr.top)
    grounds = [
        max(other.x_left - tr.x_right, tr.x_left - other.x_right)
        for other in geom.traces
        if not other.signal
    ]
    gaps = [g for g in planes + grounds if g > 0]
    balance = min(planes) / max(planes) if len(planes) == 2 and min(planes) > 0 else 0.0
    over_planes = bool(planes) and not grounds
    return width / tr.thickness, width / min(gaps) if gaps else 1.0, balance, over_planes


def _return_matrices(f: np.ndarray, m: Metal, returns: list) -> tuple[np.ndarray, np.ndarray]:
    """R and L_int (N, n, n) of the return path: its planes and coplanar grounds as the
    parts of one return (``materials.conductor.return_impedance``), in matrix form. With
    G = sum of the parts' factor matrices = V diag(lambda) V^T, each part i contributes
    K_i sym(V diag(Z_sheet(lambda, t_i)/lambda) V^T G_i): for one conductor (or commuting
    matrices) exactly the closed forms' K_i (G_i/G) Z_sheet(G, t_i)."""
    g_total = sum(grp.matrix for grp in returns)
    lam, vec = np.linalg.eigh(0.5 * (g_total + g_total.T))
    lam = np.maximum(lam, 1e-12 * max(float(lam.max()), 1e-300))
    r = 0.0
    l_int = 0.0
    for grp in returns:
        plane = grp.kind == "plane"
        depth = m.plane_thickness if plane else grp.thickness
        rough = (m.plane_roughness if plane else m.foil).factor(f, m.conductor)
        rs, ls = sheet_return(f[:, None], m.conductor, lam[None, :], depth)  # (N, n)
        omega = 2 * np.pi * f[:, None]
        with np.errstate(invalid="ignore", divide="ignore"):
            r_over_w = np.where(omega > 0, rs / np.where(omega > 0, omega, 1.0), 0.0)
        # Z / (j w) = L - j R / w per eigenvalue, times K (complex for a plated stack)
        y = np.asarray(rough)[:, None] * (ls - 1j * r_over_w) / lam
        mat = np.einsum("ik,fk,jk->fij", vec, y, vec) @ grp.matrix
        mat = 0.5 * (mat + np.swapaxes(mat, 1, 2))
        r = r - 2 * np.pi * f[:, None, None] * mat.imag
        l_int = l_int + mat.real
    return np.asarray(r), np.asarray(l_int)


def _mode(name: str, r, l, g, c, l_ext, c0: float) -> Mode:
    eps_eff = c / c0
    return Mode(name, np.asarray(eps_eff), np.sqrt(l_ext / c), r, l, g, c)


def _static_modes(sol: Solution) -> dict[str, tuple[float, float]]:
    c, c0 = sol.c_ref, sol.c0
    n = c.shape[0]
    if n == 1:
        return {"single": (1.0 / (C0 * np.sqrt(c[0, 0] * c0[0, 0])), c[0, 0] / c0[0, 0])}
    if n == 2:
        out = {}
        for name, s in (("even", 1.0), ("odd", -1.0)):
            cm = 0.5 * (c[0, 0] + c[1, 1]) + s * c[0, 1]
            c0m = 0.5 * (c0[0, 0] + c0[1, 1]) + s * c0[0, 1]
            out[name] = (1.0 / (C0 * np.sqrt(cm * c0m)), cm / c0m)
        return out
    return {}


def _total_factor(sol: Solution) -> np.ndarray | None:
    if not sol.groups:
        return None
    return sum(g.matrix for g in sol.groups)


__all__ = ["FieldSection", "LEVELS"]

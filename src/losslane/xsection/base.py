"""What every cross-section model shares: its metal, the model interface, and the line
quantities derived from a model's modes (impedance, delay, loss per inch, RLGC).

Like a transmission-line medium, a model supplies only its propagation modes; everything
else follows here. A model class is also the one source of its kind's description: the
name users write (``kind``), its length keys (``dimensions``, which are the required
scenario keys, the command-line options and the tolerance keys), its validity table
(``limits``, read by its warnings and by the sizing search) and its sizing intervals
(``search``). The registry (``xsection.registry``) is a list of such classes.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from typing import ClassVar

import numpy as np
from numpy.typing import ArrayLike

from losslane.errors import LossLaneError, warn
from losslane.materials.conductor import COPPER, Conductor, pair_return_shape
from losslane.materials.dielectric import Dielectric
from losslane.materials.roughness import Roughness, Smooth
from losslane.units import INCH, OZ_COPPER
from losslane.xsection.fitted import StaticCorrection
from losslane.xsection.rlgc import (
    ETA0,
    NP_TO_DB,
    RLGC,
    ConductorGroup,
    Mode,
    attenuation_split,
)
from losslane.xsection.validity import Limit, Quantities, check_limits


@dataclass(frozen=True)
class Metal:
    """Conductors of a line: the metal, the foil roughness of the signal conductor(s), and
    the return planes' roughness and thickness (1 oz copper by default, common practice)."""

    conductor: Conductor = COPPER
    foil: Roughness = field(default_factory=Smooth)
    plane_foil: Roughness | None = None
    plane_thickness: float = OZ_COPPER

    def __post_init__(self) -> None:
        if not np.isfinite(self.plane_thickness) or self.plane_thickness <= 0:
            raise LossLaneError(f"plane_thickness = {self.plane_thickness!r} m must be > 0")

    @property
    def plane_roughness(self) -> Roughness:
        """The return planes' roughness: ``plane_foil``, else the signal foil."""
        return self.foil if self.plane_foil is None else self.plane_foil


def positive(kind: str, key: str, value: ArrayLike, allow_zero: bool = False) -> None:
    """A LossLaneError unless the length ``value`` (a scalar, or an array of geometry
    samples: the first bad one is named) is finite and > 0 (>= 0 with ``allow_zero``)."""
    v = np.asarray(value, dtype=float)
    bad = ~np.isfinite(v) | ((v < 0) if allow_zero else (v <= 0))
    if np.any(bad):
        shown = value if v.ndim == 0 else float(v[bad][0])
        bound = ">= 0" if allow_zero else "> 0"
        raise LossLaneError(
            f"{kind}: {key} = {shown!r} m is not a valid length; it must be {bound}"
        )


#: dimensions for which 0 is a valid limit (a zero-thickness strip); every other is > 0
MAY_BE_ZERO = ("thickness",)


def check_dimensions(kind: str, dimensions: Mapping[str, ArrayLike]) -> None:
    """``positive`` for each {key: length or samples}, in order (0 allowed in ``MAY_BE_ZERO``)."""
    for key, value in dimensions.items():
        positive(kind, key, value, allow_zero=key in MAY_BE_ZERO)


def strip_loss_modelled(kind: str, thickness: ArrayLike, what: str, example: str) -> bool:
    """Whether the closed-form conductor loss applies: not for a strip of zero thickness
    (Wheeler's rule needs the strip's walls; the edge current of a zero-thickness strip
    makes its factor diverge), which is said in a warning. Geometry samples must agree.
    """
    t = np.asarray(thickness, dtype=float)
    if np.all(t == 0):
        warn(
            f"{kind}: thickness = 0, so {what} is not modelled "
            f"(give the copper thickness, e.g. {example})"
        )
        return False
    if np.any(t == 0):
        raise LossLaneError(
            f"{kind}: thickness samples mix zero and non-zero values; evaluate the "
            "zero-thickness samples separately"
        )
    return True


#: how a conductor's walls recede by dn into the metal: (geometry params, dn) -> params
Recede = Callable[[tuple, np.ndarray], tuple]


def strip_and_planes(
    z_air: Callable[[tuple], np.ndarray],
    p0: tuple,
    strip: tuple[str, Recede],
    planes: list[tuple[str, Recede]],
    scale: np.ndarray,
    area: np.ndarray,
    metal: Metal,
    aspect: np.ndarray,
    proximity: np.ndarray,
    balance: np.ndarray | float = 0.0,
) -> list[ConductorGroup]:
    """Wheeler's conductor groups of one mode: the strip(s), then each return plane.

    The strips' depth is G * ``area`` (their exact DC resistance), with their
    width/thickness ``aspect``, width over the distance to the nearer plane
    (``proximity``) and the nearer plane's distance over the farther's (``balance``, 0
    for one plane); a plane's depth is ``metal.plane_thickness`` with the planes' foil,
    marked wide.
    """
    groups = modal_strip_and_planes(
        lambda p: {"mode": z_air(p)},
        p0,
        strip,
        planes,
        scale,
        area,
        metal,
        aspect,
        proximity,
        balance=balance,
    )
    return groups["mode"]


def modal_strip_and_planes(
    z_air: Callable[[tuple], dict[str, np.ndarray]],
    p0: tuple,
    strip: tuple[str, Recede],
    planes: list[tuple[str, Recede]],
    scale: np.ndarray,
    area: np.ndarray,
    metal: Metal,
    aspect: np.ndarray,
    proximity: np.ndarray,
    at_p0: Mapping[str, np.ndarray] | None = None,
    balance: np.ndarray | float = 0.0,
) -> dict[str, list[ConductorGroup]]:
    """``strip_and_planes`` of every mode at once: ``z_air(params)`` returns {mode: Z_air},
    so each receded geometry is evaluated once for all modes (a pair's even and odd).
    With ``at_p0`` (the values at ``p0``) the difference is one-sided, step 1e-4 of
    ``scale``: one evaluation per wall instead of two (its error, of the order of the
    step, is far below the rule's own)."""

    def factors(recede: Recede) -> dict[str, np.ndarray]:
        dn = 1e-4 * np.asarray(scale, float)
        hi = z_air(recede(p0, dn))
        if at_p0 is not None:
            return {m: (hi[m] - at_p0[m]) / dn / ETA0 for m in hi}
        lo = z_air(recede(p0, -dn))
        return {m: (hi[m] - lo[m]) / (2 * dn) / ETA0 for m in hi}

    name, recede = strip
    g_strip = factors(recede)
    out = {
        m: [
            ConductorGroup(
                name,
                g,
                g * area,
                metal.conductor,
                metal.foil,
                aspect=aspect,
                proximity=proximity,
                balance=balance,
            )
        ]
        for m, g in g_strip.items()
    }
    for name, recede in planes:
        for m, g in factors(recede).items():
            out[m].append(
                ConductorGroup(
                    name,
                    g,
                    metal.plane_thickness,
                    metal.conductor,
                    metal.plane_roughness,
                    True,
                    between=len(planes) == 2,
                )
            )
    if set(out) == {"even", "odd"} and planes:
        # a symmetric pair: each mode's return sees both lines' currents
        # (``materials.conductor.sheet_return``), placed to match the modes' factors
        total = {m: sum(g.geometry_factor for g in out[m] if g.wide) for m in out}
        h, d = pair_return_shape(total["even"], total["odd"])
        for m, sign in (("even", 1.0), ("odd", -1.0)):
            out[m] = [dataclasses.replace(g, pair=(h, d, sign)) if g.wide else g for g in out[m]]
    return out


def air_factor(single: type[CrossSection], dims: Mapping[str, ArrayLike]) -> np.ndarray:
    """Z_air,corrected / Z_air,published of a single line (1 without a correction)."""
    corr = single.correction
    if corr is None:
        return np.asarray(1.0)
    k = single.correction_weight(dims)
    return np.exp(-np.asarray(k) * corr.air["single"](*single.static_parameters(dims)))


def fill_factor(
    single: type[CrossSection], dims: Mapping[str, ArrayLike], er: ArrayLike
) -> np.ndarray:
    """q_corrected / q_published of a single line (1 without a filling correction)."""
    corr = single.correction
    if corr is None or "single" not in corr.fill:
        return np.asarray(1.0)
    k = single.correction_weight(dims)
    return np.exp(np.asarray(k) * corr.fill["single"](*single.static_parameters(dims), er))


def pair_base(
    pair: type[CrossSection],
    single: type[CrossSection],
    single_dims: Mapping[str, ArrayLike],
    dims: Mapping[str, ArrayLike],
    er: ArrayLike,
) -> dict[str, tuple[np.ndarray, np.ndarray]]:
    """A pair's published even/odd values times the single line's field-solver correction
    (its air-filled capacitance and filling-factor ratios at the pair's strip and
    planes): the base its own correction multiplies. As the lines part, the pair's modes
    tend to the corrected single line, as the published formulas tend to the single
    line's published values."""
    pub = pair.published_static(dims, er)
    fa = air_factor(single, single_dims)
    fq = fill_factor(single, single_dims, er)
    return {m: (z * fa, 1.0 + (np.asarray(e, float) - 1.0) * fq) for m, (z, e) in pub.items()}


def pair_coupling(
    pair: type[CrossSection],
    dims: Mapping[str, ArrayLike],
    base_air: Mapping[str, np.ndarray] | None = None,
) -> np.ndarray:
    """ln(Z_even / Z_odd) of the published air-filled pair (from ``base_air``, the base
    values, when the caller has them: they carry one factor for both modes): the weight of
    a pair's own correction (0 for lines far apart)."""
    z = base_air
    if z is None:
        z = {m: v[0] for m, v in pair.published_static(dims, 1.0).items()}
    return np.log(np.asarray(z["even"], float) / np.asarray(z["odd"], float))


#: the modal transform of a symmetric pair: columns even (1, 1) and odd (1, -1), normalised
PAIR_MODES = ("even", "odd")
PAIR_TRANSFORM = np.array([[1.0, 1.0], [1.0, -1.0]]) / np.sqrt(2.0)


@dataclass(frozen=True)
class ModeValues:
    """The reported quantities of one propagation mode over frequency, (N,) each, SI:
    ``z0`` the lossless sqrt(L/C) (dispersion and internal inductance included), ``zc``
    the complex sqrt(Z/Y) (inf at DC), ``delay`` s/m, and the total, conductor and
    dielectric attenuation in Np/m (conductor + dielectric = total)."""

    z0: np.ndarray
    zc: np.ndarray
    eps_eff: np.ndarray
    delay: np.ndarray
    attenuation: np.ndarray
    conductor: np.ndarray
    dielectric: np.ndarray

    def db_per_in(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Total, conductor and dielectric loss in dB per inch."""
        per_in = NP_TO_DB * INCH
        return self.attenuation * per_in, self.conductor * per_in, self.dielectric * per_in


def mode_values(m: Mode, f: np.ndarray) -> ModeValues:
    """The reported quantities of mode ``m`` at ``f``."""
    omega = 2 * np.pi * f
    z = m.r + 1j * omega * m.l
    y = m.g + 1j * omega * m.c
    with np.errstate(divide="ignore", invalid="ignore"):
        zc = np.sqrt(z / y)
    total, cond, diel = attenuation_split(m.r, m.l, m.g, m.c, f)
    gamma = np.sqrt(z * y)
    with np.errstate(divide="ignore", invalid="ignore"):
        delay = np.where(omega > 0, gamma.imag / np.where(omega > 0, omega, 1), np.sqrt(m.l * m.c))
    return ModeValues(np.sqrt(m.l / m.c), zc, m.eps_eff, delay, total, cond, diel)


@dataclass(frozen=True)
class LineValues:
    """What a line reports at the frequencies ``f``: its main mode (the single mode, or a
    pair's odd mode, whose loss is the differential mode's), a pair's even mode, and the
    per-unit-length matrices. Sections of more than two conductors report the matrices
    and the modal effective permittivities (``eps_eff_modes``, (N, n)) only."""

    kind: str
    f: np.ndarray
    rlgc: RLGC | None
    main: ModeValues | None
    even: ModeValues | None = None
    eps_eff_modes: np.ndarray | None = None

    @property
    def n_conductors(self) -> int:
        if self.rlgc is not None:
            return self.rlgc.n
        return 2 if self.even is not None else 1

    @property
    def impedance(self) -> np.ndarray:
        """The line's impedance as sizing and spread use it: Z0, or Z_diff = 2 Z_odd."""
        assert self.main is not None
        return self.main.z0 * (2.0 if self.n_conductors == 2 else 1.0)


class CrossSection:
    """A transmission-line cross-section.

    A model class sets ``kind``, ``n_conductors``, ``dimensions`` (its length fields, in
    metres), ``limits`` and ``search``, and implements either ``mode_arrays`` -- the
    array-native form: its dimensions as arrays of geometry samples broadcasting against
    the frequency axis, so one implementation serves a line and a batch of samples
    (``xsection.batch``) -- or ``modes(f)`` directly. ``modes`` returns the propagation
    modes ('single' for one signal conductor; 'even' and 'odd' for a symmetric pair) with
    their per-line R, L, G, C over ``f`` (Hz, f = 0 allowed). Everything else is derived:
    ``rlgc``, ``line_values``, ``replace``.
    """

    kind: ClassVar[str] = ""
    n_conductors: ClassVar[int] = 1
    dielectric: Dielectric
    metal: Metal
    #: the length fields, in the order users think of them (the spread draws in this order)
    dimensions: ClassVar[tuple[str, ...]] = ()
    #: the validity table (see ``xsection.validity``)
    limits: ClassVar[tuple[Limit, ...]] = ()
    #: sizing: dimension -> (reference dimensions summed, lowest, highest ratio searched);
    #: the interval is then narrowed to ``limits``
    search: ClassVar[Mapping[str, tuple[tuple[str, ...], float, float]]] = {}
    #: the field-solver correction of the quasi-static results (``xsection.fitted``):
    #: a model with one implements ``static_parameters``, ``static_dimensions`` and
    #: ``published_static``, and uses ``corrected_static`` for its modes
    correction: ClassVar[StaticCorrection | None] = None

    def __post_init__(self) -> None:
        # run by the dataclass __init__ of the closed-form models
        check_dimensions(self.kind, self.dimension_values())

    # -- what the registry and the design helpers read ---------------------------------
    @classmethod
    def vectorized(cls) -> bool:
        """True when the class evaluates a batch of geometry samples in one array call
        (it implements ``mode_arrays`` and keeps the derived ``modes``)."""
        return cls.mode_arrays is not CrossSection.mode_arrays and cls.modes is CrossSection.modes

    def dimension_values(self) -> dict[str, float]:
        """The dimensions as {key: metres}."""
        return {k: float(getattr(self, k)) for k in self.dimensions}

    def replace(self, **changes) -> CrossSection:
        """A copy with some dimensions (keys of ``dimensions``, metres) or materials
        (``dielectric``, ``metal``) changed."""
        return dataclasses.replace(self, **changes)

    def model_report(self) -> dict:
        """Which models produce this section's numbers (the ``model`` object of
        `losslane line --json`): the published methods of its validity table, the
        field-solver correction of its quasi-static values and the conductor model."""
        corr = type(self).correction
        out: dict = {
            "solver": "closed-form",
            "methods": list(dict.fromkeys(lim.method for lim in self.limits)),
        }
        if corr is not None:
            out["static_correction"] = {
                "method": "fitted to the 2-D field solver (tools/fit_static_corrections.py)",
                "box": {
                    a.name: [a.low, a.high] for a in corr.axes + ((corr.dk,) if corr.dk else ())
                },
                "fit": corr.note,
            }
        out["conductor"] = (
            "strip: exact DC resistance, DC-to-skin transition fitted to the eddy-current "
            "solver (over planes with a fitted correction), Wheeler's rule at high "
            "frequency; returns: closed-form slab under a line current, a stripline's two "
            "planes coupled while their current spreads"
        )
        return out

    def check_validity(self, q: Quantities) -> None:
        """Warn for every validity range of ``limits`` that the quantities leave."""
        check_limits(self.limits, q)

    @classmethod
    def dimensions_from_spec(cls, spec: Mapping, where) -> dict[str, float]:
        """The dimensions (metres) of a user's spec: each key of ``dimensions`` as a length
        (> 0; a thickness >= 0). A kind with other kinds of keys (a list of traces, say)
        overrides this; the factory checks the keys against ``spec_keys`` first."""
        from losslane.limits import check_dimension
        from losslane.spec import key_name, quantity

        out: dict[str, float] = {}
        for key in cls.dimensions:
            out[key] = quantity(where, spec, key, "length")
            bad = out[key] < 0 if key in MAY_BE_ZERO else out[key] <= 0
            if bad:
                bound = ">= 0" if key in MAY_BE_ZERO else "> 0"
                raise LossLaneError(
                    f"{key_name(where, key)} = {spec[key]!r}: a {cls.kind} needs {key} {bound}"
                )
            check_dimension(out[key], key_name(where, key), spec[key], key in MAY_BE_ZERO)
        return out

    @classmethod
    def spec_keys(cls) -> tuple[str, ...]:
        """The keys of a user's spec that describe the geometry (required)."""
        return cls.dimensions

    @classmethod
    def size_bounds(cls, vary: str, dims: Mapping[str, float]) -> tuple[float, str] | None:
        """An upper bound on dimension ``vary`` (m) beyond which the model refuses the
        input (not a validity range: those are in ``limits``), with its reason; None."""
        return None

    @classmethod
    def field_geometry(cls, dims: Mapping[str, float], options):
        """The cross-section as a field-solver ``Geometry`` at ``dims`` (metres) with the
        solver's ``FieldOptions``; kinds without a layout do not override this."""
        raise NotImplementedError

    @classmethod
    def solvable(cls) -> bool:
        """True when the kind also runs in the 2-D field solver (it has a layout)."""
        return cls.field_geometry.__func__ is not CrossSection.field_geometry.__func__

    # -- the field-solver correction -----------------------------------------------------
    @classmethod
    def static_parameters(cls, dims: Mapping[str, ArrayLike]) -> tuple[np.ndarray, ...]:
        """The correction's dimensionless parameters at ``dims`` (arrays broadcast)."""
        raise NotImplementedError

    @classmethod
    def static_dimensions(cls, params: tuple[float, ...]) -> dict[str, float]:
        """Dimensions (m) that have the correction's ``params`` (for the fit's grid)."""
        raise NotImplementedError

    @classmethod
    def published_static(
        cls, dims: Mapping[str, ArrayLike], er: ArrayLike
    ) -> dict[str, tuple[np.ndarray, np.ndarray]]:
        """{mode: (Z_air, eps_eff)}, quasi-static, from the published formulas alone."""
        raise NotImplementedError

    @classmethod
    def corrected_static(
        cls, dims: Mapping[str, ArrayLike], er: ArrayLike
    ) -> dict[str, tuple[np.ndarray, np.ndarray]]:
        """{mode: (Z_air, eps_eff)}, quasi-static: the published formulas times the
        field-solver correction (Z0 = Z_air / sqrt(eps_eff))."""
        corr = cls.correction
        if corr is None:
            return cls.published_static(dims, er)
        out = cls.base_static(dims, er)
        params = cls.static_parameters(dims)
        k = cls.correction_weight(dims, {m: z for m, (z, _) in out.items()})
        return {
            m: (corr.z_air(m, params, z, k), corr.eps_eff(m, params, e, er, k))
            for m, (z, e) in out.items()
        }

    @classmethod
    def base_static(
        cls, dims: Mapping[str, ArrayLike], er: ArrayLike
    ) -> dict[str, tuple[np.ndarray, np.ndarray]]:
        """What the correction's series multiply: the published formulas (a pair: with the
        single line's correction, see ``pair_base``)."""
        return cls.published_static(dims, er)

    @classmethod
    def base_air(
        cls, dims: Mapping[str, ArrayLike], published_air: Mapping[str, np.ndarray]
    ) -> dict[str, np.ndarray]:
        """The air-filled impedances the correction's series multiply (``base_static`` at
        Dk = 1, from the published ``published_air``)."""
        return dict(published_air)

    @classmethod
    def correction_weight(
        cls, dims: Mapping[str, ArrayLike], base_air: Mapping[str, np.ndarray] | None = None
    ) -> ArrayLike:
        """The factor on the correction's series (1; a pair's coupling, so that its own
        correction vanishes as the lines part and the single line's remains). ``base_air``:
        the modes' base air-filled impedances where the caller has them."""
        return 1.0

    @classmethod
    def corrected_air(cls, dims: Mapping[str, ArrayLike]) -> dict[str, np.ndarray]:
        """{mode: Z_air} with the correction: what Wheeler's rule differentiates."""
        pub = {m: v[0] for m, v in cls.published_static(dims, 1.0).items()}
        corr = cls.correction
        if corr is None:
            return pub
        params = cls.static_parameters(dims)
        base = cls.base_air(dims, pub)
        k = cls.correction_weight(dims, base)
        return {m: corr.z_air(m, params, z, k) for m, z in base.items()}

    @classmethod
    def published(cls) -> type[CrossSection]:
        """The same model with its field-solver correction off: the published formulas
        alone (what other implementations of the papers compute)."""
        if cls.correction is None:
            return cls
        return type(cls.__name__, (cls,), {"correction": None, "__module__": cls.__module__})

    @classmethod
    def corrected_z_air(cls, mode: str, dims: Mapping[str, ArrayLike]) -> np.ndarray:
        """The corrected air-filled impedance of ``mode``."""
        return cls.corrected_air(dims)[mode]

    # -- the model interface ------------------------------------------------------------
    def modes(self, f: np.ndarray) -> dict[str, Mode]:
        f = np.atleast_1d(np.asarray(f, dtype=float))
        return self.mode_arrays(f, self.dielectric.eps(f), **self.dimension_values())

    def mode_arrays(
        self, f: np.ndarray, eps_r: np.ndarray, **dimensions: ArrayLike
    ) -> dict[str, Mode]:
        """The modes with the ``dimensions`` given as arrays of geometry samples that
        broadcast against ``f`` (F,), e.g. (S, 1), and the laminate's permittivity
        ``eps_r`` ((F,), or (S, F) with a Dk per sample); the modes' arrays are then
        (S, F). The section supplies everything else (metal, grounded...). Validity
        warnings and input errors fire when any sample triggers them."""
        raise NotImplementedError

    # -- derived ------------------------------------------------------------------------
    def rlgc(self, f: np.ndarray) -> RLGC:
        f = np.atleast_1d(np.asarray(f, dtype=float))
        return self._rlgc(f, self.modes(f))

    def _rlgc(self, f: np.ndarray, modes: dict[str, Mode]) -> RLGC:
        """The per-unit-length matrices at ``f`` from the section's ``modes`` there."""
        if self.n_conductors == 1:
            m = modes["single"]
            return RLGC.single(f, m.r, m.l, m.g, m.c)
        return pair_rlgc(f, modes["even"], modes["odd"])

    def line_values(self, f: np.ndarray) -> LineValues:
        """The line's reported quantities at ``f`` (what ``losslane line`` prints)."""
        f = np.atleast_1d(np.asarray(f, dtype=float))
        modes = self.modes(f)
        rl = self._rlgc(f, modes)
        if self.n_conductors == 1:
            return LineValues(self.kind, f, rl, mode_values(modes["single"], f))
        return LineValues(
            self.kind, f, rl, mode_values(modes["odd"], f), mode_values(modes["even"], f)
        )

    def attenuation_db_per_in(self, f: np.ndarray) -> np.ndarray:
        """The main mode's attenuation (the differential mode of a pair), dB per inch."""
        values = self.line_values(f)
        assert values.main is not None, f"{self.kind}: no main mode"
        return values.main.db_per_in()[0]


def pair_rlgc(f: np.ndarray, even: Mode, odd: Mode) -> RLGC:
    """2x2 per-unit-length matrices of a symmetric pair from its even and odd modes.

    For a symmetric pair the modal transform is fixed ([1, 1], [1, -1]); self terms are
    the mean of the modes and mutual terms half their difference (per-line quantities),
    e.g. L11 = (Le + Lo)/2, L12 = (Le - Lo)/2, C12 = (Ce - Co)/2 < 0 (Maxwell form). The
    transform travels with the matrices, so a line block uses the modes directly.
    """

    def mat(e: np.ndarray, o: np.ndarray) -> np.ndarray:
        out = np.empty(f.shape + (2, 2))
        out[:, 0, 0] = out[:, 1, 1] = (e + o) / 2
        out[:, 0, 1] = out[:, 1, 0] = (e - o) / 2
        return out

    return RLGC(
        f,
        mat(even.r, odd.r),
        mat(even.l, odd.l),
        mat(even.g, odd.g),
        mat(even.c, odd.c),
        PAIR_TRANSFORM,
    )

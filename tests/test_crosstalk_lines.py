"""Groups of traces (stripline-group, microstrip-group): coupled-line physics against
published exact results.

Sources beside each check:
* coupled-line coupler theory (D. M. Pozar, *Microwave Engineering*, the TEM coupled-line
  coupler): with every port at Z0 = sqrt(Z0e Z0o) the coupled (near-end) port peaks at
  C = (Z0e - Z0o)/(Z0e + Z0o) at odd multiples of the quarter-wave frequency, and the
  isolated (far-end) port of a homogeneous (TEM) line is exactly 0;
* weak-coupling crosstalk coefficients (S. H. Hall, H. L. Heck, *Advanced Signal
  Integrity for High-Speed Digital Designs*): backward K_b = (C_m/C + L_m/L)/4 (the
  saturated near-end plateau of a matched long line), forward |FEXT| = (w l / 2 v)
  |L_m/L - C_m/C| for a short line (linear in length); C_m = -C12 > 0 of the Maxwell
  capacitance matrix;
* the existing pair models: Cohn's coupled stripline (closed form, stated within 3 % for
  these thickness ratios; see DEVELOPERS.md) and the field-solved pair kinds.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest

from losslane.api import section
from losslane.errors import LossLaneError, LossLaneWarning
from losslane.materials.dielectric import make_dielectric
from losslane.network.line import UniformLine
from losslane.xsection.group import MicrostripGroup, StriplineGroup
from losslane.xsection.rlgc import RLGC

FLAT = make_dielectric(3.6, 0.0, None, "constant", "flat")
STRIP = {"thickness": "0.6 mil", "below": "5 mil", "above": "5 mil"}
MICRO = {"thickness": "0.6 mil", "height": "4 mil"}


def group(kind: str, traces: list[dict], dielectric=FLAT, **extra):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        dims = STRIP if kind == "stripline-group" else MICRO
        return section({"kind": kind, "dielectric": dielectric, "traces": traces, **dims, **extra})


def two_traces(gap: str = "5 mil", width: str = "5 mil") -> list[dict]:
    return [{"name": "a", "width": width}, {"name": "b", "width": width, "gap": gap}]


def static(sec):
    """(L_ext, C) of the section (n, n): the lossless, frequency-independent matrices."""
    _, _, _, c, l_ext = sec.field.matrices(np.array([1e9]))
    return l_ext[0], c[0]


def lossless_line(l_ext: np.ndarray, c: np.ndarray, f: np.ndarray) -> UniformLine:
    z = np.zeros((f.size,) + c.shape)
    return UniformLine.from_rlgc(
        RLGC(f, z, np.broadcast_to(l_ext, z.shape), z, np.broadcast_to(c, z.shape))
    )


def even_odd(l_ext: np.ndarray, c: np.ndarray) -> tuple[float, float]:
    """(Z0e, Z0o) of a symmetric two-conductor line."""
    ze = np.sqrt((l_ext[0, 0] + l_ext[0, 1]) / (c[0, 0] + c[0, 1]))
    zo = np.sqrt((l_ext[0, 0] - l_ext[0, 1]) / (c[0, 0] - c[0, 1]))
    return float(ze), float(zo)


@pytest.fixture(scope="module")
def strip_pair_of_traces():
    return group("stripline-group", two_traces())


def test_group_kinds_are_registered_field_solver_kinds():
    from losslane.xsection import registry

    assert registry.model("stripline-group") is StriplineGroup
    assert registry.model("microstrip-group") is MicrostripGroup
    assert {"stripline-group", "microstrip-group"} <= set(registry.field_kinds())
    # the vertical keys are those of the single-trace kinds (a stackup layer fills them)
    assert set(StriplineGroup.dimensions) == {"below", "above", "thickness"}
    assert set(MicrostripGroup.dimensions) == {"height", "thickness"}


def test_conductor_order_and_maxwell_signs(strip_pair_of_traces):
    sec = group(
        "stripline-group",
        [
            {"name": "p", "width": "5 mil", "spacing": "7 mil"},
            {"name": "s", "width": "6 mil", "gap": "15 mil"},
        ],
    )
    assert sec.n_conductors == 3
    assert [m.conductors for m in sec.members] == [(0, 1), (2,)]
    assert sec.pairs == ((0, 1),)
    xs = [0.5 * (t.x_left + t.x_right) for t in sec.geometry.signals]
    # P left of N, then the single trace 15 mil from the pair's right edge
    mil = 25.4e-6
    assert xs[1] - xs[0] == pytest.approx(12 * mil, rel=1e-12)
    assert (xs[2] - 3 * mil) - (xs[1] + 2.5 * mil) == pytest.approx(15 * mil, rel=1e-12)
    _, c = static(sec)
    assert np.all(np.diag(c) > 0) and np.all(c[~np.eye(3, dtype=bool)] < 0)  # Maxwell form


def test_stripline_near_end_peak_is_the_coupler_value(strip_pair_of_traces):
    # Pozar: |S31| = C at odd multiples of the quarter-wave frequency, Z_ref = sqrt(Z0e Z0o)
    l_ext, c = static(strip_pair_of_traces)
    ze, zo = even_odd(l_ext, c)
    coupler = (ze - zo) / (ze + zo)
    kb = 0.25 * (-c[0, 1] / c[0, 0] + l_ext[0, 1] / l_ext[0, 0])  # Hall & Heck
    assert coupler == pytest.approx(2 * kb, rel=1e-9)  # the same in a TEM line
    assert 0.05 < coupler < 0.2
    length = 0.01
    eps_eff = float(np.linalg.eigvals(l_ext @ c).real.max()) * 299_792_458.0**2
    fq = 299_792_458.0 / np.sqrt(eps_eff) / (4 * length)
    f = np.linspace(0.0, 6 * fq, 6001)  # fq, 3 fq, 5 fq on the grid
    s = lossless_line(l_ext, c, f).s(length, np.sqrt(ze * zo))
    nxt = np.abs(s[:, 1, 0])
    for k in (1000, 3000, 5000):
        assert nxt[k] == pytest.approx(coupler, rel=1e-6)
        assert nxt[k] >= nxt[k - 1] and nxt[k] >= nxt[k + 1]  # a peak
    assert nxt.max() == pytest.approx(coupler, rel=1e-6)


def test_stripline_far_end_coupling_vanishes(strip_pair_of_traces):
    # homogeneous dielectric (TEM): inductive and capacitive coupling cancel at the far end
    l_ext, c = static(strip_pair_of_traces)
    ze, zo = even_odd(l_ext, c)
    f = np.linspace(0.0, 40e9, 401)
    s = lossless_line(l_ext, c, f).s(0.1, np.sqrt(ze * zo))
    assert np.abs(s[:, 3, 0]).max() < 1e-9
    assert np.abs(s[:, 1, 0]).max() > 0.05


def test_microstrip_far_end_coupling_is_linear_in_length():
    # Hall & Heck: |FEXT| = (w l / 2 v) |L_m/L - C_m/C| for short lines, Z_ref = sqrt(L/C)
    sec = group("microstrip-group", two_traces("7 mil", "7 mil"))
    l_ext, c = static(sec)
    f = np.array([1e9, 2e9])
    line = lossless_line(l_ext, c, f)
    z0 = np.sqrt(l_ext[0, 0] / c[0, 0])
    v = 1.0 / np.sqrt(l_ext[0, 0] * c[0, 0])
    kf = abs(l_ext[0, 1] / l_ext[0, 0] + c[0, 1] / c[0, 0])
    assert kf > 0.01  # microstrip: the coupling does not cancel
    fext = {length: np.abs(line.s(length, z0)[:, 3, 0]) for length in (1e-3, 2e-3)}
    assert fext[2e-3] / fext[1e-3] == pytest.approx(2.0, rel=2e-4)
    for length, x in fext.items():
        assert x == pytest.approx(2 * np.pi * f * length / (2 * v) * kf, rel=5e-4)


def test_near_end_step_plateau_is_kb_on_a_long_line():
    # Hall & Heck: a step on the aggressor gives the saturated near-end plateau K_b on a
    # matched long line; through the scenario, the channel and the time-domain helpers
    from losslane.channel import build_channel
    from losslane.crosstalk.evaluate import evaluate_crosstalk
    from losslane.scenario import parse_scenario

    sec = group("stripline-group", two_traces())
    l_ext, c = static(sec)
    kb = 0.25 * (-c[0, 1] / c[0, 0] + l_ext[0, 1] / l_ext[0, 0])
    z0 = float(np.sqrt(l_ext[0, 0] / c[0, 0]))  # = sqrt(Z0e Z0o) in a TEM line
    text = f"""
[sweep]
start = "0 Hz"
stop = "20 GHz"
step = "10 MHz"
[ports]
reference = "{z0!r} ohm"
[dielectrics.flat]
dk = 3.6
df = 0.0
model = "constant"
[lines.two]
kind = "stripline-group"
thickness = "0.6 mil"
below = "5 mil"
above = "5 mil"
dielectric = "flat"
conductivity = "1e12 S/m"
traces = [{{ name = "a", width = "5 mil" }}, {{ name = "b", width = "5 mil", gap = "5 mil" }}]
[[channel]]
line = "two"
length = "12 in"
[crosstalk]
victim = "b"
"""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", LossLaneWarning)
        xt = evaluate_crosstalk(build_channel(parse_scenario(text)))
    w = xt.step_waveforms()
    td = xt.victim_delay()
    assert td == pytest.approx(0.3048 * np.sqrt(3.6) / 299_792_458.0, rel=2e-3)
    t = w.time_s
    plateau = w.values[(t > 0.2 * 2 * td) & (t < 0.8 * 2 * td), 0, 0]
    assert np.mean(plateau) == pytest.approx(kb, rel=0.01)
    assert np.ptp(plateau) < 0.01 * kb  # flat: saturated
    after = w.values[(t > 2 * td + 0.3e-9) & (t < 2.5 * td), 0, 0]
    assert np.abs(after).max() < 0.02 * kb  # it ends after one round trip


def test_far_apart_traces_are_the_single_line():
    dims = {"dielectric": "low-loss"}
    sec = group("stripline-group", two_traces("60 mil"), **dims)
    rl = sec.rlgc(np.array([1e8, 1e9, 1e10]))
    single = section({"kind": "stripline", "width": "5 mil", "solver": "field", **STRIP, **dims})
    one = single.rlgc(np.array([1e8, 1e9, 1e10]))
    # coupling: mutual terms 80 dB below the self terms
    for m in (rl.c, rl.l):
        assert np.all(np.abs(m[:, 0, 1]) < 1e-4 * np.abs(m[:, 0, 0]))
    # each trace is the single line
    for k in (0, 1):
        for a, b in ((rl.r, one.r), (rl.l, one.l), (rl.g, one.g), (rl.c, one.c)):
            assert a[:, k, k] == pytest.approx(b[:, 0, 0], rel=1e-4)


def test_far_apart_pairs_have_the_pair_models_modes():
    traces = [
        {"name": "p1", "width": "5 mil", "spacing": "7 mil"},
        {"name": "p2", "width": "5 mil", "spacing": "7 mil", "gap": "60 mil"},
    ]
    sec = group("stripline-group", traces, dielectric="low-loss")
    f = np.array([1e9, 1e10])
    base = {"width": "5 mil", "spacing": "7 mil", "dielectric": "low-loss", **STRIP}
    field = section({"kind": "stripline-pair", "solver": "field", **base}).line_values(f)
    closed = section({"kind": "stripline-pair", **base}).line_values(f)
    for name in ("p1", "p2"):
        sub = sec.trace_rlgc(f, name)
        z = {}
        for mode, sign in (("even", 1.0), ("odd", -1.0)):
            lm = 0.5 * (sub.l[:, 0, 0] + sub.l[:, 1, 1]) + sign * sub.l[:, 0, 1]
            cm = 0.5 * (sub.c[:, 0, 0] + sub.c[:, 1, 1]) + sign * sub.c[:, 0, 1]
            z[mode] = np.sqrt(lm / cm)
        # the field-solved pair kind: the same solver, so to its rounding
        assert z["odd"] == pytest.approx(field.main.z0, rel=1e-4)
        assert z["even"] == pytest.approx(field.even.z0, rel=1e-4)
        # Cohn's closed form, within its stated 3 %
        assert z["odd"] == pytest.approx(closed.main.z0, rel=0.03)
        assert z["even"] == pytest.approx(closed.even.z0, rel=0.03)
        # the victim's loss per inch is the pair's differential loss
        assert sec.trace_db_per_in(f, name) == pytest.approx(field.main.db_per_in()[0], rel=1e-3)


def test_far_apart_microstrip_pairs_have_the_field_pair_modes():
    traces = [
        {"name": "p1", "width": "7 mil", "spacing": "8 mil"},
        {"name": "p2", "width": "7 mil", "spacing": "8 mil", "gap": "45 mil"},
    ]
    extra = {"accuracy": "coarse"}
    sec = group("microstrip-group", traces, dielectric="low-loss", **extra)
    pair = section(
        {
            "kind": "microstrip-pair",
            "width": "7 mil",
            "spacing": "8 mil",
            "solver": "field",
            "dielectric": "low-loss",
            **MICRO,
            **extra,
        }
    )
    modes = pair.modes(np.array([1e9]))
    _, c = static(sec)
    c0 = sec.field.solution().c0
    l_ext, _ = static(sec)
    for mode, sign in (("even", 1.0), ("odd", -1.0)):
        lm = l_ext[0, 0] + sign * l_ext[0, 1]
        cm = c[0, 0] + sign * c[0, 1]
        c0m = c0[0, 0] + sign * c0[0, 1]
        assert np.sqrt(lm / cm) == pytest.approx(modes[mode].z0[0], rel=2e-4)
        assert cm / c0m == pytest.approx(modes[mode].eps_eff[0], rel=2e-4)


def test_microstrip_coupling_decays_with_the_gap():
    # in microstrip the coupling decays slowly (a power law, not exponentially): check the
    # trend, strictly decreasing with the gap
    ratios = []
    for gap in ("4 mil", "8 mil", "16 mil"):
        l_ext, c = static(group("microstrip-group", two_traces(gap, "7 mil")))
        ratios.append(-c[0, 1] / c[0, 0])
    assert ratios[0] > ratios[1] > ratios[2] > 0


def test_mirror_symmetric_group_has_mirror_symmetric_matrices():
    traces = [
        {"name": "a1", "width": "5 mil", "spacing": "7 mil"},
        {"name": "v", "width": "5 mil", "spacing": "7 mil", "gap": "12 mil"},
        {"name": "a2", "width": "5 mil", "spacing": "7 mil", "gap": "12 mil"},
    ]
    sec = group("stripline-group", traces, dielectric="low-loss", accuracy="coarse")
    rl = sec.rlgc(np.array([1e8, 1e10]))
    for m in (rl.r, rl.l, rl.g, rl.c):
        scale = np.abs(np.diagonal(m, axis1=1, axis2=2)).max()
        assert np.abs(m - m[:, ::-1, ::-1]).max() < 1e-9 * scale  # mirror
        assert np.abs(m - np.swapaxes(m, 1, 2)).max() < 1e-12 * scale  # reciprocal
    # and in the 12-port of a length of it: mirroring the conductors maps S onto itself,
    # so both aggressors couple alike into the victim (a P-N swap of every pair)
    s = UniformLine.from_rlgc(rl).s(0.05)
    mirror = np.r_[5:-1:-1, 11:5:-1]
    assert np.abs(s - s[:, mirror][:, :, mirror]).max() < 1e-9


def test_group_input_errors():
    base = {"kind": "stripline-group", "dielectric": "low-loss", **STRIP}
    cases = [
        ([{"name": "a", "width": "5 mil", "gap": "5 mil"}], "first trace has no previous"),
        ([{"name": "a", "width": "5 mil"}, {"name": "b", "width": "5 mil"}], "missing gap"),
        (
            [{"name": "a", "width": "5 mil"}, {"name": "a", "width": "5 mil", "gap": "5 mil"}],
            "another trace has that name",
        ),
        ([{"name": "a", "width": "5 mil", "pitch": "5 mil"}], "unknown key 'pitch'"),
        ([{"name": "a", "width": "5"}], "bare number"),
        ([], "expected a list of traces"),
    ]
    for traces, msg in cases:
        with pytest.raises(LossLaneError, match=msg):
            section({**base, "traces": traces})
    with pytest.raises(LossLaneError, match="missing .*traces"):
        section(base)
    with pytest.raises(LossLaneError, match="top_width"):
        section({**base, "traces": two_traces(), "top_width": "4 mil"})
    with pytest.raises(LossLaneError, match="no closed form"):
        section({**base, "traces": two_traces(), "solver": "closed-form"})
    with pytest.raises(LossLaneError, match="a coating needs|no outer face"):
        section(
            {
                **base,
                "traces": two_traces(),
                "coating_thickness": "1 mil",
                "coating_dielectric": "solder-mask",
            }
        )

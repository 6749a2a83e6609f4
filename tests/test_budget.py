"""The loss budget (losslane.budget): Nyquist, check points, the per-segment table and its
reflections row, margin and pass/fail. Each check names its outside source."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
import skrf
from budget_scenarios import PASSING_BUDGET, SMALL_CHANNEL, parse, pieces, scenario_text
from reported import properties

from losslane.api import demo_scenario_path
from losslane.budget import (
    REFLECTIONS_ROW,
    baud_rate,
    check_points,
    evaluate_budget,
    nyquist_frequency,
    validate,
)
from losslane.channel import build_channel
from losslane.errors import LossLaneError
from losslane.scenario import Budget, Check, load_scenario
from losslane.units import parse_data_rate


@pytest.fixture(scope="module")
def demo():
    result = build_channel(load_scenario(demo_scenario_path(single_ended=True)))
    return result, evaluate_budget(result)


# ------------------------------------------------------------------------------- Nyquist


@pytest.mark.parametrize(
    ("rate", "modulation", "nyquist_hz"),
    [
        # Nyquist = baud / 2; NRZ 1 bit per symbol, PAM4 2 (common practice)
        ("32 Gb/s", "nrz", 16e9),
        ("106.25 Gb/s", "pam4", 26.5625e9),
        ("25.78125 Gb/s", "nrz", 12.890625e9),
        ("53.125 Gb/s", "pam4", 13.28125e9),
        ("10.3125 Gb/s", "nrz", 5.15625e9),
        ("16 GT/s", "nrz", 8e9),
    ],
)
def test_nyquist_of_common_rates(rate: str, modulation: str, nyquist_hz: float) -> None:
    bps = parse_data_rate(rate)
    assert nyquist_frequency(bps, modulation) == pytest.approx(nyquist_hz, rel=1e-15)
    # the scenario's Budget object says the same
    b = Budget(bps, modulation, None, ())
    assert b.nyquist == pytest.approx(nyquist_hz, rel=1e-15)
    assert baud_rate(bps, modulation) == pytest.approx(2 * nyquist_hz, rel=1e-15)


def test_unknown_modulation_is_an_error() -> None:
    with pytest.raises(LossLaneError, match="modulation = 'pam8'.*'nrz', 'pam4'"):
        nyquist_frequency(10e9, "pam8")


def test_check_points_nyquist_first_then_checks() -> None:
    f = np.linspace(0, 40e9, 4001)
    b = Budget(32e9, "nrz", 28.0, (Check(5.8e9, 1.5, 12.0), Check(20e9, None, 10.0)))
    pts = check_points(b, f)
    assert [p.label for p in pts] == ["Nyquist", "check 1", "check 2"]
    assert [p.at for p in pts] == [16e9, 5.8e9, 20e9]
    assert pts[0].max_loss == 28.0 and pts[0].nyquist
    assert (pts[1].max_loss, pts[1].min_return_loss) == (1.5, 12.0)
    assert pts[2].max_loss is None


def test_check_outside_the_sweep_names_key_and_range() -> None:
    f = np.linspace(0, 20e9, 2001)
    b = Budget(None, "nrz", None, (Check(4e9, 3.0, None), Check(25e9, 3.0, None)))
    with pytest.raises(LossLaneError) as exc:
        check_points(b, f)
    msg = str(exc.value)
    assert "[[budget.check]] #2.at = 25 GHz" in msg
    assert "0..20 GHz" in msg


def test_nyquist_outside_the_sweep_names_data_rate() -> None:
    f = np.linspace(0, 20e9, 2001)
    b = Budget(56e9, "nrz", 20.0, ())
    with pytest.raises(LossLaneError) as exc:
        check_points(b, f)
    msg = str(exc.value)
    assert "[budget].data_rate = 56 Gb/s" in msg and "28 GHz" in msg and "0..20 GHz" in msg
    # the same rate as PAM4 lands at 14 GHz, inside
    assert check_points(Budget(56e9, "pam4", 20.0, ()), f)[0].at == 14e9


def test_validate_rejects_before_building() -> None:
    sc = parse(
        scenario_text(SMALL_CHANNEL, '[budget]\n[[budget.check]]\nat = "30 GHz"\nmax_loss="3 dB"\n')
    )
    with pytest.raises(LossLaneError, match=r"#1\.at = 30 GHz.*0\.\.20 GHz"):
        validate(sc)


# ------------------------------------------------------------------------------ the table


def test_parts_plus_reflections_equal_the_cascade(demo) -> None:
    result, budget = demo
    for pb in budget.points:
        parts = sum(r.loss_db for r in pb.segments)
        # the definition of the row: cascaded total minus the sum of the parts
        assert parts + pb.reflections_db == pytest.approx(pb.total_db, abs=0.01)
        # the total is the channel's insertion loss at the point (Touchstone-file value)
        assert pb.total_db == pytest.approx(
            float(np.interp(pb.at, result.f, result.insertion_loss_db)), abs=1e-9
        )
        assert [r.name for r in pb.segments] == [b.name for b in result.blocks]


def test_segment_losses_are_each_block_alone_by_scikit_rf(demo) -> None:
    # independent: scikit-rf's S21 of each block alone between 50-ohm references
    result, budget = demo
    for pb in budget.points:
        k = int(np.argmin(np.abs(result.f - pb.at)))
        assert result.f[k] == pytest.approx(pb.at)  # the demo's points are on the grid
        f1 = result.f[k : k + 1]
        for blk, row in zip(result.blocks, pb.segments, strict=True):
            net = skrf.Network(frequency=skrf.Frequency.from_f(f1, unit="hz"), s=blk.s(f1))
            il = -20 * np.log10(np.abs(net.s[0, 1, 0]))
            assert row.loss_db == pytest.approx(il, abs=1e-6), blk.name


def test_reflections_row_is_the_interaction_of_the_cascade_by_scikit_rf(demo) -> None:
    # Two-port cascade between equal real references (signal-flow graph, e.g. Pozar,
    # Microwave Engineering): S21_AB = S21_A S21_B / (1 - S22_A S11_B), so the cascade's loss
    # is the parts plus sum_k 20 log10 |1 - S22(blocks 1..k) S11(block k+1)|; the left
    # parts are cascaded here by scikit-rf, not by losslane.
    result, budget = demo
    for pb in budget.points:
        k = int(np.argmin(np.abs(result.f - pb.at)))
        f1 = result.f[k : k + 1]
        freq = skrf.Frequency.from_f(f1, unit="hz")
        nets = [skrf.Network(frequency=freq, s=b.s(f1)) for b in result.blocks]
        left = nets[0]
        interaction = 0.0
        for nxt in nets[1:]:
            interaction += 20 * np.log10(abs(1 - left.s[0, 1, 1] * nxt.s[0, 0, 0]))
            left = left**nxt
        assert pb.reflections_db == pytest.approx(interaction, abs=1e-6)
        assert pb.total_db == pytest.approx(-20 * np.log10(abs(left.s[0, 1, 0])), abs=1e-6)


def test_margin_and_shares(demo) -> None:
    _, budget = demo
    ny = budget.nyquist
    assert ny.allowance_db == 16.0  # the demo's max_loss
    assert ny.margin_db == pytest.approx(ny.allowance_db - ny.total_db, abs=1e-12)
    shares = [ny.share(r.loss_db) for r in ny.segments] + [ny.share(ny.reflections_db)]
    assert sum(shares) == pytest.approx(ny.total_db / ny.allowance_db, abs=1e-12)
    chk = budget.checks[0]
    assert chk.point.min_return_loss == 10.0
    assert chk.return_loss_db == min(chk.return_loss_in_db, chk.return_loss_out_db)
    assert chk.return_loss_margin_db == pytest.approx(chk.return_loss_db - 10.0)


def test_pass_fail_flips_exactly_at_the_allowance(demo) -> None:
    result, _ = demo
    base = result.scenario.budget
    total = evaluate_budget(result).nyquist.total_db
    at = evaluate_budget(result, dataclasses.replace(base, max_loss=total, checks=()))
    assert at.nyquist.loss_passed and at.passed and at.nyquist.margin_db == 0.0
    below = dataclasses.replace(base, max_loss=float(np.nextafter(total, 0.0)), checks=())
    worse = evaluate_budget(result, below)
    assert worse.nyquist.loss_passed is False and not worse.passed
    assert worse.nyquist.margin_db < 0


def test_return_loss_limit_flips_at_the_limit(demo) -> None:
    result, budget = demo
    chk = budget.checks[0]
    rl = chk.return_loss_db
    ok = Budget(None, "nrz", None, (Check(chk.at, None, rl),))
    bad = Budget(None, "nrz", None, (Check(chk.at, None, float(np.nextafter(rl, 1e9))),))
    assert evaluate_budget(result, ok).passed
    assert not evaluate_budget(result, bad).passed
    assert evaluate_budget(result, bad).checks[0].loss_passed is None  # not asked


def test_line_db_per_in_is_the_line_models_attenuation(demo) -> None:
    # the matched line's attenuation per inch, as `losslane line` reports it
    result, budget = demo
    ny = budget.nyquist
    for blk, row in zip(result.blocks, ny.segments, strict=True):
        if row.kind != "line":
            assert row.db_per_in is None
            continue
        props = properties(blk.section, np.array([ny.at]))
        assert row.db_per_in == pytest.approx(props["loss_db_per_in"][0], rel=1e-12)
        # and the segment's own loss is close to it times the length (mismatch is small)
        assert row.loss_db == pytest.approx(row.db_per_in * row.length_m / 0.0254, rel=0.1)


def test_no_budget_section_gives_none() -> None:
    sc = parse(scenario_text(SMALL_CHANNEL, stop="5 GHz"))
    assert evaluate_budget(build_channel(sc)) is None


def test_checks_only_budget_has_no_nyquist() -> None:
    sc = parse(
        scenario_text(
            SMALL_CHANNEL, '[budget]\n[[budget.check]]\nat = "2.4 GHz"\nmax_loss = "9 dB"\n'
        )
    )
    b = evaluate_budget(build_channel(sc))
    assert b.nyquist is None and len(b.checks) == 1 and b.passed
    js = b.to_json()
    assert js["nyquist_hz"] is None and js["allowance_db"] is None and js["segments"] == []
    assert js["checks"][0]["at_hz"] == 2.4e9


# ------------------------------------------------ reflections row: matched and mismatched


def _z0(line: str, at: float) -> float:
    sec = parse(scenario_text(pieces("route", ["1 in"]))).lines[line]
    return float(properties(sec, np.array([at]))["z0_ohm"][0])


CHECK_GHZ = (4, 5, 6, 8)
CHECKS = "".join(f'[[budget.check]]\nat = "{g} GHz"\nmax_loss = "30 dB"\n' for g in CHECK_GHZ)


def _budget_of(channel: str):
    # reference = the ~53-ohm line's own impedance mid-band, so the lines are matched to it
    z = _z0("route", 6e9)
    text = scenario_text(channel, "[budget]\n" + CHECKS, reference=f"{z:.4f} ohm")
    return evaluate_budget(build_channel(parse(text)))


def _sandwich(*low_z: str) -> str:
    return (
        pieces("route", ["2 in"], "a")
        + pieces("wide", list(low_z), "low-z")
        + pieces("route", ["2 in"], "b")
    )


def test_matched_line_split_in_pieces_has_no_reflections_row() -> None:
    # A uniform line cut in pieces and terminated in (nearly) its own impedance: the
    # pieces' S21 multiply, nothing reflects (transmission-line theory), so the parts add
    # up to the whole and the row is ~0.
    assert 52.0 < _z0("route", 6e9) < 54.5  # precondition: the ~53-ohm line meant
    b = _budget_of(pieces("route", ["1 in", "0.6 in", "2.2 in", "1.2 in"]))
    for pb in b.points:
        assert abs(pb.reflections_db) < 0.001, pb.point.label
        assert pb.total_db > 0.5  # the line does lose something


def test_lone_40_ohm_section_between_matched_lines_adds_no_interaction() -> None:
    # Between lines matched to the reference the 40-ohm section sees the reference at both
    # ends, as when it stands alone: its mismatch is its own row, not interaction.
    assert 39.0 < _z0("wide", 6e9) < 41.0  # precondition: ~40 ohm
    b = _budget_of(_sandwich("0.1 in"))
    for pb in b.points:
        assert pb.segments[1].loss_db > 0.05  # the 40-ohm section does reflect
        assert abs(pb.reflections_db) < 0.007, pb.point.label


def test_adding_a_second_40_ohm_section_makes_the_row_positive() -> None:
    # Two short low-impedance sections side by side act as one longer one. A uniform
    # section of impedance Z between matched lines transmits
    # |S21|^2 = 1 / (1 + ((z - 1/z)/2)^2 sin^2 theta), z = Z/Z0, theta its electrical length
    # (Pozar, Microwave Engineering, lossless line theory): while the pair is electrically
    # short its mismatch loss grows ~theta^2, so the pair loses nearly 4x one section's
    # mismatch while the parts count 2x; the row is that difference, positive, and turns
    # negative as theta nears a quarter wave (8 GHz here). The formula predicts the row.
    one, two = _budget_of(_sandwich("0.1 in")), _budget_of(_sandwich("0.1 in", "0.1 in"))
    z = _z0("route", 6e9)
    wide = parse(scenario_text(pieces("wide", ["1 in"]))).lines["wide"]
    for p1, p2 in zip(one.points, two.points, strict=True):
        props = properties(wide, np.array([p2.at]))
        zr = props["z0_ohm"][0] / z
        beta = 2 * np.pi * p2.at * np.sqrt(props["eps_eff"][0]) / 299_792_458.0
        rho2 = ((zr - 1 / zr) / 2) ** 2

        def mismatch_db(length_in: float, rho2=rho2, beta=beta) -> float:
            return 10 * np.log10(1 + rho2 * np.sin(beta * length_in * 0.0254) ** 2)

        expected = mismatch_db(0.2) - 2 * mismatch_db(0.1)
        assert p2.reflections_db == pytest.approx(expected, abs=0.01), p2.point.label
        if p2.at <= 6e9:
            assert abs(p1.reflections_db) < 0.007
            assert p2.reflections_db > 0.05


def test_row_name() -> None:
    assert REFLECTIONS_ROW == "reflections and interaction"


def test_small_channel_budget_passes() -> None:
    b = evaluate_budget(build_channel(parse(scenario_text(SMALL_CHANNEL, PASSING_BUDGET))))
    assert b.passed and b.nyquist.at == 5e9 and b.nyquist.margin_db > 0


@pytest.mark.parametrize(
    ("budget", "key"),
    [
        (Budget(10e9, "nrz", -16.0, ()), "[budget].max_loss = -16 dB"),
        (Budget(None, "nrz", None, (Check(2e9, None, -10.0),)), "#1.min_return_loss = -10 dB"),
        (Budget(None, "nrz", None, (Check(2e9, 0.0, None),)), "#1.max_loss = 0 dB"),
    ],
)
def test_limits_are_positive_db(budget: Budget, key: str) -> None:
    with pytest.raises(LossLaneError, match="positive dB") as exc:
        check_points(budget, np.linspace(0, 20e9, 401))
    assert key in str(exc.value)

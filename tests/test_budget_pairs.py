"""The budget of a differential (4-port) channel is the differential mode's: checked against
scikit-rf's own mixed-mode conversion (se2gmm) and 2-port cascade of the dd blocks."""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np
import pytest
import skrf
from network_channels import pair_channel

from losslane.budget import evaluate_budget, fit_channel
from losslane.channel import ChannelResult
from losslane.network.cascade import cascade_steps
from losslane.network.mixedmode import ONE_PAIR
from losslane.network.scatter import loss_db
from losslane.scenario import Budget, Check, Ports

F = np.linspace(50e6, 20e9, 400)  # 50 MHz steps: 8 GHz is on the grid


@pytest.fixture(scope="module")
def pair_result():
    blocks = pair_channel(F)
    budget = Budget(16e9, "nrz", 20.0, (Check(F[100], 10.0, 8.0),))
    scenario = SimpleNamespace(
        name="pair",
        budget=budget,
        channel=[SimpleNamespace(type=b.kind) for b in blocks],
        ports=Ports(50.0, "in-in-out-out"),
    )
    steps = list(cascade_steps(blocks, F, 50.0))
    seg = np.array([loss_db(sb) for sb, _ in steps])
    cum = np.array([loss_db(s) for _, s in steps])
    return ChannelResult(scenario, F, blocks, steps[-1][1], seg, cum, ONE_PAIR), blocks


def _dd(s4: np.ndarray) -> skrf.Network:
    # scikit-rf's mixed-mode conversion; ports in-in-out-out (s0==s2, s1==s3) give
    # d0, d1, c0, c1, so the differential 2-port is the top-left 2x2
    n = skrf.Network(frequency=skrf.Frequency.from_f(F, unit="hz"), s=s4, z0=50.0)
    n.se2gmm(p=2)
    return skrf.Network(frequency=n.frequency, s=n.s[:, :2, :2], z0=100.0)


def test_pair_budget_is_the_differential_mode(pair_result) -> None:
    result, blocks = pair_result
    b = evaluate_budget(result)
    assert b.mode == "differential"
    dds = [_dd(blk.s(F)) for blk in blocks]
    whole = _dd(np.asarray(result.network.s))
    for pb in b.points:
        k = int(np.argmin(np.abs(F - pb.at)))
        assert F[k] == pytest.approx(pb.at)
        assert pb.total_db == pytest.approx(-20 * np.log10(abs(whole.s[k, 1, 0])), abs=1e-6)
        for row, dd in zip(pb.segments, dds, strict=True):
            assert row.loss_db == pytest.approx(-20 * np.log10(abs(dd.s[k, 1, 0])), abs=1e-6)
        # these symmetric blocks convert no mode, so the dd blocks cascade as 2-ports and the
        # interaction row follows S21_AB = S21_A S21_B / (1 - S22_A S11_B)
        left, inter = dds[0], 0.0
        for nxt in dds[1:]:
            inter += 20 * np.log10(abs(1 - left.s[k, 1, 1] * nxt.s[k, 0, 0]))
            left = left**nxt
        assert pb.reflections_db == pytest.approx(inter, abs=1e-6)
        assert pb.parts_db + pb.reflections_db == pytest.approx(pb.total_db, abs=0.01)
        # return loss of the differential mode at each end
        assert pb.return_loss_in_db == pytest.approx(
            -20 * np.log10(abs(whole.s[k, 0, 0])), abs=1e-6
        )
        assert pb.return_loss_out_db == pytest.approx(
            -20 * np.log10(abs(whole.s[k, 1, 1])), abs=1e-6
        )


def test_pair_fit_runs_on_the_differential_loss(pair_result) -> None:
    result, _ = pair_result
    fit = fit_channel(result)
    assert fit.band.stop == pytest.approx(16e9)  # 2 x Nyquist, inside the 20 GHz sweep
    assert np.allclose(fit.il_db, result.insertion_loss_db[(F >= 50e6) & (F <= 16e9 + 1)])

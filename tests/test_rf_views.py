"""The RF views of a 2-port and the chart rules.

Outside references: VSWR = (1 + |Gamma|) / (1 - |Gamma|) (textbook identity, e.g. Pozar,
*Microwave Engineering*) and scikit-rf's Network.s_vswr; the group delay of a matched
lossless TEM line equals length * sqrt(eps_eff) / c (for a stripline in one dielectric
eps_eff = Dk exactly), on a scikit-rf line and on a line built by losslane.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
import skrf
from budget_scenarios import SMALL_CHANNEL, parse, pieces, scenario_text

from losslane.channel import build_channel
from losslane.errors import LossLaneError
from losslane.network.rfmetrics import aperture_steps, default_aperture, group_delay, vswr
from losslane.plotspec import check_plots
from losslane.report.charts import Curve, Marker, db_text, draw_db, merge_markers, pyplot
from losslane.report.rf import focus_of, vswr_of_return_loss
from losslane.scenario import load_scenario, parse_scenario

C0 = 299_792_458.0  # speed of light, m/s (exact, SI)
EXAMPLES = Path(__file__).resolve().parents[1] / "examples"


@pytest.fixture(scope="module")
def small():
    return build_channel(parse(scenario_text(SMALL_CHANNEL, step="10 MHz")))


def test_vswr_is_the_textbook_identity_at_every_point(small) -> None:
    for m in (0, 1):
        gamma = small.s[:, m, m]
        g = np.abs(gamma)
        got = vswr(gamma)
        ok = g < 1
        np.testing.assert_allclose(got[ok], (1 + g[ok]) / (1 - g[ok]), rtol=1e-15)
        assert np.all(np.isinf(got[~ok]))  # total reflection (the DC block at 0 Hz)
        # scikit-rf's own VSWR of the same network
        ref = small.network.s_vswr[:, m, m]
        np.testing.assert_allclose(got[ok], ref[ok], rtol=1e-12)
    # a return-loss limit as a VSWR limit: 20 dB is |Gamma| = 0.1, VSWR 1.1/0.9
    assert float(vswr_of_return_loss(20.0)) == pytest.approx(1.1 / 0.9, rel=1e-14)


@pytest.mark.parametrize("aperture", [10e6, 50e6, 200e6])
def test_group_delay_of_an_ideal_tem_line(aperture: float) -> None:
    # scikit-rf: a matched lossless line, gamma = j w sqrt(eps) / c, z0 = the port reference
    f = np.linspace(0.0, 20e9, 2001)
    eps, length = 2.9, 0.0731
    freq = skrf.Frequency.from_f(f, unit="hz")
    med = skrf.media.DefinedGammaZ0(freq, gamma=1j * 2 * np.pi * f * np.sqrt(eps) / C0, z0=50)
    line = med.line(length, "m")
    fm, tau = group_delay(f, line.s[:, 1, 0], aperture)
    k = aperture_steps(f, aperture)
    assert fm.size == f.size - k
    np.testing.assert_allclose(fm, 0.5 * (f[k:] + f[:-k]))
    np.testing.assert_allclose(tau, length * np.sqrt(eps) / C0, rtol=1e-12)


def test_group_delay_of_a_matched_stripline_built_by_losslane() -> None:
    # stripline in one constant-Dk dielectric without loss tangent, very high conductivity
    # (the range's top, 1e9 S/m), smooth copper, ports at the line's own Z0: nearly a
    # matched lossless TEM line, so tau = length * sqrt(Dk) / c
    lines = (
        '[dielectrics.flat]\ndk = 3.5\ndf = 0.0\nat = "10 GHz"\nmodel = "constant"\n'
        '[lines.ideal]\nkind = "stripline"\nwidth = "5.3 mil"\nthickness = "0.6 mil"\n'
        'below = "6 mil"\nabove = "6 mil"\ndielectric = "flat"\nconductivity = "1e9 S/m"\n'
    )
    probe = parse(scenario_text(pieces("ideal", ["4 in"]), extra=lines))
    z0 = float(probe.lines["ideal"].line_values(np.array([10e9])).impedance[0])
    sc = parse(scenario_text(pieces("ideal", ["4 in"]), extra=lines, reference=f"{z0:.6f} ohm"))
    r = build_channel(sc)
    fm, tau = group_delay(r.f, r.s[:, 1, 0], 200e6)
    band = (fm >= 5e9) & (fm <= 19e9)
    expected = 4 * 0.0254 * np.sqrt(3.5) / C0
    # what is left: the internal inductance of the finite conductivity (+0.04 %)
    np.testing.assert_allclose(tau[band], expected, rtol=1e-3)
    assert abs(float(np.mean(tau[band])) / expected - 1) < 6e-4


def test_default_aperture_is_about_one_percent_in_whole_steps() -> None:
    f = np.linspace(0, 12e9, 1201)  # 10 MHz steps
    assert default_aperture(f, 0.0, 12e9) == pytest.approx(120e6)
    assert default_aperture(f, 5.6e9, 7.4e9) == pytest.approx(20e6)
    assert default_aperture(f, 6e9, 6.1e9) == pytest.approx(10e6)  # at least one step


# ------------------------------------------------------------------------ chart rules


def test_a_check_at_nyquist_gets_one_combined_label() -> None:
    ms = [
        Marker(8e9, "Nyquist 8 GHz", 16.0),
        Marker(8e9, "check 1 8 GHz", 10.0),
        Marker(4e9, "check 2 4 GHz"),
    ]
    labels = merge_markers(ms, 20e9)
    assert labels == [(4e9, "check 2 4 GHz"), (8e9, "Nyquist 8 GHz, check 1 8 GHz")]
    # labels closer than LABEL_GAP of the axis share one too; farther ones do not
    assert len(merge_markers([Marker(8e9, "a"), Marker(8.2e9, "b")], 20e9)) == 1
    assert len(merge_markers([Marker(8e9, "a"), Marker(9e9, "b")], 20e9)) == 2
    # drawn: one annotation for the two markers at 8 GHz
    plt = pyplot()
    fig, ax = plt.subplots()
    f = np.linspace(0, 20e9, 201)
    draw_db(ax, f, [Curve("c", -f / 1e9)], ms)
    texts = [t.get_text() for t in ax.texts]
    plt.close(fig)
    assert texts.count("Nyquist 8 GHz, check 1 8 GHz") == 1 and len(texts) == 2


def test_curves_below_the_axis_are_shown_clipped() -> None:
    plt = pyplot()
    fig, ax = plt.subplots()
    f = np.linspace(0, 20e9, 401)
    through = -f / 1e9  # 0 .. -20 dB
    floor = np.full_like(f, -287.0)  # a symmetric pair's conversion: the rounding floor
    notch = np.where(np.abs(f - 10e9) < 0.2e9, -150.0, -10.0)
    curves = [Curve("through", through), Curve("conversion", floor), Curve("notch", notch)]
    ylo, yhi = draw_db(ax, f, curves, floor_db=-120)
    labels = [t.get_text() for t in ax.legend().get_texts()]
    plt.close(fig)
    assert ylo > -40  # the floor-level curve does not drag the axis down
    assert labels[0] == "through"
    assert labels[1] == "conversion [below the axis: < -200 dB]"
    assert labels[2].startswith("notch [clipped, min -150")
    assert db_text(-287.3) == "< -200 dB" and db_text(6000.0) == "> 200 dB"
    assert db_text(-43.12) == "-43.1 dB" and db_text(None) == "-"


def test_focus_is_automatic_for_a_narrow_band_only() -> None:
    ku = load_scenario(EXAMPLES / "ku-feed-band.toml")
    f = ku.frequencies()
    focus = focus_of(ku, f)
    # every limit of the example lies within 10..14 GHz (the mask's span): zoomed around it
    assert focus is not None and 9e9 < focus.start < 10e9 and 14e9 < focus.stop < 15e9
    # a backplane-style budget (checks at 2.4 GHz and Nyquist 5 GHz over 0..20 GHz) is not
    sc = parse(
        scenario_text(
            SMALL_CHANNEL,
            '[budget]\ndata_rate = "10 Gb/s"\nmax_loss = "20 dB"\n[[budget.check]]\n'
            'at = "2.4 GHz"\nmax_loss = "5 dB"\n',
        )
    )
    assert focus_of(sc, sc.frequencies()) is None
    # explicit focus wins, auto_focus = false turns the automatic one off
    plots = '[plots]\nfocus = ["11 GHz", "12 GHz"]\nloss_range = ["0 dB", "3 dB"]\n'
    text = (EXAMPLES / "ku-feed-band.toml").read_text().replace("[plots]\n", plots, 1)
    explicit = parse_scenario(text, base=EXAMPLES)
    fx = focus_of(explicit, f)
    assert (fx.start, fx.stop, fx.why) == (11e9, 12e9, "[plots] focus")
    assert explicit.plots.loss_range == (0.0, 3.0)
    off = parse_scenario(text.replace(plots, "[plots]\nauto_focus = false\n"), base=EXAMPLES)
    assert focus_of(off, f) is None


@pytest.mark.parametrize(
    ("plots", "expected"),
    [
        ('focus = ["11 GHz", "25 GHz"]', "outside the sweep"),
        ('focus = ["12 GHz", "11 GHz"]', "must lie above"),
        ('focus = ["12 GHz"]', "two values"),
        ('loss_range = ["3 dB", "1 dB"]', "must lie above"),
        ('delay_aperture = "1 MHz"', "finer than the sweep step"),
        ('delay_aperture = "0 Hz"', "above 0 Hz"),
        ("rf_views = 1", "true or false"),
        ('fokus = ["1 GHz", "2 GHz"]', "did you mean 'focus'"),
    ],
)
def test_bad_plots_keys_name_the_key(plots: str, expected: str) -> None:
    with pytest.raises(LossLaneError) as exc:
        sc = parse(scenario_text(SMALL_CHANNEL, extra="", name="p") + f"[plots]\n{plots}\n")
        check_plots(sc.plots, sc.frequencies())
    assert "[plots]" in str(exc.value) and expected in str(exc.value)

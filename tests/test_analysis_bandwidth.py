"""Bandwidth, rise time, product and RSS estimate against the constants of CHECKS.md."""

import math

import numpy as np
import pytest

from taumatch.analysis import ChainModel, chain_figures, find_bandwidth, rise_time
from taumatch.analysis.bandwidth import front_end_rise_time
from taumatch.chain import Chain, Input, Line, Series, Source


def rc_chain(**source):
    """R = 1 kohm, C = 10 pF low-pass: the source resistance into the input capacitance."""
    return Chain(Source(1e3, **source), (Input(r=1e15, c=10e-12),))


def test_rc_lowpass_figures():
    """RC low-pass 1 kohm, 10 pF: tau = 10 ns, t_r = 21.97 ns, f_3dB = 15.92 MHz, product
    ln 9 / (2 pi) = 0.3497 (CHECKS.md, own derivation)."""
    figs = chain_figures(rc_chain())
    assert figs.bandwidth.upper == pytest.approx(1 / (2 * math.pi * 1e3 * 10e-12), rel=1e-9)
    assert figs.bandwidth.upper == pytest.approx(15.92e6, rel=5e-4)
    # the step is the exact response inverted numerically; its stated error (1e-6 of the
    # final value at most) moves a crossing of slope ~1/tau by ~1e-6 tau
    assert figs.step.error <= 1e-6
    assert figs.rise_time == pytest.approx(math.log(9) * 10e-9, rel=1e-6)
    assert figs.rise_time == pytest.approx(21.97e-9, rel=5e-4)
    assert figs.product == pytest.approx(math.log(9) / (2 * math.pi), rel=1e-6)
    assert figs.product == pytest.approx(0.3497, abs=5e-5)
    assert figs.dc_gain == pytest.approx(1.0, rel=1e-9)
    # the RSS estimate has the single RC term: exact for one pole
    assert figs.rss_rise_time == pytest.approx(figs.rise_time, rel=1e-6)
    assert figs.step.overshoot == 0 and figs.band.peaking_db == 0 and figs.warning is None


def test_two_identical_poles():
    """Two identical poles: exact 10-90 % 3.358 tau, RSS rule 3.107 tau (-7.5 %), bandwidth
    0.6436 of one pole's (CHECKS.md; Elmore 1948 for the rule)."""
    tau = 10e-9
    f1 = 1 / (2 * math.pi * tau)
    chain = Chain(Source(1e3), (Input(r=1e15, c=10e-12, bandwidth=f1),))
    figs = chain_figures(chain)
    assert figs.rise_time / tau == pytest.approx(3.358, abs=5e-4)
    assert figs.rss_rise_time / tau == pytest.approx(3.107, abs=5e-4)
    assert figs.rss_error == pytest.approx(3.107 / 3.358 - 1, abs=3e-4)
    assert figs.bandwidth.upper / f1 == pytest.approx(math.sqrt(math.sqrt(2) - 1), rel=1e-9)
    assert figs.bandwidth.upper / f1 == pytest.approx(0.6436, abs=5e-5)


def test_front_end_rise_times():
    """Single pole ln 9/(2 pi B); two equal poles 3.358 tau with tau = 0.6436/(2 pi B)."""
    b = 100e6
    assert front_end_rise_time(b, "single-pole") == pytest.approx(math.log(9) / (2 * math.pi * b))
    tau = math.sqrt(math.sqrt(2) - 1) / (2 * math.pi * b)
    assert front_end_rise_time(b, "two-pole") / tau == pytest.approx(3.358, abs=5e-4)


def test_second_order_rise_time_against_ogata():
    """omega_n = 1, zeta = 0.5: 10-90 % rise 1.638 s (Ogata; CHECKS.md)."""
    from taumatch.lti import Rational

    d = math.sqrt(0.75)
    h = Rational.from_zpk([], [complex(-0.5, d), complex(-0.5, -d)], 1.0)
    assert rise_time(h).rise_time == pytest.approx(1.638, abs=5e-4)


def test_ac_coupled_bandwidth():
    """A series capacitor into R: high-pass with f_low = 1/(2 pi R C); reference is the passband."""
    chain = Chain(Source(0.0), (Series(c=1e-9), Input(r=1e3)))
    figs = chain_figures(chain)
    assert figs.bandwidth.ac_coupled
    # the passband reference is the sweep's peak, 1e3 above the corner: |H| = 1 - 5e-7
    assert figs.bandwidth.lower == pytest.approx(1 / (2 * math.pi * 1e3 * 1e-9), rel=1e-5)
    assert math.isnan(figs.bandwidth.upper)
    assert figs.rise_time is None


def test_find_bandwidth_matches_scipy_freqs():
    """Butterworth 3rd order from scipy.signal: -3 dB at its cut-off by construction."""
    from scipy import signal

    b, a = signal.butter(3, 2 * math.pi * 1e6, analog=True)
    resp = lambda f: signal.freqs(b, a, 2 * np.pi * np.asarray(f))[1]
    assert find_bandwidth(resp, 1e2, 1e10).upper == pytest.approx(1e6, rel=1e-9)


def test_ladder_holds_its_promise():
    """The closed-form transfer function (cable as the chosen ladder) stays within 0.1 % of the
    exact response up to f_max = 3 x bandwidth (the promise), and the section count is reported."""
    line = Line(length=1.0, l=250e-9, c=100e-12, r=20.0)
    chain = Chain(Source(50.0), (line, Input(r=1e6, c=15e-12, bandwidth=100e6)))
    m = ChainModel.from_chain(chain)
    assert m.sections > 1 and m.section_error <= 1e-3
    assert m.f_max == pytest.approx(3 * m.bandwidth)
    f = np.logspace(math.log10(m.f_max) - 6, math.log10(m.f_max), 200)
    exact = m.response(f)
    closed = m.transfer.freqresp(f)
    ref = np.maximum(np.abs(exact), 1e-9 * np.abs(exact).max())
    assert np.max(np.abs(closed - exact) / ref) <= 1.05e-3
    # and one section fewer fails (the count is the smallest)
    fewer = ChainModel.from_chain(chain, sections=m.sections - 1).transfer.freqresp(f)
    assert np.max(np.abs(fewer - exact) / ref) > 1e-3


@pytest.mark.parametrize("c1, jump, words", [
    (110e-12 / 9, None, "high-frequency gain equal to the DC gain"),
    (15e-12, 1.2, "high-frequency gain above the DC gain"),
    (11.5e-12, 11.5 / 121.5 / 0.1, "high-frequency gain below the DC gain"),
])
def test_a_step_that_jumps_says_how_hf_stands_against_dc(c1, jump, words):
    """9 MΩ ∥ C1 over 1 MΩ ∥ 110 pF from an ideal source: the step jumps to C1/(C1+C2)
    and settles at R2/(R1+R2) = 0.1 (Millman & Taub; CHECKS.md): at C1 = 12.22 pF the two
    are equal (compensated, regression: the text said "above"), at 15 pF the jump is 1.2
    times the final value, at 11.5 pF 0.9465 times."""
    chain = Chain(Source(0.0), (Series(r=9e6, c=c1), Input(r=1e6, c=110e-12)))
    figs = chain_figures(chain)
    assert figs.step.jumps and figs.rise_time is None
    text = figs.summary()
    assert words in text and "no 10-90 % rise time" in text
    if jump is None:
        assert "jumps at once to its final value" in text and "above" not in text
    else:
        assert figs.step.initial == pytest.approx(jump, rel=1e-6)
        assert f"jumps at once to {jump:.4g} times its final value" in text

"""Predicted responses: the mis-compensated divider's step against the textbook closed form."""

import math

import numpy as np
import pytest

from taumatch.analysis.predict import predict
from taumatch.chain import Adjust, Chain, Input, Series, Source
from taumatch.cli.options import parse_waveform
from taumatch.errors import InputError


def divider(c1, period=None):
    return Chain(Source(0.0, amplitude=2.0, period=period),
                 (Series(r=9e6, c=c1, adjust=Adjust("c")), Input(r=1e6, c=110e-12)))


@pytest.mark.parametrize("c1, jump, tau", [(10e-12, 0.0833, 108e-6), (15e-12, 0.120, 112.5e-6)])
def test_miscompensated_step(c1, jump, tau):
    """v(0+) = C1/(C1+C2), v(inf) = R2/(R1+R2), tau = (R1||R2)(C1+C2) (CHECKS.md; Millman &
    Taub): C1 = 10 pF -> 0.0833, 108 us; C1 = 15 pF -> 0.120, 112.5 us."""
    p = predict(divider(c1), "step", points=2001)
    v0 = c1 / (c1 + 110e-12)
    t_exact = 0.9e6 * (c1 + 110e-12)
    assert v0 == pytest.approx(jump, abs=5e-4)
    assert t_exact == pytest.approx(tau, rel=5e-3)
    want = 2.0 * (0.1 + (v0 - 0.1) * np.exp(-p.t / t_exact))
    assert np.allclose(p.v[1:], want[1:], rtol=1e-9, atol=1e-12)
    assert p.final_value == pytest.approx(0.2, rel=1e-12)
    assert all(c.name for c in p.checks)


def test_trimmed_is_flat():
    p = predict(divider(10e-12), "step", trimmed=True, points=500, t_end=500e-6)
    assert np.allclose(p.v[1:], 0.2, rtol=1e-9)
    assert p.trim.required == pytest.approx(110e-12 / 9, rel=1e-9)
    assert p.to_dict()["trimmed"] is True


def test_square_wave_steady_state():
    """Square wave through the mis-compensated divider: steady state of the first-order step
    (periodic closed form): the level just after the rising edge repeats every period."""
    period = 1e-3
    p = predict(divider(15e-12, period=period), "square", points=4001)
    tau = 0.9e6 * 125e-12
    v0 = 15e-12 / 125e-12
    # own derivation: the deviation from the settled level jumps by k = v0 - 0.1 at a rising
    # edge (-k at a falling one) and decays with tau; steady state D = (D e - k) e + k gives
    # D = k / (1 + e), e = exp(-T / (2 tau)); level just after the rising edge A (0.1 + D)
    e = math.exp(-period / 2 / tau)
    a = 2.0
    just_after = a * (0.1 + (v0 - 0.1) / (1 + e))
    assert p.t[-1] == pytest.approx(2 * period)
    i = np.searchsorted(p.t, period, side="right")
    assert p.v[i] == pytest.approx(p.v[1], rel=1e-3)
    assert p.v[0] == pytest.approx(just_after, rel=1e-9)


def test_sine_and_bad_inputs():
    p = predict(divider(110e-12 / 9), "sine", 1e3, points=400)
    assert np.allclose(p.v, 0.2 * np.sin(2 * np.pi * 1e3 * p.t), atol=1e-9)
    assert parse_waveform("sine:1M") == ("sine", 1e6)
    with pytest.raises(InputError, match="step, square or sine:FREQ"):
        parse_waveform("ramp")
    with pytest.raises(InputError, match="period is required"):
        predict(divider(1e-11), "square")


def test_summary_speaks_seconds_and_volts():
    """Regression: the hand checks printed 'times in units of 1/w0', a sine 'final value
    nan V', and a trimmed square wave 'now over-compensated' under 'after the trim'."""
    text = predict(divider(15e-12), "step", points=50).summary()
    assert "1/w0" not in text and "hand checks" in text
    sine = predict(divider(15e-12), "sine", 1e4, points=50)
    assert "nan" not in sine.summary() and sine.final_value is None
    trimmed = predict(divider(15e-12, period=1e-3), "square", trimmed=True, points=50).summary()
    assert "after the trim" in trimmed and "now over-compensated" not in trimmed
    assert "before the trim the chain was over-compensated" in trimmed

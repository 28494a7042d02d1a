"""taumatch.lti against general-purpose reference libraries on well-conditioned systems.

References: scipy.signal (step, impulse, lsim, freqresp) and python-control
(step_response, forced_response), both from the package registries; hypothesis
generates random stable systems for round trips.
"""

import numpy as np
import pytest
import scipy.signal as sig
from hypothesis import given, settings
from hypothesis import strategies as st

from taumatch.lti import Rational

CASES = ["(s+2)/((s+1)*(s+3)*(s+5))", "25/(s^2+4s+25)", "(s^2+2s+10)/((s+1)*(s^2+s+4)*(s+6))",
         "(3s+1)/(s^2+0.6s+1)"]


def _tf(H):
    num, den = H.coeffs()
    return np.atleast_1d(num).astype(float), np.atleast_1d(den).astype(float)


@pytest.mark.parametrize("expr", CASES)
def test_step_and_impulse_vs_scipy(expr):
    H = Rational.from_expr(expr)
    t = np.linspace(0, 15, 3001)
    _, ys = sig.step(_tf(H), T=t)
    _, yi = sig.impulse(_tf(H), T=t)
    np.testing.assert_allclose(H.step(t), ys, atol=1e-9)
    np.testing.assert_allclose(H.impulse(t), yi, atol=1e-9)


@pytest.mark.parametrize("expr", CASES)
def test_sine_vs_scipy_lsim(expr):
    """Full sine response (transient included) vs scipy.signal.lsim with a linear-interpolated input."""
    H = Rational.from_expr(expr)
    t = np.linspace(0, 10, 20001)
    f, ph = 0.7, 0.4
    u = np.sin(2 * np.pi * f * t + ph)
    _, y, _ = sig.lsim(_tf(H), u, t, interp=True)
    np.testing.assert_allclose(H.sine(t, f, ph), y, atol=2e-6)


@pytest.mark.parametrize("expr", CASES)
def test_freqresp_vs_scipy(expr):
    H = Rational.from_expr(expr)
    w = np.geomspace(1e-2, 1e2, 200)
    _, h = sig.freqs(*_tf(H), worN=w)
    np.testing.assert_allclose(H(1j * w), h, rtol=1e-11)


@pytest.mark.parametrize("expr", CASES[:3])
def test_step_vs_python_control(expr):
    control = pytest.importorskip("control")
    H = Rational.from_expr(expr)
    t = np.linspace(0, 12, 1201)
    resp = control.step_response(control.tf(*_tf(H)), T=t)
    np.testing.assert_allclose(H.step(t), np.squeeze(resp.outputs), atol=1e-9)


def test_square_vs_python_control_forced_response():
    """Steady state after many periods of a simulated square wave (python-control forced_response)."""
    control = pytest.importorskip("control")
    H = Rational.from_expr("(s+2)/((s+1)*(s^2+s+4))")
    T = 3.0
    t = np.linspace(0, 30 * T, 30 * 3000 + 1)
    u = (np.mod(t, T) < 0.5 * T).astype(float)
    resp = control.forced_response(control.tf(*_tf(H)), T=t, U=u)
    last = t >= 29 * T
    y_ref = np.squeeze(resp.outputs)[last]
    # forced_response holds the input piecewise linear between samples: compare away from edges
    tm = np.mod(t[last], T)
    away = (np.abs(tm - 0.5 * T) > 0.01) & (tm > 0.01) & (tm < T - 0.01)
    np.testing.assert_allclose(H.square(t[last], T)[away], y_ref[away], atol=2e-3)


@st.composite
def stable_systems(draw):
    n_real = draw(st.integers(0, 3))
    n_pair = draw(st.integers(0 if n_real else 1, 2))
    poles = [-draw(st.floats(0.05, 50.0)) for _ in range(n_real)]
    for _ in range(n_pair):
        a, b = draw(st.floats(0.05, 20.0)), draw(st.floats(0.1, 30.0))
        poles += [complex(-a, b), complex(-a, -b)]
    n_zero = draw(st.integers(0, len(poles)))
    zeros = [draw(st.floats(-40.0, 40.0)) for _ in range(n_zero)]
    gain = draw(st.floats(0.1, 10.0))
    return Rational.from_zpk(zeros, poles, gain)


@settings(max_examples=60, deadline=None)
@given(stable_systems())
def test_round_trip_and_theorems(H):
    """Partial fractions sum back to H; initial- and final-value theorems hold (hypothesis)."""
    back = H.partial_fractions().to_rational()
    s = 1j * np.geomspace(1e-2, 1e2, 25) + 0.01
    np.testing.assert_allclose(back(s), H(s), rtol=1e-7, atol=1e-10 * np.max(np.abs(H(s))))
    failed = [c.line() for c in H.checks() if not c.passed]
    assert not failed, failed

"""The exact step (numerical inverse Laplace transform) and its figures, against closed
forms and reference libraries: CHECKS.md (RC step; Ogata's second-order values),
scipy.signal (step, freqs) and python-control (step_info)."""

import math

import control
import numpy as np
import pytest
import scipy.signal

from taumatch.analysis import chain_figures, step_figures
from taumatch.chain import Chain, Input, Series, Source
from taumatch.chain.model import ChainModel
from taumatch.network.inverse_laplace import asymptote, step_response


def test_rc_step_against_closed_form():
    """RC 1 kohm, 10 pF: v = 1 - exp(-t/10 ns), 10-90 % 21.97 ns (CHECKS.md); the stated
    error bounds the actual one."""
    r = step_response(lambda s: 1 / (1 + s * 1e-8), 2e-7, scale=1e8)
    exact = 1 - np.exp(-r.t / 1e-8)
    assert np.max(np.abs(r.y - exact)) <= r.error
    assert r.error < 1e-6 and r.converged
    m = ChainModel(Chain(Source(1e3), (Input(r=1e15, c=10e-12),)))
    assert step_figures(m.step).rise_time == pytest.approx(21.97e-9, abs=5e-12)


def test_second_order_against_ogata():
    """omega_n = 1, zeta = 0.5 (Ogata; CHECKS.md): overshoot 16.30 %, peak at 3.628 s,
    10-90 % rise 1.638 s, 2 % settling 8.08 s (from t = 0)."""
    r = step_response(lambda s: 1 / (s * s + s + 1), 30.0, scale=1.0)
    from taumatch.chain.model import StepResponse

    st = step_figures(StepResponse(r.t, r.y, 1.0, r.error, r.converged, r.t[1], r.t[-1]))
    assert st.overshoot == pytest.approx(0.1630, abs=5e-5)
    assert st.peak_time == pytest.approx(3.628, abs=2 * (r.t[1] - r.t[0]))
    assert st.rise_time == pytest.approx(1.638, abs=5e-4)
    assert st.t50 + st.settling == pytest.approx(8.08, abs=5e-3)


def series_rlc(r=20.0, l=150e-9, c=10e-12):
    """Source resistance, a series inductance into a capacitance: an exact second-order
    low-pass 1 / (L C s^2 + R C s + 1) (own derivation)."""
    return Chain(Source(r), (Series(l=l), Input(r=1e15, c=c))), ([1.0], [l * c, r * c, 1.0])


def test_lumped_chain_against_scipy_and_python_control():
    """The exact step of a lumped chain against scipy.signal.step on the same polynomial,
    and its rise time, overshoot and settling against python-control's step_info (10-90 %,
    2 %, settling from t = 0); peaking against a dense scipy.signal.freqs sweep."""
    chain, (num, den) = series_rlc()
    m = ChainModel(chain)
    st = m.step
    keep = st.t <= st.t_fast
    _, y = scipy.signal.step((num, den), T=st.t[keep])
    assert np.max(np.abs(st.y[keep] - y)) <= max(st.error, 1e-9) * 10
    figs = step_figures(st)
    info = control.step_info(control.tf(num, den), T=st.t[keep])
    dt = st.t[1] - st.t[0]
    assert figs.rise_time == pytest.approx(info["RiseTime"], abs=2 * dt)
    assert 100 * figs.overshoot == pytest.approx(info["Overshoot"], abs=1e-3)
    assert figs.t50 + figs.settling == pytest.approx(info["SettlingTime"], abs=2 * dt)
    w = np.linspace(1e7, 1e10, 200001)
    _, h = scipy.signal.freqs(num, den, w)
    band = m.band
    assert band.peaking_db == pytest.approx(20 * np.log10(np.abs(h).max()), abs=1e-6)
    assert band.peak_frequency == pytest.approx(w[np.argmax(np.abs(h))] / (2 * np.pi),
                                                rel=1e-4)


def test_second_order_peaking_formula():
    """|H| peaks at omega_n sqrt(1 - 2 zeta^2) by 1 / (2 zeta sqrt(1 - zeta^2)) (Ogata)."""
    chain, _ = series_rlc(r=20.0)
    l, c = 150e-9, 10e-12
    wn, zeta = 1 / math.sqrt(l * c), 10.0 * math.sqrt(c / l)
    band = ChainModel(chain).band
    assert band.peak_frequency == pytest.approx(wn * math.sqrt(1 - 2 * zeta**2) / (2 * math.pi),
                                                rel=1e-7)
    assert band.peaking_db == pytest.approx(
        -20 * math.log10(2 * zeta * math.sqrt(1 - zeta**2)), abs=1e-7)


def test_jump_and_asymptote():
    """An over-compensated divider jumps to C1/(C1+C2) at t = 0 (CHECKS.md: 15 pF over
    110 pF, 0.120) and settles to 0.100; the asymptote reads the jump."""
    chain = Chain(Source(0.0), (Series(r=9e6, c=15e-12), Input(r=1e6, c=110e-12)))
    m = ChainModel(chain)
    h0, _, _ = asymptote(m.cascade.transfer, 1e9)
    assert h0 == pytest.approx(0.12, rel=1e-9)
    figs = chain_figures(chain)
    assert figs.step.overshoot == pytest.approx(0.2, rel=1e-6)
    # tau = (R1 || R2)(C1 + C2) = 112.5 us: settling from the 50 % crossing (at 0) until the
    # excess 0.2 exp(-t/tau) falls to 0.02 (own derivation)
    assert figs.step.settling == pytest.approx(112.5e-6 * math.log(10), rel=2e-3)


def test_rise_time_undefined_reproducer_is_one_answer(bad_inputs):
    """Regression: a 100 Mohm || 12 pF tip over a 50 ohm input from a 0 ohm source crashed
    the text summary; now the step is said to jump, with no traceback and exit 0."""
    from click.testing import CliRunner

    from taumatch.cli import main

    res = CliRunner().invoke(main, ["bandwidth", str(bad_inputs / "rise_time_undefined.toml")])
    assert res.exit_code == 0, res.output
    assert "jumps at once" in res.output and "Traceback" not in res.output

"""Software correction of mis-compensation, against the textbook divider and scipy.signal.

Sources: the compensated-divider formulas (Millman & Taub; Boylestad; shared/CHECKS.md);
scipy.signal.lsim (first-order hold, i.e. linear interpolation between samples) as the
reference for the ramp-invariant filter.
"""

import numpy as np
import pytest
import scipy.signal as sig
from divider_synth import textbook_square

from taumatch.chain.two_arm import TwoArm
from taumatch.correct import Correction, apply_correction, correction_for, lowpass_ramp_invariant
from taumatch.fit import fit_divider


def test_ramp_invariant_lowpass_matches_scipy_lsim():
    dt, tau = 1e-6, 7e-6
    t = np.arange(2000) * dt
    u = np.sin(2 * np.pi * 3e3 * t) + (t > 3e-4)
    ours = lowpass_ramp_invariant(u, dt, tau, y0=0.0)
    _, ref, _ = sig.lsim(([1.0], [tau, 1.0]), u, t, X0=[0.0], interp=True)
    np.testing.assert_allclose(ours, ref, atol=1e-10)


def test_correction_times_divider_is_flat():
    """C(s)·H(s) = R2/(R1+R2) at every frequency: the pole-zero pair is removed exactly."""
    r1, c1, r2, c2 = 9e6, 15e-12, 1e6, 110e-12
    tau1, taup = r1 * c1, r1 * r2 / (r1 + r2) * (c1 + c2)
    prod = Correction(taup, tau1).rational() * TwoArm(r1, c1, r2, c2).rational()
    f = np.geomspace(1, 1e8, 40)
    np.testing.assert_allclose(np.abs(prod.freqresp(f)), 0.1, rtol=1e-12)


@pytest.mark.parametrize("c1", [15e-12, 9e-12])
def test_corrected_capture_is_the_compensated_square_wave(c1):
    """The corrected textbook capture equals the compensated divider's output A·g (flat),
    away from the edges (the ideal edge has no defined value between samples)."""
    r1, r2, c2, T, dt, A = 9e6, 1e6, 110e-12, 1e-3, 2e-7, 2.0
    t = np.arange(int(10 * T / dt)) * dt
    v = textbook_square(t + 1e-5, r1, c1, r2, c2, A, T)
    corr = Correction(r1 * r2 / (r1 + r2) * (c1 + c2), r1 * c1)
    y = apply_correction(t, v, corr, period=T)
    want = np.where(np.mod(t + 1e-5, T) < T / 2, A * 0.1, 0.0)
    tm = np.mod(t + 1e-5, T)
    away = (np.abs(tm - T / 2) > 3 * dt) & (tm > 3 * dt) & (tm < T - 3 * dt)
    np.testing.assert_allclose(y[away], want[away], atol=2e-3 * A * 0.1)


def test_regularisation_only_when_boosting():
    T, dt = 1e-3, 2e-7
    t = np.arange(-T / 4, 3 * T / 4, dt)
    for c1, boosts in ((9e-12, True), (15e-12, False)):
        v = textbook_square(t, 9e6, c1, 1e6, 110e-12, 2.0, T)
        v = v + np.random.default_rng(1).normal(0, 1e-4, t.size)
        f = fit_divider(t, v, T, 0.5, noise_rms=1e-4)
        corr = correction_for(f, bandwidth=1e6)
        assert (corr.hf_gain > 1) == boosts
        assert (corr.rolloff is not None) == boosts


def test_record_of_non_whole_periods_is_corrected_from_its_start():
    """Regression: a record of 9.5 periods is extended backwards in phase, so the corrected
    record is right from its first sample (textbook divider, compensated target A·g)."""
    r1, c1, r2, c2, T, dt, A = 9e6, 15e-12, 1e6, 110e-12, 1e-3, 2e-7, 2.0
    t = np.arange(int(9.5 * T / dt)) * dt
    v = textbook_square(t + 1e-5, r1, c1, r2, c2, A, T)
    y = apply_correction(t, v, Correction(r1 * r2 / (r1 + r2) * (c1 + c2), r1 * c1), period=T)
    tm = np.mod(t + 1e-5, T)
    want = np.where(tm < T / 2, A * 0.1, 0.0)
    away = (np.abs(tm - T / 2) > 3 * dt) & (tm > 3 * dt) & (tm < T - 3 * dt)
    np.testing.assert_allclose(y[away], want[away], atol=2e-3 * A * 0.1)

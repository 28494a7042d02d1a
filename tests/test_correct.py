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


def test_correct_capture_carries_what_the_command_prints():
    """The result of correcting a diagnosed capture: the compensated divider's flat output
    (Millman & Taub: a compensated divider passes the square at R2/(R1+R2)), its JSON, its
    corrected file and its picture's window of two and a half periods."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    from divider_synth import capture

    from taumatch.capture import Capture
    from taumatch.correct import correct_capture
    from taumatch.diagnosis import diagnose

    t, v = capture(13e-12, r1=9e6, r2=1e6, c2=100e-12, noise=1e-3, bits=14, periods=6)
    cap = Capture(t, {"CH1": v}, source="synthetic.csv")
    d = diagnose(cap, tip_r=9e6, shunt_r=1e6)
    res = correct_capture(cap, d)
    T = 1e-3
    tm = np.mod(t + 0.37e-4, T)
    high = (tm > 0.05 * T) & (tm < 0.45 * T)
    # after the correction the high plateau is flat: its start equals its end (the
    # mis-compensated capture's corner differs by about 4 % of the step)
    early, late = high & (tm < 0.1 * T), high & (tm > 0.4 * T)
    step = np.median(res.y[late]) - np.median(res.y[~high & (tm > 0.6 * T)])
    assert abs(np.median(res.y[early]) - np.median(res.y[late])) < 0.005 * step
    assert abs(np.median(v[early]) - np.median(v[late])) > 0.02 * step
    out = res.to_dict()
    assert list(out) == ["channel", "verdict_before", "hf_dc_error_before", "correction",
                         "samples", "warnings", "capture_notes"]
    assert out["channel"] == "CH1" and out["samples"] == t.size
    assert out["correction"]["hf_gain"] == pytest.approx(res.correction.hf_gain)
    assert res.csv_text().startswith("# corrected by taumatch from synthetic.csv (channel CH1)")
    assert res.summary().startswith(f"{t.size} samples, multiplied by")
    assert res.shown == int(2.5 * T / (t[1] - t[0]))
    fig, ax = res.plot()
    assert [ln.get_label() for ln in ax.get_lines()] == ["capture", "corrected"]
    assert ax.get_lines()[0].get_xdata().size == res.shown
    plt.close(fig)

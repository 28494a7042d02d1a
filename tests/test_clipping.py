"""Clipping told from quantisation (issue 9 item 3), and the quantisation offset of averages.

A converter holds its input between its lowest and highest code; a flat plateau on an
8-bit instrument sits on one to three codes.  The waveforms here are built with their
answer known: a flat square (no rail anywhere), a first-order corner (the textbook divider
step, Millman & Taub / Boylestad: a jump decaying with one time constant) cut by a rail
placed between its settled level and its peak, rounding to codes and seeded Gaussian
noise.  Property tests use the repeatable hypothesis profile of ``conftest.py``.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from taumatch.pulse import measure
from taumatch.pulse.clipping import code_step
from taumatch.pulse.quality import quantisation_bias


def _codes(v, code, offset):
    """Round to codes of ``code`` V, the grid shifted by ``offset`` codes."""
    return code * (np.round(v / code + offset) - offset)


def _square(n_per, periods, swing, edge, duty=0.5):
    """Flat square wave (0 → swing) with first-order edges of ``edge`` samples (time constant)."""
    t = np.arange(int(n_per * periods), dtype=float)
    ph = np.mod(t + 0.37, n_per)
    hi = duty * n_per
    up = 1 - np.exp(-ph / edge)
    down = np.exp(-np.clip(ph - hi, 0, None) / edge)
    return t, swing * np.where(ph < hi, up, down)


def _corner(n_per, periods, swing, overshoot, tau, polarity=1.0):
    """Square wave through a mis-compensated divider: each edge jumps to (1 + overshoot) of
    the swing and settles with time constant ``tau`` (samples); first-order corner."""
    t = np.arange(int(n_per * periods), dtype=float)
    ph = np.mod(t + 0.37, n_per)
    half = n_per / 2
    k = overshoot * swing
    high = swing + k * np.exp(-ph / tau)
    low = -k * np.exp(-np.clip(ph - half, 0, None) / tau)
    v = np.where(ph < half, high, low)
    return t, v if polarity > 0 else swing - v


# ----------------------------------------------------------------- plateaus are not rails
@settings(max_examples=150)
@given(codes=st.integers(25, 200), noise=st.floats(0.0, 0.9), offset=st.floats(0.0, 1.0),
       low_offset=st.floats(0.0, 1.0), periods=st.integers(2, 80), n_per=st.integers(40, 400),
       edge=st.floats(0.2, 3.0), seed=st.integers(0, 2**16))
def test_quantised_flat_plateaus_are_never_clipped(codes, noise, offset, low_offset, periods,
                                                   n_per, edge, seed):
    """8-bit-like codes (25 to 200 on the swing), noise below one code, plateaus at any place
    between codes: each plateau sits on one to three codes, and that is not a rail.  The
    plateaus are flat: each edge settles within a code in the first half of its state
    (ln(200)·τ ≈ 5.3 τ, so τ at most a twentieth of the state's length)."""
    assume(6 * edge <= n_per / 4)
    code = 1.0 / codes
    rng = np.random.default_rng(seed)
    # the two plateaus at independent places between codes
    low, high = low_offset * code, 1.0 + offset * code
    t, v = _square(n_per, periods, high - low, edge)
    q = _codes(low + v + rng.normal(0, noise * code, t.size), code, 0.0)
    m = measure((t, q))
    assert m.rails == () and not m.clipped


# ----------------------------------------------------------------- cut corners are rails
@settings(max_examples=150)
@given(codes=st.integers(40, 200), height=st.integers(12, 60), cut=st.floats(0.3, 0.7),
       noise=st.floats(0.0, 1.0), tau_frac=st.floats(0.05, 0.15), n_per=st.integers(200, 600),
       periods=st.integers(3, 12), polarity=st.sampled_from([1.0, -1.0]),
       seed=st.integers(0, 2**16))
def test_rail_clipped_corners_are_always_clipped(codes, height, cut, noise, tau_frac, n_per,
                                                 periods, polarity, seed):
    """A peaked (or, upside down, dipping) first-order corner of 12 to 60 codes, cut by the
    converter's rail between 30 % and 70 % of the way from the settled level to the peak,
    with up to a code of noise: always called clipped, on that rail, as a cut corner.  The
    rail stands clear of the settled level's noise (at least 5 codes and 4 noise RMS) and
    at least 6 codes of corner are cut off, for 8 samples or more of each period (a rail
    that shaves a few samples or codes off a noisy corner is not told from a smooth top:
    documented limit)."""
    rail_codes = math.floor(cut * height)
    assume(rail_codes >= 5 + 4 * noise and height - rail_codes >= 6 and 2 * height <= codes)
    assume(tau_frac * n_per * math.log(height / rail_codes) >= 8)
    code = 1.0 / codes
    rng = np.random.default_rng(seed)
    t, v = _corner(n_per, periods, 1.0, height * code, tau_frac * n_per, polarity)
    v = _codes(v + rng.normal(0, noise * code, t.size), code, 0.0)
    # the rail is one of the converter's codes, computed as the codes are
    rail = float(_codes(np.array([1.0 + rail_codes * code if polarity > 0
                                  else -rail_codes * code]), code, 0.0)[0])
    v = np.minimum(v, rail) if polarity > 0 else np.maximum(v, rail)
    rails = measure((t, v)).rails
    side = "top" if polarity > 0 else "bottom"
    assert [r.side for r in rails] == [side]
    assert rails[0].evidence == "corner"
    assert rails[0].level == pytest.approx(rail, abs=1e-9)


def test_rail_describes_level_share_and_what_to_change():
    """The refusal text names the rail, its level, the share of each period lost (the record
    is periodic: samples on the rail over all samples) and the instrument settings."""
    t, v = _corner(500, 6, 1.0, 0.3, 50.0)
    v = np.minimum(_codes(v, 1 / 100, 0.0), 1.15)
    m = measure((t, v))
    (rail,) = m.rails
    share = np.count_nonzero(v == v.max()) / v.size
    assert rail.share == pytest.approx(share)
    text = rail.describe(m.period)
    assert "top rail, 1.15 V" in text and f"{100 * share:.1f} % of each period" in text
    assert "volts/div" in text and "offset down" in text


def test_bottom_rail_cut_at_the_level_of_a_noisy_state():
    """Half of the lower state's noise below its level cut off (noise 10 % of the swing,
    unquantised): a rail at the level, evidence the cut noise distribution."""
    rng = np.random.default_rng(3)
    t, v = _square(300, 10, 1.0, 2.0)
    v = np.maximum(v + rng.normal(0, 0.01, t.size), 0.0)
    (rail,) = measure((t, v)).rails
    assert rail.side == "bottom" and rail.level == 0.0 and rail.evidence == "noise"


def test_code_step_of_printed_codes():
    """Codes printed with nine significant digits (as decoded exports are) keep their step."""
    v = np.array([float(f"{x:.9g}") for x in 0.0789040029 * np.arange(-3, 40)])
    assert code_step(v) == pytest.approx(0.0789040029, rel=1e-6)
    assert code_step(np.zeros(10)) == 0.0


# ----------------------------------------------------------------- quantisation offset
@pytest.mark.parametrize("dither", [0.0, 0.05, 0.1, 0.2, 0.3, 0.45, 0.7])
def test_quantisation_bias_against_direct_summation(dither):
    """Largest offset of the mean of rounded Gaussian samples from the input level, against
    direct summation of the code probabilities on a fine grid of levels with scipy's normal
    distribution (a reference independent of the closed form used from 0.3 codes up)."""
    from scipy.stats import norm

    levels = np.linspace(0.0, 1.0, 801)
    if dither == 0.0:
        want = 0.5
    else:
        j = np.arange(-20, 21)[None, :]
        p = norm.cdf((j + 0.5 - levels[:, None]) / dither) - norm.cdf(
            (j - 0.5 - levels[:, None]) / dither)
        want = float(np.max(np.abs((p * j).sum(axis=1) - levels)))
    assert quantisation_bias(1.0, dither) == pytest.approx(want, rel=0.02, abs=1e-6)
    assert quantisation_bias(0.04, 0.04 * dither) == pytest.approx(0.04 * want, rel=0.02,
                                                                   abs=1e-6)

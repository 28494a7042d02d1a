"""Data-quality checks a diagnosis needs before it trusts a capture.

* clipping: samples piled on the converter's rail — at least 1 % of the record exactly at
  its maximum (or minimum), the state level at that rail (closer than twice the noise
  RMS; an unclipped noisy plateau spreads well past its level), and either the rest of a
  cut-off noise distribution beside the rail or a state flatter than the other (so a
  noise-free flat top is not taken for clipping);
* too few periods to average;
* an edge faster than the sampling (10–90 % in under two sample intervals);
* a record (or plateau) shorter than the settling;
* noise RMS and signal-to-noise ratio;
* tilt: slope of the settled part of each plateau, as the change over one state's
  duration relative to the amplitude (AC coupling droops the upper plateau and lifts
  the lower one; a settling slower than the half period looks the same).
"""

from __future__ import annotations

import math

import numpy as np

__all__ = [
    "CLIP_FRACTION",
    "MIN_PERIODS",
    "SNR_LIMIT_DB",
    "TILT_LIMIT",
    "curvature_noise",
    "is_clipped",
    "plateau_tilt",
    "rail_fraction",
    "robust_noise",
    "snr_db",
]

#: Share of samples exactly on the rail above which a capture may be clipped.
CLIP_FRACTION = 0.01
#: Fewest full periods for averaging to mean anything.
MIN_PERIODS = 2
#: Largest tilt (fraction of the amplitude over one state) before a warning.
TILT_LIMIT = 0.01
#: Signal-to-noise ratio (dB, averaged period) below which a warning is given: 40 dB is
#: noise of 1 % of the amplitude, the size of the aberrations a small compensation error
#: leaves (common practice, no source).
SNR_LIMIT_DB = 40.0


def rail_fraction(v: np.ndarray) -> tuple[float, float, float, float]:
    """``(vmin, share at vmin, vmax, share at vmax)``."""
    vmin, vmax = float(v.min()), float(v.max())
    n = v.size
    return vmin, float(np.count_nonzero(v == vmin)) / n, vmax, float(np.count_nonzero(v == vmax)) / n


def is_clipped(v: np.ndarray, rail: float, share: float, level: float, noise: float,
               other_level: float) -> bool:
    """True when samples pile on ``rail`` the way a converter's limit piles them.

    Conditions: at least ``CLIP_FRACTION`` of the samples exactly on the rail; the state
    level on the rail (closer than twice the noise RMS); and either the rest of a cut-off
    noise distribution beside the rail (within four noise RMS, at least 30 % as many
    samples as on it) or a state flatter than the other one (its sample-to-sample noise
    under half the other state's), since an instrument's noise is about the same on both
    states (measured from second differences, so a settling tail does not count as noise,
    and only when the other state's noise is at least 1e-4 of the amplitude).  A
    noise-free or rounded waveform that simply tops out at one value shows neither, so it
    is not taken for clipping; a waveform clipped flat on both rails is not recognised
    either (documented limitation).
    """
    if share < CLIP_FRACTION or not (noise > 1e-6 * abs(level - other_level)
                                     and math.isfinite(noise)):
        return False  # noise-free (synthetic or rounded) data: nothing to tell by
    if abs(rail - level) >= 2.0 * noise:
        return False
    on_rail = share * v.size
    up = rail >= other_level
    lo, hi = (rail - 4.0 * noise, rail) if up else (rail, rail + 4.0 * noise)
    near = np.count_nonzero((v >= lo) & (v <= hi)) - on_rail
    if near >= 0.3 * on_rail:
        return True
    split = 0.5 * (level + other_level)
    here = v[v > split] if up else v[v < split]
    there = v[v <= split] if up else v[v >= split]
    there_noise = curvature_noise(there)
    if there_noise < 1e-4 * abs(level - other_level):
        return False  # the other state is (nearly) noise-free too: nothing to compare
    return curvature_noise(here) < 0.5 * there_noise


def robust_noise(v: np.ndarray) -> float:
    """Noise RMS (V) from the median absolute sample difference, ``1.4826·MAD(diff)/√2``.

    Transitions are rare samples, so the median ignores them.
    """
    d = np.diff(np.asarray(v, dtype=np.float64))
    return float(1.4826 * np.median(np.abs(d)) / math.sqrt(2.0)) if d.size else 0.0


def curvature_noise(v: np.ndarray) -> float:
    """Noise RMS (V) from second differences, ``1.4826·MAD(diff²)/√6``: white noise is
    kept, a smooth deterministic tail (a settling exponential) nearly cancels."""
    d2 = np.diff(np.asarray(v, dtype=np.float64), 2)
    return float(1.4826 * np.median(np.abs(d2)) / math.sqrt(6.0)) if d2.size else 0.0


def plateau_tilt(t: np.ndarray, v: np.ndarray, mask: np.ndarray, state_duration: float,
                 amplitude: float) -> float:
    """Least-squares slope over ``mask`` times ``state_duration`` over ``amplitude``."""
    if np.count_nonzero(mask) < 3 or not amplitude > 0:
        return float("nan")
    slope = np.polyfit(t[mask], v[mask], 1)[0]
    return float(slope * state_duration / amplitude)


def snr_db(amplitude: float, noise: float) -> float:
    """20·log10(amplitude / noise RMS); ``inf`` for a noise-free record."""
    if not (noise > 0 and math.isfinite(noise)):
        return float("inf")
    return float(20.0 * math.log10(abs(amplitude) / noise))

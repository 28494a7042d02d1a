"""Data-quality checks a diagnosis needs before it trusts a capture.

* clipping: samples piled on the converter's rail — at least 1 % of the record exactly at
  its maximum (or minimum) while the state level sits at that rail, closer to it than
  twice the noise RMS (an unclipped noisy plateau spreads well past its level);
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

__all__ = ["rail_fraction", "is_clipped", "robust_noise", "plateau_tilt", "snr_db",
           "CLIP_FRACTION", "MIN_PERIODS", "TILT_LIMIT", "SNR_LIMIT_DB"]

#: Share of samples exactly on the rail above which a capture may be clipped.
CLIP_FRACTION = 0.01
#: Fewest full periods for averaging to mean anything.
MIN_PERIODS = 2
#: Largest tilt (fraction of the amplitude over one state) before a warning.
TILT_LIMIT = 0.01
#: Signal-to-noise ratio (dB, averaged period) below which a warning is given.
SNR_LIMIT_DB = 20.0


def rail_fraction(v: np.ndarray) -> tuple[float, float, float, float]:
    """``(vmin, share at vmin, vmax, share at vmax)``."""
    vmin, vmax = float(v.min()), float(v.max())
    n = v.size
    return vmin, float(np.count_nonzero(v == vmin)) / n, vmax, float(np.count_nonzero(v == vmax)) / n


def is_clipped(rail: float, share: float, level: float, noise: float) -> bool:
    """True when ``share`` of the samples sit on ``rail`` and the state level is on it too."""
    if share < CLIP_FRACTION or not (noise > 0 and math.isfinite(noise)):
        return False
    return abs(rail - level) < 2.0 * noise


def robust_noise(v: np.ndarray) -> float:
    """Noise RMS (V) from the median absolute sample difference, ``1.4826·MAD(diff)/√2``.

    Transitions are rare samples, so the median ignores them.
    """
    d = np.diff(np.asarray(v, dtype=np.float64))
    return float(1.4826 * np.median(np.abs(d)) / math.sqrt(2.0)) if d.size else float("nan")


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

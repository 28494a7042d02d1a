"""Data-quality checks a diagnosis needs before it trusts a capture.

* clipping: see :mod:`taumatch.pulse.clipping` (a rail, told apart from a quantised plateau);
* too few periods to average;
* an edge faster than the sampling (10–90 % in under two sample intervals);
* a record (or plateau) shorter than the settling;
* noise RMS and signal-to-noise ratio;
* quantisation: how far the average of quantised samples can sit from the true level when
  the noise does not dither the codes;
* tilt: slope of the settled part of each plateau, as the change over one state's
  duration relative to the amplitude (AC coupling droops the upper plateau and lifts
  the lower one; a settling slower than the half period looks the same).
"""

from __future__ import annotations

import math

import numpy as np

__all__ = [
    "MIN_PERIODS",
    "SNR_LIMIT_DB",
    "TILT_LIMIT",
    "curvature_noise",
    "plateau_tilt",
    "quantisation_bias",
    "robust_noise",
    "snr_db",
]

#: Fewest full periods for averaging to mean anything.
MIN_PERIODS = 2
#: Largest tilt (fraction of the amplitude over one state) before a warning.
TILT_LIMIT = 0.01
#: Signal-to-noise ratio (dB, averaged period) below which a warning is given: 40 dB is
#: noise of 1 % of the amplitude, the size of the aberrations a small compensation error
#: leaves (common practice, no source).
SNR_LIMIT_DB = 40.0


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


def quantisation_bias(code: float, dither: float) -> float:
    """Largest offset (V) of the mean of quantised samples from the mean of their input.

    A rounding quantiser with step ``code`` whose input carries Gaussian noise of RMS
    ``dither`` has a mean error that is periodic in the input level.  From a third of a
    code of noise upwards its first harmonic dominates, with amplitude
    ``(code/π)·exp(−2π²·dither²/code²)`` (own derivation from the Fourier series of the
    sawtooth error, averaged over the noise; the quantisation theorems of Widrow and
    Kollár, "Quantization Noise", 2008, say the same, from memory); below that the
    offset is found by summing the code probabilities over a grid of levels.  Without
    noise it is half a code.

    Averaging many periods removes noise but not this offset: it is what a capture's codes
    can hide.

    Examples
    --------
    >>> quantisation_bias(0.04, 0.0)
    0.02
    >>> round(quantisation_bias(0.04, 0.02) / 0.04, 5)   # half a code of noise
    0.00229
    """
    if not code > 0:
        return 0.0
    s = max(dither, 0.0) / code
    if s >= 0.3:
        return float(code / math.pi * math.exp(-2.0 * math.pi**2 * s * s))
    if s == 0.0:
        return 0.5 * code
    from scipy.special import ndtr

    mu = np.linspace(0.0, 0.5, 101)[:, None]  # the error is odd about whole codes
    k = math.ceil(8 * s) + 1
    j = np.arange(-k, k + 1)[None, :]
    p = ndtr((j + 0.5 - mu) / s) - ndtr((j - 0.5 - mu) / s)
    return float(code * np.max(np.abs((p * j).sum(axis=1) - mu[:, 0])))


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

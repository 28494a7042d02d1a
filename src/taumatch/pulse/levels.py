"""State levels and reference levels of a two-state waveform (IEEE Std 181-2011).

The state levels come from the histogram of the samples: the occupied range
[min, max] is split in two halves, and each state is either the *mode* of its half
(the default, IEEE 181 histogram-mode method) or the *mean* of its half
(histogram-mean method).  The mode is located with a histogram and reported as the
mean of the samples inside the modal bin, which removes the quantisation of the bin
centre without leaving the modal bin (narrowed further while one tenth of it holds
most of its samples, so that a noise-free or quantised plateau is found exactly).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import InputError

__all__ = ["LEVEL_METHODS", "StateLevels", "state_levels", "step_strength"]

LEVEL_METHODS = ("mode", "mean")
#: Samples used for the histogram of a long record (an evenly strided subset).
_HIST_SAMPLES = 1_000_000


@dataclass(frozen=True)
class StateLevels:
    """Lower and upper state levels in volts.

    Parameters
    ----------
    low, high : float
        State levels (V), ``high > low``.
    method : str
        ``"mode"`` or ``"mean"``.
    """

    low: float
    high: float
    method: str = "mode"

    def __post_init__(self):
        if not (np.isfinite(self.low) and np.isfinite(self.high)):
            raise InputError(f"state levels must be finite, got {self.low!r}, {self.high!r}")
        if not self.high > self.low:
            raise InputError(
                f"upper state level {self.high!r} V must be above the lower {self.low!r} V "
                "(the waveform has no two distinct states)"
            )
        if self.method not in LEVEL_METHODS:
            raise InputError(f"level method must be one of {LEVEL_METHODS}, got {self.method!r}")

    @property
    def amplitude(self) -> float:
        """Upper minus lower state level (V)."""
        return self.high - self.low

    def reference(self, fraction: float) -> float:
        """Reference level at ``fraction`` of the amplitude above the lower state (V)."""
        return self.low + fraction * self.amplitude


def _subset(v: np.ndarray) -> np.ndarray:
    if v.size <= _HIST_SAMPLES:
        return v
    return v[:: int(np.ceil(v.size / _HIST_SAMPLES))]


def state_levels(v, method: str = "mode", bins: int = 200) -> StateLevels:
    """Lower and upper state levels of a two-state waveform.

    Parameters
    ----------
    v : array_like
        Samples (V).
    method : {"mode", "mean"}
        Histogram mode (IEEE 181 default) or histogram mean of each half of the range.
    bins : int
        Histogram bins over the occupied range.

    Returns
    -------
    StateLevels

    Raises
    ------
    InputError
        When the waveform is constant or the method is unknown.

    Examples
    --------
    >>> import numpy as np
    >>> lv = state_levels(np.r_[np.zeros(50), np.ones(40), 1.2, np.ones(9)])
    >>> float(lv.low), float(lv.high)
    (0.0, 1.0)
    """
    if method not in LEVEL_METHODS:
        raise InputError(f"level method must be one of {LEVEL_METHODS}, got {method!r}")
    x = _subset(np.asarray(v, dtype=np.float64))
    if x.size < 2:
        raise InputError(f"need at least 2 samples for state levels, got {x.size}")
    lo, hi = float(x.min()), float(x.max())
    if not hi > lo:
        raise InputError(f"the waveform is constant at {lo!r} V: no step in it")
    if not np.isfinite(hi - lo):  # e.g. -1e308 to 1e308: the span itself overflows
        raise InputError(f"the waveform spans {lo!r} to {hi!r} V, more than a float holds "
                         "as one span; check the export's scale")
    mid = 0.5 * (lo + hi)
    lower = x < mid
    if not (lo < mid < hi) or lower.all() or not lower.any():
        raise InputError(f"the waveform spans only {lo!r} to {hi!r} V: too little to split "
                         "into two states")
    if method == "mean":
        return StateLevels(float(x[lower].mean()), float(x[~lower].mean()), "mean")
    bins = int(bins) + int(bins) % 2  # even, so the split falls on a bin edge
    try:
        counts, edges = np.histogram(x, bins=bins, range=(lo, hi))
    except ValueError:
        raise InputError(f"the waveform spans only {lo!r} to {hi!r} V: too little for a "
                         f"histogram of {bins} bins") from None
    half = bins // 2
    levels = []
    for part in (slice(0, half), slice(half, bins)):
        k = part.start + int(np.argmax(counts[part]))
        a, b = edges[k], edges[k + 1]
        inside = x[(x >= a) & ((x < b) if k < bins - 1 else (x <= b))]
        levels.append(_refine_mode(inside))
    return StateLevels(levels[0], levels[1], "mode")


def _refine_mode(inside: np.ndarray) -> float:
    """Mean of the modal bin's samples, after narrowing the bin while one tenth of it
    holds most of them (a plateau sharper than the bin, e.g. noise-free or quantised data;
    with noise wider than the bin nothing is narrowed)."""
    for _ in range(6):
        if inside.size < 4 or inside.max() == inside.min():
            break
        try:
            counts, edges = np.histogram(inside, bins=10)
        except ValueError:  # a span too small for ten bins: already as narrow as it gets
            break
        k = int(np.argmax(counts))
        if counts[k] < 0.5 * inside.size:
            break
        inside = inside[(inside >= edges[k]) & (inside <= edges[k + 1])]
    return float(inside.mean())


def step_strength(v, levels: StateLevels | None = None) -> float:
    """How clearly a channel holds a step: state amplitude over sample-to-sample noise.

    Zero when the waveform is constant, when either state holds fewer than 1 % of the
    samples, or when the amplitude is under 5 times the noise.  Used to pick the channel
    with a step in it.

    Parameters
    ----------
    v : array_like
        Samples (V).
    levels : StateLevels, optional
        Levels already found (else the histogram mode is used).

    Returns
    -------
    float
        Dimensionless ratio (``inf`` for a noise-free step).
    """
    x = np.asarray(v, dtype=np.float64)
    if x.size < 4 or not np.isfinite(x).all():
        return 0.0
    try:
        lv = levels if levels is not None else state_levels(x)
    except InputError:
        return 0.0
    sub = _subset(x)
    share_low = np.mean(sub < lv.reference(0.25))
    share_high = np.mean(sub > lv.reference(0.75))
    if min(share_low, share_high) < 0.01:
        return 0.0
    d = np.diff(x[: _HIST_SAMPLES])
    noise = 1.4826 * float(np.median(np.abs(d))) / np.sqrt(2.0)
    if noise <= 1e-12 * lv.amplitude:  # noise-free (or rounding-level noise)
        return float("inf")
    ratio = lv.amplitude / noise
    return ratio if ratio >= 5.0 else 0.0

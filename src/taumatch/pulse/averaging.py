"""Coherent averaging of all full periods of a square-wave record into one period.

Each full period is cut from the record starting a fixed time before its rising edge,
resampled by linear interpolation onto one grid aligned on that edge's interpolated
(sub-sample) instant, and averaged.  Uncorrelated noise falls as 1/√N for N periods.

Noise is estimated on the settled plateaus (the last half of each state):

* before: from the differences of consecutive raw samples, ``std(diff)/√2`` (white
  noise; a slow tail or tilt hardly moves it);
* after: from the difference of the average of the even-numbered periods and the
  average of the odd-numbered ones, which cancels the waveform and keeps the noise;
  scaled to the noise of the full average.

Linear interpolation at a random sub-sample offset itself lowers white-noise variance
by ``(1-f)² + f²`` (2/3 on average), so the measured after/before ratio is typically
about ``0.82/√N``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.lib.stride_tricks import sliding_window_view

from ..errors import InputError
from .edges import Edges, find_edges
from .levels import StateLevels, state_levels

__all__ = ["AveragedPeriod", "as_arrays", "average_period", "uniform_record"]

_CHUNK = 1_000_000  # samples gathered per block of periods
_NOISE_SAMPLES = 500_000  # plateau differences enough for the raw noise estimate
#: Plateau part used for noise and tilt: from this fraction of the state's duration ...
PLATEAU_START = 0.5
#: ... to this one (the end is kept away from the next edge).
PLATEAU_END = 0.85


@dataclass(frozen=True)
class AveragedPeriod:
    """One period averaged over all full periods of a record.

    Attributes
    ----------
    t : numpy.ndarray
        Time from the rising edge's reference-level instant (s); starts about half the
        lower-state duration before the edge and spans one period.
    v : numpy.ndarray
        Averaged samples (V).
    period : float
        Period (s).
    n_periods : int
        Number of full periods averaged.
    noise_rms_before, noise_rms_after : float
        Noise RMS (V) of the raw samples and of the averaged period, on the plateaus.
    rising_edge_time : float
        Instant (s, record time base) of the rising edge of the first averaged period.
    falling_edge_time : float
        Falling edge relative to the rising edge (s), ``duty * period``.
    duty : float
        Fraction of the period in the upper state.
    levels : StateLevels
        State levels of the whole record (used for the thresholds).
    edges : Edges
        All transitions found in the record.
    resampled : bool
        True when the record's time base was not uniform and was resampled first.
    """

    t: np.ndarray
    v: np.ndarray
    period: float
    n_periods: int
    noise_rms_before: float
    noise_rms_after: float
    rising_edge_time: float
    falling_edge_time: float
    duty: float
    levels: StateLevels | None = None
    edges: Edges | None = None
    resampled: bool = False

    def __post_init__(self):
        t = np.asarray(self.t, dtype=np.float64)
        v = np.asarray(self.v, dtype=np.float64)
        if t.ndim != 1 or t.shape != v.shape or t.size < 2:
            raise InputError(f"averaged period: t and v must be 1-D of one length >= 2, "
                             f"got {t.shape} and {v.shape}")
        if not self.period > 0:
            raise InputError(f"averaged period: period must be positive, got {self.period!r} s")
        if self.n_periods < 1:
            raise InputError(f"averaged period: n_periods must be >= 1, got {self.n_periods}")
        for arr, name in ((t, "t"), (v, "v")):
            view = arr.view()
            view.flags.writeable = False
            object.__setattr__(self, name, view)

    @property
    def sample_interval(self) -> float:
        """Grid step (s)."""
        return float(self.t[1] - self.t[0])

    def plateau_masks(self) -> tuple[np.ndarray, np.ndarray]:
        """Boolean masks of the settled parts of the lower and upper states on ``t``."""
        low_len = (1.0 - self.duty) * self.period
        high_len = self.duty * self.period
        low = (self.t >= -(1.0 - PLATEAU_START) * low_len) & (
            self.t < -(1.0 - PLATEAU_END) * low_len)
        high = (self.t >= PLATEAU_START * high_len) & (self.t < PLATEAU_END * high_len)
        return low, high

    def summary(self) -> str:
        """How many periods were averaged, and the noise before and after."""
        from ..units import format_quantity as q

        return (f"average of {self.n_periods} period{'s' if self.n_periods != 1 else ''} of "
                f"{q(self.period, 's')} (duty {100 * self.duty:.1f} %), {self.t.size} samples "
                f"of {q(self.sample_interval, 's')}: noise {q(self.noise_rms_before, 'V')} rms "
                f"before, {q(self.noise_rms_after, 'V')} rms after"
                + ("; the time base was resampled to a uniform grid" if self.resampled else ""))

    def plot(self, ax=None):
        """Draw the averaged period; returns ``(fig, ax)``."""
        from ..plot.pulse import plot_averaged_period

        return plot_averaged_period(self, ax=ax)

    def to_dict(self) -> dict:
        """Scalars only (the arrays are for fitting, not for JSON)."""
        return {
            "period": self.period, "n_periods": self.n_periods,
            "noise_rms_before": self.noise_rms_before, "noise_rms_after": self.noise_rms_after,
            "rising_edge_time": self.rising_edge_time,
            "falling_edge_time": self.falling_edge_time, "duty": self.duty,
            "samples": int(self.t.size), "sample_interval": self.sample_interval,
            "resampled": self.resampled,
        }


def as_arrays(data, channel: str | None = None):
    """``(t, v, name)`` from a Capture (duck-typed) or a ``(t, v)`` pair."""
    if hasattr(data, "time") and hasattr(data, "channel_name"):
        name = data.channel_name(channel)
        return np.asarray(data.time, float), np.asarray(data.channels[name], float), name
    try:
        t, v = data
    except (TypeError, ValueError):
        raise InputError("expected a Capture or a (time, values) pair of arrays") from None
    t = np.asarray(t, dtype=np.float64)
    v = np.asarray(v, dtype=np.float64)
    if t.ndim != 1 or t.shape != v.shape:
        raise InputError(f"time and values must be 1-D of one length, got {t.shape} and {v.shape}")
    if t.size < 4:
        raise InputError(f"only {t.size} samples; an edge needs at least 4")
    if not (np.isfinite(t).all() and np.isfinite(v).all()):
        raise InputError("time and values must be finite")
    if not np.all(t[1:] > t[:-1]):
        raise InputError("time must increase strictly")
    return t, v, channel or "v"


def uniform_record(t: np.ndarray, v: np.ndarray):
    """``(t0, dt, v, resampled)``: the record on a uniform grid.

    A time base within half a sample interval of a straight line is taken as uniform
    (printed time stamps are often rounded); otherwise ``v`` is resampled linearly.
    """
    n = t.size
    dt = float((t[-1] - t[0]) / (n - 1))
    k = np.arange(0, n, max(1, n // 100_000))  # a strided check: deviations accumulate
    dev = np.max(np.abs(t[k] - (t[0] + dt * k)))
    if dev <= 0.5 * dt:
        return float(t[0]), dt, v, False
    dt = float(np.median(np.diff(t)))
    m = int((t[-1] - t[0]) / dt) + 1
    grid = t[0] + dt * np.arange(m)
    return float(t[0]), dt, np.interp(grid, t, v), True


def average_period(data, channel: str | None = None, *, levels: str = "mode",
                   hysteresis: float = 0.4) -> AveragedPeriod:
    """Average all full periods of a square-wave record into one period.

    Parameters
    ----------
    data : Capture or (array_like, array_like)
        A capture (its chosen channel) or time (s) and samples (V).
    channel : str, optional
        Channel of a capture (default: the only one, or the one with a step).
    levels : {"mode", "mean"}
        State-level method (IEEE Std 181 histogram mode or mean).
    hysteresis : float
        Hysteresis band of the edge finder, fraction of the amplitude.

    Returns
    -------
    AveragedPeriod

    Raises
    ------
    InputError
        When the record holds no full period (two rising edges and room around them).
    """
    t, v, _ = as_arrays(data, channel)
    lv = state_levels(v, levels)
    edges = find_edges(t, v, lv, hysteresis=hysteresis)
    return average_from_edges(t, v, edges)


def average_from_edges(t: np.ndarray, v: np.ndarray, edges: Edges) -> AveragedPeriod:
    """The averaging step of :func:`average_period`, given the record's edges."""
    period = edges.period
    if not (np.isfinite(period) and period > 0) or edges.rising.size < 1:
        raise InputError(
            f"no full period: found {edges.rising.size} rising and {edges.falling.size} "
            "falling edges; averaging needs at least two rising edges"
        )
    duty = edges.duty if np.isfinite(edges.duty) else 0.5
    t0, dt, u, resampled = uniform_record(t, v)
    n = u.size
    m = int(np.floor(period / dt))
    if m < 4:
        raise InputError(
            f"period {period:.4g} s spans only {m} samples of {dt:.4g} s; need at least 4"
        )
    pre = 0.5 * (1.0 - duty) * period
    rising = edges.rising
    keep = [0]
    for k in range(1, rising.size):
        if rising[k] - rising[keep[-1]] >= 0.75 * period:
            keep.append(k)
    rising = rising[keep]
    x = (rising - pre - t0) / dt
    i0 = np.floor(x).astype(np.int64)
    ok = (i0 >= 0) & (i0 + m + 1 <= n - 1)
    rising, x, i0 = rising[ok], x[ok], i0[ok]
    count = int(rising.size)
    if count < 1:
        raise InputError(
            f"no full period fits in the record: period {period:.4g} s, record "
            f"{t[-1] - t[0]:.4g} s with {edges.rising.size} rising edges"
        )
    frac = x - i0
    grid = -pre + dt * np.arange(m)
    low_len, high_len = (1.0 - duty) * period, duty * period
    low_cols = _cols(grid, -(1.0 - PLATEAU_START) * low_len, -(1.0 - PLATEAU_END) * low_len)
    high_cols = _cols(grid, PLATEAU_START * high_len, PLATEAU_END * high_len)
    windows = sliding_window_view(u, m + 1)
    # noise sums of squares in units of a power of two near the largest sample (exact), so
    # they stay inside the float range for any voltage scale
    peak = float(np.max(np.abs(u)))
    vscale = 2.0 ** round(math.log2(peak)) if peak > 0 else 1.0
    sums = np.zeros((4, m + 1))
    noise_acc = np.zeros((2, 3))  # per plateau: count, sum, sum of squares of differences
    even = (np.arange(count) % 2 == 0).astype(np.float64)
    step = max(1, _CHUNK // (m + 1))
    for a in range(0, count, step):
        b = min(count, a + step)
        block = windows[i0[a:b]]
        f = frac[a:b]
        e = even[a:b]
        weights = np.stack([(1 - f) * e, f * e, (1 - f) * (1 - e), f * (1 - e)])
        sums += weights @ block
        for row, cols in enumerate((low_cols, high_cols)):
            if cols.stop - cols.start >= 2 and noise_acc[row, 0] < _NOISE_SAMPLES:
                d = np.diff(block[:, cols], axis=1) / vscale
                noise_acc[row] += (d.size, d.sum(), np.square(d).sum())
    n_even = int(even.sum())
    n_odd = count - n_even
    avg_even = (sums[0, :-1] + sums[1, 1:]) / max(n_even, 1)
    avg_odd = (sums[2, :-1] + sums[3, 1:]) / max(n_odd, 1)
    avg = (sums[0, :-1] + sums[1, 1:] + sums[2, :-1] + sums[3, 1:]) / count
    before = _diff_noise(noise_acc) * vscale
    if n_odd >= 1:
        cols = np.r_[np.arange(low_cols.start, low_cols.stop),
                     np.arange(high_cols.start, high_cols.stop)]
        resid = (avg_even - avg_odd)[cols] if cols.size else avg_even - avg_odd
        resid = (resid - resid.mean()) / vscale
        after = vscale * float(np.sqrt(np.mean(np.square(resid))
                                       / (count * (1 / n_even + 1 / n_odd))))
    else:
        after = before
    return AveragedPeriod(
        t=grid, v=avg, period=period, n_periods=count,
        noise_rms_before=before, noise_rms_after=after,
        rising_edge_time=float(rising[0]), falling_edge_time=duty * period, duty=duty,
        levels=edges.levels, edges=edges, resampled=resampled,
    )


def _cols(grid: np.ndarray, start: float, stop: float) -> slice:
    a, b = np.searchsorted(grid, [start, stop])
    return slice(int(a), int(max(a, b)))


def _diff_noise(acc: np.ndarray) -> float:
    """Pooled std of sample differences over the plateaus, divided by √2 (V)."""
    total_n, total_ss = 0.0, 0.0
    for count, s, ss in acc:
        if count >= 2:
            total_ss += ss - s * s / count
            total_n += count - 1
    if total_n <= 0:
        return float("nan")
    return float(np.sqrt(max(total_ss, 0.0) / total_n / 2.0))

"""IEEE Std 181-2011 transition metrics on one waveform: duration, aberrations, settling.

Definitions used (for a positive-going transition; a negative-going one is measured on
the mirrored waveform, so the words keep their meaning relative to the new state):

* reference levels at 10 %, 50 % and 90 % of the amplitude above the lower state;
* the 50 % instant is the last crossing of the 50 % level before the waveform reaches
  the far hysteresis threshold; the 10 % instant is the last 10 % crossing before it,
  the 90 % instant the first 90 % crossing after it (all linearly interpolated);
* transition duration = 90 % instant − 10 % instant;
* aberration regions: the plateau between two transitions is split at its midpoint;
  the first half (from the 90 % instant) is the post-transition region of the
  transition before it, the second half (to the 10 % instant) the pre-transition region
  of the one after;
* overshoot = (maximum in the post region − upper state) / amplitude;
* undershoot = (upper state − minimum after that maximum) / amplitude, so a monotonic
  approach (a rounded corner) has none;
* preshoot = (lower state − minimum in the pre region) / amplitude;
* settling time: from the 50 % instant until the waveform stays within ± band ×
  amplitude of the upper state, searched up to shortly before the next transition
  (its 10 % instant less twice its 10–50 % span) or the record end; NaN when it has
  not settled by then, or entered the band only in the last tenth of that span.

Aberrations are reported as fractions (0.05 = 5 %), clipped at zero.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from .levels import StateLevels

__all__ = ["Transition", "core", "first_transition", "measure_transitions"]

_LOW_THR, _HIGH_THR = 0.3, 0.7  # hysteresis used to locate a transition


@dataclass(frozen=True)
class Transition:
    """Metrics of one transition (times in s, aberrations as fractions of the amplitude).

    Attributes
    ----------
    polarity : str
        ``"rising"`` (positive-going) or ``"falling"`` (negative-going).
    start, middle, end : float
        Instants of the 10 %, 50 % and 90 % crossings of the transition's own progress
        (for a falling edge: the 90 %, 50 % and 10 % levels of the amplitude).
    duration : float
        Transition duration, ``end - start`` (s).
    overshoot, undershoot, preshoot : float
        Aberrations as fractions of the amplitude.
    peak_time : float
        Instant of the post-transition extreme minus ``middle`` (s).
    settling_time : float
        From ``middle`` until the waveform stays in the band (s); NaN when not settled.
    band : float
        Settling band as a fraction of the amplitude.
    """

    polarity: str
    start: float
    middle: float
    end: float
    duration: float
    overshoot: float
    undershoot: float
    preshoot: float
    peak_time: float
    settling_time: float
    band: float

    def __post_init__(self):
        if self.polarity not in ("rising", "falling"):
            raise InputError(f"transition polarity must be 'rising' or 'falling', "
                             f"got {self.polarity!r}")
        if not 0 < self.band < 0.5:
            raise InputError(f"transition settling band must be between 0 and 50 %, "
                             f"got {self.band!r}")

    @property
    def settled(self) -> bool:
        """True when the waveform settled into the band within the record."""
        return bool(np.isfinite(self.settling_time))

    def to_dict(self) -> dict:
        return {
            "polarity": self.polarity, "start": self.start, "middle": self.middle,
            "end": self.end, "duration": self.duration,
            "overshoot": 100 * self.overshoot, "undershoot": 100 * self.undershoot,
            "preshoot": 100 * self.preshoot, "peak_time": self.peak_time,
            "settling_time": self.settling_time, "band": 100 * self.band,
        }


def first_transition(y: np.ndarray, i_from: int = 0):
    """Index of the first sample past 70 % after a sample below 30 % (y normalised 0→1)."""
    below = np.flatnonzero(y[i_from:] <= _LOW_THR)
    if not below.size:
        return None
    k = i_from + int(below[0])
    above = np.flatnonzero(y[k:] >= _HIGH_THR)
    if not above.size:
        return None
    return k + int(above[0])


def _interp(t, y, j, level):
    """Instant where y crosses ``level`` between samples j and j+1."""
    y0, y1 = y[j], y[j + 1]
    if y1 == y0:
        return float(t[j])
    return float(t[j] + (level - y0) / (y1 - y0) * (t[j + 1] - t[j]))


def core(t: np.ndarray, y: np.ndarray, i_center: int, lo: float = 0.1, hi: float = 0.9):
    """Indices and instants of the 10/50/90 % crossings around ``i_center``.

    Returns ``(j_start, j_mid, j_end, t_start, t_mid, t_end)``; ``j_*`` are the sample
    before each crossing (``j_end`` the first sample at or past 90 %).
    """
    below50 = np.flatnonzero(y[:i_center] < 0.5)
    j50 = int(below50[-1]) if below50.size else 0
    below10 = np.flatnonzero(y[: j50 + 1] < lo)
    j10 = int(below10[-1]) if below10.size else None
    above90 = np.flatnonzero(y[j50 + 1:] >= hi)
    j90 = j50 + 1 + int(above90[0]) if above90.size else None
    t50 = _interp(t, y, j50, 0.5)
    t10 = _interp(t, y, j10, lo) if j10 is not None and j10 + 1 < y.size else float("nan")
    t90 = _interp(t, y, j90 - 1, hi) if j90 is not None else float("nan")
    return (j10 if j10 is not None else 0, j50, j90 if j90 is not None else j50 + 1,
            t10, t50, t90)


def measure_transitions(t, v, levels: StateLevels, centers, polarities, *,
                        band: float = 0.02, bounds=None) -> list[Transition]:
    """Metrics of the transitions located at ``centers`` (indices past 70 %).

    Parameters
    ----------
    t, v : numpy.ndarray
        Instants (s) and samples (V).
    levels : StateLevels
        State levels.
    centers : sequence of int
        For each transition, in time order, an index just past its 70 % threshold.
    polarities : sequence of str
        ``"rising"`` or ``"falling"`` for each.
    band : float
        Settling band, fraction of the amplitude.
    bounds : sequence of (int, int), optional
        Region limits ``(first index of the pre region, end index of the post region)``
        for each transition; by default the neighbouring transitions or the record ends.
    """
    t = np.asarray(t, dtype=np.float64)
    v = np.asarray(v, dtype=np.float64)
    amp = levels.amplitude
    ys = {"rising": (v - levels.low) / amp, "falling": (levels.high - v) / amp}
    cores = [core(t, ys[p], c) for c, p in zip(centers, polarities)]
    out = []
    for k, (pol, (j10, j50, j90, t10, t50, t90)) in enumerate(zip(polarities, cores)):
        y = ys[pol]
        if bounds is not None:
            pre_a, post_b = bounds[k]
        else:
            pre_a = cores[k - 1][2] if k > 0 else 0
            post_b = cores[k + 1][0] + 1 if k + 1 < len(cores) else y.size
        # Aberration regions: each plateau is split at its midpoint.
        post_mid = (j90 + post_b) // 2 if post_b < y.size else y.size
        pre_mid = (pre_a + j10) // 2 if pre_a > 0 else 0
        post = y[j90:max(post_mid, j90 + 1)]
        if post.size:
            ip = int(np.argmax(post))
            over = max(0.0, float(post[ip]) - 1.0)
            under = max(0.0, 1.0 - float(post[ip:].min()))
            peak_time = float(t[j90 + ip] - t50)
        else:
            over = under = 0.0
            peak_time = float("nan")
        pre = y[pre_mid:j10 + 1]
        preshoot = max(0.0, -float(pre.min())) if pre.size else 0.0
        if k + 1 < len(cores) or bounds is not None:
            nxt = cores[(k + 1) % len(cores)]
            margin = 2 * max(1, nxt[1] - nxt[0])
        else:
            margin = 0
        settling = _settling(t, y, j50, t50, post_b, band, open_end=post_b >= y.size,
                             margin=margin)
        out.append(Transition(
            polarity=pol, start=t10, middle=t50, end=t90, duration=t90 - t10,
            overshoot=over, undershoot=under, preshoot=preshoot, peak_time=peak_time,
            settling_time=settling, band=band,
        ))
    return out


def _settling(t, y, j50, t50, end, band, open_end, margin=0):
    """Time from the 50 % instant until y stays within 1 ± band (NaN if it never does).

    The search runs to ``end - margin`` (the next transition's 10 % sample less twice
    its 10–50 % span, i.e. before it starts to move), or to the record end.  The waveform
    counts as settled only if it then stays in the band for at least the last tenth of
    the searched span (and 3 samples): entering the band just before the end proves
    nothing.
    """
    stop = min(end, y.size) - 1 - (0 if open_end else margin)
    tail = y[j50 + 1:stop + 1]
    if tail.size < 4:
        return float("nan")
    outside = np.flatnonzero(np.abs(tail - 1.0) > band)
    if not outside.size:
        return float(t[j50 + 1] - t50)
    if tail.size - 1 - outside[-1] < max(3, tail.size // 10):
        return float("nan")
    j = j50 + 1 + int(outside[-1])
    edge = 1.0 + band if y[j] > 1.0 else 1.0 - band
    return _interp(t, y, j, edge) - t50

"""Figures of a computed step response: 10-90 % rise, overshoot, settling.

Definitions as IEEE Std 181-2011 gives them for a positive-going transition, read off an
exact (computed, noise-free) step rather than samples of a capture:

* reference levels 10 % and 90 % of the final value; the rise time is the time between the
  first crossings of the two (linear interpolation between samples);
* overshoot ``(max - final) / final`` (0 when the step never exceeds its final value by more
  than the stated error of the computed step);
* settling: from the 50 % crossing until the response stays within ``band`` (2 % by
  default; common practice) of the final value; None when it does not within the window.

A step that jumps at ``t = 0`` past a level crosses it at 0 (an over-compensated divider
jumps to its high-frequency gain); ``jumps`` says so.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

__all__ = ["StepFigures", "step_figures"]


@dataclass(frozen=True)
class StepFigures:
    """Rise, overshoot and settling of one step response.

    Attributes
    ----------
    final : float
        Final value [V/V].
    t10, t90, t50 : float or None
        First crossings of 10 %, 90 % and 50 % of the final value [s].
    overshoot : float
        ``(max - final) / final`` (fraction, >= 0).
    peak_time : float
        Time of the maximum [s].
    settling : float or None
        From the 50 % crossing to the last exit from the band [s].
    band : float
        The settling band (fraction of the final value).
    initial : float
        The response just after ``t = 0`` as a fraction of the final value.
    error : float
        Stated error of the computed step, as a fraction of the final value.
    window : float
        End of the computed response [s].
    """

    final: float
    t10: float | None
    t90: float | None
    t50: float | None
    overshoot: float
    peak_time: float
    settling: float | None
    band: float
    initial: float
    error: float
    window: float

    @property
    def rise_time(self) -> float | None:
        """10-90 % rise time [s]."""
        if self.t10 is None or self.t90 is None:
            return None
        return self.t90 - self.t10

    @property
    def jumps(self) -> bool:
        """True when the step starts at or beyond 90 % of its final value (no 10-90 % rise)."""
        return self.initial >= 0.9

    def to_dict(self) -> dict:
        return {"final": self.final, "rise_time": self.rise_time, "t10": self.t10,
                "t90": self.t90, "overshoot": self.overshoot, "peak_time": self.peak_time,
                "settling_time": self.settling, "settling_band": self.band,
                "initial_fraction": self.initial, "jumps": self.jumps,
                "inversion_error": self.error, "window": self.window}


def _crossing(t, x, level):
    """First time ``x`` reaches ``level``: the bracketing samples, then the root of the cubic
    through the four samples around them (linear where there are not four)."""
    idx = np.nonzero(x >= level)[0]
    if not idx.size:
        return None
    i = int(idx[0])
    if i == 0:
        return float(t[0])
    return _root_between(t, x, i, level)


def _root_between(t, x, i, level):
    """Where ``x`` passes ``level`` between samples ``i - 1`` and ``i``."""
    a, b = x[i - 1], x[i]
    lin = float(t[i - 1] + (level - a) / (b - a) * (t[i] - t[i - 1]))
    lo, hi = i - 2, i + 2
    if lo < 0 or hi > x.size:
        return lin
    t0, h = t[i - 1], t[i] - t[i - 1]
    u = (t[lo:hi] - t0) / h
    c = np.polyfit(u, x[lo:hi] - level, 3)
    roots = np.roots(c)
    ok = [r.real for r in roots if abs(r.imag) < 1e-9 and -1e-9 <= r.real <= 1 + 1e-9]
    return float(t0 + min(ok, key=lambda r: abs(t0 + r * h - lin)) * h) if ok else lin


def step_figures(step, band: float = 0.02) -> StepFigures | None:
    """Figures of a :class:`~taumatch.chain.model.StepResponse`; None when the final value is
    zero (an AC-coupled chain has no 10-90 % rise)."""
    final = step.final
    if not (math.isfinite(final) and final != 0):
        return None
    t, x = step.t, step.y / final
    k = int(np.argmax(x))
    err = step.error / abs(final)
    over = float(x[k]) - 1.0
    over = over if over > err else 0.0  # within the inversion's error: none to speak of
    t50 = _crossing(t, x, 0.5)
    outside = np.nonzero(np.abs(x - 1.0) > band)[0]
    settling = None
    if t50 is not None:
        if not outside.size:
            settling = 0.0
        elif outside[-1] < x.size - 1:
            j = int(outside[-1])
            level = 1 + band if x[j] > 1 else 1 - band
            settling = max(_root_between(t, x, j + 1, level) - t50, 0.0)
    return StepFigures(final, _crossing(t, x, 0.1), _crossing(t, x, 0.9), t50, over,
                       float(t[k]), settling, band, float(step.jump / final), err,
                       float(t[-1]))

"""Predicted response of a chain: step, square wave or sine, as it is or after the trim.

Closed form from the lti partial fractions of the chain's transfer function (cables as the
ladder of :class:`~taumatch.chain.model.ChainModel`, the section count chosen once per
chain), the source edge included and scaled by the source amplitude:

* ``step``: ``amplitude * step(t)``;
* ``square``: periodic steady state of a square wave from 0 to ``amplitude`` with the
  source's ``period`` (50 % duty), rising at ``t = 0`` (lti closed form; where that
  overflows because some poles are very fast against the period, the sum of closed-form
  steps over as many periods as the slowest pole needs to settle);
* ``sine``: full response (transient included) to ``amplitude * sin(2 pi f t)`` from
  ``t = 0``.

Default time window: the window in which the chain's exact step settles within 2 %
(:attr:`ChainModel.step_window`) for a step, two periods for a square wave, five periods for
a sine.  The lti hand checks (initial and final values, round trip) come with the result.
"""

from __future__ import annotations

import io
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..units import format_quantity

__all__ = ["Prediction", "TrimPrediction", "predict", "trim_prediction"]


@dataclass(frozen=True)
class Prediction:
    """A predicted waveform at the instrument.

    Attributes
    ----------
    name : str
        The chain's name.
    waveform : str
        ``"step"``, ``"square"`` or ``"sine"``.
    amplitude : float
        Source amplitude [V].
    period : float or None
        Square-wave period [s].
    frequency : float or None
        Sine frequency [Hz].
    t, v : ndarray
        Time [s] and voltage at the instrument [V].
    trim : Trim or None
        The trim applied (``trimmed=True``).
    checks : tuple of Check
        The lti hand checks of the transfer function used (times in s).
    sections : int
        Pi sections per cable.
    final_value : float or None
        The level the response settles to [V] (None for a sine: it does not settle).
    """

    name: str
    waveform: str
    amplitude: float
    period: float | None
    frequency: float | None
    t: np.ndarray
    v: np.ndarray
    trim: object
    checks: tuple
    sections: int
    final_value: float | None

    def to_dict(self) -> dict:
        out = {
            "chain": self.name,
            "input": self.waveform,
            "amplitude": self.amplitude,
            "period": self.period,
            "frequency": self.frequency,
            "trimmed": self.trim is not None,
            "points": len(self.t),
            "t_start": float(self.t[0]),
            "t_end": float(self.t[-1]),
            "final_value": self.final_value,
            "max": float(np.max(self.v)),
            "min": float(np.min(self.v)),
            "line_sections": self.sections,
            "checks": [c.to_dict() for c in self.checks],
            "checks_passed": all(c.passed for c in self.checks),
        }
        if self.waveform == "step" and self.final_value:
            out["overshoot"] = float((np.max(self.v) - self.final_value) / abs(self.final_value))
        if self.trim is not None:
            out["trim"] = self.trim.to_dict()
        return out

    def summary(self) -> str:
        what = {"step": "step", "square": f"square wave, period {format_quantity(self.period or 0, 's')}",
                "sine": f"sine {format_quantity(self.frequency or 0, 'Hz')}"}[self.waveform]
        lines = [f"{self.name or 'chain'}: {what}, amplitude {format_quantity(self.amplitude, 'V')}"
                 + (" (after the trim)" if self.trim is not None else "")]
        settles = ("" if self.final_value is None
                   else f", final value {self.final_value:.6g} V")
        lines.append(f"  {len(self.t)} points from {format_quantity(self.t[0], 's')} to "
                     f"{format_quantity(self.t[-1], 's')}; min {self.v.min():.6g} V, "
                     f"max {self.v.max():.6g} V{settles}")
        if self.trim is not None:
            lines.append("  " + self.trim.applied_summary().replace("\n", "\n  "))
        lines.append("  hand checks of the transfer function (times in s):")
        for c in self.checks:
            lines.append("    " + c.line())
        return "\n".join(lines)

    def csv_text(self) -> str:
        """``t_s,v_V`` lines."""
        buf = io.StringIO()
        buf.write("t_s,v_V\n")
        for a, b in zip(self.t, self.v):
            buf.write(f"{a:.12g},{b:.12g}\n")
        return buf.getvalue()

    def plot(self, ax=None):
        """The waveform (see :func:`taumatch.plot.chain.plot_prediction`)."""
        from ..plot.chain import plot_prediction

        return plot_prediction(self, ax=ax)


def _square(h, t, period: float, high: float) -> np.ndarray:
    """Square-wave steady state from 0 to ``high``, the lti closed form."""
    return np.asarray(h.square(t, period, 0.5, 0.0, high), dtype=float)


def predict(chain, waveform: str = "step", frequency: float | None = None, *,
            trimmed: bool = False, points: int = 1000, t_end: float | None = None,
            model=None) -> Prediction:
    """Predict the waveform at the instrument (see the module text).

    Parameters
    ----------
    chain : Chain
    waveform : {"step", "square", "sine"}
    frequency : float, optional
        Sine frequency [Hz] (required for ``"sine"``).
    trimmed : bool
        Apply the trim of the adjustable field first (:func:`taumatch.analysis.trim.trim`).
    points : int
        Number of samples (at least 2).
    t_end : float, optional
        End of the window [s].
    model : ChainModel, optional
        Reuse a model (only when ``trimmed`` is False).
    """
    from ..chain.model import ChainModel

    if waveform not in ("step", "square", "sine"):
        raise InputError(f"input must be step, square or sine, got {waveform!r}")
    if not (isinstance(points, int) and points >= 2):
        raise InputError(f"points must be a whole number of at least 2, got {points!r}")
    if t_end is not None and not t_end > 0:
        raise InputError(f"t_end must be positive, got {t_end!r}")
    src = chain.source
    if waveform == "square" and src.period is None:
        raise InputError(f"{chain.origin}: source: period is required for a square-wave input")
    if waveform == "sine" and not (frequency and frequency > 0):
        raise InputError("sine input needs a positive frequency in Hz (sine:FREQ)")
    tr = None
    if trimmed:
        from .trim import trim

        tr = trim(chain)
        if not tr.reachable or tr.required <= 0:
            from ..errors import ComputationError

            raise ComputationError(
                f"{chain.origin}: part {tr.part} ({tr.kind}) {tr.field}: no positive value "
                f"compensates the chain (it would need about {tr.required:.4g}); change a "
                "fixed part first (taumatch trim says which)"
            )
        chain = chain.with_value(tr.part, tr.field, tr.required)
        model = None
    model = model or ChainModel.from_chain(chain)
    h = model.displayed
    if t_end is None:
        if waveform == "step":
            t_end = model.step_window
        elif waveform == "square":
            t_end = 2 * src.period
        else:
            t_end = 5 / frequency
    t = np.linspace(0.0, t_end, points)
    a = src.amplitude
    if waveform == "step":
        v = a * np.asarray(h.step(t), dtype=float)
        final = a * float(h.dc_gain)
    elif waveform == "square":
        v = _square(h, t, src.period, a)
        final = a * float(h.dc_gain)
    else:
        v = a * np.asarray(h.sine(t, frequency), dtype=float)
        final = None
    checks = tuple(h.checks())
    return Prediction(chain.name, waveform, a, src.period if waveform == "square" else None,
                      frequency if waveform == "sine" else None, t, v, tr, checks,
                      model.sections, final)


@dataclass(frozen=True, eq=False)
class TrimPrediction:
    """A chain's waveform at the instrument as it is and after its trim, on one time base.

    Attributes
    ----------
    name : str
        The chain's name.
    waveform : str
        ``"square"`` (the source's period) or ``"step"`` (a source without one).
    t : ndarray
        Time [s].
    before, after : ndarray
        Voltage at the instrument [V], as it is and after the trim.
    trim : Trim
        The trim applied.
    """

    name: str
    waveform: str
    t: np.ndarray
    before: np.ndarray
    after: np.ndarray
    trim: object

    def to_dict(self) -> dict:
        return {"chain": self.name, "input": self.waveform, "trim": self.trim.to_dict(),
                "times": self.t, "before": self.before, "after": self.after}

    def summary(self) -> str:
        return (f"{self.name or 'chain'}: {self.waveform} response as it is and after the "
                f"trim, {len(self.t)} points to {format_quantity(self.t[-1], 's')}\n  "
                + self.trim.applied_summary())

    def plot(self, ax=None):
        """Both waveforms (see :func:`taumatch.plot.chain.plot_trim_prediction`)."""
        from ..plot.chain import plot_trim_prediction

        return plot_trim_prediction(self, ax=ax)


def trim_prediction(chain, trim=None, *, points: int = 1500) -> TrimPrediction:
    """The square-wave response of ``chain`` (the step when its source has no period) as it
    is and after ``trim`` (default: :func:`taumatch.analysis.trim.trim` of the chain), on
    the first one's time window."""
    if trim is None:
        from .trim import trim as find_trim

        trim = find_trim(chain)
    wave = "square" if chain.source.period is not None else "step"
    trimmed = chain.with_value(trim.part, trim.field, trim.required)
    before = predict(chain, wave, points=points)
    after = predict(trimmed, wave, points=points, t_end=float(before.t[-1]))
    return TrimPrediction(chain.name, wave, before.t, before.v, after.v, trim)

"""Undoing a measured mis-compensation in software (de-embedding).

The fitted divider is H(s) = g·(1 + sτ1)/(1 + sτp) with τ1 = R1·C1 and
τp = (R1‖R2)(C1+C2) (the two-arm model's ``tau_tip`` and ``tau``,
:class:`taumatch.chain.two_arm.TwoArm`); the target is the compensated divider, flat at g.  The correction
C(s) = (1 + sτp)/(1 + sτ1) is causal and stable (its pole −1/τ1 lies in the left half
plane) and removes the low-frequency pole-zero pair exactly.  It is applied as a
recursive filter that is exact for an input that varies linearly between samples
(ramp-invariant discretisation of C(s) = τp/τ1 + (1 − τp/τ1)/(1 + sτ1)).

When the correction boosts high frequencies (τp > τ1: an under-compensated divider),
noise would be amplified by τp/τ1; a first-order roll-off at ``bandwidth`` regularises
it (default: the bandwidth of the measured edge, so the correction never makes the edge
faster than the capture showed).  A periodic capture is extended by its own last
periods before filtering, so the filter starts in steady state.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.signal import lfilter

from .errors import ComputationError, InputError

__all__ = ["Corrected", "Correction", "apply_correction", "correct_capture", "correction_for",
           "lowpass_ramp_invariant"]


@dataclass(frozen=True)
class Correction:
    """The correction filter: zero time constant τp, pole τ1 and optional roll-off (s)."""

    tau_zero: float
    tau_pole: float
    rolloff: float | None = None  # time constant (s) of the regularising pole

    @property
    def hf_gain(self) -> float:
        return self.tau_zero / self.tau_pole

    def rational(self):
        """C(s) as a :class:`~taumatch.lti.Rational`."""
        from .lti import Rational

        H = Rational.from_zpk([-1 / self.tau_zero], [-1 / self.tau_pole], self.tau_zero / self.tau_pole)
        if self.rolloff:
            H = H * Rational.from_zpk([], [-1 / self.rolloff], 1 / self.rolloff)
        return H

    def describe(self) -> str:
        from .units import format_quantity as q

        text = (f"multiplied by (1 + s·{q(self.tau_zero, 's')})/(1 + s·{q(self.tau_pole, 's')}) "
                f"[compensated target over fitted divider]")
        if self.rolloff:
            text += f", roll-off at {q(1 / (2 * math.pi * self.rolloff), 'Hz')} against noise"
        return text


def correction_for(fit, bandwidth: float | None = None, regularise: bool = True) -> Correction:
    """The correction that turns the fitted divider into the compensated one.

    Parameters
    ----------
    fit : taumatch.fit.DividerFit
    bandwidth : float, optional
        Roll-off frequency (Hz) of the regularising pole; default from the fitted edge time
        (0.35/edge), used only when the correction boosts high frequencies.
    regularise : bool
        Set False to apply the bare inverse.
    """
    arms = fit.arms
    tau1, taup = arms.tau_tip, arms.tau
    roll = None
    if regularise and taup > tau1:
        if bandwidth is None:
            edge = fit.estimates["edge_time"].value
            bandwidth = 0.35 / edge if edge > 0 else None
        if bandwidth is not None:
            if not (math.isfinite(bandwidth) and bandwidth > 0):
                raise InputError(f"bandwidth must be positive (Hz), got {bandwidth!r}")
            roll = 1.0 / (2 * math.pi * bandwidth)
    return Correction(taup, tau1, roll)


def lowpass_ramp_invariant(u, dt: float, tau: float, y0: float | None = None) -> np.ndarray:
    """1/(1 + sτ) applied to samples u (interval dt), exact for piecewise-linear input."""
    one_minus_a = -math.expm1(-dt / tau)  # 1 − a without cancellation when dt ≪ τ
    a = 1.0 - one_minus_a
    b0 = 1.0 - tau * one_minus_a / dt
    b1 = one_minus_a - b0
    u = np.asarray(u, dtype=float)
    start = u[0] if y0 is None else y0
    # state for "input and output have been at `start` for ever"
    zi = np.array([start - b0 * start])
    y, _ = lfilter([b0, b1], [1.0, -a], u, zi=zi)
    return y


def apply_correction(t, v, corr: Correction, period: float | None = None) -> np.ndarray:
    """Filter samples v (V) on a uniform time base t (s) by the correction.

    Parameters
    ----------
    t, v : array_like
        The record.
    corr : Correction
    period : float, optional
        Period (s) of a periodic record: the record is extended backwards by its own last
        whole periods so the filter starts in steady state.
    """
    t = np.asarray(t, dtype=float)
    v = np.asarray(v, dtype=float)
    if t.size < 3:
        raise InputError("a record of fewer than 3 samples cannot be corrected")
    dt = float((t[-1] - t[0]) / (t.size - 1))
    if not dt > 0:
        raise InputError("time must increase to correct a record")
    pre = 0
    if period and period > 0:
        n_per = period / dt
        need = 10 * max(corr.tau_pole, corr.tau_zero, corr.rolloff or 0.0) / dt
        k = math.ceil(need / n_per)
        whole = math.floor(t.size / n_per)
        k = min(k, whole)
        if k >= 1:
            # extend backwards by k whole periods taken from the end of the last whole period
            # of the record, so that the extension joins v[0] in phase
            last = round(whole * n_per)
            pre = min(round(k * n_per), last)
            v_ext = np.concatenate([v[last - pre:last], v])
        else:
            v_ext = v
    else:
        v_ext = v
    g = corr.hf_gain
    lp = lowpass_ramp_invariant(v_ext, dt, corr.tau_pole)
    y = g * v_ext + (1.0 - g) * lp
    if corr.rolloff:
        y = lowpass_ramp_invariant(y, dt, corr.rolloff)
    return y[pre:]


def correct_diagnosed(t, v, diagnosis, bandwidth: float | None = None, regularise: bool = True):
    """Correct samples v (V, time base t in s) by what ``diagnosis`` fitted.

    Returns the corrected samples and the :class:`Correction` used; a periodic capture
    is extended by its own whole periods (see :func:`apply_correction`).

    Raises
    ------
    ComputationError
        When the diagnosis found no divider in front of the input (nothing to undo).
    """
    doubt = diagnosis.divider_doubt
    if diagnosis.trim is None and doubt is not None:
        raise ComputationError(f"no correction: {doubt.lines()[0].split(':')[0]} — the capture "
                               "shows no mis-compensation to undo (give tip_r= or chain= if a "
                               "divider is there)")
    corr = correction_for(diagnosis.fit, bandwidth=bandwidth, regularise=regularise)
    period = diagnosis.metrics.period if diagnosis.metrics is not None else None
    return apply_correction(t, v, corr, period=period), corr


def corrected_csv(t, v, y, name: str, diagnosis, corr: Correction, source: str) -> str:
    """CSV text: a header saying what was done, then time, the capture and the corrected samples."""
    import io

    e = diagnosis.hf_dc_error
    f = diagnosis.fit
    header = [
        f"# corrected by taumatch from {source} (channel {name}); the input file is unchanged",
        (f"# verdict before: {diagnosis.verdict}, gain error {100 * e.value:+.3f} % "
         f"± {100 * (e.stderr or 0):.3f} %"),
        f"# {corr.describe()}",
        (f"# fitted tip C {f.c1:.6g} F, shunt C {f.c2:.6g} F, tip R {f.r1:.6g} ohm, "
         f"shunt R {f.r2:.6g} ohm"),
        f"time (s),{name} (V),{name} corrected (V)",
    ]
    buf = io.StringIO()
    buf.write("\n".join(header) + "\n")
    np.savetxt(buf, np.column_stack([t, v, y]), delimiter=",", fmt="%.10g")
    return buf.getvalue()


@dataclass(frozen=True, eq=False)
class Corrected:
    """A capture's channel and the same samples with the fitted mis-compensation undone.

    Attributes
    ----------
    t, v, y : ndarray
        Time [s], the capture and the corrected samples [V].
    channel : str
    correction : Correction
    diagnosis : Diagnosis
        What the correction undoes.
    source : str
        Where the capture came from (for the corrected file's header).
    notes : tuple of str
        What reading the capture noticed.
    """

    t: np.ndarray
    v: np.ndarray
    y: np.ndarray
    channel: str
    correction: Correction
    diagnosis: object
    source: str = ""
    notes: tuple = ()

    def to_dict(self) -> dict:
        d, corr = self.diagnosis, self.correction
        e = d.hf_dc_error
        return {"channel": self.channel, "verdict_before": d.verdict,
                "hf_dc_error_before": {"value": e.value, "stderr": e.stderr},
                "correction": {"zero_time_constant": corr.tau_zero,
                               "pole_time_constant": corr.tau_pole,
                               "rolloff_time_constant": corr.rolloff, "hf_gain": corr.hf_gain},
                "samples": int(self.t.size), "warnings": list(d.warnings),
                "capture_notes": list(self.notes)}

    def summary(self) -> str:
        """The samples and the filter, then the capture's notes."""
        return "\n".join([f"{self.t.size} samples, {self.correction.describe()}",
                          *(f"note: {line}" for line in self.notes)])

    def csv_text(self) -> str:
        """The corrected file (:func:`corrected_csv`)."""
        return corrected_csv(self.t, self.v, self.y, self.channel, self.diagnosis,
                             self.correction, self.source)

    @property
    def shown(self) -> int:
        """Samples the picture shows: two and a half periods of a periodic capture."""
        m = self.diagnosis.metrics
        period = m.period if m is not None else None
        t = self.t
        return min(t.size, int(2.5 * period / (t[1] - t[0]))) if period else t.size

    def plot(self, ax=None):
        """The capture and the corrected samples over :attr:`shown`; returns ``(fig, ax)``."""
        from .plot.response import plot_time_response

        n = self.shown
        fig, ax = plot_time_response(self.t[:n], self.v[:n], ax=ax, label="capture",
                                     ylabel="volts")
        plot_time_response(self.t[:n], self.y[:n], ax=ax, label="corrected", ylabel="volts",
                           title=f"software correction ({self.diagnosis.verdict} before)")
        return fig, ax


def correct_capture(capture, diagnosis, channel: str | None = None, *,
                    bandwidth: float | None = None, regularise: bool = True,
                    source: str | None = None) -> Corrected:
    """Correct a capture's channel by what ``diagnosis`` fitted to it.

    Parameters
    ----------
    capture : taumatch.capture.Capture
    diagnosis : taumatch.diagnosis.Diagnosis
    channel : str, optional
        The channel diagnosed (default: as :meth:`Capture.channel_name` picks it).
    bandwidth : float, optional
        Roll-off of the noise regularisation [Hz] (:func:`correction_for`).
    regularise : bool
    source : str, optional
        Where the capture came from, for the corrected file's header (default: the
        capture's own source).
    """
    name = capture.channel_name(channel)
    t = np.asarray(capture.time, dtype=float)
    v = np.asarray(capture.channels[name], dtype=float)
    y, corr = correct_diagnosed(t, v, diagnosis, bandwidth=bandwidth, regularise=regularise)
    return Corrected(t, v, y, name, corr, diagnosis,
                     str(source if source is not None else capture.source or ""),
                     tuple(capture.notes))

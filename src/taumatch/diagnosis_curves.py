"""What the picture of a diagnosis draws, computed here so that :mod:`taumatch.plot` only
draws: the averaged capture with the fitted and the trimmed model on the same times, the
window of the leading corner, and the fitted probe's frequency response as found and as
trimmed over the band of its transition.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["DiagnosisCurves", "bode_band", "corner_window", "diagnosis_curves"]


@dataclass(frozen=True, eq=False)
class DiagnosisCurves:
    """The curves of a diagnosis's picture (SI units).

    Attributes
    ----------
    t, v : ndarray
        The averaged period: times from the rising edge [s] and the capture [V].
    fitted : ndarray
        The fitted divider's periodic response at ``t`` [V].
    after : ndarray or None
        The response predicted after the trim [V] (None without a trim).
    corner : (float, float)
        Window of the leading corner [s] (:func:`corner_window`).
    plateau_from : float
        Time [s] after which the corner's curves set the plateau's vertical scale (past the
        source edge's own swing).
    f : ndarray
        Frequencies of the probe's response [Hz] (:func:`bode_band`).
    found, trimmed : ndarray, ndarray or None
        The fitted probe's response against its DC gain (complex), as found and as trimmed
        (None without a trim).
    headline : str
        The verdict and the gain error in words, the period panel's title.
    """

    t: np.ndarray
    v: np.ndarray
    fitted: np.ndarray
    after: np.ndarray | None
    corner: tuple
    plateau_from: float
    f: np.ndarray
    found: np.ndarray
    trimmed: np.ndarray | None
    headline: str


def corner_window(d, t) -> tuple:
    """Time window (s) of the leading corner of diagnosis ``d`` on times ``t`` (s from the
    rising edge): from just before the rising edge to three divider time constants after it,
    at most half the period."""
    t = np.asarray(t, dtype=float)
    tau = d.fit.estimates["time_constant"].value
    half = 0.5 * (t[-1] - t[0])
    end = min(3 * tau, half) if np.isfinite(tau) and tau > 0 else half / 4
    edge = max(d.fit.estimates["edge_time"].value, 0.0)
    return -max(2 * edge, end / 40), end


def bode_band(d) -> np.ndarray:
    """Frequencies (Hz) that show the divider's transition: a decade and a half either side
    of 1/(2π τ), τ the divider's time constant."""
    tau = d.fit.estimates["time_constant"].value
    fc = 1.0 / (2 * np.pi * tau)
    return np.logspace(np.log10(fc / 30), np.log10(fc * 30), 300)


def _headline(d) -> str:
    e = d.hf_dc_error
    band = f", within ±{100 * d.band:.2g} %" if d.verdict in ("compensated", "no divider") else ""
    return f"{d.verdict}: gain error {100 * e.value:+.2f} % ± {100 * (e.stderr or 0):.2f} %{band}"


def _response(d, f, trimmed: bool) -> np.ndarray:
    H = d.fit.transfer(trimmed=trimmed, edge=False)
    return H.freqresp(f) / H.dc_gain


def diagnosis_curves(d) -> DiagnosisCurves:
    """The curves of :class:`~taumatch.diagnosis.Diagnosis` ``d``'s picture."""
    fit = d.fit
    t, v = np.asarray(fit.t, dtype=float), np.asarray(fit.v, dtype=float)
    trim = d.trim is not None                        # no trim, no prediction
    lo, hi = corner_window(d, t)
    edge = max(fit.estimates["edge_time"].value, 0.0)
    f = bode_band(d)
    return DiagnosisCurves(
        t, v, fit.model(t), fit.model(t, trimmed=True) if trim else None, (lo, hi),
        max(4 * edge, hi / 50), f, _response(d, f, False),
        _response(d, f, True) if trim else None, _headline(d))

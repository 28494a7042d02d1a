"""Initial guesses for the divider fit from the averaged period itself.

On each plateau a first-order divider's periodic response is exactly a + b·e^(−t/τ)
with one τ for both halves, whatever the period.  A grid over τ with a linear least
squares for (a, b) per plateau (separable least squares) gives τ, the asymptotes and
the jump at the edges without any iteration.

Whether the tail is seen at all is a question of its own: on flat plateaus any τ fits
about as well as any other (a time constant of many periods turns the exponential into a
straight line through the quantisation steps), so the guess also reports how much the
exponential lowers the plateaus' residual sum of squares against flat plateaus
(``tail_rss``, V²·samples); the caller weighs that against the noise.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["PlateauGuess", "plateau_guess"]


@dataclass(frozen=True)
class PlateauGuess:
    tau: float          # s, common time constant of both plateaus
    high: float         # V, asymptote of the upper plateau
    low: float          # V, asymptote of the lower plateau
    jump: float         # V, step at the rising edge (extrapolated plateau values)
    residual: float     # V rms of the plateau fit
    tau_at_bound: bool  # the best τ lies at the edge of the grid (τ poorly defined)
    tail_rss: float = 0.0  # V²·samples: residual sum of squares removed by the tail
    flat_high: float = float("nan")  # V, mean of the upper plateau (flat reading)
    flat_low: float = float("nan")   # V, mean of the lower plateau


def _fit_exp(t, v, tau):
    """Least squares of v ≈ a + b·e^(−t/τ) for each τ in ``tau`` (vectorised normal equations).

    Returns the coefficients (a, b) and the residual sum of squares, one per τ.
    """
    tau = np.atleast_1d(np.asarray(tau, dtype=float))
    e = np.exp(-t[:, None] / tau[None, :])
    n = t.size
    s1 = e.sum(axis=0)
    s2 = (e * e).sum(axis=0)
    sv = v.sum()
    sve = v @ e
    svv = v @ v
    det = n * s2 - s1 * s1
    det = np.where(np.abs(det) > 1e-300, det, np.nan)
    a = (s2 * sv - s1 * sve) / det
    b = (n * sve - s1 * sv) / det
    rss = svv - a * sv - b * sve
    return a, b, np.maximum(rss, 0.0)


def _decimate(t, v, max_points=4000):
    """Block means (and the block length k) of at most ``max_points`` points."""
    k = int(np.ceil(t.size / max_points))
    if k <= 1:
        return t, v, 1
    m = t.size // k * k
    return t[:m].reshape(-1, k).mean(axis=1), v[:m].reshape(-1, k).mean(axis=1), k


def plateau_guess(t, v, period: float, duty: float, skip: float) -> PlateauGuess:
    """Fit a + b·e^(−t/τ) to both plateaus of one period rising at t = 0.

    Parameters
    ----------
    t, v : array_like
        One period (s, V), rising edge at t = 0 (times may start before 0).
    period, duty : float
        Period (s) and high fraction.
    skip : float
        Time (s) after each edge left out (edge and fast parasitics).
    """
    t = np.asarray(t, dtype=float)
    v = np.asarray(v, dtype=float)
    tm = np.mod(t, period)
    td = duty * period
    hi = (tm > skip) & (tm < td - 0.02 * period)
    lo = (tm > td + skip) & (tm < period - 0.02 * period)
    th, vh, kh = _decimate(tm[hi], v[hi])
    tl, vl, kl = _decimate(tm[lo] - td, v[lo])
    if th.size < 5 or tl.size < 5:
        raise ValueError("plateaus too short to fit")
    taus = np.geomspace(period * 1e-4, period * 1e2, 121)
    total = _fit_exp(th, vh, taus)[2] + _fit_exp(tl, vl, taus)[2]
    total = np.where(np.isfinite(total), total, np.inf)
    k = int(np.argmin(total))
    # refine τ by a golden-section search between the grid neighbours (on log τ)
    a, b = np.log(taus[max(k - 1, 0)]), np.log(taus[min(k + 1, taus.size - 1)])

    def cost(x):
        tau_ = np.exp(x)
        return float(_fit_exp(th, vh, tau_)[2][0] + _fit_exp(tl, vl, tau_)[2][0])

    for _ in range(40):
        m1, m2 = a + 0.382 * (b - a), a + 0.618 * (b - a)
        if cost(m1) < cost(m2):
            b = m2
        else:
            a = m1
    tau = float(np.exp(0.5 * (a + b)))
    ah, bh, rh = (x[0] for x in _fit_exp(th, vh, tau))
    al, bl, rl = (x[0] for x in _fit_exp(tl, vl, tau))
    flat = float(np.sum((vh - vh.mean()) ** 2) * kh + np.sum((vl - vl.mean()) ** 2) * kl)
    v0_plus = ah + bh
    v0_minus = al + bl * np.exp(-(period - td) / tau)
    return PlateauGuess(
        tau=float(tau), high=float(ah), low=float(al), jump=float(v0_plus - v0_minus),
        # block means carry 1/√k of the sample noise: scale back to one sample
        residual=float(np.sqrt((rh * kh + rl * kl) / (th.size + tl.size))),
        tau_at_bound=bool(k in (0, taus.size - 1)),
        tail_rss=max(flat - float(rh * kh + rl * kl), 0.0),
        flat_high=float(vh.mean()), flat_low=float(vl.mean()),
    )

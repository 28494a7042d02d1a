"""Initial guesses for the divider fit from the averaged period itself.

On each plateau a first-order divider's periodic response is exactly a + b·e^(−t/τ)
with one τ for both halves, whatever the period.  A grid over τ with a linear least
squares for (a, b) per plateau (separable least squares) gives τ, the asymptotes and
the jump at the edges without any iteration.
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


def _fit_exp(t, v, tau):
    e = np.exp(-t / tau)
    A = np.column_stack([np.ones_like(t), e])
    coef, *_ = np.linalg.lstsq(A, v, rcond=None)
    r = v - A @ coef
    return coef, float(r @ r)


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
    th, vh = tm[hi], v[hi]
    tl, vl = tm[lo] - td, v[lo]
    if th.size < 5 or tl.size < 5:
        raise ValueError("plateaus too short to fit")
    taus = np.geomspace(period * 1e-4, period * 1e2, 161)
    best = None
    for tau in taus:
        ch, rh = _fit_exp(th, vh, tau)
        cl, rl = _fit_exp(tl, vl, tau)
        tot = rh + rl
        if best is None or tot < best[0]:
            best = (tot, tau, ch, cl)
    tot, tau, ch, cl = best
    # refine τ by a golden-section search between the grid neighbours
    k = int(np.argmin(np.abs(taus - tau)))
    a, b = taus[max(k - 1, 0)], taus[min(k + 1, taus.size - 1)]
    for _ in range(40):
        m1, m2 = a + 0.382 * (b - a), a + 0.618 * (b - a)
        f1 = _fit_exp(th, vh, m1)[1] + _fit_exp(tl, vl, m1)[1]
        f2 = _fit_exp(th, vh, m2)[1] + _fit_exp(tl, vl, m2)[1]
        if f1 < f2:
            b = m2
        else:
            a = m1
    tau = 0.5 * (a + b)
    ch, rh = _fit_exp(th, vh, tau)
    cl, rl = _fit_exp(tl, vl, tau)
    v0_plus = ch[0] + ch[1]
    v0_minus = cl[0] + cl[1] * np.exp(-(period - td) / tau)
    return PlateauGuess(
        tau=float(tau), high=float(ch[0]), low=float(cl[0]), jump=float(v0_plus - v0_minus),
        residual=float(np.sqrt((rh + rl) / (th.size + tl.size))),
        tau_at_bound=bool(k in (0, taus.size - 1)),
    )

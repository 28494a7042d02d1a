"""Time responses by inverting partial fractions in closed form, evaluated with numpy.

Every response is Y(s) = H(s)·U(s) expanded into partial fractions; each term
K/(s − p)^k becomes K·t^(k−1)/(k−1)!·e^(p·t) for t ≥ 0.  A conjugate pair is
evaluated once, as twice the real part of its upper member.  The square-wave
steady state sums the shifted step responses of all past edges per pole as a
geometric series (closed form), so a pole much slower than the period costs the
same as a fast one.
"""

from __future__ import annotations

import math
from math import comb, factorial

import numpy as np

from ..errors import InputError
from .rational import Rational

__all__ = ["evaluate_terms", "impulse", "ramp", "sine", "square", "step"]


def _times(t) -> np.ndarray:
    t = np.asarray(t, dtype=float)
    if not np.all(np.isfinite(t)):
        raise InputError("times must be finite numbers")
    return t


def evaluate_terms(terms, t) -> np.ndarray:
    """Σ K·t^(k−1)/(k−1)!·e^(p t) over the terms, for t ≥ 0 (0 for t < 0); real result."""
    t = _times(t)
    out = np.zeros(t.shape, dtype=float)
    pos = t >= 0
    tp = t[pos]
    if tp.size == 0:
        return out
    acc = np.zeros(tp.shape, dtype=float)
    groups: dict = {}
    for term in terms:
        groups.setdefault(term.pole, []).append(term)
    powers_cache: dict = {}
    for p, ts in groups.items():
        if p.imag < 0:
            continue  # its upper partner carries twice the real part
        if p.imag == 0:
            e = np.exp(p.real * tp)
            poly = np.zeros(tp.shape)
            for term in ts:
                k = term.order
                coef = term.coefficient.real / factorial(k - 1)
                poly += coef * _power(tp, k - 1, powers_cache)
            acc += poly * e
        else:
            e = np.exp(p * tp)
            poly = np.zeros(tp.shape, dtype=complex)
            for term in ts:
                k = term.order
                poly += (term.coefficient / factorial(k - 1)) * _power(tp, k - 1, powers_cache)
            acc += 2.0 * (poly * e).real
    out[pos] = acc
    return out


def _power(t, n, cache):
    if n == 0:
        return 1.0
    if n not in cache:
        cache[n] = t**n
    return cache[n]


def impulse(H: Rational, t) -> np.ndarray:
    """Regular part of the impulse response h(t); δ-terms are in ``H.partial_fractions().direct``."""
    return evaluate_terms(H.partial_fractions().terms, t)


def step(H: Rational, t) -> np.ndarray:
    """Unit-step response; for an improper H the δ-terms are left out (see ``partial_fractions``)."""
    return evaluate_terms(H.step_fractions.terms, t)


def ramp(H: Rational, t) -> np.ndarray:
    """Response to t·u(t)."""
    return evaluate_terms((H * Rational([], [0.0, 0.0], 1.0)).partial_fractions().terms, t)


def sine_input(frequency: float, phase: float = 0.0) -> Rational:
    """Laplace transform of sin(ωt + φ)·u(t): (s·sin φ + ω·cos φ)/(s² + ω²)."""
    if not (math.isfinite(frequency) and frequency > 0):
        raise InputError(f"sine frequency must be positive (Hz), got {frequency!r}")
    w = 2 * math.pi * frequency
    sp, cp = math.sin(phase), math.cos(phase)
    poles = [1j * w, -1j * w]
    if abs(sp) < 1e-15:
        return Rational([], poles, w * cp)
    return Rational([-w * cp / sp], poles, sp)


def sine(H: Rational, t, frequency: float, phase: float = 0.0) -> np.ndarray:
    """Full response (transient and steady state) to sin(2π f t + phase)·u(t)."""
    return evaluate_terms((H * sine_input(frequency, phase)).partial_fractions().terms, t)


def _eulerian_poly(i: int, x):
    """A_i(x) = Σ_k E(i,k) x^k, so that Σ_{n≥0} n^i x^n = x·A_i(x)/(1−x)^(i+1) for i ≥ 1."""
    total = 0
    for k in range(i):
        e = sum((-1) ** l * comb(i + 1, l) * (k + 1 - l) ** i for l in range(k + 1))
        total = total + e * x**k
    return total


def _periodic_sum(term_groups, t, period):
    """S(t) = Σ_{n≥0} Σ_terms f(t + n·T) for t ≥ 0, closed form per pole."""
    out = np.zeros(t.shape, dtype=float)
    for p, ts in term_groups.items():
        if p.imag < 0:
            continue
        factor = 1.0 if p.imag == 0 else 2.0
        pT = p * period
        one_minus_x = -np.expm1(pT)
        x = np.exp(pT)
        e = np.exp(p * t)
        acc = np.zeros(t.shape, dtype=complex)
        for term in ts:
            j = term.order - 1
            coef = term.coefficient / factorial(j)
            # Σ_n (t + nT)^j x^n = Σ_i C(j,i) t^(j−i) T^i Li_{−i}(x)
            inner = np.zeros(t.shape, dtype=complex)
            for i in range(j + 1):
                if i == 0:
                    li = 1.0 / one_minus_x
                else:
                    li = x * _eulerian_poly(i, x) / one_minus_x ** (i + 1)
                inner += comb(j, i) * t ** (j - i) * period**i * li
            acc += coef * inner
        out += factor * (acc * e).real
    return out


def square(H: Rational, t, period: float, duty: float = 0.5, low: float = 0.0,
           high: float = 1.0) -> np.ndarray:
    """Periodic steady-state response to a square wave (closed form).

    The input is ``high`` on [0, duty·period) and ``low`` on [duty·period, period), repeated
    for ever; the result is the response after all transients of the start-up have died.

    Parameters
    ----------
    H : Rational
        A stable, proper transfer function.
    t : array_like
        Times in s (any real values; the response is periodic).
    period : float
        Period in s.
    duty : float
        Fraction of the period at the high level, 0 < duty < 1.
    low, high : float
        Input levels in V.
    """
    t = _times(t)
    if not (math.isfinite(period) and period > 0):
        raise InputError(f"square-wave period must be positive (s), got {period!r}")
    if not (0 < duty < 1):
        raise InputError(f"square-wave duty must lie between 0 and 1, got {duty!r}")
    if not H.is_stable:
        raise InputError("a square-wave steady state needs a stable system (all poles in the left half plane)")
    if not H.is_proper:
        raise InputError("a square-wave response needs a proper transfer function")
    dc = H.dc_gain
    pf = H.step_fractions
    groups: dict = {}
    for term in pf.terms:
        if term.pole == 0:
            continue  # the constant H(0): handled as the dc part
        groups.setdefault(term.pole, []).append(term)
    tm = np.mod(t, period)
    high_part = tm < duty * period
    td = duty * period
    # falling edges: the one at td in this period (if passed) or td − T (previous period)
    shift = np.where(high_part, tm - td + period, tm - td)
    simple = all(len(ts) == 1 and ts[0].order == 1 for ts in groups.values())
    if simple:
        q = np.zeros(tm.shape, dtype=float)
        n0T = np.where(high_part, period, 0.0)
        for p, ts in groups.items():
            if p.imag < 0:
                continue
            factor = 1.0 if p.imag == 0 else 2.0
            K = ts[0].coefficient
            if p.imag == 0:  # real arithmetic for real poles
                p, K = p.real, K.real
            # K [e^{pt} − e^{p(t − td + n0T)}]/(1 − x); both exponents are ≤ 0 in real part.
            # Where the two are close, e^{pt}·(−expm1(p(n0T − td))) keeps the digits.
            arg = p * (n0T - td)
            small = np.abs(arg) < 1.0
            e1 = np.exp(p * tm)
            diff_close = -e1 * np.expm1(np.where(small, arg, 0.0))
            diff_far = e1 - np.exp(p * (tm - td + n0T))
            diff = np.where(small, diff_close, diff_far)
            q += factor * np.real(K * diff / -np.expm1(p * period))
    else:
        q = _periodic_sum(groups, tm, period) - _periodic_sum(groups, shift, period)
    q = q + np.where(high_part, dc, 0.0)
    return low * dc + (high - low) * q

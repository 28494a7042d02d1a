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

from ..errors import ComputationError, InputError
from .partial_fractions import CoefficientOverflow
from .rational import Rational

__all__ = ["MAX_PHASE", "ROUNDING", "evaluate_terms", "impulse", "inverse", "ramp", "sine", "square", "step"]


#: Largest phase ω·t (rad) at which an undamped oscillation is still evaluated: its rounding
#: (ω·t·2.2e-16) then stays below 1e-4 rad.
MAX_PHASE = 1e12


#: Rounding of a sum of terms, relative to the sum of their magnitudes.
ROUNDING = 16 * np.finfo(float).eps
#: Highest pole order of the square-wave closed form (its sums over past edges).
MAX_SQUARE_ORDER = 20


def _times(t) -> np.ndarray:
    t = np.asarray(t, dtype=float)
    if not np.all(np.isfinite(t)):
        raise InputError("times must be finite numbers")
    return t


def evaluate_terms(terms, t, with_bound: bool = False):
    """Σ K·t^(k−1)/(k−1)!·e^(p t) over the terms, for t ≥ 0 (0 for t < 0); real result.

    A term of order k ≥ 2 is evaluated as exp((k−1)·ln t − ln (k−1)! + Re p·t), so neither the
    power nor the factorial overflows where the exponential has decayed (any order, any t):
    a decaying response is 0 at t = 1e308, not nan.  Raises ComputationError where a term
    exceeds the float range (a growing response) or where the phase of an oscillation that
    still matters can no longer be resolved in double precision (ω·t > MAX_PHASE).

    With ``with_bound``, also returns the rounding bound of each value: ROUNDING times the
    sum of the magnitudes of the terms at that time (what their cancellation can leave).
    """
    t = _times(t)
    out = np.zeros(t.shape, dtype=float)
    bound = np.zeros(t.shape, dtype=float)
    pos = t >= 0
    tp = t[pos]
    if tp.size == 0:
        return (out, bound) if with_bound else out
    acc = np.zeros(tp.shape, dtype=float)
    size = np.zeros(tp.shape, dtype=float)  # Σ |term|, to judge which terms matter
    unresolved = []
    groups: dict = {}
    for term in terms:
        groups.setdefault(term.pole, []).append(term)
    with np.errstate(over="ignore", under="ignore", divide="ignore", invalid="ignore"):
        log_t = np.log(tp)
        for p, ts in groups.items():
            if p.imag < 0:
                continue  # its upper partner carries twice the real part
            factor = 1.0 if p.imag == 0 else 2.0
            phase = p.imag * tp
            rot = np.exp(1j * phase) if p.imag != 0 else 1.0
            for term in ts:
                k, K = term.order, term.coefficient
                if k == 1:
                    mag = np.exp(p.real * tp)
                else:
                    mag = np.exp((k - 1) * log_t - math.lgamma(k) + p.real * tp)
                    mag = np.where(tp == 0, 0.0, mag)
                if p.imag:
                    value = np.where(mag > 0, factor * np.real(K * rot) * mag, 0.0)
                else:
                    value = K.real * mag
                if not np.all(np.isfinite(value)):
                    where = float(tp[~np.isfinite(value)][0])
                    raise ComputationError(
                        f"the response exceeds the float range at t = {where:.4g} s (the term "
                        f"of order {k} at the pole {_c(p)} rad/s grows without bound)")
                acc += value
                size += factor * abs(K) * mag
                if p.imag:
                    unresolved.append((np.abs(phase) > MAX_PHASE, factor * abs(K) * mag, p))
    for bad, mag, p in unresolved:
        matters = bad & (mag > 1e-12 * size)
        if np.any(matters):
            where = float(tp[matters][0])
            raise ComputationError(
                f"at t = {where:.4g} s the phase of the oscillation at {abs(p.imag):.4g} rad/s "
                f"(ω·t > {MAX_PHASE:g} rad) cannot be resolved in double precision, and it has not "
                "decayed; ask for earlier times")
    out[pos] = acc
    with np.errstate(over="ignore"):
        bound[pos] = ROUNDING * size
    _check_finite(out, bound, t)
    return (out, bound) if with_bound else out


def _c(z: complex) -> str:
    return f"{z.real:.4g}" if z.imag == 0 else f"{z.real:.4g}{z.imag:+.4g}j"


def inverse(Y: Rational, t, with_bound: bool = False):
    """y(t) = L⁻¹[Y](t) for t ≥ 0 (regular part: δ-terms of an improper Y are left out).

    Where the partial fractions of Y do not fit a float in physical units (a pole of high
    order at high frequency), Y is expanded in x = s/w instead: y(t) = w·yₙ(w·t) exactly.
    With ``with_bound``, returns the rounding bound of each value as well (see
    :func:`evaluate_terms`).
    """
    t = _times(t)
    try:
        return evaluate_terms(Y.partial_fractions().terms, t, with_bound)
    except CoefficientOverflow:
        pass
    w = Y.scale
    with np.errstate(over="ignore"):
        tau = np.minimum(t * w, 1e300)
    got = evaluate_terms(Y.normalized(w).partial_fractions().terms, tau, True)
    with np.errstate(over="ignore"):
        y, bound = w * got[0], w * got[1]
    _check_finite(y, bound, t)
    return (y, bound) if with_bound else y


def _check_finite(y, bound, t) -> None:
    bad = ~(np.isfinite(y) & np.isfinite(bound))
    if np.any(bad):
        raise ComputationError(f"the response or its rounding exceeds the float range at t = "
                               f"{float(np.asarray(t)[bad][0]):.4g} s")


def impulse(H: Rational, t) -> np.ndarray:
    """Regular part of the impulse response h(t); δ-terms are in ``H.partial_fractions().direct``."""
    return inverse(H, t)


def step(H: Rational, t) -> np.ndarray:
    """Unit-step response; for an improper H the δ-terms are left out (see ``partial_fractions``)."""
    try:
        terms = H.step_fractions.terms
    except CoefficientOverflow:
        return inverse(H * Rational([], [0.0], 1.0), t)
    return evaluate_terms(terms, t)


def ramp(H: Rational, t) -> np.ndarray:
    """Response to t·u(t)."""
    return inverse(H * Rational([], [0.0, 0.0], 1.0), t)


def sine_input(frequency: float, phase: float = 0.0) -> Rational:
    """Laplace transform of sin(ωt + φ)·u(t): (s·sin φ + ω·cos φ)/(s² + ω²)."""
    if not (math.isfinite(frequency) and 1e-300 <= frequency <= 1e299):
        raise InputError(f"sine frequency must lie between 1e-300 and 1e299 Hz, got {frequency!r}")
    w = 2 * math.pi * frequency
    sp, cp = math.sin(phase), math.cos(phase)
    poles = [1j * w, -1j * w]
    if abs(sp) < 1e-15:
        return Rational([], poles, w * cp)
    return Rational([-w * cp / sp], poles, sp)


def sine(H: Rational, t, frequency: float, phase: float = 0.0) -> np.ndarray:
    """Full response (transient and steady state) to sin(2π f t + phase)·u(t)."""
    return inverse(H * sine_input(frequency, phase), t)


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
    worst = max((term.order for term in pf.terms), default=1)
    if worst > MAX_SQUARE_ORDER:
        raise InputError(f"a square-wave steady state is computed for poles of order up to "
                         f"{MAX_SQUARE_ORDER}; this function has a pole of order {worst}")
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

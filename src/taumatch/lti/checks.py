"""The sanity checks an engineer does by hand on an inverse Laplace transform.

Each check compares two numbers obtained by different routes: the initial-value
theorem (lim s·Y(s), s → ∞) against y(0+) of the closed-form time function, the
final-value theorem (lim s·Y(s), s → 0) against y(t) late in time, the DC gain
against the partial-fraction sum at s = 0, and the partial fractions against H
itself on the imaginary axis (the round trip).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

__all__ = ["Check", "checks"]


@dataclass(frozen=True)
class Check:
    """One hand check: name, pass/fail and the two numbers compared."""

    name: str
    passed: bool
    expected: object
    got: object
    detail: str = ""

    def to_dict(self) -> dict:
        return {"name": self.name, "passed": self.passed, "expected": self.expected,
                "got": self.got, "detail": self.detail}

    def line(self) -> str:
        mark = "ok  " if self.passed else "FAIL"
        return f"{mark} {self.name}: expected {_fmt(self.expected)}, got {_fmt(self.got)}" + (
            f" ({self.detail})" if self.detail else "")


def _fmt(v) -> str:
    if isinstance(v, (float, np.floating)):
        return f"{v:.9g}"
    if isinstance(v, complex):
        return f"{v.real:.6g}{v.imag:+.6g}j"
    return str(v)


def _close(a: float, b: float, rtol: float, scale: float) -> bool:
    if math.isinf(a) or math.isinf(b):
        return a == b
    return abs(a - b) <= rtol * max(abs(a), abs(b), scale)


def checks(H, merge_tol: float | None = None, rtol: float = 1e-8) -> list:
    """Run the hand checks on H and its step response.

    Parameters
    ----------
    H : Rational
    merge_tol : float, optional
        Passed to the partial-fraction expansion.
    rtol : float
        Relative tolerance of each comparison.

    Returns
    -------
    list of Check
    """
    from .rational import Rational
    from .responses import evaluate_terms

    out = []
    if H.gain == 0:
        return [Check("zero function", True, 0.0, 0.0)]
    pf = H.partial_fractions(merge_tol)
    scale = max(abs(H.dc_gain) if math.isfinite(H.dc_gain) else 0.0,
                abs(H.hf_gain) if math.isfinite(H.hf_gain) else 0.0, 1e-300)
    # stability
    max_re = float(np.max(H.poles.real)) if H.poles.size else -math.inf
    out.append(Check("stability", H.is_stable, "every pole Re(p) < 0",
                     max_re, "largest real part of a pole"))
    # DC gain two ways
    if math.isfinite(H.dc_gain):
        via_pf = float(np.real(pf(np.array(0.0))))
        dc_size = sum(abs(t.coefficient) / max(abs(t.pole), 1e-300) ** t.order for t in pf.terms)
        dc_size += abs(pf.direct[-1]) if pf.direct.size else 0.0
        out.append(Check("DC gain: H(0) vs partial fractions at s=0",
                         _close(H.dc_gain, via_pf, rtol, max(scale, 1e-6 * dc_size)),
                         H.dc_gain, via_pf))
    # step: initial and final value theorems
    step_pf = (H * Rational([], [0.0], 1.0)).partial_fractions(merge_tol)
    # sums of terms can only be as exact as the terms are large: compare on that scale
    step_size = sum(abs(t.coefficient) for t in step_pf.terms)
    imp_size = sum(abs(t.coefficient) for t in pf.terms)
    if H.is_proper:
        y0 = float(evaluate_terms(step_pf.terms, np.array([0.0]))[0])
        out.append(Check("initial value: lim s->inf H(s) vs step y(0+)",
                         _close(H.hf_gain, y0, rtol, max(scale, step_size)), H.hf_gain, y0))
    if H.is_strictly_proper:
        imp0 = float(evaluate_terms(pf.terms, np.array([0.0]))[0])
        s_big = _lim_sH(H)
        out.append(Check("initial value: lim s->inf s*H(s) vs impulse h(0+)",
                         _close(s_big, imp0, rtol, max(abs(s_big), imp_size)), s_big, imp0))
    if H.is_stable and H.poles.size:
        slow = float(np.min(-H.poles.real))
        t_late = 40.0 / slow
        y_inf = float(evaluate_terms(step_pf.terms, np.array([t_late]))[0])
        out.append(Check("final value: H(0) vs step y(t) at 40 slowest time constants",
                         _close(H.dc_gain, y_inf, max(rtol, 1e-12), max(scale, 1e-6 * step_size)), H.dc_gain, y_inf,
                         f"t = 40/min|Re p| = {t_late:.4g} in the time unit of H"))
    elif not H.is_stable:
        out.append(Check("final value theorem", True, "not applicable", "unstable or marginal",
                         "the final-value theorem holds only for a stable system"))
    # round trip on the imaginary axis around every pole and zero magnitude
    pm = np.abs(H.poles[H.poles != 0])
    mags = np.abs(np.concatenate([H.poles, H.zeros]))
    mags = mags[mags > 0]
    if mags.size == 0:
        mags = np.array([1.0])
    if pm.size:
        mags = np.clip(mags, pm.min() * 1e-3, pm.max() * 1e3)
    w = np.unique(np.concatenate([np.geomspace(mags.min() / 10, mags.max() * 10, 60), mags * 1.37]))
    s = 1j * w
    h = H(s)
    g = pf(s)
    err = float(np.max(np.abs(g - h) / np.maximum(np.abs(h), 1e-300 + 1e-6 * np.max(np.abs(h)))))
    out.append(Check("round trip: partial fractions vs H(jw)", err <= max(rtol, 1e-9) * 100, 0.0, err,
                     f"largest relative difference over {w.size} frequencies"))
    for m in pf.merges:
        out.append(Check("pole cluster merged", True, f"{m.multiplicity} poles near {m.center:.6g}",
                         m.spread, "relative spread; indistinguishable from a multiple pole at "
                         "working precision, so treated as one"))
    if H.cancelled:
        out.append(Check("pole-zero cancellation", True, "cancelled pairs", H.cancelled,
                         "coincident pole and zero removed"))
    return out


def _lim_sH(H) -> float:
    """lim s·H(s) as s → ∞ for a strictly proper H."""
    if H.zeros.size < H.poles.size - 1:
        return 0.0
    return H.gain * H.w0

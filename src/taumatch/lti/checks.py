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

from .responses import ROUNDING

__all__ = ["Check", "checks", "expression_check"]


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


#: Rounding of a sum of terms of total size Σ|K| is taken as NOISE·Σ|K|.
NOISE = ROUNDING
#: A comparison whose rounding is above this fraction of the values compared cannot confirm
#: anything: it fails, saying why, rather than pass on a tolerance as wide as its terms.
RESOLVE = 1e-3
#: Relative accuracy of the roots assumed by the comparison with the text as typed; the
#: allowed difference at s is EXPRESSION_RTOL·(1 + Σ|r|/|s − r|) over the roots r.
EXPRESSION_RTOL = 1e-9


def _close(a: float, b: float, rtol: float, scale: float, noise: float = 0.0) -> bool:
    if math.isinf(a) or math.isinf(b):
        return a == b
    size = max(abs(a), abs(b), scale)
    if noise > RESOLVE * size:
        return False
    return abs(a - b) <= rtol * size + noise


def _noise_detail(noise: float, scale: float) -> str:
    if noise > RESOLVE * scale:
        return (f"terms of total size {noise / NOISE:.3g} cancel to values of {scale:.3g}: "
                "double precision cannot resolve this expansion")
    return ""


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
        A check whose two numbers cannot be told apart from rounding (terms that cancel
        beyond double precision) fails and says so.  When H came from text
        (:meth:`Rational.from_expr`), the first check compares H with the text itself.
    """
    from .partial_fractions import CoefficientOverflow

    out = []
    if H.expression is not None:
        out.append(expression_check(H))
    if H.gain == 0:
        return out + [Check("zero function", True, 0.0, 0.0)]
    unit = "s"
    try:
        pf = H.partial_fractions(merge_tol)
        work = H
    except CoefficientOverflow:
        w = H.scale
        work = H.normalized(w)
        pf = work.partial_fractions(merge_tol)
        unit = f"units of 1/w = {1 / w:.4g} s"
        out.append(Check("expanded in x = s/w", True, "coefficients beyond the float range in rad/s",
                         w, "w in rad/s; the checks below are on H(w·x)"))
    return out + _theorem_checks(work, pf, merge_tol, rtol, unit)


def _theorem_checks(H, pf, merge_tol, rtol, unit) -> list:
    from .rational import Rational
    from .responses import evaluate_terms

    out = []
    # frequencies around every pole and zero magnitude (round trip, and the size of H)
    pm = np.abs(H.poles[H.poles != 0])
    mags = np.abs(np.concatenate([H.poles, H.zeros]))
    mags = mags[mags > 0]
    if mags.size == 0:
        mags = np.array([1.0])
    if pm.size:
        mags = np.clip(mags, pm.min() * 1e-3, pm.max() * 1e3)
    w = np.unique(np.concatenate([np.geomspace(mags.min() / 10, mags.max() * 10, 60), mags * 1.37]))
    s = 1j * w
    with np.errstate(over="ignore", invalid="ignore", divide="ignore", under="ignore"):
        h = H(s)
        peak = float(np.max(np.abs(h[np.isfinite(h)]), initial=0.0))
    # the size of the values compared: the gains at DC and infinity, or the peak of |H(jω)|
    scale = max(abs(H.dc_gain) if math.isfinite(H.dc_gain) else 0.0,
                abs(H.hf_gain) if math.isfinite(H.hf_gain) else 0.0, peak, 1e-300)
    # stability
    max_re = float(np.max(H.poles.real)) if H.poles.size else -math.inf
    out.append(Check("stability", H.is_stable, "every pole Re(p) < 0",
                     max_re, "largest real part of a pole"))
    # DC gain two ways
    if math.isfinite(H.dc_gain):
        via_pf = float(np.real(pf(np.array(0.0))))
        with np.errstate(over="ignore", under="ignore", divide="ignore", invalid="ignore"):
            dc_size = float(sum(abs(t.coefficient) / np.float64(max(abs(t.pole), 1e-300)) ** t.order
                                for t in pf.terms))
        dc_size += abs(pf.direct[-1]) if pf.direct.size else 0.0
        noise = NOISE * dc_size
        out.append(Check("DC gain: H(0) vs partial fractions at s=0",
                         _close(H.dc_gain, via_pf, rtol, scale, noise), H.dc_gain, via_pf,
                         _noise_detail(noise, max(scale, abs(via_pf)))))
    # step: initial and final value theorems
    step_pf = (H * Rational([], [0.0], 1.0)).partial_fractions(merge_tol)
    # sums of terms can only be as exact as the terms are large: each comparison allows the
    # rounding of its own sum, and fails where that rounding swamps the values compared
    if H.is_proper:
        y0, step_noise = (float(v[0]) for v in evaluate_terms(step_pf.terms, np.array([0.0]), True))
        out.append(Check("initial value: lim s->inf H(s) vs step y(0+)",
                         _close(H.hf_gain, y0, rtol, scale, step_noise), H.hf_gain, y0,
                         _noise_detail(step_noise, scale)))
    if H.is_strictly_proper:
        imp0, imp_noise = (float(v[0]) for v in evaluate_terms(pf.terms, np.array([0.0]), True))
        s_big = _lim_sH(H)
        # the size of an impulse response: its initial value, or H(0) times the fastest pole
        fast = float(np.max(np.abs(H.poles))) if H.poles.size else 1.0
        imp_scale = max(abs(s_big), scale * fast if math.isfinite(H.dc_gain) else 0.0, 1e-300)
        out.append(Check("initial value: lim s->inf s*H(s) vs impulse h(0+)",
                         _close(s_big, imp0, rtol, imp_scale, imp_noise), s_big, imp0,
                         _noise_detail(imp_noise, imp_scale)))
    if H.is_stable and H.poles.size:
        # 40 time constants of the slowest pole, more for a pole of order m: t^(m−1)e^(pt)
        # has decayed to e^−40 of its peak only after about (40 + 3(m − 1))/|Re p|
        order = {}
        for term in pf.terms:
            order[term.pole] = max(order.get(term.pole, 1), term.order)
        t_late = max((40.0 + 3.0 * (m - 1)) / -p.real for p, m in order.items())
        y_inf, step_noise = (float(v[0]) for v in evaluate_terms(step_pf.terms, np.array([t_late]), True))
        out.append(Check("final value: H(0) vs step y(t) late (40 time constants and more)",
                         _close(H.dc_gain, y_inf, max(rtol, 1e-12), scale, step_noise),
                         H.dc_gain, y_inf,
                         _noise_detail(step_noise, scale) or
                         f"t = {t_late:.4g} {unit}"))
    elif not H.is_stable:
        out.append(Check("final value theorem", True, "not applicable", "unstable or marginal",
                         "the final-value theorem holds only for a stable system"))
    # round trip on the imaginary axis: each point allows the rounding of the expansion's own
    # sum there (Σ|K|/|s − p|^k), never a floor relative to the largest |H| elsewhere
    with np.errstate(over="ignore", invalid="ignore", divide="ignore", under="ignore"):
        g = pf(s)
        noise = np.zeros(s.shape)
        for term in pf.terms:
            noise += abs(term.coefficient) * np.abs(1.0 / (s - term.pole)) ** term.order
        if pf.direct.size:
            noise += np.polyval(np.abs(pf.direct), np.abs(s))
        noise *= NOISE
        diff = np.abs(g - h)
        ok = bool(np.all(diff <= 1e2 * max(rtol, 1e-9) * np.abs(h) + 4 * noise))
        resolvable = noise <= RESOLVE * np.abs(h)
        rel = diff[resolvable] / np.abs(h[resolvable])
    err = float(np.max(rel, initial=0.0))
    if not math.isfinite(err) or not np.all(np.isfinite(g)):
        err, ok = math.inf, False
    if not np.any(resolvable):
        out.append(Check("round trip: partial fractions vs H(jw)", False, 0.0, math.inf,
                         f"the expansion's rounding exceeds a thousandth of |H| at all {w.size} "
                         "frequencies: double precision cannot resolve it"))
    else:
        out.append(Check("round trip: partial fractions vs H(jw)", ok, 0.0, err,
                         f"largest relative difference over {int(np.sum(resolvable))} frequencies"
                         + (f" ({int(np.sum(~resolvable))} more within the expansion's rounding)"
                            if np.any(~resolvable) else "")))
    for m in pf.merges:
        out.append(Check("pole cluster merged", True, f"{m.multiplicity} poles near {m.center:.6g}",
                         m.spread, "relative spread; indistinguishable from a multiple pole at "
                         "working precision, so treated as one"))
    if H.cancelled:
        out.append(Check("pole-zero cancellation", True, "cancelled pairs", H.cancelled,
                         "coincident pole and zero removed"))
    return out


def expression_check(H) -> Check:
    """H against the text it was parsed from, evaluated straight from the parse tree.

    The text is evaluated at 40 digits on the imaginary axis at frequencies spread over the
    poles and zeros (a decade beyond each end, and beside each root), with no polynomial
    built, so a term lost in building H, a misplaced factor or a wrong root shows here.
    """
    roots = np.concatenate([H.zeros, H.poles])
    mags = np.abs(roots[roots != 0])
    if mags.size == 0:
        w = np.geomspace(0.1, 10.0, 9)
    else:
        lo, hi = float(mags.min()), float(mags.max())
        near = np.unique(mags)
        if near.size > 40:
            near = near[np.linspace(0, near.size - 1, 40).astype(int)]
        w = np.unique(np.concatenate([np.geomspace(lo / 10, hi * 10, 40), near * 1.37, near / 1.29]))
    w = w * 1.0137  # off the round numbers a root on the axis might sit at
    s = 1j * w
    text = H.expression.evaluate(s)
    with np.errstate(over="ignore", invalid="ignore", divide="ignore", under="ignore"):
        h = H(s)
        sens = 1.0 + np.sum(np.abs(roots)[None, :] / np.abs(s[:, None] - roots[None, :]), axis=1) \
            if roots.size else np.ones(s.size)
    if H.gain == 0:
        ok = all(tk is None or tk == 0 for tk in text)
        return Check("expression as typed vs H(jw)", ok, 0.0,
                     max((float(abs(tk)) for tk in text if tk is not None), default=0.0),
                     "the text is 0 at every frequency tried (40 digits)" if ok else
                     "the text is not 0 where H is")
    worst, compared = 0.0, 0
    ok = True
    for hk, tk, sk in zip(h, text, sens):
        if tk is None or not (1e-290 < abs(tk) < 1e290) or not math.isfinite(sk):
            continue  # a pole on the axis, or a value no float holds: nothing to compare
        compared += 1
        err = float(abs(complex(tk) - hk) / abs(tk)) if np.isfinite(hk) else math.inf
        worst = max(worst, err)
        ok = ok and err <= EXPRESSION_RTOL * sk
    if compared == 0:
        return Check("expression as typed vs H(jw)", True, "not applicable", "no comparable point",
                     "the text's values lie beyond the float range at every frequency tried")
    return Check("expression as typed vs H(jw)", ok, 0.0, worst,
                 f"largest relative difference over {compared} frequencies, the text evaluated "
                 "at 40 digits from its parse tree")


def _lim_sH(H) -> float:
    """lim s·H(s) as s → ∞ for a strictly proper H."""
    if H.zeros.size < H.poles.size - 1:
        return 0.0
    return H.gain * H.w0

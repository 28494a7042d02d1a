"""Closed-form responses against scipy.signal, measured side by side in one run.

1. Step response of a probe-like 4th-order system at 1e6 points: taumatch's closed form vs
   scipy.signal.step on the same system and grid (ratio of wall times, agreement relative
   to the peak).
2. The accuracy bank of tests/test_lti_bank.py: worst relative coefficient error of
   taumatch vs scipy.signal.residue, both against exact sympy arithmetic.

Run: python bench/bench_lti.py   (prints; asserts nothing)
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import scipy.signal as sig

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

from taumatch.lti import Rational  # noqa: E402
from timing import best_of  # noqa: E402 - bench/ is on sys.path when run as a script


def step_speed():
    H = Rational.from_expr("(s+2e5)*4e16/((s+1e5)*(s^2+2e5*s+4e12)*(s+1e6))")
    num, den = H.coeffs()
    t = np.linspace(0, 2e-4, 1_000_000)
    ours_t, ours = best_of(lambda: H.step(t))
    ref_t, (_, ref) = best_of(lambda: sig.step((np.atleast_1d(num), den), T=t), 1)
    err = np.max(np.abs(ours - ref)) / np.max(np.abs(ref))
    print(f"step at 1e6 points: taumatch {ours_t * 1e3:.1f} ms, scipy.signal.step {ref_t * 1e3:.1f} ms,"
          f" ratio {ref_t / ours_t:.1f}x faster; max difference {err:.2e} of the peak")


def bank():
    import test_lti_bank as b

    worst_ours = 0.0
    worst_ref = 0.0
    for name, zeros, poles, gain in b.BANK:
        exact, _ = b._exact_terms(zeros, poles, gain)
        H = Rational.from_zpk(zeros, poles, gain)
        ours = {(t.pole, t.order): t.coefficient for t in H.partial_fractions().terms}
        num, den = H.coeffs()
        r, p, _ = sig.residue(np.atleast_1d(num).real, np.atleast_1d(den).real)
        e_ours = e_ref = 0.0
        for (pe, k), c in exact.items():
            key = min(ours, key=lambda q: abs(q[0] - pe) + 1e30 * (q[1] != k))
            e_ours = max(e_ours, abs(ours[key] - c) / abs(c))
            # scipy lists repeated poles in order 1..m; match by position among equal poles
            idx = [i for i in range(len(p)) if abs(p[i] - pe) <= 1e-3 * max(abs(pe), 1e-300)]
            if len(idx) >= k:
                e_ref = max(e_ref, abs(r[idx[k - 1]] - c) / abs(c))
            else:
                e_ref = max(e_ref, np.inf)
        worst_ours = max(worst_ours, e_ours)
        worst_ref = max(worst_ref, e_ref)
        print(f"  {name:48s} taumatch {e_ours:9.2e}   scipy.signal.residue {e_ref:9.2e}")
    print(f"bank worst relative coefficient error: taumatch {worst_ours:.2e}, "
          f"scipy.signal.residue {worst_ref:.2e}")


if __name__ == "__main__":
    step_speed()
    bank()

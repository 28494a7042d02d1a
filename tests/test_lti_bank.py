"""Accuracy bank: partial fractions and responses against exact sympy rational arithmetic.

Reference: sympy (exact rational arithmetic on the very same binary floating-point inputs,
converted exactly with ``sympy.Rational(float)``), through exact roots and the residue
formula of Nilsson & Riedel, "Electric Circuits".  Required: relative coefficient error
≤ 1e-10 on every case.
"""

import math

import numpy as np
import pytest
import sympy as sp

from taumatch.lti import Rational

s, t = sp.symbols("s t")

# name, zeros, poles, gain (floats; complex pairs complete)
BANK = [
    ("distinct", [-2.0], [-1.0, -3.0, -5.0], 4.0),
    ("double", [], [-1.0, -1.0, -2.0], 1.0),
    ("triple", [-4.0], [-1.0, -1.0, -1.0, -2.0], 3.0),
    ("poles 1e-6 apart", [], [-1.0, -1.0 - 1e-6, -3.0], 1.0),
    ("12-decade spread 1 ns / 1 ms / 1 s", [-1e6], [-1e9, -1e3, -1.0], 1e6),
    ("exact cancellation", [-2.0, -5.0], [-2.0, -1.0, -3.0], 2.0),
    ("near cancellation 1e-9", [-2.0 - 2e-9], [-2.0, -1.0], 1.0),
    ("complex pair squared", [], [-3 + 4j, -3 - 4j, -3 + 4j, -3 - 4j], 768.0),
    ("complex pair with real", [-1.0], [-1 + 2j, -1 - 2j, -3.0], 5.0),
    ("improper", [-1 + 1j, -1 - 1j, -0.5], [-1.0, -2.0], 2.0),
    ("biproper", [-3.0], [-1.0], 1.0),
    ("double pole at 1e9 with integrator", [], [0.0, -1e9, -1e9], 1e18),
    ("compensated-divider pair 9M/1M (near cancel)", [-1 / (9e6 * 12.0e-12)],
     [-1 / ((9e6 * 1e6 / 10e6) * (12.0e-12 + 110e-12))], 12.0 / 122.0),
]


def _exact(zeros, poles, gain):
    def fac(r):
        r = complex(r)
        return sp.Rational(r.real) + sp.I * sp.Rational(r.imag)

    num = sp.Rational(gain)
    for z in zeros:
        num *= s - fac(z)
    den = sp.Integer(1)
    for p in poles:
        den *= s - fac(p)
    return sp.expand(num), sp.expand(den)


def _exact_terms(zeros, poles, gain):
    """Exact (pole, order) -> coefficient, using the residue formula on exact roots."""
    num, den = _exact(zeros, poles, gain)
    H = sp.cancel(num / den)
    n, d = sp.fraction(H)
    rts = sp.roots(sp.Poly(d, s))
    out = {}
    for p, m in rts.items():
        G = sp.cancel(H * (s - p) ** m)
        for k in range(m, 0, -1):
            j = m - k
            c = sp.diff(G, s, j).subs(s, p) / sp.factorial(j)
            out[(complex(sp.N(p, 40)), k)] = complex(sp.N(c, 40))
    q, _ = sp.div(sp.Poly(n, s), sp.Poly(d, s))
    return out, [float(sp.N(c, 30)) for c in q.all_coeffs()] if q.degree() >= 0 and not q.is_zero else []


@pytest.mark.parametrize("name, zeros, poles, gain", BANK, ids=[b[0] for b in BANK])
def test_coefficients_against_exact_sympy(name, zeros, poles, gain):
    H = Rational.from_zpk(zeros, poles, gain)
    pf = H.partial_fractions()
    exact, direct = _exact_terms(zeros, poles, gain)
    got = {(t_.pole, t_.order): t_.coefficient for t_ in pf.terms}
    assert len(got) == len(exact), f"{name}: {sorted(got)} vs {sorted(exact)}"
    for (p, k), c in exact.items():
        key = min(got, key=lambda q: abs(q[0] - p) + 1e9 * abs(q[1] - k))
        assert key[1] == k
        assert abs(key[0] - p) <= 1e-12 * max(abs(p), 1e-300), f"{name}: pole {key[0]} vs {p}"
        err = abs(got[key] - c) / abs(c)
        assert err <= 1e-10, f"{name}: coefficient at {p} order {k}: {got[key]} vs {c} (rel {err:.2e})"
    if direct:
        np.testing.assert_allclose(pf.direct, direct, rtol=1e-10)
    else:
        assert pf.direct.size == 0


def _exact_step(zeros, poles, gain, times):
    num, den = _exact(zeros, poles, gain)
    terms, _ = _exact_terms(list(zeros), list(poles) + [0.0], gain)
    out = []
    for tv in times:
        acc = 0j
        for (p, k), c in terms.items():
            acc += c * tv ** (k - 1) / math.factorial(k - 1) * complex(sp.N(sp.exp(sp.nsimplify(p) * sp.Rational(tv)), 30))
        out.append(acc.real)
    return np.array(out)


@pytest.mark.parametrize("name, zeros, poles, gain",
                         [b for b in BANK if b[0] not in ("improper",)], ids=lambda x: x if isinstance(x, str) else "")
def test_step_against_exact_sympy(name, zeros, poles, gain):
    """Step response at a few times vs the exact sum.

    Bound: 1e-12 of the largest value plus 50·eps·Σ|K| — the rounding that summing terms of
    size |K| must incur (poles 1e-6 apart have residues 1e6 times the response).
    """
    H = Rational.from_zpk(zeros, poles, gain)
    p = np.array(poles, dtype=complex)
    slow = np.min(np.abs(p[p != 0])) if np.any(p != 0) else 1.0
    fast = np.max(np.abs(p))
    times = sorted({0.0, 0.3 / fast, 1.0 / fast, 0.5 / slow, 2.0 / slow})
    got = H.step(times)
    want = _exact_step(zeros, poles, gain, times)
    peak = max(np.max(np.abs(want)), 1e-300)
    size = sum(abs(t_.coefficient) for t_ in (H * Rational([], [0.0], 1.0)).partial_fractions().terms)
    assert np.max(np.abs(got - want)) <= 1e-12 * peak + 50 * 2.2e-16 * size, (got, want)


def test_scipy_residue_trap_double_pole_at_1e9():
    """ω²/(s(s+ω)²), ω = 1e9: residues 1, −1, −1e9 (own derivation; CHECKS.md notes that
    polynomial root-finding in scipy.signal.residue splits this pole)."""
    w = 1e9
    H = Rational.from_coeffs([w * w], np.polymul([1, 0], np.polymul([1, w], [1, w])))
    terms = {(round(t_.pole.real / w, 9), t_.order): t_.coefficient.real
             for t_ in H.partial_fractions().terms}
    assert sorted(terms) == [(-1.0, 1), (-1.0, 2), (0.0, 1)]
    assert terms[(0.0, 1)] == pytest.approx(1.0, rel=1e-12)
    assert terms[(-1.0, 1)] == pytest.approx(-1.0, rel=1e-10)
    assert terms[(-1.0, 2)] == pytest.approx(-w, rel=1e-10)


def test_from_coeffs_merges_numerically_split_triple_pole():
    """(s+1)^3 (s+3) from expanded coefficients: eigenvalues split the triple pole by ~eps^(1/3);
    it must come back as one pole of order 3 and the merge must be stated in the checks."""
    H = Rational.from_coeffs([1.0], np.poly([-1, -1, -1, -3]))
    orders = [t_.order for t_ in H.partial_fractions().terms if abs(t_.pole + 1) < 1e-6]
    assert sorted(orders) == [1, 2, 3]
    exact = {1: 1 / 8, 2: -1 / 4, 3: 1 / 2}  # own derivation, residue formula
    for t_ in H.partial_fractions().terms:
        if abs(t_.pole + 1) < 1e-6:
            assert t_.coefficient.real == pytest.approx(exact[t_.order], rel=1e-9)
    assert all(c.passed for c in H.checks())


def test_near_coincident_poles_do_not_blow_up_step():
    """Poles 1e-13 apart (relative) are not resolvable: merged, stated, and the step stays sane."""
    H = Rational.from_zpk([], [-1.0, -1.0 * (1 + 1e-13), -2.0], 2.0)
    pf = H.partial_fractions()
    assert pf.merges, "the cluster must be merged"
    names = [c.name for c in H.checks()]
    assert "pole cluster merged" in names
    ref = Rational.from_zpk([], [-1.0, -1.0, -2.0], 2.0)
    tt = np.linspace(0, 10, 101)
    np.testing.assert_allclose(H.step(tt), ref.step(tt), atol=1e-12)


def test_many_ghz_poles_do_not_overflow_the_gain():
    """40 poles from 1e9 rad/s up (as a cable ladder has): the leading-coefficient ratio (~1e480)
    does not fit a float; the scaled form keeps H right (gain chosen so that H(0) = 1)."""
    poles = -1e9 * 1.15 ** np.arange(40)
    w0 = 1e9
    gain = float(np.prod(-poles / w0))  # makes H(0) = 1
    H = Rational.from_zpk_scaled([], poles, gain, w0)
    assert H.dc_gain == pytest.approx(1.0, rel=1e-12)
    assert not np.isfinite(H.leading_gain)
    t = np.array([0.0, 1e-8, 1e-6])
    y = H.step(t)
    assert y[0] == pytest.approx(0.0, abs=1e-9) and y[-1] == pytest.approx(1.0, rel=1e-9)
    prod = H * Rational.from_zpk([-1.0], [-2.0], 2.0)
    assert prod.dc_gain == pytest.approx(1.0, rel=1e-12)

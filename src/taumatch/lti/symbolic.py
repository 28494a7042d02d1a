"""The exact path through sympy: rational or symbolic coefficients.

Used for formulas and as a cross-check of the floating-point path.  Partial
fractions here come from exact roots (``sympy.roots``) and the residue formula, not
from ``sympy.apart`` on floats (which can return the expression undecomposed).

Examples
--------
>>> import sympy as sp
>>> s = sp.Symbol("s")
>>> exact_partial_fractions(1 / ((s + 1)**2 * (s + 2)), s)
[(-2, 1, 1), (-1, 1, -1), (-1, 2, 1)]
>>> inverse_laplace(1 / ((s + 1)**2 * (s + 2)), s)
t*exp(-t) - exp(-t) + exp(-2*t)
"""

from __future__ import annotations

import numpy as np
import sympy as sp

from ..errors import InputError

__all__ = ["S", "T", "exact_partial_fractions", "inverse_laplace", "to_rational", "to_sympy"]

S = sp.Symbol("s")
T = sp.Symbol("t", nonnegative=True)


def _split(expr, s):
    expr = sp.cancel(sp.together(sp.sympify(expr)))
    num, den = sp.fraction(expr)
    try:
        pn = sp.Poly(num, s)
        pd = sp.Poly(den, s)
    except sp.PolynomialError as exc:
        raise InputError(f"not a rational function of {s}: {expr}") from exc
    if pd.is_zero:
        raise InputError("denominator is zero")
    return pn, pd


def exact_partial_fractions(expr, s=S) -> list:
    """Exact terms ``(pole, order, coefficient)`` of a rational function of ``s``.

    Poles are exact algebraic numbers where ``sympy.roots`` finds them; the
    coefficient of 1/(s − p)^k is 1/(m − k)! · d^(m−k)/ds^(m−k) [(s − p)^m H(s)] at p
    (Nilsson & Riedel).  The polynomial part of an improper function is left out
    (see :func:`direct_part`).
    """
    pn, pd = _split(expr, s)
    rts = sp.roots(pd, s)
    if sum(rts.values()) != pd.degree():
        raise InputError("sympy could not find every pole exactly; use the numerical path")
    H = pn.as_expr() / pd.as_expr()
    terms = []
    for p in sorted(rts, key=sp.default_sort_key):
        m = rts[p]
        G = sp.cancel(H * (s - p) ** m)
        for k in range(m, 0, -1):
            n = m - k
            coef = sp.simplify(sp.diff(G, s, n).subs(s, p) / sp.factorial(n))
            terms.append((p, k, coef))
    terms.sort(key=lambda x: (sp.default_sort_key(x[0]), x[1]))
    return terms


def direct_part(expr, s=S):
    """Polynomial part of an improper rational function (exact quotient)."""
    pn, pd = _split(expr, s)
    q, _ = sp.div(pn, pd)
    return q.as_expr()


def inverse_laplace(expr, s=S, t=T):
    """Exact time function Σ K t^(k−1)/(k−1)! e^(p t) of the proper part of ``expr``."""
    out = 0
    for p, k, c in exact_partial_fractions(expr, s):
        out += c * t ** (k - 1) / sp.factorial(k - 1) * sp.exp(p * t)
    return sp.expand(out) if out != 0 else sp.Integer(0)


def to_sympy(H, s=S, exact: bool = False):
    """A ``Rational`` as a sympy expression (floats; ``exact=True`` converts them to rationals)."""
    num, den = H.coeffs()
    conv = sp.nsimplify if exact else sp.Float
    n = sum(conv(float(c)) * s ** i for i, c in enumerate(np.atleast_1d(num)[::-1]))
    d = sum(conv(float(c)) * s ** i for i, c in enumerate(np.atleast_1d(den)[::-1]))
    return n / d


def to_rational(expr, s=None, digits: int = 30):
    """Turn an exact sympy rational function of ``s`` into a floating ``Rational``.

    Roots are found exactly where sympy can and evaluated to ``digits`` digits, or else
    isolated numerically at that precision (``Poly.nroots``), so repeated and clustered
    roots are taken as they are, not split by float root-finding.
    """
    from .rational import Rational

    expr = sp.sympify(expr)
    if s is None:
        free = sorted(expr.free_symbols, key=str)
        if len(free) > 1:
            raise InputError(f"expression has several symbols {free}; name the variable")
        s = free[0] if free else S
    pn, pd = _split(expr, s)
    if pn.free_symbols - {s} or pd.free_symbols - {s}:
        raise InputError("the expression still holds symbols other than s; give them values first")

    def _roots(p):
        out = []
        if p.degree() <= 0:
            return out
        sqf = sp.sqf_list(p)[1]
        for factor, mult in sqf:
            rts = sp.roots(factor, s)
            if sum(rts.values()) == factor.degree():
                vals = [complex(sp.N(r, digits)) for r, k in rts.items() for _ in range(k)]
            else:
                vals = [complex(r) for r in factor.nroots(n=digits, maxsteps=200)]
            out.extend(vals * mult)
        return out

    lead = float(sp.N(pn.LC() / pd.LC(), 20))
    return Rational(_roots(pn), _roots(pd), lead)

"""Partial fractions of a ``Rational`` computed from its zeros and poles.

For a pole p of multiplicity m the coefficients are the Taylor coefficients of
G(s) = (s − p)^m H(s) at p (Nilsson & Riedel's derivative formula), obtained by
multiplying truncated power series of the factors (s − z) and 1/(s − q) around p.
No polynomial is expanded and no derivative is taken numerically, so the result
keeps the accuracy of the zeros and poles themselves.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import ComputationError, InputError
from . import polynomials as _poly

__all__ = ["CoefficientOverflow", "PartialFractions", "Term", "partial_fractions"]


class CoefficientOverflow(ComputationError):
    """A partial-fraction coefficient does not fit a float in physical units (rad/s).

    It happens with poles of high order at high frequency, e.g. (1e9/(s+1e9))^64 whose
    coefficient is 1e576; the expansion of the normalised function H(w·σ) still fits
    (see :meth:`Rational.normalized`), and the responses use it.
    """


@dataclass(frozen=True)
class Term:
    """One term ``coefficient / (s − pole)^order``; in time ``coefficient·t^(order−1)/(order−1)!·e^(pole·t)``."""

    pole: complex
    order: int
    coefficient: complex

    def to_dict(self) -> dict:
        return {"pole": self.pole, "order": self.order, "coefficient": self.coefficient}


@dataclass(frozen=True)
class Merge:
    """A cluster of poles that was treated as one multiple pole."""

    center: complex
    multiplicity: int
    spread: float  # largest relative distance of a member from the centre

    def to_dict(self) -> dict:
        return {"center": self.center, "multiplicity": self.multiplicity, "spread": self.spread}


@dataclass(frozen=True)
class PartialFractions:
    """H(s) = Σ K/(s − p)^k + Σ dᵢ sⁱ.

    Attributes
    ----------
    terms : tuple of Term
        Grouped by pole (each distinct pole with all its orders 1..m), conjugate pairs
        adjacent, upper member first.
    direct : ndarray
        Coefficients of the polynomial part, highest power first (empty when proper).
    merges : tuple of Merge
        Pole clusters that could not be resolved at working precision and were merged.
    """

    terms: tuple
    direct: np.ndarray = field(default_factory=lambda: np.zeros(0))
    merges: tuple = ()

    @property
    def poles(self) -> list:
        """Distinct poles with their multiplicity, as (pole, multiplicity)."""
        out: dict = {}
        for t in self.terms:
            out[t.pole] = max(out.get(t.pole, 0), t.order)
        return list(out.items())

    def __call__(self, s):
        """Evaluate the expansion at complex s (rad/s)."""
        s = np.asarray(s, dtype=complex)
        out = np.zeros(s.shape, dtype=complex)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore", under="ignore"):
            for t in self.terms:
                out += t.coefficient * (1.0 / (s - t.pole)) ** t.order  # underflows, not nan
        if self.direct.size:
            out += np.polyval(self.direct, s)
        return out

    def to_rational(self):
        """Sum the terms back into a ``Rational`` (round trip)."""
        from .rational import Rational

        total = Rational.constant(0.0)
        for t in self.terms:
            if t.pole.imag < 0:
                continue  # added together with its upper partner
            if t.pole.imag > 0:
                roots_, lead = _pair_numerator(t)
                poles = [t.pole] * t.order + [np.conj(t.pole)] * t.order
                total = total + Rational(roots_, poles, lead)
            else:
                total = total + Rational([], [t.pole.real] * t.order, t.coefficient.real)
        if self.direct.size and np.any(self.direct):
            total = total + Rational.from_coeffs(self.direct, [1.0])
        return total

    def to_dict(self) -> dict:
        return {
            "terms": [t.to_dict() for t in self.terms],
            "direct": self.direct,
            "merged": [m.to_dict() for m in self.merges],
        }


def _pair_numerator(t: Term):
    """Roots and leading coefficient of K (s − p*)^k + K* (s − p)^k (a real polynomial).

    Built in x = s/|p|; a leading coefficient is zero only when it is below the rounding of
    its own terms (2·Re K against 2·|K|), never for being small beside another coefficient.
    """
    k, p, K = t.order, t.pole, t.coefficient
    r = abs(p)
    c = 2.0 * (np.poly([np.conj(p) / r] * k) * K).real
    bound = 2.0 * abs(K) * np.array([math.comb(k, j) for j in range(k + 1)], dtype=float)
    lead = 0
    while lead < k and abs(c[lead]) <= 16 * (k + 1) * np.finfo(float).eps * bound[lead]:
        lead += 1
    c = c[lead:]
    if c.size == 0 or not np.any(c):
        return np.zeros(0), 0.0
    deg = c.size - 1
    return _poly.roots(c) * r, float(c[0] * r ** (k - deg))


def _taylor_at(center: complex, zeros, other_poles, gain: float, m: int,
               w0: float = 1.0) -> np.ndarray:
    """First m Taylor coefficients at ``center`` of gain·w0^m·Π((s − z)/w0)/Π((s − q)/w0)."""
    series = np.zeros(m, dtype=complex)
    series[0] = gain * np.float64(w0) ** m
    zs = list(np.asarray(zeros, dtype=complex) - center)  # factor (a + h), a = c - z
    qs = list(np.asarray(other_poles, dtype=complex) - center)
    # alternate zero and pole factors to keep magnitudes moderate
    while zs or qs:
        if zs:
            a = -zs.pop()
            new = series * a
            new[1:] += series[:-1]
            series = new / w0
        if qs:
            b = -qs.pop()
            if b == 0:
                raise InputError("internal: pole factor vanishes at the expansion point")
            inv = (-1.0 / b) ** np.arange(m) * (w0 / b)
            series = np.convolve(series, inv)[:m]
    return series


def partial_fractions(H, merge_tol: float | None = None) -> PartialFractions:
    """Expand a ``Rational`` into partial fractions.

    Parameters
    ----------
    H : Rational
        The function to expand.
    merge_tol : float, optional
        Backward-error bound for treating a pole cluster as one multiple pole
        (default :data:`taumatch.lti.polynomials.MERGE_TOL`).

    Returns
    -------
    PartialFractions

    Examples
    --------
    >>> from taumatch.lti import Rational
    >>> pf = Rational.from_expr("1/((s+1)^2*(s+2))").partial_fractions()
    >>> [(t.pole.real, t.order, round(t.coefficient.real, 12)) for t in pf.terms]
    [(-1.0, 1, -1.0), (-1.0, 2, 1.0), (-2.0, 1, 1.0)]
    """
    tol = _poly.MERGE_TOL if merge_tol is None else float(merge_tol)
    if H.gain == 0:
        return PartialFractions((), np.zeros(0), ())
    with np.errstate(over="ignore", invalid="ignore", divide="ignore", under="ignore"):
        pf = _expand(H, tol)
    bad = [t for t in pf.terms if not np.isfinite(t.coefficient)]
    if bad or not np.all(np.isfinite(pf.direct)):
        where = (f"the order-{bad[0].order} term at the pole {_c(bad[0].pole)} rad/s" if bad
                 else "the polynomial part")
        raise CoefficientOverflow(
            f"partial fractions: the coefficient of {where} is beyond the float range in "
            "physical units; expand the normalised function H(w*x) instead")
    return pf


def _c(z: complex) -> str:
    return f"{z.real:.4g}" if z.imag == 0 else f"{z.real:.4g}{z.imag:+.4g}j"


def _expand(H, tol: float) -> PartialFractions:
    zeros, poles, gain = H.zeros, H.poles, H.gain
    clusters = _poly.merge_clusters(poles, tol)
    # order: real poles by magnitude, then complex pairs upper first
    clusters.sort(key=lambda c: (abs(c.center), -c.center.imag))
    centers = np.array([c.center for c in clusters], dtype=complex)
    mults = [c.multiplicity for c in clusters]
    terms = []
    merges = []
    computed: dict = {}
    simple = _simple_residues(centers, np.array(mults), zeros, gain, H.w0)
    for i, cl in enumerate(clusters):
        c, m = cl.center, cl.multiplicity
        if cl.merged:
            merges.append(Merge(c, m, cl.spread))
        conj_key = (np.conj(c), m)
        if c.imag < 0 and conj_key in computed:
            coeffs = np.conj(computed[conj_key])
        elif m == 1 and simple is not None and np.isfinite(simple[i]):
            coeffs = np.array([simple[i]])
            if c.imag == 0:
                coeffs = coeffs.real.astype(complex)
            computed[(c, m)] = coeffs
        else:
            others = np.concatenate(
                [np.full(mults[j], centers[j]) for j in range(len(clusters)) if j != i]
                or [np.zeros(0, dtype=complex)]
            )
            series = _taylor_at(c, zeros, others, gain, m, H.w0)
            coeffs = series  # series[n] is the coefficient of 1/(s-c)^(m-n)
            if c.imag == 0:
                coeffs = coeffs.real.astype(complex)
            computed[(c, m)] = coeffs
        for n in range(m - 1, -1, -1):
            terms.append(Term(complex(c), m - n, complex(coeffs[n])))
    # keep conjugate partners adjacent: sort terms by (|pole| rounded cluster index)
    order = {complex(cl.center): k for k, cl in enumerate(clusters)}
    terms.sort(key=lambda t: (_pair_rank(t.pole, order), t.pole.imag < 0, t.order))
    direct = _direct_part(zeros, centers, mults, gain, H.w0)
    return PartialFractions(tuple(terms), direct, tuple(merges))


def _row_products(M: np.ndarray, mult=None):
    """Product along each row of M as (mantissa, binary exponent), renormalised every 16
    columns so that hundreds of factors neither overflow nor underflow."""
    n, k = M.shape
    mant = np.ones(n, dtype=complex)
    expo = np.zeros(n, dtype=np.int64)
    if mult is not None:
        M = np.repeat(M, mult, axis=1)
        k = M.shape[1]
    for j in range(0, k, 16):
        mant = mant * np.prod(M[:, j:j + 16], axis=1)
        _, e = np.frexp(np.abs(mant))
        mant = mant * np.ldexp(1.0, -e)
        expo += e
    return mant, expo


def _simple_residues(centers, mults, zeros, gain, w0):
    """Residues at every pole at once for large systems, valid where the pole is simple:
    K_i = gain·w0·Π((p_i − z)/w0)/Π_{j≠i}((p_i − p_j)/w0), exact products (renormalised).
    None for small systems, where the power-series path is used for every pole."""
    n = centers.size
    if n < 24:
        return None
    dp = (centers[:, None] - centers[None, :]) / w0
    np.fill_diagonal(dp, 1.0)
    den_m, den_e = _row_products(dp, mults)
    # the diagonal stands for the pole's own factor: remove the extra repeats it got
    if zeros.size:
        num_m, num_e = _row_products((centers[:, None] - zeros[None, :]) / w0)
    else:
        num_m, num_e = np.ones(n, dtype=complex), np.zeros(n, dtype=np.int64)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        ratio = num_m / den_m
        e = np.clip(num_e - den_e, -1100, 1100)
        res = gain * w0 * ratio * np.ldexp(1.0, e.astype(int))
    return res  # non-finite entries are recomputed by the series path


def _pair_rank(p: complex, order: dict) -> int:
    if p.imag < 0:
        return min(order.get(complex(np.conj(p)), order[p]), order[p])
    return order[p]


def _direct_part(zeros, centers, mults, gain, w0: float = 1.0) -> np.ndarray:
    nz = zeros.size
    npl = int(sum(mults))
    if nz < npl:
        return np.zeros(0)
    poles = np.concatenate([np.full(m, c) for c, m in zip(centers, mults)] or [np.zeros(0)])
    # H = gain·Π(x − z/w)/Π(x − p/w) exactly in x = s/w (w = w0); divide there
    num = _poly.poly_from_roots(zeros, w0)
    den = _poly.poly_from_roots(poles, w0)
    q, _ = np.polydiv(np.real_if_close(num), np.real_if_close(den))
    q = np.atleast_1d(np.real_if_close(q)).astype(float)
    d = nz - npl
    # coefficient of s^(d−j) is gain·q_j / w0^(d−j)
    return gain * q / w0 ** np.arange(d, -1, -1, dtype=float)

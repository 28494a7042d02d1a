"""Exact arithmetic on rational functions of s, and their roots at any physical scale.

An expression tree (:mod:`.expr`) is reduced to gain · Π Pᵢ^kᵢ / Π Qⱼ^kⱼ, where the gain is
an exact fraction and each factor is a primitive polynomial with integer coefficients.
The numbers are the decimals as typed, so nothing is rounded and no coefficient is ever
dropped for being small beside another: ``s^2 + 2e7*s + 1e16`` keeps its ``s^2``.  Only the
roots of each factor are found in floating point, on the factor scaled by a power of two
so that its coefficients balance (first and last of equal size); a quadratic takes its
discriminant exactly.

Limits (each named in the error that enforces it): numerator and denominator degree up to
:data:`MAX_DEGREE`; integers of the exact arithmetic up to :data:`MAX_BITS` bits; roots and
gains within the float range.
"""

from __future__ import annotations

import math
from fractions import Fraction

import numpy as np

from ..errors import InputError
from . import polynomials as _poly

__all__ = ["MAX_BITS", "MAX_DEGREE", "Exact", "build", "to_rational"]

#: Largest degree of the numerator or the denominator of an expression.
MAX_DEGREE = 200
#: Largest size, in bits, of an integer in the exact arithmetic (about 30,000 digits).
MAX_BITS = 100_000
#: Roots, gains and constants must have a magnitude within [TINY, HUGE] (or be 0).
TINY = 1e-300
HUGE = 1e300

_S = (1, 0)  # the polynomial s


class Exact:
    """gain · Π num[f]^k / Π den[f]^k; factors are tuples of ints (highest power first),
    primitive, leading coefficient positive."""

    __slots__ = ("den", "gain", "num")

    def __init__(self, gain: Fraction, num: dict | None = None, den: dict | None = None):
        self.gain = Fraction(gain)
        self.num = num or {}
        self.den = den or {}

    @property
    def degrees(self) -> tuple[int, int]:
        return (sum((len(f) - 1) * k for f, k in self.num.items()),
                sum((len(f) - 1) * k for f, k in self.den.items()))

    def mul(self, other: Exact) -> Exact:
        num, den = dict(self.num), dict(self.den)
        for f, k in other.num.items():
            num[f] = num.get(f, 0) + k
        for f, k in other.den.items():
            den[f] = den.get(f, 0) + k
        for f in list(num):  # identical factors cancel exactly
            if f in den:
                c = min(num[f], den[f])
                num[f] -= c
                den[f] -= c
                if not num[f]:
                    del num[f]
                if not den[f]:
                    del den[f]
        return Exact(self.gain * other.gain, num, den)

    def inv(self) -> Exact:
        if self.gain == 0:
            raise InputError("division by zero in the expression")
        return Exact(1 / self.gain, dict(self.den), dict(self.num))

    def power(self, n: int) -> Exact:
        if n < 0:
            return self.inv().power(-n)
        if self.gain == 0 and n == 0:
            raise InputError("0^0 is not defined")
        if n == 0:
            return Exact(1)
        return Exact(self.gain**n, {f: k * n for f, k in self.num.items()},
                     {f: k * n for f, k in self.den.items()})

    def add(self, other: Exact) -> Exact:
        if other.gain == 0:
            return self
        if self.gain == 0:
            return other
        common = dict(self.den)
        for f, k in other.den.items():
            common[f] = max(common.get(f, 0), k)
        parts = []
        for v in (self, other):
            rest = {f: k - v.den.get(f, 0) for f, k in common.items()}
            parts.append((v.gain, _expand([v.num, rest])))
        (ga, pa), (gb, pb) = parts
        d = ga.denominator * gb.denominator // math.gcd(ga.denominator, gb.denominator)
        wa, wb = ga.numerator * (d // ga.denominator), gb.numerator * (d // gb.denominator)
        n = max(len(pa), len(pb))
        pa, pb = (0,) * (n - len(pa)) + pa, (0,) * (n - len(pb)) + pb
        total = [wa * x + wb * y for x, y in zip(pa, pb)]
        return _from_poly(total, Fraction(1, d)).mul(Exact(1, {}, common))


def _expand(dicts) -> tuple:
    out = (1,)
    for factors in dicts:
        for f, k in factors.items():
            for _ in range(k):
                out = _conv(out, f)
    return out


def _conv(a, b) -> tuple:
    out = [0] * (len(a) + len(b) - 1)
    for i, x in enumerate(a):
        if x:
            for j, y in enumerate(b):
                out[i + j] += x * y
    return tuple(out)


def _from_poly(coeffs, scale: Fraction) -> Exact:
    """scale · Σ coeffs[i] s^(n−i) as an Exact (content and powers of s taken out)."""
    c = list(coeffs)
    while c and c[0] == 0:
        c.pop(0)
    if not c:
        return Exact(0)
    n_s = 0
    while c[-1] == 0:
        c.pop()
        n_s += 1
    g = 0
    for x in c:
        g = math.gcd(g, x)
    if c[0] < 0:
        g = -g
    prim = tuple(x // g for x in c)
    num = {}
    if len(prim) > 1:
        num[prim] = 1
    if n_s:
        num[_S] = n_s
    return Exact(scale * g, num, {})


def build(tree, text: str = "") -> Exact:
    """Reduce an expression tree (see :mod:`.expr`) to an :class:`Exact`."""
    v = _build(tree)
    _check_size(v, text)
    return v


def _build(node) -> Exact:
    kind = node[0]
    if kind == "num":
        return Exact(node[1])
    if kind == "s":
        return Exact(1, {_S: 1}, {})
    if kind == "sum":
        v = Exact(0)
        for sign, child in node[1]:
            w = _build(child)
            v = v.add(w if sign > 0 else Exact(-w.gain, w.num, w.den))
            _check_size(v)
        return v
    if kind == "prod":
        v = Exact(1)
        for op, child in node[1]:
            w = _build(child)
            v = v.mul(w.inv() if op == "/" else w)
            _check_size(v)
        return v
    if kind == "neg":
        w = _build(node[1])
        return Exact(-w.gain, w.num, w.den)
    v = _build(node[1]).power(node[2])
    _check_size(v)
    return v


def _check_size(v: Exact, text: str = "") -> None:
    where = f"expression {text!r}: " if text and len(text) <= 60 else "expression: "
    dn, dd = v.degrees
    if max(dn, dd) > MAX_DEGREE:
        what = "numerator" if dn >= dd else "denominator"
        raise InputError(f"{where}{what} of degree {max(dn, dd)} is beyond the limit of "
                         f"{MAX_DEGREE}")
    bits = max(v.gain.numerator.bit_length(), v.gain.denominator.bit_length())
    for f in (*v.num, *v.den):
        bits = max(bits, max(abs(x).bit_length() for x in f))
    if bits > MAX_BITS:
        raise InputError(f"{where}its exact arithmetic needs numbers of more than {MAX_BITS} bits "
                         f"(about {int(MAX_BITS * 0.30103)} digits); write it with fewer and "
                         "smaller powers")


# ---------------------------------------------------------------------- square-free parts
def _primitive(f) -> tuple:
    """An integer (or rational) polynomial as a primitive integer one, leading coefficient > 0."""
    f = list(f)
    while len(f) > 1 and f[0] == 0:
        f.pop(0)
    d = 1
    for x in f:
        d = d * Fraction(x).denominator // math.gcd(d, Fraction(x).denominator)
    f = [int(Fraction(x) * d) for x in f]
    g = 0
    for x in f:
        g = math.gcd(g, x)
    if g == 0:
        return (0,)
    if f[0] < 0:
        g = -g
    return tuple(x // g for x in f)


def _deriv(f) -> list:
    n = len(f) - 1
    return [c * (n - i) for i, c in enumerate(f[:-1])] or [Fraction(0)]


def _gcd(a, b, guard: int) -> tuple:
    """Greatest common divisor of two polynomials, as a primitive integer polynomial (primitive
    remainder sequence; its scale is irrelevant to the callers).  Raises OverflowError when a
    remainder grows beyond ``guard`` bits."""
    a, b = _primitive(a), _primitive(b)
    while b != (0,):
        if max(abs(x).bit_length() for x in b) > guard:
            raise OverflowError  # the caller falls back to the factor as it is
        r, lb, db = list(a), b[0], len(b) - 1
        while len(r) - 1 >= db and any(r):
            la = r[0]
            r = [lb * x for x in r]
            for i, y in enumerate(b):
                r[i] -= la * y
            r.pop(0)
        a, b = b, (_primitive(r) if any(r) else (0,))
    return a


def _divide(a, b) -> list:
    """a / b exactly (b divides a), rational coefficients, no normalisation."""
    a = [Fraction(x) for x in a]
    q = []
    while len(a) >= len(b):
        c = a[0] / b[0]
        q.append(c)
        for i, y in enumerate(b):
            a[i] -= c * y
        a.pop(0)
    return q or [Fraction(0)]


def _sub(a, b) -> list:
    n = max(len(a), len(b))
    a = [Fraction(0)] * (n - len(a)) + list(a)
    b = [Fraction(0)] * (n - len(b)) + list(b)
    out = [x - y for x, y in zip(a, b)]
    while len(out) > 1 and out[0] == 0:
        out.pop(0)
    return out


_PRIMES = (2**61 - 1, 2**31 - 1, 1_000_000_007)


def _coprime_mod_p(f, g) -> bool:
    """True when f and g certainly have no common factor: their gcd modulo a prime that does
    not divide the leading coefficients has degree 0 (the degree modulo such a prime is never
    below the true one).  Cheap: machine-sized numbers only."""
    for p in _PRIMES:
        if f[0] % p and g[0] % p:
            break
    else:  # pragma: no cover - every prime divides a leading coefficient
        return False
    a = [x % p for x in f]
    b = [x % p for x in g]
    while True:
        while b and b[0] == 0:
            b.pop(0)
        if not b:
            return len(a) == 1
        if len(b) == 1:
            return True
        inv = pow(b[0], -1, p)
        while len(a) >= len(b):
            c = a[0] * inv % p
            for i, y in enumerate(b):
                a[i] = (a[i] - c * y) % p
            a.pop(0)
            while a and a[0] == 0 and len(a) >= len(b):
                a.pop(0)
        a, b = b, a


def _square_free(f) -> list:
    """Yun's algorithm, exact: [(g, m), ...] with f = c·Π g^m and every g square-free, so a
    multiple root typed in expanded form is found as exactly that (no cluster to resolve).
    A factor proved square-free modulo a prime (the usual case) is returned at once; one
    whose exact arithmetic would grow far beyond its own size is returned as it is (its
    roots then go through the numerical cluster merge)."""
    if len(f) <= 2 or _coprime_mod_p(f, _deriv(list(f))):
        return [(tuple(f), 1)]
    guard = max(20_000, 8 * max(abs(x).bit_length() for x in f))
    try:
        F = [Fraction(x) for x in f]
        dF = _deriv(F)
        a = _gcd(F, dF, guard)
        if len(a) == 1:
            return [(tuple(f), 1)]
        b, c = _divide(F, a), _divide(dF, a)
        d = _sub(c, _deriv(b))
        out, m = [], 1
        while len(b) > 1:
            g = _gcd(b, d, guard) if any(d) else _primitive(b)
            if len(g) > 1:
                out.append((g, m))
            b, c = _divide(b, g), _divide(d, g)
            d = _sub(c, _deriv(b))
            m += 1
        return out
    except OverflowError:
        return [(tuple(f), 1)]


# ---------------------------------------------------------------------- roots
def _log2(x: Fraction) -> float:
    return math.log2(abs(x.numerator)) - math.log2(x.denominator)


def _to_float(x: Fraction, what: str) -> float:
    """A fraction as a float, refused (with the reason) outside [TINY, HUGE]."""
    if x == 0:
        return 0.0
    if not (math.log2(TINY) <= _log2(x) <= math.log2(HUGE)):
        raise InputError(f"{what} of magnitude about 2^{_log2(x):.0f} = 1e{_log2(x) * 0.30103:.0f} "
                         f"is outside the float range this tool works in ({TINY:g} to {HUGE:g})")
    return float(x)


def _balanced(f) -> tuple[np.ndarray, int]:
    """Float coefficients of f(2^e·x)/norm (highest first) with the first and last balanced,
    and e.  Each coefficient is the exact one rounded once."""
    n = len(f) - 1
    e = round((math.log2(abs(f[-1])) - math.log2(abs(f[0]))) / n)
    exact = [Fraction(c) * (Fraction(2) ** (e * (n - i))) for i, c in enumerate(f)]
    top = max(_log2(c) for c in exact if c != 0)
    norm = Fraction(2) ** round(top)
    out = np.array([float(c / norm) for c in exact])
    if any(c != 0 and (o == 0 or abs(o) < 2.0 ** -1000) for c, o in zip(exact, out)):
        raise InputError("expression: the coefficients of one factor span more than the float "
                         "range after scaling; write it in factors")
    return out, e


def _sqrt(x: Fraction) -> float:
    """√x for an exact x ≥ 0 whose square root fits a float even where x itself does not."""
    if x == 0:
        return 0.0
    k = math.floor(_log2(x) / 2)
    return math.ldexp(math.sqrt(float(x / Fraction(4) ** k if k >= 0 else x * Fraction(4) ** -k)), k)


def _factor_roots(f) -> np.ndarray:
    """Roots of the integer polynomial f (no root at 0), in rad/s."""
    n = len(f) - 1
    if n == 1:
        return np.array([_to_float(Fraction(-f[1], f[0]), "expression: a root")], dtype=complex)
    c, e = _balanced(f)
    if n == 2:
        a, b, cc = (Fraction(x) * (Fraction(2) ** (e * (2 - i))) for i, x in enumerate(f))
        b, cc = b / a, cc / a
        disc = b * b - 4 * cc  # exact: no cancellation near a double root
        bf, cf = float(b), float(cc)
        if disc >= 0:
            sq = _sqrt(disc)
            q = -0.5 * (bf + math.copysign(sq, bf if bf != 0 else 1.0))
            r = np.array([q, cf / q if q != 0 else 0.0], dtype=complex)
        else:
            im = 0.5 * _sqrt(-disc)
            r = np.array([complex(-0.5 * bf, im), complex(-0.5 * bf, -im)])
    else:
        r = _poly.roots(c)
    mags = np.abs(r)
    if np.any(mags == 0) or np.any(np.log2(mags) + e > math.log2(HUGE)) or np.any(
            np.log2(mags) + e < math.log2(TINY)):
        big = float(np.max(np.log2(np.maximum(mags, 1e-300))) + e) * 0.30103
        raise InputError(f"expression: a root near 1e{big:.0f} rad/s is outside the float range "
                         f"this tool works in ({TINY:g} to {HUGE:g} rad/s)")
    return np.ldexp(r.real, e) + 1j * np.ldexp(r.imag, e)


def to_rational(v: Exact, expression=None):
    """The :class:`~taumatch.lti.Rational` of an :class:`Exact`.

    The gain refers to the frequency scale 1 rad/s when it fits the float range, else to the
    geometric mean of the roots; a function whose gain fits neither is refused with the reason
    (its values are beyond what a float can hold).
    """
    from .rational import Rational

    if v.gain == 0:
        return Rational([], [], 0.0, expression=expression)
    zeros, poles = [], []
    lead = v.gain
    for factors, out, sign in ((v.num, zeros, 1), (v.den, poles, -1)):
        for f, k in factors.items():
            if f == _S:
                out.extend([0j] * k)
                continue
            for g, m in _square_free(f):
                out.extend(list(_factor_roots(g)) * (m * k))
            lead *= Fraction(f[0]) ** (sign * k)
    n = len(zeros) - len(poles)
    # |H| near its poles and zeros is about the gain at their geometric mean w: refuse a
    # function whose values no float holds, whatever frequency scale its gain refers to
    w = _poly.characteristic_scale(np.array(zeros), np.array(poles))
    g = lead * Fraction(w) ** n
    if not (TINY <= abs(g) <= HUGE):
        size = _log2(g) * 0.30103
        if not zeros and not poles:
            raise InputError(f"expression: its value, about 1e{size:.0f}, is outside the float "
                             f"range this tool works in ({TINY:g} to {HUGE:g})")
        raise InputError(
            f"expression: its magnitude is about 1e{size:.0f} near its poles and zeros "
            f"(w = {w:.3g} rad/s), outside the float range this tool works in ({TINY:g} to "
            f"{HUGE:g}); scale it (e.g. write (a/(s+a))^n rather than 1/(s+a)^n)")
    if n == 0 or TINY <= abs(lead) <= HUGE:
        return Rational(zeros, poles, _to_float(lead, "expression: the gain"), expression=expression)
    return Rational(zeros, poles, float(g), 0, w, expression=expression)

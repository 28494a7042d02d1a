"""A small, safe parser for rational expressions in s.

The grammar is whitelisted — nothing is ever passed to ``eval``::

    expr   := term (("+" | "-") term)*
    term   := unary (("*" | "/") unary | unary)*      (juxtaposition multiplies)
    unary  := ("+" | "-") unary | power
    power  := atom (("^" | "**") unary)?              (integer exponents only)
    atom   := NUMBER | "s" | "(" expr ")"

NUMBER is a decimal with optional exponent and optional SI prefix (``10n``, ``2.2e-9``,
``4.7k``).  An expression written in factors keeps them: the roots of ``(s+a)`` and of
quadratic factors are computed from the factor itself, not from expanded coefficients.

Examples
--------
>>> H = parse("(s+2)/((s+1)^2*(s+3))")
>>> sorted(H.poles.real.tolist()), H.zeros.real.tolist(), H.gain
([-3.0, -1.0, -1.0], [-2.0], 1.0)
>>> parse("1/(1 + s*10n)").poles.real.tolist()
[-100000000.0]
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError
from ..units import PREFIXES
from . import polynomials as _poly

__all__ = ["parse"]

_TOKEN = re.compile(
    r"\s*(?:(?P<num>(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?(?P<prefix>[fpnuµμmkKMGT](?![a-zA-Z]))?)"
    r"|(?P<s>s)|(?P<op>\*\*|[-+*/^()]))"
)
MAX_POWER = 64


@dataclass
class _Value:
    """gain · Π num_factor^k / Π den_factor^k, factors monic polynomials (tuples, highest first)."""

    gain: float = 1.0
    num: dict = field(default_factory=dict)
    den: dict = field(default_factory=dict)

    @classmethod
    def const(cls, c: float) -> _Value:
        return cls(float(c))

    @classmethod
    def poly(cls, coeffs) -> _Value:
        c = np.trim_zeros(np.asarray(coeffs, dtype=float), "f")
        if c.size == 0:
            return cls(0.0)
        if c.size == 1:
            return cls(float(c[0]))
        lead = c[0]
        return cls(float(lead), {tuple((c / lead).tolist()): 1}, {})

    @property
    def is_const(self) -> bool:
        return not self.num and not self.den

    def mul(self, other: _Value) -> _Value:
        num = dict(self.num)
        den = dict(self.den)
        for f, k in other.num.items():
            num[f] = num.get(f, 0) + k
        for f, k in other.den.items():
            den[f] = den.get(f, 0) + k
        # exact cancellation of identical factors
        for f in list(num):
            if f in den:
                c = min(num[f], den[f])
                num[f] -= c
                den[f] -= c
                if not num[f]:
                    del num[f]
                if not den[f]:
                    del den[f]
        return _Value(self.gain * other.gain, num, den)

    def inv(self) -> _Value:
        if self.gain == 0:
            raise InputError("division by zero in the expression")
        return _Value(1.0 / self.gain, dict(self.den), dict(self.num))

    def power(self, n: int) -> _Value:
        if n < 0:
            return self.inv().power(-n)
        if self.gain == 0 and n == 0:
            raise InputError("0^0 is not defined")
        return _Value(self.gain**n, {f: k * n for f, k in self.num.items() if k * n},
                      {f: k * n for f, k in self.den.items() if k * n})

    def add(self, other: _Value) -> _Value:
        if other.gain == 0:
            return self
        if self.gain == 0:
            return other
        common = dict(self.den)
        for f, k in other.den.items():
            common[f] = max(common.get(f, 0), k)
        total = np.zeros(1)
        for v in (self, other):
            p = np.array([v.gain])
            for f, k in v.num.items():
                for _ in range(k):
                    p = np.convolve(p, f)
            for f, k in common.items():
                for _ in range(k - v.den.get(f, 0)):
                    p = np.convolve(p, f)
            total = np.polyadd(total, p)
        out = _Value.poly(_clean(total))
        return out.mul(_Value(1.0, {}, common))

    def to_rational(self):
        from .rational import Rational

        zeros = [r for f, k in self.num.items() for r in _factor_roots(f) for _ in range(k)]
        poles = [r for f, k in self.den.items() for r in _factor_roots(f) for _ in range(k)]
        return Rational(zeros, poles, self.gain)


def _clean(c):
    c = np.asarray(c, dtype=float)
    tol = 1e-14 * np.max(np.abs(c)) if c.size else 0.0
    c = np.where(np.abs(c) <= tol, 0.0, c)
    return c


def _factor_roots(f) -> list:
    c = np.asarray(f, dtype=float)
    if c.size == 2:
        return [complex(-c[1])]
    if c.size == 3:
        return list(_poly._quadratic(1.0, c[1], c[2]))
    return list(_poly.roots(c))


class _Parser:
    def __init__(self, text: str):
        self.text = text
        self.tokens = []
        pos = 0
        while pos < len(text):
            m = _TOKEN.match(text, pos)
            if not m or m.end() == pos:
                if text[pos:].strip() == "":
                    break
                bad = text[pos:].lstrip()[0]
                col = len(text) - len(text[pos:].lstrip())
                raise InputError(
                    f"expression {text!r}: unexpected character {bad!r} at position {col}; "
                    "allowed are numbers (with SI prefix), s, + - * / ^ ** and parentheses"
                )
            kind = m.lastgroup if m.lastgroup != "prefix" else "num"
            if m.group("num") is not None:
                kind = "num"
            self.tokens.append((kind, m.group(kind), m.start(kind)))
            pos = m.end()
        self.i = 0

    def peek(self):
        return self.tokens[self.i] if self.i < len(self.tokens) else (None, None, len(self.text))

    def take(self):
        tok = self.peek()
        self.i += 1
        return tok

    def fail(self, what: str):
        kind, val, pos = self.peek()
        where = f"at position {pos} ({val!r})" if kind else "at the end"
        raise InputError(f"expression {self.text!r}: {what} {where}")

    def parse(self):
        if not self.tokens:
            raise InputError("expression is empty; write e.g. '1/(s+1)'")
        v = self.expr()
        if self.i != len(self.tokens):
            self.fail("unexpected token")
        return v

    def expr(self):
        v = self.term()
        while self.peek()[1] in ("+", "-"):
            op = self.take()[1]
            w = self.term()
            v = v.add(w if op == "+" else w.mul(_Value.const(-1.0)))
        return v

    def _starts_atom(self):
        kind, val, _ = self.peek()
        return kind in ("num", "s") or val == "("

    def term(self):
        v = self.unary()
        while True:
            kind, val, _ = self.peek()
            if val == "*":
                self.take()
                v = v.mul(self.unary())
            elif val == "/":
                self.take()
                v = v.mul(self.unary().inv())
            elif self._starts_atom():
                v = v.mul(self.power())
            else:
                return v

    def unary(self):
        val = self.peek()[1]
        if val in ("+", "-"):
            self.take()
            v = self.unary()
            return v if val == "+" else v.mul(_Value.const(-1.0))
        return self.power()

    def power(self):
        base = self.atom()
        if self.peek()[1] in ("^", "**"):
            self.take()
            e = self.unary()
            if not e.is_const or e.gain != round(e.gain) or abs(e.gain) > MAX_POWER:
                self.fail(f"exponent must be an integer constant up to {MAX_POWER}")
            base = base.power(int(round(e.gain)))
        return base

    def atom(self):
        kind, val, _ = self.peek()
        if kind == "num":
            self.take()
            m = re.match(r"(.*?)([fpnuµμmkKMGT])?$", val)
            number = float(m.group(1)) * (PREFIXES[m.group(2)] if m.group(2) else 1.0)
            if not math.isfinite(number):
                self.fail("number out of range")
            return _Value.const(number)
        if kind == "s":
            self.take()
            return _Value.poly([1.0, 0.0])
        if val == "(":
            self.take()
            v = self.expr()
            if self.peek()[1] != ")":
                self.fail("missing ')'")
            self.take()
            return v
        self.fail("expected a number, s or '('")


def parse(text: str):
    """Parse ``text`` into a :class:`~taumatch.lti.Rational` (raises InputError on bad input)."""
    if not isinstance(text, str):
        raise InputError(f"expression must be text, got {text!r}")
    value = _Parser(text).parse()
    if value.gain == 0 and not value.den:
        from .rational import Rational

        return Rational.constant(0.0)
    return value.to_rational()

"""A small, safe parser for rational expressions in s.

The grammar is whitelisted — nothing is ever passed to ``eval``::

    expr   := term (("+" | "-") term)*
    term   := unary (("*" | "/") unary | unary)*      (juxtaposition multiplies)
    unary  := ("+" | "-") unary | power
    power  := atom (("^" | "**") unary)?              (integer exponents only)
    atom   := NUMBER | "s" | "(" expr ")"

NUMBER is a decimal with optional exponent and optional SI prefix (``10n``, ``2.2e-9``,
``4.7k``).  The text becomes an :class:`Expression`: a tree that keeps what was typed.
Two things are done with the tree, independently of each other:

* :meth:`Expression.to_rational` builds the :class:`~taumatch.lti.Rational` by exact
  rational arithmetic on the numbers as typed (:mod:`.exact`): no coefficient is ever
  dropped for being small beside another, and factors you write are kept, so the roots of
  ``(s+a)`` and of quadratic factors come from the factor itself.
* :meth:`Expression.evaluate` evaluates the tree at complex frequencies in 40-digit
  arithmetic (mpmath), without building any polynomial: the hand check "expression as
  typed vs H(jω)" compares the two, so a wrong parse cannot pass.

Limits, each stated in the error that enforces it: :data:`MAX_LENGTH` characters,
:data:`MAX_NESTING` levels of parentheses, signs and exponents, integer exponents up to
:data:`MAX_POWER`, numerator and denominator degree up to :data:`MAX_DEGREE` (see
:mod:`.exact`), typed numbers of magnitude between :data:`NUMBER_MIN` and
:data:`NUMBER_MAX` (or 0).

Examples
--------
>>> H = parse("(s+2)/((s+1)^2*(s+3))")
>>> sorted(H.poles.real.tolist()), H.zeros.real.tolist(), H.gain
([-3.0, -1.0, -1.0], [-2.0], 1.0)
>>> parse("1/(1 + s*10n)").poles.real.tolist()
[-100000000.0]
>>> parse("1e16/(s^2+2e7*s+1e16)").poles
array([-10000000.+99498743.71066199j, -10000000.-99498743.71066199j])
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from decimal import Decimal, InvalidOperation
from fractions import Fraction

from ..errors import InputError
from ..units import PREFIXES
from .exact import MAX_DEGREE  # the degree limit lives with the exact arithmetic

__all__ = [
    "MAX_DEGREE",
    "MAX_LENGTH",
    "MAX_NESTING",
    "MAX_POWER",
    "Expression",
    "parse",
    "parse_expression",
]

_TOKEN = re.compile(
    r"\s*(?:(?P<num>(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?(?P<prefix>[fpnuµμmkKMGT](?![a-zA-Z]))?)"
    r"|(?P<s>s)|(?P<op>\*\*|[-+*/^()]))"
)
#: Largest integer exponent, in magnitude.
MAX_POWER = 64
#: Longest expression, in characters.
MAX_LENGTH = 10_000
#: Deepest nesting of parentheses, unary signs and exponents together.
MAX_NESTING = 100
#: Typed numbers must be 0 or of a magnitude within [NUMBER_MIN, NUMBER_MAX].
NUMBER_MIN = 1e-300
NUMBER_MAX = 1e300
# Tree nodes are tuples: ("num", Fraction, text), ("s",), ("sum", ((+1|-1, node), ...)),
# ("prod", (("*"|"/", node), ...)), ("neg", node), ("pow", node, int).


@dataclass(frozen=True, eq=False)
class Expression:
    """A parsed expression: the text as typed and its tree.

    Attributes
    ----------
    text : str
        The expression as the user typed it.
    tree : tuple
        The parse tree (numbers held exactly, as :class:`fractions.Fraction`).
    """

    text: str
    tree: tuple

    def to_rational(self):
        """The :class:`~taumatch.lti.Rational` of the expression, by exact arithmetic."""
        from .exact import build, to_rational

        return to_rational(build(self.tree, self.text), self)

    def evaluate(self, s, digits: int = 40) -> list:
        """The expression at complex frequencies ``s`` (rad/s), straight from the tree.

        Each point is computed in ``digits``-digit arithmetic (mpmath, whose exponent range
        is unbounded), so the values neither overflow nor lose a term to rounding.

        Returns
        -------
        list of mpmath.mpc, or None where the expression divides by zero at that point.
        """
        import mpmath

        out = []
        with mpmath.workdps(digits):
            cache: dict = {}
            for sk in s:
                try:
                    out.append(_eval_mp(self.tree, mpmath.mpc(complex(sk)), mpmath, cache))
                except ZeroDivisionError:
                    out.append(None)
        return out


def _eval_mp(node, s, mp, cache):
    kind = node[0]
    if kind == "num":
        key = id(node)
        if key not in cache:
            cache[key] = mp.mpf(node[1].numerator) / node[1].denominator
        return cache[key]
    if kind == "s":
        return s
    if kind == "sum":
        total = mp.mpc(0)
        for sign, child in node[1]:
            v = _eval_mp(child, s, mp, cache)
            total = total + v if sign > 0 else total - v
        return total
    if kind == "prod":
        total = mp.mpc(1)
        for op, child in node[1]:
            v = _eval_mp(child, s, mp, cache)
            if op == "/":
                if v == 0:
                    raise ZeroDivisionError
                total = total / v
            else:
                total = total * v
        return total
    if kind == "neg":
        return -_eval_mp(node[1], s, mp, cache)
    base = _eval_mp(node[1], s, mp, cache)
    if node[2] < 0 and base == 0:
        raise ZeroDivisionError
    return base ** node[2]


def _number(text: str, fail) -> Fraction:
    """The exact value of a typed number (SI prefix included), range-checked."""
    m = re.match(r"(.*?)([fpnuµμmkKMGT])?$", text)
    try:
        mant = Decimal(m.group(1))
    except InvalidOperation:  # pragma: no cover - the token pattern admits only decimals
        fail("cannot read the number")
    value = mant * (Decimal(repr(PREFIXES[m.group(2)])) if m.group(2) else 1)
    if value != 0 and not Decimal(repr(NUMBER_MIN)) <= abs(value) <= Decimal(repr(NUMBER_MAX)):
        fail(f"number {text} is out of range (a number is 0 or its magnitude lies between "
             f"{NUMBER_MIN:g} and {NUMBER_MAX:g})")
    return Fraction(value)


class _Parser:
    def __init__(self, text: str):
        self.text = text
        self.tokens = []
        self.depth = 0
        pos = 0
        while pos < len(text):
            m = _TOKEN.match(text, pos)
            if not m or m.end() == pos:
                if text[pos:].strip() == "":
                    break
                bad = text[pos:].lstrip()[0]
                col = len(text) - len(text[pos:].lstrip())
                raise InputError(
                    f"expression {_short(text)}: unexpected character {bad!r} at position {col}; "
                    "allowed are numbers (with SI prefix), s, + - * / ^ ** and parentheses"
                )
            kind = "num" if m.group("num") is not None else m.lastgroup
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
        raise InputError(f"expression {_short(self.text)}: {what} {where}")

    def _enter(self):
        self.depth += 1
        if self.depth > MAX_NESTING:
            self.fail(f"nesting deeper than {MAX_NESTING} levels (parentheses, signs and "
                      "exponents together)")

    def parse(self):
        if not self.tokens:
            raise InputError("expression is empty; write e.g. '1/(s+1)'")
        node = self.expr()
        if self.i != len(self.tokens):
            self.fail("unexpected token")
        return node

    def expr(self):
        items = [(1, self.term())]
        while self.peek()[1] in ("+", "-"):
            op = self.take()[1]
            items.append((1 if op == "+" else -1, self.term()))
        return items[0][1] if len(items) == 1 else ("sum", tuple(items))

    def _starts_atom(self):
        kind, val, _ = self.peek()
        return kind in ("num", "s") or val == "("

    def term(self):
        items = [("*", self.unary())]
        while True:
            val = self.peek()[1]
            if val in ("*", "/"):
                self.take()
                items.append((val, self.unary()))
            elif self._starts_atom():
                items.append(("*", self.power()))
            else:
                return items[0][1] if len(items) == 1 else ("prod", tuple(items))

    def unary(self):
        val = self.peek()[1]
        if val in ("+", "-"):
            self.take()
            self._enter()
            node = self.unary()
            self.depth -= 1
            return node if val == "+" else ("neg", node)
        return self.power()

    def power(self):
        base = self.atom()
        if self.peek()[1] in ("^", "**"):
            self.take()
            self._enter()
            exponent = self.unary()
            self.depth -= 1
            n = _constant_integer(exponent)
            if n is None or abs(n) > MAX_POWER:
                self.fail(f"exponent must be an integer constant up to {MAX_POWER} in magnitude")
            base = ("pow", base, n)
        return base

    def atom(self):
        kind, val, _ = self.peek()
        if kind == "num":
            self.take()
            return ("num", _number(val, lambda what: self._fail_before(what)), val)
        if kind == "s":
            self.take()
            return ("s",)
        if val == "(":
            self.take()
            self._enter()
            node = self.expr()
            if self.peek()[1] != ")":
                self.fail("missing ')'")
            self.take()
            self.depth -= 1
            return node
        self.fail("expected a number, s or '('")

    def _fail_before(self, what):
        self.i -= 1
        self.fail(what)


def _constant_integer(node):
    """The value of an exponent sub-tree when it is a small integer constant, else None."""
    v = _constant_value(node)
    return v if v is not None and abs(v) <= 10 * MAX_POWER else None


def _constant_value(node):
    kind = node[0]
    if kind == "num":
        v = node[1]
        return int(v) if v.denominator == 1 and abs(v) <= 10 * MAX_POWER else None
    if kind == "neg":
        v = _constant_integer(node[1])
        return None if v is None else -v
    if kind in ("sum", "prod"):
        vals = [(op, _constant_integer(child)) for op, child in node[1]]
        if any(v is None for _, v in vals):
            return None
        if kind == "sum":
            return sum(op * v for op, v in vals)
        total = Fraction(1)
        for op, v in vals:
            if op == "/" and v == 0:
                return None
            total = total / v if op == "/" else total * v
        return int(total) if total.denominator == 1 else None
    if kind == "pow":
        b = _constant_integer(node[1])
        if b is None or (b == 0 and node[2] < 0):
            return None
        v = Fraction(b) ** node[2]  # |b| <= 10·MAX_POWER and |n| <= MAX_POWER: bounded
        return int(v) if v.denominator == 1 else None
    return None


def _short(text: str, limit: int = 60) -> str:
    return repr(text) if len(text) <= limit else repr(text[:limit]) + f" ({len(text)} characters)"


def parse_expression(text: str) -> Expression:
    """Parse ``text`` into an :class:`Expression` (raises InputError on bad input)."""
    if not isinstance(text, str):
        raise InputError(f"expression must be text, got {text!r}")
    if len(text) > MAX_LENGTH:
        raise InputError(f"expression of {len(text)} characters is longer than the limit of "
                         f"{MAX_LENGTH}")
    return Expression(text, _Parser(text).parse())


def parse(text: str):
    """Parse ``text`` into a :class:`~taumatch.lti.Rational` (raises InputError on bad input).

    The Rational carries the :class:`Expression` it came from (``H.expression``), so its
    hand checks can compare it with the text as typed.
    """
    return parse_expression(text).to_rational()

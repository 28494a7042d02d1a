"""The closed-form time function as readable text or LaTeX.

Conjugate pairs are written in real form e^(σt)·(A·cos(ωt) + B·sin(ωt)); the step
u(t) and the impulse δ(t) (and its derivatives, for improper functions) are written out.

Examples
--------
>>> from taumatch.lti import Rational
>>> print(formula(Rational.from_expr("1/(s+2)"), "step"))
y(t) = [0.5 - 0.5·e^(-2·t)]·u(t)
"""

from __future__ import annotations

from math import factorial

from ..errors import InputError
from .rational import Rational

__all__ = ["formula", "input_transform"]


def input_transform(input: str) -> Rational:
    """U(s) for ``impulse``, ``step``, ``ramp`` or ``sine:FREQ`` (FREQ in Hz, engineering notation ok)."""
    from ..units import parse_quantity
    from .responses import sine_input

    kind = input.strip().lower()
    if kind == "impulse":
        return Rational.constant(1.0)
    if kind == "step":
        return Rational([], [0.0], 1.0)
    if kind == "ramp":
        return Rational([], [0.0, 0.0], 1.0)
    if kind.startswith("sine:"):
        return sine_input(parse_quantity(input.split(":", 1)[1], "Hz", field="sine frequency"))
    raise InputError(f"input {input!r}: choose impulse, step, ramp or sine:FREQ (e.g. sine:1k)")


def _num(x: float, digits: int) -> str:
    return f"{x:.{digits}g}"


def _tpow(n: int, latex: bool, var: str = "t") -> str:
    if n == 0:
        return ""
    t = var if n == 1 else (f"{var}^{{{n}}}" if latex else f"{var}^{n}")
    if n == 1:
        return t
    fac = str(factorial(n)) if n <= 12 else f"{n}!"
    return (rf"\frac{{{t}}}{{{fac}}}" if latex else f"{t}/{fac}")


def formula(H: Rational, input: str = "step", digits: int = 6, latex: bool = False) -> str:
    """Text (or LaTeX) of the response of H to the named input.

    Where the partial fractions do not fit a float in physical units (a pole of high order at
    high frequency), the time function is written in τ = w·t (w in rad/s).
    """
    from .partial_fractions import CoefficientOverflow

    Y = H * input_transform(input)
    w = None
    try:
        pf = Y.partial_fractions()
    except CoefficientOverflow:
        w = Y.scale
        pf = Y.normalized(w).partial_fractions()
    var = "t" if w is None else ("\\tau" if latex else "τ")
    mul = r" \cdot " if latex else "·"
    parts = []
    for term in pf.terms:
        p, k, K = term.pole, term.order, term.coefficient * (1.0 if w is None else w)
        if p.imag < 0:
            continue
        tp = _tpow(k - 1, latex, var)
        if p.imag == 0:
            c = K.real
            if c == 0:
                continue
            pieces = [_num(c, digits)]
            if tp:
                pieces.append(tp)
            if p.real != 0:
                pieces.append(rf"e^{{{_num(p.real, digits)} {var}}}" if latex
                              else f"e^({_num(p.real, digits)}·{var})")
            parts.append(mul.join(pieces))
        else:
            sigma, wd = p.real, p.imag
            A, B = 2 * K.real, -2 * K.imag
            trig = []
            if A != 0:
                trig.append(f"{_num(A, digits)}{mul}" + (rf"\cos({_num(wd, digits)} {var})" if latex
                                                         else f"cos({_num(wd, digits)}·{var})"))
            if B != 0:
                trig.append(f"{_num(B, digits)}{mul}" + (rf"\sin({_num(wd, digits)} {var})" if latex
                                                         else f"sin({_num(wd, digits)}·{var})"))
            if not trig:
                continue
            pieces = []
            if tp:
                pieces.append(tp)
            if sigma != 0:
                pieces.append(rf"e^{{{_num(sigma, digits)} {var}}}" if latex
                              else f"e^({_num(sigma, digits)}·{var})")
            pieces.append("(" + " + ".join(trig) + ")")
            parts.append(mul.join(pieces))
    body = " + ".join(parts) if parts else "0"
    body = body.replace("+ -", "- ")
    step = "u(t)"
    if w is None:
        text = (rf"y(t) = \left[{body}\right] {step}" if latex else f"y(t) = [{body}]·{step}")
    else:
        ws = _num(w, digits)
        text = (rf"y(t) = \left[{body}\right] {step}, \quad \tau = {ws} t" if latex
                else f"y(t) = [{body}]·{step}, τ = {ws}·t")
    for n, d in enumerate(pf.direct[::-1]):
        if w is not None:
            d = d * w ** -float(n)  # x^n = s^n / w^n
        if d == 0:
            continue
        delta = "δ(t)" if n == 0 else ("δ'(t)" if n == 1 else f"δ^({n})(t)")
        if latex:
            delta = r"\delta(t)" if n == 0 else rf"\delta^{{({n})}}(t)"
        text += f" + {_num(d, digits)}{mul}{delta}"
    return text.replace("+ -", "- ")

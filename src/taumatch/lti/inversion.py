"""A transfer function written as text, inverted in closed form: what ``taumatch invert``
prints.

:func:`invert` reads the expression (:meth:`Rational.from_expr`), applies the input
(impulse, step, ramp or sine), and gives the polynomial, zero-pole-gain and partial-fraction
forms, the time function as text, the hand checks (the text itself against H(jω), initial
and final value, DC gain, stability, round trip) and, at given times, the response with its
rounding bound.  A closed form that fails its own checks is refused.  Where the forms in
rad/s do not fit a float, they are given in ``x = s/w`` with ``w`` the function's scale.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import ComputationError
from ..units import format_quantity

__all__ = ["Inversion", "invert"]


def _c(z: complex) -> str:
    z = complex(z)
    if z.imag == 0:
        return f"{z.real:.10g}"
    return f"{z.real:.10g}{z.imag:+.10g}j"


def _poly_text(c, var: str = "s") -> str:
    c = np.atleast_1d(np.real_if_close(c)).astype(float)
    n = c.size - 1
    parts = []
    for i, a in enumerate(c):
        if a == 0:
            continue
        k = n - i
        mon = "" if k == 0 else (var if k == 1 else f"{var}^{k}")
        coef = f"{a:.10g}"
        parts.append(coef if not mon else f"{coef}*{mon}")
    return " + ".join(parts).replace("+ -", "- ") or "0"


def _value_text(v: float, bound: float) -> str:
    """A response value with no more digits than its rounding bound supports."""
    if not bound or abs(v) > 1e10 * bound:
        return f"{v:.10g}"
    if abs(v) <= bound:
        return f"0 (± {bound:.1g}, rounding)"
    digits = max(1, math.floor(math.log10(abs(v) / bound)))
    return f"{v:.{digits}g} (± {bound:.1g}, rounding)"


def short(expr: str) -> str:
    """The expression quoted, cut at 60 characters."""
    return repr(expr) if len(expr) <= 60 else repr(expr[:60]) + "..."


def _forms(H):
    """The scale w of the printed forms (1 when they fit a float in rad/s, else H.scale), the
    function in x = s/w, and its partial fractions."""
    from .partial_fractions import CoefficientOverflow

    with np.errstate(over="ignore", invalid="ignore"):
        num, den = H.coeffs()
    try:
        pf = H.partial_fractions()
        if np.all(np.isfinite(num)) and np.all(np.isfinite(den)) and np.isfinite(H.leading_gain):
            return 1.0, H, pf
    except CoefficientOverflow:
        pass
    w = H.scale
    Hn = H.normalized(w)
    return w, Hn, Hn.partial_fractions()


def default_span(Y) -> float:
    """Time span [s] that shows the response of ``Y``: six time constants of the slowest
    decaying pole, five periods of the slowest oscillation, whichever is longer (at most
    1e6 s; 10 s without a pole that sets one)."""
    poles = Y.poles[Y.poles != 0]
    if poles.size == 0:
        return 10.0
    decay = np.abs(poles.real[poles.real != 0])
    osc = np.abs(poles.imag[poles.imag != 0])
    candidates = []
    if decay.size:
        candidates.append(6.0 / decay.min())
    if osc.size:
        candidates.append(2 * np.pi * 5 / osc.min())
    return float(min(max(candidates), 1e6)) if candidates else 10.0


def _refuse_unchecked(expr, checks) -> None:
    """A closed form whose own checks fail is not given: one line saying which and why."""
    bad = [c for c in checks if not c.passed and c.name != "stability"]
    if bad:
        c = bad[0]
        more = f" (and {len(bad) - 1} more checks)" if len(bad) > 1 else ""
        raise ComputationError(f"{short(expr)}: the closed form fails its check '{c.name}'"
                               f" (expected {c.expected}, got {c.got}"
                               + (f"; {c.detail}" if c.detail else "") + f"){more}")


@dataclass(frozen=True, eq=False)
class Inversion:
    """The closed-form inversion of one expression (see the module text).

    Attributes
    ----------
    expression : str
    input : str
        ``impulse``, ``step``, ``ramp`` or ``sine:FREQ``.
    H, Y : Rational
        The transfer function and the response's transform ``H·U``.
    scale : float
        ``w`` of the printed forms [rad/s] (1: the forms are in s).
    Hn : Rational
        ``H`` in ``x = s/w``.
    pf : PartialFractions
        Partial fractions of ``Hn``.
    time_function : str
        y(t) as text.
    checks : tuple of Check
    latex : str or None
        y(t) as LaTeX, when asked for.
    times, values, bounds : ndarray or None
        The response at the times asked for [s], with each value's rounding bound.
    span : float or None
        The picture's time span [s] (None: :func:`default_span`).
    """

    expression: str
    input: str
    H: object
    Y: object
    scale: float
    Hn: object
    pf: object
    time_function: str
    checks: tuple
    latex: str | None = None
    times: np.ndarray | None = None
    values: np.ndarray | None = None
    bounds: np.ndarray | None = None
    span: float | None = None

    def to_dict(self) -> dict:
        num, den = self.Hn.coeffs()
        out = {
            "expression": self.expression,
            "input": self.input,
            **self.H.to_dict(),
            "terms": [t.to_dict() for t in self.pf.terms],
            "direct": self.pf.direct,
            "time_function": self.time_function,
            "checks": [c.to_dict() for c in self.checks],
        }
        if self.scale != 1.0:  # the forms in rad/s do not fit a float: give them in x = s/w
            Hn = self.Hn
            out.update({"x_scale": self.scale, "numerator_in_x": num, "denominator_in_x": den,
                        "zeros_in_x": Hn.zeros, "poles_in_x": Hn.poles, "gain_in_x": Hn.gain})
        else:
            ypf = self.Y.partial_fractions()
            out.update({"response_terms": [t.to_dict() for t in ypf.terms],
                        "response_direct": ypf.direct})
        if self.latex is not None:
            out["time_function_latex"] = self.latex
        if self.times is not None:
            out["times"] = self.times
            out["values"] = self.values
            out["rounding_bounds"] = self.bounds
        return out

    def summary(self) -> str:
        w, Hn, pf = self.scale, self.Hn, self.pf
        num, den = Hn.coeffs()
        var = "s" if w == 1.0 else "x"
        where = ("" if w == 1.0 else
                 f" (in x = s/w, w = {w:.6g} rad/s: the forms in s exceed the float range)")
        lines = [f"H(s) = {self.expression}", "", f"polynomial form{where}:",
                 f"  numerator   {_poly_text(num, var)}", f"  denominator {_poly_text(den, var)}",
                 "", f"zero-pole-gain form{where}:", f"  gain  {Hn.leading_gain:.10g}",
                 "  zeros " + (", ".join(_c(z) for z in Hn.zeros) or "none"),
                 "  poles " + (", ".join(_c(p) for p in Hn.poles) or "none"), "",
                 f"partial fractions{where}:"]
        for term in pf.terms:
            if term.coefficient == 0:
                continue
            power = "" if term.order == 1 else f"^{term.order}"
            lines.append(f"  ({_c(term.coefficient)}) / ({var} - ({_c(term.pole)})){power}")
        if pf.direct.size:
            lines.append(f"  + polynomial part {_poly_text(pf.direct, var)}")
        lines += ["", f"{self.input} response:", "  " + self.time_function]
        if self.latex is not None:
            lines.append("  " + self.latex)
        if self.times is not None:
            lines.append("")
            for tk, vk, bk in zip(self.times, self.values, self.bounds):
                lines.append(f"  y({format_quantity(tk, 's')}) = {_value_text(vk, bk)}")
        lines += ["", "checks:"] + ["  " + c.line() for c in self.checks]
        return "\n".join(lines)

    @property
    def curve(self) -> tuple:
        """``(t, y)``: the response over the picture's span, 2001 points from 0 [s]."""
        from .responses import inverse

        t = np.linspace(0.0, self.span or default_span(self.Y), 2001)
        return t, inverse(self.Y, t)

    def plot(self, ax=None):
        """The response over :attr:`curve`; returns ``(fig, ax)``."""
        from ..plot.response import plot_time_response

        t, y = self.curve
        return plot_time_response(t, y, ax=ax,
                                  title=f"{self.input} response of {short(self.expression)}")


def invert(expr: str, input: str = "impulse", times=None, *, latex: bool = False,
           span: float | None = None) -> Inversion:
    """Invert the rational expression ``expr`` in closed form (see the module text).

    Parameters
    ----------
    expr : str
        A rational expression in s (:meth:`Rational.from_expr`).
    input : str
        ``impulse``, ``step``, ``ramp`` or ``sine:FREQ`` (FREQ in Hz).
    times : array_like, optional
        Times [s] at which to evaluate the response.
    latex : bool
        Give the time function as LaTeX too.
    span : float, optional
        Time span of the picture [s].

    Raises
    ------
    ComputationError
        When the closed form fails one of its own checks (other than stability).
    """
    from .formula import input_transform
    from .rational import Rational
    from .responses import inverse

    H = Rational.from_expr(expr)
    U = input_transform(input)
    Y = H * U
    checks = tuple(H.checks())
    _refuse_unchecked(expr, checks)
    w, Hn, pf = _forms(H)
    text_fn = H.formula(input)
    values = bounds = None
    if times is not None:
        times = np.asarray(times, dtype=float)
        values, bounds = inverse(Y, times, with_bound=True)
    return Inversion(expr, input, H, Y, w, Hn, pf, text_fn, checks,
                     H.formula(input, latex=True) if latex else None, times, values, bounds,
                     span)

"""``taumatch invert``: a transfer function in three forms, its time function and the hand checks."""

from __future__ import annotations

import click
import numpy as np

from ..errors import InputError
from ..units import format_quantity, parse_quantity
from ._common import emit_json, save_figure


def _parse_times(text: str) -> np.ndarray:
    out = []
    for k, item in enumerate(text.split(",")):
        out.append(parse_quantity(item.strip(), "s", field=f"--at item {k + 1}"))
    return np.array(out, dtype=float)


def _default_span(Y) -> float:
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


def _c(z: complex) -> str:
    z = complex(z)
    if z.imag == 0:
        return f"{z.real:.10g}"
    return f"{z.real:.10g}{z.imag:+.10g}j"


def _poly_text(c) -> str:
    c = np.atleast_1d(np.real_if_close(c)).astype(float)
    n = c.size - 1
    parts = []
    for i, a in enumerate(c):
        if a == 0:
            continue
        k = n - i
        mon = "" if k == 0 else ("s" if k == 1 else f"s^{k}")
        coef = f"{a:.10g}"
        parts.append(coef if not mon else f"{coef}*{mon}")
    return " + ".join(parts).replace("+ -", "- ") or "0"


@click.command("invert")
@click.argument("expr")
@click.option("--input", "input_", default="impulse", show_default=True,
              help="Input signal: impulse, step, ramp or sine:FREQ (e.g. sine:1k, Hz).")
@click.option("--at", "at", default=None, metavar="T1,T2,...",
              help="Evaluate the response at these times (s; 1u, 2.5m ... accepted).")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              help="Draw the response to this image file (png, svg, pdf).")
@click.option("--span", default=None, help="Time span of the plot (s); default from the slowest pole.")
@click.option("--latex", is_flag=True, help="Print the time function as LaTeX too.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
def command(expr, input_, at, plot_path, span, latex, as_json):
    """Invert the transfer function EXPR in closed form.

    EXPR is a rational expression in s, e.g. "(s+2)/((s+1)^2*(s+3))" or
    "1/(1 + s*9M*11.5p)"; numbers take SI prefixes (10n = 1e-8). Factors you write
    are kept exactly. Prints the polynomial, zero-pole-gain and partial-fraction
    forms, the time function y(t) for the chosen --input, and the hand checks:
    initial- and final-value theorems, DC gain, stability and the round trip.

    \b
    Examples:
      taumatch invert "768/(s^2+6s+25)^2"
      taumatch invert "1/(s+1)^2" --input step --at 0,1,2
      taumatch invert "1e9/(s+1e9)" --input sine:100M --plot sine.png
    """
    from ..lti import Rational
    from ..lti.formula import input_transform

    H = Rational.from_expr(expr)
    U = input_transform(input_)
    Y = H * U
    pf = H.partial_fractions()
    ypf = Y.partial_fractions()
    checks = H.checks()
    text_fn = H.formula(input_)
    times = _parse_times(at) if at else None
    values = None
    if times is not None:
        from ..lti.responses import evaluate_terms

        values = evaluate_terms(ypf.terms, times)
    if plot_path:
        from ..lti.responses import evaluate_terms
        from ..plot.response import plot_time_response

        t_span = parse_quantity(span, "s", field="--span") if span else _default_span(Y)
        if not t_span > 0:
            raise InputError(f"--span must be positive, got {span!r}")
        t = np.linspace(0.0, t_span, 2001)
        fig, ax = plot_time_response(t, evaluate_terms(ypf.terms, t),
                                     title=f"{input_} response of {expr}")
        save_figure(fig, plot_path)
    num, den = H.coeffs()
    if as_json:
        out = {
            "expression": expr,
            "input": input_,
            **H.to_dict(),
            "terms": [t.to_dict() for t in pf.terms],
            "direct": pf.direct,
            "response_terms": [t.to_dict() for t in ypf.terms],
            "response_direct": ypf.direct,
            "time_function": text_fn,
            "checks": [c.to_dict() for c in checks],
        }
        if latex:
            out["time_function_latex"] = H.formula(input_, latex=True)
        if times is not None:
            out["times"] = times
            out["values"] = values
        emit_json(out)
        return
    lines = [f"H(s) = {expr}", "", "polynomial form:",
             f"  numerator   {_poly_text(num)}", f"  denominator {_poly_text(den)}", "",
             "zero-pole-gain form:", f"  gain  {H.leading_gain:.10g}",
             "  zeros " + (", ".join(_c(z) for z in H.zeros) or "none"),
             "  poles " + (", ".join(_c(p) for p in H.poles) or "none"), "",
             "partial fractions:"]
    for term in pf.terms:
        power = "" if term.order == 1 else f"^{term.order}"
        lines.append(f"  ({_c(term.coefficient)}) / (s - ({_c(term.pole)})){power}")
    if pf.direct.size:
        lines.append(f"  + polynomial part {_poly_text(pf.direct)}")
    lines += ["", f"{input_} response:", "  " + text_fn]
    if latex:
        lines.append("  " + H.formula(input_, latex=True))
    if times is not None:
        lines.append("")
        for tk, vk in zip(times, values):
            lines.append(f"  y({format_quantity(tk, 's')}) = {vk:.10g}")
    lines += ["", "checks:"] + ["  " + c.line() for c in checks]
    click.echo("\n".join(lines))

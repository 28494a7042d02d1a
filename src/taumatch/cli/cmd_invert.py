"""``taumatch invert``: a transfer function in three forms, its time function and the hand checks."""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

import click

from ..errors import ComputationError, InputError
from ..units import format_quantity, parse_quantity
from ._common import emit_json, save_figure

if TYPE_CHECKING:
    import numpy as np


def _parse_times(text: str) -> np.ndarray:
    import numpy as np

    out = []
    for k, item in enumerate(text.split(",")):
        out.append(parse_quantity(item.strip(), "s", field=f"--at item {k + 1}"))
    return np.array(out, dtype=float)


def _default_span(Y) -> float:
    import numpy as np

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


def _value_text(v: float, bound: float) -> str:
    """A response value with no more digits than its rounding bound supports."""
    if not bound or abs(v) > 1e10 * bound:
        return f"{v:.10g}"
    if abs(v) <= bound:
        return f"0 (± {bound:.1g}, rounding)"
    digits = max(1, math.floor(math.log10(abs(v) / bound)))
    return f"{v:.{digits}g} (± {bound:.1g}, rounding)"


def _c(z: complex) -> str:
    z = complex(z)
    if z.imag == 0:
        return f"{z.real:.10g}"
    return f"{z.real:.10g}{z.imag:+.10g}j"


def _poly_text(c, var: str = "s") -> str:
    import numpy as np

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


def _forms(H):
    """The scale w of the printed forms (1 when they fit a float in rad/s, else H.scale), the
    function in x = s/w, and its partial fractions."""
    import numpy as np

    from ..lti.partial_fractions import CoefficientOverflow

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


def _check_plot_path(path) -> None:
    """Refuse a plot file that cannot be written before anything is computed."""
    from pathlib import Path

    from matplotlib.backend_bases import FigureCanvasBase

    p = Path(path)
    kinds = FigureCanvasBase.get_supported_filetypes()
    suffix = p.suffix.lower().lstrip(".")
    if suffix not in kinds:
        raise InputError(f"--plot {path}: cannot draw a {suffix or 'suffix-less'} file; use one of "
                         ".png, .svg, .pdf (or another image type matplotlib writes)")
    if not p.parent.is_dir():
        raise InputError(f"--plot {path}: the folder {p.parent} does not exist")


def _refuse_unchecked(expr, checks) -> None:
    """A closed form whose own checks fail is not printed: one line saying which and why."""
    bad = [c for c in checks if not c.passed and c.name != "stability"]
    if bad:
        c = bad[0]
        more = f" (and {len(bad) - 1} more checks)" if len(bad) > 1 else ""
        raise ComputationError(f"{_short(expr)}: the closed form fails its check '{c.name}'"
                               f" (expected {c.expected}, got {c.got}"
                               + (f"; {c.detail}" if c.detail else "") + f"){more}")


def _short(expr: str) -> str:
    return repr(expr) if len(expr) <= 60 else repr(expr[:60]) + "..."


@click.command("invert", context_settings={"ignore_unknown_options": True})
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
    "1/(1 + s*9M*11.5p)"; numbers take SI prefixes (10n = 1e-8). The numbers are
    used exactly as typed and factors you write are kept, so expanded and factored
    forms give the same function at any frequency scale. Prints the polynomial,
    zero-pole-gain and partial-fraction forms, the time function y(t) for the chosen
    --input, and the hand checks: the text itself against H(jw), initial- and
    final-value theorems, DC gain, stability and the round trip. A closed form that
    fails its own checks is refused (exit status 1) with the reason.

    \b
    Examples:
      taumatch invert "768/(s^2+6s+25)^2"
      taumatch invert "1/(s+1)^2" --input step --at 0,1,2
      taumatch invert "1e9/(s+1e9)" --input sine:100M --plot sine.png
    """
    import numpy as np

    from ..lti import Rational
    from ..lti.formula import input_transform
    from ..lti.responses import inverse

    times = _parse_times(at) if at else None
    t_span = None
    if plot_path:
        _check_plot_path(plot_path)
        if span:
            t_span = parse_quantity(span, "s", field="--span")
            if not t_span > 0:
                raise InputError(f"--span must be positive, got {span!r}")
    H = Rational.from_expr(expr)
    U = input_transform(input_)
    Y = H * U
    checks = H.checks()
    _refuse_unchecked(expr, checks)
    w, Hn, pf = _forms(H)
    text_fn = H.formula(input_)
    values, bounds = inverse(Y, times, with_bound=True) if times is not None else (None, None)
    if plot_path:
        from ..plot.response import plot_time_response

        t = np.linspace(0.0, t_span or _default_span(Y), 2001)
        fig, _ = plot_time_response(t, inverse(Y, t), title=f"{input_} response of {_short(expr)}")
        save_figure(fig, plot_path)
    num, den = Hn.coeffs()
    if as_json:
        out = {
            "expression": expr,
            "input": input_,
            **H.to_dict(),
            "terms": [t.to_dict() for t in pf.terms],
            "direct": pf.direct,
            "time_function": text_fn,
            "checks": [c.to_dict() for c in checks],
        }
        if w != 1.0:  # the forms in rad/s do not fit a float: give them in x = s/w
            out.update({"x_scale": w, "numerator_in_x": num, "denominator_in_x": den,
                        "zeros_in_x": Hn.zeros, "poles_in_x": Hn.poles, "gain_in_x": Hn.gain})
        else:
            ypf = Y.partial_fractions()
            out.update({"response_terms": [t.to_dict() for t in ypf.terms],
                        "response_direct": ypf.direct})
        if latex:
            out["time_function_latex"] = H.formula(input_, latex=True)
        if times is not None:
            out["times"] = times
            out["values"] = values
            out["rounding_bounds"] = bounds
        emit_json(out)
        return
    var = "s" if w == 1.0 else "x"
    where = "" if w == 1.0 else f" (in x = s/w, w = {w:.6g} rad/s: the forms in s exceed the float range)"
    lines = [f"H(s) = {expr}", "", f"polynomial form{where}:",
             f"  numerator   {_poly_text(num, var)}", f"  denominator {_poly_text(den, var)}", "",
             f"zero-pole-gain form{where}:", f"  gain  {Hn.leading_gain:.10g}",
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
    lines += ["", f"{input_} response:", "  " + text_fn]
    if latex:
        lines.append("  " + H.formula(input_, latex=True))
    if times is not None:
        lines.append("")
        for tk, vk, bk in zip(times, values, bounds):
            lines.append(f"  y({format_quantity(tk, 's')}) = {_value_text(vk, bk)}")
    lines += ["", "checks:"] + ["  " + c.line() for c in checks]
    click.echo("\n".join(lines))

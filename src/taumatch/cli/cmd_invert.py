"""``taumatch invert``: a transfer function in three forms, its time function and the hand checks."""

from __future__ import annotations

from typing import TYPE_CHECKING

import click

from ..errors import InputError
from ..units import parse_quantity
from ._common import check_outputs, emit_json, save_figure

if TYPE_CHECKING:
    import numpy as np


def _parse_times(text: str) -> np.ndarray:
    import numpy as np

    out = []
    for k, item in enumerate(text.split(",")):
        out.append(parse_quantity(item.strip(), "s", field=f"--at item {k + 1}"))
    return np.array(out, dtype=float)


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
    from ..lti.inversion import invert

    times = _parse_times(at) if at else None
    t_span = None
    if plot_path:
        check_outputs([], [("--plot", plot_path, "plot")])
        if span:
            t_span = parse_quantity(span, "s", field="--span")
            if not t_span > 0:
                raise InputError(f"--span must be positive, got {span!r}")
    result = invert(expr, input_, times, latex=latex, span=t_span)
    if plot_path:
        fig, _ = result.plot()
        save_figure(fig, plot_path)
    if as_json:
        emit_json(result.to_dict())
        return
    click.echo(result.summary())

"""``taumatch diagnose``: is the divider compensated, and how must the trim move?"""

from __future__ import annotations

import click

from ._common import emit_json, refuse_input, save_figure
from .options import capture_options, chain_facts, divider_options, read_capture


def _percent(value: str) -> float:
    """'1%' or '0.01' → 0.01; a bare number must be a fraction below 1."""
    from ..errors import InputError
    from ..units import parse_quantity

    text = value.strip()
    v = parse_quantity(text, field="--tolerance")
    if not text.endswith("%") and v >= 1:
        raise InputError(f"--tolerance: {value!r} is ambiguous; write a percentage such as "
                         f"'{v:g}%' or a fraction below 1 such as '{v / 100:g}'")
    if not 0 < v < 1:
        raise InputError(f"--tolerance: must lie between 0 and 100 %, got {value!r}")
    return v


@click.command("diagnose")
@click.argument("capture", type=click.Path(exists=True, dir_okay=False))
@capture_options
@divider_options
@click.option("--tolerance", default="1%", show_default=True,
              help="Gain error still counted as compensated (1% or 0.01).")
@click.option("--tol", "tols", multiple=True, metavar="NAME=TOL",
              help="Tolerance of a held or assumed value, e.g. shunt-c=20% or tip-r=50k "
              "(names: tip-r, shunt-r, shunt-c, fixed-c, trimmer, lead-l, lead-r; default: "
              "the chain spec's, else common practice). Repeatable.")
@click.option("--force", is_flag=True,
              help="Give a trim even from a clipped or badly fitted capture (with a warning).")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              help="Draw capture, fit and trimmed prediction to this image file.")
def command(capture, chain_path, tip_r, input_r, shunt_c, tolerance, tols, force, as_json,
            plot_path, **read_opts):
    """Fit the divider to a square-wave CAPTURE and say how to trim it.

    The capture is averaged over all its full periods, the divider model (tip
    R1 ∥ C1 over shunt R2 ∥ C2, with the source edge) is fitted by least squares,
    and the answer is the verdict (over-compensated: peaked corner; under-
    compensated: rounded corner), the gain error with its standard error, and
    how many picofarads to add or remove at the shunt arm (or, equivalently, at
    the tip). Without --chain or resistances, a 10:1 probe on a 1 MΩ input is
    assumed and said so.

    \b
    Examples:
      taumatch diagnose probe.csv
      taumatch diagnose probe.csv --tip-r 9M --input-r 1M --tolerance 0.5% --plot fit.png
      taumatch diagnose probe.csv --chain bench_probe.toml --json
    """
    refuse_input(plot_path, [capture] + ([chain_path] if chain_path else []), "--plot")
    from ..diagnosis import diagnose

    tol = _percent(tolerance)
    cap = read_capture(capture, read_opts)
    facts = chain_facts(chain_path)
    d = diagnose(cap, read_opts.get("channel"), tip_r=tip_r, input_r=input_r, shunt_c=shunt_c,
                 tolerance=tol, chain=facts, force=force, tolerances=tols)
    if plot_path:
        fig, _ = d.plot()
        save_figure(fig, plot_path)
    if as_json:
        emit_json({**d.to_dict(), "capture_notes": list(cap.notes)})
    else:
        click.echo(d.summary())
        for line in cap.notes:
            click.echo(f"note: {line}")
    if d.refused:
        click.echo(f"taumatch: warning: forced past a refusal: {d.refused}", err=True)

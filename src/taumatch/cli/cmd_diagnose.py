"""``taumatch diagnose``: is the divider compensated, and how must the trim move?"""

from __future__ import annotations

import click

from ._common import emit_json, refuse_input, save_figure
from .options import capture_options, chain_facts, divider_options, read_capture
from .progress import busy, progress_wanted
from .reporting import command_inputs, report_option, report_title, start_report


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
@click.option("--force", is_flag=True,
              help="Give a trim even from a clipped or badly fitted capture (with a warning).")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              help="Draw capture, fit and trimmed prediction to this image file.")
@report_option
@click.option("--slow", "slow_path", type=click.Path(exists=True, dir_okay=False), default=None,
              help="Fast edge: a 1 kHz square of the same probe, for the low-frequency balance.")
@click.option("--spec", "spec_out", type=click.Path(dir_okay=False), default=None,
              help="Fast edge: write the fitted chain (as found) to this chain spec.")
@click.option("--trimmed", is_flag=True, help="With --spec: write the chain as adjusted.")
@click.pass_context
def command(ctx, capture, chain_path, tip_r, input_r, shunt_c, tolerance, force, as_json, plot_path,
            report_path, slow_path, spec_out, trimmed, **read_opts):
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
      taumatch diagnose edge.csv --chain probe.toml --slow probe-1khz.csv --spec found.toml

    With --chain, a capture without full periods (a single fast step), or whose period
    is shorter than the divider's time constant, is a fast edge: the chain's marked
    adjustments and the parasitics the edge resolves are fitted on the exact chain
    model, and each adjustment gets the value that flattens the step.
    """
    refuse_input(plot_path, [capture] + ([chain_path] if chain_path else []), "--plot")
    start_report(report_path, [capture, chain_path])
    from ..diagnosis import diagnose

    tol = _percent(tolerance)
    show = progress_wanted(as_json)
    with busy(f"reading {capture}", show):
        cap = read_capture(capture, read_opts)
    from .edge import route  # a fast-edge capture (docs/fast-edge.md) goes its own way

    if route(cap, capture, chain_path, slow_path, spec_out, trimmed, force=force,
             as_json=as_json, plot_path=plot_path, read_opts=read_opts, report_path=report_path,
             show=show):
        return
    facts = chain_facts(chain_path)
    with busy("averaging and fitting", show):
        d = diagnose(cap, read_opts.get("channel"), tip_r=tip_r, input_r=input_r,
                     shunt_c=shunt_c, tolerance=tol, chain=facts, force=force)
    if plot_path:
        fig, _ = d.plot()
        save_figure(fig, plot_path)
    if report_path:
        from ..report import diagnosis_report, write_report

        write_report(diagnosis_report(d, title=report_title("Compensation diagnosis", capture),
                                      inputs=command_inputs(ctx), notes=cap.notes,
                                      cautions=_chain_cautions(chain_path)), report_path)
    if as_json:
        emit_json({**d.to_dict(), "capture_notes": list(cap.notes)})
    else:
        click.echo(d.summary())
        for line in cap.notes:
            click.echo(f"note: {line}")
    if d.refused:
        click.echo(f"taumatch: warning: forced past a refusal: {d.refused}", err=True)


def _chain_cautions(chain_path) -> list:
    """High-voltage cautions of the chain spec, if one was given (for the report)."""
    if not chain_path:
        return []
    from ..chain import load
    from ..chain.cautions import cautions

    return list(cautions(load(chain_path)))

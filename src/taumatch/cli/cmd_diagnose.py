"""``taumatch diagnose``: is the divider compensated, and how must the trim move?"""

from __future__ import annotations

import click

from ._common import check_outputs, emit_json, save_figure, write_text
from .options import capture_options, chain_facts, divider_options, read_capture, spec_output
from .progress import busy, progress_wanted
from .reporting import command_inputs, report_option, report_title, start_report


def _percent(value: str) -> float:
    """'1%' or '0.01' → 0.01; a bare number must be a fraction below 1."""
    from ..errors import InputError
    from ..units import parse_quantity

    text = value.strip()
    v = parse_quantity(text, field="--accept")
    if not text.endswith("%") and v >= 1:
        raise InputError(f"--accept: {value!r} is ambiguous; write a percentage such as "
                         f"'{v:g}%' or a fraction below 1 such as '{v / 100:g}'")
    if not 0 < v < 1:
        raise InputError(f"--accept: must lie between 0 and 100 %, got {value!r}")
    return v


#: options that mean something to the 1 kHz diagnosis only: a fast edge refuses them when typed
_SQUARE_ONLY = (("tip_r", "--tip-r"), ("shunt_r", "--shunt-r"), ("shunt_c", "--shunt-c"),
                ("accept", "--accept"), ("tols", "--tol"))


@click.command("diagnose")
@click.argument("capture", type=click.Path(exists=True, dir_okay=False))
@capture_options
@divider_options
@click.option("--accept", default="1%", show_default=True,
              help="Gain error accepted as compensated (1% or 0.01); component tolerances "
              "are --tol.")
@click.option("--tol", "tols", multiple=True, metavar="NAME=TOL",
              help="Tolerance of a held or assumed value, e.g. shunt-c=20% or tip-r=50k "
              "(names: tip-r, shunt-r, shunt-c, fixed-c, trimmer, lead-l, lead-r; default: "
              "the chain spec's, else common practice). Repeatable.")
@click.option("--spec", "spec_path", type=click.Path(dir_okay=False), default=None,
              help="Write the fitted chain as a chain spec (for predict, bandwidth, trim, "
              "netlist).")
@click.option("--trimmed", is_flag=True,
              help="With --spec: write the chain as it will be after the trim.")
@click.option("--force", is_flag=True,
              help="Give a trim even from a clipped or badly fitted capture (with a warning).")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              help="Draw capture, fit and trimmed prediction to this image file.")
@report_option
@click.option("--slow", "slow_path", type=click.Path(exists=True, dir_okay=False), default=None,
              help="Fast edge: a 1 kHz square of the same probe, for the low-frequency balance.")
@click.pass_context
def command(ctx, capture, chain_path, tip_r, shunt_r, shunt_c, accept, tols, spec_path, trimmed,
            force, as_json, plot_path, report_path, slow_path, **read_opts):
    """Fit the divider to a square-wave CAPTURE and say how to trim it.

    The capture is averaged over all its full periods, the divider model (tip
    R1 ∥ C1 over shunt R2 ∥ C2, with the source edge) is fitted by least squares,
    and the answer is the verdict (over-compensated: peaked corner; under-
    compensated: rounded corner), the gain error, and how many picofarads to add
    or remove at the shunt arm (or, equivalently, at the tip), each with an
    uncertainty that counts the noise and every value held or assumed, at its
    tolerance (--tol, the chain spec, or common practice). Without --chain or
    resistances, a 10:1 probe on a 1 MΩ input is assumed and said so.

    \b
    Examples:
      taumatch diagnose probe.csv
      taumatch diagnose probe.csv --tip-r 9M --shunt-r 1M --accept 0.5% --plot fit.png
      taumatch diagnose probe.csv --shunt-c 95p --tol shunt-c=5% --tol tip-r=1%
      taumatch diagnose probe.csv --chain bench_probe.toml --json
      taumatch diagnose probe.csv --spec found.toml
      taumatch diagnose probe.csv --spec trimmed.toml --trimmed
      taumatch diagnose edge.csv --chain probe.toml --slow probe-1khz.csv --spec found.toml

    With --chain, a capture without full periods (a single fast step), or whose period
    is shorter than the divider's time constant, is a fast edge: the chain's marked
    adjustments and the parasitics the edge resolves are fitted on the exact chain
    model, and each adjustment gets the value that flattens the step
    (docs/fast-edge.md).
    """
    from ..errors import InputError

    inputs = [capture, chain_path, slow_path]
    check_outputs(inputs, [("--plot", plot_path, "plot"), ("--spec", spec_path, "toml"),
                           ("--report", report_path, "html")])
    spec_out = spec_output(spec_path, plot_path)
    if trimmed and spec_out is None:
        raise InputError("--trimmed: it says how to write --spec; give --spec FILE.toml too")
    start_report(report_path, [capture, chain_path])
    from .fit_import import import_fit_library

    import_fit_library(pictures=bool(plot_path or report_path))
    from ..diagnosis import diagnose

    band = _percent(accept)
    show = progress_wanted(as_json)
    with busy(f"reading {capture}", show):
        cap = read_capture(capture, read_opts)
    from .edge import route  # a fast-edge capture (docs/fast-edge.md) goes its own way

    typed = [flag for name, flag in _SQUARE_ONLY
             if ctx.get_parameter_source(name) is click.core.ParameterSource.COMMANDLINE]
    if route(cap, capture, chain_path, slow_path, spec_out, trimmed, force=force,
             as_json=as_json, plot_path=plot_path, read_opts=read_opts, report_path=report_path,
             show=show, square_only=typed):
        return
    facts = chain_facts(chain_path)
    with busy("averaging and fitting", show):
        d = diagnose(cap, read_opts.get("channel"), tip_r=tip_r, shunt_r=shunt_r,
                     shunt_c=shunt_c, accept=band, chain=facts, force=force, tolerances=tols)
    if spec_out is not None:
        from ..chain.write import dumps
        from ..fitted_chain import fitted_chain

        chain, comment = fitted_chain(d, trimmed=trimmed, source_name=capture)
        write_text(spec_out, dumps(chain, comment), option="--spec")
    if plot_path:
        fig, _ = d.plot()
        save_figure(fig, plot_path)
    if report_path:
        from ..report import diagnosis_report, write_report

        write_report(diagnosis_report(d, title=report_title("Compensation diagnosis", capture),
                                      inputs=command_inputs(ctx), notes=cap.notes,
                                      cautions=list(d.cautions)), report_path)
    if as_json:
        extra = {"spec": str(spec_out)} if spec_out is not None else {}
        emit_json({**d.to_dict(), "capture_notes": list(cap.notes), **extra})
    else:
        click.echo(d.summary())
        for line in cap.notes:
            click.echo(f"note: {line}")
        if spec_out is not None:
            click.echo(f"chain spec written to {spec_out}"
                       + (" (as it will be after the trim)" if trimmed else " (as found)"))
    if d.refused:
        click.echo(f"taumatch: warning: forced past a refusal: {d.refused}", err=True)


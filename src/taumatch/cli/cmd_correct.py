"""``taumatch correct``: undo the measured mis-compensation of a capture in software."""

from __future__ import annotations

import click

from ._common import Quantity, check_outputs, emit_json, save_figure, write_text
from .progress import busy, progress_wanted
from .options import capture_options, chain_facts, divider_options, read_capture


@click.command("correct")
@click.argument("capture", type=click.Path(exists=True, dir_okay=False))
@capture_options
@click.option("-o", "--output", "out_path", type=click.Path(dir_okay=False), required=True,
              help="Corrected capture to write (CSV, same time base as the input).")
@divider_options
@click.option("--bandwidth", type=Quantity("Hz", positive=True, quantity="frequency"), default=None,
              help="Roll-off of the noise regularisation (default: the bandwidth of the measured edge).")
@click.option("--no-regularise", is_flag=True,
              help="Apply the bare inverse even where it amplifies noise.")
@click.option("--force", is_flag=True, help="Correct even from a capture the diagnosis refuses.")
@click.option("--json", "as_json", is_flag=True, help="Print what was done as JSON.")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              help="Draw the capture before and after the correction.")
def command(capture, out_path, chain_path, tip_r, shunt_r, shunt_c, bandwidth, no_regularise,
            force, as_json, plot_path, **read_opts):
    """Filter CAPTURE by the compensated divider's response over the fitted one.

    The divider is fitted as in `taumatch diagnose`; the capture is then passed
    through (1 + s·τp)/(1 + s·τ1), which removes the low-frequency pole-zero pair of
    the mis-compensation exactly and is causal and stable. Where the correction
    would boost high frequencies (under-compensated), a roll-off limits the noise
    gain. The output keeps the input's time base; its header says what was done.
    The input file is never modified.

    \b
    Example:
      taumatch correct probe.csv -o probe-corrected.csv --plot corrected.png
    """
    from ..correct import correct_capture
    from ..diagnosis import diagnose

    inputs = [capture] + ([chain_path] if chain_path else [])
    check_outputs(inputs, [("--output", out_path, "text"), ("--plot", plot_path, "plot")])
    from .fit_import import import_fit_library

    import_fit_library(pictures=bool(plot_path))
    with busy("fitting and correcting the capture", progress_wanted(as_json)):
        cap = read_capture(capture, read_opts)
        facts = chain_facts(chain_path)
        name = cap.channel_name(read_opts.get("channel"))
        d = diagnose(cap, name, tip_r=tip_r, shunt_r=shunt_r, shunt_c=shunt_c, chain=facts,
                     force=force)
        res = correct_capture(cap, d, name, bandwidth=bandwidth, regularise=not no_regularise,
                              source=capture)
    write_text(out_path, res.csv_text(), option="--output")
    if plot_path:
        fig, _ = res.plot()
        save_figure(fig, plot_path)
    if as_json:
        emit_json({"output": out_path, **res.to_dict()})
    else:
        click.echo(f"wrote {out_path}: {res.summary()}")

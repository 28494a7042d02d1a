"""``taumatch bandwidth``: bandwidth, rise time, loading and ringing of a chain spec."""

from __future__ import annotations

import click

from ._common import Quantity, check_outputs, emit_result, save_figure
from .progress import busy, progress_wanted
from .reporting import command_inputs, report_option, report_title, start_report


@click.command("bandwidth")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--overshoot", type=Quantity(None, positive=True), default="5%", show_default=True,
              help="Overshoot the ringing-damping figures aim at (5%, 0.05).")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              help="Draw |H(f)| and the step to this image file (png, svg, pdf).")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
@report_option
@click.pass_context
def command(ctx, spec, overshoot, plot_path, as_json, report_path):
    """Bandwidth, rise time, loading and ringing of the chain in SPEC (TOML).

    The -3 dB bandwidth comes from the exact response (cables exact); the 10-90 %
    rise time from the closed-form step (cables as pi ladders, section count chosen
    to hold 0.1 % up to three times the bandwidth). Also: rise time x bandwidth, the
    root-sum-of-squares estimate from the parts and its error, the input R || C and
    the edge slowing at the probe point, and the ground-lead ringing with the series
    resistance or lead length that damps it to --overshoot.

    \b
    Example:
      taumatch bandwidth examples/bench-probe.toml --json
    """
    check_outputs([spec], [("--plot", plot_path, "plot"), ("--report", report_path, "html")])
    start_report(report_path, [spec])
    from ..analysis import chain_figures
    from ..chain import load
    from ..chain.cautions import cautions
    from ..errors import InputError

    if not 0 < overshoot < 1:
        raise InputError(f"option --overshoot: must be between 0 and 100 %, got {overshoot!r}")
    chain = load(spec)
    with busy("computing the chain's figures", progress_wanted(as_json)):
        figs = chain_figures(chain, target_overshoot=overshoot)
    notes = cautions(chain)
    if plot_path:
        fig, _ = figs.plot()
        save_figure(fig, plot_path)
    if report_path:
        from ..report import chain_report, write_report

        write_report(chain_report(figs, title=report_title("Chain figures", spec),
                                  inputs=command_inputs(ctx), cautions=notes), report_path)
    emit_result(figs, notes, as_json)

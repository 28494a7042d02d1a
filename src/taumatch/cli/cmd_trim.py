"""``taumatch trim``: the value of the adjustable field that compensates the chain."""

from __future__ import annotations

import click

from ._common import emit_result, refuse_input, save_figure


@click.command("trim")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--part", type=int, default=None,
              help="Trim this part (number from 1) instead of the spec's adjust.")
@click.option("--field", default=None, help="Field of --part to trim (default c).")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              help="Draw the square-wave (or step) response before and after the trim.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
def command(spec, part, field, plot_path, as_json):
    """Required value of the trimmer in SPEC so that HF and DC gain are equal.

    Computed from the network reduced to its divider (cables as their capacitance,
    inductors shorted, front end bypassed), not from the two-arm formula. Says
    whether the chain is over- or under-compensated now, the change, and whether
    the value lies in the trimmer's range (min/max in the spec).

    \b
    Example:
      taumatch trim examples/mistrimmed-probe.toml
    """
    refuse_input(plot_path, [spec], "--plot")
    from ..analysis.trim import trim
    from ..chain import load
    from ..chain.cautions import cautions
    from ..errors import InputError

    if field is not None and part is None:
        raise InputError("option --field needs --part")
    chain = load(spec)
    result = trim(chain, part=part, field=field)
    notes = cautions(chain)
    if plot_path:
        from ..analysis.predict import trim_prediction

        fig, _ = trim_prediction(chain, result).plot()
        save_figure(fig, plot_path)
    emit_result(result, notes, as_json)

"""``taumatch predict``: the chain's step, square-wave or sine response, closed form."""

from __future__ import annotations

import click

from ._common import Quantity, emit_result, refuse_input, save_figure, write_text
from .progress import busy, progress_wanted


@click.command("predict")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("--input", "input_", default="step", show_default=True,
              help="step, square (the source's period) or sine:FREQ (e.g. sine:10M).")
@click.option("--trimmed", is_flag=True, help="Apply the trim of the adjustable field first.")
@click.option("--points", type=int, default=1000, show_default=True, help="Number of samples.")
@click.option("--t-end", "t_end", type=Quantity("s", positive=True), default=None,
              help="End of the time window (s); default from the chain.")
@click.option("--csv", "csv_path", type=click.Path(dir_okay=False), default=None,
              help="Write t_s,v_V to this file (atomically).")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              help="Draw the waveform to this image file.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
def command(spec, input_, trimmed, points, t_end, csv_path, plot_path, as_json):
    """Predicted waveform at the instrument for the chain in SPEC.

    Closed form from the partial fractions of the chain's transfer function, the
    source edge and amplitude included, with the hand checks (initial and final
    value, round trip). --trimmed applies the trim first.

    \b
    Examples:
      taumatch predict examples/bench-probe.toml --input square --csv out.csv
      taumatch predict examples/mistrimmed-probe.toml --input square --trimmed --json
    """
    refuse_input(csv_path, [spec], "--csv")
    refuse_input(plot_path, [spec], "--plot")
    from ..analysis.predict import predict
    from ..chain import load
    from ..chain.cautions import cautions
    from ..errors import InputError
    from .options import parse_waveform

    kind, freq = parse_waveform(input_)
    if points < 2:
        raise InputError(f"option --points: must be at least 2, got {points}")
    chain = load(spec)
    with busy("computing the predicted waveform", progress_wanted(as_json)):
        result = predict(chain, kind, freq, trimmed=trimmed, points=points, t_end=t_end)
    notes = cautions(chain, kind, freq)
    if csv_path:
        write_text(csv_path, result.csv_text())
    if plot_path:
        fig, _ = result.plot()
        save_figure(fig, plot_path)
    emit_result(result, notes, as_json)

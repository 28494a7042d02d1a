"""``taumatch measure``: pulse metrics of a square-wave capture."""

from __future__ import annotations

import math

import click

from ..units import format_quantity
from ._common import Quantity, check_outputs, emit_json, save_figure
from .progress import busy, progress_wanted

__all__ = ["command"]

_HELP = """Measure the steps in CAPTURE: levels, rise and fall time, overshoot, settling.

CAPTURE is an instrument export: CSV, TSV or semicolon text (metadata lines, a header
with units such as "Time (s)" or "CH1 [mV]", decimal commas, comments and CRLF are
recognised), a NumPy .npy array (column 0 time) or an .npz archive (arrays named t or
time plus channels).  Run with --json to see what was found; see docs/captures.md.

All full periods are averaged, aligned on their rising edges to a fraction of a sample,
before measuring; noise falls as the square root of the number of periods.  Levels
follow IEEE Std 181-2011: the histogram of the samples is split in two and each state
is its half's mode (or mean, with --levels mean).  Rise and fall times are 10-90 %;
overshoot and undershoot are in % of the amplitude; settling is from the 50 % crossing
into a band around the final level.

\b
Examples:
  taumatch measure probe.csv
  taumatch measure scope.txt --channel CH2 --settle-band 1%
  taumatch measure export.csv --decimal , --delimiter ";" --json
  taumatch measure samples.npy --sample-interval 2n --plot step.png

Warnings flag clipping, too few periods, edges faster than the sampling, plateaus too
short to settle, tilt (AC coupling) and low signal-to-noise ratio.
"""


def _fmt(value, unit):
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return "n/a"
    return format_quantity(value, unit)


@click.command("measure", help=_HELP)
@click.argument("capture", type=click.Path(dir_okay=False))
@click.option("--channel", metavar="NAME", default=None,
              help="Channel to measure, by name or number (CH2 or 2; default: the only one, or the one with a step).")
@click.option("--delimiter", metavar="CHAR", default=None,
              help="Cell delimiter: ',', ';', 'tab', '|' or 'whitespace' (default: sniffed).")
@click.option("--decimal", type=click.Choice([".", ","]), default=None,
              help="Decimal mark (default: sniffed).")
@click.option("--time-column", metavar="NAME|INDEX", default=None,
              help="Column holding time, by name or 0-based index (default: sniffed).")
@click.option("--sample-interval", type=Quantity("s", positive=True), default=None,
              metavar="DT", help="Sample interval, e.g. 1n or '2 us': build time from it "
              "instead of a time column.")
@click.option("--levels", type=click.Choice(["mode", "mean"]), default="mode",
              show_default=True, help="State-level method (IEEE Std 181 histogram).")
@click.option("--settle-band", type=Quantity(positive=True, quantity="settle_band"), default="2%", show_default=True,
              metavar="BAND", help="Settling band around the final level, e.g. 2% or 0.01.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object.")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              metavar="FILE", help="Save a picture of the averaged period (.png, .svg, .pdf).")
def command(capture, channel, delimiter, decimal, time_column, sample_interval, levels,
            settle_band, as_json, plot_path):
    check_outputs([capture], [("--plot", plot_path, "plot")])
    from ..capture import read
    from ..errors import InputError
    from ..pulse import measure

    if delimiter is not None and delimiter.lower() == "tab":
        delimiter = "\t"
    if settle_band >= 0.5:
        raise InputError(f"option --settle-band: must be under 50 %, got {settle_band!r}")
    with busy("reading and measuring the capture", progress_wanted(as_json)):
        cap = read(capture, channel, delimiter=delimiter, decimal=decimal,
                   time_column=time_column, sample_interval=sample_interval)
        result = measure(cap, channel, levels=levels, settle_band=settle_band)
    if plot_path:
        fig, _ = result.plot()
        save_figure(fig, plot_path)
    if as_json:
        emit_json({**result.to_dict(), "capture_notes": list(cap.notes)})
        return
    click.echo(result.summary())
    for line in cap.notes:
        click.echo(f"note: {line}")

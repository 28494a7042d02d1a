"""The options every command that reads a capture shares, and the read itself."""

from __future__ import annotations

import click

from ._common import Quantity

__all__ = ["capture_options", "read_capture"]


def capture_options(fn):
    """Add --channel, --delimiter, --decimal, --time-column and --sample-interval."""
    opts = [
        click.option("--channel", metavar="NAME", default=None,
                     help="Channel to use (default: the only one, or the one with a step)."),
        click.option("--delimiter", metavar="CHAR", default=None,
                     help="Cell delimiter: ',', ';', 'tab', '|' or 'whitespace' (default: sniffed)."),
        click.option("--decimal", type=click.Choice([".", ","]), default=None,
                     help="Decimal mark (default: sniffed)."),
        click.option("--time-column", metavar="NAME|INDEX", default=None,
                     help="Column holding time, by name or 0-based index (default: sniffed)."),
        click.option("--sample-interval", type=Quantity("s", positive=True), default=None,
                     metavar="DT", help="Sample interval (e.g. 1n): build time from it."),
    ]
    for opt in reversed(opts):
        fn = opt(fn)
    return fn


def read_capture(path, opts: dict):
    """Read a capture with the shared options (a name-or-index time column is resolved)."""
    from ..capture import read

    tc = opts.get("time_column")
    if tc is not None and str(tc).isdigit():
        tc = int(tc)
    delim = opts.get("delimiter")
    if delim == "tab":
        delim = "\t"
    return read(path, opts.get("channel"), delimiter=delim, decimal=opts.get("decimal"),
                time_column=tc, sample_interval=opts.get("sample_interval"))

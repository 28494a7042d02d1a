"""Options shared by several commands: reading a capture, and the divider it was taken through."""

from __future__ import annotations

import click

from ._common import Quantity

__all__ = ["capture_options", "chain_facts", "divider_options", "parse_waveform", "read_capture",
           "spec_output"]


def capture_options(fn):
    """Add --channel, --delimiter, --decimal, --time-column and --sample-interval."""
    opts = [
        click.option("--channel", metavar="NAME", default=None,
                     help="Channel to use, by name or number (CH2 or 2; default: the only one, or the one with a step)."),
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

    tc = opts.get("time_column")  # a name, or a 0-based index in ASCII digits
    delim = opts.get("delimiter")
    if delim == "tab":
        delim = "\t"
    return read(path, opts.get("channel"), delimiter=delim, decimal=opts.get("decimal"),
                time_column=tc, sample_interval=opts.get("sample_interval"))


def divider_options(fn):
    """Add --chain, --tip-r, --shunt-r and --shunt-c (the divider a capture was taken through)."""
    opts = [
        click.option("--chain", "chain_path", type=click.Path(exists=True, dir_okay=False),
                     default=None, help="Chain spec (TOML) giving the resistances, the shunt "
                     "capacitance and the trimmer."),
        click.option("--tip-r", type=Quantity("ohm", positive=True), default=None,
                     help="Tip-arm resistance R1, e.g. 9M (default 9 MΩ, or from --chain)."),
        click.option("--shunt-r", type=Quantity("ohm", positive=True), default=None,
                     help="Shunt-arm resistance R2, usually the instrument input, e.g. 1M "
                     "(default 1 MΩ, or from --chain)."),
        click.option("--shunt-c", type=Quantity("F", positive=True), default=None,
                     help="Nominal shunt capacitance, held when the capture cannot fix it "
                     "(default 110p)."),
    ]
    for opt in reversed(opts):
        fn = opt(fn)
    return fn


def chain_facts(chain_path):
    """The two-arm facts of a chain spec, or None without one."""
    if not chain_path:
        return None
    from ..chain_facts import facts_from_spec

    return facts_from_spec(chain_path)


def spec_output(path, plot_path):
    """Check a chain spec's output path (--spec) before anything is computed."""
    from pathlib import Path

    from ..errors import InputError

    if path is None:
        return None
    p = Path(path)
    if p.suffix.lower() != ".toml":
        raise InputError(f"--spec {path}: a chain spec is TOML; name a .toml file")
    if not p.parent.is_dir():
        raise InputError(f"--spec {path}: the folder {p.parent} does not exist")
    if plot_path is not None and Path(plot_path).resolve() == p.resolve():
        raise InputError(f"--spec {path}: the same file as --plot; choose another")
    return p


def parse_waveform(text: str):
    """``--input``: ``"step"``, ``"square"`` or ``"sine:FREQ"`` -> (kind, frequency in Hz or
    None)."""
    from ..errors import InputError
    from ..units import parse_quantity

    if text in ("step", "square"):
        return text, None
    if isinstance(text, str) and text.startswith("sine:"):
        f = parse_quantity(text[5:], "Hz", field="--input sine frequency")
        if not f > 0:
            raise InputError(f"--input: sine frequency must be positive, got {text[5:]!r}")
        return "sine", f
    raise InputError(f"--input: must be step, square or sine:FREQ (e.g. sine:1M), got {text!r}")

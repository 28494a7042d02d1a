"""``taumatch netlist``: the chain as a deck in the widely used SPICE text format."""

from __future__ import annotations

import click

from ._common import emit_json, refuse_input, write_text


@click.command("netlist")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("-o", "--output", "out_path", type=click.Path(dir_okay=False), required=True,
              help="Deck file to write (atomically).")
@click.option("--sections", type=int, default=None,
              help="Pi sections per cable (default: chosen as for the time domain).")
@click.option("--json", "as_json", is_flag=True, help="Print what was written as JSON.")
def command(spec, out_path, sections, as_json):
    """Write the chain in SPEC as a SPICE-format deck.

    R, C, L and E cards, the source as a V card with PULSE (from the source spec)
    and AC 1, .tran and .ac lines and a comment header; cables written out as pi
    sections; the source edge and front end as the behavioural E-R-C cards taumatch
    models them with.

    \b
    Example:
      taumatch netlist examples/bench-probe.toml -o bench-probe.cir
    """
    refuse_input(out_path, [spec], "-o")
    from ..chain import load
    from ..chain.cautions import cautions
    from ..chain.netlist import deck
    from ..errors import InputError

    if sections is not None and sections < 1:
        raise InputError(f"option --sections: must be at least 1, got {sections}")
    chain = load(spec)
    d = deck(chain, sections)
    write_text(out_path, d.text, option="-o")
    notes = cautions(chain)
    if as_json:
        emit_json({"output": out_path, **d.to_dict(), **({"cautions": notes} if notes else {})})
        return
    click.echo(f"wrote {out_path}: {d.summary()}")
    for line in notes:
        click.echo(f"caution: {line}")

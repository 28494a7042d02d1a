"""``taumatch netlist``: the chain as a deck in the widely used SPICE text format."""

from __future__ import annotations

import click

from ._common import check_outputs, emit_json, write_text


@click.command("netlist")
@click.argument("spec", type=click.Path(dir_okay=False))
@click.option("-o", "--output", "out_path", type=click.Path(dir_okay=False), required=True,
              help="Deck file to write (atomically).")
@click.option("--sections", type=int, default=None,
              help="Pi sections per cable, 1 to 2000 (default: chosen as for the time domain).")
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
    check_outputs([spec], [("-o", out_path, "text")])
    from ..chain import load
    from ..chain.cautions import cautions
    from ..chain.model import ChainModel
    from ..chain.netlist import netlist_text
    from ..ranges import check

    if sections is not None:
        check("sections", sections, "option --sections")
    chain = load(spec)
    model = ChainModel.from_chain(chain, sections=sections)
    n = model.sections or 1
    tstop, fstart, fstop = model.netlist_window
    full = model.built_with_edge
    text = netlist_text(chain, full, n, tstop=tstop, fstart=fstart, fstop=fstop)
    write_text(out_path, text, option="-o")
    cards = [ln for ln in text.splitlines() if ln and ln[0] not in "*."]
    info = {"output": out_path, "elements": len(cards), "line_sections": n if full.lines() else 0,
            "tstop": tstop, "fstart": fstart, "fstop": fstop}
    notes = cautions(chain)
    if notes:
        info["cautions"] = notes
    if as_json:
        emit_json(info)
        return
    cables = f", cables as {n} pi sections" if full.lines() else ""
    click.echo(f"wrote {out_path}: {info['elements']} cards{cables}")
    for line in notes:
        click.echo(f"caution: {line}")

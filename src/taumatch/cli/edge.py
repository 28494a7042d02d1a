"""``taumatch diagnose`` on a fast-edge capture: routing, output and the fitted chain spec."""

from __future__ import annotations

import click

from ..errors import InputError
from ._common import emit_json, refuse_input, save_figure, write_text

__all__ = ["route"]


def route(cap, capture_path, chain_path, slow_path, spec_out, trimmed, *, force, as_json,
          plot_path, read_opts, report_path=None, show=False, square_only=()) -> bool:
    """Run the fast-edge diagnosis when ``cap`` is a fast edge (or ``--slow`` is given) and
    return True; return False to leave a 1 kHz square to the usual diagnosis.
    ``square_only`` lists the options the user typed that only the 1 kHz diagnosis reads: a
    fast edge refuses them rather than ignore them."""
    from ..chain import load
    from ..chain.cautions import cautions
    from ..edge_diagnosis import diagnose_edge, is_fast_edge
    from ..pulse import measure
    from .options import read_capture
    from .progress import busy

    if not chain_path:
        if slow_path:
            raise InputError("--slow: the fast-edge diagnosis needs the chain (--chain SPEC)")
        return False
    chain = load(chain_path)
    channel = read_opts.get("channel")
    fast = is_fast_edge(measure(cap, channel), chain)
    if not fast:
        if slow_path:
            raise InputError(f"{capture_path}: a square wave with full periods longer than the "
                             "divider's time constant is a 1 kHz capture, not a fast edge; give "
                             "the fast edge as CAPTURE and the 1 kHz capture as --slow")
        return False
    if square_only:
        raise InputError(f"{', '.join(square_only)}: {capture_path} is a fast edge, whose "
                         "diagnosis takes values and tolerances from the chain spec (each "
                         "part's fields and `tolerance`) and has no acceptance band; leave "
                         f"{'it' if len(square_only) == 1 else 'them'} out (docs/fast-edge.md)")
    if report_path:
        raise InputError(f"--report {report_path}: the fast-edge diagnosis writes no HTML "
                         "report; use --json, --plot and --spec")
    refuse_input(spec_out, [capture_path, chain_path] + ([slow_path] if slow_path else []),
                 "--spec")
    slow = read_capture(slow_path, {}) if slow_path else None
    with busy("fitting the chain to the fast edge", show):
        d = diagnose_edge(cap, chain, channel, slow=slow, force=force)
    warn = list(cautions(chain))
    if spec_out:
        _write_spec(d, spec_out, capture_path, trimmed)
    if plot_path:
        fig, _ = d.plot()
        save_figure(fig, plot_path)
    if as_json:
        emit_json({**d.to_dict(), "capture_notes": list(cap.notes),
                   **({"cautions": warn} if warn else {})})
    else:
        click.echo(d.summary())
        for line in cap.notes:
            click.echo(f"note: {line}")
        for line in warn:
            click.echo(f"caution: {line}")
    if d.refused:
        click.echo(f"taumatch: warning: forced past a refusal: {d.refused}", err=True)
    return True



def _write_spec(d, path, capture_path, trimmed) -> None:
    """The chain as found (or as adjusted) as a spec."""
    from ..chain.write import dumps
    from ..fitted_chain import edge_fitted_chain

    write_text(path, dumps(*edge_fitted_chain(d, trimmed, capture_path)), option="--spec")

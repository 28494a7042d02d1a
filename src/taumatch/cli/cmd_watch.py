"""``taumatch watch``: the trim loop — diagnose each capture the instrument saves while the
trimmer is turned, until the divider is within the acceptance band."""

from __future__ import annotations

import sys

import click

from ._common import to_jsonable
from .diagnosis_options import diagnosis_options, settings_from
from .words import cli_words, cli_words_in


@click.command("watch")
@click.argument("folder", type=click.Path(exists=True, file_okay=False))
@diagnosis_options
@click.option("--pattern", default="*.csv", show_default=True,
              help="File names to take (glob), e.g. '*.npz'.")
@click.option("--existing", is_flag=True,
              help="Diagnose the captures already in the folder too (default: only new ones).")
@click.option("--interval", type=click.FloatRange(0.05, 60), default=0.5, show_default=True,
              help="Seconds between looks at the folder.")
@click.option("--max-captures", type=click.IntRange(1), default=None,
              help="Stop after this many captures (default: run until Ctrl-C).")
@click.option("--history", "rows", type=click.IntRange(1, 100), default=8, show_default=True,
              help="Captures shown in the history.")
@click.option("--json", "as_json", is_flag=True,
              help="Print one JSON object per capture, then the summary, instead of the screen.")
def command(folder, pattern, existing, interval, max_captures, rows, as_json, **opts):
    """Diagnose each new capture saved into FOLDER and show how far the trim has to go.

    Save a capture from the instrument, turn the trimmer the way the screen says,
    save again: each new file is diagnosed once it stops growing, and the screen
    shows the gain error now, which way and how far to turn, and the last few
    captures with whether each turn brought the divider closer. A capture that
    cannot be read or diagnosed is one line in the history; the loop goes on.
    Ctrl-C stops it with a summary.

    \b
    Examples:
      taumatch watch ~/scope-usb --tip-r 9M --shunt-r 1M
      taumatch watch captures/ --chain probe.toml --pattern '*.csv' --accept 0.5%
    """
    import json
    from pathlib import Path

    from ..workbench import TrimLoop

    settings = settings_from(opts)
    loop = TrimLoop(folder, settings, pattern=pattern, existing=existing)
    live = sys.stdout.isatty() and not as_json
    if as_json:
        def on_update(lp, o):
            click.echo(json.dumps(cli_words_in(to_jsonable({"capture": o.to_dict()})),
                                  ensure_ascii=False))
        summary = loop.run(interval=interval, max_captures=max_captures, on_update=on_update)
        click.echo(json.dumps(cli_words_in(to_jsonable({"summary": summary.to_dict()})),
                              ensure_ascii=False))
        return
    if not live:
        click.echo(f"watching {Path(folder)} ({pattern}) — Ctrl-C stops", err=False)

        def on_update(lp, o):
            from ..workbench.trimloop import turn_advice

            name = Path(o.file).name
            if o.ok:
                click.echo(f"{name}: {o.verdict}, gain error {100 * o.gain_error:+.2f} % ± "
                           f"{100 * (o.gain_error_stderr or 0):.2f} %; "
                           f"{turn_advice(o, settings.accept)}")
            else:
                click.echo(f"{name}: {o.status}: {cli_words(o.error)}")
        summary = loop.run(interval=interval, max_captures=max_captures, on_update=on_update)
    else:
        from rich.console import Console
        from rich.live import Live
        from rich.text import Text

        def shown(lp):
            return Text(cli_words(lp.screen(rows)))

        with Live(shown(loop), console=Console(), auto_refresh=False,
                  transient=False) as screen:
            summary = loop.run(interval=interval, max_captures=max_captures,
                               on_update=lambda lp, o: screen.update(shown(lp), refresh=True))
    click.echo("")
    click.echo(cli_words(summary.summary()))

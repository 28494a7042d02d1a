"""``taumatch compare``: two captures before and after a turn of the trim."""

from __future__ import annotations

import click

from ._common import check_outputs, emit_json, save_figure
from .diagnosis_options import diagnosis_options, settings_from
from .progress import busy, progress_wanted


@click.command("compare")
@click.argument("before", type=click.Path(exists=True, dir_okay=False))
@click.argument("after", type=click.Path(exists=True, dir_okay=False))
@diagnosis_options
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              help="Draw both averaged periods and the predicted trimmed one to this image file.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
def command(before, after, plot_path, as_json, **opts):
    """Diagnose BEFORE and AFTER and say whether the change between them went the way
    the first diagnosis predicted, and how much of the predicted amount it made.

    Both captures are diagnosed with the same settings. The first one's trim is
    the prediction; what the second still needs tells how far the change went,
    as a shunt-arm equivalent whichever arm was turned. A change counts as
    measured when it exceeds two standard errors.

    \b
    Example:
      taumatch compare before.csv after.csv --chain probe.toml --plot both.png
    """
    check_outputs([before, after, opts.get("chain_path")], [("--plot", plot_path, "plot")])
    from .fit_import import import_fit_library

    import_fit_library(pictures=bool(plot_path))
    from pathlib import Path

    from ..errors import InputError
    from ..workbench import compare, diagnose_file
    from ..workbench.job import run_quietly

    settings = settings_from(opts)
    diagnoses = []
    with busy("diagnosing both captures", progress_wanted(as_json)):
        for path in (before, after):
            try:
                diagnoses.append(run_quietly(diagnose_file, path, settings)[1])
            except InputError as exc:
                raise InputError(f"{path}: {exc}" if path not in str(exc) else str(exc)) from None
    c = compare(*diagnoses, names=(Path(before).name, Path(after).name))
    if plot_path:
        fig, _ = c.plot()
        save_figure(fig, plot_path)
    if as_json:
        emit_json(c.to_dict())
    else:
        click.echo(c.summary())

"""``taumatch batch``: diagnose a drawer of probes in one go, in parallel on the local cores."""

from __future__ import annotations

import click

from ._common import emit_json, to_jsonable, write_text
from .diagnosis_options import diagnosis_options, settings_from
from .progress import progress_bar, progress_wanted
from .reporting import command_inputs, report_option, start_report
from .words import cli_rows


@click.command("batch")
@click.argument("captures", nargs=-1, required=True, metavar="FOLDER_OR_GLOB...")
@diagnosis_options
@click.option("--pattern", default="*.csv", show_default=True,
              help="File names a folder contributes (glob).")
@click.option("--jobs", "-j", type=click.IntRange(1, 256), default=None,
              help="Worker processes (default: one per core).")
@click.option("--out", "out_dir", type=click.Path(file_okay=False), default=None,
              help="Folder (made if missing) for summary.csv, summary.json, index.html and one "
                   "HTML report per diagnosed capture.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
@report_option
@click.pass_context
def command(ctx, captures, pattern, jobs, out_dir, as_json, report_path, **opts):
    """Diagnose every capture in FOLDER_OR_GLOB with the same settings.

    A folder contributes its files matching --pattern (not its sub-folders); a
    glob such as 'drawer/*.npz' or 'drawer/**/*.csv' is expanded by taumatch as
    well as by the shell. Each capture is diagnosed in a worker process; one that
    cannot be read or diagnosed is a row in the summary saying why, and the batch
    goes on. The summary table gives file, verdict, gain error and trim with their
    standard errors, and the warnings (SI units in the CSV and JSON: gain error as
    a fraction, trims in farads).

    Exit status 0 when every capture was diagnosed, 1 when any was not (refused,
    unreadable or failed), 2 for bad options.

    \b
    Examples:
      taumatch batch drawer/ --out drawer-report
      taumatch batch 'probes/*.csv' --chain probe.toml --jobs 2 --json
    """
    import json
    from pathlib import Path

    from ..workbench import batch_diagnose, capture_files

    files = capture_files(captures, pattern)
    start_report(report_path, files)
    out = Path(out_dir) if out_dir else None
    if out is not None:
        if out.exists() and not out.is_dir():
            from ..errors import InputError

            raise InputError(f"--out {out_dir}: that is a file; name a folder")
        out.mkdir(parents=True, exist_ok=True)
    inputs = command_inputs(ctx, skip=("report_path", "plot_path", "as_json", "captures",
                                       "jobs", "out_dir", "pattern"))
    settings = settings_from(opts)
    with progress_bar(len(files), "diagnosing", progress_wanted(as_json)) as advance:
        result = batch_diagnose(files, settings, jobs=jobs, report_dir=out, report_inputs=inputs,
                                progress=lambda done, total, o: advance(done, Path(o.file).name))
    result = cli_rows(result)
    wrote = []
    if out is not None:
        write_text(out / "summary.csv", result.csv_text(), "--out")
        write_text(out / "summary.json",
                   json.dumps(to_jsonable(result.to_dict()), indent=2) + "\n", "--out")
        wrote += [out / "summary.csv", out / "summary.json", out / "index.html"]
    pages = ([out / "index.html"] if out is not None else []) + \
        ([Path(report_path)] if report_path else [])
    if pages:
        from ..report import batch_report, write_report

        every = [("captures", " ".join(captures)), ("files", str(len(files))), *inputs]
        for page in pages:
            write_report(batch_report(result, title="Batch of captures", inputs=every,
                                      page=page), page)
    if as_json:
        emit_json(result.to_dict())
    else:
        click.echo(result.summary())
        if wrote:
            click.echo(f"wrote {', '.join(str(w) for w in wrote)} and "
                       f"{sum(1 for r in result.rows if r.report)} capture reports")
    if result.failed:
        click.echo(f"taumatch: {len(result.failed)} of {len(result.rows)} captures were not "
                   "diagnosed (see the summary)", err=True)
        ctx.exit(1)

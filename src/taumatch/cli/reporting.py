"""The ``--report FILE.html`` option shared by the commands that can file a report, and the
list of inputs a report shows (the command's options as given)."""

from __future__ import annotations

import click

from ._common import Quantity, refuse_input

__all__ = ["command_inputs", "report_option", "report_title", "start_report"]


def report_option(fn):
    """Add ``--report FILE.html``."""
    return click.option("--report", "report_path", type=click.Path(dir_okay=False), default=None,
                        metavar="FILE.html",
                        help="Write a self-contained HTML report (numbers, checks, warnings, "
                             "cautions and pictures) to this file.")(fn)


def start_report(report_path, inputs) -> None:
    """Check the report path before any work: suffix, folder, not one of the inputs."""
    if report_path is None:
        return
    from ..report import check_report_path

    check_report_path(report_path, "--report")
    refuse_input(report_path, [i for i in inputs if i], "--report")


def command_inputs(ctx: click.Context, skip=("report_path", "plot_path", "as_json")) -> list:
    """(name, value) pairs of the command's arguments and options, as a report shows them.

    Options left at their default are marked so; quantities are written in engineering
    notation with their unit; unset options and flags are left out.
    """
    from ..units import format_quantity

    rows = []
    for p in ctx.command.params:
        if p.name in skip or p.name not in ctx.params:
            continue
        v = ctx.params[p.name]
        if v is None or v is False or v == ():
            continue
        if isinstance(p.type, Quantity) and isinstance(v, float):
            text = format_quantity(v, _symbol(p.type.unit))
        elif v is True:
            text = "yes"
        elif isinstance(v, (list, tuple)):
            text = ", ".join(str(x) for x in v)
        else:
            text = str(v)
        name = p.human_readable_name.lower() if p.param_type_name == "argument" else p.opts[0]
        source = ctx.get_parameter_source(p.name)
        if source is not None and source.name == "DEFAULT":
            text += " (default)"
        rows.append((name, text))
    return rows


def _symbol(unit):
    return {"ohm": "Ω", None: ""}.get(unit, unit)


def report_title(kind: str, path) -> str:
    """``'Compensation diagnosis: probe.csv'``."""
    from pathlib import Path

    return f"{kind}: {Path(str(path)).name}" if path else kind

"""Pieces shared by the sub-commands: quantity options, JSON output, plots."""

from __future__ import annotations

import math
import sys

import click

from ..errors import InputError, shown
from ..units import parse_quantity

__all__ = ["Quantity", "emit_json", "emit_result", "refuse_input", "save_figure", "to_jsonable", "write_text"]


class Quantity(click.ParamType):
    """A click option value in engineering notation (``9M``, ``11.5p``, ``"120 nH"``)."""

    name = "quantity"

    def __init__(self, unit: str | None = None, positive: bool = False):
        self.unit = unit
        self.positive = positive

    def convert(self, value, param, ctx):
        if isinstance(value, float):
            return value
        field = f"option --{param.name.replace('_', '-')}" if param is not None else "value"
        try:
            out = parse_quantity(value, self.unit, field=field)
        except InputError as exc:
            self.fail(str(exc), param, ctx)
        if self.positive and not out > 0:
            self.fail(f"{field}: must be positive, got {shown(value)}", param, ctx)
        return out


def to_jsonable(obj):
    """Convert numpy scalars/arrays and complex numbers (as ``[re, im]``) for JSON."""
    # numpy is not imported for this: where it has not been imported, nothing is a numpy
    # object (the command line's --help and light commands never load it)
    np = sys.modules.get("numpy")
    if isinstance(obj, dict):
        return {str(k): to_jsonable(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [to_jsonable(v) for v in obj]
    if np is not None and isinstance(obj, np.ndarray):
        return [to_jsonable(v) for v in obj.tolist()]
    if isinstance(obj, complex) or (np is not None and isinstance(obj, np.complexfloating)):
        return [_num(obj.real), _num(obj.imag)]
    if isinstance(obj, float) or (np is not None and isinstance(obj, np.floating)):
        return _num(float(obj))
    if np is not None and isinstance(obj, np.integer):
        return int(obj)
    if np is not None and isinstance(obj, np.bool_):
        return bool(obj)
    return obj


def _num(x: float):
    return x if math.isfinite(x) else None


def emit_json(obj) -> None:
    """Print one JSON object on stdout (the library's parameter names in its texts as the
    command line's options, :func:`~taumatch.cli.words.cli_words`)."""
    import json

    from .words import cli_words_in

    click.echo(json.dumps(cli_words_in(to_jsonable(obj)), indent=2, allow_nan=False))


def write_text(path, text: str, option: str = "output") -> None:
    """Write a text output atomically; a path that cannot be written is one line of error."""
    from ..atomic import atomic_write

    try:
        atomic_write(path, text)
    except OSError as exc:
        raise InputError(f"{option} {path}: cannot write ({exc.strerror or exc})") from None


def refuse_input(out, inputs, option: str) -> None:
    """Raise when an output path names one of the inputs (inputs are never modified)."""
    import os
    from pathlib import Path

    if out is None:
        return
    o = Path(out)
    for inp in inputs:
        i = Path(inp)
        if o.resolve() == i.resolve() or (o.exists() and i.exists() and os.path.samefile(o, i)):
            raise InputError(f"{option} {out}: that is the input {inp} itself; choose another file")


def save_figure(fig, path) -> None:
    """Save a matplotlib figure atomically (format from the file's suffix)."""
    from pathlib import Path

    import matplotlib.pyplot as plt

    from ..atomic import atomic_path

    suffix = Path(path).suffix.lower().lstrip(".")
    kinds = fig.canvas.get_supported_filetypes()
    if suffix not in kinds:
        plt.close(fig)
        raise InputError(f"--plot {path}: cannot draw a {suffix or 'suffix-less'} file; use one "
                         f"of {', '.join('.' + k for k in sorted(kinds))}")
    try:
        with atomic_path(path) as tmp:
            fig.savefig(tmp, dpi=120, bbox_inches="tight")
    except (OSError, ValueError) as exc:
        raise InputError(f"--plot {path}: {exc}") from None
    finally:
        plt.close(fig)


def emit_result(result, cautions, as_json: bool) -> None:
    """Print a result as JSON (with its cautions under ``"cautions"``) or as its summary
    followed by one ``caution:`` line each."""
    if as_json:
        out = result.to_dict()
        if cautions:
            out["cautions"] = cautions
        emit_json(out)
        return
    click.echo(result.summary())
    for line in cautions:
        click.echo(f"caution: {line}")

"""Pieces shared by the sub-commands: quantity options, JSON output, plots."""

from __future__ import annotations

import math
import sys

import click

from ..errors import InputError, shown
from ..units import parse_quantity

__all__ = ["PLOT_SUFFIXES", "Quantity", "check_outputs", "emit_json", "emit_result", "refuse_input",
           "save_figure", "to_jsonable", "write_text"]


class Quantity(click.ParamType):
    """A click option value in engineering notation (``9M``, ``11.5p``, ``"120 nH"``)."""

    name = "quantity"

    def __init__(self, unit: str | None = None, positive: bool = False,
                 quantity: str | None = None):
        self.unit = unit
        self.positive = positive
        self.quantity = quantity  # a key of taumatch.ranges.RANGES: the value's range

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
        if self.quantity is not None:
            from ..ranges import check

            try:
                out = check(self.quantity, out, field, given=value)
            except InputError as exc:
                self.fail(str(exc), param, ctx)
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
            raise InputError(f"{option} {_name(out)}: that is the input {_name(inp)} "
                             "itself; choose another file")


#: Image files a plot can be saved as (what matplotlib's own backends write; listed here so
#: that an output is checked before matplotlib is imported or anything is computed).
PLOT_SUFFIXES = ("png", "svg", "pdf", "eps", "jpeg", "jpg", "pgf", "ps", "raw", "rgba", "svgz",
                 "tif", "tiff", "webp")
#: What each kind of output must be named, by its suffix (None: any name).
_KINDS = {"plot": PLOT_SUFFIXES, "toml": ("toml",), "html": ("html", "htm"), "text": None}
_SUFFIX_HELP = {
    "plot": f"cannot draw that kind of file; use one of .png, .svg, .pdf (or {len(PLOT_SUFFIXES) - 3} "
            "more image types matplotlib writes)",
    "toml": "a chain spec is TOML; name a .toml file",
    "html": "a report is an HTML page; name it with .html",
}


def _name(path) -> str:
    """A path for an error line, cut to about 80 characters."""
    from ..errors import path_text

    return path_text(path)


def check_outputs(inputs, outputs) -> None:
    """Refuse, before anything is computed, every output that could not be written as asked:
    a suffix of the wrong kind, a folder that does not exist, a folder where a file is meant,
    one of the inputs, or the same file as another output.  A failing command then writes
    nothing.

    Parameters
    ----------
    inputs : iterable of path or None
        The command's input files (never overwritten).
    outputs : iterable of (option, path or None, kind)
        ``kind`` is ``"plot"``, ``"toml"``, ``"html"`` or ``"text"``.
    """
    from pathlib import Path

    seen = {}
    inputs = [i for i in inputs if i]
    for option, path, kind in outputs:
        if path is None:
            continue
        p = Path(path)
        try:  # a name too long for the file system fails in stat() already
            refuse_input(path, inputs, option)
            suffixes = _KINDS[kind]
            suffix = p.suffix.lower().lstrip(".")
            if suffixes is not None and suffix not in suffixes:
                raise InputError(f"{option} {_name(path)}: {_SUFFIX_HELP[kind]} (got "
                                 f"{'.' + suffix if suffix else 'no suffix'})")
            folder = p.parent if str(p.parent) else Path(".")
            if not folder.is_dir():
                raise InputError(f"{option} {_name(path)}: the folder {_name(folder)} "
                                 "does not exist")
            if p.is_dir():
                raise InputError(f"{option} {_name(path)}: that is a folder; name a file")
            key = p.resolve()
        except OSError as exc:
            raise InputError(f"{option} {_name(path)}: cannot be written "
                             f"({exc.strerror or exc})") from None
        if key in seen:
            raise InputError(f"{option} {_name(path)}: the same file as {seen[key]}; "
                             "choose another")
        seen[key] = option


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

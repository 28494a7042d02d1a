"""Text exports (CSV, TSV, semicolon, whitespace) into a ``Capture``: the head is sniffed
in Python, the numeric block parsed by pandas' C parser straight into arrays.

Memory is bounded by what is kept: pandas reads at most the row limit
(:func:`~taumatch.capture.limits.max_rows`) plus one, and cells beside the numeric
columns (metadata, trailing delimiters) are kept as categories, not as strings.
"""

from __future__ import annotations

import csv
import io
import re

import numpy as np

from ..errors import InputError
from .containers import Payload
from .labels import INTERVAL_KEYS, RATE_KEYS, START_KEYS, is_time_name, meta_number, unit_scale
from .limits import check_interval, check_size, max_rows
from .model import Capture, SampleProblem
from .sniff import Layout, fields, number_pattern, sniff
from .timebase import index_column, print_quantum, rebuild_uniform, time_index

__all__ = ["read_text"]

_NONFINITE = re.compile(r"^[+-]?(nan|inf|infinity)$", re.IGNORECASE)
# what pandas raises on a block it cannot take (our own InputError, from a damaged
# compressed stream, is a ValueError too and is let through first)
_PARSE_ERRORS = (ValueError, UnicodeError, OverflowError, MemoryError, IndexError)


def read_text(payload: Payload, delimiter, decimal, time_column, dt) -> Capture:
    """Read a text payload; ``dt`` (s) replaces the time column when given."""
    source = payload.source
    layout = sniff(payload.head, complete=payload.complete, source=source,
                   delimiter=delimiter, decimal=decimal)
    columns = _parse_block(payload, layout)
    return _assemble(columns, layout, payload, time_column, dt, list(payload.notes))


def _parse_block(payload: Payload, layout: Layout) -> list[np.ndarray]:
    """The numeric columns of the data block, as float64 arrays."""
    source = payload.source
    first, width = layout.first, layout.width
    names = [f"c{i}" for i in range(layout.cells)]
    used = names[first:first + width]
    dtype = {n: (np.float64 if n in used else "category") for n in names}
    limit = max_rows(width)
    # Options kept to what the file needs: comment handling and re-decoding cost time in
    # pandas' C parser, so they are added only when the head shows a use for them.
    kwargs = {
        "sep": r"\s+" if layout.delimiter is None else layout.delimiter,
        "decimal": layout.decimal, "header": None, "names": names, "dtype": dtype,
        "na_filter": False, "engine": "c", "nrows": limit + 1, "compression": None,
    }
    head = payload.head
    if b"#" in head[layout.data_byte:]:
        kwargs["comment"] = "#"
    # pandas reads a path much faster than a Python file object; skipping the header by
    # line count is exact unless lines end in a lone CR, and switching quoting off keeps
    # a stray quote in the metadata from swallowing lines (the data then must have none).
    attempts = []
    if (payload.path is not None and re.search(rb"\r(?!\n)", head) is None
            and b'"' not in head[layout.data_byte:]):
        attempts.append(dict(kwargs, skiprows=layout.data_line, quoting=csv.QUOTE_NONE))
    attempts.append(kwargs)  # from a stream positioned at the data
    if "comment" not in kwargs:  # a comment line further down than the head
        attempts.append(dict(kwargs, comment="#"))
    frame = None
    for options in attempts:
        try:
            frame = _parse(payload, layout, options)
            break
        except InputError:
            raise
        except _PARSE_ERRORS:
            continue
    if frame is None:
        line, why = _find_bad_line(payload, layout)
        if line is None:
            raise InputError(f"{source}: cannot read the numeric block") from None
        raise InputError(f"{source}: line {line}: {why}") from None
    if len(frame) == 0:
        raise InputError(f"{source}: no data rows after the header")
    check_size(len(frame), width, source)
    columns = [frame[n].to_numpy() for n in used]
    del frame
    return columns


def _parse(payload: Payload, layout: Layout, kwargs):
    import pandas as pd

    if "skiprows" in kwargs:
        return pd.read_csv(payload.path, **kwargs)
    with payload.open() as fh:
        fh.read(layout.data_byte)
        return pd.read_csv(fh, **kwargs)


def _data_lines(payload: Payload, layout: Layout):
    """(1-based line number, text) of each line of the numeric block, in Python."""
    with payload.open() as raw:
        raw.read(layout.data_byte)
        text = io.TextIOWrapper(raw, encoding="latin-1", newline=None)
        for k, line in enumerate(text):
            yield layout.data_line + 1 + k, line


def _find_bad_line(payload: Payload, layout: Layout):
    """The first line of the numeric block pandas could not take, and why."""
    pattern = number_pattern(layout.decimal)
    first, width = layout.first, layout.width
    for number, line in _data_lines(payload, layout):
        body = line.split("#", 1)[0]
        if not body.strip():
            continue
        cells = fields(body, layout.delimiter)
        if len(cells) > layout.cells or len(cells) < first + width:
            return number, (f"{len(cells)} cells, expected {first + width} like the first data "
                            f"row (line {layout.data_line + 1}): {line.strip()[:60]!r}")
        for col in range(first, first + width):
            cell = cells[col]
            name = layout.columns[col - first]
            if _NONFINITE.match(cell):
                return number, (f"cell {cell!r} in column {col + 1} ({name}) is not a finite "
                                "number")
            if not pattern.match(cell):
                return number, (f"cell {cell[:40]!r} in column {col + 1} ({name}) is not a "
                                f"number with decimal mark {layout.decimal!r}")
    return None, None


def _line_of_row(payload: Payload, layout: Layout, row: int) -> int | None:
    """1-based file line of data row ``row`` (blank and comment lines skipped)."""
    seen = -1
    for number, line in _data_lines(payload, layout):
        if line.split("#", 1)[0].strip():
            seen += 1
            if seen == row:
                return number
    return None


def _meta(layout: Layout, keys, source, unit):
    return meta_number(layout.metadata, layout.metadata_lines, keys, source, unit,
                       layout.decimal)


def _interval(layout: Layout, source):
    """The sample interval the file's metadata gives (an interval, or 1/rate), or None."""
    dt, key = _meta(layout, INTERVAL_KEYS, source, "s")
    if dt is None:
        rate, key = _meta(layout, RATE_KEYS, source, "Hz")
        if rate is None:
            return None
        if not rate > 0:
            raise InputError(f"{source}: {key}: sample rate must be positive, got {rate}")
        dt = 1.0 / rate
    check_interval(dt, f"{source}: line {layout.metadata_lines.get(key)}: {key}")
    return dt


def _assemble(columns, layout: Layout, payload: Payload, time_column, dt, notes) -> Capture:
    source = payload.source
    names, units = list(layout.columns), list(layout.units)
    metadata = dict(layout.metadata)
    icol = None
    if time_column is None:
        icol = index_column(names, units, layout.metadata, columns)
    if icol is not None:  # sample numbers: time = start + number × increment
        dt = dt if dt is not None else _interval(layout, source)
        if dt is None:
            raise InputError(
                f"{source}: column {names[icol]!r} holds sample numbers, not times, and the "
                "file gives no increment (a 'Start'/'Increment' or 'Sample Interval' field); "
                "give --sample-interval"
            )
        start, _ = _meta(layout, START_KEYS, source, "s")
        time = (start or 0.0) + dt * columns[icol]
        metadata.setdefault("sample interval used (s)", repr(dt))
        chan_idx = [i for i in range(len(names)) if i != icol]
        return _build(columns, layout, payload, time, chan_idx, metadata, notes)
    tcol = time_index(names, time_column, dt, source)
    if dt is None and tcol is None:
        dt = _interval(layout, source)
        if dt is None:
            if len(names) < 2:
                raise InputError(
                    f"{source}: one column and no sample interval; give --sample-interval "
                    "(or a 'Sample Interval' line in the file)"
                )
            tcol = 0
    if tcol is not None:
        time = columns[tcol]
        scale = 1.0
        if units[tcol]:
            found = unit_scale(units[tcol])
            if found is None or found[1] != "s":
                raise InputError(
                    f"{source}: time column {names[tcol]!r} has unit {units[tcol]!r}; "
                    "expected s, ms, us, ns or ps"
                )
            scale = found[0]
        quantum = print_quantum([r[tcol] for r in layout.sample_rows], layout.decimal)
        time, note = rebuild_uniform(time, quantum, names[tcol])
        if note:
            notes.append(note)
        if scale != 1.0:
            time = time * scale
        chan_idx = [i for i in range(len(names)) if i != tcol]
    else:
        start, _ = _meta(layout, START_KEYS, source, "s")
        time = (start or 0.0) + dt * np.arange(columns[0].size, dtype=np.float64)
        metadata.setdefault("sample interval used (s)", repr(dt))
        chan_idx = [i for i in range(len(names))
                    if not is_time_name(names[i]) or len(names) == 1]
    return _build(columns, layout, payload, time, chan_idx, metadata, notes)


def _build(columns, layout: Layout, payload: Payload, time, chan_idx, metadata,
           notes) -> Capture:
    """The Capture from the time base and the channel columns (scaled by their units)."""
    source = payload.source
    names, units = list(layout.columns), list(layout.units)
    if not chan_idx:
        raise InputError(f"{source}: only a time column, no channel")
    channels, chan_units = {}, {}
    for i in chan_idx:
        values = columns[i]
        unit = "V"
        if units[i]:
            found = unit_scale(units[i])
            if found is None:
                unit = units[i]
            else:
                unit = found[1]
                if found[0] != 1.0:
                    values = values * found[0]
        channels[names[i]] = values
        chan_units[names[i]] = unit
    try:
        return Capture(time, channels, metadata, source, chan_units, tuple(notes))
    except SampleProblem as exc:
        line = _line_of_row(payload, layout, exc.row)
        where = f"line {line}" if line is not None else f"sample {exc.row}"
        message = str(exc).split(": ", 2)[-1]
        raise InputError(f"{source}: {where}: {message}") from None

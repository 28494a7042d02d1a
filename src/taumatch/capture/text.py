"""Text exports (CSV, TSV, semicolon, whitespace) into a ``Capture``: the head is sniffed
in Python, the numeric block parsed by pandas' C parser straight into arrays.

Memory is bounded by what is kept: a file that could hold more than ``_KEPT_BYTES`` of
numbers, and every decompressed stream, is read only up to one row past the row limit
(:func:`~taumatch.capture.limits.max_rows`); cells beside the numeric columns (metadata,
trailing delimiters) are kept as categories, not as strings.
"""

from __future__ import annotations

import csv
import io
import itertools
import re

import numpy as np

from ..errors import InputError
from .containers import Payload
from .labels import (
    INTERVAL_KEYS,
    RATE_KEYS,
    START_KEYS,
    is_time_name,
    key_of,
    meta_number,
    unit_scale,
)
from .limits import check_interval, check_size, max_rows
from .model import Capture, SampleProblem
from .sniff import Layout, fields, number_pattern, sniff
from .timebase import index_column, print_quantum, rebuild_uniform, steps_vary, time_index

__all__ = ["read_text"]

_NONFINITE = re.compile(r"^[+-]?(nan|inf|infinity)$", re.IGNORECASE)
# what pandas raises on a block it cannot take (our own InputError, from a damaged
# compressed stream, is a ValueError too and is let through first)
_PARSE_ERRORS = (ValueError, UnicodeError, OverflowError, MemoryError, IndexError)
#: Bytes of numbers a file could fill at most, at two bytes a cell, below which pandas reads
#: it whole before the row limit is checked; larger files are read up to the limit only.
_KEPT_BYTES = 3 << 30
# metadata keys naming the one channel and the units of unnamed columns
_SOURCE_KEYS = ("source", "channel", "trace", "waveformsource")
_X_UNIT_KEYS = ("horizontalunits", "horizontalunit", "xunits", "xunit", "timeunits", "timeunit")
_Y_UNIT_KEYS = ("verticalunits", "verticalunit", "yunits", "yunit")


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
    dtype = np.float64
    if len(used) < len(names):  # cells beside the data: categories, cheap to keep
        dtype = {n: (np.float64 if n in used else "category") for n in names}
    # Options kept to what the file needs: comment handling, re-decoding, a per-column
    # dtype and a row limit each cost time in pandas' C parser, so they are added only
    # when the head shows a use for them.
    kwargs = {
        "sep": r"\s+" if layout.delimiter is None else layout.delimiter,
        "decimal": layout.decimal, "header": None, "names": names, "dtype": dtype,
        "na_filter": False, "engine": "c", "compression": None,
    }
    if _may_outgrow(payload, layout):
        kwargs["nrows"] = max_rows(width) + 1
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


def _may_outgrow(payload: Payload, layout: Layout) -> bool:
    """True unless the file is too small to hold rows past :data:`_KEPT_BYTES` of numbers
    (a row needs at least two bytes a cell); only then is pandas told to stop reading at the
    row limit, which slows it."""
    if payload.path is None:
        return True
    rows = payload.path.stat().st_size // (2 * max(1, layout.cells)) + 1
    return rows * layout.width * 8 > _KEPT_BYTES


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
    """The first line of the numeric block pandas could not take, and why (looked for up to
    the row limit, as far as pandas reads)."""
    pattern = number_pattern(layout.decimal)
    first, width = layout.first, layout.width
    lines = _data_lines(payload, layout)
    for number, line in itertools.islice(lines, 2 * max_rows(width) + 2):
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
    """The time base (sample numbers, a time column, or an interval) and the channels."""
    source = payload.source
    names, units = _labels(layout)
    icol = None
    if time_column is None:
        icol = index_column(names, units, layout.metadata, columns)
    tcol = None if icol is not None else time_index(names, time_column, dt, source)
    if icol is None and tcol is None and dt is None:
        dt = _interval(layout, source)
        if dt is None and len(names) < 2:
            raise InputError(
                f"{source}: one column and no sample interval; give sample_interval= "
                "(or a 'Sample Interval' line in the file)"
            )
        if len(names) >= 2 and (dt is None or _steps_by(columns[0], dt)):
            tcol, dt = 0, None  # the first column is time (it steps by the file's interval)
    metadata, rebuild = dict(layout.metadata), None
    if icol is not None:  # sample numbers: time = start + number × increment
        time, dt = _from_numbers(columns[icol], names[icol], layout, source, dt)
        chan_idx = [i for i in range(len(names)) if i != icol]
    elif tcol is not None:
        time, rebuild = _from_column(columns[tcol], tcol, names, units, layout, source, notes)
        chan_idx = [i for i in range(len(names)) if i != tcol]
    else:
        start, _ = _meta(layout, START_KEYS, source, "s")
        time = (start or 0.0) + dt * np.arange(columns[0].size, dtype=np.float64)
        chan_idx = [i for i in range(len(names)) if not is_time_name(names[i]) or len(names) == 1]
    if dt is not None:
        metadata.setdefault("sample interval used (s)", repr(dt))
    return _build(columns, names, units, payload, layout, time, chan_idx, metadata, notes,
                  rebuild)


def _steps_by(col: np.ndarray, dt: float) -> bool:
    """True when ``col`` rises by ``dt`` (within 1 %) at each of its first steps."""
    steps = np.diff(col[:1001])
    return bool(steps.size) and bool(np.all(np.abs(steps - dt) <= 0.01 * dt))


def _labels(layout: Layout):
    """Column names and units; for unnamed columns, those the metadata gives (a ``Source``
    naming the one channel, ``Horizontal``/``Vertical Units``)."""
    names, units = list(layout.columns), list(layout.units)
    if layout.columns[0] == f"col{layout.first + 1}":  # no header line
        meta = {key_of(k): v.strip() for k, v in layout.metadata.items()}
        source = next((meta[k] for k in _SOURCE_KEYS if meta.get(k)), "")
        if len(names) == 2 and source and len(source) <= 40:
            names[1] = source
        horizontal = next((meta[k] for k in _X_UNIT_KEYS if meta.get(k)), None)
        vertical = next((meta[k] for k in _Y_UNIT_KEYS if meta.get(k)), None)
        if horizontal and unit_scale(horizontal) and units[0] is None:
            units[0] = horizontal
        if vertical and unit_scale(vertical):
            units[1:] = [u or vertical for u in units[1:]]
    return names, units


def _from_numbers(numbers, name, layout: Layout, source, dt):
    """Time from sample numbers and the increment (``dt`` or the file's) and start."""
    dt = dt if dt is not None else _interval(layout, source)
    if dt is None:
        raise InputError(
            f"{source}: column {name!r} holds sample numbers, not times, and the file gives "
            "no increment (a 'Start'/'Increment' or 'Sample Interval' field); give "
            "sample_interval="
        )
    start, _ = _meta(layout, START_KEYS, source, "s")
    return (start or 0.0) + dt * numbers, dt


def _from_column(raw, tcol, names, units, layout: Layout, source, notes):
    """``(time, rebuild)``: the time column in seconds, rebuilt uniform when its stamps
    stair-step in the steps looked at, else with ``rebuild()`` for a repeat found later."""
    scale = 1.0
    if units[tcol]:
        found = unit_scale(units[tcol])
        if found is None or found[1] != "s":
            raise InputError(
                f"{source}: time column {names[tcol]!r} has unit {units[tcol]!r}; "
                "expected s, ms, us, ns or ps"
            )
        scale = found[0]
    time = _rebuilt(raw, layout, tcol, notes, scale) if steps_vary(raw) else raw
    rebuild = None
    if time is raw:

        def rebuild():
            new = _rebuilt(raw, layout, tcol, notes, scale)
            return None if new is raw else new * scale
    return (time * scale if scale != 1.0 else time), rebuild


def _rebuilt(time, layout: Layout, tcol: int, notes: list, scale: float):
    """A uniform time base in place of coarsely printed stamps, when they allow it."""
    quantum = print_quantum([r[tcol] for r in layout.sample_rows], layout.decimal)
    time, note = rebuild_uniform(time, quantum, layout.columns[tcol], scale)
    if note:
        notes.append(note)
    return time


def _build(columns, names, units, payload: Payload, layout: Layout, time, chan_idx, metadata,
           notes, rebuild=None) -> Capture:
    """The Capture from the time base and the channel columns (scaled by their units);
    ``rebuild()`` gives a uniform time base (or None) when a time stamp repeats."""
    source = payload.source
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
        if exc.what == "duplicate time stamp" and rebuild is not None:
            uniform = rebuild()
            if uniform is not None:
                return Capture(uniform, channels, metadata, source, chan_units, tuple(notes))
        line = _line_of_row(payload, layout, exc.row)
        where = f"line {line}" if line is not None else f"sample {exc.row}"
        message = str(exc).split(": ", 2)[-1]
        raise InputError(f"{source}: {where}: {message}") from None

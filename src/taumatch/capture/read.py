"""Read an instrument export (CSV/TSV/semicolon text, ``.npy``, ``.npz``) into a ``Capture``."""

from __future__ import annotations

import csv
import io
import os
import re
import tokenize
import zipfile
from pathlib import Path

import numpy as np

from ..errors import InputError
from ..units import parse_quantity
from .model import Capture, SampleProblem, few
from .sniff import (
    Layout,
    _fields,
    _trim,
    is_index_word,
    is_time_name,
    number_pattern,
    sniff,
    split_unit,
    unit_scale,
)

__all__ = ["read"]

_NONFINITE = re.compile(r"^[+-]?(nan|inf|infinity)$", re.IGNORECASE)
_HEAD_BYTES = 1 << 18  # the sniffer looks at the first 256 KiB (and 500 lines)
_INTERVAL_KEYS = {"sampleinterval", "samplinginterval", "dt", "timestep", "sampleperiod",
                  "samplingperiod", "timeinterval", "deltat", "interval", "timeresolution",
                  "increment", "xincrement", "timeincrement"}
_RATE_KEYS = {"samplerate", "samplingrate", "fs", "samplingfrequency", "samplefrequency"}
_START_KEYS = {"starttime", "start", "t0", "tstart", "timeoffset", "firsttime",
               "timeoffirstsample", "firstsample", "xorigin", "xstart"}


def read(path, channel: str | None = None, *, delimiter: str | None = None,
         decimal: str | None = None, time_column=None, sample_interval=None) -> Capture:
    """Read a capture file.

    Parameters
    ----------
    path : str or os.PathLike
        A text export (``.csv``, ``.tsv``, ``.txt``, ...), a NumPy ``.npy`` array or an
        ``.npz`` archive.  The layout of text files is sniffed (see ``docs/captures.md``).
    channel : str, optional
        Keep only this channel (name as in the file; case is ignored).
    delimiter : str, optional
        Cell delimiter, overriding the guess: ``","``, ``";"``, ``"\\t"``, ``"|"`` or
        ``"whitespace"``.
    decimal : str, optional
        Decimal mark, ``"."`` or ``","``, overriding the guess.
    time_column : str or int, optional
        Name or 0-based index of the time column, overriding the guess.
    sample_interval : float or str, optional
        Sample interval in seconds (``1e-6`` or ``"1u"``).  When given, time is built
        from it and from a start time found in the metadata (else 0), and no column is
        taken as time (a column named like time is left out); do not combine with
        ``time_column``.

    Returns
    -------
    Capture
        Time in seconds; channels in volts (scaled by the prefix of their unit).

    Raises
    ------
    InputError
        Naming the file (and line, where there is one) for unreadable or empty files,
        non-numeric cells, non-finite values, time not increasing, duplicate time stamps,
        too few samples, or unknown channel names.
    """
    source = os.fspath(path) if isinstance(path, (str, os.PathLike)) else None
    if source is None:
        raise InputError(f"capture path must be a file name, got {path!r}")
    if decimal not in (None, ".", ","):
        raise InputError(f"{source}: decimal mark must be '.' or ',', got {decimal!r}")
    if delimiter is not None and (not isinstance(delimiter, str) or delimiter == ""
                                  or (len(delimiter) > 1 and delimiter not in ("whitespace", r"\s+"))):
        raise InputError(
            f"{source}: delimiter must be one character or 'whitespace', got {delimiter!r}"
        )
    if delimiter in ("\\t", "tab"):
        delimiter = "\t"
    dt = None
    if sample_interval is not None:
        dt = parse_quantity(sample_interval, "s", field=f"{source}: sample interval")
        if not dt > 0:
            raise InputError(f"{source}: sample interval must be positive, got {sample_interval!r}")
    p = Path(source)
    try:
        with open(p, "rb") as fh:
            magic = fh.read(8)
    except IsADirectoryError:
        raise InputError(f"{source}: is a folder, not a capture file") from None
    except OSError as exc:
        raise InputError(f"{source}: cannot open ({exc.strerror or exc})") from None
    if not magic:
        raise InputError(f"{source}: the file is empty")
    if magic.startswith(b"\x93NUMPY"):
        cap = _read_npy(p, source, time_column, dt)
    elif magic.startswith(b"PK\x03\x04") or p.suffix.lower() == ".npz":
        cap = _read_npz(p, source, time_column, dt)
    else:
        cap = _read_text(p, source, delimiter, decimal, time_column, dt)
    if channel is not None:
        name = cap.channel_name(channel)
        cap = Capture(cap.time, {name: cap.channels[name]}, cap.metadata, cap.source,
                      {name: cap.units[name]})
    return cap


# --------------------------------------------------------------------------- text
def _read_text(p: Path, source, delimiter, decimal, time_column, dt) -> Capture:
    with open(p, "rb") as fh:
        head = fh.read(_HEAD_BYTES)
        complete = len(head) < _HEAD_BYTES or not fh.read(1)
    bom = 3 if head.startswith(b"\xef\xbb\xbf") else 0
    layout = sniff(head[bom:], complete=complete, source=source, delimiter=delimiter,
                   decimal=decimal, bom=bom)
    width = len(layout.columns)
    names = list(layout.columns) + [f"_spare{i}" for i in range(layout.trailing)]
    # Options kept to what the file needs: comment handling and re-decoding cost time in
    # pandas' C parser, so they are added only when the head shows a use for them.
    kwargs = {
        "sep": r"\s+" if layout.delimiter is None else layout.delimiter,
        "decimal": layout.decimal, "header": None, "names": names,
        "dtype": np.float64, "na_filter": False, "engine": "c",
    }
    if layout.trailing:  # the empty cells after a trailing delimiter are dropped
        kwargs["usecols"] = list(range(width))
    if b"#" in head[layout.data_byte:]:
        kwargs["comment"] = "#"
    # pandas reads a path much faster than a Python file object; skipping the header by
    # line count is exact unless lines end in a lone CR, and switching quoting off keeps
    # a stray quote in the metadata from swallowing lines (the data then must have none).
    by_path = (re.search(rb"\r(?!\n)", head) is None
               and b'"' not in head[layout.data_byte:])
    attempts = []
    if by_path:
        attempts.append(dict(kwargs, skiprows=layout.data_line, quoting=csv.QUOTE_NONE))
    attempts.append(kwargs)  # from a file object positioned at the data
    if "comment" not in kwargs:  # a comment line further down than the head
        attempts.append(dict(kwargs, comment="#"))
    frame = None
    for options in attempts:
        try:
            frame = _parse(p, layout, options)
            break
        except _PARSE_ERRORS:
            continue
    if frame is None:
        line, why = _find_bad_line(p, layout)
        if line is None:
            raise InputError(f"{source}: cannot read the numeric block") from None
        raise InputError(f"{source}: line {line}: {why}") from None
    if len(frame) == 0:
        raise InputError(f"{source}: no data rows after the header")
    columns = [frame[c].to_numpy() for c in layout.columns]
    del frame
    return _assemble(columns, layout, source, time_column, dt, p)


_PARSE_ERRORS = (ValueError, UnicodeError, OverflowError, MemoryError, IndexError)


def _parse(p: Path, layout: Layout, kwargs):
    import pandas as pd

    if "skiprows" in kwargs:
        return pd.read_csv(p, **kwargs)
    with open(p, "rb") as fh:
        fh.seek(layout.data_byte)
        return pd.read_csv(fh, **kwargs)


def _find_bad_line(p: Path, layout: Layout):
    """Scan the numeric block in Python for the first line pandas could not take."""
    pattern = number_pattern(layout.decimal)
    width = len(layout.columns)
    with open(p, "rb") as raw:
        raw.seek(layout.data_byte)
        text = io.TextIOWrapper(raw, encoding="latin-1", newline=None)
        for k, line in enumerate(text):
            number = layout.data_line + 1 + k
            body = line.split("#", 1)[0].strip()
            if not body:
                continue
            cells, _ = _trim(_fields(body, layout.delimiter))
            if len(cells) != width:
                return number, (f"{len(cells)} cells, expected {width} like the first data row "
                                f"(line {layout.data_line + 1}): {line.strip()[:60]!r}")
            for col, cell in enumerate(cells):
                if _NONFINITE.match(cell):
                    return number, (f"cell {cell!r} in column {col + 1} "
                                    f"({layout.columns[col]}) is not a finite number")
                if not pattern.match(cell):
                    return number, (f"cell {cell[:40]!r} in column {col + 1} "
                                    f"({layout.columns[col]}) is not a number with decimal "
                                    f"mark {layout.decimal!r}")
    return None, None


def _line_of_row(p: Path, layout: Layout, row: int) -> int | None:
    """1-based file line of data row ``row`` (blank and comment lines skipped)."""
    with open(p, "rb") as raw:
        raw.seek(layout.data_byte)
        text = io.TextIOWrapper(raw, encoding="latin-1", newline=None)
        seen = -1
        for k, line in enumerate(text):
            if line.split("#", 1)[0].strip():
                seen += 1
                if seen == row:
                    return layout.data_line + 1 + k
    return None


def _meta_number(layout: Layout, keys: set, source: str, unit: str):
    for key, value in layout.metadata.items():
        name, key_unit = split_unit(key)
        norm = re.sub(r"[^a-z0-9]", "", name.lower())
        if norm not in keys:
            continue
        text = value.strip()
        if layout.decimal == ",":
            text = text.replace(",", ".")
        text = text.split()[0] if text and key_unit else text
        field = f"{source}: line {layout.metadata_lines.get(key)}: {key}"
        number = parse_quantity(text, None if key_unit else unit, field=field)
        if key_unit:
            scale = unit_scale(key_unit)
            if scale is None or scale[1] != unit:
                raise InputError(f"{field}: unit {key_unit!r} is not a unit of {unit}")
            number *= scale[0]
        return number, key
    return None, None


def _index_column(layout: Layout, columns) -> int | None:
    """The column of sample numbers, if any, holding whole numbers that increase: named
    or labelled as one (``X`` over ``Sequence``, ``Index``, ``Point``), or the first column
    named ``X`` when the file gives an increment."""
    names, units = layout.columns, layout.units
    has_interval = any(re.sub(r"[^a-z0-9]", "", split_unit(k)[0].lower()) in _INTERVAL_KEYS
                       for k in layout.metadata)
    for i, name in enumerate(names):
        labelled = is_index_word(name) or (units[i] and is_index_word(units[i]))
        if not (labelled or (i == 0 and has_interval and not units[i]
                             and name.strip().lower() == "x")):
            continue
        col = columns[i]
        if col.size and np.all(col == np.round(col)) and np.all(col[1:] > col[:-1]):
            return i
    return None


def _assemble(columns, layout: Layout, source, time_column, dt, p: Path) -> Capture:
    names = list(layout.columns)
    icol = None if time_column is not None else _index_column(layout, columns)
    if icol is not None:
        return _from_index(columns, layout, source, icol, dt, p)
    tcol = _time_index(names, time_column, dt, source)
    metadata = dict(layout.metadata)
    if dt is None and tcol is None:
        dt, key = _meta_number(layout, _INTERVAL_KEYS, source, "s")
        if dt is None:
            rate, key = _meta_number(layout, _RATE_KEYS, source, "Hz")
            if rate is not None:
                if not rate > 0:
                    raise InputError(f"{source}: {key}: sample rate must be positive, got {rate}")
                dt = 1.0 / rate
        if dt is None:
            if len(names) < 2:
                raise InputError(
                    f"{source}: one column and no sample interval; give --sample-interval "
                    "(or a 'Sample Interval' line in the file)"
                )
            tcol = 0
        elif not dt > 0:
            raise InputError(f"{source}: {key}: sample interval must be positive, got {dt}")
    units = list(layout.units)
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
        if scale != 1.0:
            time = time * scale
        chan_idx = [i for i in range(len(names)) if i != tcol]
    else:
        start, _ = _meta_number(layout, _START_KEYS, source, "s")
        n = columns[0].size
        time = (start or 0.0) + dt * np.arange(n, dtype=np.float64)
        metadata.setdefault("sample interval used (s)", repr(dt))
        chan_idx = [i for i in range(len(names))
                    if not is_time_name(names[i]) or len(names) == 1]
    return _build(columns, layout, source, time, chan_idx, metadata, p)


def _from_index(columns, layout: Layout, source, icol, dt, p: Path) -> Capture:
    """Time from a column of sample numbers: start + number × increment, the increment
    from ``dt`` (the caller's) or the file's metadata, the start from the metadata (else 0)."""
    names = list(layout.columns)
    key = None
    if dt is None:
        dt, key = _meta_number(layout, _INTERVAL_KEYS, source, "s")
        if dt is None:
            rate, key = _meta_number(layout, _RATE_KEYS, source, "Hz")
            if rate is not None and rate > 0:
                dt = 1.0 / rate
    if dt is None:
        raise InputError(
            f"{source}: column {names[icol]!r} holds sample numbers, not times, and the file "
            "gives no increment (a 'Start'/'Increment' or 'Sample Interval' field); "
            "give --sample-interval"
        )
    if not dt > 0:
        raise InputError(f"{source}: {key}: sample interval must be positive, got {dt}")
    start, _ = _meta_number(layout, _START_KEYS, source, "s")
    time = (start or 0.0) + dt * columns[icol]
    metadata = dict(layout.metadata)
    metadata.setdefault("sample interval used (s)", repr(dt))
    chan_idx = [i for i in range(len(names)) if i != icol]
    return _build(columns, layout, source, time, chan_idx, metadata, p)


def _build(columns, layout: Layout, source, time, chan_idx, metadata, p: Path) -> Capture:
    """The Capture from the time base and the channel columns (scaled by their units)."""
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
        return Capture(time, channels, metadata, source, chan_units)
    except SampleProblem as exc:
        line = _line_of_row(p, layout, exc.row) if p is not None else None
        where = f"line {line}" if line is not None else f"sample {exc.row}"
        message = str(exc).split(": ", 2)[-1]
        raise InputError(f"{source}: {where}: {message}") from None


def _time_index(names, time_column, dt, source):
    if time_column is not None and dt is not None:
        raise InputError(
            f"{source}: give either a time column ({time_column!r}) or a sample interval "
            f"({dt!r} s), not both"
        )
    if time_column is None:
        if dt is not None:
            return None
        for i, n in enumerate(names):
            if is_time_name(n):
                return i
        return None
    is_int = isinstance(time_column, (int, np.integer)) and not isinstance(time_column, bool)
    if is_int or (isinstance(time_column, str) and time_column.strip().lstrip("-").isdigit()):
        index = int(time_column)
    elif isinstance(time_column, str):
        folded = [n.casefold() for n in names]
        if time_column.casefold() not in folded:
            raise InputError(
                f"{source}: no column named {time_column!r} for time; columns are "
                f"{few(names)}"
            )
        return folded.index(time_column.casefold())
    else:
        raise InputError(f"{source}: time column must be a name or an index, got {time_column!r}")
    if not 0 <= index < len(names):
        raise InputError(
            f"{source}: time column index {index} out of range 0..{len(names) - 1}"
        )
    return index


# --------------------------------------------------------------------------- numpy
def _read_npy(p: Path, source, time_column, dt) -> Capture:
    try:
        arr = np.load(p, allow_pickle=False)
    except (ValueError, OSError, EOFError, SyntaxError, tokenize.TokenError, MemoryError,
            OverflowError, TypeError) as exc:
        # a damaged header is parsed by numpy with ast/tokenize and can fail in their terms
        raise InputError(f"{source}: not a readable .npy array ({exc})") from None
    if not isinstance(arr, np.ndarray) or arr.dtype.kind not in "iuf":
        raise InputError(f"{source}: .npy array must hold real numbers, got dtype "
                         f"{getattr(arr, 'dtype', type(arr))}")
    if arr.ndim == 1:
        if dt is None:
            raise InputError(f"{source}: a 1-D .npy array needs --sample-interval")
        return Capture(dt * np.arange(arr.size, dtype=np.float64), {"CH1": arr}, {}, source)
    if arr.ndim != 2:
        raise InputError(f"{source}: .npy array must be 1-D or 2-D (rows = samples), "
                         f"got shape {arr.shape}")
    ncol = arr.shape[1]
    if time_column is None:
        tcol = None if dt is not None else 0
    else:
        tcol = _time_index([f"col{i + 1}" for i in range(ncol)], time_column, dt, source)
    if tcol is None:
        time = dt * np.arange(arr.shape[0], dtype=np.float64)
    else:
        time = arr[:, tcol]
    chans = {f"CH{k + 1}": arr[:, i] for k, i in enumerate(i for i in range(ncol) if i != tcol)}
    if not chans:
        raise InputError(f"{source}: .npy array has a time column only (shape {arr.shape})")
    return _checked(time, chans, {}, source)


def _read_npz(p: Path, source, time_column, dt) -> Capture:
    try:
        with np.load(p, allow_pickle=False) as archive:
            data = {k: archive[k] for k in archive.files}
    except (ValueError, OSError, EOFError, zipfile.BadZipFile, KeyError, SyntaxError,
            tokenize.TokenError, MemoryError, OverflowError, TypeError, NotImplementedError,
            RuntimeError) as exc:
        raise InputError(f"{source}: not a readable .npz archive ({exc})") from None
    metadata, arrays = {}, {}
    for key, value in data.items():
        if value.dtype.kind not in "iuf":
            if value.ndim == 0:
                metadata[key] = str(value)
                continue
            raise InputError(f"{source}: array {key!r} must hold real numbers, got {value.dtype}")
        if value.ndim == 0:
            metadata[key] = repr(float(value))
        elif value.ndim == 1:
            arrays[key] = value
        else:
            raise InputError(f"{source}: array {key!r} must be 1-D, got shape {value.shape}")
    if not arrays:
        raise InputError(f"{source}: .npz archive holds no 1-D arrays")
    if time_column is not None:
        tkey = time_column if time_column in arrays else None
        if tkey is None:
            raise InputError(f"{source}: no array named {time_column!r}; arrays are "
                             f"{few(arrays)}")
    elif dt is None:
        tkey = next((k for k in arrays if k.lower() in ("t", "time", "time_s")), None)
    else:
        tkey = None
    if tkey is None:
        if dt is None:
            for key in ("dt", "sample_interval"):
                if key in metadata:
                    dt = parse_quantity(metadata[key], "s", field=f"{source}: array {key!r}")
                    break
        if dt is None or not dt > 0:
            raise InputError(f"{source}: no time array ('t' or 'time') and no sample interval "
                             "('dt' in the archive or --sample-interval)")
        n = next(iter(arrays.values())).size
        start = parse_quantity(metadata.get("t0", 0.0), "s", field=f"{source}: array 't0'")
        time = start + dt * np.arange(n, dtype=np.float64)
    else:
        time = arrays.pop(tkey)
    if not arrays:
        raise InputError(f"{source}: .npz archive has a time array only")
    return _checked(time, arrays, metadata, source)


def _checked(time, chans, metadata, source) -> Capture:
    try:
        return Capture(time, chans, metadata, source)
    except SampleProblem as exc:
        raise InputError(str(exc)) from None

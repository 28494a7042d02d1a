"""Work out the layout of a text export from its first lines.

The header of an export (key/value metadata, column names, a line of units) is read
here in Python; the numeric block that follows is left to pandas' C parser.  The numeric
block is a run of rows whose cells ``first .. first + width - 1`` are numbers; cells on
either side of it are a metadata block beside the data (left or right columns).  Every
guess can be overridden by the caller (delimiter, decimal mark, time column, sample
interval).

Everything here runs in time linear in the size of the head: the number pattern has no
nested or adjacent repeats that could backtrack.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

from ..errors import InputError
from .labels import is_index_word, is_unit_cell, split_unit
from .limits import MAX_COLUMNS

__all__ = ["DELIMITERS", "Layout", "fields", "number_pattern", "sniff"]

#: Delimiters tried, in order of preference when two fit equally well (None: whitespace).
DELIMITERS = (",", ";", "\t", None, "|")
_ENOUGH_ROWS = 50  # numeric rows in a run that settle the layout
#: Lines of the head the sniffer looks at (metadata block, header, first data rows).
MAX_LINES = 500
_SAMPLE_ROWS = 200  # data rows kept as text (the printed resolution of time)
_LINE_BREAK = re.compile(rb"\r\n|\n|\r")
_NONFINITE = r"(?:[+-]?(?:nan|inf|infinity))"


def number_pattern(decimal: str) -> re.Pattern:
    """Regular expression for one numeric cell with the given decimal mark.

    Linear time: digits, then at most one mark and its digits, so a long run of digits
    that fails at its end is not split in every possible way.

    >>> p = number_pattern(".")
    >>> [bool(p.match(c)) for c in ["1", "-1.5e-3", ".5", "1.", "inf", "1.2.3", "1" * 5000 + "x"]]
    [True, True, True, True, True, False, False]
    """
    d = re.escape(decimal)
    return re.compile(
        rf"^(?:[+-]?(?:\d+(?:{d}\d*)?|{d}\d+)(?:[eE][+-]?\d+)?|{_NONFINITE})$", re.IGNORECASE
    )


_NUM = {".": number_pattern("."), ",": number_pattern(",")}


def fields(line: str, delimiter: str | None) -> list[str]:
    """The cells of one line, unquoted and stripped (``None``: split on blanks)."""
    parts = line.split() if delimiter is None else line.split(delimiter)
    return [p.strip().strip('"').strip("'").strip() for p in parts]


def _trim(cells: list[str]) -> list[str]:
    """Drop empty cells at the end (trailing delimiters)."""
    n = len(cells)
    while n and cells[n - 1] == "":
        n -= 1
    return cells[:n]


@dataclass(frozen=True)
class Layout:
    """What the sniffer found in the head of a text export.

    Attributes
    ----------
    delimiter : str or None
        Cell delimiter; None means runs of whitespace.
    decimal : str
        Decimal mark, ``"."`` or ``","``.
    data_line : int
        0-based index of the first numeric line.
    data_byte : int
        Byte offset of that line in the text.
    columns : tuple of str
        Names of the numeric columns (from the header, or ``col1``, ``col2``, ... by their
        place in the row without one).
    units : tuple of (str or None)
        Unit text of each numeric column, from the names or from a line of units.
    first : int
        Place in the row of the first numeric column (cells before it: metadata beside).
    cells : int
        Cells a data row may hold in all (numeric columns, metadata beside, trailing
        delimiters).
    metadata : dict
        Key/value pairs from the lines before the data, the cells beside it and ``#``
        comments.
    metadata_lines : dict
        Key to the 1-based line number it came from (for messages).
    sample_rows : tuple of tuple of str
        The numeric cells of the first data rows as printed.
    """

    delimiter: str | None
    decimal: str
    data_line: int
    data_byte: int
    columns: tuple
    units: tuple
    first: int = 0
    cells: int = 0
    metadata: dict = field(default_factory=dict)
    metadata_lines: dict = field(default_factory=dict)
    sample_rows: tuple = ()

    @property
    def width(self) -> int:
        """Number of numeric columns."""
        return len(self.columns)


def _split_lines(head: bytes, complete: bool):
    """(line index, byte offset, text) for each whole line of ``head``."""
    pos = 0
    out = []
    for m in _LINE_BREAK.finditer(head):
        out.append((len(out), pos, head[pos:m.start()]))
        pos = m.end()
        if len(out) >= MAX_LINES:
            break
    if pos < len(head) and complete and len(out) < MAX_LINES:
        out.append((len(out), pos, head[pos:]))
    decoded = []
    for index, offset, raw in out:
        try:
            text = raw.decode("utf-8")
        except UnicodeDecodeError:
            text = raw.decode("latin-1")
        decoded.append((index, offset, text))
    return decoded


def _is_comment(text: str) -> bool:
    return text.lstrip().startswith("#")


def _runs(cells: list[str], pattern) -> list[tuple[int, int]]:
    """Maximal runs ``(first, width)`` of numeric cells."""
    runs, start = [], None
    for i, c in enumerate(cells):
        if c and pattern.match(c):
            if start is None:
                start = i
        elif start is not None:
            runs.append((start, i - start))
            start = None
    if start is not None:
        runs.append((start, len(cells) - start))
    return runs


def _data_block(rows, pattern):
    """Where the numeric rows start: (position in rows, longest run, (first, width)).

    The block is the longest run of consecutive rows sharing a numeric span; it starts at
    the first run of that span at least ``min(5, longest)`` rows long, so that a bad row
    inside the data is left for the reader to report rather than taken for a header.
    ``rows`` yields each line's cells (None for a blank or comment line); it is read only
    as far as a run of 50 rows.
    """
    done, open_runs = [], {}
    for pos, cells in enumerate(rows):
        if cells is None:
            continue
        now = {}
        for span in _runs(cells, pattern):
            start, length = open_runs.get(span, (pos, 0))
            now[span] = (start, length + 1)
        done += [(start, length, span) for span, (start, length) in open_runs.items()
                 if span not in now]
        open_runs = now
        if any(length >= _ENOUGH_ROWS for _, length in now.values()):
            break
    done += [(start, length, span) for span, (start, length) in open_runs.items()]
    if not done:
        return 0, 0, (0, 0)
    _, longest, span = max(done, key=lambda r: (r[1], r[2][1], -r[2][0]))
    need = min(5, longest)
    start = min(r[0] for r in done if r[2] == span and r[1] >= need)
    return start, longest, span


def _key_value(text: str, delimiter: str | None):
    """``[(key, value), ...]`` from one metadata line (no regular expressions: linear)."""
    comment = _is_comment(text)
    body = text.lstrip().lstrip("#").strip()
    if not body:
        return []
    cut = min((i for i in (body.find("="), body.find(":")) if i >= 0), default=-1)
    if cut > 0 and not any(c in body[:cut] for c in ",;\t"):
        value = body[cut + 1:].strip().rstrip(",;\t").strip()
        return [(body[:cut].strip(), value)]
    if comment:  # a comment is metadata only when written as key: value or key=value
        return []
    return _side_pairs(_trim(fields(body, delimiter)))


def _side_pairs(cells: list[str]) -> list[tuple[str, str]]:
    """Key/value pairs from cells: ``key, value [, unit]``; ``k1, v1, k2, v2`` alternating
    keys and numbers gives each pair."""
    cells = [c for c in cells if c]
    if not cells:
        return []
    num = _NUM["."]
    if (len(cells) >= 4 and len(cells) % 2 == 0
            and all(not num.match(k) and num.match(v) for k, v in zip(cells[::2], cells[1::2]))):
        return list(zip(cells[::2], cells[1::2]))
    return [(cells[0], " ".join(cells[1:]))]


def _keys_over_values(cells, below, dec) -> bool:
    """A line of keys over a line of as many numbers (``Start,Increment`` over
    ``-3.5e-03,5e-06``)."""
    num = _NUM[dec]
    return bool(cells and below and len(cells) == len(below) and len(cells) >= 2
                and all(c and not num.match(c) for c in cells)
                and all(num.match(c) for c in below))


def _cells(lines, delimiter):
    """Each line's cells, or None for a blank or comment line (lazily)."""
    for _, _, text in lines:
        if not text.strip() or _is_comment(text):
            yield None
        else:
            yield _trim(fields(text.split("#", 1)[0], delimiter))


def _candidates(lines, delimiter, decimal):
    delims = list(DELIMITERS) if delimiter is None else [
        None if delimiter in (" ", "whitespace", r"\s+") else delimiter]
    decimals = [decimal] if decimal is not None else [".", ","]
    for order, (dlm, dec) in enumerate((d, c) for d in delims for c in decimals):
        if dlm == dec:
            continue
        start, length, span = _data_block(_cells(lines, dlm), _NUM[dec])
        if length:
            yield (length, span[1], -order), dlm, dec, start, span


def sniff(head: bytes, *, complete: bool, source: str, delimiter=None, decimal=None) -> Layout:
    """Find delimiter, decimal mark, metadata, column names and units in ``head``.

    Parameters
    ----------
    head : bytes
        The first bytes of the text (UTF-8 or Latin-1, after any byte-order mark).
    complete : bool
        True when ``head`` is the whole text (its last line is then complete).
    source : str
        File name for messages.
    delimiter, decimal : str, optional
        Caller's overrides; ``delimiter="whitespace"`` or ``" "`` means runs of blanks.

    Raises
    ------
    InputError
        When no numeric block is found, or its rows are wider than the limit.
    """
    lines = _split_lines(head, complete)
    if not lines:
        if head.strip():
            raise InputError(f"{source}: no line break in the first {len(head) >> 10} KiB; "
                             "not a text export of rows")
        raise InputError(f"{source}: the file is empty")
    best = max(_candidates(lines, delimiter, decimal), key=lambda c: c[0], default=None)
    if best is None:
        raise InputError(
            f"{source}: no numeric data found in the first {len(lines)} lines; "
            "expected rows of numbers separated by , ; tab or blanks"
        )
    _, dlm, dec, start, (first, width) = best
    rows = [(*line, cells) for line, cells in zip(lines, _cells(lines, dlm))]
    block = []  # the rows of the run (a row of another span below it is the reader's to report)
    for r in rows[start:]:
        if r[3] is None:
            continue
        if (first, width) not in _runs(r[3], _NUM[dec]):
            break
        block.append(r)
    ncells = max(len(fields(r[2].split("#", 1)[0], dlm)) for r in block[:_ENOUGH_ROWS])
    if ncells > MAX_COLUMNS:
        raise InputError(
            f"{source}: line {block[0][0] + 1}: {ncells} cells in a row; a capture row may "
            f"hold at most {MAX_COLUMNS} (time, channels and metadata beside them)"
        )
    line_index, data_byte, _, _ = rows[start]
    header = _header(rows[:start], first, width, dec)
    metadata, meta_lines = header.pop("metadata"), header.pop("metadata_lines")
    pairs = []
    for k, (index, _, text, cells) in enumerate(rows[:start]):
        if index in header["used"] or (cells is None and not _is_comment(text)):
            continue
        below = next((r for r in rows[k + 1:start] if r[3] is not None), None)
        if below is not None and _keys_over_values(cells, below[3], dec):
            header["used"].add(below[0])
            pairs += [(index, kv) for kv in zip(cells, below[3])]
            continue
        pairs += [(index, kv) for kv in _key_value(text, dlm)]
    for index, (key, value) in pairs:
        if key and key not in metadata:
            metadata[key] = value
            meta_lines[key] = index + 1
    samples = []
    for index, _, text, cells in block:
        beside = cells[:first] + cells[first + width:]
        for key, value in _side_pairs(beside):
            if key not in metadata and not _NUM[dec].match(key):
                metadata[key] = value
                meta_lines[key] = index + 1
        if len(samples) < _SAMPLE_ROWS and len(cells) >= first + width:
            samples.append(tuple(cells[first:first + width]))
    return Layout(
        delimiter=dlm, decimal=dec, data_line=line_index, data_byte=data_byte,
        columns=tuple(header["columns"]), units=tuple(header["units"]), first=first,
        cells=max(ncells, first + width), metadata=metadata, metadata_lines=meta_lines,
        sample_rows=tuple(samples),
    )


def _header(before, first, width, dec) -> dict:
    """Column names, units and key cells from the text lines before the data.

    Nearest first: a line of units (or of values, under key cells), then the names.
    Either may run on past the data's columns with key cells over value cells
    (``X,CH1,Start,Increment`` over ``Sequence,Volt,-3.5e-03,5e-06``).
    """
    num = _NUM[dec]
    end = first + width
    out = {"columns": [f"col{first + i + 1}" for i in range(width)], "units": [None] * width,
           "used": set(), "metadata": {}, "metadata_lines": {}}
    cand = [r for r in reversed(before) if r[3] is not None]
    unit_cells, unit_line = [], None
    if cand:
        cells = cand[0][3]
        inside = cells[first:end]
        if (len(cells) >= end and any(cells)
                and all(not c or is_unit_cell(c) or is_index_word(c) for c in inside)):
            out["units"] = [c.strip().strip("()[]").strip() or None for c in inside]
            unit_cells, unit_line = cells, cand[0][0]
            out["used"].add(unit_line)
            cand = cand[1:]
    if not cand:
        return out
    index, cells = cand[0][0], cand[0][3]
    inside = cells[first:end]
    if len(cells) < end or not all(inside) or any(num.match(c) for c in inside):
        return out
    names = []
    for i, c in enumerate(inside):
        name, unit = split_unit(c)
        names.append(name or f"col{first + i + 1}")
        if unit is not None and out["units"][i] is None:
            out["units"][i] = unit
    out["columns"] = _unique(names)
    out["used"].add(index)
    for i, key in enumerate(cells):  # key cells beside the names: value below, or next
        if first <= i < end or not key or num.match(key):
            continue
        if i < len(unit_cells) and num.match(unit_cells[i]):
            value, line = unit_cells[i], unit_line
        elif i + 1 < len(cells) and not first <= i + 1 < end and num.match(cells[i + 1]):
            value, line = cells[i + 1], index
        else:
            continue
        if key not in out["metadata"]:
            out["metadata"][key] = value
            out["metadata_lines"][key] = line + 1
    return out


def _unique(names: list[str]) -> list[str]:
    seen: dict[str, int] = {}
    out = []
    for n in names:
        if n in seen:
            seen[n] += 1
            out.append(f"{n}_{seen[n]}")
        else:
            seen[n] = 1
            out.append(n)
    return out

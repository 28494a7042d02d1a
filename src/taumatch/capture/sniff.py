"""Work out the layout of a text export from its first lines.

The header of an export (key/value metadata, column names, a line of units) is read
here in Python; the numeric block that follows is left to pandas' C parser.  Every
guess can be overridden by the caller (delimiter, decimal mark, time column, sample
interval).
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

from ..errors import InputError
from ..units import PREFIXES

__all__ = ["DELIMITERS", "Layout", "is_index_word", "is_time_name", "number_pattern", "sniff",
           "split_unit", "unit_scale"]

#: Delimiters tried, in order of preference when two fit equally well (None: whitespace).
DELIMITERS = (",", ";", "\t", None, "|")
_ENOUGH_ROWS = 50  # numeric rows in a run that settle the layout
#: Lines of the head the sniffer looks at (metadata block, header, first data rows).
MAX_LINES = 500
_LINE_BREAK = re.compile(rb"\r\n|\n|\r")
_NONFINITE = r"(?:[+-]?(?:nan|inf|infinity))"


def number_pattern(decimal: str) -> re.Pattern:
    """Regular expression for one numeric cell with the given decimal mark."""
    d = re.escape(decimal)
    return re.compile(
        rf"^(?:[+-]?(?:\d+{d}?\d*|{d}\d+)(?:[eE][+-]?\d+)?|{_NONFINITE})$", re.IGNORECASE
    )


_NUM = {".": number_pattern("."), ",": number_pattern(",")}
_UNIT_IN_NAME = re.compile(r"^(?P<name>.*?)\s*[\(\[](?P<unit>[^\)\]]*)[\)\]]\s*$")
_BASE_UNITS = {
    "s": "s", "sec": "s", "secs": "s", "second": "s", "seconds": "s",
    "v": "V", "volt": "V", "volts": "V",
    "a": "A", "amp": "A", "amps": "A", "ampere": "A", "amperes": "A",
    "hz": "Hz", "sa/s": "Hz", "s/s": "Hz",
}
_TIME_NAMES = {"time", "t", "times", "sec", "secs", "second", "seconds", "s", "x", "xaxis",
               "timestamp", "timestamps"}


def unit_scale(unit: str) -> tuple[float, str] | None:
    """``("mV") -> (1e-3, "V")``; None when the text is not a unit we know."""
    u = unit.strip().replace("μ", "µ")
    if not u:
        return None
    if u.lower() in _BASE_UNITS:
        return 1.0, _BASE_UNITS[u.lower()]
    if len(u) >= 2 and u[0] in PREFIXES and u[1:].lower() in _BASE_UNITS:
        return PREFIXES[u[0]], _BASE_UNITS[u[1:].lower()]
    return None


def split_unit(text: str) -> tuple[str, str | None]:
    """``"CH1 [mV]" -> ("CH1", "mV")``; ``"CH1" -> ("CH1", None)``."""
    m = _UNIT_IN_NAME.match(text.strip())
    if m and m.group("name").strip():
        return m.group("name").strip(), m.group("unit").strip()
    return text.strip(), None


def is_time_name(name: str) -> bool:
    """True for column names that mean time (``Time``, ``t``, ``Seconds``, ``Time (s)``)."""
    key = re.sub(r"[^a-z]", "", split_unit(name)[0].lower())
    return key in _TIME_NAMES or key.startswith("time")


#: Words that name a column of sample numbers (as a name or as its unit).
_INDEX_WORDS = {"sequence", "seq", "index", "idx", "sample", "samples", "samplenumber",
                "sampleno", "point", "points", "pointnumber", "pointno", "pts", "no", "number"}


def is_index_word(text: str) -> bool:
    """True for words that name sample numbers (``Sequence``, ``Index``, ``Point``)."""
    key = re.sub(r"[^a-z]", "", split_unit(text)[0].lower())
    return key in _INDEX_WORDS


def _is_unit_cell(text: str) -> bool:
    t = text.strip().strip("()[]").strip()
    return unit_scale(t) is not None


def _fields(line: str, delimiter: str | None) -> list[str]:
    parts = line.split() if delimiter is None else line.split(delimiter)
    return [p.strip().strip('"').strip("'").strip() for p in parts]


def _trim(cells: list[str]) -> tuple[list[str], int]:
    """Drop empty cells at the end (trailing delimiters); return cells and how many."""
    n = len(cells)
    while cells and cells[-1] == "":
        cells = cells[:-1]
    return cells, n - len(cells)


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
        Byte offset of that line in the file.
    columns : tuple of str
        Column names (from the header, or ``col1``, ``col2``, ... without one).
    units : tuple of (str or None)
        Unit text of each column, from the names or from a line of units.
    trailing : int
        Empty cells after the last column on data lines (trailing delimiters).
    metadata : dict
        Key/value pairs from the lines before the data (and ``#`` comments).
    metadata_lines : dict
        Key to the 1-based line number it came from (for messages).
    """

    delimiter: str | None
    decimal: str
    data_line: int
    data_byte: int
    columns: tuple
    units: tuple
    trailing: int = 0
    metadata: dict = field(default_factory=dict)
    metadata_lines: dict = field(default_factory=dict)


def _split_lines(head: bytes, complete: bool):
    """Yield (line index, byte offset, text) for each line of ``head``."""
    pos = 0
    index = 0
    out = []
    for m in _LINE_BREAK.finditer(head):
        out.append((index, pos, head[pos:m.start()]))
        pos = m.end()
        index += 1
        if index >= MAX_LINES:
            break
    if pos < len(head) and complete and index < MAX_LINES:
        out.append((index, pos, head[pos:]))
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


def _numeric_width(text: str, delimiter: str | None, decimal: str) -> int | None:
    """Number of numeric cells if the line is a numeric row, else None."""
    body = text.split("#", 1)[0]
    cells, _ = _trim(_fields(body, delimiter))
    if not cells:
        return None
    pattern = _NUM[decimal]
    for c in cells:
        if not pattern.match(c):
            return None
    return len(cells)


def _data_block(lines, delimiter, decimal):
    """Where the numeric rows start: (position in lines, longest run, width).

    The width is that of the longest run of numeric rows of one width; the block starts
    at the first run of that width at least ``min(5, longest)`` rows long, so that a bad
    row inside the data is left for the reader to report rather than taken for a header.
    """
    runs = []  # (start, length, width)
    run_start, run_len, run_width = None, 0, None
    for pos, (_, _, text) in enumerate(lines):
        if not text.strip() or _is_comment(text):
            continue
        width = _numeric_width(text, delimiter, decimal)
        if width is not None and width == run_width:
            run_len += 1
            if run_len >= _ENOUGH_ROWS:
                break
            continue
        if run_len:
            runs.append((run_start, run_len, run_width))
        run_start, run_len, run_width = (pos, 1, width) if width is not None else (None, 0, None)
    if run_len:
        runs.append((run_start, run_len, run_width))
    if not runs:
        return 0, 0, 0
    _, longest, width = max(runs, key=lambda r: r[1])
    need = min(5, longest)
    start = next(r[0] for r in runs if r[2] == width and r[1] >= need)
    return start, longest, width


def _key_value(text: str, delimiter: str | None):
    comment = _is_comment(text)
    body = text.lstrip().lstrip("#").strip()
    if not body:
        return None
    m = re.match(r"^([^=:,;\t]+?)\s*[=:]\s*(.*)$", body)
    if m:
        return m.group(1).strip(), m.group(2).strip().rstrip(",;\t").strip()
    if comment:  # a comment is metadata only when written as key: value or key=value
        return None
    cells, _ = _trim(_fields(body, delimiter))
    if not cells:
        return None
    if len(cells) == 1:
        return cells[0], ""
    return cells[0], " ".join(c for c in cells[1:] if c)


def sniff(head: bytes, *, complete: bool, source: str, delimiter=None, decimal=None,
          bom: int = 0) -> Layout:
    """Find delimiter, decimal mark, metadata, column names and units in ``head``.

    Parameters
    ----------
    head : bytes
        The first bytes of the file (after any byte-order mark).
    complete : bool
        True when ``head`` is the whole file (its last line is then complete).
    source : str
        File name for messages.
    delimiter, decimal : str, optional
        Caller's overrides; ``delimiter="whitespace"`` or ``" "`` means runs of blanks.
    bom : int
        Length of the byte-order mark stripped before ``head`` (added to offsets).

    Raises
    ------
    InputError
        When no numeric block is found.
    """
    if b"\x00" in head:
        raise InputError(f"{source}: binary file (NUL bytes), not a text export or .npy/.npz")
    lines = _split_lines(head, complete)
    if not lines:
        raise InputError(f"{source}: the file is empty")
    if delimiter is not None:
        delims = [None if delimiter in (" ", "whitespace", r"\s+") else delimiter]
    else:
        delims = list(DELIMITERS)
    decimals = [decimal] if decimal is not None else [".", ","]
    candidates = []
    for order, (dlm, dec) in enumerate((d, c) for d in delims for c in decimals):
        if dlm == dec:
            continue
        start, length, width = _data_block(lines, dlm, dec)
        if length:
            candidates.append(((length, width, -order), dlm, dec, start, width))
    if not candidates:
        raise InputError(
            f"{source}: no numeric data found in the first {len(lines)} lines; "
            "expected rows of numbers separated by , ; tab or blanks"
        )
    _, dlm, dec, start, width = max(candidates, key=lambda c: c[0])
    line_index, data_byte, first_text = lines[start]
    trailing = _trim(_fields(first_text.split("#", 1)[0], dlm))[1] if dlm is not None else 0

    # Text lines before the data, nearest first: a line of units, then column names.
    # Either may run on past the data's width with key cells over value cells
    # (``X,CH1,Start,Increment`` over ``Sequence,Volt,-3.5e-03,5e-06``).
    before = [entry for entry in lines[:start] if entry[2].strip() and not _is_comment(entry[2])]
    columns = [f"col{i + 1}" for i in range(width)]
    units: list = [None] * width
    used = set()
    cand = list(reversed(before))
    unit_cells: list = []
    unit_line = None
    metadata, meta_lines = {}, {}
    if cand:
        cells = _trim(_fields(cand[0][2], dlm))[0]
        if len(cells) >= width and all(not c or _is_unit_cell(c) or is_index_word(c)
                                       for c in cells[:width]):
            units = [c.strip().strip("()[]").strip() or None for c in cells[:width]]
            unit_cells, unit_line = cells, cand[0][0]
            used.add(unit_line)
            cand = cand[1:]
    if cand:
        cells = _trim(_fields(cand[0][2], dlm))[0]
        if (len(cells) >= width and all(cells[:width])
                and not any(_NUM[dec].match(c) for c in cells[:width])):
            names = []
            for i, c in enumerate(cells[:width]):
                name, unit = split_unit(c)
                names.append(name or f"col{i + 1}")
                if unit is not None and units[i] is None:
                    units[i] = unit
            columns = _unique(names)
            used.add(cand[0][0])
            # key cells past the data's width: the value sits below (units line) or beside
            for i in range(width, len(cells)):
                key = cells[i]
                if not key or _NUM[dec].match(key):
                    continue
                if i < len(unit_cells) and _NUM[dec].match(unit_cells[i]):
                    value, line = unit_cells[i], unit_line
                elif i + 1 < len(cells) and _NUM[dec].match(cells[i + 1]):
                    value, line = cells[i + 1], cand[0][0]
                else:
                    continue
                if key not in metadata:
                    metadata[key] = value
                    meta_lines[key] = line + 1
    for index, _, text in lines[:start]:
        if index in used or not text.strip():
            continue
        kv = _key_value(text, dlm)
        if kv is None or not kv[0]:
            continue
        key, value = kv
        if key not in metadata:
            metadata[key] = value
            meta_lines[key] = index + 1
    return Layout(
        delimiter=dlm, decimal=dec, data_line=line_index, data_byte=data_byte + bom,
        columns=tuple(columns), units=tuple(units), trailing=trailing,
        metadata=metadata, metadata_lines=meta_lines,
    )


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

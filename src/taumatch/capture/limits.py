"""The sizes and ranges a capture may have, stated once (and in ``docs/captures.md``).

Each keeps a command within seconds and a few GiB on a small machine, and each error that
enforces one says the limit and how to stay inside it.
"""

from __future__ import annotations

from ..errors import InputError
from ..units import format_quantity

__all__ = [
    "INTERVAL_RANGE", "MAX_COLUMNS", "MAX_FIELD_CHARS", "MAX_INFLATED_BYTES", "MAX_SAMPLES",
    "MAX_VALUES", "check_interval", "check_size", "max_rows",
]

#: Samples per channel (rows of a text export, elements of an array).
MAX_SAMPLES = 20_000_000
#: Numbers kept in all (samples × columns, time included): 512 MB of float64.
MAX_VALUES = 64_000_000
#: Cells in one row of a text export (time, channels and any metadata beside them).
MAX_COLUMNS = 10_000
#: Bytes a compressed file or archive member may inflate to.
MAX_INFLATED_BYTES = 2 << 30
#: Characters of a metadata value read as a number (a sample interval, a start time).
MAX_FIELD_CHARS = 100
#: Sample intervals the arithmetic downstream carries (s): 1 fs to 10 ks.
INTERVAL_RANGE = (1e-15, 1e4)


def max_rows(columns: int) -> int:
    """Most samples a record of ``columns`` columns (time included) may hold."""
    return max(1, min(MAX_SAMPLES, MAX_VALUES // max(1, columns)))


def check_size(samples: int, columns: int, where: str) -> None:
    """Refuse a record of more samples than :func:`max_rows` allows (``samples`` may be
    a count that stopped one past the limit).

    >>> check_size(1000, 3, "x.csv")
    >>> check_size(40_000_000, 4, "x.csv")
    Traceback (most recent call last):
    ...
    taumatch.errors.InputError: x.csv: more than 16000000 samples of 4 columns; the reader keeps at most 20000000 samples per channel and 64000000 numbers in all: cut or decimate the record
    """
    limit = max_rows(columns)
    if samples > limit:
        raise InputError(
            f"{where}: more than {limit} samples of {columns} column"
            f"{'s' if columns != 1 else ''}; the reader keeps at most {MAX_SAMPLES} samples "
            f"per channel and {MAX_VALUES} numbers in all: cut or decimate the record"
        )


def check_interval(dt: float, where: str) -> None:
    """Refuse a sample interval outside :data:`INTERVAL_RANGE`.

    >>> check_interval(1e-300, "sample_interval")
    Traceback (most recent call last):
    ...
    taumatch.errors.InputError: sample_interval: 1e-300 s is outside the sample intervals taumatch can work with, 1 fs to 10 ks
    """
    lo, hi = INTERVAL_RANGE
    if not lo <= dt <= hi:
        raise InputError(
            f"{where}: {dt:.6g} s is outside the sample intervals taumatch can work with, "
            f"{format_quantity(lo, 's')} to {format_quantity(hi, 's')}"
        )

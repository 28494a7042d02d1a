"""The time base of a record: which column is time, a column of sample numbers, and a
uniform time base rebuilt from stamps printed too coarsely for the sampling."""

from __future__ import annotations

import re

import numpy as np

from ..errors import InputError
from ..units import format_quantity
from .labels import INTERVAL_KEYS, is_index_word, is_time_name, key_of, split_unit
from .model import few

__all__ = ["index_column", "print_quantum", "rebuild_uniform", "time_index"]

_PROBE = 1 << 16  # steps looked at for stair-steps: the first ones, and as many spread out
_MIN_SPAN = 100  # printed digits a record must span for its step to be rebuilt


def time_index(names, time_column, dt, source) -> int | None:
    """The time column's place: the caller's name or 0-based index, else the first column
    named like time, else None.

    Raises
    ------
    InputError
        An unknown name, an index out of range, or both a time column and ``dt``.
    """
    if time_column is not None and dt is not None:
        raise InputError(
            f"{source}: give either a time column ({time_column!r}) or a sample interval "
            f"({dt!r} s), not both"
        )
    if time_column is None:
        if dt is not None:
            return None
        return next((i for i, n in enumerate(names) if is_time_name(n)), None)
    if isinstance(time_column, (int, np.integer)) and not isinstance(time_column, bool):
        index = int(time_column)
    elif isinstance(time_column, str) and re.fullmatch(r"\s*-?[0-9]+\s*", time_column):
        index = int(time_column)
    elif isinstance(time_column, str):
        folded = [n.casefold() for n in names]
        if time_column.casefold() not in folded:
            raise InputError(
                f"{source}: no column named {time_column[:40]!r} for time; columns are "
                f"{few(names)}, or give a 0-based index 0..{len(names) - 1}"
            )
        return folded.index(time_column.casefold())
    else:
        raise InputError(f"{source}: time column must be a name or an index, got {time_column!r}")
    if not 0 <= index < len(names):
        raise InputError(
            f"{source}: time column index {index} out of range 0..{len(names) - 1}"
        )
    return index


def index_column(names, units, metadata, columns) -> int | None:
    """The column of sample numbers, if any, holding whole numbers that increase: named
    or labelled as one (``X`` over ``Sequence``, ``Index``, ``Point``), or the first column
    named ``X`` when the file gives an increment."""
    has_interval = any(key_of(split_unit(k)[0]) in INTERVAL_KEYS for k in metadata)
    for i, name in enumerate(names):
        labelled = is_index_word(name) or (units[i] and is_index_word(units[i]))
        if not (labelled or (i == 0 and has_interval and not units[i]
                             and name.strip().lower() == "x")):
            continue
        col = columns[i]
        if col.size and np.all(col == np.round(col)) and np.all(col[1:] > col[:-1]):
            return i
    return None


def print_quantum(cells, decimal: str = "."):
    """The printed resolution of stamps as a function of the stamp, from their text.

    Fixed notation (``0.00125``): one unit of the last decimal printed. Exponent notation
    (``1.25e-03``): one unit of the last mantissa digit, at each stamp's own exponent.

    >>> q = print_quantum(["0.001", "0.00125"])
    >>> float(q(np.array([0.5]))[0])
    1e-05
    >>> q = print_quantum(["-1.25e-03", "1.3e+00"])
    >>> [float(f"{x:.3g}") for x in q(np.array([-1.25e-3, 2.0]))]
    [1e-05, 0.01]
    """
    exp_digits, fixed_digits, has_exp = 0, 0, False
    for cell in cells:
        text = cell.strip().lstrip("+-")
        mant, sep, _ = text.replace("E", "e").partition("e")
        frac = mant.partition(decimal)[2]
        if sep:
            has_exp = True
            exp_digits = max(exp_digits, len(frac))
        else:
            fixed_digits = max(fixed_digits, len(frac))
    if has_exp:
        def quantum(t):
            mag = np.abs(np.asarray(t, dtype=np.float64))
            with np.errstate(divide="ignore"):
                power = np.floor(np.log10(np.where(mag > 0, mag, 1.0)))
            return np.where(mag > 0, 10.0 ** (power - exp_digits), 0.0)
    else:
        def quantum(t):
            return np.full(np.shape(t), 10.0 ** -fixed_digits)
    return quantum


def _steps_vary(time: np.ndarray) -> bool:
    """Steps differing by more than 1 % of their mean (stair-steps), looked at on the first
    steps and on as many spread over the record."""
    n = time.size
    head = np.diff(time[:_PROBE + 1])
    spread = np.unique(np.linspace(0, n - 2, min(n - 1, _PROBE)).astype(np.int64))
    steps = np.concatenate([head, time[spread + 1] - time[spread]])
    return bool(steps.max() - steps.min() > 0.01 * abs(steps.mean()))


def rebuild_uniform(time: np.ndarray, quantum, name: str):
    """``(time, note)``: a uniform time base in place of stamps that repeat or stair-step
    because of their printed resolution, when every stamp lies within half a printed digit
    of it (a least-squares line, allowed ``2/√n`` of a digit more for its own error); else
    ``(time, None)`` unchanged.  The record must span at least 100 printed digits, so
    that the step is known to 1 %.

    ``quantum(t)`` gives the printed resolution at stamps ``t``, in the units of ``time``.
    """
    n = time.size
    repeats = not np.all(time[1:] > time[:-1])
    if n < 3 or not (repeats or _steps_vary(time)):
        return time, None
    k = np.arange(n, dtype=np.float64)
    k_mean = (n - 1) / 2
    t_mean = float(time.mean())
    dt = float(np.dot(k - k_mean, time - t_mean)) / (n * (n * n - 1) / 12)
    if not dt > 0:
        return time, None
    q = quantum(time)
    if time[-1] - time[0] < _MIN_SPAN * float(q.max()):
        return time, None  # too few printed digits across the record to fix the step
    fit = (t_mean - dt * k_mean) + dt * k
    tol = (0.5 + 2 / np.sqrt(n)) * q + 8 * np.finfo(float).eps * float(np.max(np.abs(time)))
    if not np.all(np.abs(time - fit) <= tol):
        return time, None
    what = "repeat" if repeats else "stair-step"
    note = (f"time column {name!r} is printed too coarsely for its steps (stamps {what}): "
            f"rebuilt as uniform {format_quantity(dt, 's')} steps, every printed stamp within "
            "half a printed digit of them")
    return fit, note

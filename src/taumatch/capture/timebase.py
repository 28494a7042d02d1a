"""The time base of a record: which column is time, a column of sample numbers, and a
uniform time base rebuilt from stamps printed too coarsely for the sampling."""

from __future__ import annotations

import re

import numpy as np

from ..errors import InputError
from ..units import format_quantity
from .labels import INTERVAL_KEYS, is_index_word, is_time_name, key_of, split_unit
from .model import few

__all__ = ["index_column", "print_quantum", "rebuild_uniform", "steps_vary", "time_index"]

_PROBE = 1 << 16  # steps looked at for stair-steps: the first ones, and as many spread out
#: Relative precision the step must have to be rebuilt: a least-squares step from stamps
#: rounded to q has a standard error of about q / n^1.5 (own derivation).
_STEP_PRECISION = 1e-3


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
    whole = isinstance(time_column, (int, np.integer)) and not isinstance(time_column, bool)
    if whole or (isinstance(time_column, str) and re.fullmatch(r"\s*-?[0-9]+\s*", time_column)):
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


def steps_vary(time: np.ndarray) -> bool:
    """Steps that repeat or differ by more than 1 % of their mean (stair-steps), looked at
    on the first steps and on as many spread over the record (a repeat elsewhere is found
    by the capture's own check)."""
    n = time.size
    if n < 3:
        return False
    head = np.diff(time[:_PROBE + 1])
    spread = np.linspace(0, n - 2, min(n - 1, _PROBE)).astype(np.int64)
    steps = np.concatenate([head, time[spread + 1] - time[spread]])
    return bool(steps.min() <= 0 or steps.max() - steps.min() > 0.01 * abs(steps.mean()))


def rebuild_uniform(time: np.ndarray, quantum, name: str, scale: float = 1.0):
    """``(time, note)``: a uniform time base in place of stamps that repeat or stair-step
    because of their printed resolution, when every stamp lies within half a printed digit
    of it (a least-squares line weighted by each stamp's printed precision, allowed
    ``4/√n`` of a digit more for its own error); else
    ``(time, None)`` unchanged.  The stamps must fix the step to 0.1 %
    (:data:`_STEP_PRECISION`).

    ``quantum(t)`` gives the printed resolution at stamps ``t``, in the units of ``time``;
    ``scale`` converts those units to seconds (for the note).
    """
    n = time.size
    if n < 3:
        return time, None
    repeats = not np.all(time[1:] > time[:-1])
    q = quantum(time)
    q_max = float(q.max())
    if not (q_max > 0 and np.isfinite(q_max) and np.all(np.isfinite(time))):
        return time, None
    # each stamp weighted by its printed precision (exponent notation is finer near 0)
    w = 1.0 / np.maximum(q / q_max, 1e-6) ** 2
    k = np.arange(n, dtype=np.float64)
    k_mean = float(np.dot(w, k) / w.sum())
    t_mean = float(np.dot(w, time) / w.sum())
    dk = k - k_mean
    dt = float(np.dot(w * dk, time - t_mean) / np.dot(w, dk * dk))
    if not dt > 0 or q_max > _STEP_PRECISION * n ** 1.5 * dt:
        return time, None  # too few stamps for so coarse a print to fix the step
    fit = (t_mean - dt * k_mean) + dt * k
    # a stamp printed finely (near 0 in exponent notation) is held to a millionth of a step
    tol = (0.5 + 4 / np.sqrt(n)) * q + 1e-6 * dt
    if not np.all(np.abs(time - fit) <= tol):
        return time, None
    what = "repeat" if repeats else "stair-step"
    note = (f"time column {name!r} is printed too coarsely for its steps (stamps {what}): "
            f"rebuilt as uniform {format_quantity(dt * scale, 's')} steps, every printed stamp within "
            "half a printed digit of them")
    return fit, note

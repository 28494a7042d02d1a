"""The physical range of every number a divider design takes, and the check that says so.

Each range is wide enough for any divider from a bench probe to a megavolt column and
narrow enough that the arithmetic inside it never overflows, underflows to zero or divides
by zero; the limits on counts (resistors, sections, Monte Carlo draws) keep one command
within seconds and a few GiB on a two-core machine.  A value outside its range is refused
with one line that names it, the value and the range.

Examples
--------
>>> check("ratio", 100.0)
100.0
>>> check("ratio", 0.5)
Traceback (most recent call last):
    ...
taumatch.errors.InputError: ratio: must be above 1 and at most 1e+07 (the attenuation (R1 + R2)/R2, e.g. 100 for 100:1), got 0.5
"""

from __future__ import annotations

import math

from ..errors import InputError
from ..units import format_quantity

__all__ = ["MAX_DRAWS", "MAX_PART_DRAWS", "MAX_RESISTORS", "MAX_SECTIONS", "MAX_SPEC_SECTIONS",
           "RANGES", "check", "positive"]

#: Resistors in the tip string: a megavolt column of 1 kV parts at half rating needs 2000.
MAX_RESISTORS = 10_000
#: Sections of a column (each written as two parts of a chain spec).
MAX_SECTIONS = 1000
#: Sections of a column written as a chain spec: the chain commands take about 10 s over the
#: 205 parts of 100 sections (bandwidth), minutes over 1000.
MAX_SPEC_SECTIONS = 100
#: Monte Carlo draws (three float64 samples each are kept: 24 MB at the limit).
MAX_DRAWS = 1_000_000
#: Draws times toleranced parts per draw (about 1 s of random numbers on one core).
MAX_PART_DRAWS = 100_000_000

# name -> (low, high, low included, unit, what it is)
RANGES = {
    "ratio": (1.0, 1e7, False, "", "the attenuation (R1 + R2)/R2, e.g. 100 for 100:1"),
    "input_resistance": (1.0, 1e15, True, "Ω", "R1 + R2"),
    "instrument_r": (1.0, 1e15, True, "Ω", "the instrument's input resistance"),
    "instrument_c": (0.0, 1e-6, True, "F", "the instrument's input capacitance"),
    "cable_capacitance": (0.0, 1e-6, True, "F", "the cable's capacitance, lumped"),
    "tolerance": (0.0, 0.5, True, "", "a relative tolerance, e.g. 0.01 for 1 %"),
    "voltage": (0.0, 1e7, False, "V", "the peak working voltage across the divider"),
    "limiting_voltage": (1.0, 1e6, True, "V", "each resistor's limiting element voltage"),
    "power_rating": (1e-3, 1e4, True, "W", "each resistor's rated power"),
    "margin": (0.0, 1.0, False, "", "the fraction of its ratings each resistor may use"),
    "stray_capacitance": (0.0, 1e-9, True, "F", "capacitance to earth per section"),
    "sections": (1, MAX_SECTIONS, True, "", "sections of the column"),
    "column_height": (1e-3, 100.0, True, "m", "the column's height"),
    "column_diameter": (1e-4, 10.0, True, "m", "the column's diameter"),
    "column_base": (0.0, 1e3, True, "m", "the column's lower end above the earthed floor"),
    "grading_limit": (1e-6, 0.5, True, "", "the allowed midpoint-voltage error of the column"),
    "tip_capacitance": (1e-13, 1e-6, True, "F", "the tip arm's capacitance"),
    "min_tip_capacitance": (0.0, 1e-6, True, "F", "the smallest tip capacitance to choose"),
    "trimmer_minimum": (0.0, 1e-6, True, "F", "the lowest capacitance the trimmer reaches"),
    "trimmer": (0.0, 1e-6, True, "F", "a trimmer limit"),
    "draws": (0, MAX_DRAWS, True, "", "Monte Carlo draws; more would not finish in seconds"),
    "seed": (0, 2 ** 32 - 1, True, "", "the Monte Carlo generator's seed"),
    "yield": (0.0, 1.0, False, "", "a fraction of the draws, e.g. 0.99"),
}


def _show(value, unit: str) -> str:
    if unit:
        return format_quantity(value, unit)
    return str(value) if isinstance(value, int) else f"{value:g}"


def check(name: str, value, *, label: str | None = None, integer: bool = False, given=None):
    """``value`` when it lies in the range of ``name`` (see :data:`RANGES`), else raise.

    Parameters
    ----------
    name : str
        A key of :data:`RANGES`.
    value : float or int
    label : str, optional
        What the message calls the value (default ``name``; a command passes its option).
    integer : bool
        Also require a whole number (returned as int).
    given : optional
        What the user wrote, shown in the message instead of ``value``.

    Raises
    ------
    InputError
        One line: the label, the range with its meaning, and the value given.
    """
    lo, hi, lo_in, unit, what = RANGES[name]
    label = label or name
    low = "at least" if lo_in else "above"
    shown = value if given is None else given
    text = (f"{label}: must be {low} {_show(lo, unit)} and at most {_show(hi, unit)} "
            f"({what}), got {shown!r}")
    if isinstance(value, bool):
        raise InputError(f"{label}: expected a number ({what}), got {value!r}")
    if integer:
        if isinstance(value, int):
            v = value
        else:
            try:
                f = float(value)
            except (TypeError, ValueError):
                raise InputError(f"{label}: expected a whole number ({what}), got {value!r}") from None
            if not (math.isfinite(f) and f.is_integer()):
                raise InputError(f"{label}: must be a whole number ({what}), got {value!r}")
            v = int(f)
    else:
        try:
            v = float(value)
        except (TypeError, ValueError):
            raise InputError(f"{label}: expected a number ({what}), got {value!r}") from None
        if not math.isfinite(v):
            raise InputError(text)
    if not ((v >= lo if lo_in else v > lo) and v <= hi):
        raise InputError(text)
    return v


def positive(value, name: str) -> float:
    """``value`` as a float when it is a finite positive number, else raise naming ``name``
    (for the quantities of a formula, which have no range of their own)."""
    try:
        v = float(value)
    except (TypeError, ValueError):
        raise InputError(f"{name}: expected a number, got {value!r}") from None
    if not (math.isfinite(v) and v > 0):
        raise InputError(f"{name}: must be positive and finite, got {value!r}")
    return v

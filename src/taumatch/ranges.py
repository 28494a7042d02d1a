"""The physical range of every value a chain spec or a command-line option gives, and the
check that says so.

"Positive and finite" is not enough: ``1e-300`` F or ``1.7e308`` Ω pass it and then break the
arithmetic (overflow, underflow to zero, division by zero).  Each quantity here has a range
wide enough for any chain this package models, from a 50 Ω cable to a megavolt divider, and
narrow enough that every value inside it keeps the arithmetic finite; the test
``tests/test_ranges.py`` builds chains at the corners of every range and runs every chain
analysis on them.  A value outside its range is refused with one line naming the field, the
value and the range.  ``docs/ranges.md`` lists the ranges with the reasons.

Examples
--------
>>> check("capacitance", 11.5e-12, "part 2 (series): c")
1.15e-11
>>> check("capacitance", 1e300, "part 2 (series): c", given="1e300")
Traceback (most recent call last):
    ...
taumatch.errors.InputError: part 2 (series): c must be between 1 aF and 1 mF (a capacitance), got '1e300'
>>> check("resistance", 0.0, "source: resistance", zero=True)
0.0
"""

from __future__ import annotations

import math

from .errors import InputError, shown
from .units import format_quantity

__all__ = ["MAX_DEPTH", "MAX_PARTS", "MAX_POINTS", "MAX_SECTIONS", "MAX_SPEC_BYTES", "RANGES",
           "check", "describe"]

#: Samples of one predicted waveform: the closed form is evaluated term by term, so memory
#: grows as points times poles (a cable ladder has hundreds of poles).
MAX_POINTS = 100_000
#: Pi sections per cable in a written deck or a forced ladder (the automatic choice stops
#: at 200, :data:`taumatch.network.sections.MAX_SECTIONS`; a deck may ask for more).
MAX_SECTIONS = 2000

#: Parts in one chain spec: every chain command stays within seconds below it
#: (bench/bench_chain.py times chains of many parts and many cables).
MAX_PARTS = 1000
#: Bytes of one chain spec file (a spec of MAX_PARTS parts with comments is about 200 kB).
MAX_SPEC_BYTES = 4 * 1024 * 1024
#: Arrays and inline tables nested in a chain spec (the deepest a spec uses is 3:
#: ``adjust = [{field = "c", min = ...}]`` inside a part); the TOML reader recurses per level.
MAX_DEPTH = 16

#: quantity -> (lowest, highest, unit symbol, what it is)
RANGES = {
    "resistance": (1e-6, 1e15, "Ω", "a resistance"),
    "capacitance": (1e-18, 1e-3, "F", "a capacitance"),
    "inductance": (1e-15, 1.0, "H", "an inductance"),
    "length": (1e-6, 1e4, "m", "a length"),
    "radius": (1e-7, 1.0, "m", "a wire radius"),
    "resistance_per_metre": (1e-6, 1e6, "Ω/m", "a cable's series resistance per metre"),
    "inductance_per_metre": (1e-9, 1e-3, "H/m", "a cable's inductance per metre"),
    "capacitance_per_metre": (1e-13, 1e-8, "F/m", "a cable's capacitance per metre"),
    "conductance_per_metre": (1e-15, 1.0, "S/m", "a cable's shunt conductance per metre"),
    "bandwidth": (1.0, 1e12, "Hz", "a -3 dB bandwidth"),
    "gain": (1e-6, 1e6, "", "a voltage gain"),
    "amplitude": (1e-6, 1e7, "V", "a step height"),
    "period": (1e-12, 1e4, "s", "a square-wave period"),
    "rise_time": (1e-15, 1e3, "s", "a 10-90 % edge"),
    # command-line options
    "frequency": (1e-3, 1e12, "Hz", "a frequency"),
    "time_window": (1e-15, 1e6, "s", "the end of a time window"),
    "settle_band": (1e-6, 0.5, "%", "a settling band around the final level"),
    "points": (2, MAX_POINTS, "", ("samples of a predicted waveform; a finer view needs a "
                                   "shorter window, not more points")),
    "sections": (1, MAX_SECTIONS, "", "pi sections per cable"),
}


def _show(value: float, unit: str) -> str:
    if unit == "%":
        return f"{100 * value:g} %"
    if unit:
        return format_quantity(value, unit)
    return str(int(value)) if float(value).is_integer() else f"{value:g}"


def describe(quantity: str, zero: bool = False) -> str:
    """The range of ``quantity`` in words, e.g. ``'between 1 aF and 1 mF'``."""
    lo, hi, unit, _ = RANGES[quantity]
    text = f"between {_show(lo, unit)} and {_show(hi, unit)}"
    return f"0 or {text}" if zero else text


def check(quantity: str, value: float, label: str, *, zero: bool = False, given=None) -> float:
    """``value`` when it lies in the range of ``quantity`` (see :data:`RANGES`), else raise.

    Parameters
    ----------
    quantity : str
        A key of :data:`RANGES`.
    value : float
        The value in SI units (already finite and not negative).
    label : str
        What the message calls it, e.g. ``"bench.toml: part 2 (series): c"``.
    zero : bool
        Whether exactly 0 is also valid (a source resistance of 0 is an ideal source).
    given : optional
        What the user wrote, shown instead of ``value``.

    Raises
    ------
    InputError
        One line: the label, the range, what the quantity is, and the value given.
    """
    lo, hi, _, what = RANGES[quantity]
    v = float(value)
    if (zero and v == 0.0) or (math.isfinite(v) and lo <= v <= hi):
        return v
    raise InputError(f"{label} must be {describe(quantity, zero)} ({what}), "
                     f"got {shown(value if given is None else given)}")

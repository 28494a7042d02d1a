"""Engineering notation at the edges: ``"9M"``, ``"11.5p"``, ``"120 nH"``, ``"1.2 m"``.

Inside taumatch every quantity is a float in SI units.  This module converts the
strings an engineer writes into those floats and back.  ``m`` is milli and ``M``
is mega; ``u`` and ``µ`` are micro; ``a`` (atto) to ``P`` (peta) are known.  A trailing
unit symbol is accepted and, when the caller names the expected unit, checked; word units
take any case (``1 MOhm``, ``1 Mohm``, ``1 MΩ``, ``10 khz``).

Examples
--------
>>> parse_quantity("9M")
9000000.0
>>> parse_quantity("11.5p")
1.15e-11
>>> parse_quantity("120 nH", unit="H")
1.2e-07
>>> parse_quantity("1.2 m")
0.0012
>>> parse_quantity("150 Ω", unit="ohm")
150.0
>>> parse_quantity("2%")
0.02
>>> format_quantity(1.15e-11, "F")
'11.5 pF'
"""

from __future__ import annotations

import math
import re
from decimal import Decimal

from .errors import InputError, shown

__all__ = ["PREFIXES", "format_quantity", "format_uncertain", "parse_quantity"]

PREFIXES = {
    "a": 1e-18,
    "f": 1e-15,
    "p": 1e-12,
    "n": 1e-9,
    "u": 1e-6,
    "µ": 1e-6,
    "μ": 1e-6,
    "m": 1e-3,
    "k": 1e3,
    "K": 1e3,
    "M": 1e6,
    "G": 1e9,
    "T": 1e12,
    "P": 1e15,
}

# Unit symbols we accept, mapped to a canonical name.
_UNITS = {
    "ohm": "ohm",
    "ohms": "ohm",
    "\u03a9": "ohm",  # Greek capital omega
    "\u2126": "ohm",  # ohm sign
    "R": "ohm",
    "F": "F",
    "H": "H",
    "s": "s",
    "sec": "s",
    "Hz": "Hz",
    "V": "V",
    "A": "A",
    "W": "W",
    "m": "m",
    "S": "S",
    "J": "J",
    "%": "%",
    "F/m": "F/m",
    "H/m": "H/m",
    "ohm/m": "ohm/m",
    "Ω/m": "ohm/m",
    "S/m": "S/m",
}

_NUMBER = re.compile(r"^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$")


# Word units are accepted in any case (ohm, Ohm, OHMS; hz, HZ); single letters keep their case
# (m is milli or metre, M is mega; s is second, S is siemens).
_WORDS = {k.lower(): v for k, v in _UNITS.items() if k.isalpha() and len(k) >= 2}


def _unit(sym: str) -> str | None:
    """The canonical name of a unit symbol, or None."""
    if sym in _UNITS:
        return _UNITS[sym]
    low = sym.lower()
    if low in _WORDS:
        return _WORDS[low]
    if low.endswith("/m") and low[:-2] in _WORDS:
        return _UNITS.get(_WORDS[low[:-2]] + "/m")
    return None


def _canonical_unit(unit: str | None) -> str | None:
    if unit is None:
        return None
    return _unit(unit) or unit


def parse_quantity(text, unit: str | None = None, *, field: str = "value") -> float:
    """Convert a number or an engineering-notation string to a float in SI units.

    Parameters
    ----------
    text : str or float or int
        ``"9M"``, ``"11.5p"``, ``"120 nH"``, ``"1e-9"``, ``"2%"`` or a plain number.
    unit : str, optional
        The unit expected (``"ohm"``, ``"F"``, ``"H"``, ``"s"``, ``"Hz"``, ``"V"``, ``"m"``,
        ...).  When given, a unit symbol in ``text`` must match it.
    field : str
        Name used in the error message (e.g. ``"part 2 (series): c"``).

    Returns
    -------
    float
        The value in SI units (a percentage is returned as a fraction).

    Raises
    ------
    InputError
        When the text is not a number with an optional prefix and unit.
    """
    if isinstance(text, bool):
        raise InputError(f"{field}: expected a number, got {shown(text)}")
    if isinstance(text, (int, float)):
        try:
            value = float(text)
        except OverflowError:
            raise InputError(f"{field}: number out of range, got {shown(text)}") from None
        if not math.isfinite(value):
            raise InputError(f"{field}: expected a finite number, got {shown(text)}")
        return value
    if not isinstance(text, str):
        raise InputError(f"{field}: expected a number or a string like '11.5p', got {shown(text)}")
    match = _NUMBER.match(text)
    if not match:
        raise InputError(
            f"{field}: cannot read {shown(text)} as a quantity; write e.g. '9M', '11.5p', '120 nH'"
        )
    try:
        number = float(match.group(1))
    except OverflowError:  # pragma: no cover - float() of decimal text gives inf, not this
        raise InputError(f"{field}: number out of range, got {shown(text)}") from None
    rest = match.group(2).replace(" ", "")
    scale = 1.0
    want = _canonical_unit(unit)
    if rest:
        if rest == "%":
            return number / 100.0
        # Whole rest is a unit symbol ("m" alone is ambiguous: metre when metres are
        # expected, milli otherwise).
        if _unit(rest) and not (rest in PREFIXES and want != _unit(rest)):
            got = _unit(rest)
            if want is not None and got != want:
                raise InputError(f"{field}: {shown(text)} is in {got}, expected {want}")
            return number
        prefix, sym = rest[0], rest[1:]
        if rest.lower().startswith("meg"):
            prefix, sym = "M", rest[3:]
        if prefix not in PREFIXES:
            raise InputError(
                f"{field}: unknown prefix or unit {shown(rest)} in {shown(text)}; "
                "prefixes are a f p n u µ m k M G T P"
            )
        scale = PREFIXES[prefix]
        if sym:
            if not _unit(sym):
                raise InputError(f"{field}: unknown unit {shown(sym)} in {shown(text)}")
            got = _unit(sym)
            if want is not None and got != want:
                raise InputError(f"{field}: {shown(text)} is in {got}, expected {want}")
    # Decimal arithmetic so that "11.5p" is exactly the float nearest 11.5e-12.
    value = float(Decimal(match.group(1)) * Decimal(repr(scale)))
    if not math.isfinite(value):
        raise InputError(f"{field}: expected a finite number, got {shown(text)}")
    return value


_FORMAT_PREFIXES = [
    (1e15, "P"),
    (1e12, "T"),
    (1e9, "G"),
    (1e6, "M"),
    (1e3, "k"),
    (1.0, ""),
    (1e-3, "m"),
    (1e-6, "µ"),
    (1e-9, "n"),
    (1e-12, "p"),
    (1e-15, "f"),
    (1e-18, "a"),
]


def format_quantity(value: float, unit: str = "", digits: int = 4) -> str:
    """Format a float in SI units with an engineering prefix, e.g. ``'11.5 pF'``.

    Parameters
    ----------
    value : float
        The value in SI units.
    unit : str
        The unit symbol to append (``"F"``, ``"Ω"``, ``"Hz"``, ...).
    digits : int
        Significant digits.
    """
    if value is None or not math.isfinite(value):
        return f"{value} {unit}".strip()
    if value == 0:
        return f"0 {unit}".strip()
    scale, prefix = _prefix_for(value, digits)
    if scale is None:
        return f"{value:.{digits}g} {unit}".strip()
    text = f"{value / scale:.{digits}g}"
    return f"{text} {prefix}{unit}".strip()


def _prefix_for(value: float, digits: int = 4):
    """(scale, prefix) for a value, or (None, None) beyond the prefixes (below 1 a, from 1000 P)."""
    mag = abs(value)
    if mag < 0.9995e-18 or mag >= 0.9995e18:
        return None, None
    for scale, prefix in _FORMAT_PREFIXES:
        if mag >= scale * (1 - 0.5 * 10.0 ** (1 - digits)):
            return scale, prefix
    return 1e-18, "a"  # pragma: no cover - excluded above


def format_uncertain(value: float, error: float | None, unit: str = "", digits: int = 4) -> str:
    """A value and its standard error with one prefix for both, e.g. ``'8.537 ± 0.035 pF'``.

    The prefix follows the value (the error's when the error is the larger); the error keeps
    two significant digits and the value is rounded to the same decimal place (common
    practice; JCGM 100:2008 "GUM", 7.2.6).  An error below a millionth of the value's
    ``digits``-th digit is written in exponent form instead of padding the value with zeros.

    Examples
    --------
    >>> format_uncertain(8.537e-12, 3.512e-14, "F")
    '8.537 ± 0.035 pF'
    >>> format_uncertain(8.537e-12, 7.6e-16, "F")
    '8.53700 ± 0.00076 pF'
    >>> format_uncertain(2.0e-16, 7.6e-16, "F")
    '200 ± 760 aF'
    """
    if error is None or not math.isfinite(error) or error == 0 or not math.isfinite(value):
        return format_quantity(value, unit, digits)
    error = abs(error)
    ref = error if error > abs(value) else value
    scale, prefix = _prefix_for(ref, digits)
    if scale is None:
        return f"{value:.{digits}g} ± {error:.2g} {unit}".strip()
    v, e = value / scale, error / scale
    decimals = max(0, 1 - math.floor(math.log10(e)))  # two significant digits of the error
    if v != 0 and decimals > digits - 1 - math.floor(math.log10(abs(v))) + 6:
        return f"{v:.{digits}g} ± {e:.2g} {prefix}{unit}".strip()
    return f"{v:.{decimals}f} ± {e:.{decimals}f} {prefix}{unit}".strip()

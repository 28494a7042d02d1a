"""How far a part's value may be off: the ``tolerance`` of a chain spec and of the options.

A tolerance is the half-width of the interval the true value is taken to lie in: relative
(``"5%"``) or absolute in the value's own unit (``"2p"`` on a capacitance, ``"20k"`` on a
resistance).  Without more knowledge the true value is taken as equally likely anywhere in
that interval (a rectangular distribution), whose standard uncertainty is the half-width
over √3 (JCGM 100:2008, the Guide to the expression of uncertainty in measurement,
4.3.7 — from memory).  That is how a diagnosis turns a tolerance into a term of its
uncertainty budget.

In a chain spec a part (or ``[source]``) may carry

* ``tolerance = "1%"`` — every value of that part, or
* ``tolerance = { r = "1%", c = "2p" }`` — value by value.

A bare TOML number is an absolute tolerance in SI units, like every other number of a
spec; write relative ones with ``%``.

Examples
--------
>>> t = parse_tolerance("5%", "F", field="c")
>>> t.relative, t.amount, t.half_width(110e-12) * 1e12
(True, 0.05, 5.5)
>>> parse_tolerance("2p", "F", field="c").half_width(110e-12)
2e-12
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError, shown
from ..units import format_quantity, parse_quantity

__all__ = ["DEFAULTS", "DEFAULT_REASONS", "Tolerance", "default_for", "parse_tolerance", "tolerance_table"]


@dataclass(frozen=True)
class Tolerance:
    """A tolerance: ``amount`` is a fraction when ``relative``, else SI units of the value."""

    amount: float
    relative: bool = True

    def __post_init__(self):
        a = float(self.amount)
        if not (math.isfinite(a) and a >= 0):
            raise InputError(f"tolerance: must be zero or positive, got {shown(self.amount)}")
        if self.relative and a >= 1:
            raise InputError(f"tolerance: a relative tolerance must be below 100 %, got "
                             f"{100 * a:g} %")
        object.__setattr__(self, "amount", a)

    def half_width(self, value: float) -> float:
        """The ± half-width (SI) for a nominal ``value`` (SI)."""
        return self.amount * abs(value) if self.relative else self.amount

    def describe(self, unit: str = "") -> str:
        """``"±5 %"`` or ``"±2 pF"``."""
        if self.relative:
            return f"±{100 * self.amount:.3g} %"
        return f"±{format_quantity(self.amount, unit)}"


def parse_tolerance(raw, unit: str, *, field: str = "tolerance") -> Tolerance:
    """A tolerance from text or a number.

    Parameters
    ----------
    raw : str or float
        ``"5%"`` (relative), ``"2p"`` / ``"2 pF"`` (absolute, in ``unit``), or a number
        (absolute, SI).
    unit : str
        The unit of the value the tolerance applies to (``"F"``, ``"ohm"``, ``"H"``, ``"s"``).
    field : str
        Named in error messages.

    Raises
    ------
    InputError
        For text that is neither, a negative tolerance or a relative one of 100 % or more.
    """
    if isinstance(raw, bool) or not isinstance(raw, (str, int, float)):
        raise InputError(f"{field}: expected a tolerance such as '5%' or '2p', got {shown(raw)}")
    if isinstance(raw, str) and raw.strip().endswith("%"):
        text = raw.strip()[:-1].strip()
        try:
            value = float(text)
        except ValueError:
            raise InputError(f"{field}: expected a percentage such as '5%', got {shown(raw)}") from None
        if not (math.isfinite(value) and 0 <= value < 100):
            raise InputError(f"{field}: a relative tolerance must lie from 0 up to (not "
                             f"including) 100 %, got {shown(raw)}")
        return Tolerance(value / 100.0, True)
    value = parse_quantity(raw, unit, field=field)
    if not (math.isfinite(value) and value >= 0):
        raise InputError(f"{field}: a tolerance must be zero or positive, got {shown(raw)}")
    return Tolerance(value, False)


def tolerance_table(where: str, raw, fields: dict) -> dict:
    """``{field: Tolerance}`` from a spec's ``tolerance`` entry.

    Parameters
    ----------
    where : str
        The part, for messages (``"chain.toml: part 2 (series)"``).
    raw : str, float or dict
        One relative tolerance for every value of the part, or a table by field.
    fields : dict
        ``{field: unit}`` of the values the part has (those a tolerance may name).
    """
    if isinstance(raw, dict):
        out = {}
        for key, value in raw.items():
            if key not in fields:
                valid = ", ".join(sorted(fields)) or "none"
                raise InputError(f"{where}: tolerance names {shown(key)}, which this part has no "
                                 f"value for; valid: {valid}")
            out[key] = parse_tolerance(value, fields[key], field=f"{where}: tolerance.{key}")
        return out
    t = parse_tolerance(raw, "", field=f"{where}: tolerance")
    if not t.relative:
        raise InputError(f"{where}: tolerance = {shown(raw)} applies to every value of the part, "
                         "so it must be relative (e.g. '5%'); give absolute ones by field, "
                         "e.g. tolerance = { c = '2p' }")
    return {key: t for key in fields}


#: Tolerances taken for values a spec gives without one (common practice, no source):
#: probe tip resistors and instrument inputs are specified to ±1–2 %; capacitors and
#: instrument input capacitances to about ±10 %; a ground lead's or wire's inductance moves
#: with its shape by about ±20 %.
DEFAULTS = {"ohm": Tolerance(0.02), "F": Tolerance(0.10), "H": Tolerance(0.20)}
#: Why, in words, for the budget.
DEFAULT_REASONS = {
    "ohm": "common practice: divider resistors and instrument inputs are specified to ±1–2 %",
    "F": "common practice: capacitors and instrument input capacitance to about ±10 %",
    "H": "common practice: a lead's inductance moves with its shape by about ±20 %",
}


def default_for(unit: str) -> Tolerance:
    """The default tolerance of a value in ``unit`` (``"ohm"``, ``"F"``, ``"H"``; per metre
    alike)."""
    base = unit.split("/")[0]
    if base not in DEFAULTS:
        raise InputError(f"unit: no default tolerance for {shown(unit)}; valid: ohm, F, H")
    return DEFAULTS[base]

"""The instrument a divider feeds: its input resistance in parallel with its capacitance.

Examples
--------
>>> Instrument.parse("1M||14p")
Instrument(r=1000000.0, c=1.4e-11)
>>> Instrument.parse("1 MΩ ∥ 14 pF") == Instrument.parse("1M//14p")
True
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from ..errors import InputError
from ..units import parse_quantity
from .ranges import check

__all__ = ["Instrument"]

_SPLIT = re.compile(r"\s*(?:\|\||∥|//)\s*")


@dataclass(frozen=True)
class Instrument:
    """An instrument input ``r ∥ c``.

    Parameters
    ----------
    r : float
        Input resistance [ohm] (1 Ω to 1 PΩ).
    c : float
        Input capacitance [F] (0 to 1 µF).
    """

    r: float
    c: float = 0.0

    def __post_init__(self):
        object.__setattr__(self, "r", check("instrument_r", self.r))
        object.__setattr__(self, "c", check("instrument_c", self.c))

    @classmethod
    def parse(cls, text) -> Instrument:
        """Read ``"1M||14p"`` (also ``∥`` or ``//`` between), or take an ``(r, c)`` pair or
        an :class:`Instrument` as it is."""
        if isinstance(text, Instrument):
            return text
        if isinstance(text, (tuple, list)):
            if len(text) != 2:
                raise InputError(f"instrument: expected (r, c), got {text!r}")
            return cls(*(parse_quantity(v, field="instrument") for v in text))
        parts = _SPLIT.split(str(text).strip())
        if len(parts) != 2:
            raise InputError(f"instrument: expected R||C such as '1M||14p', got {text!r}")
        return cls(parse_quantity(parts[0], "ohm", field="instrument resistance"),
                   parse_quantity(parts[1], "F", field="instrument capacitance"))

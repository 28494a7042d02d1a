"""The resistors of a divider: a string of equal preferred values in the tip arm and, where
the instrument's resistance is too high for the ratio, a shunt resistor across it (one
preferred value, or the best two-part series or parallel pair).

Examples
--------
>>> c = choose_resistors(ratio=11, count=1, instrument_r=1e6, series="E96", tolerance=0.01)
>>> c.tip_resistors, c.shunt_resistors, c.ratio
((10000000.0,), (), 11.0)
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError
from . import eseries

__all__ = ["ResistorChoice", "choose_resistors"]


@dataclass(frozen=True)
class ResistorChoice:
    """The chosen resistors (ohm).

    Attributes
    ----------
    tip_resistors : tuple of float
        The tip arm's string of equal resistors.
    shunt_resistors : tuple of float
        The resistor(s) across the instrument (empty: none).
    shunt_resistors_kind : {"none", "series", "parallel"}
        How a pair of shunt resistors is joined (a single one is ``"series"``).
    instrument_r : float
        The instrument's input resistance.
    """

    tip_resistors: tuple
    shunt_resistors: tuple
    shunt_resistors_kind: str
    instrument_r: float

    def __post_init__(self):
        if not self.tip_resistors or min(self.tip_resistors) <= 0:
            raise InputError(f"tip_resistors: need positive values, got {self.tip_resistors!r}")
        if self.shunt_resistors_kind not in ("none", "series", "parallel"):
            raise InputError(f"shunt_resistors_kind: must be none, series or parallel, got "
                             f"{self.shunt_resistors_kind!r}")

    @property
    def r1(self) -> float:
        """Tip arm resistance [ohm]."""
        return float(sum(self.tip_resistors))

    @property
    def shunt_resistor(self) -> float | None:
        """Resistance of the shunt resistor(s) [ohm] (None without one)."""
        return combined(self.shunt_resistors, self.shunt_resistors_kind)

    @property
    def r2(self) -> float:
        """Shunt arm resistance: the shunt resistor ∥ the instrument [ohm]."""
        sh, ri = self.shunt_resistor, self.instrument_r
        return ri if sh is None else sh * ri / (sh + ri)

    @property
    def ratio(self) -> float:
        return (self.r1 + self.r2) / self.r2


def combined(parts: tuple, kind: str) -> float | None:
    """One or two resistors joined in ``kind`` (``"series"`` or ``"parallel"``) [ohm]."""
    if not parts:
        return None
    if kind == "parallel":
        return 1.0 / sum(1.0 / p for p in parts)
    return float(sum(parts))


def choose_resistors(ratio: float, count: int, instrument_r: float, series: str,
                     tolerance: float, input_resistance: float | None = None) -> ResistorChoice:
    """The tip string and shunt resistor(s) for ``ratio``.

    Both preferred values bracketing ``R1/count`` are tried; for each, the shunt is the
    nearest single value or the best two-part combination.  The choice keeps the nominal
    ratio error within a tenth of the resistor ``tolerance`` first, then uses the fewest
    shunt parts, then the input resistance nearest the one asked for.

    Parameters
    ----------
    ratio : float
        Target ``(R1 + R2)/R2``.
    count : int
        Resistors in the tip string.
    instrument_r : float
        The instrument's input resistance [ohm].
    series : str
        Preferred-number series (``"E96"`` ...).
    tolerance : float
        The resistors' relative tolerance.
    input_resistance : float, optional
        Wanted ``R1 + R2`` [ohm]; default ``ratio × instrument_r`` (no shunt).
    """
    ri = instrument_r
    rin = ratio * ri if input_resistance is None else input_resistance
    r1_target = rin - rin / ratio
    best = None
    for each in sorted(set(eseries.bracket(r1_target / count, series))):
        r1 = count * each
        r2_need = r1 / (ratio - 1.0)
        options = [((), "none", ri)]
        if r2_need < ri:
            rsh = r2_need * ri / (ri - r2_need)
            for v in sorted(set(eseries.bracket(rsh, series))):
                options.append(((v,), "series", v))
            for c in eseries.best_pairs(rsh, series, count=1):
                options.append((c.parts, c.kind, c.value))
        for parts, kind, rsh in options:
            r2 = ri if not parts else rsh * ri / (rsh + ri)
            err = (r1 + r2) / r2 / ratio - 1.0
            if abs(err) > tolerance / 10:
                key = (True, 0, abs(err), len(parts))
            else:
                key = (False, len(parts), abs(math.log((r1 + r2) / rin)), abs(err))
            if best is None or key < best[0]:
                best = (key, each, parts, kind)
    _, each, parts, kind = best
    return ResistorChoice((each,) * count, tuple(parts), kind, ri)

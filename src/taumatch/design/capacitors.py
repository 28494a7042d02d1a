"""The capacitors of a divider: the tip (grading) capacitors, a fixed shunt capacitor and
the trimmer range that covers every tolerance corner.

The compensation of each corner is the two-arm model's
(:class:`taumatch.chain.two_arm.TwoArm`, vectorised over the corners).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..units import format_quantity
from . import eseries

__all__ = ["CapacitorChoice", "choose_capacitors"]


@dataclass(frozen=True, eq=False)
class CapacitorChoice:
    """The chosen capacitors [F].

    Attributes
    ----------
    tip_capacitors : tuple of float
        One grading capacitor per section (in series), or one across the tip arm; empty when
        the trimmer alone forms the tip capacitance.
    shunt_capacitors : tuple of float
        The fixed capacitor across the shunt arm (empty: none).
    trims : ndarray
        The trimmer value each tolerance corner needs.
    """

    tip_capacitors: tuple
    shunt_capacitors: tuple
    trims: np.ndarray

    @property
    def c1_fixed(self) -> float:
        """Fixed tip capacitance (the capacitors in series) [F]."""
        c = self.tip_capacitors
        return 1.0 / sum(1.0 / v for v in c) if c else 0.0


def choose_capacitors(arm: str, corner, k_c1, k_cb, tolerances: dict, sections: int, *,
                      series: str, minimum: float, trimmer_minimum: float,
                      tip_capacitance: float | None = None) -> CapacitorChoice:
    """Capacitors that leave the trimmer at least ``trimmer_minimum`` at every corner.

    Parameters
    ----------
    arm : {"shunt", "tip"}
        The arm that holds the trimmer.
    corner : TwoArm
        The divider at every tolerance corner without our capacitors: ``r1``, ``r2``, the
        shunt arm's instrument and cable capacitance as ``c2``, the earth capacitance.
    k_c1, k_cb : ndarray
        The corners' factors on the tip and the fixed shunt capacitors.
    tolerances : dict
        Relative tolerances by quantity (``"c1"``, ``"cb"``).
    sections : int
        Grading capacitors in series (one per column section).
    series : str
        Preferred-number series for the fixed capacitors.
    minimum : float
        Smallest tip capacitance to choose [F].
    trimmer_minimum : float
        Lowest value the trimmer reaches [F].
    tip_capacitance : float, optional
        Use this tip capacitance [F] instead of choosing one.

    Raises
    ------
    InputError
        When ``tip_capacitance`` is too small for the shunt arm, or no capacitor up to
        10^4 times the minimum leaves room for the trimmer.
    """
    m = sections
    cvals = eseries.values(series, 1e-13, 1.0)
    if tip_capacitance is not None:
        candidates = [float(tip_capacitance) * m]
    else:
        candidates = eseries.values(series, minimum * m, minimum * m * 1e4)
    if arm == "tip":
        c1_want = candidates[0] / m
        for cb in np.concatenate([[0.0], cvals]):
            need = corner.with_values(c2=corner.c2 + cb * k_cb).required("tip")
            if need.min() >= c1_want:
                break
        fixed_ok = cvals[cvals * (1 + tolerances["c1"]) <= need.min() - trimmer_minimum]
        c1f = float(fixed_ok[-1]) if len(fixed_ok) else 0.0
        return CapacitorChoice((c1f,) if c1f else (), (float(cb),) if cb else (),
                               need - c1f * k_c1)
    for cap in candidates:
        c1 = cap / m
        t = corner.with_values(c1=c1 * k_c1).shunt_change
        fixed_ok = cvals[cvals * (1 + tolerances["cb"]) <= t.min() - trimmer_minimum]
        cb = float(fixed_ok[-1]) if len(fixed_ok) else 0.0
        t = t - cb * k_cb
        if t.min() >= trimmer_minimum:
            return CapacitorChoice((float(cap),) * m, (cb,) if cb else (), t)
        if tip_capacitance is not None:
            # smallest tip capacitance that leaves the trimmer its minimum at the worst
            # corner: R1 C1 >= R2 (C_shunt + trimmer minimum), with margin
            need = float(np.max(corner.r2 * (corner.c2 + trimmer_minimum) / corner.r1 / k_c1))
            raise InputError(
                f"tip_capacitance: {format_quantity(float(tip_capacitance), 'F')} is too small: "
                f"the shunt arm already holds at least "
                f"{format_quantity(float(np.min(corner.c2)), 'F')}; use at least about "
                f"{format_quantity(need * 1.05, 'F')}")
    raise InputError("tip_capacitance: no capacitor up to 10^4 x the minimum leaves room for "
                     "the trimmer; lower the tolerances or the trimmer minimum")

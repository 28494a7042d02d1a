"""Capacitive grading of a high-voltage column: how the voltage spreads along it at high
frequency, and the series capacitance that keeps the spread even.

A column with capacitance ``Ce`` to earth and series (grading) capacitance ``Cs`` along it
is, at high frequency, a capacitive line whose voltage ``v(x)/V = sinh(αx)/sinh α`` with
``α = √(Ce/Cs)`` and ``x`` measured from the earthed end (own derivation from the line
equation ``v'' = α² v``; ``Ce/Cs = 1`` puts the midpoint at 0.443 of V instead of 0.5,
``shared/CHECKS.md``).  A flat distribution needs ``Cs ≫ Ce``.

Examples
--------
>>> round(float(grading_distribution(0.5, 1.0)), 3)
0.443
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import InputError

__all__ = ["grading_capacitance", "grading_distribution", "midpoint_error"]


def grading_distribution(x, ce_over_cs: float):
    """Fraction of the applied voltage at position ``x`` (0 = earthed end, 1 = top).

    Parameters
    ----------
    x : float or array
        Position along the column, as a fraction of its length.
    ce_over_cs : float
        Earth capacitance over series capacitance, ``α²`` (dimensionless, >= 0).
    """
    ratio = float(ce_over_cs)
    if not (math.isfinite(ratio) and ratio >= 0):
        raise InputError(f"ce_over_cs: must be zero or positive, got {ce_over_cs!r}")
    x = np.asarray(x, dtype=float)
    if ratio == 0:
        return x.copy()
    a = math.sqrt(ratio)
    if a > 700:
        raise InputError(f"ce_over_cs: {ratio:g} leaves no voltage along the column (above 4.9e5)")
    return np.sinh(a * x) / math.sinh(a)


def midpoint_error(ce_over_cs: float) -> float:
    """Relative shortfall of the midpoint voltage, ``1 − v(½)/(V/2)``."""
    return 1.0 - 2.0 * float(grading_distribution(0.5, ce_over_cs))


def grading_capacitance(earth_capacitance: float, limit: float = 0.01) -> float:
    """Smallest total series capacitance ``Cs`` [F] with midpoint error at most ``limit``.

    Parameters
    ----------
    earth_capacitance : float
        Total capacitance of the column to earth [F].
    limit : float
        Allowed relative shortfall of the midpoint voltage (0.01 = 1 %).
    """
    from scipy.optimize import brentq

    ce = float(earth_capacitance)
    if not (math.isfinite(ce) and ce > 0):
        raise InputError(f"earth_capacitance: must be positive, got {earth_capacitance!r}")
    limit = float(limit)
    if not 0 < limit < 1:
        raise InputError(f"limit: must be between 0 and 1 (a fraction), got {limit!r}")
    ratio = brentq(lambda r: midpoint_error(r) - limit, 1e-12, 1e4, xtol=1e-15, rtol=1e-12)
    return ce / ratio

"""Inductance of a straight round wire (a probe's ground lead) by Grover's formula.

F. W. Grover, "Inductance Calculations" (Dover), straight round wire at low
frequency: ``L = 0.2 * l * (ln(2 l / r) - 0.75)`` microhenry with ``l`` and ``r`` in
metres.  The formula holds for a thin wire (``l`` much larger than ``r``) far from other
conductors; a real lead forms a loop with the tip, so treat the figure as an estimate
(common practice: about 1 nH per millimetre of lead).

Examples
--------
>>> round(grover_inductance(0.1524, 0.0005) * 1e9, 1)   # 6 in of 1 mm-diameter wire
172.6
>>> round(lead_length_for_inductance(172.6e-9, 0.0005), 4)
0.1524
"""

from __future__ import annotations

import math

from ..errors import InputError

__all__ = ["grover_inductance", "lead_length_for_inductance"]


def grover_inductance(length: float, radius: float) -> float:
    """Self-inductance of a straight round wire [H].

    Parameters
    ----------
    length : float
        Wire length [m].
    radius : float
        Wire radius [m]; ``length`` must be at least 10 times larger.

    Returns
    -------
    float
        ``0.2e-6 * length * (ln(2*length/radius) - 0.75)`` [H].

    Raises
    ------
    InputError
        For a non-positive value or a wire too short for the thin-wire formula.
    """
    if not (length > 0 and radius > 0 and math.isfinite(length) and math.isfinite(radius)):
        raise InputError(
            f"lead: length and radius must be positive, got length={length!r} m, radius={radius!r} m"
        )
    if length < 10 * radius:
        raise InputError(
            f"lead: length must be at least 10 times the radius, got length={length!r} m, "
            f"radius={radius!r} m"
        )
    return 0.2e-6 * length * (math.log(2.0 * length / radius) - 0.75)


def lead_length_for_inductance(inductance: float, radius: float) -> float:
    """The lead length [m] whose Grover inductance equals ``inductance`` [H].

    Parameters
    ----------
    inductance : float
        Wanted inductance [H].
    radius : float
        Wire radius [m].

    Returns
    -------
    float
        Length [m]; at least ``10 * radius`` (raises if the inductance is below that
        wire's value).
    """
    from ..network.band import bracketed_root

    if not (inductance > 0 and radius > 0):
        raise InputError(
            f"lead: inductance and radius must be positive, got {inductance!r} H, {radius!r} m"
        )
    lo = 10 * radius
    if grover_inductance(lo, radius) > inductance:
        raise InputError(
            f"lead: {inductance!r} H is below what a {radius!r} m radius wire of 10 radii has"
        )
    hi = lo
    while grover_inductance(hi, radius) < inductance:
        hi *= 2.0
    return bracketed_root(lambda x: grover_inductance(x, radius) - inductance, lo, hi,
                          rtol=1e-14)

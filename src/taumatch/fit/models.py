"""Pure physics for the fit: the two-arm divider with a source edge, and its square-wave response.

No lmfit here (the lmfit wrappers live in :mod:`taumatch.fit.divider`), so these
functions are usable and testable on their own.

The divider: tip arm R1 ∥ C1 over shunt arm R2 ∥ C2 (C2 is everything from the output
node to ground: cable, trimmer, instrument input).  Millman & Taub / Boylestad::

    H(s) = [R2/(R1+R2)] · (1 + s·R1·C1) / (1 + s·(R1‖R2)·(C1+C2))

so the step jumps to C1/(C1+C2), settles at R2/(R1+R2) with τ = (R1‖R2)(C1+C2).
The source edge is a first-order low-pass whose 10–90 % time is ``edge`` (τ = edge/ln 9).
"""

from __future__ import annotations

import math

import numpy as np

from ..lti import Rational

__all__ = [
    "LN9",
    "chain_rational",
    "divider_rational",
    "edge_rational",
    "hf_dc_error",
    "ring_rational",
    "series_c",
    "shunt_trim",
    "square_model",
    "tip_trim",
]

LN9 = math.log(9.0)


def divider_rational(r1: float, c1: float, r2: float, c2: float) -> Rational:
    """Two-arm divider transfer function (R1, R2 in ohm; C1, C2 in farad)."""
    tau1 = r1 * c1
    taup = r1 * r2 / (r1 + r2) * (c1 + c2)
    return Rational.from_zpk([-1.0 / tau1], [-1.0 / taup], c1 / (c1 + c2))


def edge_rational(edge: float) -> Rational:
    """First-order source edge with 10–90 % time ``edge`` (s); unity when edge is 0."""
    if edge <= 0:
        return Rational.constant(1.0)
    tau = edge / LN9
    return Rational.from_zpk([], [-1.0 / tau], 1.0 / tau)


def series_c(c1: float, c2: float) -> float:
    """C1 in series with C2 (F): what a ground lead's inductance rings with at the tip."""
    return c1 * c2 / (c1 + c2)


def ring_rational(l: float, r: float, c: float) -> Rational:
    """Series R–L into capacitance C: 1/(L·C·s² + R·C·s + 1) (Ogata's second-order form with
    ω0 = 1/√(LC), ζ = (R/2)·√(C/L)); unity when l is 0."""
    if l <= 0:
        return Rational.constant(1.0)
    from ..lti.polynomials import _quadratic

    a = l * c
    poles = _quadratic(a, r * c, 1.0)
    return Rational.from_zpk([], poles, 1.0 / a)


def chain_rational(r1: float, c1: float, r2: float, c2: float, edge: float = 0.0,
                   lead: tuple | None = None) -> Rational:
    """The divider behind its source edge (and, given ``lead = (L, R)``, the lead's ringing
    with C1 in series with C2) as one Rational: the product of :func:`divider_rational`,
    :func:`edge_rational` and :func:`ring_rational`, built at once (the fit evaluates it
    hundreds of times)."""
    zeros = [-1.0 / (r1 * c1)]
    poles = [-1.0 / (r1 * r2 / (r1 + r2) * (c1 + c2))]
    gain = c1 / (c1 + c2)
    if edge > 0:
        poles.append(-LN9 / edge)
        gain *= LN9 / edge
    if lead is not None and lead[0] > 0:
        from ..lti.polynomials import _quadratic

        a = lead[0] * series_c(c1, c2)
        poles.extend(_quadratic(a, lead[1] * series_c(c1, c2), 1.0))
        gain /= a
    return Rational.from_zpk(zeros, poles, gain)


def square_model(t, H: Rational, period: float, duty: float, amplitude: float, offset: float,
                 t0: float) -> np.ndarray:
    """offset + amplitude · (periodic response of H to a 0/1 square wave rising at t0)."""
    return offset + amplitude * H.square(np.asarray(t, dtype=float) - t0, period, duty)


def hf_dc_error(r1, c1, r2, c2):
    """High- to low-frequency gain ratio minus one: (R1·C1 − R2·C2)/(R2·(C1+C2))."""
    return (r1 * c1 - r2 * c2) / (r2 * (c1 + c2))


def shunt_trim(r1, c1, r2, c2):
    """Change of shunt (bottom-arm) capacitance that compensates: R1·C1/R2 − C2 (F)."""
    return r1 * c1 / r2 - c2


def tip_trim(r1, c1, r2, c2):
    """Equivalent change at the tip arm: R2·C2/R1 − C1 (F)."""
    return r2 * c2 / r1 - c1

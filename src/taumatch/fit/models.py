"""Pure physics for the fit: the two-arm divider behind a source edge (and a ground lead),
and its square-wave response.

No lmfit here (the lmfit wrapper lives in :mod:`taumatch.fit.divider`).  The divider itself
— tip arm R1 ∥ C1 over shunt arm R2 ∥ C2, its gain error and trims — is the package's one
model, :class:`taumatch.chain.two_arm.TwoArm`; this module adds what a capture shows beside
it: the source edge, a first-order low-pass whose 10–90 % time is ``edge``
(τ = edge/ln 9), and the lead's series R–L ringing with C1 in series with C2.
"""

from __future__ import annotations

import math

import numpy as np

from ..chain.two_arm import TwoArm
from ..lti import Rational

__all__ = ["LN9", "chain_rational", "series_c", "square_model"]

LN9 = math.log(9.0)


def series_c(c1: float, c2: float) -> float:
    """C1 in series with C2 (F): what a ground lead's inductance rings with at the tip."""
    return c1 * c2 / (c1 + c2)


def chain_rational(r1: float, c1: float, r2: float, c2: float, edge: float = 0.0,
                   lead: tuple | None = None) -> Rational:
    """The divider behind its source edge as one Rational (SI units).

    The divider's zero ``−1/(R1·C1)``, pole ``−1/τ`` and high-frequency gain ``C1/(C1+C2)``
    come from :class:`~taumatch.chain.two_arm.TwoArm`; ``edge`` (s, 10–90 %) adds the pole
    ``−ln 9/edge`` at unit DC gain; ``lead = (L, R)`` adds ``1/(L·Cs·s² + R·Cs·s + 1)`` with
    Cs = C1 in series with C2 (Ogata's second-order form, ω0 = 1/√(L·Cs),
    ζ = (R/2)·√(Cs/L)).  Built at once rather than as a product: the fit evaluates it
    hundreds of times.
    """
    d = TwoArm(r1, c1, r2, c2)
    zeros = [-1.0 / d.tau_tip]
    poles = [-1.0 / d.tau]
    gain = d.hf_gain
    if edge > 0:
        poles.append(-LN9 / edge)
        gain *= LN9 / edge
    if lead is not None and lead[0] > 0:
        from ..lti.polynomials import _quadratic

        cs = series_c(c1, c2)
        a = lead[0] * cs
        poles.extend(_quadratic(a, lead[1] * cs, 1.0))
        gain /= a
    return Rational.from_zpk(zeros, poles, gain)


def square_model(t, H: Rational, period: float, duty: float, amplitude: float, offset: float,
                 t0: float) -> np.ndarray:
    """offset + amplitude · (periodic response of H to a 0/1 square wave rising at t0)."""
    return offset + amplitude * H.square(np.asarray(t, dtype=float) - t0, period, duty)

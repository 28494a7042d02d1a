"""The N-section lumped ladder of a high-voltage column, as the parts of a chain.

The column (tip arm ``R1 ∥ C1`` spread over ``N`` sections, ``Ce`` to earth) into the shunt
arm ``R2 ∥ C2``: each section is ``R1/N`` in parallel with ``N·C1``; the earth capacitance
``Ce/N`` of a section sits at each junction between sections, half of it at each end (the
half at the driven top loads the source, not the output).  A designed column is written in
a chain spec this way (:mod:`taumatch.design.as_chain`), and the chain package answers for
it: the exact response by its two-port cascade (:class:`taumatch.chain.cascade.Cascade`,
O(N) per frequency), the transfer function from the network the chain builds (the
descriptor pencil of :mod:`taumatch.network`).  As ``N`` grows the ladder converges to the
distributed column of :class:`taumatch.chain.two_arm.TwoArm`, which stays in closed form
(series capacitance along a line is beyond :class:`taumatch.network.Line`).

Examples
--------
>>> H = ladder_rational(9.9e6, 5e-12, 1e5, 480e-12, 3e-12, 6)
>>> len(H.poles), round(H.dc_gain, 6)
(6, 0.01)
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import InputError
from .ranges import check

__all__ = ["column_parts", "ladder_chain", "ladder_rational", "ladder_response",
           "ladder_response_time", "ladder_shunt_change"]


def _check(r1, c1, r2, c2, earth_capacitance):
    for name, value in (("r1", r1), ("r2", r2)):
        if not (math.isfinite(value) and value > 0):
            raise InputError(f"{name}: must be positive, got {value!r}")
    for name, value in (("c1", c1), ("c2", c2), ("earth_capacitance", earth_capacitance)):
        if not (math.isfinite(value) and value >= 0):
            raise InputError(f"{name}: must be zero or positive, got {value!r}")


def column_parts(section_resistors: tuple, section_capacitance: float, earth_capacitance: float,
                 sections: int, *, labels: bool = True) -> tuple:
    """The chain parts of a column, top first: half a section's earth capacitance at the
    top, then each section (a series part ``r ∥ c``) with ``Ce/N`` to earth after it, the
    last with ``Ce/(2N)`` at the output node.

    Parameters
    ----------
    section_resistors : tuple of float
        The resistors of one section [ohm] (they add).
    section_capacitance : float
        The grading capacitor across one section [F] (0: none).
    earth_capacitance : float
        The column's total capacitance to earth [F] (0: a lumped arm, no shunt parts).
    sections : int
    labels : bool
        Label each part with what it is.
    """
    from ..chain import Series, Shunt
    from ..units import format_quantity as q

    n = check("sections", sections, integer=True)
    r = float(sum(section_resistors))
    c = float(section_capacitance) or None
    ce = float(earth_capacitance)
    each = section_resistors[0] if section_resistors else r

    def label(text):
        return text if labels else ""

    out = []
    if ce > 0:
        out.append(Shunt(c=ce / (2 * n), label=label("column: half a section's earth "
                                                     "capacitance, at the top")))
    for k in range(1, n + 1):
        what = (f"{len(section_resistors)} x {q(each, 'Ω')}" if len(section_resistors) > 1
                else q(r, "Ω"))
        cap = f" with {q(c, 'F')} across" if c else ""
        name = f"tip arm, section {k} of {n}" if n > 1 else "tip arm"
        out.append(Series(r=r, c=c, label=label(f"{name}: {what}{cap}")))
        if ce > 0:
            share = ce / n if k < n else ce / (2 * n)
            where = f"after section {k}" if k < n else "at the output node (half a section's)"
            out.append(Shunt(c=share, label=label(f"column: earth capacitance {where}")))
    return tuple(out)


def ladder_chain(r1, c1, r2, c2, earth_capacitance, sections):
    """The ladder as a :class:`taumatch.chain.Chain`: an ideal 1 V source, the column's
    parts (:func:`column_parts`) and the shunt arm as the input ``r2 ∥ c2``.

    Parameters
    ----------
    r1, c1 : float
        Column resistance [ohm] and its total series (grading) capacitance [F, may be 0].
    r2, c2 : float
        Shunt arm resistance [ohm] and capacitance [F].
    earth_capacitance : float
        Total capacitance from the column to earth [F].
    sections : int
        Number of sections (1 to :data:`taumatch.design.ranges.MAX_SECTIONS`).
    """
    from ..chain import Chain, Input, Source

    _check(r1, c1, r2, c2, earth_capacitance)
    n = check("sections", sections, integer=True)
    parts = column_parts((r1 / n,), c1 * n, earth_capacitance, n, labels=False)
    return Chain(Source(0.0), parts + (Input(r=r2, c=c2 or None),), name="column ladder")


def ladder_response(freqs, r1, c1, r2, c2, earth_capacitance, sections) -> np.ndarray:
    """Exact frequency response of the ladder at ``freqs`` [Hz] (two-port cascade)."""
    from ..chain.cascade import Cascade

    return Cascade(ladder_chain(r1, c1, r2, c2, earth_capacitance, sections)).response(freqs)


def ladder_rational(r1, c1, r2, c2, earth_capacitance, sections):
    """The ladder's transfer function as a :class:`taumatch.lti.Rational` (the network the
    chain builds, by its descriptor pencil; dense, so best below a few hundred sections)."""
    from ..chain.model import ChainModel

    return ChainModel.from_chain(ladder_chain(r1, c1, r2, c2, earth_capacitance,
                                              sections)).transfer


def ladder_response_time(r1, c1, r2, c2, earth_capacitance, sections) -> float:
    """``T = −d/ds [H(s)/H(0)]`` at 0 [s] of the ladder, from its exact response at two
    low frequencies (``T = −Im H(jω) / (ω H(0))`` as ``ω → 0``; ``ω`` is 1e-5 of the
    inverse of the column's slowest time constant, so the error is below 1e-10 of ``T``'s
    scale)."""
    from ..chain.cascade import Cascade

    cascade = Cascade(ladder_chain(r1, c1, r2, c2, earth_capacitance, sections))
    scale = max(r1 * (c1 + earth_capacitance), r2 * c2, 1e-30)
    w = 1e-5 / scale
    h = cascade.transfer(np.array([1e-3j * w, 1j * w]))
    return float(-(h[1] / h[0].real).imag / w)


def ladder_shunt_change(r1, c1, r2, c2, earth_capacitance, sections) -> float:
    """Change of the shunt arm's capacitance [F] that makes the ladder's high-frequency gain
    equal its DC gain ``R2/(R1 + R2)``.

    As ``s → ∞`` the ladder is capacitive: from the output node (charge ``C2 + Ce/(2N)``
    per volt) back to the top, each section's capacitor ``N·C1`` adds ``charge/(N·C1)`` to
    the voltage and each junction's ``Ce/N`` adds its charge; the top voltage is affine in
    ``C2``, so one division gives the compensating ``C2`` (own derivation).
    """
    _check(r1, c1, r2, c2, earth_capacitance)
    n = check("sections", sections, integer=True)
    if not c1 > 0:
        raise InputError("c1: a ladder without series capacitance cannot be compensated")

    def top_voltage(c_out):
        v, q = 1.0, c_out + earth_capacitance / (2 * n)
        for k in range(n, 0, -1):
            v += q / (n * c1)
            if k > 1:
                q += earth_capacitance / n * v
        return v

    a = top_voltage(0.0)
    b = top_voltage(1.0) - a
    return ((r1 + r2) / r2 - a) / b - c2

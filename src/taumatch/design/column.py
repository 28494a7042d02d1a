"""A high-voltage column: what the design is asked for (its earth capacitance, sections,
grading limit), how an ungraded column responds, and the figures a designed column reports.

A tall resistor column of total resistance ``R`` has a capacitance ``Ce`` to earth spread
along its length.  Ungraded, into a small shunt arm, it behaves like a uniform RC line:

* response (normalised to its DC value) ``H(s) = √(sRCe) / sinh √(sRCe)``;
* unit step ``g(t) = 1 + 2 Σ_{k≥1} (−1)^k exp(−k²π² t/(R Ce))``;
* response time ``T = ∫(1 − g) dt = R·Ce/6`` and 10–90 % rise ≈ 0.237·R·Ce

(Kuffel, Zaengl & Kuffel, "High Voltage Engineering: Fundamentals", from memory; re-derived
and checked numerically in the tests).  The graded column (series capacitance along it,
the design's tip arm) is :class:`taumatch.chain.two_arm.TwoArm` with ``ce > 0``; its ladder
of sections is :mod:`taumatch.design.ladder`.

Examples
--------
>>> round(response_time_ungraded(100e6, 10e-12) * 1e6, 1)
166.7
>>> Column.per_section(2e-12, 10).earth_capacitance
2e-11
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..units import format_quantity
from .ranges import check, positive

__all__ = [
    "Column",
    "ColumnFigures",
    "column_figures",
    "column_response",
    "response_time_ungraded",
    "rise_time_ungraded",
    "step_series",
]


@dataclass(frozen=True)
class Column:
    """The column a design is asked for.

    Parameters
    ----------
    earth_capacitance : float
        Total capacitance from the tip arm to earth [F], spread uniformly.
    sections : int
        Sections of the column; each gets the same number of resistors and one grading
        capacitor (1 to :data:`taumatch.design.ranges.MAX_SECTIONS`).
    grading_limit : float
        Allowed relative shortfall of the midpoint voltage (0.01 = 1 %).
    geometry : tuple, optional
        ``(height, diameter, base height)`` [m] when ``earth_capacitance`` was estimated
        from them (:meth:`from_geometry`).
    """

    earth_capacitance: float
    sections: int = 1
    grading_limit: float = 0.01
    geometry: tuple | None = None

    def __post_init__(self):
        n = check("sections", self.sections, integer=True)
        object.__setattr__(self, "sections", n)
        ce = float(self.earth_capacitance)
        if not (math.isfinite(ce) and 0 <= ce <= 1e-9 * n):
            raise InputError(f"earth_capacitance: must be at least 0 F and at most "
                             f"{format_quantity(1e-9 * n, 'F')} (1 nF per section), "
                             f"got {self.earth_capacitance!r}")
        object.__setattr__(self, "earth_capacitance", ce)
        object.__setattr__(self, "grading_limit", check("grading_limit", self.grading_limit))

    @classmethod
    def per_section(cls, stray_capacitance: float, sections: int = 1,
                    grading_limit: float = 0.01) -> Column:
        """A column with ``stray_capacitance`` [F] to earth per section."""
        n = check("sections", sections, integer=True)
        return cls(check("stray_capacitance", stray_capacitance) * n, n, grading_limit)

    @classmethod
    def from_geometry(cls, height: float, diameter: float, base_height: float | None = None,
                      sections: int = 1, grading_limit: float = 0.01) -> Column:
        """A column whose earth capacitance is estimated from its height and diameter [m]
        (:func:`taumatch.design.geometry.column_capacitance_geometry`; ``base_height``: its
        lower end above the earthed floor, default one diameter)."""
        from .geometry import column_capacitance_geometry

        h = check("column_height", height)
        d = check("column_diameter", diameter)
        b = None if base_height is None else check("column_base", base_height)
        ce = column_capacitance_geometry(h, d, b)
        return cls(ce, sections, grading_limit, (h, d, b))

    @property
    def stray_capacitance(self) -> float:
        """Capacitance to earth per section [F]."""
        return self.earth_capacitance / self.sections


@dataclass(frozen=True)
class ColumnFigures:
    """What a designed column reports (SI units).

    Attributes
    ----------
    column : Column
    grading_capacitance_min : float
        Smallest total series capacitance meeting the grading limit [F].
    grading_midpoint_error : float
        Midpoint-voltage shortfall as built (fraction).
    response_time : float
        Trimmed design, distributed column: ``T`` [s] (:attr:`TwoArm.response_time`).
    response_time_ungraded, rise_time_ungraded : float
        The same resistance without grading: ``R·Ce/6`` and its 10-90 % rise [s].
    trimmed_flatness : float
        Largest departure of the trimmed ``|H|`` from DC over six decades around the
        column's time constant (fraction).
    response_time_ladder : float
        ``T`` of the N-section ladder the design is written as in a chain spec [s].
    trimmer_ladder : float
        The trimmer setting that compensates that ladder [F] (the distributed column's is the
        design's nominal).
    """

    column: Column
    grading_capacitance_min: float
    grading_midpoint_error: float
    response_time: float
    response_time_ungraded: float
    rise_time_ungraded: float
    trimmed_flatness: float
    response_time_ladder: float
    trimmer_ladder: float

    def to_dict(self) -> dict:
        c = self.column
        return {"earth_capacitance": c.earth_capacitance, "sections": c.sections,
                "stray_capacitance_per_section": c.stray_capacitance,
                "grading_limit": c.grading_limit,
                "geometry": None if c.geometry is None else dict(zip(
                    ("height", "diameter", "base_height"), c.geometry)),
                "grading_capacitance_min": self.grading_capacitance_min,
                "grading_midpoint_error": self.grading_midpoint_error,
                "response_time": self.response_time,
                "response_time_ungraded": self.response_time_ungraded,
                "rise_time_ungraded": self.rise_time_ungraded,
                "trimmed_flatness": self.trimmed_flatness,
                "response_time_ladder": self.response_time_ladder,
                "trimmer_ladder": self.trimmer_ladder}

    def summary(self) -> str:
        q = format_quantity
        c = self.column
        plural = "s" if c.sections > 1 else ""
        lines = [(f"  earth capacitance {q(c.earth_capacitance, 'F')} ({c.sections} section"
                  f"{plural}): grading needs Cs >= {q(self.grading_capacitance_min, 'F')} "
                  f"(midpoint error {self.grading_midpoint_error:.2%} as built)"),
                 (f"  response time {q(self.response_time, 's')} trimmed; ungraded column "
                  f"R·Ce/6 = {q(self.response_time_ungraded, 's')}, 10-90 % "
                  f"{q(self.rise_time_ungraded, 's')}; trimmed |H| within "
                  f"{self.trimmed_flatness:.2%} of DC")]
        lines.append(f"  as written to a chain spec ({c.sections}-section lumped ladder): response "
                     f"time {q(self.response_time_ladder, 's')}, trimmer compensates at "
                     f"{q(self.trimmer_ladder, 'F')}")
        return "\n".join(lines)


def column_figures(arms, column: Column, c1_fixed: float, nominal: float) -> ColumnFigures:
    """The figures of a designed column: ``arms`` the trimmed design (a
    :class:`~taumatch.chain.two_arm.TwoArm` with its earth capacitance), ``c1_fixed`` its
    grading capacitance [F], ``nominal`` the trimmer's nominal setting [F]."""
    from .grading import grading_capacitance, midpoint_error
    from .ladder import ladder_response_time, ladder_shunt_change

    ce = arms.ce
    f = np.logspace(-2, 4, 121) / (2 * np.pi * arms.r1 * ce)
    flat = float(np.max(np.abs(np.abs(arms.freqresp(f)) * arms.ratio - 1.0)))
    n = column.sections
    ladder = (arms.r1, arms.c1, arms.r2, arms.c2, ce, n)
    return ColumnFigures(column, grading_capacitance(ce, column.grading_limit),
                         midpoint_error(ce / c1_fixed), float(arms.response_time),
                         response_time_ungraded(arms.r1, ce), rise_time_ungraded(arms.r1, ce),
                         flat, ladder_response_time(*ladder),
                         nominal + ladder_shunt_change(*ladder))


# ---------------------------------------------------------------- the ungraded column
def _z_over_sinh(z):
    """z / sinh z for complex z with Re z >= 0, without overflow."""
    z = np.asarray(z, dtype=complex)
    out = np.ones_like(z)
    small = np.abs(z) < 1.0
    nz = small & (z != 0)
    out[nz] = z[nz] / np.sinh(z[nz])
    big = ~small
    zb = z[big]
    out[big] = 2.0 * zb * np.exp(-zb) / (-np.expm1(-2.0 * zb))
    return out


def column_response(s, resistance: float, earth_capacitance: float):
    """Normalised response of an ungraded column, ``√(sRCe)/sinh √(sRCe)``.

    Parameters
    ----------
    s : complex or array
        Laplace variable [rad/s] (``2j*pi*f`` on the frequency axis).
    resistance : float
        Total column resistance R [ohm].
    earth_capacitance : float
        Total capacitance to earth Ce [F], spread uniformly.
    """
    x = np.asarray(s, dtype=complex) * positive(resistance, "resistance") * positive(
        earth_capacitance, "earth_capacitance")
    return _z_over_sinh(np.sqrt(x))


def step_series(t, resistance: float, earth_capacitance: float):
    """Normalised unit step of the ungraded column, ``1 + 2 Σ (−1)^k exp(−k²π² t/(R Ce))``.

    For small ``τ = t/(R Ce)`` the equal dual form ``(2/√(πτ)) Σ_{n≥0} exp(−(n + ½)²/τ)``
    (Poisson summation, own derivation) is used, so both ends converge in a few terms.

    Parameters
    ----------
    t : float or array
        Time after the step [s] (negative times give 0).
    resistance, earth_capacitance : float
        Column totals R [ohm] and Ce [F].
    """
    rc = positive(resistance, "resistance") * positive(earth_capacitance, "earth_capacitance")
    tau = np.asarray(t, dtype=float) / rc
    out = np.zeros_like(tau)
    late = tau >= 0.25
    if np.any(late):
        k = np.arange(1, 30)
        ta = tau[late][..., None]
        out[late] = 1.0 + 2.0 * np.sum((-1.0) ** k * np.exp(-(k * np.pi) ** 2 * ta), axis=-1)
    early = (tau > 0) & ~late
    if np.any(early):
        m = np.arange(0, 30) + 0.5
        te = tau[early][..., None]
        out[early] = 2.0 / np.sqrt(np.pi * te[..., 0]) * np.sum(np.exp(-m ** 2 / te), axis=-1)
    return out


def response_time_ungraded(resistance: float, earth_capacitance: float) -> float:
    """``T = R·Ce/6`` [s]: the area between the ideal and the actual normalised step."""
    return positive(resistance, "resistance") * float(earth_capacitance) / 6.0


def rise_time_ungraded(resistance: float, earth_capacitance: float) -> float:
    """10–90 % transition duration of the ungraded column's step [s] (≈ 0.237·R·Ce)."""
    from scipy.optimize import brentq

    rc = positive(resistance, "resistance") * positive(earth_capacitance, "earth_capacitance")

    def crossing(level):
        return brentq(lambda x: float(step_series(x * rc, 1.0, rc)[()]) - level, 1e-4, 10.0,
                      xtol=1e-14)

    return (crossing(0.9) - crossing(0.1)) * rc

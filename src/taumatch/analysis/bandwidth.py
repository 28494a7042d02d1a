"""Rise time of a closed form, the front ends' own rise times, and the root-sum-of-squares
estimate of a chain's rise time.

* The -3 dB points and peaking of a response: :func:`taumatch.network.find_bandwidth`
  (re-exported here).
* 10-90 % rise time of a :class:`taumatch.lti.Rational`'s closed-form step (lti partial
  fractions): a logarithmic time grid brackets the first crossings of 10 % and 90 % of the
  final value, then regula falsi (:func:`taumatch.network.band.bracketed_root`).  (The chain's own figures come from its exact step,
  :mod:`taumatch.analysis.step`.)
* RSS estimate ``sqrt(sum t_i^2)`` (Elmore's rule, W. C. Elmore, J. Appl. Phys. 19, 55,
  1948; approximate for 10-90 %) from each part's own rise time:

  - the source edge (its ``rise_time``);
  - the source resistance charging the probe's input capacitance:
    ``ln 9 * Rs * C_in`` (``C_in`` from :mod:`taumatch.analysis.loading`);
  - every lossy, unterminated line: ``ln 9 * R_line * C_eff``
    (:func:`taumatch.chain.topology.lossy_lines`: Elmore delay of a distributed RC line);
  - every front end (input or buffer): the exact 10-90 % of its own response;
  - a buffer's output resistance into the capacitance after it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import ComputationError
from ..network.band import find_bandwidth

__all__ = [
    "LN9",
    "RiseTime",
    "find_bandwidth",
    "front_end_rise_time",
    "rise_time",
    "rss_terms",
]

LN9 = math.log(9.0)


@dataclass(frozen=True)
class RiseTime:
    """10-90 % crossings of a step response.

    Attributes
    ----------
    t10, t90 : float
        Times of the first crossings of 10 % and 90 % of the final value [s].
    final : float
        Final value (the DC gain times the step height).
    """

    t10: float
    t90: float
    final: float

    @property
    def rise_time(self) -> float:
        """``t90 - t10`` [s]."""
        return self.t90 - self.t10


def rise_time(h, t_min: float | None = None, t_max: float | None = None,
              points: int = 4000) -> RiseTime:
    """10-90 % rise time of the closed-form unit-step response of a Rational ``h``.

    Parameters
    ----------
    h : Rational
    t_min, t_max : float, optional
        Time grid [s]; default from the fastest and slowest poles.
    points : int
        Points of the logarithmic bracketing grid.

    Raises
    ------
    ComputationError
        For a zero final value (AC-coupled) or a response that never crosses a level.

    Examples
    --------
    >>> from taumatch.lti import Rational
    >>> r = rise_time(Rational.from_zpk([], [-1.0], 1.0))   # one pole, tau = 1 s
    >>> round(r.rise_time, 9) == round(math.log(9), 9)
    True
    """
    final = float(h.dc_gain)
    if not math.isfinite(final) or final == 0:
        raise ComputationError("the step response settles to zero (AC-coupled): no 10-90 % rise")
    mags = np.abs(np.asarray(h.poles))
    mags = mags[mags > 0]
    if t_min is None:
        t_min = 1e-3 / mags.max() if mags.size else 1e-12
    if t_max is None:
        slow = np.abs(np.asarray(h.poles).real)
        slow = slow[slow > 0]
        t_max = 20.0 / slow.min() if slow.size else 1.0
    return _rise_of(lambda t: np.asarray(h.step(t), dtype=float), final, t_min, t_max, points)


def _rise_of(step, final, t_min, t_max, points) -> RiseTime:
    """10-90 % crossings of ``step(t)`` (vectorised, settling to ``final``): a logarithmic
    grid from ``t_min`` to ``t_max`` brackets them, regula falsi finds them."""
    from ..network.band import bracketed_root

    grid = np.concatenate([[0.0], np.logspace(math.log10(t_min), math.log10(t_max), points)])
    y = step(grid) / final

    def crossing(level):
        idx = np.nonzero(y >= level)[0]
        if not idx.size:
            raise ComputationError(f"the step response never reaches {level:.0%} of its final value")
        i = int(idx[0])
        if i == 0:
            return 0.0
        return bracketed_root(lambda t: float(step(np.array([t]))[0]) / final - level,
                              grid[i - 1], grid[i], rtol=1e-13)

    return RiseTime(crossing(0.1), crossing(0.9), final)


def _second_order_step(t, zeta: float):
    """Unit step of ``1 / (s^2 + 2 zeta s + 1)`` (``zeta <= 1``, t in units of 1/omega_n):
    ``1 - exp(-zeta t) (cos(d t) + zeta/d sin(d t))``, ``d = sqrt(1 - zeta^2)``; at
    ``zeta = 1``, ``1 - exp(-t) (1 + t)`` (Ogata, "Modern Control Engineering", the
    second-order step)."""
    t = np.asarray(t, dtype=float)
    if zeta >= 1.0:
        return 1.0 - np.exp(-t) * (1.0 + t)
    d = math.sqrt(1.0 - zeta * zeta)
    return 1.0 - np.exp(-zeta * t) * (np.cos(d * t) + zeta / d * np.sin(d * t))


def front_end_rise_time(bandwidth: float, response: str) -> float:
    """Exact 10-90 % rise time [s] of a front end of ``bandwidth`` [Hz] and shape ``response``."""
    from ..chain.build import front_end_shape

    w, zeta = front_end_shape(bandwidth, response)
    if zeta is None:
        return LN9 / w
    # second order in units of 1/w (its closed-form step), then back to seconds
    return _rise_of(lambda t: _second_order_step(t, zeta), 1.0, 1e-4, 100.0, 4000).rise_time / w


def rss_terms(chain, input_capacitance: float, include_edge: bool = True
              ) -> list[tuple[str, float]]:
    """Each part's own 10-90 % rise time [s] for the RSS estimate (see the module text).

    Parameters
    ----------
    chain : Chain
    input_capacitance : float
        The probe's input capacitance as the source sees it [F].
    include_edge : bool
        Include the source edge (for the displayed rise time) or not (the chain's own).

    Returns
    -------
    list of (label, seconds)
    """
    from ..chain import topology

    terms = []
    src = chain.source
    if include_edge and src.rise_time:
        terms.append(("source edge", src.rise_time))
    if src.resistance > 0 and input_capacitance > 0:
        terms.append(("source resistance x input capacitance",
                      LN9 * src.resistance * input_capacitance))
    for n, r, c in topology.lossy_lines(chain):
        terms.append((f"part {n} (line) resistance", LN9 * r * c))
    for n, kind, bandwidth, response in topology.front_ends(chain):
        terms.append((f"part {n} ({kind}) front end", front_end_rise_time(bandwidth, response)))
    for n, r_out, c in topology.buffer_loads(chain):
        if c > 0:
            terms.append((f"part {n} (buffer) output resistance", LN9 * r_out * c))
    return terms

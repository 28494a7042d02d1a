"""Bandwidth, rise time, their product and the root-sum-of-squares estimate.

* -3 dB bandwidth from the exact frequency response: a logarithmic sweep brackets the
  first crossing of ``|H| = |H_ref| / sqrt 2``, then ``brentq`` finds it.  ``H_ref`` is the
  DC gain, or the passband peak when the chain is AC-coupled (no DC path): then the lower
  -3 dB frequency is found too.
* 10-90 % rise time from the closed-form step response (lti partial fractions): a
  logarithmic time grid brackets the first crossings of 10 % and 90 % of the final value,
  then ``brentq``.
* RSS estimate ``sqrt(sum t_i^2)`` (Elmore's rule, W. C. Elmore, J. Appl. Phys. 19, 55,
  1948; approximate for 10-90 %) from each part's own rise time:

  - the source edge (its ``rise_time``);
  - the source resistance charging the probe's input capacitance:
    ``ln 9 * Rs * C_in`` (``C_in`` from :mod:`taumatch.analysis.loading`);
  - every lossy line: ``ln 9 * R_line * C_eff``, ``C_eff = C_line / 2 + C_after`` with
    ``C_after`` the capacitance to ground after it (Elmore delay of a distributed RC
    line), in series with the tip arm's capacitance when a series capacitance feeds the
    line (a divider: the cable is charged through it).  A line that ends in a resistance
    within a factor 2 of its impedance counts as terminated: it adds no term and no
    capacitance (it looks resistive);
  - every front end (input or buffer): the exact 10-90 % of its own response;
  - a buffer's output resistance into the capacitance after it.

  Two estimates are reported: the chain's own (without the source edge) against the exact
  10-90 % of the chain's step, and the displayed one (with the edge) against the exact
  10-90 % of the step through the source edge and the chain.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import ComputationError

__all__ = [
    "LN9",
    "Bandwidth",
    "RiseTime",
    "find_bandwidth",
    "front_end_rise_time",
    "rise_time",
    "rss_terms",
]

LN9 = math.log(9.0)


@dataclass(frozen=True)
class Bandwidth:
    """-3 dB points of a response.

    Attributes
    ----------
    upper : float
        Upper -3 dB frequency [Hz] (nan if none in the sweep).
    lower : float or None
        Lower -3 dB frequency [Hz] of an AC-coupled response (None when DC-coupled).
    reference : float
        ``|H|`` the -3 dB points are relative to [V/V].
    ac_coupled : bool
    """

    upper: float
    lower: float | None
    reference: float
    ac_coupled: bool


def find_bandwidth(response, f_lo: float, f_hi: float, points_per_decade: int = 40) -> Bandwidth:
    """-3 dB points of ``response(freqs) -> complex array`` between ``f_lo`` and ``f_hi`` [Hz].

    Examples
    --------
    >>> bw = find_bandwidth(lambda f: 1 / (1 + 1j * np.asarray(f) / 1e6), 1e2, 1e10)
    >>> round(bw.upper / 1e6, 9)
    1.0
    """
    from scipy.optimize import brentq

    n = max(int(points_per_decade * math.log10(f_hi / f_lo)), 20)
    grid = np.logspace(math.log10(f_lo), math.log10(f_hi), n)
    mag = np.abs(response(grid))
    dc = float(np.abs(response(np.array([0.0]))[0]))
    peak = float(mag.max())
    if not peak > 0:
        raise ComputationError("the response is zero at every frequency")
    ac = dc < 1e-9 * peak
    ref = peak if ac else dc
    level = ref / math.sqrt(2.0)

    def g(f):
        return float(np.abs(response(np.array([f]))[0])) - level

    start = int(np.argmax(mag)) if ac else 0
    below = np.nonzero(mag[start:] < level)[0]
    upper = math.nan
    if below.size:
        i = start + int(below[0])
        upper = grid[0] if i == 0 else brentq(g, grid[i - 1], grid[i], xtol=1e-12 * grid[i],
                                               rtol=1e-12)
    lower = None
    if ac:
        under = np.nonzero(mag[:start] < level)[0]
        if under.size:
            i = int(under[-1])
            lower = brentq(g, grid[i], grid[i + 1], xtol=1e-12 * grid[i], rtol=1e-12)
    return Bandwidth(float(upper), lower, ref, bool(ac))


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
    """10-90 % rise time of the unit-step response of ``h`` (Rational or ScaledRational).

    Parameters
    ----------
    h : object with ``step(t)``, ``poles`` [rad/s] and ``dc_gain``
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
    from scipy.optimize import brentq

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
    grid = np.concatenate([[0.0], np.logspace(math.log10(t_min), math.log10(t_max), points)])
    y = np.asarray(h.step(grid), dtype=float) / final

    def crossing(level):
        idx = np.nonzero(y >= level)[0]
        if not idx.size:
            raise ComputationError(f"the step response never reaches {level:.0%} of its final value")
        i = int(idx[0])
        if i == 0:
            return 0.0
        return brentq(lambda t: float(h.step(np.array([t]))[0]) / final - level, grid[i - 1],
                      grid[i], xtol=1e-14 * grid[i], rtol=1e-13)

    return RiseTime(crossing(0.1), crossing(0.9), final)


def front_end_rise_time(bandwidth: float, response: str) -> float:
    """Exact 10-90 % rise time [s] of a front end of ``bandwidth`` [Hz] and shape ``response``."""
    from ..chain.build import front_end_shape
    from ..lti import Rational

    w, zeta = front_end_shape(bandwidth, response)
    if zeta is None:
        return LN9 / w
    # second order in units of 1/w, then back to seconds
    if zeta == 1.0:
        h = Rational.from_zpk([], [-1.0, -1.0], 1.0)
    else:
        d = math.sqrt(1 - zeta * zeta)
        h = Rational.from_zpk([], [complex(-zeta, d), complex(-zeta, -d)], 1.0)
    return rise_time(h, 1e-4, 100.0).rise_time / w


def _matched(parts, k: int) -> bool:
    """True when line ``k`` (index) ends in a resistance within a factor 2 of its impedance."""
    from ..chain.parts import Input, Shunt

    z0 = parts[k].impedance
    for p in parts[k + 1:]:
        if isinstance(p, (Shunt, Input)) and p.r is not None:
            return z0 / 2 <= p.r <= 2 * z0
        if not isinstance(p, Shunt):
            return False
    return False


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
    from ..chain.parts import Buffer, Input, Lead, Line, Series, Shunt

    terms = []
    src = chain.source
    if include_edge and src.rise_time:
        terms.append(("source edge", src.rise_time))
    if src.resistance > 0 and input_capacitance > 0:
        terms.append(("source resistance x input capacitance",
                      LN9 * src.resistance * input_capacitance))
    parts = chain.parts

    def c_after(k):
        total = 0.0
        for j, p in enumerate(parts[k + 1:], start=k + 1):
            if isinstance(p, Series) and (p.r is not None or p.c is not None):
                break
            if isinstance(p, (Shunt, Input, Buffer)) and p.c:
                total += p.c
            if isinstance(p, Shunt) and p.branch is not None:
                total += p.branch.c
            if isinstance(p, Line):
                if _matched(parts, j):
                    break  # a terminated line looks resistive, not capacitive
                total += p.c * p.length
            if isinstance(p, Buffer):
                break
        return total

    def c_before(k):
        # a series capacitance feeding the line (a divider's tip arm) in series with it
        for p in reversed(parts[:k]):
            if isinstance(p, Series) and p.c is not None:
                return p.c
            if isinstance(p, (Series, Lead)):
                continue
            return None
        return None

    for k, p in enumerate(parts):
        n = k + 1
        if isinstance(p, Line) and p.r > 0 and not _matched(parts, k):
            c_down = p.c * p.length / 2 + c_after(k)
            c_up = c_before(k)
            c_eff = c_down if c_up is None else c_up * c_down / (c_up + c_down)
            terms.append((f"part {n} (line) resistance", LN9 * p.r * p.length * c_eff))
        if isinstance(p, (Input, Buffer)) and p.bandwidth:
            terms.append((f"part {n} ({p.kind}) front end",
                          front_end_rise_time(p.bandwidth, p.response)))
        if isinstance(p, Buffer) and p.r_out > 0:
            ca = c_after(k)
            if ca > 0:
                terms.append((f"part {n} (buffer) output resistance", LN9 * p.r_out * ca))
    return terms

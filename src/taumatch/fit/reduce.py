"""Reducing an averaged period for fitting: every sample near the edges, growing blocks after.

The interesting time scales of a probe chain spread over decades after each edge:
nanosecond ringing, microsecond edges, the millisecond divider time constant.  Each
segment of the period (from a little before an edge to a little before the next) is
cut into blocks whose length grows geometrically with the time since the edge, so
every decade of time gets a similar number of points and no detail is averaged away.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass

import numpy as np

__all__ = ["Reduced", "reduce_period"]


@dataclass(frozen=True)
class Reduced:
    """Block-averaged samples: time (s, folded into [0, period)), value (V), samples per point."""

    t: np.ndarray
    v: np.ndarray
    n: np.ndarray


def _blocks(length: int, dense: int, count: int) -> np.ndarray:
    """Block boundaries 0 = b0 < b1 < ... = length: single samples first, then geometric."""
    dense = min(dense, length)
    bounds = [np.arange(dense + 1)]
    if length > dense:
        bounds.append(np.geomspace(dense, length, max(count, 2)))
    b = np.unique(np.round(np.concatenate(bounds)).astype(int))
    b = b[(b >= 0) & (b <= length)]
    if b[-1] != length:
        b = np.append(b, length)
    return b


def reduce_period(t, v, period: float, edges, lead: float, max_points: int = 3000,
                  dense: int = 64) -> Reduced:
    """Reduce one averaged period to about ``max_points`` points.

    Parameters
    ----------
    t, v : array_like
        One averaged period (s, V), uniformly sampled.
    period : float
        Period (s); times are folded into [0, period).
    edges : sequence of float
        Edge instants (s) within the period, e.g. ``[0, duty*period]``.
    lead : float
        Time (s) before each edge at which its segment starts (the edge begins before
        its 50 % instant).
    max_points : int
        About how many points to return.
    dense : int
        Samples kept one by one at the start of each segment.
    """
    t = np.asarray(t, dtype=float)
    v = np.asarray(v, dtype=float)
    starts = sorted(np.mod(np.asarray(edges, dtype=float) - lead, period))
    # fold and rotate so the first segment starts at index 0
    tm = np.mod(t - starts[0], period)
    order = np.argsort(tm, kind="stable")
    tm, vs = tm[order], v[order]
    cuts = [0] + [int(np.searchsorted(tm, s - starts[0])) for s in starts[1:]] + [tm.size]
    per_seg = max(max_points // max(len(starts), 1), dense + 10)
    out_t, out_v, out_n = [], [], []
    for a, b in itertools.pairwise(cuts):
        if b <= a:
            continue
        bounds = _blocks(b - a, dense, per_seg - dense)
        sums_t = np.add.reduceat(tm[a:b], bounds[:-1])
        sums_v = np.add.reduceat(vs[a:b], bounds[:-1])
        n = np.diff(bounds).astype(float)
        out_t.append(sums_t / n)
        out_v.append(sums_v / n)
        out_n.append(n)
    tt = np.mod(np.concatenate(out_t) + starts[0], period)
    return Reduced(tt, np.concatenate(out_v), np.concatenate(out_n))

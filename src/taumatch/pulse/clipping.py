"""Clipping: samples stopped by the converter's rail, told apart from a quantised plateau.

An 8-bit instrument puts a flat plateau on one to three codes; its highest (or lowest)
code then holds a large share of the record.  That is what a plateau looks like there,
not a rail.  A rail shows itself otherwise, in one of three ways (each judged on the raw
record, the top rail on the record's maximum E and the bottom rail on its minimum):

* **corner cut off** — E lies clearly beyond the level the trace settles at on that side
  (more than ``max(3 codes, 4 noise RMS)``), and the samples pile on E: at least
  ``PILE_RATIO`` times as many as in the band of two codes (or 2.5 noise RMS) just
  inside it (``EDGE_PILE_RATIO`` times when the trace runs onto E straight from an edge),
  held there in a run ``RUN_RATIO`` times longer than on any value inside it.  A trace still moving through a level spends
  about as long in each code it crosses (the top code of a smooth peak holds at most 1.4
  times the two codes below it, of a first-order corner about half: own derivations for a
  parabolic peak and an exponential decay); only a rail collects it;
* **noise cut off** — E is the state's own level, the state carries noise of
  ``SPREAD_OTHER`` codes or more (from second differences, so an edge's tail does not
  count), a quarter or more of it sits exactly on E, and the rest flicks on and off E (a
  third of it next to a sample on E; an edge's tail approaches from one side only) with
  the samples beside E more than ``SPREAD_CODES`` codes below it (median): a noise
  distribution that wide cannot put that share on one code unless something stops it;
* **frozen on the rail** — E is the state's own level and the trace stays on it for a run
  ``FREEZE_RATIO`` times longer (and at least ``MIN_FREEZE`` samples) than it ever stays
  on any other value of that state, while the other state's noise (from second
  differences, so a settling tail does not count) is ``SPREAD_OTHER`` codes or more: the
  instrument's noise is on both states, so a state frozen on one code is held there.

A rail must also hold at least ``MIN_SHARE`` of the record.  A flat plateau whose noise
stays below a code sits on one to three codes, moves on and off them as often as the
noise allows, and is never called clipped; where both states are that quiet, nothing
tells a rail from a plateau and none of the tests fires (a limitation: a waveform cut flat
on both rails by a noise-free converter looks like a clean square wave).

The resolution of the record (its code step) is the smallest spacing between distinct
sample values; for unquantised data it is tiny and the tests above reduce to the noise.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..units import format_quantity
from .quality import curvature_noise

__all__ = ["EDGE_PILE_RATIO", "FREEZE_RATIO", "MIN_FREEZE", "MIN_RUN", "MIN_SHARE", "PILE_RATIO",
           "RUN_RATIO", "SPREAD_CODES", "SPREAD_OTHER", "Rail", "code_step", "find_rails"]

#: Share of the record a rail must hold.
MIN_SHARE = 0.005
#: Longest run of identical samples on the rail, at the least (a rail holds the trace).
MIN_RUN = 3
#: Samples on the rail against those in the band just inside it, for a cut corner.
PILE_RATIO = 2.0
#: Median depth (in codes) below the rail of a state's other samples beyond which its noise
#: cannot pile a quarter of it on one code by itself.
SPREAD_CODES = 4.0
#: The same for a rail the trace runs into straight from an edge: an unclipped first-order
#: corner peaks at the edge and leaves its top code fastest (time in a code falls as 1/height
#: above the settled level, so the top code holds about half as much as the two below it).
EDGE_PILE_RATIO = 1.0
#: ... and the rail holds the trace in one run this many times longer than any value
#: inside it does (the top code of a smooth peak or an unclipped corner holds it about as
#: long as the codes below).
RUN_RATIO = 2.0
#: A state frozen on the rail for at least this many samples ...
MIN_FREEZE = 20
#: ... and this many times longer than it ever stays on any other value, while the other
#: state's noise moves it over a code or more, is held there by the rail.
FREEZE_RATIO = 20.0
#: Noise (codes, from second differences) the other state must show before a state frozen
#: on one code counts as held: a state between two codes flickers over both with almost no
#: noise, which second differences read as up to about one code.
SPREAD_OTHER = 2.0
#: Samples of the record used for the statistics of a long record (evenly strided).
_MAX_SAMPLES = 2_000_000


@dataclass(frozen=True)
class Rail:
    """Samples stopped by one of the converter's rails.

    Attributes
    ----------
    side : {"top", "bottom"}
        Which rail.
    level : float
        The value the samples pile on (V).
    share : float
        Fraction of the record on the rail; for a periodic record, the fraction of each
        period the trace is lost.
    settles_at : float
        The state level the trace settles in on that side (V).
    evidence : {"corner", "noise", "frozen"}
        How the rail showed itself (see the module's description).
    """

    side: str
    level: float
    share: float
    settles_at: float
    evidence: str

    def describe(self, period: float | None = None) -> str:
        """One sentence: the rail, its level, how much of the period is lost, what to change."""
        q = format_quantity
        lost = f"{100 * self.share:.1f} % of the record"
        if period is not None and math.isfinite(period) and period > 0:
            lost = (f"{100 * self.share:.1f} % of each period "
                    f"(about {q(self.share * period, 's')} of {q(period, 's')})")
        why = {
            "corner": f"the trace runs into it while still moving and stays there; it settles "
                      f"at {q(self.settles_at, 'V')}",
            "noise": "the noise around that level is cut off there",
            "frozen": "the trace freezes on it far longer than on any other value, while the "
                      "other state's noise moves it over codes",
        }[self.evidence]
        where = "top" if self.side == "top" else "bottom"
        move = "down" if self.side == "top" else "up"
        return (f"clipped at the {where} rail, {q(self.level, 'V')}: {why}; {lost} is lost — "
                f"raise the volts/div or move the offset {move} so the whole trace, corners "
                "included, stays on screen")

    def to_dict(self) -> dict:
        return {"side": self.side, "level": self.level, "share": self.share,
                "settles_at": self.settles_at, "evidence": self.evidence}


def _subset(v: np.ndarray) -> np.ndarray:
    return v if v.size <= _MAX_SAMPLES else v[:: math.ceil(v.size / _MAX_SAMPLES)]


def code_step(v) -> float:
    """Smallest spacing (V) between distinct sample values: the record's code step.

    Spacings under 1e-9 of the record's span are taken for the rounding of printed
    values, not for codes.  Zero for a constant record.
    """
    u = np.unique(_subset(np.asarray(v, dtype=np.float64)))
    if u.size < 2:
        return 0.0
    d = np.diff(u)
    d = d[d > 1e-9 * (u[-1] - u[0])]
    return float(d.min()) if d.size else 0.0


def _longest_run(on: np.ndarray) -> int:
    """Longest run of consecutive True values."""
    if not on.any():
        return 0
    padded = np.concatenate([[False], on, [False]])
    change = np.flatnonzero(padded[1:] != padded[:-1])
    return int(np.max(change[1::2] - change[::2]))


def _settled(off: np.ndarray, level: float, e: float, width: float, n_e: int) -> float:
    """Where the trace settles on the rail's side: the state level, or, when the rail's
    own pile took the histogram mode, the densest stretch (``width`` wide, V) of the
    samples off the rail, if it is a plateau (a quarter as many samples as the rail holds;
    an edge's samples spread too thin for that); else the rail itself."""
    if e - level > 0.5 * width:
        return level
    if off.size < 10:
        return e
    lo, hi = float(off.min()), float(off.max())
    bins = max(1, min(1000, math.ceil((hi - lo) / width)))
    counts, edges = np.histogram(off, bins=bins, range=(lo, lo + bins * width))
    k = int(np.argmax(counts))
    if counts[k] < max(10, 0.25 * n_e):
        return e
    inside = off[(off >= edges[k]) & (off <= edges[k + 1])]
    return float(inside.mean())


def _top_rail(x: np.ndarray, level: float, other: float, q: float):
    """``(evidence, settles_at)`` of a top rail in ``x`` (a bottom rail is looked for on
    −x), or None.  ``level`` and ``other`` are the state levels of this side and the other."""
    n = x.size
    e = float(x.max())
    on = x == e
    n_e = int(np.count_nonzero(on))
    if n_e < MIN_SHARE * n or _longest_run(on) < MIN_RUN:
        return None
    split = 0.5 * (level + other)
    in_state = x > split
    state = x[in_state]
    noise_here = curvature_noise(state)
    scale = 1e-12 * abs(e - other)
    width = max(3.0 * q, 4.0 * noise_here, 1e-3 * abs(e - other))
    settled = _settled(x[in_state & ~on], level, e, width, n_e)
    if e - settled > max(3.0 * q, 4.0 * noise_here, scale):
        w = max(q, noise_here, scale)
        inside = (x >= e - 2.5 * w) & (x < e)  # two codes (or 2.5 noise RMS) inside the rail
        ratio = EDGE_PILE_RATIO if _from_the_edge(x, on, split) else PILE_RATIO
        held = _longest_run(on) >= RUN_RATIO * _longest_still(x, inside)
        return ("corner", settled) if held and n_e >= ratio * np.count_nonzero(inside) else None
    # the rail sits at the state's own level
    if n_e >= 0.25 * state.size and noise_here >= max(SPREAD_OTHER * q, scale):
        near = in_state & ~on & (x > e - 0.25 * abs(e - other))
        flicks = near & _beside(on)
        if (np.count_nonzero(near) >= max(10, 0.05 * state.size)
                and np.count_nonzero(flicks) >= 0.3 * np.count_nonzero(near)
                and np.median(e - x[flicks]) > SPREAD_CODES * max(q, scale)):
            return "noise", settled
    noise_there = curvature_noise(x[~in_state])
    if noise_there < max(SPREAD_OTHER * q, 1e-4 * abs(e - other)):
        return None  # a quiet instrument: a state may sit on one code by itself
    if _longest_run(on) >= max(MIN_FREEZE, FREEZE_RATIO * _longest_still(x, in_state & ~on)):
        return "frozen", settled
    return None


def _from_the_edge(x: np.ndarray, on: np.ndarray, split: float, look: int = 5) -> bool:
    """True when most visits to the rail start straight from an edge: within ``look``
    samples before the visit the trace was on the other side of ``split``.  Runs on the
    rail less than ``look`` samples apart (noise flicking the trace off it) are one visit."""
    idx = np.flatnonzero(on)
    if not idx.size:
        return False
    starts = idx[np.concatenate([[True], np.diff(idx) > look])]
    starts = starts[starts >= look]
    if not starts.size:
        return False
    before = np.min(np.stack([x[starts - k] for k in range(1, look + 1)]), axis=0)
    return bool(np.mean(before <= split) >= 0.5)


def _beside(on: np.ndarray) -> np.ndarray:
    """Samples next to a sample ``on`` the rail."""
    return np.concatenate([on[1:], [False]]) | np.concatenate([[False], on[:-1]])


def _longest_still(x: np.ndarray, where: np.ndarray) -> int:
    """Longest run of identical consecutive samples inside ``where``."""
    same = (x[1:] == x[:-1]) & where[1:] & where[:-1]
    return _longest_run(same) + 1 if x.size > 1 else 1


def find_rails(v, low: float, high: float) -> tuple[Rail, ...]:
    """The rails the record's samples pile on (empty when it is not clipped).

    Parameters
    ----------
    v : array_like
        The raw samples (V).
    low, high : float
        The record's lower and upper state levels (V).

    Returns
    -------
    tuple of Rail
        At most one per side.

    Examples
    --------
    A flat plateau on an 8-bit instrument sits on one or two codes; it is not a rail:

    >>> import numpy as np
    >>> code = 0.04
    >>> v = np.round(np.tile(np.r_[np.zeros(50), np.full(50, 3.0)], 20) / code) * code
    >>> find_rails(v, 0.0, 3.0)
    ()
    """
    x = _subset(np.asarray(v, dtype=np.float64))
    q = code_step(x)
    out = []
    for side, sign, lvl, oth in (("top", 1.0, high, low), ("bottom", -1.0, low, high)):
        found = _top_rail(sign * x, sign * lvl, sign * oth, q)
        if found is None:
            continue
        evidence, settled = found
        level = float(x.max() if side == "top" else x.min())
        share = float(np.count_nonzero(x == level)) / x.size
        out.append(Rail(side, level, share, sign * settled, evidence))
    return tuple(out)

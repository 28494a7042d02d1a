"""Monte Carlo over the tolerances of a designed divider.

Every toleranced part of a :class:`~taumatch.design.divider.DividerDesign` is drawn at
once for a chunk of draws (numpy, seeded :class:`numpy.random.Generator`): each top
resistor and each grading capacitor separately, the shunt part(s), the fixed bottom
capacitor, the instrument's R and C, the cable and the earth capacitance.  Parts are
drawn uniformly within ± tolerance (the default) or normally with tolerance = 3σ (not
truncated, so 0.27 % of draws fall outside the band).

The same vectorised formulas give the worst-case corners a design is sized from
(:func:`corners`, :func:`needed_trim`).

Results: the distribution of the dc ratio error, of the untrimmed high-frequency gain
error (trimmer left at its nominal setting), the trimmer range a chosen yield needs, and
the yield of the design's (or a chosen) trimmer range.  Progress is reported through an
optional callback ``progress(done, total)``; the library never prints.

Examples
--------
>>> from taumatch.design.divider import design_divider
>>> d = design_divider(10, instrument="1M||15p", cable_capacitance=90e-12)
>>> mc = monte_carlo(d, draws=2000, seed=1)
>>> mc.yield_of_trimmer
1.0
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..units import format_quantity
from . import hv

__all__ = [
    "DEFAULT_CHUNK",
    "DEFAULT_YIELD",
    "MonteCarloResult",
    "corners",
    "hf_gain_ratio",
    "monte_carlo",
    "needed_trim",
]

DEFAULT_YIELD = 0.99
DEFAULT_CHUNK = 20000


def _graded_k(dc_ratio, c1, ce):
    return hv.hf_capacitance_ratio(dc_ratio, c1, ce)


def needed_trim(arm, r1, r2, c1_fixed, c2_fixed, ce, iterations: int = 40):
    """Trimmer capacitance (F) that makes the divider's hf gain equal its dc gain.

    Vectorised over every argument.  ``c2_fixed`` is all fixed bottom capacitance
    (instrument, cable, fixed capacitor); ``c1_fixed`` the fixed top capacitance.

    Parameters
    ----------
    arm : {"bottom", "top"}
        Where the trimmer sits (it adds to that arm's capacitance).
    r1, r2 : array_like
        Top and effective bottom resistance, ohm.
    c1_fixed, c2_fixed : array_like
        Fixed capacitance of each arm, F.
    ce : array_like
        Total capacitance of the top arm to earth, F (0 for a lumped divider).
    iterations : int
        Fixed-point iterations for the top arm with ``ce > 0``.
    """
    r1, r2 = np.asarray(r1, float), np.asarray(r2, float)
    dc = (r1 + r2) / r2
    if arm == "bottom":
        return _graded_k(dc, c1_fixed, ce) * c1_fixed - c2_fixed
    c1 = np.asarray(c2_fixed, float) / (dc - 1.0)
    if np.any(np.asarray(ce) > 0):
        for _ in range(iterations):
            c1 = c2_fixed / _graded_k(dc, c1, ce)
    return c1 - c1_fixed


def hf_gain_ratio(r1, r2, c1, c2, ce):
    """High-frequency gain of the (graded) divider relative to its own dc gain (vectorised).

    ``(R1 + R2)/R2 / (cosh α + (C2/C1) sinh α/α)`` with ``α = √(Ce/C1)``; for ``Ce = 0``
    the lumped ``(R1 + R2)/R2 · C1/(C1 + C2)``.  Arguments in ohm and F.
    """
    dc = (r1 + r2) / r2
    a = np.sqrt(np.asarray(ce, float) / c1)
    with np.errstate(invalid="ignore", divide="ignore"):
        shc = np.where(a > 1e-4, np.sinh(a) / np.where(a > 1e-4, a, 1.0), 1.0 + a * a / 6)
    return dc / (np.cosh(a) + (c2 / c1) * shc)


def corners(tol):
    """Every sign combination of the toleranced quantities: ``{name: 1 ± tol}`` arrays.

    Used for the worst-case trimmer range and ratio error of a design (``2**len(tol)``
    corners; each quantity enters the compensation monotonically, so the corners bound it).
    """
    names = list(tol)
    signs = np.array(list(itertools.product((-1.0, 1.0), repeat=len(names))))
    return {n: 1.0 + signs[:, i] * tol[n] for i, n in enumerate(names)}


def _spread(rng, distribution, tol, shape):
    if tol == 0:
        return np.ones(shape)
    if distribution == "uniform":
        return 1.0 + tol * rng.uniform(-1.0, 1.0, shape)
    return 1.0 + (tol / 3.0) * rng.standard_normal(shape)


def _stats(x: np.ndarray, y: float) -> dict:
    lo, hi = np.quantile(x, [(1 - y) / 2, (1 + y) / 2])
    return {"mean": float(np.mean(x)), "std": float(np.std(x, ddof=1)), "min": float(np.min(x)),
            "max": float(np.max(x)), "low": float(lo), "high": float(hi)}


@dataclass(frozen=True)
class MonteCarloResult:
    """Outcome of :func:`monte_carlo` (relative errors are fractions, capacitances in F).

    ``ratio_error`` (dc ratio / target − 1), ``hf_error`` (untrimmed hf gain / the draw's own
    dc gain − 1) and ``trim`` (trimmer value each draw needs) are the per-draw samples.  In
    :meth:`to_dict` the gains are also given against the target: ``lf_gain_error`` (dc gain ·
    target − 1) and ``untrimmed_hf_gain_error`` (hf gain · target − 1).  Each statistics dict
    holds mean, std, min, max and the central interval (``low``, ``high``) that contains
    ``yield_target`` of the draws.
    """

    draws: int
    seed: int | None
    distribution: str
    yield_target: float
    trimmer: tuple
    ratio_error: np.ndarray
    hf_error: np.ndarray
    trim: np.ndarray

    def __post_init__(self):
        if not 0 < self.yield_target < 1:
            raise InputError(f"yield: must be between 0 and 1 (e.g. 0.99), "
                             f"got {self.yield_target!r}")

    @property
    def yield_of_trimmer(self) -> float:
        """Fraction of draws whose needed trim lies within :attr:`trimmer` (min, max)."""
        lo, hi = self.trimmer
        return float(np.mean((self.trim >= lo) & (self.trim <= hi)))

    @property
    def trimmer_for_yield(self) -> tuple:
        """Central trimmer range (F) that covers ``yield_target`` of the draws."""
        lo, hi = np.quantile(self.trim, [(1 - self.yield_target) / 2, (1 + self.yield_target) / 2])
        return float(lo), float(hi)

    def yield_within(self, band: float) -> float:
        """Fraction of draws whose dc ratio error is within ± ``band`` (fraction)."""
        return float(np.mean(np.abs(self.ratio_error) <= band))

    def standard_error(self, p: float) -> float:
        """Binomial standard error of a fraction ``p`` estimated from these draws."""
        return math.sqrt(max(p * (1 - p), 1e-300) / self.draws)

    def to_dict(self) -> dict:
        y = self.yield_target
        lo, hi = self.trimmer_for_yield
        return {"draws": self.draws, "seed": self.seed, "distribution": self.distribution,
                "yield_target": y,
                "ratio_error": _stats(self.ratio_error, y),
                "lf_gain_error": _stats(1.0 / (1.0 + self.ratio_error) - 1.0, y),
                "untrimmed_hf_error": _stats(self.hf_error, y),
                "untrimmed_hf_gain_error": _stats((1.0 + self.hf_error) / (1.0 + self.ratio_error)
                                                  - 1.0, y),
                "trimmer_needed": _stats(self.trim, y),
                "trimmer_for_yield": {"min": lo, "max": hi},
                "trimmer": {"min": self.trimmer[0], "max": self.trimmer[1]},
                "yield_of_trimmer": self.yield_of_trimmer,
                "yield_standard_error": self.standard_error(self.yield_of_trimmer)}

    def summary(self) -> str:
        q = format_quantity
        d = self.to_dict()
        r, h = d["ratio_error"], d["untrimmed_hf_error"]
        lo, hi = self.trimmer_for_yield
        return "\n".join([
            f"Monte Carlo, {self.draws} draws ({self.distribution}, seed {self.seed}):",
            f"  dc ratio error: mean {r['mean']:+.3%}, std {r['std']:.3%}, "
            f"{_pct(self.yield_target)} within [{r['low']:+.3%}, {r['high']:+.3%}]",
            f"  untrimmed hf gain error: std {h['std']:.2%}, {_pct(self.yield_target)} within "
            f"[{h['low']:+.2%}, {h['high']:+.2%}]",
            f"  trimmer for {_pct(self.yield_target)} yield: {q(lo, 'F')} to {q(hi, 'F')}",
            f"  yield of the trimmer {q(self.trimmer[0], 'F')} to {q(self.trimmer[1], 'F')}: "
            f"{self.yield_of_trimmer:.3%} (± {self.standard_error(self.yield_of_trimmer):.2%})",
        ])

    def plot(self, ax=None):
        from ..plot.design import plot_monte_carlo

        return plot_monte_carlo(self, ax=ax)


def _pct(y: float) -> str:
    return f"{100 * y:g} %"


def monte_carlo(design, draws: int = 100000, seed: int | None = None,
                yield_target: float = DEFAULT_YIELD, trimmer: tuple | None = None,
                distribution: str | None = None, chunk: int = DEFAULT_CHUNK,
                progress=None) -> MonteCarloResult:
    """Draw every toleranced part of ``design`` ``draws`` times.

    Parameters
    ----------
    design : DividerDesign
        The divider (its ``tolerances`` dict gives each part's relative tolerance).
    draws : int
        Number of draws.
    seed : int, optional
        Seed for :func:`numpy.random.default_rng` (``None``: fresh entropy).
    yield_target : float
        Wanted yield (fraction), for the trimmer range.
    trimmer : (float, float), optional
        Trimmer range (F) whose yield is reported; default the design's.
    distribution : {"uniform", "normal"}, optional
        Default: the one recorded in the design.
    chunk : int
        Draws per vectorised block.
    progress : callable, optional
        Called as ``progress(done, total)`` after each block.
    """
    draws = int(draws)
    if draws < 2:
        raise InputError(f"draws: need at least 2, got {draws!r}")
    if not 0 < float(yield_target) < 1:
        raise InputError(f"yield: must be between 0 and 1 (e.g. 0.99), got {yield_target!r}")
    dist = distribution or design.tolerances.get("distribution", "uniform")
    if dist not in ("uniform", "normal"):
        raise InputError(f"distribution: must be 'uniform' or 'normal', got {dist!r}")
    if int(chunk) < 1:
        raise InputError(f"chunk: must be positive, got {chunk!r}")
    trimmer = (design.trimmer_min, design.trimmer_max) if trimmer is None else tuple(trimmer)
    if len(trimmer) != 2 or not trimmer[0] <= trimmer[1]:
        raise InputError(f"trimmer: expected (min, max) with min <= max, got {trimmer!r}")
    rng = np.random.default_rng(seed)
    tol = design.tolerances
    ratio_err = np.empty(draws)
    hf_err = np.empty(draws)
    trim = np.empty(draws)
    top_r = np.asarray(design.top_resistors)
    top_c = np.asarray(design.top_capacitors)
    sh = np.asarray(design.shunt_parts)
    arm, t0 = design.trimmer_arm, design.trimmer_nominal
    done = 0
    while done < draws:
        m = min(int(chunk), draws - done)
        r1 = (top_r * _spread(rng, dist, tol["r1"], (m, len(top_r)))).sum(axis=1)
        ri = design.instrument_r * _spread(rng, dist, tol["ri"], m)
        if len(sh):
            parts = sh * _spread(rng, dist, tol["rsh"], (m, len(sh)))
            rsh = (1.0 / (1.0 / parts).sum(axis=1) if design.shunt_kind == "parallel"
                   else parts.sum(axis=1))
            r2 = rsh * ri / (rsh + ri)
        else:
            r2 = ri
        if len(top_c):
            c1f = 1.0 / (1.0 / (top_c * _spread(rng, dist, tol["c1"], (m, len(top_c))))).sum(axis=1)
        else:
            c1f = np.zeros(m)
        c2f = (design.instrument_c * _spread(rng, dist, tol["ci"], m)
               + design.cable_c * _spread(rng, dist, tol["cable"], m))
        for c in design.bottom_capacitors:
            c2f = c2f + c * _spread(rng, dist, tol["cb"], m)
        ce = design.earth_c * _spread(rng, dist, tol["ce"], m)
        sl = slice(done, done + m)
        dc = (r1 + r2) / r2
        ratio_err[sl] = dc / design.target_ratio - 1.0
        trim[sl] = needed_trim(arm, r1, r2, c1f, c2f, ce)
        c1 = c1f + (t0 if arm == "top" else 0.0)
        c2 = c2f + (t0 if arm == "bottom" else 0.0)
        hf_err[sl] = hf_gain_ratio(r1, r2, c1, c2, ce) - 1.0
        done += m
        if progress is not None:
            progress(done, draws)
    return MonteCarloResult(draws=draws, seed=seed, distribution=dist,
                            yield_target=float(yield_target), trimmer=trimmer,
                            ratio_error=ratio_err, hf_error=hf_err, trim=trim)

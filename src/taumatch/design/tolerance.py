"""Monte Carlo over the tolerances of a designed divider.

Every toleranced part of a :class:`~taumatch.design.divider.DividerDesign` is drawn at
once for a chunk of draws (numpy, seeded :class:`numpy.random.Generator`): each top
resistor and each grading capacitor separately, the shunt part(s), the fixed bottom
capacitor, the instrument's R and C, the cable and the earth capacitance.  Parts are
drawn uniformly within ± tolerance (the default) or normally with tolerance = 3σ (not
truncated, so 0.27 % of draws fall outside the band).

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

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..units import format_quantity
from .divider import DividerDesign, _hf_gain, needed_trim

__all__ = ["monte_carlo", "MonteCarloResult", "DEFAULT_YIELD", "DEFAULT_CHUNK"]

DEFAULT_YIELD = 0.99
DEFAULT_CHUNK = 20000


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

    ``ratio_error``, ``hf_error`` and ``trim`` are the per-draw samples; the statistics
    dicts hold mean, std, min, max and the central interval (``low``, ``high``) that
    contains ``yield_target`` of the draws.
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
            raise InputError(f"yield: must be between 0 and 1 (e.g. 0.99), got {self.yield_target!r}")

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
                "untrimmed_hf_error": _stats(self.hf_error, y),
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
            f"{y_pct(self.yield_target)} within [{r['low']:+.3%}, {r['high']:+.3%}]",
            f"  untrimmed hf gain error: std {h['std']:.2%}, {y_pct(self.yield_target)} within "
            f"[{h['low']:+.2%}, {h['high']:+.2%}]",
            f"  trimmer for {y_pct(self.yield_target)} yield: {q(lo, 'F')} to {q(hi, 'F')}",
            f"  yield of the trimmer {q(self.trimmer[0], 'F')} to {q(self.trimmer[1], 'F')}: "
            f"{self.yield_of_trimmer:.3%} (± {self.standard_error(self.yield_of_trimmer):.2%})",
        ])

    def plot(self, ax=None):
        from ..plot.design import plot_monte_carlo

        return plot_monte_carlo(self, ax=ax)


def y_pct(y: float) -> str:
    return f"{100 * y:g} %"


def monte_carlo(design: DividerDesign, draws: int = 100000, seed: int | None = None,
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
        hf_err[sl] = _hf_gain(r1, r2, c1, c2, ce) - 1.0
        done += m
        if progress is not None:
            progress(done, draws)
    return MonteCarloResult(draws=draws, seed=seed, distribution=dist,
                            yield_target=float(yield_target), trimmer=trimmer,
                            ratio_error=ratio_err, hf_error=hf_err, trim=trim)

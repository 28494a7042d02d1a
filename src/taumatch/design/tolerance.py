"""Monte Carlo over the tolerances of a designed divider.

The tolerances of a divider's parts (:class:`Tolerances`), their worst-case corners
(:func:`corners`, which the design sizes its trimmer from) and the Monte Carlo over them.

Every toleranced part of a :class:`~taumatch.design.divider.DividerDesign` is drawn at
once for a block of draws (numpy, seeded :class:`numpy.random.Generator`): each tip
resistor and each grading capacitor separately, the shunt resistor(s), the fixed shunt
capacitor, the instrument's R and C, the cable and the earth capacitance.  Parts are
drawn uniformly within ± tolerance (the default) or normally with tolerance = 3σ (not
truncated, so 0.27 % of draws fall outside the band).  Each draw's compensation is the
two-arm model's (:class:`taumatch.chain.two_arm.TwoArm`, vectorised).

Results: the distribution of the DC ratio error, of the high/low-frequency gain error with
the trimmer left at its nominal setting, the trimmer range a chosen yield needs, and the
yield of the design's (or a chosen) trimmer range.  Progress is reported through an
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

from ..chain.two_arm import TwoArm
from ..errors import InputError
from ..units import format_quantity
from .ranges import MAX_PART_DRAWS, check

__all__ = [
    "BLOCK_NUMBERS",
    "DEFAULT_CHUNK",
    "DEFAULT_YIELD",
    "DISTRIBUTIONS",
    "MonteCarloResult",
    "Tolerances",
    "corners",
    "monte_carlo",
    "toleranced_parts",
]

DEFAULT_YIELD = 0.99
#: Draws per vectorised block ...
DEFAULT_CHUNK = 20_000
#: ... and at most this many random numbers in one block (about 8 MB each array).
BLOCK_NUMBERS = 1_000_000
DISTRIBUTIONS = ("uniform", "normal")


@dataclass(frozen=True)
class Tolerances:
    """Relative tolerances of a divider's parts (fractions: 0.01 = ±1 %, each 0 to 0.5).

    Parameters
    ----------
    resistors : float
        Our resistors: the tip string and the shunt resistor(s).
    capacitors : float
        Our fixed capacitors (tip and shunt arm).
    instrument_r : float
        The instrument's input resistance.
    instrument_c : float, optional
        The instrument's input capacitance, also applied to the cable (default
        ``capacitors``).
    stray : float, optional
        The column's earth capacitance (default ``capacitors``).
    distribution : {"uniform", "normal"}
        How the Monte Carlo draws parts: uniformly within ± tolerance, or normally with
        tolerance = 3σ (not truncated, so 0.27 % of draws fall outside the band).
    """

    resistors: float = 0.01
    capacitors: float = 0.05
    instrument_r: float = 0.0
    instrument_c: float | None = None
    stray: float | None = None
    distribution: str = "uniform"

    def __post_init__(self):
        for name in ("resistors", "capacitors", "instrument_r", "instrument_c", "stray"):
            value = getattr(self, name)
            if value is not None:
                object.__setattr__(self, name, check("tolerance", value, label=f"tolerance {name}"))
        if self.distribution not in DISTRIBUTIONS:
            raise InputError(f"distribution: must be one of {', '.join(DISTRIBUTIONS)}, "
                             f"got {self.distribution!r}")

    def by_quantity(self) -> dict:
        """Tolerance of each quantity the design varies: ``r1`` (tip resistors), ``rsh``
        (shunt resistors), ``ri`` (instrument R), ``c1`` (tip capacitors), ``cb`` (fixed
        shunt capacitors), ``ci`` (instrument C), ``cable``, ``ce`` (earth capacitance)."""
        ci = self.capacitors if self.instrument_c is None else self.instrument_c
        return {"r1": self.resistors, "rsh": self.resistors, "ri": self.instrument_r,
                "c1": self.capacitors, "cb": self.capacitors, "ci": ci, "cable": ci,
                "ce": self.capacitors if self.stray is None else self.stray}

    def to_dict(self) -> dict:
        return {**self.by_quantity(), "distribution": self.distribution}


def corners(tol: dict) -> dict:
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


@dataclass(frozen=True, eq=False)
class MonteCarloResult:
    """Outcome of :func:`monte_carlo` (relative errors are fractions, capacitances in F).

    ``ratio_error`` (DC ratio / target − 1), ``hf_dc_error`` (the high/low-frequency gain
    error of each draw with the trimmer left at its nominal setting) and ``trim`` (the trimmer
    value each draw needs) are the per-draw samples.  :meth:`to_dict` also gives both gains
    against the target, ``dc_gain_vs_target`` (DC gain · target − 1) and
    ``hf_gain_vs_target`` (HF gain · target − 1).  Each statistics dict holds mean, std, min,
    max and the central interval (``low``, ``high``) that contains ``yield_target`` of the
    draws.
    """

    draws: int
    seed: int | None
    distribution: str
    yield_target: float
    trimmer: tuple
    ratio_error: np.ndarray
    hf_dc_error: np.ndarray
    trim: np.ndarray

    def __post_init__(self):
        check("yield", self.yield_target, label="yield_target")

    @property
    def yield_of_trimmer(self) -> float:
        """Fraction of draws whose needed trim lies within :attr:`trimmer` (min, max)."""
        lo, hi = self.trimmer
        return float(np.mean((self.trim >= lo) & (self.trim <= hi)))

    @property
    def trimmer_for_yield(self) -> tuple:
        """Central trimmer range [F] that covers ``yield_target`` of the draws."""
        lo, hi = np.quantile(self.trim, [(1 - self.yield_target) / 2, (1 + self.yield_target) / 2])
        return float(lo), float(hi)

    def yield_within(self, band: float) -> float:
        """Fraction of draws whose DC ratio error is within ± ``band`` (fraction)."""
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
                "hf_dc_error": _stats(self.hf_dc_error, y),
                "dc_gain_vs_target": _stats(1.0 / (1.0 + self.ratio_error) - 1.0, y),
                "hf_gain_vs_target": _stats((1.0 + self.hf_dc_error) / (1.0 + self.ratio_error)
                                            - 1.0, y),
                "trimmer_needed": _stats(self.trim, y),
                "trimmer_for_yield": {"min": lo, "max": hi},
                "trimmer": {"min": self.trimmer[0], "max": self.trimmer[1]},
                "yield_of_trimmer": self.yield_of_trimmer,
                "yield_standard_error": self.standard_error(self.yield_of_trimmer)}

    def summary(self) -> str:
        q = format_quantity
        r, h = _stats(self.ratio_error, self.yield_target), _stats(self.hf_dc_error,
                                                                    self.yield_target)
        lo, hi = self.trimmer_for_yield
        return "\n".join([
            f"Monte Carlo, {self.draws} draws ({self.distribution}, seed {self.seed}):",
            (f"  DC ratio error: mean {r['mean']:+.3%}, std {r['std']:.3%}, "
             f"{_pct(self.yield_target)} within [{r['low']:+.3%}, {r['high']:+.3%}]"),
            (f"  high/low-frequency gain error, trimmer at nominal: std {h['std']:.2%}, "
             f"{_pct(self.yield_target)} within [{h['low']:+.2%}, {h['high']:+.2%}]"),
            f"  trimmer for {_pct(self.yield_target)} yield: {q(lo, 'F')} to {q(hi, 'F')}",
            (f"  yield of the trimmer {q(self.trimmer[0], 'F')} to {q(self.trimmer[1], 'F')}: "
             f"{self.yield_of_trimmer:.3%} (± {self.standard_error(self.yield_of_trimmer):.2%})"),
        ])

    def plot(self, ax=None):
        from ..plot.design import plot_monte_carlo

        return plot_monte_carlo(self, ax=ax)


def _pct(y: float) -> str:
    return f"{100 * y:g} %"


def toleranced_parts(design) -> int:
    """Random numbers one Monte Carlo draw of ``design`` takes (one per toleranced part)."""
    return (len(design.tip_resistors) + len(design.tip_capacitors) + len(design.shunt_resistors)
            + len(design.shunt_capacitors) + 4)


def monte_carlo(design, draws: int = 100000, seed: int | None = None,
                yield_target: float = DEFAULT_YIELD, trimmer: tuple | None = None,
                distribution: str | None = None, chunk: int = DEFAULT_CHUNK,
                progress=None) -> MonteCarloResult:
    """Draw every toleranced part of ``design`` ``draws`` times.

    Each draw's compensation comes from :class:`taumatch.chain.two_arm.TwoArm`, vectorised
    over a block of draws.

    Parameters
    ----------
    design : DividerDesign
        The divider (its ``tolerances`` give each part's relative tolerance).
    draws : int
        Number of draws: 2 to :data:`taumatch.design.ranges.MAX_DRAWS`, and draws times
        toleranced parts at most :data:`taumatch.design.ranges.MAX_PART_DRAWS`.
    seed : int, optional
        Seed for :func:`numpy.random.default_rng`, 0 to 2**32 − 1 (``None``: fresh entropy).
    yield_target : float
        Wanted yield (fraction), for the trimmer range.
    trimmer : (float, float), optional
        Trimmer range [F] whose yield is reported; default the design's.
    distribution : {"uniform", "normal"}, optional
        Default: the one in the design's tolerances.
    chunk : int
        Draws per vectorised block (fewer when a block would hold more than
        :data:`BLOCK_NUMBERS` random numbers).
    progress : callable, optional
        Called as ``progress(done, total)`` after each block.
    """
    draws = check("draws", draws, integer=True)
    if draws < 2:
        raise InputError(f"draws: need at least 2, got {draws!r}")
    parts = toleranced_parts(design)
    if draws * parts > MAX_PART_DRAWS:
        raise InputError(f"draws: {draws} draws of {parts} toleranced parts is beyond "
                         f"{MAX_PART_DRAWS:.0e} part-draws (about a second of random numbers); "
                         f"use at most {MAX_PART_DRAWS // parts} draws for this design")
    if seed is not None:
        seed = check("seed", seed, integer=True)
    yield_target = check("yield", yield_target, label="yield_target")
    dist = distribution or design.tolerances.distribution
    if dist not in DISTRIBUTIONS:
        raise InputError(f"distribution: must be one of {', '.join(DISTRIBUTIONS)}, got {dist!r}")
    chunk = int(chunk)
    if chunk < 1:
        raise InputError(f"chunk: must be positive, got {chunk!r}")
    tr = design.trimmer
    trimmer = (tr.minimum, tr.maximum) if trimmer is None else tuple(trimmer)
    if len(trimmer) != 2 or not trimmer[0] <= trimmer[1]:
        raise InputError(f"trimmer: expected (min, max) with min <= max, got {trimmer!r}")
    rng = np.random.default_rng(seed)
    tol = design.tolerances.by_quantity()
    ratio_err = np.empty(draws)
    hf_err = np.empty(draws)
    trim = np.empty(draws)
    tip_r = np.asarray(design.tip_resistors)
    tip_c = np.asarray(design.tip_capacitors)
    sh = np.asarray(design.shunt_resistors)
    arm, t0 = tr.arm, tr.nominal
    block = max(1, min(chunk, BLOCK_NUMBERS // parts))
    done = 0
    while done < draws:
        m = min(block, draws - done)
        r1 = (tip_r * _spread(rng, dist, tol["r1"], (m, len(tip_r)))).sum(axis=1)
        ri = design.instrument.r * _spread(rng, dist, tol["ri"], m)
        if len(sh):
            each = sh * _spread(rng, dist, tol["rsh"], (m, len(sh)))
            rsh = (1.0 / (1.0 / each).sum(axis=1) if design.shunt_resistors_kind == "parallel"
                   else each.sum(axis=1))
            r2 = rsh * ri / (rsh + ri)
        else:
            r2 = ri
        if len(tip_c):
            c1f = 1.0 / (1.0 / (tip_c * _spread(rng, dist, tol["c1"], (m, len(tip_c))))).sum(axis=1)
        else:
            c1f = np.zeros(m)
        c2f = (design.instrument.c * _spread(rng, dist, tol["ci"], m)
               + design.cable_c * _spread(rng, dist, tol["cable"], m))
        for c in design.shunt_capacitors:
            c2f = c2f + c * _spread(rng, dist, tol["cb"], m)
        ce = design.earth_c * _spread(rng, dist, tol["ce"], m)
        sl = slice(done, done + m)
        untrimmed = TwoArm(r1, c1f, r2, c2f, ce)
        ratio_err[sl] = untrimmed.ratio / design.target_ratio - 1.0
        trim[sl] = untrimmed.change(arm)
        at_nominal = untrimmed.with_values(**({"c1": c1f + t0} if arm == "tip"
                                              else {"c2": c2f + t0}))
        hf_err[sl] = at_nominal.hf_dc_error
        done += m
        if progress is not None:
            progress(done, draws)
    return MonteCarloResult(draws=draws, seed=seed, distribution=dist,
                            yield_target=float(yield_target), trimmer=trimmer,
                            ratio_error=ratio_err, hf_dc_error=hf_err, trim=trim)

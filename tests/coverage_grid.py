"""Do a diagnosis's stated intervals cover the truth at their stated confidence?

Captures come from the textbook compensated-divider formulas (Millman & Taub; Boylestad;
shared/CHECKS.md) through :mod:`divider_synth` — an independent generator, not the fit's
model — with a linear source edge, noise and, in half the cells, 8-bit codes.  Each case
draws its truth the way the diagnosis's tolerances describe it: tip and shunt resistance
uniformly within ±2 % of 9 MΩ and 1 MΩ, the shunt capacitance uniformly within ±50 % of
110 pF (the defaults a diagnosis without a chain assumes), and is diagnosed as a user
without a chain would (no option).  A case counts a hit for a figure when the stated
95 % interval holds the truth; a refusal is no hit and no miss (no number was claimed).

Run ``python tests/coverage_grid.py [seeds]`` for the full table (about two minutes);
``tests/test_budget.py`` runs a seeded sample of it.
"""

from __future__ import annotations

import itertools
import sys

import numpy as np
from divider_synth import c1_for_error, capture
from scipy.stats import binom

ERRORS = (-0.20, -0.05, 0.05, 0.20)
PERIODS = (1e-3, 1e-4)
SAMPLES = (2500, 200)          # samples per period: edges resolved or not
NOISE = (2e-3, 10e-3)           # V rms on a 0.5 V swing
BITS = (0, 8)
FIGURES = ("hf_dc_error", "shunt_change", "tip_change")
CONFIDENCE = 0.95


def truth_for(error, rng):
    r1 = 9e6 * (1 + rng.uniform(-0.02, 0.02))
    r2 = 1e6 * (1 + rng.uniform(-0.02, 0.02))
    c2 = 110e-12 * (1 + rng.uniform(-0.5, 0.5))
    c1 = c1_for_error(error, r1, r2, c2)
    return {"r1": r1, "r2": r2, "c1": c1, "c2": c2,
            "hf_dc_error": error, "shunt_change": r1 * c1 / r2 - c2,
            "tip_change": r2 * c2 / r1 - c1}


def run_case(period, samples, noise, bits, error, seed, within_u=False):
    """One diagnosed case: ``{figure: hit}`` (with ``within_u``, ``{figure: (hit, the truth
    within one standard uncertainty)}``) or None when the diagnosis refused."""
    from taumatch import ComputationError
    from taumatch.diagnosis import diagnose

    rng = np.random.default_rng(seed)
    tr = truth_for(error, rng)
    dt = period / samples
    ramp = rng.choice([0.0, 0.5, 2.0]) * 1e-6 * (period / 1e-3) ** 0.5
    t, v = capture(tr["c1"], r1=tr["r1"], r2=tr["r2"], c2=tr["c2"], period=period, dt=dt,
                   periods=10, noise=noise, bits=bits, seed=int(rng.integers(2**31)),
                   start=float(rng.uniform(0, period)), ramp=float(ramp))
    try:
        d = diagnose((t, v))
    except ComputationError:
        return None
    if within_u:
        return {k: (d.budgets[k].covers(tr[k]),
                    abs(d.budgets[k].value - tr[k]) <= d.budgets[k].stderr) for k in FIGURES}
    return {k: d.budgets[k].covers(tr[k]) for k in FIGURES}


def lower_bound(n: int, p: float = CONFIDENCE, alpha: float = 0.01) -> int:
    """Fewest hits out of n that a coverage of p gives with probability 1 − alpha."""
    return int(binom.ppf(alpha, n, p))


def grid(seeds: int = 3, cells=None):
    """Yield (cell, figure, hits, total) over the grid."""
    cells = cells or list(itertools.product(PERIODS, SAMPLES, NOISE, BITS))
    for cell in cells:
        counts = {k: [0, 0, 0] for k in FIGURES}
        refused = 0
        for error, s in itertools.product(ERRORS, range(seeds)):
            seed = hash((cell, error, s)) % 2**31
            out = run_case(*cell, error, seed, within_u=True)
            if out is None:
                refused += 1
                continue
            for k, (hit, near) in out.items():
                counts[k][0] += hit
                counts[k][1] += 1
                counts[k][2] += near
        yield cell, counts, refused


def main(seeds: int = 3) -> None:
    print(f"{'period':>8} {'S/period':>8} {'noise':>6} {'bits':>4} | "
          + " | ".join(f"{k:>14}" for k in FIGURES) + " | refused")
    totals = {k: [0, 0, 0] for k in FIGURES}
    for (period, samples, noise, bits), counts, refused in grid(seeds):
        row = []
        for k in FIGURES:
            h, n, near = counts[k]
            totals[k][0] += h
            totals[k][1] += n
            totals[k][2] += near
            row.append(f"{h:>3}/{n:<3} ≥{lower_bound(n):>3}" if n else f"{'-':>14}")
        print(f"{period:>8.0e} {samples:>8} {noise:>6.0e} {bits:>4} | " + " | ".join(row)
              + f" | {refused}")
    print("all, 95 % intervals: " + ", ".join(
        f"{k} {h}/{n} (bound {lower_bound(n)}, {100 * h / n:.1f} %)"
        for k, (h, n, _) in totals.items() if n))
    print("all, within one standard uncertainty (68 % for a normal term, 58 % for a "
          "rectangular one): " + ", ".join(f"{k} {near}/{n} ({100 * near / n:.0f} %)"
                                           for k, (_, n, near) in totals.items() if n))


if __name__ == "__main__":
    sys.path.insert(0, str(__import__("pathlib").Path(__file__).parent))
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 3)

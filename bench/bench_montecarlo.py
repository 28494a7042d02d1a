"""Benchmark: taumatch's divider Monte Carlo against a plain numpy reference, same run.

Both draw 1e5 samples of the same parts (our invented 100:1 scenario: 10 MΩ input,
1 MΩ ∥ 14 pF instrument, 90 pF cable).  The reference is the bare arithmetic in one
unchunked numpy block with no checks, no statistics and no graded-column terms, so the
ratio is the price of chunking, validation and the general (graded) formulas.

Run:  PYTHONPATH=src python bench/bench_montecarlo.py
"""

from __future__ import annotations


import numpy as np

from taumatch.design.column import Column
from taumatch.design.divider import design_divider
from taumatch.design.rating import Rating
from taumatch.design.tolerance import monte_carlo
from timing import best_of  # noqa: E402 - bench/ is on sys.path when run as a script

DRAWS = 100_000


def reference(d, draws, seed):
    """Plain numpy: same parts drawn uniformly, lumped ratio error, trim, hf error."""
    rng = np.random.default_rng(seed)
    t = d.tolerances.by_quantity()
    n_tip, n_sh = len(d.tip_resistors), len(d.shunt_resistors)
    tip = np.asarray(d.tip_resistors) * (1 + t["r1"] * rng.uniform(-1, 1, (draws, n_tip)))
    r1 = tip.sum(axis=1)
    sh = np.asarray(d.shunt_resistors) * (1 + t["rsh"] * rng.uniform(-1, 1, (draws, n_sh)))
    rsh = sh.sum(axis=1) if d.shunt_resistors_kind == "series" else 1 / (1 / sh).sum(axis=1)
    ri = d.instrument.r
    r2 = rsh * ri / (rsh + ri)
    c1 = d.c1_fixed * (1 + t["c1"] * rng.uniform(-1, 1, draws))
    c2 = (d.instrument.c * (1 + t["ci"] * rng.uniform(-1, 1, draws))
          + d.cable_c * (1 + t["cable"] * rng.uniform(-1, 1, draws))
          + sum(d.shunt_capacitors) * (1 + t["cb"] * rng.uniform(-1, 1, draws)))
    dc = (r1 + r2) / r2
    ratio_err = dc / d.target_ratio - 1
    trim = c1 * r1 / r2 - c2
    hf = dc * c1 / (c1 + c2 + d.trimmer.nominal) - 1
    return ratio_err, trim, hf


def main():
    d = design_divider(100, 10e6, "1M||14p", 90e-12)
    t_ours = best_of(lambda: monte_carlo(d, DRAWS, seed=1), 5)[0]
    t_ref = best_of(lambda: reference(d, DRAWS, 1), 5)[0]
    print(f"divider Monte Carlo, {DRAWS} draws (lumped 100:1 design)")
    print(f"  taumatch.design.tolerance.monte_carlo: {t_ours * 1e3:8.1f} ms")
    print(f"  plain numpy reference:                 {t_ref * 1e3:8.1f} ms")
    print(f"  ratio ours/reference:                  {t_ours / t_ref:8.2f}")
    hv = design_divider(100, 10e6, "1M||14p", 90e-12, rating=Rating(5e3),
                        column=Column.per_section(2e-12, 10))
    t_hv = best_of(lambda: monte_carlo(hv, DRAWS, seed=1), 3)[0]
    print(f"  graded HV column (50 resistors, 10 capacitors per draw): {t_hv * 1e3:.1f} ms "
          f"({t_hv / t_ref:.2f} x the lumped reference)")


if __name__ == "__main__":
    main()

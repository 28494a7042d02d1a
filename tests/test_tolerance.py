"""Monte Carlo over tolerances, checked against distributions known in closed form."""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest

from taumatch.design.column import Column
from taumatch.design.divider import design_divider
from taumatch.design.rating import Rating
from taumatch.design.tolerance import Tolerances, monte_carlo
from taumatch.errors import InputError


def _one_resistor(distribution):
    """11:1 into 1 MΩ: a single 10 MΩ top resistor is the only toleranced part."""
    d = design_divider(11, instrument="1M||14p",
                       tolerances=Tolerances(0.01, 0.0, 0.0, distribution=distribution))
    assert d.tip_resistors == (10e6,) and d.shunt_resistors == ()
    return d


def test_uniform_single_resistor_band_fraction_is_exact():
    """Only R1 varies, uniformly ±1 %: the ratio error (R1/R2)·δ/N is uniform on ±(10/11) %,
    so P(|e| <= b) = b / (0.01·10/11) exactly (own derivation); tolerance 4 binomial SE."""
    d = _one_resistor("uniform")
    mc = monte_carlo(d, draws=40000, seed=12345)
    half = 0.01 * 10 / 11
    assert np.max(np.abs(mc.ratio_error)) <= half * (1 + 1e-12)
    for b in (0.1 * half, 0.5 * half, 0.9 * half):
        p = b / half
        got = mc.yield_within(b)
        assert abs(got - p) <= 4 * math.sqrt(p * (1 - p) / mc.draws)


def test_normal_single_resistor_band_fraction_is_erf():
    """Normal with tolerance = 3σ: P(|e| <= kσ_e) = erf(k/√2) (own derivation)."""
    d = _one_resistor("normal")
    mc = monte_carlo(d, draws=40000, seed=99)
    sigma = 0.01 / 3 * 10 / 11
    for k in (0.5, 1.0, 2.0, 3.0):
        p = math.erf(k / math.sqrt(2))
        got = mc.yield_within(k * sigma)
        assert abs(got - p) <= 4 * math.sqrt(p * (1 - p) / mc.draws) + 1e-12


def test_untrimmed_hf_dc_error_maps_the_tip_capacitor_quantiles():
    """Only C1 varies (uniform ±5 %): hf/dc − 1 = dc·C1/(C1 + C2) − 1 is monotone in C1, so
    its quantiles are the formula at C1's quantiles (Millman & Taub's jump C1/(C1 + C2);
    own derivation of the quantiles)."""
    d = design_divider(11, instrument="1M||14p", cable_capacitance=90e-12,
                       tolerances=Tolerances(0.0, 0.05, 0.0, instrument_c=0.0))
    d = replace(d, shunt_capacitors=())          # leave C1 as the only toleranced part
    mc = monte_carlo(d, draws=40000, seed=5)

    def f(q):
        c1q = d.c1 * (1 + 0.05 * (2 * q - 1))
        return d.ratio * c1q / (c1q + d.c2) - 1

    for q in (0.1, 0.5, 0.9):
        dq = 4 * math.sqrt(q * (1 - q) / mc.draws)   # 4 standard errors of a quantile
        got = float(np.quantile(mc.hf_dc_error, q))
        assert f(q - dq) <= got <= f(q + dq)


def test_worst_case_trimmer_has_full_uniform_yield():
    """Worst-case corners bound every uniform draw, so the design trimmer's yield is 1."""
    d = design_divider(100, 10e6, "1M||14p", 90e-12)
    mc = monte_carlo(d, draws=20000, seed=3)
    assert mc.yield_of_trimmer == 1.0
    lo, hi = mc.trimmer_for_yield
    assert d.trimmer.minimum <= lo <= hi <= d.trimmer.maximum
    # a trimmer covering exactly the 99 % interval yields about 99 %
    mc2 = monte_carlo(d, draws=20000, seed=4, trimmer=(lo, hi))
    assert abs(mc2.yield_of_trimmer - 0.99) <= 4 * math.sqrt(0.99 * 0.01 / 20000)


def test_graded_column_and_tip_arm_run():
    """Uniform draws stay inside the worst-case corners, so the design's trimmer covers all
    of them, with the column's earth capacitance and with the trimmer in the tip arm."""
    d = design_divider(100, 10e6, "1M||14p", 90e-12, rating=Rating(5e3),
                       column=Column.per_section(2e-12, 10))
    mc = monte_carlo(d, draws=5000, seed=1)
    assert mc.yield_of_trimmer == 1.0
    assert d.trimmer.minimum <= mc.trim.min() and mc.trim.max() <= d.trimmer.maximum
    d2 = design_divider(10, instrument="1M||15p", cable_capacitance=90e-12, arm="tip")
    mc2 = monte_carlo(d2, draws=5000, seed=1)
    assert mc2.yield_of_trimmer == 1.0


def test_seeded_and_progress():
    d = design_divider(100, 10e6, "1M||14p", 90e-12)
    calls = []
    a = monte_carlo(d, draws=5000, seed=7, chunk=1000, progress=lambda k, n: calls.append((k, n)))
    b = monte_carlo(d, draws=5000, seed=7, chunk=1000)
    assert np.array_equal(a.trim, b.trim)
    assert calls == [(k, 5000) for k in range(1000, 5001, 1000)]
    out = a.to_dict()
    assert set(out) >= {"ratio_error", "hf_dc_error", "dc_gain_vs_target",
                        "hf_gain_vs_target", "trimmer_for_yield", "yield_of_trimmer"}
    assert "Monte Carlo" in a.summary()


def test_bad_input():
    d = design_divider(10, instrument="1M||15p")
    with pytest.raises(InputError, match="draws"):
        monte_carlo(d, draws=1)
    with pytest.raises(InputError, match="yield"):
        monte_carlo(d, draws=10, yield_target=1.5)
    with pytest.raises(InputError, match="trimmer"):
        monte_carlo(d, draws=10, trimmer=(5e-12, 1e-12))
    with pytest.raises(InputError, match=r"seed: must be at least 0"):
        monte_carlo(d, draws=10, seed=-1)
    with pytest.raises(InputError, match=r"draws: must be at least 0 and at most 1000000"):
        monte_carlo(d, draws=10**7)


def test_draw_limit_scales_with_the_parts():
    """A long string draws fewer times within the same budget of random numbers, and a
    block never holds more than BLOCK_NUMBERS of them (memory bounded)."""
    from taumatch.design.ranges import MAX_PART_DRAWS
    from taumatch.design.tolerance import BLOCK_NUMBERS, toleranced_parts

    d = design_divider(100, 10e6, "1M||14p", 90e-12, rating=Rating(1e6, limiting_voltage=400))
    parts = toleranced_parts(d)
    assert parts > 1000
    with pytest.raises(InputError, match=f"at most {MAX_PART_DRAWS // parts} draws"):
        monte_carlo(d, draws=MAX_PART_DRAWS // parts + 1)
    sizes = []
    monte_carlo(d, draws=1000, seed=1, progress=lambda k, n: sizes.append(k))
    assert np.diff([0] + sizes).max() * parts <= BLOCK_NUMBERS

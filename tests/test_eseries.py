"""Preferred-number series against IEC 60063:2015 and the geometric rounding rule."""

from __future__ import annotations

import itertools

import numpy as np
import pytest

from taumatch.design import eseries
from taumatch.errors import InputError

# IEC 60063:2015, as listed in shared/CHECKS.md.
IEC_E12 = "1.0 1.2 1.5 1.8 2.2 2.7 3.3 3.9 4.7 5.6 6.8 8.2"
IEC_E24 = ("1.0 1.1 1.2 1.3 1.5 1.6 1.8 2.0 2.2 2.4 2.7 3.0 3.3 3.6 3.9 4.3 4.7 5.1 5.6 6.2 "
           "6.8 7.5 8.2 9.1")


def _rule(n: int) -> np.ndarray:
    """10**(k/n) rounded to three significant figures (IEC 60063 rule for E48 and above)."""
    return np.round(10.0 ** (np.arange(n) / n), 2)


def test_e12_matches_iec_60063():
    """IEC 60063:2015 E12 list (CHECKS.md)."""
    assert eseries.SERIES["E12"] == tuple(float(x) for x in IEC_E12.split())


def test_e24_matches_iec_60063():
    """IEC 60063:2015 E24 list (CHECKS.md)."""
    assert eseries.SERIES["E24"] == tuple(float(x) for x in IEC_E24.split())


def test_e24_departs_from_rounding_where_the_standard_says():
    """CHECKS.md: E24 differs from rounding 10^(k/24) at 2.7 3.0 3.3 3.6 3.9 4.3 4.7 8.2."""
    rounded = np.round(10.0 ** (np.arange(24) / 24), 1)
    table = np.array(eseries.SERIES["E24"])
    differ = table[~np.isclose(table, rounded)]
    assert list(differ) == [2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2]


@pytest.mark.parametrize("name,n", [("E48", 48), ("E96", 96)])
def test_e48_e96_follow_the_rounding_rule(name, n):
    """IEC 60063: E48/E96 are 10^(k/n) rounded to three significant figures (CHECKS.md)."""
    assert np.allclose(eseries.SERIES[name], _rule(n), atol=1e-9)


def test_e192_follows_the_rule_except_920():
    """E192: the rule with one published exception, 9.20 for 9.19 (CHECKS.md, medium confidence)."""
    table = np.array(eseries.SERIES["E192"])
    rule = _rule(192)
    differ = np.flatnonzero(~np.isclose(table, rule))
    assert len(differ) == 1
    assert rule[differ[0]] == pytest.approx(9.19) and table[differ[0]] == pytest.approx(9.20)


@pytest.mark.parametrize("small,big", [("E3", "E6"), ("E6", "E12"), ("E12", "E24"),
                                       ("E48", "E96"), ("E96", "E192")])
def test_series_nest(small, big):
    """Each series is every other value of the next (IEC 60063 construction)."""
    assert eseries.SERIES[small] == eseries.SERIES[big][::2]


def test_nearest_and_bracket_against_brute_force():
    """Nearest in log distance, checked by brute force over a seeded sample of targets."""
    rng = np.random.default_rng(7)
    grid = eseries.values("E24", 1e-3, 1e9)
    for target in 10.0 ** rng.uniform(-2, 8, 200):
        want = grid[np.argmin(np.abs(np.log(grid / target)))]
        assert eseries.nearest(target, "E24") == pytest.approx(want, rel=1e-12)
        lo, hi = eseries.bracket(target, "E24")
        assert lo <= target <= hi
        assert not np.any((grid > lo * (1 + 1e-9)) & (grid < hi * (1 - 1e-9)))


def test_values_are_clean_decimals():
    """4.7 kΩ is exactly 4700.0 (no binary noise from mantissa * 10**d)."""
    assert 4700.0 in eseries.values("E12", 1e3, 1e4)
    assert eseries.nearest(12e-12, "E12") == 12e-12


def test_best_pairs_against_brute_force():
    """Vectorised search equals a plain double loop over the same candidate values."""
    target = 7777.0
    grid = eseries.values("E24", target / 1000, target * 1000)
    best = None
    for a, b in itertools.product(grid, grid):
        for kind, v in (("series", a + b), ("parallel", a * b / (a + b))):
            err = abs(v / target - 1)
            if best is None or err < best[0] - 1e-15:
                best = (err, kind, v)
    got = eseries.best_pairs(target, "E24", count=1)[0]
    assert abs(got.error) == pytest.approx(best[0], rel=1e-9, abs=1e-15)
    assert got.value == pytest.approx(best[2], rel=1e-12)


def test_best_pairs_hit_an_exact_sum():
    """1.5 k + 33 = 1533 exactly (E12), found as the best series pair."""
    got = eseries.best_pairs(1533.0, "E12", count=1, kinds=("series",))[0]
    assert got.parts == (1500.0, 33.0) and got.error == pytest.approx(0.0, abs=1e-15)


def test_bad_input():
    with pytest.raises(InputError, match="series"):
        eseries.nearest(1e3, "E7")
    with pytest.raises(InputError, match="target"):
        eseries.nearest(-1.0, "E12")
    with pytest.raises(InputError, match="kinds"):
        eseries.best_pairs(1e3, "E12", kinds=("diagonal",))

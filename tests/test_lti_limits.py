"""The limits of the lti core, each stated and each answered right or refused with the reason.

Issue 12's classes for expressions and closed forms: deep nesting, high pole orders, values
beyond the float range, responses at extreme times; and issue 10's audit of relative
thresholds (a sum or a partial-fraction pair that lost a term for being small beside another).
No numpy warning may be raised on any of these paths (warnings are errors in these tests).
"""

import warnings

import numpy as np
import pytest
from scipy import special, stats

from taumatch.errors import ComputationError, InputError
from taumatch.lti import Rational
from taumatch.lti.expr import MAX_DEGREE, MAX_LENGTH, MAX_NESTING, parse_expression


@pytest.fixture(autouse=True)
def _warnings_are_errors():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        yield


def test_nesting_limit_is_stated_and_enforced():
    """100 levels parse; 101 and the 190 that raised RecursionError are refused in one line."""
    ok = Rational.from_expr("1/" + "(" * MAX_NESTING + "s+1" + ")" * MAX_NESTING)
    assert ok.poles.tolist() == [-1.0]
    for depth in (MAX_NESTING + 1, 190, 4000):
        with pytest.raises(InputError, match=f"nesting deeper than {MAX_NESTING} levels"):
            Rational.from_expr("(" * depth + "s+1" + ")" * depth)
    with pytest.raises(InputError, match="nesting deeper"):
        Rational.from_expr("-" * 3000 + "s")
    with pytest.raises(InputError, match=f"limit of {MAX_LENGTH}"):
        Rational.from_expr("s+" * MAX_LENGTH + "s")


def test_degree_limit_is_stated_and_enforced():
    with pytest.raises(InputError, match=f"degree 256 is beyond the limit of {MAX_DEGREE}"):
        Rational.from_expr("1/((s+1)^64)^4")


def test_pole_of_order_192_against_the_gamma_distribution():
    """1/(s+1)^m has impulse response t^(m−1)e^(−t)/(m−1)! (the gamma density) and step response
    P(m, t), the regularised incomplete gamma function (own derivation; reference values from
    scipy.special.gammainc and scipy.stats.gamma).  m = 192 is beyond the 170 where factorials
    overflow a float."""
    H = Rational.from_expr("1/((s+1)^64)^3")
    t = np.array([100.0, 192.0, 250.0])
    np.testing.assert_allclose(H.step(t), special.gammainc(192, t), rtol=1e-9, atol=1e-13)
    np.testing.assert_allclose(H.impulse(t), stats.gamma.pdf(t, 192), rtol=1e-9, atol=1e-16)
    assert all(c.passed for c in H.checks())


def test_order_64_pole_at_1e9_answered_in_a_normalised_variable():
    """(1e9/(s+1e9))^64: its partial-fraction coefficients (up to 1e576) do not fit a float in
    rad/s; the responses come from H(w·x) and are right (gamma distribution, as above)."""
    H = Rational.from_expr("(1e9/(s+1e9))^64")
    t = np.array([10e-9, 64e-9, 100e-9])
    np.testing.assert_allclose(H.step(t), special.gammainc(64, t * 1e9), rtol=1e-9, atol=1e-13)
    np.testing.assert_allclose(H.impulse(t), 1e9 * stats.gamma.pdf(t * 1e9, 64), rtol=1e-9)
    assert all(c.passed for c in H.checks())
    assert "τ = 1e+09·t" in H.formula("step")


def test_values_beyond_the_float_range_are_refused_with_the_reason():
    with pytest.raises(InputError, match="outside the float range"):
        Rational.from_expr("(1e200)^2")
    with pytest.raises(InputError, match=r"about 1e-576 .*scale it"):
        Rational.from_expr("1/(s+1e9)^64")
    with pytest.raises(InputError, match="root of magnitude about .* = 1e600"):
        Rational.from_expr("1/(s*1e-300*1e-300+1)")
    with pytest.raises(InputError, match="number 1e400 is out of range"):
        Rational.from_expr("1/(s+1e400)")


def test_coefficients_that_overflow_before_root_finding_are_exact():
    """The arithmetic is exact on the numbers as typed, so intermediate coefficients beyond the
    float range do not matter: (1e200 s + 1e200)^2/(1e200 s + 2e200)^2 is ((s+1)/(s+2))^2
    (sympy agrees: the common factor cancels exactly)."""
    H = Rational.from_expr("(1e200*s + 1e200)^2/(1e200*s + 2e200)^2")
    assert sorted(H.zeros.real) == [-1.0, -1.0] and sorted(H.poles.real) == [-2.0, -2.0]
    assert H.gain == 1.0
    assert Rational.from_expr("(1e200)^2/(1e200)^2").gain == 1.0


@pytest.mark.parametrize("expr, kind, want", [
    ("1/(s+1)^3", "impulse", 0.0),    # decays to 0: was nan (inf·0)
    ("1/(s+1)^3", "step", 1.0),       # settles at H(0)
    ("1/(s^2+s+1)^3", "step", 1.0),
    ("1/(s+1e-9)^2", "step", 1e18),   # H(0) = 1e18
])
def test_response_at_1e308_is_its_limit(expr, kind, want):
    H = Rational.from_expr(expr)
    y = (H.step if kind == "step" else H.impulse)(np.array([1e308]))[0]
    assert y == pytest.approx(want, rel=1e-12, abs=0.0)


def test_responses_that_cannot_be_evaluated_say_why():
    with pytest.raises(ComputationError, match="grows without bound"):
        Rational.from_expr("1/(s-1)").impulse([1e308])
    with pytest.raises(ComputationError, match="phase of the oscillation"):
        Rational.from_expr("1/(s^2+1)").impulse([1e300])


def test_sum_keeps_every_term_at_any_spread():
    """A + B of functions with roots spread from 1 to 1e11 rad/s against the definition of the
    sum (each term evaluated on its own).  The former rule, coefficients below 1e-14 of the
    largest are zero, lost terms in 25 of these 300 sums."""
    rng = np.random.default_rng(3)
    w = np.geomspace(0.1, 1e12, 40)
    for _ in range(300):
        a = [-10.0 ** rng.uniform(0, 11, rng.integers(n0, n1)) for n0, n1 in ((0, 5), (1, 6))]
        b = [-10.0 ** rng.uniform(0, 11, rng.integers(n0, n1)) for n0, n1 in ((0, 5), (1, 6))]
        A = Rational(a[0], a[1], 10 ** rng.uniform(-3, 3))
        B = Rational(b[0], b[1], 10 ** rng.uniform(-3, 3))
        ref = A(1j * w) + B(1j * w)
        assert np.max(np.abs((A + B)(1j * w) - ref) / np.abs(ref)) <= 1e-8


def test_partial_fraction_pair_keeps_a_small_real_part():
    """(1e-3·s + 1e16)/(s² + 2e7 s + 1e16): the pair's numerator 2·Re K·s + … has Re K = 5e-4
    beside |K·p| ≈ 5e15; the round trip to a Rational keeps the s term (the former rule dropped
    it, being below 1e-13 of the largest coefficient)."""
    H = Rational.from_expr("(1e-3*s + 1e16)/(s^2 + 2e7*s + 1e16)")
    back = H.partial_fractions().to_rational()
    assert back.zeros.size == 1 and back.zeros[0].real == pytest.approx(-1e19, rel=1e-9)
    w = np.geomspace(1e6, 1e12, 30)
    np.testing.assert_allclose(back(1j * w), H(1j * w), rtol=1e-9)


def test_text_check_is_part_of_the_checks_and_survives_arithmetic_only_as_text():
    H = Rational.from_expr("1/(s+1)")
    assert H.checks()[0].name == "expression as typed vs H(jw)" and H.checks()[0].passed
    assert (H * 2).expression is None  # a product is no longer the text
    assert parse_expression("s - s").to_rational().gain == 0.0


def test_square_wave_order_limit_is_stated():
    from taumatch.lti.responses import MAX_SQUARE_ORDER

    with pytest.raises(InputError, match=f"order up to {MAX_SQUARE_ORDER}"):
        Rational.from_expr(f"1/(s+1)^{MAX_SQUARE_ORDER + 1}").square([0.1], period=10.0)

"""Worked textbook values held against the closed-form responses of taumatch.lti.

Sources are named per test; values from shared/CHECKS.md.
"""

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from taumatch import InputError
from taumatch.lti import Rational


def _crossing(f, level, a, b):
    return brentq(lambda x: f(np.array([x]))[0] - level, a, b, xtol=1e-15, rtol=1e-14)


def test_nilsson_riedel_double_pole():
    """1/((s+1)²(s+2)) = 1/(s+2) − 1/(s+1) + 1/(s+1)² (Nilsson & Riedel, "Electric Circuits")."""
    pf = Rational.from_expr("1/((s+1)^2*(s+2))").partial_fractions()
    got = {(t.pole.real, t.order): t.coefficient.real for t in pf.terms}
    assert got == pytest.approx({(-2.0, 1): 1.0, (-1.0, 1): -1.0, (-1.0, 2): 1.0}, abs=1e-14)


def test_nilsson_riedel_repeated_complex_pair():
    """768/(s²+6s+25)²: at −3+4j the coefficient of 1/(s−p)² is −12, of 1/(s−p) is −3j
    (Nilsson & Riedel worked example)."""
    pf = Rational.from_expr("768/(s^2+6s+25)^2").partial_fractions()
    got = {(t.pole, t.order): t.coefficient for t in pf.terms}
    assert got[(-3 + 4j, 2)] == pytest.approx(-12, abs=1e-12)
    assert got[(-3 + 4j, 1)] == pytest.approx(-3j, abs=1e-12)
    assert got[(-3 - 4j, 1)] == pytest.approx(3j, abs=1e-12)
    # the time function in real form: t e^{-3t}(-24 cos 4t) + e^{-3t}(6 sin 4t)
    H = Rational.from_expr("768/(s^2+6s+25)^2")
    tt = np.linspace(0, 3, 31)
    want = np.exp(-3 * tt) * (6 * np.sin(4 * tt) - 24 * tt * np.cos(4 * tt))
    np.testing.assert_allclose(H.impulse(tt), want, atol=1e-12)


@pytest.mark.parametrize("zeta, overshoot", [(0.3, 37.23), (0.5, 16.30), (0.7, 4.60), (0.707, 4.33)])
def test_second_order_overshoot(zeta, overshoot):
    """Overshoot exp(−ζπ/√(1−ζ²)) (Ogata, "Modern Control Engineering"; Nise)."""
    H = Rational.from_coeffs([1.0], [1.0, 2 * zeta, 1.0])
    tp = math.pi / math.sqrt(1 - zeta**2)
    peak = float(H.step(np.array([tp]))[0])
    assert 100 * (peak - 1) == pytest.approx(overshoot, abs=0.006)
    assert 100 * (peak - 1) == pytest.approx(100 * math.exp(-zeta * math.pi / math.sqrt(1 - zeta**2)),
                                             rel=1e-12)


def test_second_order_zeta_half_times():
    """ζ = 0.5, ω_n = 1: peak time 3.628, 10–90 % rise 1.638, 2 % settling 8.08 (Ogata; CHECKS.md)."""
    H = Rational.from_coeffs([1.0], [1.0, 1.0, 1.0])
    tt = np.linspace(0, 20, 200001)
    y = H.step(tt)
    assert tt[np.argmax(y)] == pytest.approx(3.628, abs=5e-4)
    t10 = _crossing(H.step, 0.1, 0.0, 1.5)
    t90 = _crossing(H.step, 0.9, 1.0, 3.0)
    assert t90 - t10 == pytest.approx(1.638, abs=5e-4)
    outside = np.flatnonzero(np.abs(y - 1) > 0.02)
    assert tt[outside[-1]] == pytest.approx(8.08, abs=5e-3)


def test_rc_rise_time():
    """R = 1 kΩ, C = 10 pF: τ = 10 ns, 10–90 % = ln 9·τ = 21.97 ns (own derivation; CHECKS.md)."""
    H = Rational.from_expr("1/(1 + s*1k*10p)")
    t10 = _crossing(H.step, 0.1, 0, 1e-7)
    t90 = _crossing(H.step, 0.9, 0, 1e-7)
    assert t90 - t10 == pytest.approx(21.97e-9, abs=0.005e-9)
    assert t90 - t10 == pytest.approx(math.log(9) * 10e-9, rel=1e-9)
    f3 = brentq(lambda f: abs(H.freqresp(np.array([f]))[0]) - 1 / math.sqrt(2), 1e6, 1e8)
    assert f3 == pytest.approx(15.92e6, rel=5e-4)


def _divider(r1, c1, r2, c2):
    """Two-arm divider Z2/(Z1 + Z2), Z = R/(1 + sRC), as an expression in factors."""
    return Rational.from_expr(f"({r2}/(1+s*{r2}*{c2})) / ({r1}/(1+s*{r1}*{c1}) + {r2}/(1+s*{r2}*{c2}))")


@pytest.mark.parametrize("c1, jump, tau", [(10e-12, 0.0833, 108e-6), (15e-12, 0.120, 112.5e-6)])
def test_miscompensated_divider_step(c1, jump, tau):
    """Millman & Taub / Boylestad: v(0+) = C1/(C1+C2), v(∞) = R2/(R1+R2), τ = (R1‖R2)(C1+C2).
    R1 = 9 MΩ, R2 = 1 MΩ, C2 = 110 pF (CHECKS.md)."""
    H = _divider(9e6, c1, 1e6, 110e-12)
    assert H.step(np.array([0.0]))[0] == pytest.approx(c1 / (c1 + 110e-12), rel=1e-10)
    assert H.step(np.array([0.0]))[0] == pytest.approx(jump, abs=5e-4)
    assert H.dc_gain == pytest.approx(0.1, rel=1e-12)
    assert H.hf_gain == pytest.approx(c1 / (c1 + 110e-12), rel=1e-12)
    (pole,) = H.poles
    assert -1 / pole.real == pytest.approx(0.9e6 * (c1 + 110e-12), rel=1e-10)
    assert -1 / pole.real == pytest.approx(tau, rel=1e-3)
    tt = np.linspace(0, 1e-3, 11)
    want = 0.1 + (c1 / (c1 + 110e-12) - 0.1) * np.exp(-tt / (0.9e6 * (c1 + 110e-12)))
    np.testing.assert_allclose(H.step(tt), want, rtol=1e-10)


def test_compensated_divider_is_flat():
    """R1·C1 = R2·C2 gives H = R2/(R1+R2) at all frequencies: the pole and zero cancel
    (Millman & Taub). C1 = 110p/9 = 12.22 pF."""
    H = _divider(9e6, 110e-12 / 9, 1e6, 110e-12)
    f = np.geomspace(1, 1e9, 50)
    np.testing.assert_allclose(np.abs(H.freqresp(f)), 0.1, rtol=1e-9)
    np.testing.assert_allclose(H.step(np.linspace(0, 1e-3, 21)), 0.1, rtol=1e-9)
    assert all(c.passed for c in H.checks())


def test_square_wave_matches_brute_force_sum():
    """Closed-form periodic steady state vs a brute-force sum of shifted step responses
    (superposition; own derivation), including a repeated pole and a slow pole (τ ≫ T)."""
    for expr in ["(s+2)/((s+1)^2*(s+3))", "1/(1+s*5)", "(s^2+s+4)/((s^2+0.4s+9)^2*(s+1))"]:
        H = Rational.from_expr(expr)
        T, D = 4.0, 0.3
        tt = np.linspace(0, T, 41)
        got = H.square(tt, T, D, low=-1.0, high=2.0)
        n = np.arange(0, 400)[:, None]
        brute = -1.0 * H.dc_gain + 3.0 * (H.step(tt + n * T) - H.step(tt + n * T - D * T)).sum(axis=0)
        np.testing.assert_allclose(got, brute, atol=1e-9)


def test_improper_reports_delta_terms():
    """(s²+3)/(s+1) = s − 1 + 4/(s+1): impulse response 4e^{−t} plus δ′ − δ (own derivation)."""
    H = Rational.from_expr("(s^2+3)/(s+1)")
    pf = H.partial_fractions()
    np.testing.assert_allclose(pf.direct, [1.0, -1.0], atol=1e-14)
    np.testing.assert_allclose(H.impulse(np.array([0.0, 1.0])), [4.0, 4 * math.exp(-1)], rtol=1e-14)
    assert "δ'(t)" in H.formula("impulse")


def test_formula_real_form_of_pair():
    text = Rational.from_expr("1/(s^2+2s+5)").formula("impulse")
    assert text == "y(t) = [e^(-1·t)·(0.5·sin(2·t))]·u(t)"  # e^{-t} sin(2t)/2 (own derivation)


@pytest.mark.parametrize("bad", ["s+", "1/0", "__import__('os')", "s^0.5", "(s+1", "", "1/(s-s)",
                                 "exp(s)", "s;1"])
def test_parser_rejects(bad):
    with pytest.raises(InputError):
        Rational.from_expr(bad)


def test_parser_keeps_factors_exactly():
    """Roots of written factors are taken from the factors themselves: a triple pole stays exact."""
    H = Rational.from_expr("1/((s+1e3)^3*(s^2+2s+5))")
    assert sorted(H.poles.tolist(), key=lambda z: (z.real, z.imag)) == [
        -1000, -1000, -1000, -1 - 2j, -1 + 2j]


def test_arithmetic():
    a = Rational.from_expr("1/(s+1)")
    b = Rational.from_expr("2/(s+3)")
    tot = a + b  # (3s + 5)/((s+1)(s+3))
    assert tot.zeros[0].real == pytest.approx(-5 / 3, rel=1e-14)
    assert (a * b).gain == 2.0
    fb = a.feedback(1.0)  # 1/(s+2)
    assert fb.poles[0].real == pytest.approx(-2.0, rel=1e-14)
    assert (a / b).zeros[0].real == pytest.approx(-3.0)
    s = np.array([0.3j, 2 + 1j])
    np.testing.assert_allclose((a - b)(s), a(s) - b(s), rtol=1e-13)

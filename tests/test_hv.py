"""High-voltage column: distributed RC response, ladder, step, grading, ratings, cautions."""

from __future__ import annotations

import math

import numpy as np
import pytest

from taumatch.design import hv
from taumatch.errors import InputError
from taumatch.safety import cautions, is_hazardous

R, CE = 100e6, 10e-12          # CHECKS.md example column
RC = R * CE


def test_response_time_checks_value():
    """100 MΩ with 10 pF → T = R·Ce/6 = 167 µs (Kuffel, Zaengl & Kuffel, from memory; CHECKS.md)."""
    assert hv.response_time_ungraded(R, CE) == pytest.approx(166.7e-6, rel=1e-3)


def test_response_time_is_area_above_step_series():
    """T = ∫(1 − g) dt, integrated numerically over the series (own derivation)."""
    from scipy.integrate import quad

    area, _ = quad(lambda t: 1.0 - float(hv.step_series(t, R, CE)), 0.0, 5 * RC, limit=200,
                   points=[0.01 * RC, 0.1 * RC])
    assert area == pytest.approx(RC / 6, rel=1e-6)


def test_transfer_function_series_gives_one_sixth():
    """sympy series of √x/sinh √x = 1 − x/6 + ..., so T = R·Ce/6 (sympy exact arithmetic)."""
    import sympy as sp

    x = sp.symbols("x", positive=True)
    ser = sp.series(sp.sqrt(x) / sp.sinh(sp.sqrt(x)), x, 0, 2).removeO()
    assert sp.simplify(ser - (1 - x / 6)) == 0
    T = hv.response_time(lambda s: hv.column_response(s, R, CE), RC)
    assert T == pytest.approx(RC / 6, rel=1e-6)


def test_rise_time_ratio():
    """10–90 % ≈ 0.237·R·Ce (CHECKS.md, from memory)."""
    assert hv.rise_time_ungraded(R, CE) / RC == pytest.approx(0.237, abs=6e-4)


def test_step_series_against_numerical_inverse_laplace():
    """g(t) against mpmath's Talbot inversion of H(s)/s (reference library, mpmath)."""
    import mpmath

    mpmath.mp.dps = 30

    def G(s):
        q = mpmath.sqrt(s * RC)
        return q / mpmath.sinh(q) / s

    for tau in (0.02, 0.05, 0.1, 0.25, 0.5, 1.0):
        want = float(mpmath.invertlaplace(G, tau * RC, method="talbot"))
        assert float(hv.step_series(tau * RC, R, CE)) == pytest.approx(want, abs=1e-9)


def test_step_series_two_forms_agree():
    """The theta-function form and its Poisson dual are equal (own derivation)."""
    tau = np.linspace(0.05, 0.6, 23)
    k = np.arange(1, 200)
    direct = 1 + 2 * np.sum((-1.0) ** k * np.exp(-(k * np.pi) ** 2 * tau[:, None]), axis=1)
    assert np.allclose(hv.step_series(tau * RC, R, CE), direct, atol=1e-13)


def test_ladder_converges_to_distributed_line():
    """N-section ladder → √(sRCe)/sinh √(sRCe) as N grows (own derivation: lumped limit)."""
    r2 = 1e3
    f = np.logspace(1, 5, 30)
    s = 2j * np.pi * f
    exact = hv.divider_column_response(s, R, 0.0, r2, 0.0, CE)
    errs = [np.max(np.abs(hv.ladder_response(s, R, 0.0, r2, 0.0, CE, n) - exact)) * (R + r2) / r2
            for n in (10, 40, 160)]
    assert errs[0] > errs[1] > errs[2]
    assert errs[2] < 2e-4
    # and into a small bottom arm the line is the normalised textbook form
    norm = exact * (R + r2) / r2
    assert np.allclose(norm, hv.column_response(s, R + r2, CE), atol=2e-4)


def test_ladder_step_against_series_and_scipy():
    """Ladder modes vs the distributed step (large N) and vs scipy.signal (small N)."""
    from scipy import signal

    r2 = 1e3
    t = np.linspace(0.02, 1.5, 40) * RC
    big = hv.ladder_step(t, R, 0.0, r2, 0.0, CE, 300) * (R + r2) / r2
    assert np.allclose(big, hv.step_series(t, R + r2, CE), atol=2e-3)

    n = 5
    G, C, bg, bc = hv._ladder_mna(R, 2e-12, r2, 50e-12, CE, n)
    Ci = np.linalg.inv(C)
    A, B = -Ci @ G, (Ci @ bg)[:, None]
    # Output y = v_n, with v = x + C^-1 bc u (the capacitive feed-through, jump at t = 0+).
    A_ss, B_ss = A, B + A @ (Ci @ bc)[:, None]
    c = np.zeros((1, n))
    c[0, -1] = 1.0
    d = (Ci @ bc)[-1]
    sys = signal.StateSpace(A_ss, B_ss, c, [[d]])
    tt = np.linspace(0, 3e-3, 200)
    _, y = signal.step(sys, T=tt)
    got = hv.ladder_step(tt, R, 2e-12, r2, 50e-12, CE, n)
    assert np.allclose(got[1:], y[1:], atol=1e-9 + 1e-6 * np.max(np.abs(y)))


def test_ladder_rational_through_lti():
    """Ladder as an lti Rational matches the ABCD cascade and the modal step (taumatch.lti)."""
    lti = pytest.importorskip("taumatch.lti")
    assert lti
    r1, c1, r2, c2, n = 9.9e6, 5e-12, 1e5, 480e-12, 6
    H = hv.ladder_rational(r1, c1, r2, c2, 3e-12, n)
    f = np.logspace(0, 8, 25)
    assert np.allclose(H.freqresp(f), hv.ladder_response(2j * np.pi * f, r1, c1, r2, c2, 3e-12, n),
                       rtol=1e-6, atol=1e-12)
    assert H.dc_gain == pytest.approx(r2 / (r1 + r2), rel=1e-9)
    t = np.linspace(1e-7, 5e-3, 50)
    assert np.allclose(H.step(t), hv.ladder_step(t, r1, c1, r2, c2, 3e-12, n), atol=1e-9)


def test_grading_midpoint_checks_value():
    """Ce/Cs = 1 → midpoint at 0.443 of V (own derivation; CHECKS.md)."""
    assert float(hv.grading_distribution(0.5, 1.0)) == pytest.approx(0.443, abs=5e-4)
    assert float(hv.grading_distribution(0.5, 0.0)) == 0.5


def test_grading_distribution_solves_line_equation():
    """v'' = α² v, v(0) = 0, v(1) = 1 solved by sympy dsolve (sympy exact arithmetic)."""
    import sympy as sp

    x = sp.symbols("x")
    v = sp.Function("v")
    a2 = sp.Rational(7, 3)
    sol = sp.dsolve(sp.Eq(v(x).diff(x, 2), a2 * v(x)), v(x), ics={v(0): 0, v(1): 1}).rhs
    for xv in (0.1, 0.37, 0.5, 0.9):
        assert float(hv.grading_distribution(xv, 7 / 3)) == pytest.approx(
            float(sol.subs(x, xv)), rel=1e-12)


def test_grading_capacitance_meets_its_limit():
    cs = hv.grading_capacitance(20e-12, 0.01)
    assert hv.midpoint_error(20e-12 / cs) == pytest.approx(0.01, rel=1e-9)
    # small-α expansion: error ≈ α²/8 (own derivation), so Cs ≈ Ce/(8·limit)
    assert cs == pytest.approx(20e-12 / 0.08, rel=0.02)


def test_hf_ratio_compensates_graded_column():
    """With C2/C1 from hf_capacitance_ratio the line's hf gain equals its dc gain."""
    r1, r2, c1, ce = 99e6, 1e6, 200e-12, 20e-12
    k = float(hv.hf_capacitance_ratio((r1 + r2) / r2, c1, ce))
    h = hv.divider_column_response(np.array([2j * np.pi * 1e12]), r1, c1, r2, k * c1, ce)
    assert abs(h[0]) == pytest.approx(r2 / (r1 + r2), rel=1e-6)
    assert float(hv.hf_capacitance_ratio(100.0, c1, 0.0)) == pytest.approx(99.0)


def test_column_capacitance_thin_wire_limit():
    """Isolated thin wire: C = 2πε0 L/(ln(2L/a) − 1) (Howe's average-potential method,
    own derivation; agrees with the asymptotic 2πε0L/Λ·(1 + (1 − ln 2)/Λ) found in
    Jackson, Classical Electrodynamics, from memory)."""
    for ratio in (1e4, 1e6):
        a = 1.0 / ratio
        want = 2 * math.pi * hv.EPS0 / (math.log(2 / a) - 1)
        got = hv.column_capacitance_geometry(1.0, 2 * a, base_height=math.inf)
        assert got == pytest.approx(want, rel=0.01)
    # a plane underneath adds capacitance
    assert hv.column_capacitance_geometry(1.0, 0.05) > hv.column_capacitance_geometry(
        1.0, 0.05, base_height=math.inf)


def test_dissipation_and_stored_energy_checks_values():
    """10 kV on 100 MΩ = 1 W; 100 pF at 10 kV = 5 mJ (CHECKS.md, common practice)."""
    assert hv.dissipation(10e3, 100e6) == pytest.approx(1.0)
    assert hv.stored_energy(100e-12, 10e3) == pytest.approx(5e-3)


def test_string_count_shares_voltage_with_margin():
    for v, lim, m in ((5e3, 1.6e3, 0.5), (10e3, 350.0, 0.8), (100.0, 200.0, 0.5)):
        n = hv.string_count(v, lim, m)
        assert v / n <= m * lim * (1 + 1e-12)
        assert n == 1 or v / (n - 1) > m * lim
    # power: 10 kV on 100 MΩ = 1 W, 0.25 W parts at half rating → 8 parts
    n = hv.string_count(10e3, 10e3, 0.5, resistance=100e6, power_rating=0.25)
    assert 1.0 / n <= 0.125 and 1.0 / (n - 1) > 0.125
    with pytest.raises(InputError, match="margin"):
        hv.string_count(1e3, 100.0, margin=1.5)


def test_cautions_threshold():
    """30 V rms / 60 V dc (IEC 61010 family): present above, absent below."""
    assert cautions(40.0) == [] and not is_hazardous(40.0)
    assert cautions(59.0, "dc") == []
    assert cautions(61.0, "dc") and cautions(43.0, "ac")
    text = " ".join(cautions(5e3, elements=7, element_voltage=700.0, limiting_voltage=1.6e3))
    for word in ("IEC 60664-1", "IEC 61010-031", "IEC 61010-2-030", "short circuit", "Clamp",
                 "derate", "licensed practice", "shorted"):
        assert word in text
    with pytest.raises(InputError, match="kind"):
        cautions(100.0, "rf")

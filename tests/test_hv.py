"""High-voltage columns: distributed RC response, the ladder of sections, step, grading,
ratings and cautions."""

from __future__ import annotations

import math

import numpy as np
import pytest

from taumatch.chain.two_arm import TwoArm
from taumatch.design import column, geometry, grading, rating
from taumatch.design.ladder import ladder_rational, ladder_response, ladder_shunt_change
from taumatch.errors import InputError
from taumatch.safety import cautions, is_hazardous

R, CE = 100e6, 10e-12          # CHECKS.md example column
RC = R * CE


def test_response_time_checks_value():
    """100 MΩ with 10 pF → T = R·Ce/6 = 167 µs (Kuffel, Zaengl & Kuffel, from memory;
    CHECKS.md)."""
    assert column.response_time_ungraded(R, CE) == pytest.approx(166.7e-6, rel=1e-3)


def test_response_time_is_area_above_step_series():
    """T = ∫(1 − g) dt, integrated numerically over the series (own derivation)."""
    from scipy.integrate import quad

    area, _ = quad(lambda t: 1.0 - float(column.step_series(t, R, CE)), 0.0, 5 * RC, limit=200,
                   points=[0.01 * RC, 0.1 * RC])
    assert area == pytest.approx(RC / 6, rel=1e-6)


def test_transfer_function_series_gives_one_sixth():
    """sympy series of √x/sinh √x = 1 − x/6 + ..., so T = R·Ce/6 (sympy exact arithmetic);
    the two-arm model's closed-form T of the column into a 1 Ω shunt arm gives the same, and
    so does the slope of the normalised response at a low frequency."""
    import sympy as sp

    x = sp.symbols("x", positive=True)
    ser = sp.series(sp.sqrt(x) / sp.sinh(sp.sqrt(x)), x, 0, 2).removeO()
    assert sp.simplify(ser - (1 - x / 6)) == 0
    assert TwoArm(R, 0.0, 1.0, 0.0, CE).response_time == pytest.approx(RC / 6, rel=1e-6)
    w = 1e-5 / RC
    h = column.column_response(np.array([1j * w]), R, CE)[0]
    assert -h.imag / w == pytest.approx(RC / 6, rel=1e-6)


def test_rise_time_ratio():
    """10–90 % ≈ 0.237·R·Ce (CHECKS.md, from memory)."""
    assert column.rise_time_ungraded(R, CE) / RC == pytest.approx(0.237, abs=6e-4)


def test_step_series_against_numerical_inverse_laplace():
    """g(t) against mpmath's Talbot inversion of H(s)/s (reference library, mpmath)."""
    import mpmath

    mpmath.mp.dps = 30

    def G(s):
        q = mpmath.sqrt(s * RC)
        return q / mpmath.sinh(q) / s

    for tau in (0.02, 0.05, 0.1, 0.25, 0.5, 1.0):
        want = float(mpmath.invertlaplace(G, tau * RC, method="talbot"))
        assert float(column.step_series(tau * RC, R, CE)) == pytest.approx(want, abs=1e-9)


def test_step_series_two_forms_agree():
    """The theta-function form and its Poisson dual are equal (own derivation)."""
    tau = np.linspace(0.05, 0.6, 23)
    k = np.arange(1, 200)
    direct = 1 + 2 * np.sum((-1.0) ** k * np.exp(-(k * np.pi) ** 2 * tau[:, None]), axis=1)
    assert np.allclose(column.step_series(tau * RC, R, CE), direct, atol=1e-13)


def test_ladder_converges_to_distributed_line():
    """N-section ladder → the line's ABCD form as N grows, with errors falling as 1/N²
    (own derivation: the lumped limit); into a small shunt arm the line is the normalised
    textbook form √(sRCe)/sinh √(sRCe) (CHECKS.md)."""
    r2 = 1e3
    f = np.logspace(1, 5, 30)
    exact = TwoArm(R, 0.0, r2, 0.0, CE).freqresp(f)
    errs = [np.max(np.abs(ladder_response(f, R, 0.0, r2, 0.0, CE, n) - exact)) * (R + r2) / r2
            for n in (10, 40, 160)]
    assert errs[0] > errs[1] > errs[2] and errs[2] < 2e-4
    assert errs[0] / errs[1] == pytest.approx(16, rel=0.2)
    norm = exact * (R + r2) / r2
    assert np.allclose(norm, column.column_response(2j * np.pi * f, R + r2, CE), atol=2e-4)


def test_ladder_step_against_series_and_scipy():
    """The ladder's transfer function (the network the chain builds, descriptor pencil):
    its step against the distributed step (N = 120) and, for five sections, its frequency
    response and step against scipy.signal on the nodal equations written out here
    (reference library)."""
    from scipy import signal

    r2 = 1e3
    t = np.linspace(0.02, 1.5, 40) * RC
    big = ladder_rational(R, 0.0, r2, 0.0, CE, 120).step(t) * (R + r2) / r2
    assert np.allclose(big, column.step_series(t, R + r2, CE), atol=2e-4)

    n, c1, c2 = 5, 2e-12, 50e-12
    g0, cs, ce = n / R, n * c1, CE / n
    G = np.zeros((n, n))
    C = np.zeros((n, n))
    for k in range(n):  # section k between node k-1 and node k (node -1: the source)
        G[k, k] += g0
        C[k, k] += cs
        if k > 0:
            G[k - 1, k - 1] += g0
            C[k - 1, k - 1] += cs
            G[k, k - 1] = G[k - 1, k] = -g0
            C[k, k - 1] = C[k - 1, k] = -cs
    for k in range(n - 1):
        C[k, k] += ce
    C[-1, -1] += ce / 2 + c2
    G[-1, -1] += 1 / r2
    bg, bc = np.zeros(n), np.zeros(n)
    bg[0], bc[0] = g0, cs
    Ci = np.linalg.inv(C)
    feed = Ci @ bc  # the capacitive feed-through: the jump at t = 0+
    A = -Ci @ G
    sys = signal.StateSpace(A, (Ci @ bg)[:, None] + A @ feed[:, None],
                            np.eye(n)[-1:], [[feed[-1]]])
    H = ladder_rational(R, c1, r2, c2, CE, n)
    w = np.logspace(1, 7, 25)
    _, h = signal.freqresp(sys, w)
    assert np.allclose(H.freqresp(w / (2 * np.pi)), h, rtol=1e-8)
    tt = np.linspace(0, 3e-3, 200)
    _, y = signal.step(sys, T=tt)
    assert np.allclose(H.step(tt)[1:], y[1:], atol=1e-9 + 1e-6 * np.max(np.abs(y)))


def test_ladder_trimmer_compensates_its_high_frequency_limit():
    """With the shunt capacitance from ladder_shunt_change the ladder's gain far above every
    corner equals its DC gain (the cascade's exact response), and with many sections it
    tends to the distributed column's trim (TwoArm)."""
    r1, c1, r2, c2, ce = 99e6, 200e-12, 1e6, 5e-9, 20e-12
    for n in (1, 3, 10):
        c2n = c2 + ladder_shunt_change(r1, c1, r2, c2, ce, n)
        h = ladder_response(np.array([1e12]), r1, c1, r2, c2n, ce, n)
        assert abs(h[0]) == pytest.approx(r2 / (r1 + r2), rel=1e-6)
    many = ladder_shunt_change(r1, c1, r2, c2, ce, 400)
    assert many == pytest.approx(TwoArm(r1, c1, r2, c2, ce).shunt_change, rel=1e-4)


def test_grading_midpoint_checks_value():
    """Ce/Cs = 1 → midpoint at 0.443 of V (own derivation; CHECKS.md)."""
    assert float(grading.grading_distribution(0.5, 1.0)) == pytest.approx(0.443, abs=5e-4)
    assert float(grading.grading_distribution(0.5, 0.0)) == 0.5


def test_grading_distribution_solves_line_equation():
    """v'' = α² v, v(0) = 0, v(1) = 1 solved by sympy dsolve (sympy exact arithmetic)."""
    import sympy as sp

    x = sp.symbols("x")
    v = sp.Function("v")
    a2 = sp.Rational(7, 3)
    sol = sp.dsolve(sp.Eq(v(x).diff(x, 2), a2 * v(x)), v(x), ics={v(0): 0, v(1): 1}).rhs
    for xv in (0.1, 0.37, 0.5, 0.9):
        assert float(grading.grading_distribution(xv, 7 / 3)) == pytest.approx(
            float(sol.subs(x, xv)), rel=1e-12)


def test_grading_capacitance_meets_its_limit():
    cs = grading.grading_capacitance(20e-12, 0.01)
    assert grading.midpoint_error(20e-12 / cs) == pytest.approx(0.01, rel=1e-9)
    # small-α expansion: error ≈ α²/8 (own derivation), so Cs ≈ Ce/(8·limit)
    assert cs == pytest.approx(20e-12 / 0.08, rel=0.02)


def test_column_capacitance_thin_wire_limit():
    """Isolated thin wire: C = 2πε0 L/(ln(2L/a) − 1) (Howe's average-potential method,
    own derivation; agrees with the asymptotic 2πε0L/Λ·(1 + (1 − ln 2)/Λ) found in
    Jackson, Classical Electrodynamics, from memory)."""
    for ratio in (1e4, 1e6):
        a = 1.0 / ratio
        want = 2 * math.pi * geometry.EPS0 / (math.log(2 / a) - 1)
        got = geometry.column_capacitance_geometry(1.0, 2 * a, base_height=math.inf)
        assert got == pytest.approx(want, rel=0.01)
    # a plane underneath adds capacitance
    assert geometry.column_capacitance_geometry(1.0, 0.05) > \
        geometry.column_capacitance_geometry(1.0, 0.05, base_height=math.inf)


def test_dissipation_and_stored_energy_checks_values():
    """10 kV on 100 MΩ = 1 W; 100 pF at 10 kV = 5 mJ (CHECKS.md, common practice)."""
    assert rating.dissipation(10e3, 100e6) == pytest.approx(1.0)
    assert rating.stored_energy(100e-12, 10e3) == pytest.approx(5e-3)


def test_string_count_shares_voltage_with_margin():
    """The fewest resistors that keep each within the margin (common practice, no source)."""
    for v, lim, m in ((5e3, 1.6e3, 0.5), (10e3, 350.0, 0.8), (100.0, 200.0, 0.5)):
        n = rating.string_count(v, lim, m)
        assert v / n <= m * lim * (1 + 1e-12)
        assert n == 1 or v / (n - 1) > m * lim
    # power: 10 kV on 100 MΩ = 1 W, 0.25 W parts at half rating → 8 parts
    n = rating.string_count(10e3, 10e3, 0.5, resistance=100e6, power_rating=0.25)
    assert 1.0 / n <= 0.125 and 1.0 / (n - 1) > 0.125
    with pytest.raises(InputError, match="margin"):
        rating.string_count(1e3, 100.0, margin=1.5)


def test_cautions_threshold():
    """30 V rms / 60 V dc (IEC 61010 family): present above, absent below; a chain's source
    asks the same function (one threshold)."""
    from taumatch.chain import Source

    assert cautions(40.0) == [] and not is_hazardous(40.0)
    assert cautions(59.0, "dc") == []
    assert cautions(61.0, "dc") and cautions(43.0, "ac")
    for amp in (42.0, 43.0, 59.0, 61.0):
        assert Source(0.0, amplitude=amp).is_high_voltage() == is_hazardous(amp, "dc")
        assert Source(0.0, amplitude=amp, period=1e-3).is_high_voltage() == \
            is_hazardous(amp, "ac")
    text = " ".join(cautions(5e3, elements=7, element_voltage=700.0, limiting_voltage=1.6e3))
    for word in ("IEC 60664-1", "IEC 61010-031", "IEC 61010-2-030", "short circuit", "Clamp",
                 "derate", "licensed practice", "shorted"):
        assert word in text
    with pytest.raises(InputError, match="kind"):
        cautions(100.0, "rf")

"""Thresholds of the descriptor pencil and of the band search on ill-scaled problems.

Each circuit is written out here by hand (nodal equations solved in sympy exact rational
arithmetic, roots isolated exactly and evaluated to 40 digits), independently of the
package's own network assembly; the band test's reference is scipy.signal.freqs.

Regressions guarded (each test failed with the fixed thresholds it names and passes with the
scale-aware ones, see network/pencil.py step 3 and network/band.py):

* a 1 Hz pole beside a 10 GHz one behind a 1 mOhm wire: the pencil's scale is then
  1.7e15 rad/s and the fixed snap ``|s| < 1e-12 * w0`` set the 1 Hz pole to exactly 0 (an
  integrator: infinite DC gain);
* a 1 GOhm 10:1 divider 1 % off compensation in the same setting: its pole and zero (about
  16 Hz) were both snapped to 0 and cancelled, so a mis-compensated divider came out flat,
  0.9 % off in DC gain;
* a resonance that the sweep hits within 1e-13 of its centre: ``|H(0)| < 1e-9 * peak`` took
  the DC-coupled response for an AC-coupled one.
"""

from __future__ import annotations

import math

import mpmath
import numpy as np
import pytest
import scipy.signal
import sympy

from taumatch.network import Network, find_bandwidth

S = sympy.Symbol("s")
Q = sympy.Rational


def exact(expr):
    """Numerator and denominator roots of a rational sympy expression in S, exactly isolated
    and evaluated to 40 digits, and a 40-digit evaluator of the expression at f [Hz]."""
    num, den = sympy.fraction(sympy.cancel(sympy.together(expr)))
    pn, pd = sympy.Poly(num, S), sympy.Poly(den, S)
    roots = [[complex(sympy.CRootOf(p, i).evalf(40)) for i in range(p.degree())]
             for p in (pn, pd)]
    fn = sympy.lambdify(S, expr, "mpmath")
    mpmath.mp.dps = 40

    def at(freqs):
        return np.array([complex(fn(2j * mpmath.pi * mpmath.mpf(float(f)))) for f in freqs])

    return roots[0], roots[1], at


def rel(a, b):
    return float(np.max(np.abs(np.asarray(a) - np.asarray(b)) / np.abs(np.asarray(b))))


def rc_pair(rw, r1, c1, r2, c2):
    """Source -> rw -> a -> r1 -> b (c1 to ground) -> r2 -> out (c2 to ground)."""
    return (Network().voltage_source("V", "in").resistor("Rw", "in", "a", rw)
            .resistor("R1", "a", "b", r1).capacitor("C1", "b", "0", c1)
            .resistor("R2", "b", "out", r2).capacitor("C2", "out", "0", c2))


def rc_pair_by_hand(rw, r1, c1, r2, c2):
    """V_out / V of :func:`rc_pair`, from its three nodal equations (Kirchhoff's current law)."""
    a, b, out = sympy.symbols("a b out")
    v = 1
    sol = sympy.solve([(v - a) / rw - (a - b) / r1,
                       (a - b) / r1 - b * S * c1 - (b - out) / r2,
                       (b - out) / r2 - out * S * c2], [a, b, out], dict=True)[0]
    return sympy.simplify(sol[out])


def test_one_hertz_pole_beside_ten_gigahertz_is_kept(roots_match):
    """10 GHz (16 ohm, 1 pF) and 1 Hz (160 GOhm, 1 pF) sections behind a 1 mOhm wire: both
    poles to 1e-9 against sympy exact arithmetic, the DC gain 1 (no pole at the origin)."""
    vals = [Q(1, 1000), Q(16), Q(1, 10**12), Q(16 * 10**10), Q(1, 10**12)]
    zeros, poles, at = exact(rc_pair_by_hand(*vals))
    assert not zeros
    mags = sorted(abs(p) for p in poles)
    assert mags[0] / (2 * math.pi) == pytest.approx(1.0, rel=0.01)  # the spread is there
    assert mags[1] / (2 * math.pi) == pytest.approx(1e10, rel=0.01)
    info = rc_pair(*[float(v) for v in vals]).transfer_info("V", "out")
    roots_match(info.poles, poles, rtol=1e-9)
    assert info.rational.dc_gain == pytest.approx(1.0, rel=1e-12)
    f = np.logspace(-3, 11, 43)
    assert rel(info.rational.freqresp(f), at(f)) < 1e-12


def divider_by_hand(rw, r1, c1, r2, c2, rf, cf):
    """A divider behind a wire, buffered (unity gain) into an rf-cf low-pass."""
    tip, mid = sympy.symbols("tip mid")
    y1, y2 = 1 / r1 + S * c1, 1 / r2 + S * c2
    sol = sympy.solve([(1 - tip) / rw - (tip - mid) * y1, (tip - mid) * y1 - mid * y2],
                      [tip, mid], dict=True)[0]
    return sympy.simplify(sol[mid] / (1 + S * rf * cf))


def divider(rw, r1, c1, r2, c2, rf, cf):
    return (Network().voltage_source("V", "in").resistor("Rw", "in", "tip", rw)
            .resistor("R1", "tip", "mid", r1).capacitor("C1", "tip", "mid", c1)
            .resistor("R2", "mid", "0", r2).capacitor("C2", "mid", "0", c2)
            .vcvs("E", "buf", "0", "mid", "0", 1)
            .resistor("Rf", "buf", "out", rf).capacitor("Cf", "out", "0", cf))


def test_gigaohm_divider_keeps_its_near_cancelling_pair(roots_match):
    """A 9 GOhm / 1 GOhm divider with C1 1 % above compensation (C2 = 10 pF), behind a 1 mOhm
    wire and buffered into a 10 GHz low-pass: the divider's zero (-1/(R1 C1)) and pole
    (-1/((R1 || R2)(C1 + C2))) stay, a pair 1 % apart, not a cancellation (Millman & Taub:
    the compensated divider is the case R1 C1 = R2 C2 only); against sympy exact arithmetic,
    to the 1e-4 the pencil's 1e14 spread of scales leaves (its stated check_error)."""
    c2 = Q(10, 10**12)
    vals = [Q(1, 1000), Q(9 * 10**9), c2 / 9 * Q(101, 100), Q(10**9), c2, Q(16), Q(1, 10**12)]
    zeros, poles, at = exact(divider_by_hand(*vals))
    info = divider(*[float(v) for v in vals]).transfer_info("V", "out")
    assert not info.cancelled
    roots_match(info.zeros, zeros, rtol=1e-4)
    roots_match(info.poles, poles, rtol=1e-4)
    assert info.check_error < 1e-4
    f = np.logspace(-3, 11, 43)
    err = rel(info.rational.freqresp(f), at(f))
    assert err < 1e-4 and err <= 2 * info.check_error
    assert info.rational.dc_gain == pytest.approx(0.1, rel=1e-4)
    # high-frequency gain C1/(C1 + C2) = 1.01/10.01 (the low-pass is far above 1 MHz): the
    # 1 % of over-compensation shows as 0.9 % above the DC gain
    assert abs(at([1e6])[0]) / 0.1 - 1 == pytest.approx(1.01 / 10.01 / 0.1 - 1, rel=1e-6)
    assert abs(info.rational.freqresp([1e6])[0]) / 0.1 - 1 == pytest.approx(
        1.01 / 10.01 / 0.1 - 1, rel=1e-2)


def test_origin_roots_still_exact_at_wide_scale():
    """The other side of the rule: a series capacitor (AC coupling) still gives a zero at
    exactly 0 and a node fed only through capacitors (an integrator) a pole at exactly 0,
    beside 10 GHz features and a 1 mOhm wire; sympy's exact numerator and denominator have
    them (own derivation of the circuits)."""
    ac = (Network().voltage_source("V", "in").resistor("Rw", "in", "a", 1e-3)
          .capacitor("Cs", "a", "b", 1e-6).resistor("R", "b", "0", 50.0)
          .resistor("Rf", "b", "out", 16.0).capacitor("Cf", "out", "0", 1e-12))
    info = ac.transfer_info("V", "out")
    assert np.count_nonzero(info.zeros == 0) == 1
    assert info.rational.dc_gain == 0.0
    integ = (Network().current_source("I", "a").capacitor("C", "a", "0", 1e-9)
             .resistor("R", "a", "out", 16.0).capacitor("Cf", "out", "0", 1e-12))
    info = integ.transfer_info("I", "out")
    assert np.count_nonzero(info.poles == 0) == 1
    # exact: V_out / I = 1 / (s (C + Cf + s R C Cf)), one pole at the origin
    a, out = sympy.symbols("a out")
    c, cf, r = Q(1, 10**9), Q(1, 10**12), Q(16)
    sol = sympy.solve([1 - a * S * c - (a - out) / r, (a - out) / r - out * S * cf],
                      [a, out], dict=True)[0]
    _, poles, _ = exact(sol[out])
    assert sum(1 for p in poles if p == 0) == 1


def test_resonance_on_the_sweep_is_not_ac_coupling():
    """An undamped resonance (zeta = 1e-13) at 1 MHz that the sweep samples at its centre:
    |H| there is 5e12 times the DC gain, and the response is still DC-coupled; the -3 dB
    point against scipy.signal.freqs (for zeta -> 0 it is sqrt(1 + sqrt 2) f0, own
    derivation from |H| = 1/|1 - x^2|)."""
    f_lo, f_hi, ppd = 1e2, 1e10, 40
    n = max(int(ppd * math.log10(f_hi / f_lo)), 20)
    f0 = float(np.logspace(math.log10(f_lo), math.log10(f_hi), n)[160])  # on the grid
    w0, zeta = 2 * math.pi * f0, 1e-13
    num, den = [w0 * w0], [1.0, 2 * zeta * w0, w0 * w0]

    def resp(f):
        return scipy.signal.freqs(num, den, worN=2 * np.pi * np.asarray(f, dtype=float))[1]

    assert abs(resp([f0])[0]) > 1e12  # the sweep's peak
    band = find_bandwidth(resp, f_lo, f_hi, ppd)
    assert not band.ac_coupled and band.lower is None
    assert band.reference == pytest.approx(1.0, rel=1e-12)
    assert band.upper == pytest.approx(math.sqrt(1 + math.sqrt(2)) * f0, rel=1e-9)
    assert abs(abs(resp([band.upper])[0]) - 1 / math.sqrt(2)) < 1e-9


def test_ac_coupled_response_still_found():
    """A high-pass at 1 kHz times a low-pass at 1 MHz: AC-coupled, the reference its peak
    (w2/(w1 + w2) at sqrt(w1 w2), own derivation; the sweep's largest sample), both -3 dB
    points where scipy.signal.freqs crosses reference/sqrt 2 (scipy.optimize.brentq on it),
    within 3e-3 of the corners."""
    from scipy.optimize import brentq

    w1, w2 = 2 * math.pi * 1e3, 2 * math.pi * 1e6
    num, den = [w2, 0.0], np.polymul([1.0, w1], [1.0, w2])

    def resp(f):
        return scipy.signal.freqs(num, den, worN=2 * np.pi * np.asarray(f, dtype=float))[1]

    peak = w2 / (w1 + w2)

    band = find_bandwidth(resp, 1.0, 1e10)

    def g(f):
        return abs(resp([f])[0]) - band.reference / math.sqrt(2)

    assert band.ac_coupled
    assert band.reference == pytest.approx(peak, rel=1e-5)
    assert band.lower == pytest.approx(brentq(g, 1.0, 1e5, xtol=1e-12), rel=1e-9)
    assert band.upper == pytest.approx(brentq(g, 1e5, 1e10, xtol=1e-6), rel=1e-9)
    assert band.lower == pytest.approx(1e3, rel=3e-3)
    assert band.upper == pytest.approx(1e6, rel=3e-3)

"""The two-arm divider model against textbook values, sympy, scipy.signal and lmfit."""

from __future__ import annotations

import math

import numpy as np
import pytest

from taumatch.chain import Adjust, Chain, Input, Line, Series, Shunt, Source, load
from taumatch.chain.two_arm import (
    EXPRESSIONS,
    TwoArm,
    find_trimmer,
    hf_capacitance_ratio,
)
from taumatch.errors import InputError

R1, R2, C2 = 9e6, 1e6, 110e-12  # the compensated-divider example of shared/CHECKS.md


def test_compensated_value_and_what_the_circuit_sees():
    """R1 = 9 MΩ, R2 = 1 MΩ, C2 = 110 pF → C1 = 12.22 pF, τ = 110 µs; the circuit sees
    10 MΩ ∥ 11.0 pF (Millman & Taub; Boylestad; CHECKS.md)."""
    d = TwoArm(R1, 10e-12, R2, C2)
    c1 = d.required("tip")
    assert c1 == pytest.approx(12.22e-12, abs=0.005e-12)
    trimmed = d.trimmed("tip")
    assert trimmed.tau == pytest.approx(110e-6, rel=1e-3)
    assert trimmed.input_resistance == pytest.approx(10e6)
    assert trimmed.input_capacitance == pytest.approx(11.0e-12, abs=0.05e-12)
    assert trimmed.hf_dc_error == pytest.approx(0.0, abs=1e-15)
    # the same trim seen from the shunt arm: 12.22 pF at the tip needs 110 pF below
    assert TwoArm(R1, c1, R2, 50e-12).required("shunt") == pytest.approx(C2, rel=1e-12)


@pytest.mark.parametrize("c1, jump, tau, state", [
    (10e-12, 0.0833, 108e-6, "under-compensated"),
    (15e-12, 0.120, 112.5e-6, "over-compensated"),
])
def test_mis_compensated_step(c1, jump, tau, state):
    """C1 = 10 pF: jump to 0.0833, settles at 0.100, τ = 108 µs (rounded corner, under);
    C1 = 15 pF: jump to 0.120, 20 % above the settled value, τ = 112.5 µs (peaked, over)
    (Millman & Taub; Boylestad; CHECKS.md)."""
    d = TwoArm(R1, c1, R2, C2)
    assert d.hf_gain == pytest.approx(jump, abs=5e-5)
    assert d.dc_gain == pytest.approx(0.100)
    assert d.tau == pytest.approx(tau, rel=1e-9)
    step = d.step(np.array([0.0, tau, 50 * tau]))
    assert step[0] == pytest.approx(jump, abs=5e-5)
    assert step[1] == pytest.approx(0.1 + (jump - 0.1) / math.e, abs=5e-5)
    assert step[2] == pytest.approx(0.1, rel=1e-12)
    assert d.trim("tip").state == state
    assert d.hf_dc_error == pytest.approx(jump / 0.1 - 1, abs=5e-4)


def test_step_against_sympy_exact_inversion():
    """The closed-form step equals sympy's inverse Laplace transform of H(s)/s, with the
    arm values as exact rationals (sympy exact arithmetic)."""
    import sympy as sp

    s, t = sp.symbols("s t", positive=True)
    r1, c1, r2, c2 = sp.Integer(9_000_000), sp.Rational(15, 10**12), sp.Integer(10**6), \
        sp.Rational(110, 10**12)
    z1 = r1 / (1 + s * r1 * c1)
    z2 = r2 / (1 + s * r2 * c2)
    v = sp.inverse_laplace_transform(sp.apart(sp.cancel(z2 / (z1 + z2) / s), s), s, t)
    d = TwoArm(9e6, 15e-12, 1e6, 110e-12)
    for tk in (1e-7, 3e-5, 112.5e-6, 4e-4, 2e-3):
        want = float(v.subs(t, sp.Float(tk, 30)).evalf(30))
        assert float(d.step(tk)) == pytest.approx(want, rel=1e-12)


def test_rational_against_scipy_and_cancellation():
    """H(s) = Z2/(Z1 + Z2) evaluated by scipy.signal.freqs (reference library); the
    compensated divider's pole and zero cancel to a constant."""
    from scipy import signal

    d = TwoArm(R1, 15e-12, R2, C2)
    w = np.logspace(0, 9, 40)
    _, h = signal.freqs([R1 * R2 * 15e-12, R2], [R1 * R2 * (15e-12 + C2), R1 + R2], worN=w)
    assert np.allclose(d.rational().freqresp(w / (2 * np.pi)), h, rtol=1e-12)
    assert np.allclose(d.freqresp(w / (2 * np.pi)), h, rtol=1e-12)
    flat = d.trimmed("shunt").rational()
    assert len(flat.poles) == 0 and flat.dc_gain == pytest.approx(0.1, rel=1e-12)
    with pytest.raises(InputError, match="distributed"):
        TwoArm(R1, 15e-12, R2, C2, 1e-12).rational()


def test_expressions_are_the_limit_of_the_impedance_ratio():
    """The lmfit expression strings equal the s → ∞ limit of Z2/(Z1 + Z2) over its DC value,
    and the capacitances that zero it (sympy exact arithmetic)."""
    import sympy as sp

    s, x = sp.symbols("s x", positive=True)
    r1, c1, r2, c2 = sp.symbols("r1 c1 r2 c2", positive=True)

    def h(cc1, cc2):
        z1 = r1 / (1 + s * r1 * cc1)
        z2 = r2 / (1 + s * r2 * cc2)
        return z2 / (z1 + z2)

    err = sp.limit(h(c1, c2), s, sp.oo) / h(c1, c2).subs(s, 0) - 1
    names = {"r1": r1, "c1": c1, "r2": r2, "c2": c2}
    assert sp.simplify(err - sp.sympify(EXPRESSIONS["hf_dc_error"], locals=names)) == 0
    flat = sp.solve(sp.limit(h(c1, c2 + x), s, sp.oo) - h(c1, c2).subs(s, 0), x)
    assert sp.simplify(flat[0] - sp.sympify(EXPRESSIONS["shunt_change"], locals=names)) == 0
    flat = sp.solve(sp.limit(h(c1 + x, c2), s, sp.oo) - h(c1, c2).subs(s, 0), x)
    assert sp.simplify(flat[0] - sp.sympify(EXPRESSIONS["tip_change"], locals=names)) == 0


def test_expressions_in_lmfit_match_the_model():
    """What lmfit computes from the expression strings (its own asteval) equals the model's
    numbers, in the fit's units (MΩ, pF) and in SI, on random dividers (seeded)."""
    import lmfit

    rng = np.random.default_rng(3)
    for _ in range(20):
        r1, r2 = rng.uniform(1e5, 1e8), rng.uniform(1e4, 1e7)
        c1, c2 = rng.uniform(1e-12, 1e-10), rng.uniform(1e-11, 1e-9)
        d = TwoArm(r1, c1, r2, c2)
        p = lmfit.Parameters()
        for name, v in (("r1", r1 / 1e6), ("r2", r2 / 1e6), ("c1", c1 / 1e-12), ("c2", c2 / 1e-12)):
            p.add(name, value=v)
        for name, text in EXPRESSIONS.items():
            p.add(name, expr=text)
        p.update_constraints()
        assert p["hf_dc_error"].value == pytest.approx(d.hf_dc_error, rel=1e-12, abs=1e-15)
        assert p["shunt_change"].value * 1e-12 == pytest.approx(d.shunt_change, rel=1e-10)
        assert p["tip_change"].value * 1e-12 == pytest.approx(d.tip_change, rel=1e-10)


def test_vectorised_equals_one_at_a_time():
    """Arrays of dividers (as the Monte Carlo draws them) give what each gives alone."""
    rng = np.random.default_rng(11)
    r1, c1 = rng.uniform(1e6, 1e8, 50), rng.uniform(1e-12, 1e-10, 50)
    r2, c2 = rng.uniform(1e5, 1e6, 50), rng.uniform(1e-11, 1e-9, 50)
    ce = np.where(rng.uniform(size=50) > 0.5, rng.uniform(0, 5e-12, 50), 0.0)
    many = TwoArm(r1, c1, r2, c2, ce)
    for name in ("hf_gain", "hf_dc_error", "shunt_change", "tip_change", "response_time"):
        got = getattr(many, name)
        want = [getattr(TwoArm(*v), name) for v in zip(r1, c1, r2, c2, ce)]
        assert np.allclose(got, want, rtol=1e-12, atol=1e-24), name


def test_column_compensation_and_response_time():
    """With earth capacitance: the shunt capacitance from hf_capacitance_ratio makes the
    line's gain at 1 THz equal its DC gain (its exact ABCD form); the tip change does the
    same; T from the closed form equals −d/ds[H/H(0)] of the exact response at a low
    frequency, and for the ungraded column into a small shunt arm R·Ce/6 (Kuffel, Zaengl &
    Kuffel, from memory; CHECKS.md)."""
    d = TwoArm(99e6, 200e-12, 1e6, 5e-9, 20e-12)
    for arm in ("shunt", "tip"):
        h = d.trimmed(arm).response(2j * np.pi * 1e12)
        assert abs(h[()]) == pytest.approx(d.dc_gain, rel=1e-9)
    assert float(hf_capacitance_ratio(100.0, 200e-12, 0.0)) == pytest.approx(99.0)
    for arms in (d, TwoArm(99e6, 0.0, 1e3, 0.0, 10e-12), TwoArm(9e6, 15e-12, 1e6, 110e-12)):
        w = 1e-6 / (arms.r1 * (arms.c1 + arms.ce + arms.c2))
        h = arms.response(np.array([1e-3j * w, 1j * w]))
        assert arms.response_time == pytest.approx(-(h[1] / h[0].real).imag / w, rel=1e-6)
    ungraded = TwoArm(100e6, 0.0, 1.0, 0.0, 10e-12)
    assert ungraded.response_time == pytest.approx(166.7e-6, rel=1e-3)


def test_from_chain_and_trimmer():
    """The bench probe's arms: the tip part, and the cable's, trimmer's and input's
    capacitance with the input's resistance (the spec's own values, summed)."""
    chain = load("examples/bench-probe.toml")
    d = TwoArm.from_chain(chain)
    assert (d.r1, d.c1, d.r2) == (9e6, 11.5e-12, 1e6)
    assert d.c2 == pytest.approx(60e-12 * 1.2 + 17.5e-12 + 14e-12, rel=1e-12)
    t = find_trimmer(chain)
    assert (t.part, t.arm, t.present, t.minimum, t.maximum) == (4, "shunt", 17.5e-12, 5e-12, 30e-12)
    base = (Source(50.0), Series(r=9e6, c=12e-12))
    with pytest.raises(InputError, match="second series capacitance"):
        TwoArm.from_chain(Chain(base[0], base[1:] + (Series(r=9e6, c=12e-12), Input(r=1e6))))
    with pytest.raises(InputError, match="inductance to ground"):
        TwoArm.from_chain(Chain(base[0], base[1:] + (Shunt(l=1e-3), Input(r=1e6))))
    with pytest.raises(InputError, match="no tip arm"):
        TwoArm.from_chain(Chain(base[0], (Line(length=1, l=2.5e-7, c=1e-10), Input(r=50.0))))
    with pytest.raises(InputError, match="trimmer must sit"):
        find_trimmer(Chain(base[0], (Shunt(c=5e-12, adjust=Adjust("c")),) + base[1:]
                           + (Input(r=1e6),)))


def test_closed_form_trim_equals_the_network_trim():
    """On two-arm chains the closed form and the network's regula falsi agree (R1 C1 = R2 C2,
    Millman & Taub)."""
    from taumatch.analysis.trim import trim

    for c1 in (5e-12, 12e-12, 40e-12):
        chain = Chain(Source(50.0), (Series(r=R1, c=c1), Shunt(c=30e-12, adjust=Adjust("c")),
                                     Input(r=R2, c=80e-12)))
        net = trim(chain)
        d = TwoArm.from_chain(chain)
        closed = d.trim("shunt", present=30e-12, part=2, kind="shunt")
        assert closed.required == pytest.approx(net.required, rel=1e-9)
        assert closed.state == net.state
        # the network compares the gains at f_m, the closed form at s -> infinity
        at_fm = abs(d.freqresp(net.frequency)[()]) / d.dc_gain - 1
        assert net.hf_dc_error == pytest.approx(at_fm, rel=1e-9)


def test_bad_values():
    with pytest.raises(InputError, match="r1"):
        TwoArm(0.0, 1e-12, 1e6, 1e-12)
    with pytest.raises(InputError, match="c2"):
        TwoArm(1e6, 1e-12, 1e6, np.array([1e-12, -1e-12]))
    with pytest.raises(InputError, match="arm"):
        TwoArm(1e6, 1e-12, 1e6, 1e-12).change("top")
    with pytest.raises(InputError, match="one divider"):
        TwoArm(np.array([1e6, 2e6]), 1e-12, 1e6, 1e-12).rational()


def test_the_fit_uses_the_model_s_expressions():
    """The lmfit expressions in fit/divider.py are this model's: each derived parameter is
    either taken from EXPRESSIONS or written as an expression sympy finds equal to it (a
    guard against the fit's physics drifting from the model the tests check)."""
    import re
    from pathlib import Path

    import sympy as sp

    import taumatch.fit.divider as fit_divider

    text = Path(fit_divider.__file__).read_text(encoding="utf-8")
    r1, c1, r2, c2 = sp.symbols("r1 c1 r2 c2", positive=True)
    names = {"r1": r1, "c1": c1, "r2": r2, "c2": c2}
    for name, want in EXPRESSIONS.items():
        written = re.findall(rf'params\.add\("{name}",\s*expr="([^"]+)"\)', text)
        if not written:  # then the fit must take them from the model
            assert "EXPRESSIONS" in text, f"fit/divider.py writes no expression for {name}"
            continue
        got = sp.sympify(written[0], locals=names)
        assert sp.simplify(got - sp.sympify(want, locals=names)) == 0, name

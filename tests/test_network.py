"""taumatch.network: lumped MNA, descriptor pencil, poles/zeros/gain, symbolic view.

Each check names its source (see /work/shared/CHECKS.md for the textbook values).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.signal
import sympy

from taumatch.errors import InputError
from taumatch.network import Network

# ----------------------------------------------------------------- helpers


def rc_lowpass(r=1e3, c=10e-12):
    return (Network().voltage_source("V1", "in", "0")
            .resistor("R1", "in", "out", r).capacitor("C1", "out", "0", c))


def divider(c1, r1=9e6, r2=1e6, c2=110e-12, source=True):
    net = Network().voltage_source("V", "tip", "gnd") if source else Network()
    return (net.resistor("R1", "tip", "out", r1).capacitor("C1", "tip", "out", c1)
            .resistor("R2", "out", "gnd", r2).capacitor("C2", "out", "gnd", c2))


def rc_ladder(rs, cs):
    """Source -> R_k in series, C_k shunt at node n_k (k = 1..N)."""
    net = Network().voltage_source("V", "n0", "0")
    for k, (r, c) in enumerate(zip(rs, cs), start=1):
        net = net.resistor(f"R{k}", f"n{k-1}", f"n{k}", r).capacitor(f"C{k}", f"n{k}", "0", c)
    return net


def sympy_reference(expr, s):
    """Monic denominator and matching numerator coefficients (floats, highest power first),
    and poles from the exact denominator (40-digit roots)."""
    num, den = sympy.fraction(sympy.cancel(expr))
    pn, pd = sympy.Poly(num, s), sympy.Poly(den, s)
    lc = pd.LC()
    num_c = [float(x / lc) for x in pn.all_coeffs()]
    den_c = [float(x / lc) for x in pd.all_coeffs()]
    poles = [complex(r) for r in pd.nroots(n=40)]
    zeros = [complex(r) for r in pn.nroots(n=40)] if pn.degree() > 0 else []
    return num_c, den_c, poles, zeros


def info_coeffs(info):
    den = np.real(np.poly(info.poles)) if info.poles.size else np.array([1.0])
    num = info.gain * (np.real(np.poly(info.zeros)) if info.zeros.size else np.array([1.0]))
    return num, den


def rel_coeff_err(got, want):
    got, want = np.asarray(got, float), np.asarray(want, float)
    assert got.shape == want.shape
    return float(np.max(np.abs(got - want) / np.abs(want)))


# ----------------------------------------------------------------- first order


def test_rc_lowpass_pole_and_bandwidth(roots_match):
    """R = 1 kOhm, C = 10 pF: tau = 10 ns, pole -1e8 rad/s, f_3dB = 15.92 MHz (CHECKS.md,
    own derivation f = 1/(2 pi R C))."""
    net = rc_lowpass()
    info = net.transfer_info("V1", "out")
    roots_match(info.poles, [-1e8], rtol=1e-12)
    assert info.zeros.size == 0
    assert info.gain == pytest.approx(1e8, rel=1e-12)
    # unknowns v(in), v(out), i(V1): one dynamic state, two algebraic (infinite eigenvalues)
    assert info.infinite_poles == 2 and info.check_error < 1e-12
    d = info.to_dict()
    assert d["poles_rad_s"][0] == pytest.approx(-1e8) and d["line_sections"] == {}
    assert "15.92 MHz" in info.summary()
    f3 = 1 / (2 * math.pi * 1e3 * 10e-12)
    assert f3 == pytest.approx(15.92e6, rel=5e-4)
    h = net.response([0.0, f3], "V1", "out")
    assert abs(h[0]) == pytest.approx(1.0, rel=1e-14)
    assert abs(h[1]) == pytest.approx(1 / math.sqrt(2), rel=1e-12)
    assert np.angle(h[1]) == pytest.approx(-math.pi / 4, rel=1e-12)


def test_compensated_divider_cancels_exactly():
    """R1 C1 = R2 C2 gives a flat H = R2/(R1+R2) = 0.1 (Millman & Taub; Boylestad)."""
    net = divider(110e-12 / 9)
    info = net.transfer_info("V", "out")
    assert info.poles.size == 0 and info.zeros.size == 0
    assert len(info.cancelled) == 1
    pole, zero = info.cancelled[0]
    assert abs(pole - zero) <= 1e-8 * abs(pole)
    tau = 0.9e6 * (110e-12 / 9 + 110e-12)  # (R1 || R2)(C1 + C2) = 110 us (CHECKS.md)
    assert tau == pytest.approx(110e-6, rel=1e-12)
    assert pole.real == pytest.approx(-1 / tau, rel=1e-10)
    assert info.gain == pytest.approx(0.1, rel=1e-12)


def test_compensated_divider_12p22_is_flat():
    """C1 = 12.22 pF (the rounded textbook value): H stays 0.1 within the 2e-4 the rounding
    leaves (Millman & Taub; own derivation of the bound C1/(C1+C2) vs 0.1)."""
    net = divider(12.22e-12)
    f = np.logspace(0, 9, 91)
    h = net.response(f, "V", "out")
    hf = 12.22 / (12.22 + 110)
    bound = abs(hf - 0.1) / 0.1
    assert np.max(np.abs(h - 0.1)) / 0.1 <= bound * (1 + 1e-9)
    info = net.transfer_info("V", "out")
    assert np.max(np.abs(info.rational(2j * np.pi * f) - h) / np.abs(h)) < 1e-12


@pytest.mark.parametrize("c1, jump, tau", [(10e-12, 0.0833, 108e-6), (15e-12, 0.120, 112.5e-6)])
def test_miscompensated_divider_pole_zero_gain(c1, jump, tau, roots_match):
    """Pole -1/((R1||R2)(C1+C2)), zero -1/(R1 C1), hf gain C1/(C1+C2), dc gain 0.1
    (Millman & Taub; Boylestad; CHECKS.md values 0.0833 / 108 us and 0.120 / 112.5 us)."""
    r1, r2, c2 = 9e6, 1e6, 110e-12
    info = divider(c1).transfer_info("V", "out")
    roots_match(info.poles, [-1 / ((r1 * r2 / (r1 + r2)) * (c1 + c2))], rtol=1e-12)
    roots_match(info.zeros, [-1 / (r1 * c1)], rtol=1e-12)
    assert info.gain == pytest.approx(c1 / (c1 + c2), rel=1e-12)  # equal degrees: hf gain
    assert info.gain == pytest.approx(jump, abs=5e-4)
    assert -1 / info.poles[0].real == pytest.approx(tau, rel=5e-3)
    assert info.rational(0.0).real == pytest.approx(0.1, rel=1e-12)
    assert not info.cancelled


def test_divider_loading_impedance():
    """Compensated 9M || 12.22p over 1M || 110p: the circuit sees 10 MOhm || 11.0 pF
    (CHECKS.md; Boylestad)."""
    net = divider(110e-12 / 9, source=False)
    f = np.array([0.0, 1e3, 1e5, 1e7])
    z = net.impedance(f, "tip")
    want = 1 / (1 / 10e6 + 2j * np.pi * f * 11e-12)
    assert np.max(np.abs(z - want) / np.abs(want)) < 1e-12
    # with the driving voltage source present it is zeroed, i.e. a short across the tip
    assert np.max(np.abs(divider(110e-12 / 9).impedance(f, "tip"))) < 1e-9
    # the output node seen from the instrument side: R1 || R2, C1 + C2 (source shorted)
    z_out = divider(110e-12 / 9).impedance(f, "out")
    want_out = 1 / (1 / 9e6 + 1 / 1e6 + 2j * np.pi * f * (110e-12 / 9 + 110e-12))
    assert np.max(np.abs(z_out - want_out) / np.abs(want_out)) < 1e-12


# ----------------------------------------------------------------- second order


@pytest.mark.parametrize("r", [10.0, 50.0, 245.0])
def test_series_rlc_second_order(r):
    """Ground lead 150 nH with 10 pF: w_n = 1/sqrt(LC) (f0 = 129.9 MHz), zeta = (R/2)sqrt(C/L)
    (CHECKS.md; Ogata / Nise textbook second-order form)."""
    l_, c_ = 150e-9, 10e-12
    net = (Network().voltage_source("V", "a").resistor("R", "a", "b", r)
           .inductor("L", "b", "c", l_).capacitor("C", "c", "0", c_))
    info = net.transfer_info("V", "c")
    wn = 1 / math.sqrt(l_ * c_)
    zeta = r / 2 * math.sqrt(c_ / l_)
    assert wn / (2 * math.pi) == pytest.approx(129.9e6, rel=5e-4)
    assert len(info.poles) == 2
    # product of poles = w_n^2, sum = -2 zeta w_n (textbook form s^2 + 2 zeta w_n s + w_n^2)
    assert np.prod(info.poles).real == pytest.approx(wn**2, rel=1e-12)
    assert np.sum(info.poles).real == pytest.approx(-2 * zeta * wn, rel=1e-10)
    assert info.gain == pytest.approx(wn**2, rel=1e-12)
    if zeta < 1:
        assert np.all(np.abs(np.abs(info.poles) - wn) <= 1e-12 * wn)


# ----------------------------------------------------------------- ladders vs sympy / scipy


LADDERS = [
    ([1e3, 2.2e3, 4.7e3], [10e-12, 22e-12, 4.7e-12]),
    ([100.0, 1e3, 10e3, 100e3, 1e6], [1e-9, 100e-12, 10e-12, 5e-12, 15e-12]),
    ([50.0] * 6, [10e-12] * 6),
]


@pytest.mark.parametrize("rs, cs", LADDERS)
def test_rc_ladder_against_sympy_exact(rs, cs, roots_match):
    """Poles and coefficients against sympy exact rational arithmetic (rel. error <= 1e-10)."""
    exact = rc_ladder([sympy.nsimplify(r) for r in rs], [sympy.nsimplify(c) for c in cs])
    s = sympy.Symbol("s")
    out = f"n{len(rs)}"
    num_c, den_c, poles, zeros = sympy_reference(exact.transfer_symbolic("V", out, s=s), s)
    info = rc_ladder(rs, cs).transfer_info("V", out)
    roots_match(info.poles, poles, rtol=1e-10)
    assert zeros == [] and info.zeros.size == 0
    num, den = info_coeffs(info)
    assert rel_coeff_err(den, den_c) <= 1e-10
    assert rel_coeff_err(num, num_c) <= 1e-10


@pytest.mark.filterwarnings("ignore::scipy.signal.BadCoefficients")
@pytest.mark.parametrize("rs, cs", LADDERS)
def test_rc_ladder_against_scipy_state_space(rs, cs):
    """The same ladder written by hand as x' = A x + B u (node voltages; tridiagonal
    conductance matrix) and evaluated by scipy.signal.freqresp and python-control."""
    n = len(rs)
    g = np.zeros((n, n))
    b = np.zeros(n)
    for k in range(n):  # resistor k joins node k-1 (k=0: source) and node k
        g[k, k] += 1 / rs[k]
        if k == 0:
            b[0] = 1 / rs[0]
        else:
            g[k - 1, k - 1] += 1 / rs[k]
            g[k - 1, k] -= 1 / rs[k]
            g[k, k - 1] -= 1 / rs[k]
    a = -g / np.array(cs)[:, None]
    bb = (b / np.array(cs)).reshape(-1, 1)
    cc = np.zeros((1, n))
    cc[0, -1] = 1
    w = np.logspace(3, 11, 60)
    # scipy.signal.freqresp goes through polynomial coefficients; give it the system in
    # time scaled by w0 = 1e9 rad/s (s = w0 sigma) so they stay well conditioned
    w0 = 1e9
    sys = scipy.signal.StateSpace(a / w0, bb / w0, cc, np.zeros((1, 1)))
    _, h_ref = scipy.signal.freqresp(sys, w / w0)
    net = rc_ladder(rs, cs)
    h_mna = net.response(w / (2 * np.pi), "V", f"n{n}")
    h_zpk = net.transfer_info("V", f"n{n}").rational(1j * w)
    # scipy's own path (state space -> zpk via polynomials) is good to about 1e-6 deep in
    # the stop band; python-control evaluates C (sI - A)^-1 B directly and is held tighter
    assert np.max(np.abs(h_mna - h_ref) / np.abs(h_ref)) < 1e-5
    assert np.max(np.abs(h_zpk - h_ref) / np.abs(h_ref)) < 1e-5
    import control
    h_ctl = np.asarray(control.ss(a, bb, cc, 0)(1j * w)).ravel()
    assert np.max(np.abs(h_mna - h_ctl) / np.abs(h_ctl)) < 1e-10
    assert np.max(np.abs(h_zpk - h_ctl) / np.abs(h_ctl)) < 1e-10


def test_twelve_decade_spread_poles(roots_match):
    """1 ns, 1 ms and 1 s time constants coupled in one network: poles and zeros to 1e-10
    relative against sympy exact arithmetic (40-digit roots of the exact polynomials)."""
    q = sympy.Rational

    def build(v):
        r1, c1, r2, c2, r3, c3 = v
        return (Network().voltage_source("V", "in")
                .resistor("R1", "in", "n1", r1).capacitor("C1", "n1", "0", c1)
                .resistor("R2", "n1", "n2", r2).capacitor("C2", "n2", "0", c2)
                .resistor("R3", "n2", "n3", r3).capacitor("C3", "n3", "0", c3)
                .resistor("R4", "n3", "0", 10 * r3).capacitor("C4", "n1", "n3", 3 * c1))

    vals = [q(1000), q(1, 10**12), q(10**6), q(1, 10**9), q(10**9), q(1, 10**9)]
    s = sympy.Symbol("s")
    num_c, _, poles, zeros = sympy_reference(build(vals).transfer_symbolic("V", "n3", s), s)
    mags = sorted(abs(p) for p in poles)
    assert mags[-1] / mags[0] > 1e8  # the spread is really there
    info = build([float(v) for v in vals]).transfer_info("V", "n3")
    roots_match(info.poles, poles, rtol=1e-10)
    roots_match(info.zeros, zeros, rtol=1e-10)
    assert info.gain == pytest.approx(num_c[0], rel=1e-10)


def test_probe_chain_with_inductors_against_sympy(roots_match):
    """A divider-probe-like chain (50 ohm source, 150 nH ground lead, 9 MOhm || 11 pF tip, four
    lumped R-L-C cable sections, 1 MOhm || 15 pF input: us and ns time constants together)
    against sympy exact arithmetic: poles and zeros to 1e-10, gain to 1e-10.  Values are an
    invented scenario (typical magnitudes from CHECKS.md, common practice)."""
    v = {"rs": 50, "lg": 150e-9, "r1": 9e6, "c1": 11e-12, "rc": 45, "lc": 75e-9, "cc": 30e-12, "r2": 1e6, "c2": 15e-12}

    def chain(v, n=4):
        net = (Network().voltage_source("V", "src").resistor("Rs", "src", "a", v["rs"])
               .inductor("Lg", "a", "tip", v["lg"])
               .resistor("R1", "tip", "c0", v["r1"]).capacitor("C1", "tip", "c0", v["c1"]))
        for k in range(n):
            net = (net.resistor(f"Rc{k}", f"c{k}", f"m{k}", v["rc"])
                   .inductor(f"Lc{k}", f"m{k}", f"c{k + 1}", v["lc"])
                   .capacitor(f"Cc{k}", f"c{k + 1}", "0", v["cc"]))
        return net.resistor("R2", f"c{n}", "0", v["r2"]).capacitor("C2", f"c{n}", "0", v["c2"])

    s = sympy.Symbol("s")
    exact = chain({k: sympy.nsimplify(x) for k, x in v.items()})
    num_c, _, poles, zeros = sympy_reference(exact.transfer_symbolic("V", "c4", s), s)
    info = chain(v).transfer_info("V", "c4")
    assert len(poles) == 9
    roots_match(info.poles, poles, rtol=1e-10)
    roots_match(info.zeros, zeros, rtol=1e-10)
    assert info.gain == pytest.approx(num_c[0], rel=1e-10)


def test_descriptor_matrices_reproduce_response():
    """descriptor() gives E, A, B, C, D whose C (sE - A)^-1 B + D equals the MNA solve."""
    net = divider(10e-12)
    E, A, B, C, D = net.descriptor("V", "out")
    assert E.shape == A.shape and B.shape == (A.shape[0], 1) and C.shape == (1, A.shape[0])
    f = np.logspace(1, 8, 15)
    s = 2j * np.pi * f
    h = np.array([(C @ np.linalg.solve(x * E - A, B) + D)[0, 0] for x in s])
    assert np.allclose(h, net.response(f, "V", "out"), rtol=1e-12, atol=0)


def test_uncontrollable_mode_cancelled():
    """A buffered RC section hanging off the output (driven from it, not feeding back) is
    unobservable from the output: its pole appears as a zero too and is cancelled."""
    net = (rc_lowpass().vcvs("E1", "b", "0", "out", "0", 1.0)
           .resistor("R2", "b", "c", 2e3).capacitor("C2", "c", "0", 10e-12))
    info = net.transfer_info("V1", "out")
    assert [round(p.real) for p in info.poles] == [-100000000]
    assert len(info.cancelled) == 1
    assert info.cancelled[0][0].real == pytest.approx(-1 / (2e3 * 10e-12), rel=1e-8)
    info_c = net.transfer_info("V1", "c")  # and seen from node c it is a real pole
    assert len(info_c.poles) == 2 and not info_c.cancelled


def test_current_source_into_inductor_is_improper():
    """V = s L I: one zero at the origin, no poles, gain L [ohm s] (own derivation)."""
    net = Network().current_source("I", "0", "a").inductor("L", "a", "0", 1e-6)
    info = net.transfer_info("I", "a")
    assert info.poles.size == 0 and info.zeros.size == 1 and abs(info.zeros[0]) < 1e-3
    assert info.gain == pytest.approx(1e-6, rel=1e-12)


# ----------------------------------------------------------------- buffer


def test_vcvs_buffer_isolates_node():
    """An ideal buffer (VCVS) reads node 'out' without loading it: the response at 'out' and
    the impedance seen there are unchanged by a heavy load on the buffer's output."""
    base = rc_lowpass()
    buffered = (base.vcvs("E1", "buf", "0", "out", "0", 2.0)
                .resistor("RL", "buf", "0", 50.0).capacitor("CL", "buf", "0", 1e-9))
    f = np.logspace(4, 9, 21)
    h0 = base.response(f, "V1", "out")
    assert np.allclose(buffered.response(f, "V1", "out"), h0, rtol=1e-13, atol=0)
    assert np.allclose(buffered.response(f, "V1", "buf"), 2 * h0, rtol=1e-13, atol=0)
    assert np.allclose(buffered.impedance(f, "out"), base.impedance(f, "out"), rtol=1e-13)
    unbuffered = base.resistor("RL", "out", "0", 50.0)
    assert not np.allclose(unbuffered.response(f, "V1", "out"), h0, rtol=1e-3)


# ----------------------------------------------------------------- symbolic


def test_symbolic_rc_and_divider():
    """sympy: 1/(sRC + 1) and the divider ratio (R2 + s R1 R2 C1)/(...) (own derivation;
    Millman & Taub for the compensation condition)."""
    s = sympy.Symbol("s")
    R, Cs = sympy.symbols("R C", positive=True)
    net = (Network().voltage_source("V", "in").resistor("R", "in", "out", R)
           .capacitor("C", "out", "0", Cs))
    assert sympy.simplify(net.transfer_symbolic("V", "out", s) - 1 / (s * R * Cs + 1)) == 0
    r1, r2, c1, c2 = sympy.symbols("R1 R2 C1 C2", positive=True)
    d = divider(c1, r1, r2, c2)
    h = d.transfer_symbolic("V", "out", s)
    want = (1 / r1 + s * c1) / (1 / r1 + 1 / r2 + s * (c1 + c2))
    assert sympy.simplify(h - want) == 0
    flat = sympy.cancel(h.subs(c1, r2 * c2 / r1))
    assert sympy.simplify(flat - r2 / (r1 + r2)) == 0


def test_subs_gives_numeric_network():
    R = sympy.Symbol("R", positive=True)
    net = rc_lowpass(r=R)
    assert net.is_symbolic
    with pytest.raises(InputError, match="R1.*symbolic"):
        net.response([1.0], "V1", "out")
    num = net.subs({R: 1e3})
    assert not num.is_symbolic
    assert num.transfer_info("V1", "out").poles[0].real == pytest.approx(-1e8, rel=1e-12)


# ----------------------------------------------------------------- lti


def test_transfer_returns_rational():
    """transfer() hands the zero-pole-gain form to taumatch.lti.Rational.from_zpk."""
    h = divider(10e-12).transfer("V", "out")
    assert h.dc_gain == pytest.approx(0.1, rel=1e-12)
    assert h.hf_gain == pytest.approx(10 / 120, rel=1e-12)


# ----------------------------------------------------------------- bad input


@pytest.mark.parametrize(
    "build, match",
    [
        (lambda: Network().resistor("R1", "a", "0", -5.0), "R1.*resistance.*positive"),
        (lambda: Network().capacitor("C7", "a", "0", float("nan")), "C7.*capacitance"),
        (lambda: Network().inductor("L2", "a", "0", 0.0), "L2.*inductance"),
        (lambda: Network().resistor("R1", "a", "0", "ten"), "R1.*number"),
        (lambda: Network().resistor("R1", "a", "a", 1.0), "R1.*same node"),
        (lambda: Network().resistor("R1", "a", "0", 1.0).capacitor("R1", "a", "0", 1e-12),
         "R1.*duplicate"),
        (lambda: Network().vcvs("E1", "a", "0", "b", "0", float("inf")), "E1.*gain"),
        (lambda: Network().line("T1", "a", "b", length=-1, l=1e-7, c=1e-10), "T1.*length"),
        (lambda: Network().line("T1", "a", "b", length=1, l=1e-7, c=0.0), "T1.*c"),
        (lambda: Network().line("T1", "a", "b", length=1, l=1e-7, c=1e-10, r=-1), "T1.*r"),
        (lambda: Network().resistor("R1", "a#1", "0", 1.0), "R1.*#"),
        (lambda: Network().capacitor("C1", "a", "0", sympy.Integer(-3)), "C1.*positive"),
    ],
)
def test_bad_elements(build, match):
    with pytest.raises(InputError, match=match):
        build()


def test_bad_topology_and_requests():
    net = rc_lowpass()
    with pytest.raises(InputError, match="R9.*dangling"):
        net.resistor("R9", "out", "x", 1.0).response([1.0], "V1", "out")
    with pytest.raises(InputError, match="R5.*no connection to ground"):
        net.resistor("R5", "p", "q", 1.0).capacitor("C5", "p", "q", 1e-12).response(
            [1.0], "V1", "out")
    floating = (Network().current_source("I1", "0", "a").resistor("R1", "a", "b", 1e3)
                .capacitor("C1", "b", "a", 1e-9))  # only the current source reaches ground
    with pytest.raises(InputError, match="no connection to ground"):
        floating.transfer_info("I1", "a")
    with pytest.raises(InputError, match="output.*'nowhere'"):
        net.response([1.0], "V1", "nowhere")
    with pytest.raises(InputError, match="'V9' is not in the network"):
        net.transfer_info("V9", "out")
    with pytest.raises(InputError, match="R1.*not an independent source"):
        net.transfer_info("R1", "out")
    with pytest.raises(InputError, match="freqs"):
        net.response([-1.0], "V1", "out")
    with pytest.raises(InputError, match="impedance|output.*'zz'"):
        net.impedance([1.0], "zz")
    with pytest.raises(InputError, match="W1.*loop made only of voltage sources"):
        net.voltage_source("W1", "in", "0").transfer_info("V1", "out")
    with pytest.raises(InputError, match="W1.*loop"):
        net.voltage_source("W1", "in", "0").transfer_symbolic("V1", "out")
    with pytest.raises(InputError, match="impedance.*same node"):
        net.impedance([1.0], "gnd", "0")
    with pytest.raises(InputError, match="no elements"):
        Network().impedance([1.0], "a")


def test_random_rlc_networks_against_sympy():
    """Seeded random RLC networks (values over 5-6 decades, voltage or current source, any
    node as output; floating or dangling draws are skipped as InputError): the zero-pole-gain
    form agrees with sympy exact arithmetic (30 digits) to 1e-9 relative, and its own
    check against the direct solve (check_error) is small.  Guards the finite/infinite
    classification and the cancellation of uncontrollable/unobservable modes."""
    import mpmath

    kinds = {"R": (1, 6), "C": (-12, -8), "L": (-8, -4)}
    make = {"R": Network.resistor, "C": Network.capacitor, "L": Network.inductor}
    rng = np.random.default_rng(2026)
    s = sympy.Symbol("s")
    done = 0
    while done < 15:
        nn = int(rng.integers(2, 5))
        nodes = ["0"] + [f"n{k}" for k in range(1, nn + 1)]
        parts = [(rng.choice(list("RCL")), nodes[rng.integers(0, k)], nodes[k])
                 for k in range(2, nn + 1)]
        for _ in range(int(rng.integers(2, 5))):
            i, j = rng.choice(len(nodes), 2, replace=False)
            parts.append((rng.choice(list("RCL")), nodes[i], nodes[j]))
        vals = [float(f"{10 ** rng.uniform(*kinds[k]):.3g}") for k, _, _ in parts]
        current = rng.random() < 0.3
        out = f"n{rng.integers(1, nn + 1)}"

        def build(conv, parts=parts, vals=vals, current=current):
            net = (Network().current_source("U", "0", "n1") if current
                   else Network().voltage_source("U", "n1", "0"))
            for k, ((kind, a, b), v) in enumerate(zip(parts, vals)):
                net = make[kind](net, f"{kind}{k}", a, b, conv(v))
            return net

        try:
            info = build(float).transfer_info("U", out)
        except InputError:
            continue
        num, den = sympy.fraction(sympy.cancel(build(sympy.nsimplify).transfer_symbolic(
            "U", out, s)))
        if num == 0:
            assert info.gain == 0
            done += 1
            continue
        pn = [mpmath.mpf(sympy.Rational(c).p) / sympy.Rational(c).q
              for c in sympy.Poly(num, s).all_coeffs()]
        pd = [mpmath.mpf(sympy.Rational(c).p) / sympy.Rational(c).q
              for c in sympy.Poly(den, s).all_coeffs()]
        f = np.logspace(1, 9, 9)
        with mpmath.workdps(30):
            want = np.array([complex(mpmath.polyval(pn, 2j * mpmath.pi * x)
                                     / mpmath.polyval(pd, 2j * mpmath.pi * x)) for x in f])
        got = info.rational(2j * np.pi * f)
        assert np.max(np.abs(got - want) / np.abs(want)) < 1e-9, (parts, vals, out, current)
        assert info.check_error < 1e-6
        done += 1


def test_symbolic_transfer_through_lti_matches_numeric():
    """An exact network (sympy Rationals) → transfer_symbolic → Rational.from_sympy agrees with
    the numeric descriptor path; the compensated-divider formula (Millman & Taub) holds:
    H = R2/(R1+R2) · (1 + s R1 C1)/(1 + s (R1‖R2)(C1+C2))."""
    import sympy as sp

    from taumatch.lti import Rational
    from taumatch.network import Network

    R1, C1, R2, C2 = sp.Integer(9_000_000), sp.Rational(15, 10**12), sp.Integer(1_000_000), \
        sp.Rational(110, 10**12)
    net = (Network().voltage_source("V", "in", "0").resistor("R1", "in", "out", R1)
           .capacitor("C1", "in", "out", C1).resistor("R2", "out", "0", R2)
           .capacitor("C2", "out", "0", C2))
    expr = net.transfer_symbolic("V", "out")
    H = Rational.from_sympy(expr)
    (pole,) = H.poles
    assert -1 / pole.real == pytest.approx(float(R1 * R2 / (R1 + R2) * (C1 + C2)), rel=1e-14)
    assert H.dc_gain == pytest.approx(0.1, rel=1e-14)
    num = Network().voltage_source("V", "in", "0").resistor("R1", "in", "out", 9e6) \
        .capacitor("C1", "in", "out", 15e-12).resistor("R2", "out", "0", 1e6) \
        .capacitor("C2", "out", "0", 110e-12).transfer("V", "out")
    f = np.geomspace(1, 1e8, 30)
    np.testing.assert_allclose(H.freqresp(f), num.freqresp(f), rtol=1e-10)

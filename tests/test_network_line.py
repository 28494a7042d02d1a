"""taumatch.network transmission lines: exact stamps, ladders and the section-count rule.

References: scikit-rf (skrf.media.DistributedCircuit) as a general-purpose RF library;
closed-form lossless results from Pozar, "Microwave Engineering" (shorted/open stubs,
quarter-wave transformer); the distributed RC column of Kuffel, Zaengl & Kuffel, "High Voltage
Engineering: Fundamentals" (from memory, see CHECKS.md).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from taumatch.errors import InputError
from taumatch.network import Line, Network, choose_sections, line_y_parameters, sweep_range
from taumatch.network.sections import check_freqs

import skrf  # noqa: E402  (a declared test dependency: fail, never skip)

# a resistive divider-probe style cable: 1.2 m, 150 ohm/m, 250 nH/m, 100 pF/m (CHECKS.md
# cable values; resistive centre conductor is common practice, no source)
CABLE = {"length": 1.2, "r": 150.0, "l": 250e-9, "g": 1e-6, "c": 100e-12}
LOSSLESS = {"length": 1.0, "l": 250e-9, "c": 100e-12}


def rel(a, b):
    return float(np.max(np.abs(np.asarray(a) - np.asarray(b)) / np.abs(np.asarray(b))))


def skrf_line(f, p):
    freq = skrf.Frequency.from_f(f, unit="hz")
    media = skrf.media.DistributedCircuit(
        freq, R=p.get("r", 0.0), L=p["l"], G=p.get("g", 0.0), C=p["c"], z0_port=50
    )
    return freq, media.line(p["length"], unit="m")


def test_y_parameters_against_skrf():
    """Y11 = 1/(Z0 tanh), Y12 = -1/(Z0 sinh) against scikit-rf's two-port of the same line."""
    f = np.linspace(1e5, 3e9, 300)
    _, ntw = skrf_line(f, CABLE)
    y11, y12 = line_y_parameters(Line("T", "a", "b", **CABLE), f)
    assert rel(y11, ntw.y[:, 0, 0]) < 1e-12
    assert rel(y12, ntw.y[:, 0, 1]) < 1e-12


def test_terminated_line_against_skrf():
    """Input impedance and voltage transfer of the cable into 1 MOhm || 15 pF, from a
    50 ohm source, against scikit-rf (cascade with a load; ABCD parameters)."""
    f = np.linspace(1e5, 2e9, 300)
    freq, ntw = skrf_line(f, CABLE)
    zl = 1 / (1 / 1e6 + 2j * np.pi * f * 15e-12)
    load = skrf.Network(frequency=freq, z=zl.reshape(-1, 1, 1), z0=50)
    zin_ref = (ntw**load).z[:, 0, 0]
    net = (Network().line("T", "in", "out", **CABLE)
           .resistor("RL", "out", "0", 1e6).capacitor("CL", "out", "0", 15e-12))
    assert rel(net.impedance(f, "in"), zin_ref) < 1e-11
    abcd = ntw.a
    a, b, c, d = abcd[:, 0, 0], abcd[:, 0, 1], abcd[:, 1, 0], abcd[:, 1, 1]
    h_ref = zl / (a * zl + b + 50 * (c * zl + d))  # V_load / V_source, own derivation
    driven = net.voltage_source("V", "src", "0").resistor("Rs", "src", "in", 50.0)
    assert rel(driven.response(f, "V", "out"), h_ref) < 1e-11


def test_lossless_shorted_and_open_stub():
    """Shorted line: Z = j Z0 tan(beta l); open line: Z = -j Z0 cot(beta l) (Pozar)."""
    z0 = math.sqrt(LOSSLESS["l"] / LOSSLESS["c"])
    tq = LOSSLESS["length"] * math.sqrt(LOSSLESS["l"] * LOSSLESS["c"])
    f = np.concatenate([np.logspace(-3, 6, 10), np.linspace(1e6, 1e9, 397)])
    bl = 2 * np.pi * f * tq
    shorted = Network().line("T", "in", "0", **LOSSLESS)
    opened = Network().line("T", "in", "end", **LOSSLESS)
    zs, zo = shorted.impedance(f, "in"), opened.impedance(f, "in")
    assert rel(zs, 1j * z0 * np.tan(bl)) < 1e-10
    assert rel(zo, -1j * z0 / np.tan(bl)) < 1e-10
    assert np.all(np.abs(zs.real) < 1e-9 * np.abs(zs))  # lossless: purely reactive
    fq = 1 / (4 * tq)  # quarter wave: the short looks open, the open looks short
    zs_q, zo_q = shorted.impedance([fq, 2 * fq], "in"), opened.impedance([fq, 2 * fq], "in")
    assert abs(zs_q[0]) > 1e12 * z0 and abs(zo_q[0]) < 1e-12 * z0
    assert abs(zs_q[1]) < 1e-12 * z0 and abs(zo_q[1]) > 1e12 * z0  # half wave: repeats
    assert shorted.impedance([0.0], "in")[0] == 0  # DC: a lossless line is a wire


def test_quarter_wave_transformer():
    """A quarter-wave line of Z0 loaded by R_L presents Z0^2 / R_L (Pozar)."""
    z0 = math.sqrt(LOSSLESS["l"] / LOSSLESS["c"])
    fq = 1 / (4 * LOSSLESS["length"] * math.sqrt(LOSSLESS["l"] * LOSSLESS["c"]))
    for rl in (10.0, 50.0, 200.0):
        net = Network().line("T", "in", "out", **LOSSLESS).resistor("RL", "out", "0", rl)
        z = net.impedance([fq, 3 * fq], "in")
        assert np.allclose(z, z0**2 / rl, rtol=1e-12, atol=0)


def test_dc_and_low_frequency_limits():
    """At DC a lossy line with g = 0 is its series resistance r*length; as w -> 0 the series
    forms stay finite (no 0/0)."""
    p = dict(CABLE, g=0.0)
    y11, y12 = line_y_parameters(Line("T", "a", "b", **p), [0.0, 1e-6])
    rdc = p["r"] * p["length"]
    assert np.allclose(y11, 1 / rdc, rtol=1e-12) and np.allclose(y12, -1 / rdc, rtol=1e-12)
    net = Network().line("T", "in", "out", **p).resistor("RL", "out", "0", 1e6)
    assert net.impedance([0.0], "in")[0].real == pytest.approx(1e6 + rdc, rel=1e-14)


def test_long_lossy_line_does_not_overflow():
    """Re(theta) far beyond the float range of cosh: the input looks like Z0 (a long lossy
    line is its own matched termination; any transmission-line text)."""
    p = {"length": 1000.0, "r": 150.0, "l": 250e-9, "g": 0.0, "c": 100e-12}
    f = np.array([1e8, 1e9])
    ln = Line("T", "a", "b", **p)
    from taumatch.network.line import line_theta, line_z0

    assert np.all(line_theta(ln, 2 * np.pi * f).real > 700)
    net = Network().line("T", "in", "out", **p).resistor("RL", "out", "0", 1e6)
    z = net.impedance(f, "in")
    assert np.all(np.isfinite(z))
    assert rel(z, line_z0(ln, 2 * np.pi * f)) < 1e-12


def test_distributed_rc_column():
    """Uniform RC column (HV resistive divider with earth capacitance Ce) into a small bottom
    arm: H(s) = sqrt(sRCe)/sinh(sqrt(sRCe)) normalised to the DC ratio (Kuffel, Zaengl &
    Kuffel, from memory; CHECKS.md).  100 MOhm, 10 pF; inductance made negligible."""
    rt, ce, rb = 100e6, 10e-12, 1.0
    net = (Network().voltage_source("V", "top")
           .line("COL", "top", "bot", length=1.0, r=rt, l=1e-15, c=ce)
           .resistor("Rb", "bot", "0", rb))
    f = np.logspace(1, 5, 30)
    h = net.response(f, "V", "bot") * (rt + rb) / rb
    x = np.sqrt(2j * np.pi * f * rt * ce)
    assert rel(h, x / np.sinh(x)) < 1e-6  # the bottom arm is 1e-8 of the column


def auto_sections(net, source, output, **kw):
    """The automatic section count of ``net`` from ``source`` to ``output``."""
    return choose_sections(lambda f, n: net.response(f, source, output, line_sections=n),
                           sweep=sweep_range(net, source, output), **kw)


def test_auto_sections_meet_promise_and_are_minimal():
    """The automatic count meets 0.1 % up to f_max, checked on a denser grid through the
    descriptor matrices (a path independent of the ladder ABCD power), and N-1 does not."""
    net = (Network().voltage_source("V", "src").resistor("Rs", "src", "in", 50.0)
           .line("T", "in", "out", **CABLE)
           .resistor("RL", "out", "0", 1e6).capacitor("CL", "out", "0", 15e-12))
    ch = auto_sections(net, "V", "out")
    assert ch.sections > 1 and ch.f_bw is not None
    assert ch.f_max == pytest.approx(3 * ch.f_bw)
    f = np.union1d(np.linspace(ch.f_max / 4000, ch.f_max, 4000), check_freqs(ch.f_max))
    h = net.response(f, "V", "out")
    d = net.descriptor("V", "out", line_sections=ch.sections)
    assert d.line_sections == {"T": ch.sections}
    err = rel(d.evaluate(2j * np.pi * f), h)
    assert err <= ch.tol * 1.001, err
    d1 = net.descriptor("V", "out", line_sections=ch.sections - 1)
    assert rel(d1.evaluate(2j * np.pi * check_freqs(ch.f_max)), net.response(
        check_freqs(ch.f_max), "V", "out")) > ch.tol
    # the descriptor ladder and the ABCD-power ladder are the same network
    assert rel(d.evaluate(2j * np.pi * f), net.response(f, "V", "out",
                                                      line_sections=ch.sections)) < 1e-10
    info = net.transfer_info("V", "out")
    assert info.line_sections == {"T": ch.sections} and info.section_choice == ch
    assert len(info.poles) == 2 * ch.sections + 1
    assert rel(info.rational(2j * np.pi * f), h) <= ch.tol * 1.001


def test_given_f_max_and_count_scaling():
    """With f_max given the search honours it; a pi ladder's error falls about 4x per doubling
    of N (second-order accurate, own derivation)."""
    net = (Network().voltage_source("V", "src").resistor("Rs", "src", "in", 50.0)
           .line("T", "in", "out", **LOSSLESS).resistor("RL", "out", "0", 100.0))
    ch = auto_sections(net, "V", "out", f_max=50e6)
    assert ch.f_max == 50e6 and ch.f_bw is None and ch.error <= 1e-3
    assert ch.error_previous is None or ch.error_previous > 1e-3
    f = check_freqs(50e6)
    h = net.response(f, "V", "out")
    e = [rel(net.response(f, "V", "out", line_sections=n), h) for n in (16, 32, 64)]
    assert 3 < e[0] / e[1] < 5 and 3 < e[1] / e[2] < 5


def test_line_bad_input():
    net = Network().voltage_source("V", "in").line("T1", "in", "out", **CABLE)
    net = net.resistor("RL", "out", "0", 1e6)
    with pytest.raises(InputError, match="f_max"):
        auto_sections(net, "V", "out", f_max=-1.0)
    with pytest.raises(InputError, match="T1.*section count"):
        net.descriptor("V", "out", line_sections=0)
    with pytest.raises(InputError, match="T1.*no count"):
        net.descriptor("V", "out", line_sections={})
    with pytest.raises(InputError, match="'T9' is not a line"):
        net.descriptor("V", "out", line_sections={"T1": 3, "T9": 2})
    with pytest.raises(InputError, match="T1.*symbolically"):
        net.transfer_symbolic("V", "out")


def _probe():
    """Invented scenario: 10:1 divider probe tip on a 1.2 m resistive cable (no shunt loss)
    into 1 MOhm || 15 pF."""
    return (Network().voltage_source("Vs", "src", "0").resistor("Rs", "src", "tip", 50.0)
            .resistor("R1", "tip", "out", 9e6).capacitor("C1", "tip", "out", 12.2e-12)
            .line("W1", "out", "scope", **{**CABLE, "g": 0.0})
            .resistor("R2", "scope", "0", 1e6).capacitor("C2", "scope", "0", 15e-12))


def test_transfer_with_line_sections_is_a_rational():
    """With a given section count transfer() gives the ladder's Rational: it matches the
    descriptor system and, at 0 Hz, the DC divider ratio R2/(R1 + R2 + r*length + Rs)."""
    net = _probe()
    h = net.transfer("Vs", "scope", line_sections=6)
    d = net.descriptor("Vs", "scope", line_sections=6)
    f = np.logspace(2, 8.5, 40)
    assert rel(h.freqresp(f), d.evaluate(2j * np.pi * f)) < 1e-9
    rdc = 1e6 / (1e6 + 9e6 + CABLE["r"] * CABLE["length"] + 50.0)
    assert h.dc_gain == pytest.approx(rdc, rel=1e-9)  # via 14 poles and a zero: ~1e-10


def test_limits_are_reported_not_hit():
    """Honest limits: a line needing more than the most sections gets that many and the band
    they hold the tolerance over, said so; a count too large for the eigenvalue path is a
    ComputationError that says what to do; a leading gain beyond the float range is carried
    by the Rational's frequency scale (regression: it used to be refused)."""
    from taumatch.errors import ComputationError
    from taumatch.network.sections import MAX_SECTIONS

    net = _probe()
    d = net.descriptor("Vs", "scope")  # default f_max ~ 1.1 GHz needs ~1800 sections
    ch = d.section_choice
    assert ch.limited and ch.sections == MAX_SECTIONS and ch.error <= ch.tol
    assert ch.f_max < 3 * ch.f_bw
    with pytest.raises(ComputationError, match="unknowns.*give fewer line_sections"):
        net.transfer_info("Vs", "scope", line_sections=700)
    info = net.transfer_info("Vs", "scope", line_sections=40)
    assert not np.isfinite(info.gain) and np.isfinite(info.rational.gain)
    f = np.logspace(3, 8, 30)
    assert rel(info.rational(2j * np.pi * f),
               net.response(f, "Vs", "scope", line_sections=40)) < 1e-9
    # the leading gain does not fit a float, but the Rational keeps it relative to w0
    H = net.transfer("Vs", "scope", line_sections=40)
    assert rel(H.freqresp(f), net.response(f, "Vs", "scope", line_sections=40)) < 1e-9
    ok = net.transfer_info("Vs", "scope", f_max=50e6)
    assert ok.section_choice.error <= 1e-3 and ok.section_choice.f_max == 50e6


@pytest.mark.filterwarnings("error::RuntimeWarning")
def test_ladder_far_above_cutoff_stays_finite():
    """Regression: a coarse ladder driven far above its cut-off grows exponentially section by
    section; the renormalised ABCD power keeps the response finite (tiny), with no overflow
    warnings, and a fine ladder still approaches the exact line there."""
    net = (Network().voltage_source("V", "in").resistor("R1", "in", "out", 1e3)
           .line("T", "out", "o2", **LOSSLESS).resistor("RL", "o2", "0", 50.0)
           .capacitor("C", "o2", "0", 1e-12))
    f = np.logspace(6, 11, 30)
    coarse = net.response(f, "V", "o2", line_sections=16)
    assert np.all(np.isfinite(coarse)) and abs(coarse[-1]) < 1e-50
    exact = net.response(f, "V", "o2")
    fine = net.response(f[:10], "V", "o2", line_sections=4096)
    assert rel(fine, exact[:10]) < 1e-6

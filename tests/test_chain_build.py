"""Chain -> network: divider formulas, Grover's lead, front-end shapes, cable models."""

import math

import numpy as np
import pytest

from taumatch.chain import (
    Branch,
    Chain,
    Input,
    Lead,
    Line,
    Series,
    Shunt,
    Source,
    grover_inductance,
)
from taumatch.chain.build import build, front_end_shape
from taumatch.chain.ground_lead import lead_length_for_inductance


def response(chain, f, **kw):
    b = build(chain, **kw)
    return b.network().response(np.asarray(f, float), b.source, b.output)


def divider(c1, r1=9e6, r2=1e6, c2=110e-12, rs=0.0):
    return Chain(Source(rs), (Series(r=r1, c=c1), Input(r=r2, c=c2)))


def test_compensated_divider_is_flat():
    """R1 C1 = R2 C2 gives H = R2/(R1+R2) at all frequencies (Millman & Taub)."""
    h = response(divider(110e-12 / 9), np.logspace(0, 9, 19))
    assert np.allclose(np.abs(h), 0.1, rtol=1e-12)


def test_miscompensated_divider_formula():
    """H(s) = R2 (1 + s R1 C1) / (R1 + R2 + s R1 R2 (C1 + C2)) (own derivation, Boylestad)."""
    f = np.logspace(1, 8, 15)
    s = 2j * np.pi * f
    r1, r2, c1, c2 = 9e6, 1e6, 10e-12, 110e-12
    want = r2 * (1 + s * r1 * c1) / (r1 + r2 + s * r1 * r2 * (c1 + c2))
    assert np.allclose(response(divider(c1), f), want, rtol=1e-12)


def test_grover_173_nH():
    """Grover's straight wire: 6 in (152.4 mm) of 1 mm-diameter wire is 173 nH (CHECKS.md;
    F. W. Grover, "Inductance Calculations").  CHECKS.md says "1 mm radius"; the formula
    gives 151 nH for 1 mm radius and 173 nH for 0.5 mm radius (1 mm diameter), which is
    what the quoted value must mean."""
    assert grover_inductance(0.1524, 0.5e-3) == pytest.approx(173e-9, rel=3e-3)
    l, r = 0.152, 1e-3
    assert grover_inductance(l, r) == pytest.approx(0.2e-6 * l * (math.log(2 * l / r) - 0.75))
    # about 1 nH per mm of lead (common practice, no source)
    assert 0.8e-9 < grover_inductance(0.1, 0.5e-3) / 100 < 1.3e-9
    assert lead_length_for_inductance(grover_inductance(0.05, 0.3e-3), 0.3e-3) == pytest.approx(
        0.05, rel=1e-12)


def test_lead_is_series_inductor():
    """A lead of Grover's L into C behaves as L-C: |H| peaks near 1/(2 pi sqrt(LC))."""
    lead = Lead(length=0.1524, radius=0.5e-3)
    chain = Chain(Source(1.0), (lead, Input(r=1e9, c=10e-12)))
    f0 = 1 / (2 * math.pi * math.sqrt(lead.inductance * 10e-12))
    s = 2j * math.pi * f0
    zl = 1 / (1e-9 + s * 10e-12)
    want = zl / (1.0 + s * lead.inductance + zl)
    assert response(chain, [f0])[0] == pytest.approx(want, rel=1e-9)


@pytest.mark.parametrize("shape", ["single-pole", "two-pole", "bessel"])
def test_front_end_is_minus_3dB_at_bandwidth(shape):
    """The front end's |H| is 1/sqrt(2) at its bandwidth (definition of -3 dB)."""
    chain = Chain(Source(0.0), (Input(r=1e6, bandwidth=200e6, response=shape),))
    h = response(chain, [1.0, 200e6])
    assert abs(h[0]) == pytest.approx(1.0, rel=1e-9)
    assert abs(h[1]) == pytest.approx(1 / math.sqrt(2), rel=1e-9)


def test_two_pole_shape_constant():
    """Two equal poles: -3 dB at sqrt(sqrt 2 - 1) = 0.6436 of one pole's (CHECKS.md)."""
    w, zeta = front_end_shape(1.0, "two-pole")
    assert zeta == 1.0
    assert 2 * math.pi / w == pytest.approx(math.sqrt(math.sqrt(2) - 1), rel=1e-12)
    assert math.sqrt(math.sqrt(2) - 1) == pytest.approx(0.6436, abs=5e-5)


def test_front_end_does_not_load_node():
    """A buffered front end (VCVS then filter) leaves the node voltage unchanged."""
    base = Chain(Source(1e3), (Input(r=1e6, c=10e-12),))
    fe = Chain(Source(1e3), (Input(r=1e6, c=10e-12, bandwidth=50e6),))
    f = [1e6, 3e7]
    b = build(fe)
    at_node = b.network().response(f, b.source, b.nodes[-1][2])
    assert np.allclose(at_node, response(base, f), rtol=1e-12)


def test_source_edge_pole():
    """Source rise_time t_r is one pole of tau = t_r / ln 9 (first-order 10-90 % = ln 9 tau)."""
    chain = Chain(Source(0.0, rise_time=10e-9), (Input(r=1e6),))
    tau = 10e-9 / math.log(9)
    f = np.array([1e6, 1e7, 1e8])
    assert np.allclose(response(chain, f), 1 / (1 + 2j * np.pi * f * tau), rtol=1e-12)
    assert np.allclose(response(chain, f, edge=False), 1.0, rtol=1e-12)


def test_lossless_line_closed_form():
    """Lossless line between Rs and R_L: V2/Vs = 1/(A + B/R_L + Rs (C + D/R_L)) with
    A = D = cos(beta l), B = j Z0 sin(beta l), C = j sin(beta l)/Z0 (Pozar, ABCD of a line)."""
    line = Line(length=1.5, l=250e-9, c=100e-12)
    rs, rl = 10.0, 200.0
    chain = Chain(Source(rs), (line, Input(r=rl)))
    f = np.linspace(1e6, 500e6, 37)
    bl = 2 * np.pi * f * line.length * math.sqrt(line.l * line.c)
    z0 = line.impedance
    a = np.cos(bl)
    b = 1j * z0 * np.sin(bl)
    c = 1j * np.sin(bl) / z0
    want = 1 / (a + b / rl + rs * (c + a / rl))
    assert np.allclose(response(chain, f), want, rtol=1e-9, atol=1e-12)


def test_lossy_line_against_scikit_rf():
    """Lossy cable between 50 ohm and 1 Mohm || 14 pF against scikit-rf's line
    (skrf.media.DefinedGammaZ0, ABCD cascade)."""
    skrf = pytest.importorskip("skrf")
    line = Line(length=1.2, l=250e-9, c=60e-12, r=150.0, g=1e-6)
    chain = Chain(Source(50.0), (line, Input(r=1e6, c=14e-12)))
    f = np.logspace(4, 8.5, 30)
    w = 2 * np.pi * f
    z, y = line.r + 1j * w * line.l, line.g + 1j * w * line.c
    freq = skrf.Frequency.from_f(f, unit="hz")
    media = skrf.media.DefinedGammaZ0(frequency=freq, gamma=np.sqrt(z * y), z0=np.sqrt(z / y),
                                      z0_port=50)
    abcd = media.line(line.length, unit="m").a
    zl = 1 / (1 / 1e6 + 1j * w * 14e-12)
    a, b, c, d = abcd[:, 0, 0], abcd[:, 0, 1], abcd[:, 1, 0], abcd[:, 1, 1]
    want = 1 / (a + b / zl + 50.0 * (c + d / zl))
    assert np.allclose(response(chain, f), want, rtol=1e-7)


def test_shunt_branch_and_trim_build():
    """Shunt r || c || (branch r + c) to ground; a trim build lumps the cable as c*length."""
    chain = Chain(Source(0.0), (Series(r=1e3), Shunt(c=1e-9, branch=Branch(r=100.0, c=1e-9)),
                                Input(r=1e12)))
    f = np.array([1e4, 1e6])
    s = 2j * np.pi * f
    y = s * 1e-9 + 1 / (100.0 + 1 / (s * 1e-9)) + 1e-12
    assert np.allclose(response(chain, f), (1 / y) / (1e3 + 1 / y), rtol=1e-10)
    line = Line(length=2.0, l=250e-9, c=50e-12, r=100.0)
    tb = build(Chain(Source(0.0), (Series(r=1e6), line, Input(r=1e6))), "trim")
    caps = [e.value for e in tb.elements if type(e).__name__ == "Capacitor"]
    assert caps == [pytest.approx(100e-12)]

"""The chain's exact response (two-port cascade), the ChainModel hub, and the lumped path.

Sources: modified nodal analysis of the same chain (taumatch.network, an independent
formulation), scikit-rf's line two-port, the telegrapher's closed form (Pozar, "Microwave
Engineering"), and own derivations where named.
"""

from pathlib import Path
from unittest import mock

import numpy as np
import pytest
import skrf

from taumatch.chain import Chain, Input, Lead, Line, Series, Shunt, Source, load
from taumatch.chain.build import build
from taumatch.chain.cascade import Cascade
from taumatch.chain.model import ChainModel

EXAMPLES = sorted((Path(__file__).parent.parent / "examples").glob("*.toml"))


def rel(a, b):
    a, b = np.asarray(a), np.asarray(b)
    return float(np.max(np.abs(a - b) / np.maximum(np.abs(b), 1e-12 * np.max(np.abs(b)))))


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_cascade_equals_nodal_analysis_on_every_example(path):
    """Two formulations of one chain agree to rounding: the two-port cascade and modified
    nodal analysis of the elements build() writes (with and without the source edge, at the
    probe point, the impedance the circuit sees, and with cables as 7-section ladders)."""
    chain = load(path)
    f = np.concatenate([[0.0], np.logspace(0, 10.5, 200)])
    c = Cascade(chain)
    for edge in (False, True):
        b = build(chain, "full", edge=edge)
        net = b.network()
        assert rel(c.response(f, edge=edge), net.response(f, b.source, b.output)) < 1e-11
        assert rel(c.response(f, at="probe", edge=edge),
                   net.response(f, b.source, b.probe)) < 1e-11
    lb = build(chain, "load")
    assert rel(c.impedance(2j * np.pi * f[1:]),
               lb.network().response(f[1:], lb.source, lb.probe)) < 1e-11
    if b.lines():  # far above a 7-section ladder's cut-off both are ~1e-25: compare above 1e-6
        ladder = Cascade(chain, line_sections=7).response(f, edge=True)
        mna = net.response(f, b.source, b.output, line_sections=7)
        keep = np.abs(mna) > 1e-6 * np.max(np.abs(mna))
        assert rel(ladder[keep], mna[keep]) < 1e-9


def test_cascade_line_against_scikit_rf():
    """A 50 ohm source, 1.2 m of lossy cable into 1 Mohm || 15 pF: V_load / V_source from
    scikit-rf's ABCD parameters of the same line (V_L/V_s = Z_L/(A Z_L + B + R_s (C Z_L + D)),
    own derivation)."""
    p = {"length": 1.2, "r": 150.0, "l": 250e-9, "g": 1e-6, "c": 100e-12}
    f = np.linspace(1e5, 2e9, 300)
    freq = skrf.Frequency.from_f(f, unit="hz")
    w = 2 * np.pi * f
    media = skrf.media.DistributedCircuit(freq, R=p["r"], L=p["l"], G=p["g"], C=p["c"],
                                          z0_port=50)
    abcd = media.line(p["length"], unit="m").a
    a, b, c, d = abcd[:, 0, 0], abcd[:, 0, 1], abcd[:, 1, 0], abcd[:, 1, 1]
    zl = 1 / (1 / 1e6 + 1j * w * 15e-12)
    want = zl / (a * zl + b + 50 * (c * zl + d))
    chain = Chain(Source(50.0), (Line(**p), Input(r=1e6, c=15e-12)))
    assert rel(Cascade(chain).response(f), want) < 1e-11


def telegrapher(f, rs, length, r, l, c, zl):
    """V_load / V_source of a line between a source resistance and a load (Pozar: A = D =
    cosh(theta), B = Z0 sinh(theta), C = sinh(theta) / Z0, theta = length sqrt(z y))."""
    w = 2 * np.pi * f
    z, y = r + 1j * w * l, 1j * w * c
    theta, z0 = length * np.sqrt(z * y), np.sqrt(z / y)
    a, b, cc = np.cosh(theta), z0 * np.sinh(theta), np.sinh(theta) / z0
    return zl / (a * zl + b + rs * (cc * zl + a))


def test_matched_cable_example_closed_form():
    """examples/matched-cable.toml: matched at the source, the input sees the delayed source
    through 25 ohm into 10 pF (own derivation from the telegrapher's equations): -3 dB at
    1/(2 pi 25 ohm 10 pF) = 636.6 MHz, 10-90 % ln 9 x 250 ps = 549.3 ps (CHECKS.md: first-order
    step), no peaking, no overshoot."""
    from taumatch.analysis import chain_figures

    figs = chain_figures(load(Path(__file__).parent.parent / "examples" / "matched-cable.toml"))
    tau = 25.0 * 10e-12
    assert figs.band.upper == pytest.approx(1 / (2 * np.pi * tau), rel=1e-9)
    assert figs.rise_time == pytest.approx(np.log(9) * tau, rel=1e-5)
    assert figs.band.peaking_db == 0 and figs.step.overshoot == 0 and figs.warning is None
    f = np.logspace(5, 10, 50)
    want = telegrapher(f, 50.0, 2.5, 0.0, 250e-9, 100e-12, 1 / (1 / 50 + 2j * np.pi * f * 10e-12))
    assert rel(figs.model.response(f), want) < 1e-9


def test_network_transfer_on_a_400_section_ladder():
    """Network.transfer on a 400-section ladder (801 poles): its Rational holds the
    telegrapher's closed form of the exact line to the ladder's own error up to 1 GHz
    (regression: the leading gain overflowed a float and the public path refused)."""
    from taumatch.network import Network

    net = (Network().voltage_source("V", "src").resistor("Rs", "src", "in", 50.0)
           .line("T", "in", "out", length=0.5, r=0.2, l=250e-9, c=100e-12)
           .resistor("RL", "out", "0", 50.0).capacitor("CL", "out", "0", 10e-12))
    h = net.transfer("V", "out", line_sections=400)
    assert len(h.poles) >= 800
    f = np.logspace(4, 9, 60)
    want = telegrapher(f, 50.0, 0.5, 0.2, 250e-9, 100e-12, 1 / (1 / 50 + 2j * np.pi * f * 10e-12))
    ladder = net.response(f, "V", "out", line_sections=400)
    assert rel(h.freqresp(f), ladder) < 1e-8  # the Rational is the ladder
    # and the ladder is the line, to its own second-order error (about 1e-3 at 1 GHz, where a
    # section is 0.04 rad long, falling as f^2: own derivation)
    low = f <= 3e8
    assert rel(h.freqresp(f[low]), want[low]) < 2e-4
    assert rel(h.freqresp(f), want) < 2e-3
    assert h.dc_gain == pytest.approx(50 / (100 + 0.1), rel=1e-9)


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_network_transfer_on_every_example(path):
    """The model's transfer function (Network.transfer with the section count chosen once)
    holds the exact response to the ladder's promise (0.1 %) up to its band, on every example
    (regression: bench-probe and active-probe failed 'gain is beyond the float range')."""
    m = ChainModel(load(path))
    h = m.transfer
    f_top = m.f_max if m.has_lines else 3 * m.bandwidth
    f = np.logspace(np.log10(f_top) - 5, np.log10(f_top), 120)
    assert rel(h.freqresp(f), m.response(f)) <= 1.05e-3
    assert m.transfer_info.check_error < 1e-6


def test_one_bandwidth_run_builds_each_network_once():
    """`taumatch bandwidth` asks the model: each build once, the -3 dB point found once."""
    import taumatch.chain.model as cm
    from taumatch import network
    from taumatch.analysis import chain_figures

    builds, finds = [], []
    real_build, real_find = cm.build, network.find_bandwidth

    def counting_build(c, mode="full", **kw):
        if c is chain:  # the damping advice builds changed chains of its own
            builds.append((mode, kw.get("edge", True)))
        return real_build(c, mode, **kw)

    def counting_find(*a, **kw):
        finds.append(1)
        return real_find(*a, **kw)

    # bench-probe: cables, a lead loop within the target (no damping search of changed chains)
    chain = load(Path(__file__).parent.parent / "examples" / "bench-probe.toml")
    with mock.patch.object(cm, "build", counting_build), \
            mock.patch.object(network, "find_bandwidth", counting_find):
        figs = chain_figures(chain)
        figs.summary()
        figs.to_dict()
    assert len(builds) == len(set(builds)) and len(finds) == 1


def test_coax_box_headlines_peaking_and_overshoot():
    """examples/coax-box.toml (invented): the wire and the plain cable resonate; the first
    line names the peaking (about +28 dB near 77 MHz) and the step's overshoot (about 300 %),
    and the peak agrees with a dense sweep of the exact response."""
    from taumatch.analysis import chain_figures

    figs = chain_figures(load(Path(__file__).parent.parent / "examples" / "coax-box.toml"))
    first = figs.summary().splitlines()[0]
    assert first.startswith("WARNING") and "peaks +28" in first and "overshoots" in first
    assert 70e6 < figs.band.peak_frequency < 85e6 and figs.step.overshoot > 2.5
    f = np.linspace(60e6, 95e6, 20001)
    h = np.abs(figs.model.response(f)) / figs.dc_gain
    assert figs.band.peak_frequency == pytest.approx(f[np.argmax(h)], abs=2e3)
    assert figs.band.peaking_db == pytest.approx(20 * np.log10(h.max()), abs=1e-6)


def test_many_parts_and_many_cables_run(bad_inputs):
    """A lumped chain of 128 parts and the 40-cable reproducer answer (no timing asserted:
    bench/bench_chain.py measures speed)."""
    from taumatch.analysis import chain_figures

    parts = []
    for k in range(63):
        parts += [Series(r=10.0, l=5e-9), Shunt(c=1e-12)]
    parts += [Lead(length=0.01, radius=0.3e-3), Input(r=1e6, c=10e-12)]
    figs = chain_figures(Chain(Source(50.0), tuple(parts)))
    assert np.isfinite(figs.band.upper) and figs.step is not None
    figs = chain_figures(load(bad_inputs / "many_cables_40.toml"))
    assert figs.summary() and figs.dc_gain > 0

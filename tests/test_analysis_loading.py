"""Loading (Z_in, R || C, edge slowing) and ground-lead ringing."""

import math

import numpy as np
import pytest

from taumatch.analysis import ChainModel, loading, ringing, zeta_from_overshoot
from taumatch.analysis.ringing import damping_resistance, dominant_pair, overshoot_from_zeta
from taumatch.chain import Chain, Input, Lead, Series, Source


def compensated_probe(rs=50.0):
    """R1 = 9 Mohm, C1 = 12.22 pF over R2 = 1 Mohm, C2 = 110 pF (CHECKS.md)."""
    return Chain(Source(rs), (Series(r=9e6, c=110e-12 / 9), Input(r=1e6, c=110e-12)))


def test_compensated_divider_loading():
    """The circuit sees 10 Mohm || 11.0 pF (CHECKS.md; Millman & Taub): C1 C2/(C1 + C2)."""
    load = loading(ChainModel.from_chain(compensated_probe()))
    assert load.r == pytest.approx(10e6, rel=1e-6)
    c1, c2 = 110e-12 / 9, 110e-12
    assert load.c == pytest.approx(c1 * c2 / (c1 + c2), rel=1e-9)
    assert load.c == pytest.approx(11.0e-12, rel=1e-3)
    # Z_in is 10 Mohm || 11 pF at every frequency of the sweep (compensated: one pole)
    y = 1 / load.impedance
    want = 1 / 10e6 + 2j * np.pi * load.freqs * c1 * c2 / (c1 + c2)
    assert np.allclose(y, want, rtol=1e-9)


def test_edge_slowing_rc():
    """Ideal source edge through 1 kohm into 11 pF: the probe point rises in ln 9 R C (CHECKS.md,
    first-order 10-90 %); without the probe it is the source edge (0)."""
    load = loading(ChainModel.from_chain(compensated_probe(rs=1e3)))
    c = load.c
    assert load.rise_without_probe == 0.0
    assert load.rise_with_probe == pytest.approx(math.log(9) * 1e3 * c, rel=1e-4)


def test_ringing_lead_model_values():
    """150 nH with 10 pF rings at 129.9 MHz; sqrt(L/C) = 122 ohm, about 245 ohm damps it
    critically (CHECKS.md, own derivation)."""
    chain = Chain(Source(50.0), (Series(l=150e-9), Input(r=1e12, c=10e-12)))
    ring = ringing(ChainModel.from_chain(chain), target_overshoot=0.05, poles=True)
    assert ring.inductance == pytest.approx(150e-9)
    assert ring.capacitance == pytest.approx(10e-12, rel=1e-6)
    assert ring.lead.frequency == pytest.approx(129.9e6, rel=5e-4)
    assert ring.lead.damping == pytest.approx(25 * math.sqrt(10e-12 / 150e-9), rel=1e-6)
    assert damping_resistance(150e-9, 10e-12, 1.0) == pytest.approx(245, abs=0.5)
    assert math.sqrt(150e-9 / 10e-12) == pytest.approx(122, abs=0.5)
    # the target: zeta for 5 % (Ogata), R that reaches it
    zt = zeta_from_overshoot(0.05)
    assert ring.damping_resistance == pytest.approx(2 * zt * math.sqrt(15e3) - 50.0, rel=1e-9)
    # for a pure series RLC the dominant pole pair is the same second-order system
    assert ring.dominant.frequency == pytest.approx(ring.lead.frequency, rel=1e-6)
    assert ring.dominant.damping == pytest.approx(ring.lead.damping, rel=1e-6)
    assert ring.lead.q == pytest.approx(1 / (2 * ring.lead.damping))


def test_damped_lead_overshoot_matches_step():
    """Adding the damping resistance gives the target overshoot in the exact step (Ogata:
    OS = exp(-zeta pi / sqrt(1 - zeta^2)))."""
    chain = Chain(Source(20.0), (Series(l=150e-9), Input(r=1e12, c=10e-12)))
    ring = ringing(ChainModel.from_chain(chain), target_overshoot=0.10)
    damped = Chain(Source(20.0 + ring.damping_resistance), chain.parts)
    h = ChainModel.from_chain(damped).transfer
    t = np.linspace(0, 20e-9, 20001)
    assert h.step(t).max() - 1 == pytest.approx(0.10, abs=2e-4)


def test_ogata_overshoot_values():
    """Ogata / Nise: zeta 0.3 -> 37.23 %, 0.5 -> 16.30 %, 0.7 -> 4.60 %; 20 % -> zeta 0.4559."""
    assert overshoot_from_zeta(0.3) == pytest.approx(0.3723, abs=5e-5)
    assert overshoot_from_zeta(0.5) == pytest.approx(0.1630, abs=5e-5)
    assert overshoot_from_zeta(0.7) == pytest.approx(0.0460, abs=5e-5)
    assert zeta_from_overshoot(0.20) == pytest.approx(0.4559, abs=5e-5)


def test_lead_length_for_target():
    """Grover lead: the returned length has the inductance that meets the target with this R, C."""
    from taumatch.chain import grover_inductance

    lead = Lead(length=0.1524, radius=0.5e-3)
    chain = Chain(Source(25.0), (lead, Input(r=1e12, c=9e-12)))
    ring = ringing(ChainModel.from_chain(chain), target_overshoot=0.05)
    zt = zeta_from_overshoot(0.05)
    assert grover_inductance(ring.max_lead_length, 0.5e-3) == pytest.approx(
        9e-12 * (25.0 / (2 * zt)) ** 2, rel=1e-6)
    assert ring.max_lead_length < 0.1524


def test_dominant_pair_of_known_rational():
    """A known pair at -1 +- 10j (weight 1) beside a small one: the big one is chosen."""
    from taumatch.lti import Rational

    h = Rational.from_zpk([], [-1 + 10j, -1 - 10j], 101.0) * Rational.from_zpk(
        [-1000.0], [-1000 + 1e4j, -1000 - 1e4j], 1.0101e8 / 1000)
    d = dominant_pair(h)
    assert d.frequency == pytest.approx(abs(-1 + 10j) / (2 * math.pi), rel=1e-9)


def test_no_ringing_without_lead():
    assert ringing(ChainModel.from_chain(compensated_probe())) is None


def test_damping_advice_is_held_to_the_exact_step():
    """The advice printed is borne out by the tool's own exact step: with the resistance it
    names added in the lead loop, the step overshoots no more than the target (plus the
    stated slack); where no resistance can (the coax box's plain cable reflects), it says
    the cause. Overshoot of the changed chain read off its exact step (IEEE 181 definition)."""
    from pathlib import Path

    from taumatch.analysis import chain_figures, step_figures
    from taumatch.analysis.damping import SLACK
    from taumatch.chain import load
    from taumatch.chain.topology import lead_loop, with_series_resistance

    examples = Path(__file__).parent.parent / "examples"
    chain = load(examples / "ground-lead.toml")
    advice = chain_figures(chain, target_overshoot=0.05).ringing.advice
    assert advice.resistance is not None
    damped = with_series_resistance(chain, lead_loop(chain).first_probe_part,
                                    advice.resistance)
    assert step_figures(ChainModel(damped).step).overshoot <= 0.05 + SLACK
    box = chain_figures(load(examples / "coax-box.toml"), target_overshoot=0.05)
    adv = box.ringing.advice
    assert adv.resistance is None and adv.model_resistance_overshoot > 1.0
    assert "reflections on the cable" in adv.cause
    assert "not enough" in box.summary() and "dominant cause" in box.summary()

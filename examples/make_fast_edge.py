"""Make the fast-edge example's captures: an INVENTED scenario, simulated, not measured.

The probe of examples/fast-edge-probe.toml as it "really" is: a 35 mm ground spring (not
30 mm), 170 Ω/m of cable loss (not 150), and its compensation box mistrimmed: the
high-frequency branch at 110 Ω and 24 pF, the low-frequency trimmer at 20 pF.

* ``fast-edge-capture.csv``: the 2 V, 200 ps pulser's step through that probe, 10 GS/s,
  20 ns before and 150 ns after the edge, 8 bits over 300 mV, 256 acquisitions averaged
  (each with one code rms of noise), as an oscilloscope's averaging mode records it.  The
  step is the chain's exact response (taumatch's own chain model: cable by the
  telegrapher's equations, numerical inverse Laplace transform to 1e-9; the test suite
  checks the diagnosis on captures made by an independent path, tests/edge_synth.py).
* ``fast-edge-1khz.csv``: the same probe on a 5 V, 1 kHz reference square wave (400 ns
  edge), 3 periods at 1 MS/s, 8 bits over 1.6 V, 4 mV rms noise: the two-arm divider
  (9 MΩ ∥ 11.5 pF over 1 MΩ ∥ 118 pF, every capacitance to ground after the tip arm) in
  closed form.

Seeded, so the files are reproducible::

    python examples/make_fast_edge.py
"""

from __future__ import annotations

import io
import math
from pathlib import Path

import numpy as np

from taumatch.atomic import atomic_write
from taumatch.chain import load
from taumatch.chain.cascade import Cascade
from taumatch.chain.two_arm import TwoArm
from taumatch.lti import Rational
from taumatch.network.inverse_laplace import step_response

HERE = Path(__file__).resolve().parent
SEED = 20261202


def truth():
    """The probe as it is: the spec with the values the drawing does not know."""
    chain = load(HERE / "fast-edge-probe.toml")
    chain = chain.with_value(1, "length", 0.035)  # ground spring
    chain = chain.with_value(3, "r", 170.0)  # cable loss per metre
    for field, value in (("branch.r", 110.0), ("branch.c", 24e-12), ("c", 20e-12)):
        chain = chain.with_value(4, field, value)
    return chain


def fast_edge(rng):
    chain = truth()
    dt, pre, post, t_edge = 100e-12, 200, 1500, 1e-9
    c = Cascade(chain)
    st = step_response(lambda s: c.transfer(s, edge=True), (post + 10) * dt, tol=1e-9,
                       scale=2 * math.pi * 1e9)
    t = np.arange(-pre, post) * dt
    y = chain.source.amplitude * np.interp(t - t_edge, st.t, st.y, left=0.0)
    return t, _averaged(y, rng, full_scale=0.3, bits=8, noise_codes=1.0, averages=256)


def _averaged(y, rng, *, full_scale, bits, noise_codes, averages):
    code = full_scale / 2**bits
    lo = -full_scale / 8
    acc = np.zeros_like(y)
    for _ in range(averages):
        raw = np.round((y + rng.normal(0.0, noise_codes * code, y.size) - lo) / code)
        acc += np.clip(raw, 0, 2**bits - 1) * code + lo
    return acc / averages


def one_khz(rng):
    chain = truth()
    d = TwoArm.from_chain(chain)
    edge = 400e-9 / math.log(9.0)
    h = d.rational() * Rational.from_zpk([], [-1 / edge], 1 / edge)
    period, dt = 1e-3, 1e-6
    t = np.arange(round(3 * period / dt)) * dt
    v = 5.0 * h.square(t + 0.23 * period, period, 0.5) + rng.normal(0.0, 4e-3, t.size)
    lsb = 1.6 / 2**8
    v = np.clip(np.round((v + 0.4) / lsb), 0, 255) * lsb - 0.4
    return t, v


def _write(path, t, v, what):
    buf = io.StringIO()
    buf.write(f"# INVENTED SCENARIO: simulated by examples/make_fast_edge.py ({what})\n")
    buf.write("Time (s),CH1 (V)\n")
    np.savetxt(buf, np.column_stack([t, v]), delimiter=",", fmt=["%.7e", "%.7g"])
    atomic_write(path, buf.getvalue())
    return path


def main():
    rng = np.random.default_rng(SEED)
    return (_write(HERE / "fast-edge-capture.csv", *fast_edge(rng), "fast edge"),
            _write(HERE / "fast-edge-1khz.csv", *one_khz(rng), "1 kHz square"))


if __name__ == "__main__":
    for p in main():
        print(p)

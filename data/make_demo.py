"""Make the demo capture: an INVENTED scenario simulated with taumatch's own closed-form model.

The probe of data/demo_chain.toml with its trimmer turned from 17.5 pF down to 9 pF
(over-compensated), driven by a 2 V, 1 kHz square wave with a 400 ns edge, seen through
the instrument's 200 MHz front end; 4 periods sampled at 12.5 MS/s (five samples on each edge), 8-bit quantisation
over a 400 mV span, 1.2 mV rms noise, 3 mV offset.  Seeded, so the file is reproducible:

    python data/make_demo.py        # rewrites data/demo_capture.csv

The tip arm, cable and input values are those of the spec: C2 = 1.2 m × 60 pF/m + 9 pF
+ 14 pF = 95 pF against R1·C1/R2 = 103.5 pF.
"""

from __future__ import annotations

import io
from pathlib import Path

import numpy as np

from taumatch.atomic import atomic_write
from taumatch.fit.models import chain_rational
from taumatch.lti import Rational

HERE = Path(__file__).resolve().parent
R1, C1 = 9e6, 11.5e-12
R2 = 1e6
C2 = 1.2 * 60e-12 + 9e-12 + 14e-12  # cable + drifted trimmer + input
AMPLITUDE, PERIOD, EDGE = 2.0, 1e-3, 400e-9
FRONT_END = 200e6
DT = 80e-9
PERIODS = 4
SPAN, BITS, NOISE, OFFSET = 0.4, 8, 1.2e-3, 3e-3


def simulate(seed: int = 20261201) -> tuple[np.ndarray, np.ndarray]:
    w = 2 * np.pi * FRONT_END
    H = chain_rational(R1, C1, R2, C2, edge=EDGE) * Rational.from_zpk([], [-w], w)
    t = np.arange(int(round(PERIODS * PERIOD / DT))) * DT
    start = 0.23 * PERIOD  # the record starts part-way into a period
    v = OFFSET + AMPLITUDE * H.square(t + start, PERIOD, 0.5)
    rng = np.random.default_rng(seed)
    v = v + rng.normal(0.0, NOISE, t.size)
    lsb = SPAN / 2**BITS
    v = np.clip(np.round((v + 0.1 * SPAN) / lsb), 0, 2**BITS - 1) * lsb - 0.1 * SPAN
    return t, v


def main() -> Path:
    t, v = simulate()
    buf = io.StringIO()
    buf.write("# INVENTED SCENARIO: simulated by data/make_demo.py, not a measurement\n")
    buf.write("Record,demo probe on 1 kHz reference\n")
    buf.write(f"Sample interval,{DT:g}\n")
    buf.write("Vertical span,0.4 V (8 bit)\n")
    buf.write("Time (s),CH1 (V)\n")
    np.savetxt(buf, np.column_stack([t, v]), delimiter=",", fmt=["%.7e", "%.6g"])
    out = HERE / "demo_capture.csv"
    atomic_write(out, buf.getvalue())
    return out


if __name__ == "__main__":
    print(main())

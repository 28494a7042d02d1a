"""Write the synthetic captures the diagnosis regression tests use.  All data are invented.

Run ``python tests/data/diagnosis/make_diagnosis_captures.py`` (from the repository root)
to make them again; ``tests/test_diagnosis_regressions.py`` also regenerates them in a
temporary folder and checks the stored copies are identical.

Each file imitates one way real 8-bit instruments broke the diagnosis (see the README
beside this script); the waveforms come from the textbook divider response
(``tests/divider_synth.py``: Millman & Taub / Boylestad, continuity at the edges) or from
a flat square with first-order edges, with seeded Gaussian noise and rounding to the
converter's codes.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))  # tests/, for divider_synth
from divider_synth import c1_for_error, textbook_square

PERIOD = 1e-3  # s: a 1 kHz calibrator
DIGITS = "%.9g"


def flat_square(t, swing, low=0.0, edge_tau=1.5e-6, period=PERIOD):
    """A square wave with first-order edges and flat plateaus (no divider), steady state."""
    ph = np.mod(t, period)
    half = period / 2
    a = np.exp(-half / edge_tau)
    v_lo = a / (1 + a)
    rise = 1 - (1 - v_lo) * np.exp(-ph / edge_tau)
    fall = (1 - (1 - v_lo) * a) * np.exp(-(ph - half) / edge_tau)
    return low + swing * np.where(ph < half, rise, fall)


def converter(v, code, bottom, codes=256):
    """Round to the converter's codes; the rails are its lowest and highest code (V)."""
    return bottom + code * np.clip(np.round((v - bottom) / code), 0, codes - 1)


def captures() -> dict[str, tuple[np.ndarray, np.ndarray]]:
    """File name to (time in s, samples in V)."""
    out = {}
    # A flat 0.3 V calibrator square through a compensated 10:1 probe on an 8-bit
    # instrument at 200 mV/div: 8 mV codes, noise under half a code, 1400 points at 5 µs.
    # (Seed chosen so that the diagnosis at ea9c41b refused it as clipped.)
    rng = np.random.default_rng(1)
    t = -3.5e-3 + 5e-6 * np.arange(1400)
    v = flat_square(t, 0.3, low=0.01) + rng.normal(0, 0.003, t.size)
    out["eight_bit_plateau.csv"] = t, converter(v, 0.008, -1.0)
    # The same square at 5 V/div-like resolution: 40 mV codes, 7.5 of them on the swing,
    # a tenth of a code of noise, 65 periods at 8 µs.  (Seed chosen so that the diagnosis
    # at ea9c41b took the C1 → ∞ branch: "over-compensated +898 %", exit 0.)
    rng = np.random.default_rng(0)
    t = -0.032768 + 8e-6 * np.arange(8192)
    v = flat_square(t, 0.3, low=-0.01) + rng.normal(0, 0.004, t.size)
    out["coarse_flat.csv"] = t, converter(v, 0.04, -2.0)
    # The calibrator straight into the input (1X): 3 V at 1 V/div, 40 mV codes.
    # (At ea9c41b: "compensated", read as a 10:1 probe on a 30 V source, no hint.)
    rng = np.random.default_rng(3)
    t = -0.04096 + 1e-5 * np.arange(8192)
    v = flat_square(t, 3.0, low=-0.12) + rng.normal(0, 0.012, t.size)
    out["one_x_flat.csv"] = t, converter(v, 0.04, -4.0)
    # An over-compensated (+30 %) 10:1 probe whose peaked corner runs into the top rail
    # of an 8-bit converter spanning −0.2…0.6 V, about 70 µs of each period lost.
    # (At ea9c41b: "clipped", without the rail, its level, the share lost or what to change.)
    rng = np.random.default_rng(4)
    t = np.arange(25000) * 4e-7
    v = textbook_square(t + 0.37e-4, 9e6, c1_for_error(0.3), 1e6, 100e-12, 5.0, PERIOD) + 0.02
    v = v + rng.normal(0, 0.004, t.size)
    out["clipped_corner.csv"] = t, converter(v, 0.8 / 256, -0.2)
    # One rising edge (3 µs, 10-90 %) at 10 ns per point on an 8-bit instrument: no period.
    # (At ea9c41b: refused as clipped as well as for the missing period.)
    rng = np.random.default_rng(1)
    t = -2.52e-6 + 1e-8 * np.arange(1400)
    v = 0.3 * (1 - np.exp(-np.clip(t, 0, None) / (3e-6 / np.log(9)))) * (t > 0)
    v = v + rng.normal(0, 0.002, t.size)
    out["single_edge.csv"] = t, converter(v, 0.002, -0.1)
    return out


def text(t, v) -> bytes:
    lines = ["Time (s),CH1 (V)"] + [f"{DIGITS % a},{DIGITS % b}" for a, b in zip(t, v)]
    return ("\n".join(lines) + "\n").encode("ascii")


def write_all(folder) -> list[Path]:
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    written = []
    for name, (t, v) in captures().items():
        (folder / name).write_bytes(text(t, v))
        written.append(folder / name)
    return written


if __name__ == "__main__":
    target = Path(sys.argv[1]) if len(sys.argv) > 1 else Path(__file__).parent
    for p in write_all(target):
        print(p)

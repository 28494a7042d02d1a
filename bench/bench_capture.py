"""Benchmark: reading a 1e7-row capture and averaging a 1e7-sample record.

Run:  PYTHONPATH=src python bench/bench_capture.py [rows]

Prints, each measured side by side in this run (best of three; the read comparison alternates five times):

* ``taumatch.capture.read`` against a bare ``pandas.read_csv`` of the same two-column
  CSV (target: ratio within 1.2);
* ``taumatch.pulse.average_period`` (and ``measure``) on a 1e7-sample noisy square wave
  against one numpy pass over the same data (``np.diff``), with the absolute time
  (target: under a second).

The data are invented (a noisy 0–1 V square wave); the file is written to a temporary
folder and removed afterwards.
"""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd

from taumatch.capture import read
from taumatch.pulse import average_period, measure
from timing import best_of  # noqa: E402 - bench/ is on sys.path when run as a script


def square(n, dt=1e-9, period=1000.37e-9, seed=1):
    rng = np.random.default_rng(seed)
    t = np.arange(n) * dt
    ph = np.mod(t, period)
    v = np.clip(ph / 5e-9, 0, 1) - np.clip((ph - period / 2) / 5e-9, 0, 1)
    return t, v + rng.normal(0, 0.05, n)


def main(rows: int = 10_000_000) -> None:
    t, v = square(rows)
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "capture.csv"
        t0 = time.perf_counter()
        pd.DataFrame({"Time (s)": t, "CH1 (V)": v}).to_csv(path, index=False,
                                                           float_format="%.9e")
        print(f"wrote {rows:.3g} rows ({path.stat().st_size / 1e6:.0f} MB) in "
              f"{time.perf_counter() - t0:.1f} s")
        # alternate the two so that caching and machine load hit both alike
        ours, bare = [], []
        for _ in range(5):
            ours.append(best_of(lambda: read(path), 1)[0])
            bare.append(best_of(lambda: pd.read_csv(path), 1)[0])
        print(f"read:      taumatch {min(ours):.3f} s, bare pandas.read_csv {min(bare):.3f} s, "
              f"ratio {min(ours) / min(bare):.2f} (target <= 1.2)")
    ref = best_of(lambda: np.diff(v))[0]
    avg, ap = best_of(lambda: average_period((t, v)))
    meas = best_of(lambda: measure((t, v)), 2)[0]
    print(f"average:   {avg:.3f} s for {rows:.3g} samples ({ap.n_periods} periods), "
          f"one numpy pass (np.diff) {ref:.3f} s, ratio {avg / ref:.1f} (target < 1 s)")
    print(f"measure:   {meas:.3f} s (levels, edges, averaging, metrics, quality flags)")
    print(f"noise:     {ap.noise_rms_before:.4g} V rms before, {ap.noise_rms_after:.4g} V after, "
          f"ratio {ap.noise_rms_before / ap.noise_rms_after:.1f} vs sqrt(N) = "
          f"{np.sqrt(ap.n_periods):.1f}")


if __name__ == "__main__":
    main(int(float(sys.argv[1])) if len(sys.argv) > 1 else 10_000_000)

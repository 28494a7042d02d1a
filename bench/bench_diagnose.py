"""`taumatch diagnose` on a 1e7-sample CSV capture against a bare pandas parse of the same file.

Measured side by side in one run (best of a few repeats each):

* the reference: a fresh ``python -c "import pandas; pandas.read_csv(FILE)"`` (C engine);
* ``taumatch diagnose FILE --json`` as a fresh process (start-up and imports included on
  both sides), and the same work in this process (read, average, measure, fit, trim);
* the fit alone on the averaged period.

Goal: the diagnosis within 1.5× the bare parse, the fit well under a second.
The capture is the demo's invented scenario (data/make_demo.py) stretched to 1e7 samples.

Run: python bench/bench_diagnose.py [--rows N]   (prints; asserts nothing)
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd
from timing import best_of  # noqa: E402 - bench/ is on sys.path when run as a script

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "data"))


def make_file(path: Path, rows: int) -> None:
    import make_demo as demo
    from taumatch.fit.models import divider_rational, edge_rational

    dt = 1e-8  # 100 MS/s, so 1e7 samples hold 100 periods of 1 kHz
    H = divider_rational(demo.R1, demo.C1, demo.R2, demo.C2) * edge_rational(demo.EDGE)
    rng = np.random.default_rng(1)
    with open(path, "w") as fh:
        fh.write("Time (s),CH1 (V)\n")
        chunk = 1_000_000
        for start in range(0, rows, chunk):
            n = min(chunk, rows - start)
            t = (start + np.arange(n)) * dt
            v = 0.003 + demo.AMPLITUDE * H.square(t + 0.23e-3, demo.PERIOD, 0.5)
            v = np.round((v + rng.normal(0, demo.NOISE, n)) / 0.0015625) * 0.0015625
            np.savetxt(fh, np.column_stack([t, v]), delimiter=",", fmt=["%.8e", "%.6g"])


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--rows", type=int, default=10_000_000)
    ap.add_argument("--repeat", type=int, default=2)
    args = ap.parse_args()
    from taumatch.capture import read
    from taumatch.diagnosis import diagnose
    from taumatch.fit import fit_divider

    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "capture.csv"
        t0 = time.perf_counter()
        make_file(path, args.rows)
        print(f"wrote {args.rows:.3g} rows ({path.stat().st_size / 1e6:.0f} MB) in "
              f"{time.perf_counter() - t0:.1f} s")
        import subprocess

        def proc(cmd):
            return lambda: subprocess.run(cmd, check=True, capture_output=True)

        ref_p, _ = best_of(proc([sys.executable, "-c",
                              f"import pandas; pandas.read_csv({str(path)!r}, engine='c')"]),
                        args.repeat)
        cli_p, _ = best_of(proc([sys.executable, "-m", "taumatch", "diagnose", str(path), "--json"]),
                        args.repeat)
        import lmfit  # noqa: F401 - the in-process figures leave start-up out on both sides

        ref, _ = best_of(lambda: pd.read_csv(path, engine="c"), args.repeat)
        whole, d = best_of(lambda: diagnose(read(path)), args.repeat)
        ap_ = d.metrics.averaged
        fit_t, _ = best_of(lambda: fit_divider(ap_.t, ap_.v, ap_.period, ap_.duty,
                                            noise_rms=ap_.noise_rms_after), 3)
    print(f"process: python -c 'pandas.read_csv'  {ref_p:7.2f} s")
    print(f"process: taumatch diagnose --json      {cli_p:7.2f} s   ratio {cli_p / ref_p:.2f} "
          "(goal <= 1.5)")
    print(f"bare pandas.read_csv        {ref:7.2f} s")
    print(f"read + measure + fit + trim {whole:7.2f} s   ratio {whole / ref:.2f} (goal <= 1.5)")
    print(f"fit alone                   {fit_t:7.2f} s   ({d.fit.points} points)")
    print(f"verdict {d.verdict}, shunt change {d.trim['shunt_change'] * 1e12:.3f} pF "
          f"(truth 8.5 pF)")


if __name__ == "__main__":
    main()

"""`taumatch diagnose` on CSV captures of 1e4 to 1e7 samples against a bare pandas parse of
the same file, side by side in one run.

For each size, as fresh processes (start-up and imports included on every side), medians
of alternated runs (``timing.alternate``; the machine is shared, two cores):

* the reference: ``python -c "import pandas; pandas.read_csv(FILE)"`` (C engine);
* ``taumatch diagnose FILE --json`` (goal at 1e7 samples: within 1.5×) and
  ``taumatch measure FILE --json`` (the same reading and averaging, no fit);
* at 1e5 samples also ``python -c "import lmfit, pandas"`` (goal: diagnose within 1.3×);
* with ``--baseline SRC`` (the ``src`` folder of another checkout), ``diagnose`` and
  ``measure`` with that package too, in the same alternation (marked ``[b]``).

Then, in this process at the largest size: read + measure + fit + trim against a bare
``pandas.read_csv``, and the fit alone on the averaged period.

The captures are the demo's invented scenario (data/make_demo.py: a 10:1 probe on a 1 kHz
square wave, over-compensated) sampled finer and for longer: 10 periods up to 1e5 samples,
100 periods from 1e6.  Written to a temporary folder and removed afterwards.

Run: python bench/bench_diagnose.py [--sizes 1e4,1e5,1e6,1e7] [--rounds N] [--baseline SRC]
(prints; asserts nothing: tests never assert wall-clock times)
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "data"))
from timing import alternate, baseline_note, best_of, describe, python_c, taumatch


def make_file(path: Path, rows: int) -> None:
    import make_demo as demo

    from taumatch.fit.models import chain_rational

    periods = 10 if rows < 1_000_000 else 100
    dt = periods * demo.PERIOD / rows
    H = chain_rational(demo.R1, demo.C1, demo.R2, demo.C2, edge=demo.EDGE)
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


def as_commands(path: Path, rows: int, rounds: int, baseline=None) -> dict:
    cases = {"pandas": python_c(f"import pandas; pandas.read_csv({str(path)!r}, engine='c')"),
             "diagnose": taumatch("diagnose", str(path), "--json"),
             "measure": taumatch("measure", str(path), "--json")}
    if baseline:
        cases["diagnose_b"] = taumatch("diagnose", str(path), "--json", source=baseline)
        cases["measure_b"] = taumatch("measure", str(path), "--json", source=baseline)
    if rows == 100_000:
        cases["lmfit+pandas"] = python_c("import lmfit, pandas")
    return alternate(cases, rounds)


def in_process(path: Path, rounds: int) -> None:
    import lmfit  # noqa: F401 - the in-process figures leave start-up out on both sides
    import pandas as pd

    from taumatch.capture import read
    from taumatch.diagnosis import diagnose
    from taumatch.fit import fit_divider

    med = alternate({"pandas": lambda: pd.read_csv(path, engine="c"),
                     "whole": lambda: diagnose(read(path))}, rounds)
    d = diagnose(read(path))
    ap_ = d.metrics.averaged
    fit_t, _ = best_of(lambda: fit_divider(ap_.t, ap_.v, ap_.period, ap_.duty,
                                           noise_rms=ap_.noise_rms_after), 3)
    print(f"in process: bare pandas.read_csv {med['pandas']:7.3f} s; read + measure + fit + trim "
          f"{med['whole']:7.3f} s, ratio {med['whole'] / med['pandas']:.2f}")
    print(f"fit alone {fit_t:7.3f} s ({d.fit.points} points); verdict {d.verdict}, shunt change "
          f"{d.trim.change * 1e12:.3f} pF (truth 8.5 pF)")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sizes", default="1e4,1e5,1e6,1e7")
    ap.add_argument("--rounds", type=int, default=5)
    ap.add_argument("--rounds-1e7", type=int, default=3, help="rounds at 1e7 samples and more")
    ap.add_argument("--no-process", action="store_true", help="skip the in-process figures")
    ap.add_argument("--baseline", default=None, metavar="SRC")
    args = ap.parse_args()
    sizes = [int(float(s)) for s in args.sizes.split(",")]
    print(f"medians of alternated runs ({args.rounds}, {args.rounds_1e7} at 1e7 samples); "
          f"shared 2-core machine; {describe()}")
    if args.baseline:
        print(baseline_note(args.baseline))
    print(f"{'samples':>8s} {'MB':>5s} {'pandas':>8s} {'diagnose':>9s} {'measure':>8s} "
          f"{'diag/pd':>8s} {'meas/pd':>8s}")
    with tempfile.TemporaryDirectory() as tmp:
        path = None
        for rows in sizes:
            path = Path(tmp) / f"capture-{rows}.csv"
            make_file(path, rows)
            rounds = args.rounds_1e7 if rows >= 10_000_000 else args.rounds
            med = as_commands(path, rows, rounds, args.baseline)
            goal = "  (goal <= 1.5)" if rows >= 10_000_000 else ""
            print(f"{rows:8.0e} {path.stat().st_size / 1e6:5.0f} {med['pandas']:7.3f}s "
                  f"{med['diagnose']:8.3f}s {med['measure']:7.3f}s "
                  f"{med['diagnose'] / med['pandas']:8.2f} {med['measure'] / med['pandas']:8.2f}"
                  f"{goal}")
            if args.baseline:
                print(f"{'[b]':>14s} {'':8s} {med['diagnose_b']:8.3f}s {med['measure_b']:7.3f}s "
                      f"{med['diagnose_b'] / med['pandas']:8.2f} "
                      f"{med['measure_b'] / med['pandas']:8.2f}")
            if "lmfit+pandas" in med:
                r = med["lmfit+pandas"]
                print(f"{'':8s} python -c 'import lmfit, pandas' {r:.3f} s; diagnose / that "
                      f"{med['diagnose'] / r:.2f} (goal <= 1.3)"
                      + (f"; [b] {med['diagnose_b'] / r:.2f}" if args.baseline else ""))
        if path is not None and not args.no_process:
            in_process(path, 3)


if __name__ == "__main__":
    t0 = time.perf_counter()
    main()
    print(f"(whole run {time.perf_counter() - t0:.1f} s)")

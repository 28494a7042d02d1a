"""Chain commands against the bare exact computation, side by side in one run.

For every example (and the 40-cable reproducer when ../shared is beside the clone):

* in process: ``chain_figures`` (what ``taumatch bandwidth`` computes) against the bare
  exact computation of the same chain -- a numpy evaluation of its exact response at 2,000
  frequencies (the two-port cascade), a -3 dB root find (brentq) and the step by the
  numerical inverse Laplace transform, 10-90 % read off;
* as commands: ``taumatch bandwidth SPEC`` against ``taumatch --version``, each with one
  and with two BLAS threads (``OPENBLAS_NUM_THREADS``; the command line chooses one for
  these small problems unless the variable is set).

Prints ratios; asserts nothing (tests never assert wall-clock times).  Run as
``python bench/bench_chain.py``.
"""

from __future__ import annotations

import math
import os
import subprocess
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from timing import best_of

ROOT = Path(__file__).resolve().parents[1]


def bare(chain):
    """The bare exact computation (see the module text)."""
    from scipy.optimize import brentq

    from taumatch.chain.cascade import Cascade
    from taumatch.network.inverse_laplace import step_response

    c = Cascade(chain)
    f = np.logspace(3, 11, 2000)
    h = np.abs(c.response(f))
    dc = abs(c.response([0.0])[0])
    i = np.nonzero(h < dc / math.sqrt(2))[0]
    bw = math.nan
    if i.size and i[0] > 0:
        k = int(i[0])
        bw = brentq(lambda x: abs(c.response([x])[0]) - dc / math.sqrt(2), f[k - 1], f[k])
    t_end = 40 / (2 * math.pi * bw) if math.isfinite(bw) else 1e-6
    r = step_response(c.transfer, t_end, scale=2 * math.pi * 1e11)
    y = r.y / dc
    t10 = r.t[np.argmax(y >= 0.1)]
    t90 = r.t[np.argmax(y >= 0.9)]
    return bw, t90 - t10


def command(args, threads):
    env = dict(os.environ, OPENBLAS_NUM_THREADS=str(threads), OMP_NUM_THREADS=str(threads))

    def run():
        subprocess.run([sys.executable, "-m", "taumatch", *args], check=True,
                       capture_output=True, env=env)

    return best_of(run, 3)[0]


def main():
    from taumatch.analysis import chain_figures
    from taumatch.chain import load

    specs = sorted((ROOT / "examples").glob("*.toml"))
    many = ROOT.parent / "shared" / "bad-inputs" / "many_cables_40.toml"
    if many.exists():
        specs.append(many)
    print(f"{'chain':28s} {'figures':>9s} {'bare':>8s} {'ratio':>6s}   "
          f"{'cmd 1 thr':>9s} {'cmd 2 thr':>9s} {'--version':>9s} {'ratio':>6s}")
    for spec in specs:
        chain = load(spec)
        t_fig, _ = best_of(lambda c=chain: chain_figures(c), 3)
        t_bare, _ = best_of(lambda c=chain: bare(c), 3)
        c1 = command(["bandwidth", str(spec)], 1)
        c2 = command(["bandwidth", str(spec)], 2)
        v = command(["--version"], 1)
        print(f"{spec.stem[:28]:28s} {t_fig:9.3f} {t_bare:8.3f} {t_fig / t_bare:6.1f}   "
              f"{c1:9.3f} {c2:9.3f} {v:9.3f} {c1 / v:6.2f}")


if __name__ == "__main__":
    t0 = time.perf_counter()
    main()
    print(f"(whole run {time.perf_counter() - t0:.1f} s)")

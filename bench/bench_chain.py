"""Chain commands against the bare exact computation and against ``taumatch --version``,
side by side in one run.

For every example, two invented chains written by this script (four lossy cables among 36
lumped parts; a lumped ladder of 128 parts: the issue's "a few cables and a few dozen parts"
and "128 parts" cases) and the 40-cable reproducer when ../shared is beside the clone:

* in process: ``chain_figures`` (what ``taumatch bandwidth`` computes) against the bare
  exact computation of the same chain -- a numpy evaluation of its exact response at 2,000
  frequencies (the two-port cascade), a -3 dB root find (brentq) and the step by the
  numerical inverse Laplace transform, 10-90 % read off (goal: within 5×);
* as commands (fresh processes): ``taumatch bandwidth SPEC`` with one BLAS thread (what the
  command line chooses unless ``OPENBLAS_NUM_THREADS`` is set) and with two, and
  ``taumatch predict``, ``netlist`` and ``trim`` (when the spec marks a trimmer) against
  ``taumatch --version`` (goal for bandwidth: within 1.5×) and against
  ``python -c "import numpy, click"``, the floor of any command that computes with numpy.

With ``--baseline SRC`` (the ``src`` folder of another checkout), ``--version`` and
``bandwidth`` are run with that package too, in the same alternation (columns marked
``[b]``): before and after side by side.

Every comparison is the median of alternated runs (``timing.alternate``): the machine is
shared (two cores, other jobs), and one timing alone can be off by a factor of two.

Prints times and ratios; asserts nothing (tests never assert wall-clock times).  Run as
``python bench/bench_chain.py [--rounds N] [--only NAME] [--no-commands] [--baseline SRC]``.
"""

from __future__ import annotations

import argparse
import math
import os
import sys
import tempfile
import time
from pathlib import Path

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # in process as the command line runs

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from timing import alternate, baseline_note, describe, python_c, taumatch

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


def threads(n: int) -> dict:
    return {v: str(n) for v in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS")}


def synthetic_specs(folder: Path) -> list[Path]:
    """Two invented chains (demo data, not measurements), written as chain specs."""
    head = 'version = 1\nname = "{}"\n\n[source]\nresistance = "50"\namplitude = "1"\n' \
           'rise_time = "1n"\n'

    def part(kind, **v):
        return "\n[[part]]\nkind = \"" + kind + "\"\n" + "".join(
            f'{k} = "{x}"\n' for k, x in v.items())

    body = []
    for k in range(4):
        for j in range(9):
            body.append(part("series", r=f"{10 + j}", c=f"{20 + j}p") if j % 2 == 0
                        else part("shunt", c=f"{2 + j}p"))
        body.append(part("line", length="0.5", r="2", l="250n", c="100p"))
    body.append(part("input", r="1M", c="15p", bandwidth="500M"))
    a = folder / "cables4-parts36.toml"
    a.write_text(head.format("4 cables among 36 parts (invented)") + "".join(body))
    body = [part("series", r=f"{5 + k % 7}") if k % 2 == 0 else part("shunt", c=f"{1 + k % 5}p")
            for k in range(128)]
    body.append(part("input", r="1M", c="10p"))
    b = folder / "lumped128.toml"
    b.write_text(head.format("128 lumped parts (invented)") + "".join(body))
    return [a, b]


def has_trimmer(chain) -> bool:
    return any(getattr(p, "adjust", None) for p in chain.parts)


def in_process(specs, rounds):
    from taumatch.analysis import chain_figures
    from taumatch.chain import load

    print("in process (figures: chain_figures; bare: exact response, brentq, inverse Laplace)")
    print(f"{'chain':28s} {'figures':>9s} {'bare':>9s} {'ratio':>6s}  (goal <= 5)")
    ratios = []
    for spec in specs:
        chain = load(spec)
        med = alternate({"figures": lambda c=chain: chain_figures(c),
                         "bare": lambda c=chain: bare(c)}, rounds)
        r = med["figures"] / med["bare"]
        ratios.append(r)
        print(f"{spec.stem[:28]:28s} {med['figures'] * 1e3:7.1f}ms {med['bare'] * 1e3:7.1f}ms "
              f"{r:6.2f}")
    print(f"worst ratio {max(ratios):.2f}\n")


def as_commands(specs, rounds, baseline=None):
    from taumatch.chain import load

    print("as commands, fresh processes (ms; ratios to taumatch --version and to "
          "python -c 'import numpy, click')")
    print(f"{'chain':28s} {'--version':>9s} {'np+click':>9s} {'bw 1thr':>8s} {'bw 2thr':>8s} "
          f"{'predict':>8s} {'netlist':>8s} {'trim':>8s}  {'bw/ver':>6s} {'bw/np':>6s} "
          f"{'pr/ver':>6s} {'nl/ver':>6s} {'tr/ver':>6s}"
          + (f" | {'ver[b]':>6s} {'bw[b]':>6s} {'bw/ver':>6s} {'bw/np':>6s}" if baseline else ""))
    worst = worst_floor = 0.0
    with tempfile.TemporaryDirectory() as tmp:
        deck = str(Path(tmp) / "deck.cir")
        for spec in specs:
            s = str(spec)
            cases = {"version": taumatch("--version"),
                     "floor": python_c("import numpy, click"),
                     "bw1": taumatch("bandwidth", s),
                     "bw2": taumatch("bandwidth", s, env=threads(2)),
                     "predict": taumatch("predict", s),
                     "netlist": taumatch("netlist", s, "-o", deck)}
            if has_trimmer(load(spec)):
                cases["trim"] = taumatch("trim", s)
            if baseline:
                cases["version_b"] = taumatch("--version", source=baseline)
                cases["bw_b"] = taumatch("bandwidth", s, source=baseline)
            med = {k: (math.nan if v is None else v)  # nan: the command refused the spec
                   for k, v in alternate(cases, rounds).items()}
            v = med["version"]
            tr = med.get("trim", math.nan)
            worst = max(worst, med["bw1"] / v)
            worst_floor = max(worst_floor, med["bw1"] / med["floor"])
            print(f"{spec.stem[:28]:28s} {v * 1e3:9.0f} {med['floor'] * 1e3:9.0f} "
                  f"{med['bw1'] * 1e3:8.0f} {med['bw2'] * 1e3:8.0f} {med['predict'] * 1e3:8.0f} "
                  f"{med['netlist'] * 1e3:8.0f} {tr * 1e3:8.0f}  {med['bw1'] / v:6.2f} "
                  f"{med['bw1'] / med['floor']:6.2f} {med['predict'] / v:6.2f} "
                  f"{med['netlist'] / v:6.2f} {tr / v:6.2f}"
                  + (f" | {med['version_b'] * 1e3:6.0f} {med['bw_b'] * 1e3:6.0f} "
                     f"{med['bw_b'] / med['version_b']:6.2f} {med['bw_b'] / med['floor']:6.2f}"
                     if baseline else ""))
    print(f"worst bandwidth / --version: {worst:.2f} (goal <= 1.5); "
          f"/ python -c 'import numpy, click': {worst_floor:.2f}")
    print("(nan: the command refused the spec, e.g. trim without a trimmer)")


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--rounds", type=int, default=5)
    ap.add_argument("--only", default=None, help="only the examples whose name contains this")
    ap.add_argument("--no-commands", action="store_true")
    ap.add_argument("--no-process", action="store_true")
    ap.add_argument("--baseline", default=None, metavar="SRC")
    args = ap.parse_args()
    tmp = tempfile.TemporaryDirectory()
    specs = sorted((ROOT / "examples").glob("*.toml")) + synthetic_specs(Path(tmp.name))
    many = ROOT.parent / "shared" / "bad-inputs" / "many_cables_40.toml"
    if many.exists():
        specs.append(many)
    if args.only:
        specs = [s for s in specs if args.only in s.stem]
    print(f"medians of {args.rounds} alternated runs; shared 2-core machine; {describe()}")
    print(baseline_note(args.baseline) + "\n")
    if not args.no_process:
        in_process(specs, args.rounds)
    if not args.no_commands:
        as_commands(specs, args.rounds, args.baseline)


if __name__ == "__main__":
    t0 = time.perf_counter()
    main()
    print(f"(whole run {time.perf_counter() - t0:.1f} s)")

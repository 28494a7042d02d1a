"""Stress ``taumatch invert`` with a few thousand random expressions and option sets.

Each case runs in a forked child (click's CliRunner, in process) with a memory limit
(address space, default 2 GiB) and a time limit (default 20 s).  Printed: the counts of exit
statuses, tracebacks, stderr that is not one line, warnings raised on the way, cases past
the time or memory limit, and the slowest case and largest memory peak.  The generator is
seeded and independent of the hypothesis strategies in tests/test_fuzz_expressions.py.

Run: python bench/stress_expressions.py [N] [SEED]   (prints; asserts nothing)
"""

from __future__ import annotations

import multiprocessing as mp
import random
import resource
import sys
import time
import warnings
from collections import Counter

MEMORY = 2 * 1024**3
TIMEOUT = 20.0
CHARS = "s0123456789.eE+-*/^() pnukMGTfµ"


def _number(r: random.Random) -> str:
    m = r.choice([str(r.randint(0, 999)), f"{r.uniform(0, 10):.3g}"])
    e = r.choice(["", "", f"e{r.randint(-15, 15)}", f"e{r.randint(-400, 400)}"])
    return m + e + r.choice(["", "", "", "p", "n", "u", "k", "M", "G", "f"])


def _expr(r: random.Random, depth: int = 0) -> str:
    if depth > 4 or r.random() < 0.3:
        return r.choice([_number(r), "s", "s", "(s+1)", f"(s+{_number(r)})"])
    kind = r.randint(0, 5)
    a, b = _expr(r, depth + 1), _expr(r, depth + 1)
    if kind == 0:
        return f"{a}{r.choice(['+', '-', '*', '/', '', '**'])}{b}"
    if kind == 1:
        return f"({a})^{r.randint(-70, 70)}"
    if kind == 2:
        n = r.choice([1, 2, 50, 99, 100, 101, 190, 1000])
        return "(" * n + a + ")" * n
    if kind == 3:
        return f"{a}/({b})"
    if kind == 4:
        return f"-{a}"
    return f"({a})*({b})+{_number(r)}"


def case(r: random.Random) -> list:
    roll = r.random()
    if roll < 0.7:
        text = _expr(r)
    elif roll < 0.9:
        text = "".join(r.choice(CHARS) for _ in range(r.randint(0, 60)))
    else:
        text = "".join(chr(r.randint(1, 0x2FFF)) for _ in range(r.randint(0, 20)))
    bad = r.random() < 0.1  # a tenth of the cases carry a bad option value
    inputs = ["sine:1e300", "pulse", "sine:0"] if bad else ["impulse", "step", "ramp", "sine:1k"]
    args = ["invert", text, "--input", r.choice(inputs)]
    if r.random() < 0.7:
        times = ["1e400", "x", "nan"] if bad else ["0", "1n", "2.5", "1e308", "-1", "1e-300", "3u"]
        args += ["--at", ",".join(r.choice(times) for _ in range(r.randint(1, 3)))]
    if r.random() < 0.3:
        args.append("--json")
    return args


def _child(args, conn):
    resource.setrlimit(resource.RLIMIT_AS, (MEMORY, MEMORY))
    from click.testing import CliRunner

    from taumatch.cli import main

    t0 = time.perf_counter()
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            result = CliRunner().invoke(main, args)
            code, err = result.exit_code, result.stderr
            crashed = result.exception is not None and not isinstance(result.exception, SystemExit)
        except MemoryError:
            code, err, crashed = "memory", "", True
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # MiB (Linux: KiB)
    conn.send((code, err, crashed, len(caught), time.perf_counter() - t0, peak))


def main(n: int = 3000, seed: int = 12) -> None:
    r = random.Random(seed)
    ctx = mp.get_context("fork")
    import taumatch.cli  # noqa: F401 - imported once, before forking

    counts: Counter = Counter()
    slowest = (0.0, None)
    biggest = (0.0, None)
    for _ in range(n):
        args = case(r)
        a, b = ctx.Pipe(False)
        p = ctx.Process(target=_child, args=(args, b))
        p.start()
        if not a.poll(TIMEOUT):
            p.kill()
            p.join()
            counts["past the time limit"] += 1
            continue
        code, err, crashed, n_warn, dt, peak = a.recv()
        p.join()
        counts[f"exit {code}"] += 1
        counts["traceback"] += crashed
        counts["warnings raised"] += n_warn > 0
        if code not in (0, "memory") and (len(err.splitlines()) != 1 or not err.startswith("taumatch: error: ")):
            counts["stderr not one line"] += 1
        if code == 0 and err:
            counts["stderr noise on success"] += 1
        slowest = max(slowest, (dt, args[1][:60]))
        biggest = max(biggest, (peak, args[1][:60]))
    print(f"{n} cases (seed {seed}); limits {TIMEOUT:g} s and {MEMORY / 1024**3:g} GiB per case")
    for key in sorted(counts):
        print(f"  {key}: {counts[key]}")
    print(f"  slowest: {slowest[0]:.2f} s for {slowest[1]!r}")
    print(f"  largest memory peak: {biggest[0]:.0f} MiB for {biggest[1]!r}")


if __name__ == "__main__":
    main(*(int(x) for x in sys.argv[1:3]))

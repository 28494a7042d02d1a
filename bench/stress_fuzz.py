"""Stress the command line with a few thousand fresh hostile inputs of every family.

Families: ``capture`` (capture text), ``array`` (.npy/.npz), ``spec`` (chain specs in TOML),
``options`` (hostile option values and outputs) from tests/fuzz_inputs.py, and ``expression``
(``taumatch invert``) from bench/stress_expressions.py; the cases are drawn from a seeded
``random.Random``, independent of the hypothesis examples of tests/test_fuzz.py.

Each case runs in a forked child (click's CliRunner, in process, taumatch imported once
before forking) under a memory limit (address space, default 3 GiB, ``resource.setrlimit``)
and a time limit (default 30 s, the child killed past it).  Printed per family and in all:
the exit statuses, tracebacks, cases past the time limit (hangs) or the memory limit
(blow-ups), stderr noise (a warning raised on the way, stderr not exactly one line on error,
anything on stderr on success), inputs modified, files left by a failing command, and the
slowest case and the largest memory peak.

Run: python bench/stress_fuzz.py [N] [SEED] [FAMILIES]   e.g. 3000 1 capture,spec
(prints; asserts nothing).  N is the total, shared evenly among the families.
"""

from __future__ import annotations

import hashlib
import multiprocessing as mp
import os
import random
import resource
import sys
import tempfile
import time
import warnings
from collections import Counter, defaultdict
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent / "tests"))
sys.path.insert(0, str(HERE))

MEMORY = 3 * 1024**3
TIMEOUT = 30.0


def make_case(family: str, r: random.Random, folder: str):
    """(args, inputs) of one case."""
    if family == "expression":
        from stress_expressions import case

        return case(r), []
    from fuzz_inputs import CASES, drawer

    return CASES[family](drawer(rng=r), folder)


def _digest(paths):
    return [hashlib.sha256(Path(p).read_bytes()).hexdigest() for p in paths]


def _child(args, inputs, folder, conn):
    resource.setrlimit(resource.RLIMIT_AS, (MEMORY, MEMORY))
    from click.testing import CliRunner

    from taumatch.cli import main

    before = _digest(inputs)
    files = set(Path(folder).rglob("*"))
    os.chdir(folder)
    t0 = time.perf_counter()
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            result = CliRunner().invoke(main, args)
            code, err = result.exit_code, result.stderr
            exc = result.exception
            crashed = exc is not None and not isinstance(exc, SystemExit)
            memory = isinstance(exc, MemoryError)
            where = repr(exc)[:120] if crashed else ""
        except MemoryError:
            code, err, crashed, memory, where = "memory", "", True, True, "MemoryError"
    dt = time.perf_counter() - t0
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # MiB (Linux: KiB)
    modified = _digest(inputs) != before
    left = bool(code not in (0, "memory") and set(Path(folder).rglob("*")) != files)
    conn.send((code, err, crashed, memory, where, [str(w.message)[:80] for w in caught], dt,
               peak, modified, left))


def main(n: int = 3000, seed: int = 1, families: str = "capture,array,spec,options,expression"):
    fams = families.split(",")
    r = random.Random(seed)
    ctx = mp.get_context("fork")
    import numpy  # noqa: F401 - imported once, before forking

    import taumatch.cli  # noqa: F401

    counts: dict = defaultdict(Counter)
    examples: dict = {}
    slowest = (0.0, None)
    biggest = (0.0, None)
    t_start = time.perf_counter()
    for k in range(n):
        family = fams[k % len(fams)]
        c = counts[family]
        with tempfile.TemporaryDirectory() as folder:
            args, inputs = make_case(family, r, folder)
            a, b = ctx.Pipe(False)
            p = ctx.Process(target=_child, args=(args, inputs, folder, b))
            p.start()
            if not a.poll(TIMEOUT):
                p.kill()
                p.join()
                c["past the time limit (hang)"] += 1
                examples.setdefault(f"{family}: hang", args)
                continue
            try:
                code, err, crashed, memory, where, warned, dt, peak, modified, left = a.recv()
            except EOFError:  # killed (out of memory outside Python)
                p.join()
                c["killed (memory)"] += 1
                examples.setdefault(f"{family}: killed", args)
                continue
            p.join()
        c["cases"] += 1
        c[f"exit {code}"] += 1
        if crashed:
            c["traceback"] += 1
            examples.setdefault(f"{family}: traceback {where[:60]}", args)
        if memory:
            c["past the memory limit"] += 1
        if warned:
            c["warning raised"] += 1
            examples.setdefault(f"{family}: warning {warned[0]}", args)
        lines = err.splitlines()
        if code not in (0, "memory") and not (len(lines) == 1
                                              and lines[0].startswith("taumatch: error: ")):
            c["stderr not one line on error"] += 1
            examples.setdefault(f"{family}: stderr {err[:60]!r}", args)
        if code not in (0, "memory") and lines and len(lines[0]) > 600:
            c["error line past 600 characters"] += 1
        if code == 0 and err:
            c["stderr on success"] += 1
            examples.setdefault(f"{family}: noise {err[:60]!r}", args)
        c["input modified"] += modified
        c["file left by a failing command"] += left
        slowest = max(slowest, (dt, [family] + [str(x)[:40] for x in args[:4]]))
        biggest = max(biggest, (peak, [family] + [str(x)[:40] for x in args[:4]]))
    total = Counter()
    for c in counts.values():
        total.update(c)
    took = time.perf_counter() - t_start
    print(f"{n} cases (seed {seed}) in {took:.0f} s; limits {TIMEOUT:g} s and "
          f"{MEMORY / 1024**3:g} GiB per case")
    for family in fams + ["all"]:
        c = total if family == "all" else counts[family]
        keys = sorted(k for k in c if c[k])
        print(f"  {family}: " + ", ".join(f"{k} {c[k]}" for k in keys))
    print(f"  slowest: {slowest[0]:.2f} s for {slowest[1]}")
    print(f"  largest memory peak: {biggest[0]:.0f} MiB for {biggest[1]}")
    for what, args in examples.items():
        print(f"  example, {what}: {[str(x)[:80] for x in args]}")


if __name__ == "__main__":
    main(*(int(x) for x in sys.argv[1:3]), *sys.argv[3:4])

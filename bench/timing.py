"""Wall-time helpers shared by the benchmarks in this folder (run them as ``python bench/x.py``).

The machine these run on is shared (two cores, other jobs): a single timing can be off by a
factor of two.  :func:`alternate` runs the cases of one comparison in turn, round after
round, so that a burst of load hits all of them alike, and reports medians.

Fresh processes (:func:`command`, :func:`python_c`) run with Python's bytecode cache on, as
an installed package has it: ``PYTHONDONTWRITEBYTECODE`` is cleared for them and
``PYTHONPYCACHEPREFIX`` points at a temporary folder of this run (removed at exit), so that
the checkout gets no ``__pycache__`` and the first, untimed run of each case compiles what
the timed ones read.  Without it every start would compile the package's own sources again
(tens of milliseconds a command).  ``TAUMATCH_BENCH_NO_BYTECODE=1`` leaves the environment
as it is.
"""

from __future__ import annotations

import atexit
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time

__all__ = ["BYTECODE", "alternate", "baseline_note", "best_of", "child_env", "command", "describe",
           "python_c", "taumatch"]

#: Whether fresh processes get a bytecode cache (see the module text).
BYTECODE = os.environ.get("TAUMATCH_BENCH_NO_BYTECODE", "") in ("", "0")
_PREFIX: list[str] = []


def child_env(extra: dict | None = None) -> dict:
    """The environment of a measured fresh process (see the module text)."""
    env = dict(os.environ)
    if BYTECODE:
        if not _PREFIX:
            _PREFIX.append(tempfile.mkdtemp(prefix="taumatch-bench-pyc-"))
            atexit.register(shutil.rmtree, _PREFIX[0], True)
        env.pop("PYTHONDONTWRITEBYTECODE", None)
        env["PYTHONPYCACHEPREFIX"] = _PREFIX[0]
    env.update(extra or {})
    return env


def describe() -> str:
    """One line saying how the fresh processes are run."""
    return ("fresh processes with a bytecode cache (as installed)" if BYTECODE
            else "fresh processes without a bytecode cache (sources compiled every start)")


def best_of(fn, repeat: int = 3):
    """Run ``fn`` ``repeat`` times; return the shortest wall time (s) and the last result."""
    times = []
    out = None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return min(times), out


def alternate(cases: dict, rounds: int = 5, warm: bool = True) -> dict:
    """Median wall time (s) of each callable in ``cases``, run in turn ``rounds`` times.

    The order within a round rotates by one each round, so that no case always follows the
    same neighbour.  With ``warm`` every case runs once, untimed, first (the file cache,
    the bytecode cache); a case that fails there (a command's non-zero exit) is left out and
    its median is None.  Returns ``{name: median}``.
    """
    names = list(cases)
    failed = []
    if warm:
        for name in names:
            try:
                cases[name]()
            except (subprocess.CalledProcessError, Exception):  # noqa: BLE001 - reported as None
                failed.append(name)
    names = [n for n in names if n not in failed]
    times = {name: [] for name in names}
    for k in range(rounds):
        order = names[k % len(names):] + names[:k % len(names)]
        for name in order:
            t0 = time.perf_counter()
            cases[name]()
            times[name].append(time.perf_counter() - t0)
    out = {name: statistics.median(ts) for name, ts in times.items()}
    return {name: out.get(name) for name in cases}


def command(args, env: dict | None = None, check: bool = True):
    """A callable that runs ``args`` as a fresh process (output discarded)."""
    full = child_env(env)

    def run():
        subprocess.run(args, check=check, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                       env=full)

    return run


def python_c(code: str, env: dict | None = None):
    """A callable that runs ``python -c code`` with this interpreter as a fresh process."""
    return command([sys.executable, "-c", code], env)


def taumatch(*args, env: dict | None = None, source=None):
    """A callable running ``taumatch ARGS`` as a fresh process: the console script beside this
    interpreter (``python -m taumatch`` without one); with ``source``, the package in that
    ``src`` folder instead (``PYTHONPATH``), for a baseline measured in the same run."""
    from pathlib import Path

    script = Path(sys.executable).with_name("taumatch")
    exe = [str(script)] if script.exists() else [sys.executable, "-m", "taumatch"]
    extra = dict(env or {})
    if source is not None:
        extra["PYTHONPATH"] = str(source)
    return command([*exe, *args], env=extra)


def baseline_note(source) -> str:
    """One line naming the baseline tree, or nothing."""
    return "" if source is None else f"baseline [b]: the package in {source}, same runs"

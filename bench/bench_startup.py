"""Start-up of the command line against bare interpreters, side by side in one run.

Each row is a fresh process, timed as medians of alternated runs (``timing.alternate``: the
cases of one table run in turn, round after round, so that load from other jobs on this
shared two-core machine hits them alike):

* ``taumatch --help``, ``taumatch --version`` and ``taumatch <command> --help`` for every
  command, against ``python -c "import click"`` (goal: ``--help`` within 2×);
* for reference, ``python -c "import numpy, click"``: the floor of any command that
  computes with numpy.

Prints times and ratios; asserts nothing (tests never assert wall-clock times; which heavy
modules each path imports is tested in tests/test_imports.py).
Run as ``python bench/bench_startup.py [--rounds N]``.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from timing import alternate, command, describe, python_c  # noqa: E402


def taumatch(*args):
    """A callable running the ``taumatch`` console script of this interpreter."""
    script = Path(sys.executable).with_name("taumatch")
    exe = [str(script)] if script.exists() else [sys.executable, "-m", "taumatch"]
    return command([*exe, *args])


def commands() -> list[str]:
    import pkgutil

    import taumatch.cli as cli

    return sorted(i.name[4:] for i in pkgutil.iter_modules(cli.__path__)
                  if i.name.startswith("cmd_"))


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--rounds", type=int, default=7)
    args = ap.parse_args()
    cases = {
        'python -c "import click"': python_c("import click"),
        'python -c "import numpy, click"': python_c("import numpy, click"),
        "taumatch --help": taumatch("--help"),
        "taumatch --version": taumatch("--version"),
    }
    for name in commands():
        cases[f"taumatch {name} --help"] = taumatch(name, "--help")
    med = alternate(cases, args.rounds)
    ref = med['python -c "import click"']
    print(f"medians of {args.rounds} alternated runs; {describe()}")
    print(f"{'':40s} {'time':>8s} {'/ click':>8s}")
    for name, t in med.items():
        goal = "  (goal <= 2)" if name == "taumatch --help" else ""
        print(f"{name:40s} {t * 1e3:6.0f} ms {t / ref:8.2f}{goal}")
    worst = max((t for n, t in med.items() if n.startswith("taumatch") and "--help" in n))
    print(f"slowest --help: {worst / ref:.2f}× python -c 'import click'")


if __name__ == "__main__":
    main()

"""Start-up of the command line against bare interpreters, side by side in one run.

Each row is a fresh process, timed as medians of alternated runs (``timing.alternate``: the
cases of one table run in turn, round after round, so that load from other jobs on this
shared two-core machine hits them alike):

* ``taumatch --help``, ``taumatch --version`` and ``taumatch <command> --help`` for every
  command, against ``python -c "import click"`` (goal: ``--help`` within 2×);
* for reference, ``python -c "import numpy, click"``: the floor of any command that
  computes with numpy;
* with ``--baseline SRC`` (the ``src`` folder of another checkout, e.g.
  ``git archive COMMIT src | tar -x -C /tmp/base``), every taumatch row again with that
  package, in the same alternation: before and after side by side.

Prints times and ratios; asserts nothing (tests never assert wall-clock times; which heavy
modules each path imports is tested in tests/test_imports.py).
Run as ``python bench/bench_startup.py [--rounds N] [--baseline SRC]``.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from timing import alternate, baseline_note, describe, python_c, taumatch


def commands() -> list[str]:
    import pkgutil

    from taumatch import cli

    return sorted(i.name[4:] for i in pkgutil.iter_modules(cli.__path__)
                  if i.name.startswith("cmd_"))


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--rounds", type=int, default=7)
    ap.add_argument("--baseline", default=None, metavar="SRC")
    args = ap.parse_args()
    cases = {
        'python -c "import click"': python_c("import click"),
        'python -c "import numpy, click"': python_c("import numpy, click"),
    }
    rows = [["--help"], ["--version"]] + [[name, "--help"] for name in commands()]
    for row in rows:
        name = "taumatch " + " ".join(row)
        cases[name] = taumatch(*row)
        if args.baseline:
            cases[name + " [b]"] = taumatch(*row, source=args.baseline)
    med = alternate(cases, args.rounds)
    ref = med['python -c "import click"']
    print(f"medians of {args.rounds} alternated runs; {describe()}")
    if args.baseline:
        print(baseline_note(args.baseline))
    print(f"{'':40s} {'time':>8s} {'/ click':>8s}")
    for name, t in med.items():
        goal = "  (goal <= 2)" if name.startswith("taumatch --help") else ""
        print(f"{name:40s} {t * 1e3:6.0f} ms {t / ref:8.2f}{goal}")
    helps = [t for n, t in med.items() if "--help" in n and not n.endswith("[b]")]
    print(f"slowest --help: {max(helps) / ref:.2f}× python -c 'import click'")
    if args.baseline:
        helps_b = [t for n, t in med.items() if "--help" in n and n.endswith("[b]")]
        print(f"slowest --help [b]: {max(helps_b) / ref:.2f}× python -c 'import click'")


if __name__ == "__main__":
    main()

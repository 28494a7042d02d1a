"""`taumatch batch` with --jobs 2 against --jobs 1 on the same folder, side by side.

Both runs are fresh processes (start-up and imports included) over the same captures,
alternated so that a change in the machine's load falls on both; the figure is the ratio
of the best times.  Without reports by default; ``--reports`` writes one HTML report per
capture in both runs (pictures drawn in the workers).

Run: python bench/bench_batch.py [FOLDER] [--repeat N] [--reports]   (prints; asserts nothing)
The default folder is the real captures beside the clone (../shared/real-captures).
"""

from __future__ import annotations

import argparse
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

DEFAULT = Path(__file__).resolve().parents[2] / "shared" / "real-captures"


def _cpu() -> float:
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def run(folder, jobs, out=None):
    """Wall time (s) and the processor time of the command and its workers (s)."""
    cmd = [sys.executable, "-m", "taumatch", "batch", str(folder), "--jobs", str(jobs), "--json"]
    if out is not None:
        cmd += ["--out", str(out)]
    c0, t0 = _cpu(), time.perf_counter()
    proc = subprocess.run(cmd, capture_output=True, text=True, check=False)
    dt, cpu = time.perf_counter() - t0, _cpu() - c0
    if proc.returncode not in (0, 1):
        raise SystemExit(f"batch failed ({proc.returncode}): {proc.stderr.strip()}")
    return dt, cpu


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("folder", nargs="?", default=DEFAULT)
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--reports", action="store_true")
    a = ap.parse_args()
    files = sorted(Path(a.folder).glob("*.csv"))
    print(f"{len(files)} captures in {a.folder}; {os.cpu_count()} cores; "
          f"load average now {os.getloadavg()[0]:.2f}")
    times, cpus = {1: [], 2: []}, {1: [], 2: []}
    with tempfile.TemporaryDirectory() as tmp:
        for k in range(a.repeat):
            for jobs in (1, 2) if k % 2 == 0 else (2, 1):
                out = Path(tmp) / f"r{k}-{jobs}" if a.reports else None
                dt, cpu = run(a.folder, jobs, out)
                times[jobs].append(dt)
                cpus[jobs].append(cpu)
    for jobs in (1, 2):
        t = sorted(times[jobs])
        used = [c / w for c, w in zip(cpus[jobs], times[jobs])]
        print(f"--jobs {jobs}: best {t[0]:.2f} s, median {t[len(t) // 2]:.2f} s "
              f"({', '.join(f'{x:.2f}' for x in times[jobs])}); processor time "
              f"{min(cpus[jobs]):.2f} s at best, cores in use {max(used):.2f} at most")
    print(f"speed-up of --jobs 2 over --jobs 1 (best against best): "
          f"{min(times[1]) / min(times[2]):.2f}x; where the cores in use stay near 1 with "
          f"--jobs 2, other work on the machine held the second core")


if __name__ == "__main__":
    main()

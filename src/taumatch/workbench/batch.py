"""Many captures diagnosed in one go, in parallel on the local cores.

Each file is read and diagnosed in a worker process (one file never waits for another's
fit); a file that cannot be read or diagnosed becomes one row saying why, and the rest
go on.  Rows come back in the order the files were given, whatever order they finish in.
"""

from __future__ import annotations

import glob
import io
import os
from concurrent.futures import ProcessPoolExecutor, as_completed
from dataclasses import dataclass
from pathlib import Path

from ..errors import InputError
from ..units import format_quantity, format_uncertain
from .job import COLUMNS, DiagnosisSettings, diagnose_outcome, outcome_of

__all__ = ["BatchResult", "batch_diagnose", "capture_files", "default_jobs"]

MAX_JOBS = 256


def default_jobs() -> int:
    """The number of cores this process may use."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except (AttributeError, OSError):
        return max(1, os.cpu_count() or 1)


def capture_files(specs, pattern: str = "*.csv") -> list:
    """The files named by ``specs``: a file as it is, a folder's files matching ``pattern``
    (not descending into sub-folders), or a glob (``'drawer/*.npz'``, ``'**'`` descends).
    Each file once, in the order given (a folder's and a glob's sorted by name)."""
    out, seen = [], set()
    for spec in specs:
        p = Path(spec)
        if p.is_dir():
            found = sorted(f for f in p.glob(pattern) if f.is_file() and not f.name.startswith("."))
            if not found:
                raise InputError(f"{spec}: no file matching {pattern} in this folder (give "
                                 f"pattern=, or a glob such as '{p / '*.npz'}')")
        elif p.is_file():
            found = [p]
        else:
            found = sorted(Path(f) for f in glob.glob(str(spec), recursive=True)
                           if Path(f).is_file())
            if not found:
                raise InputError(f"{spec}: no such file or folder, and no file matches it as a glob")
        for f in found:
            key = f.resolve()
            if key not in seen:
                seen.add(key)
                out.append(f)
    return out


def _report_names(files, report_dir) -> list:
    """One report path per file in ``report_dir``, named after the file, never two alike."""
    if report_dir is None:
        return [None] * len(files)
    taken, out = set(), []
    for f in files:
        stem = f.name.replace(".", "_")
        name, k = f"{stem}.html", 1
        while name.lower() in taken:
            k += 1
            name = f"{stem}-{k}.html"
        taken.add(name.lower())
        out.append(Path(report_dir) / name)
    return out


def _one_thread_each() -> None:
    """In a worker: one thread for numpy's linear algebra, so N workers use N cores, not N²
    threads spinning for them (measured: a quarter more processor time without it)."""
    from threadpoolctl import threadpool_limits

    global _LIMIT
    _LIMIT = threadpool_limits(1)


_LIMIT = None


def _work(index, path, settings, report_path, report_inputs):
    outcome, _ = diagnose_outcome(path, settings, report_path, report_inputs)
    return index, outcome


def batch_diagnose(files, settings: DiagnosisSettings, *, jobs: int | None = None,
                   report_dir=None, report_inputs=(), progress=None) -> BatchResult:
    """Diagnose every file of ``files`` with the same ``settings``.

    Parameters
    ----------
    files : sequence of path
        The captures (see :func:`capture_files`).
    settings : DiagnosisSettings
        How each is read and diagnosed.
    jobs : int, optional
        Worker processes (default: the cores this process may use; 1 runs in this process).
    report_dir : path, optional
        Write one HTML report per diagnosed capture into this existing folder.
    report_inputs : sequence of (str, str)
        The settings as the user gave them, for the reports' input tables.
    progress : callable, optional
        Called as ``progress(done, total, outcome)`` after each file.

    Returns
    -------
    BatchResult
    """
    files = [Path(f) for f in files]
    jobs = default_jobs() if jobs is None else jobs
    if not 1 <= jobs <= MAX_JOBS:
        raise InputError(f"jobs must lie between 1 and {MAX_JOBS}, got {jobs}")
    if report_dir is not None and not Path(report_dir).is_dir():
        raise InputError(f"{report_dir}: the report folder does not exist")
    reports = _report_names(files, report_dir)
    rows = [None] * len(files)
    done = 0

    def finish(i, outcome):
        nonlocal done
        rows[i] = outcome
        done += 1
        if progress is not None:
            progress(done, len(files), outcome)

    jobs = min(jobs, len(files)) or 1
    if jobs == 1:
        for i, f in enumerate(files):
            finish(*_work(i, f, settings, reports[i], tuple(report_inputs)))
    else:
        import multiprocessing

        _warm(report_dir is not None)
        # fork where there is one: a worker starts with taumatch already imported
        ctx = multiprocessing.get_context("fork") if "fork" in \
            multiprocessing.get_all_start_methods() else None
        with ProcessPoolExecutor(max_workers=jobs, mp_context=ctx,
                                 initializer=_one_thread_each) as pool:
            futures = {pool.submit(_work, i, f, settings, reports[i], tuple(report_inputs)): i
                       for i, f in enumerate(files)}
            try:
                for fut in as_completed(futures):
                    i = futures[fut]
                    try:
                        finish(*fut.result())
                    except Exception as exc:  # noqa: BLE001 - a worker that died is one row
                        finish(i, outcome_of(files[i], error=exc))
            except BaseException:
                pool.shutdown(wait=True, cancel_futures=True)
                raise
    return BatchResult(tuple(rows), settings.accept)


def _warm(pictures: bool) -> None:
    """Import what every worker needs once, here, so that forked workers start with it
    (the first diagnosis imports pandas, lmfit and scipy: seconds, paid once, not per worker)."""
    import lmfit  # noqa: F401
    import pandas  # noqa: F401

    from .. import capture, diagnosis, fit, lti, pulse  # noqa: F401
    if pictures:
        import matplotlib.pyplot  # noqa: F401


@dataclass(frozen=True)
class BatchResult:
    """The rows of a batch, in the order the files were given; SI units (gain errors as
    fractions, trims in farads)."""

    rows: tuple
    accept: float

    @property
    def failed(self) -> tuple:
        """The rows of files that were not diagnosed."""
        return tuple(r for r in self.rows if not r.ok)

    def to_dict(self) -> dict:
        counts = {s: sum(r.status == s for r in self.rows) for s in
                  ("diagnosed", "refused", "unreadable", "failed")}
        return {"files": len(self.rows), **counts, "accept": self.accept,
                "rows": [r.to_dict() for r in self.rows]}

    def csv_text(self) -> str:
        """The summary table as CSV (a header line, one row per file; warnings joined by ' | ')."""
        import csv

        buf = io.StringIO()
        w = csv.writer(buf, lineterminator="\n")
        w.writerow(COLUMNS)
        for r in self.rows:
            d = r.to_dict()
            d["warnings"] = " | ".join(d["warnings"])
            w.writerow(["" if d[k] is None else (repr(d[k]) if isinstance(d[k], float) else d[k])
                        for k in COLUMNS])
        return buf.getvalue()

    def summary(self) -> str:
        """A table to read: one line per file, then the counts."""
        q = format_quantity
        width = min(max([len(Path(r.file).name) for r in self.rows] + [4]), 40)
        lines = [f"{'file':{width}s}  {'verdict':18s} {'gain error':>18s}  shunt-arm trim"]
        for r in self.rows:
            name = Path(r.file).name
            name = name if len(name) <= width else "…" + name[-(width - 1):]
            if r.ok:
                err = f"{100 * r.gain_error:+.2f} % ± {100 * (r.gain_error_stderr or 0):.2f} %"
                trim = "—" if r.shunt_change is None else (
                    f"{'add' if r.shunt_change > 0 else 'remove'} "
                    + (format_uncertain(abs(r.shunt_change), r.shunt_change_stderr, "F")
                       if r.shunt_change_stderr else q(abs(r.shunt_change), "F")))
                lines.append(f"{name:{width}s}  {r.verdict:18s} {err:>18s}  {trim}")
                lines += [f"{'':{width}s}    warning: {w}" for w in r.warnings]
            else:
                lines.append(f"{name:{width}s}  {r.status.upper():18s} {r.error}")
        d = self.to_dict()
        lines.append(f"{d['files']} files: {d['diagnosed']} diagnosed, {d['refused']} refused, "
                     f"{d['unreadable']} unreadable, {d['failed']} failed")
        return "\n".join(lines)

    def plot(self, ax=None):
        """Gain error of each diagnosed capture with its standard error and the acceptance band."""
        from ..plot.workbench import plot_batch

        return plot_batch(self, ax=ax)

"""Progress on stderr for work that takes more than a moment, drawn by ``rich``.

Shown only when stderr is a terminal and the command is not printing JSON: a script that
reads the output, a pipe or a log file never sees a progress line.
"""

from __future__ import annotations

import contextlib
import sys
import threading

__all__ = ["busy", "progress_bar", "progress_wanted"]

#: seconds of work before a "busy" line appears (most runs end sooner and show nothing)
BUSY_AFTER = 2.0


def progress_wanted(as_json: bool = False, stream=None) -> bool:
    """Whether to draw progress: stderr is a terminal and no JSON is being printed."""
    stream = sys.stderr if stream is None else stream
    try:
        tty = stream.isatty()
    except (AttributeError, ValueError):
        tty = False
    return bool(tty) and not as_json


def _console(stream):
    from rich.console import Console

    return Console(file=stream, stderr=stream is None)


@contextlib.contextmanager
def progress_bar(total: int, label: str, enabled: bool, stream=None):
    """Yield ``advance(done, note="")``; a bar with the count, elapsed and remaining time is
    drawn while the block runs when ``enabled``, nothing otherwise."""
    if not enabled:
        yield lambda done, note="": None
        return
    from rich.progress import (
        BarColumn,
        MofNCompleteColumn,
        Progress,
        TextColumn,
        TimeElapsedColumn,
        TimeRemainingColumn,
    )

    columns = (TextColumn("{task.description}"), BarColumn(), MofNCompleteColumn(),
               TimeElapsedColumn(), TextColumn("left"), TimeRemainingColumn(),
               TextColumn("{task.fields[note]}", style="dim"))
    with Progress(*columns, console=_console(stream), transient=True) as bar:
        task = bar.add_task(label, total=total, note="")

        def advance(done, note=""):
            bar.update(task, completed=done, note=note)

        yield advance


@contextlib.contextmanager
def busy(label: str, enabled: bool, after: float = BUSY_AFTER, stream=None):
    """A spinner with ``label`` and the elapsed time, shown only once the block has run for
    ``after`` seconds (when ``enabled``), and cleared when it ends."""
    if not enabled:
        yield
        return
    from rich.status import Status

    lock = threading.Lock()
    state = {"status": None, "done": False}

    def show():
        with lock:
            if not state["done"]:
                state["status"] = Status(label, console=_console(stream), spinner="line")
                state["status"].start()

    timer = threading.Timer(after, show)
    timer.daemon = True
    timer.start()
    try:
        yield
    finally:
        timer.cancel()
        with lock:
            state["done"] = True
            if state["status"] is not None:
                state["status"].stop()

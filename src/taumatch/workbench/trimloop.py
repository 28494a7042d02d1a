"""The trim loop: diagnose each capture an instrument saves into a folder while someone
turns the trimmer, and say how much is left, which way to turn, and whether the last turns
brought the divider closer.

Files are taken only once they have stopped changing (:class:`~.folder.NewFiles`).  A file
the reader or the diagnosis refuses is looked at once more after it settles again (it may
have been caught half-written); refused twice unchanged, it is one line in the history and
the loop goes on.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass
from datetime import datetime
from pathlib import Path

from ..units import format_quantity as q
from ..units import format_uncertain
from .folder import NewFiles
from .job import DiagnosisSettings, Outcome, diagnose_outcome

__all__ = ["LoopSummary", "TrimLoop", "trend", "turn_advice"]


def turn_advice(o: Outcome, accept: float) -> str:
    """Which way to turn, and by how much, for one diagnosed capture."""
    if not o.ok:
        return "—"
    if o.verdict == "no divider":
        return "no divider seen in front of the input: nothing to trim"
    if o.verdict == "compensated" or (o.gain_error is not None and abs(o.gain_error) <= accept):
        return "within the acceptance band: leave the trimmer where it is"
    parts = []
    tm = o.extra.get("trimmer") or {}
    if tm.get("required") is not None and tm.get("present") is not None:
        way = "up" if tm["required"] > tm["present"] else "down"
        reach = "" if tm.get("in_range", True) else " (beyond its range: change a fixed capacitor)"
        parts.append(f"turn the trimmer (part {tm.get('part')}) {way}, to "
                     f"{format_uncertain(tm['required'], tm.get('required_stderr') or 0, 'F')}"
                     f"{reach}")
    if o.shunt_change is not None:
        sign = "add" if o.shunt_change > 0 else "remove"
        text = (f"{sign} {q(abs(o.shunt_change), 'F')} at the shunt arm")
        if o.tip_change is not None:
            text += (f" (or {'add' if o.tip_change > 0 else 'remove'} "
                     f"{q(abs(o.tip_change), 'F')} at the tip)")
        parts.append(text)
    return "; ".join(parts) or "no trim given"


def trend(before: Outcome, after: Outcome) -> str:
    """How the gain error moved between two diagnosed captures, judged against their standard
    errors (two standard errors of the difference count as a change)."""
    e0, e1 = before.gain_error, after.gain_error
    s = math.hypot(before.gain_error_stderr or 0.0, after.gain_error_stderr or 0.0)
    if abs(e1 - e0) <= 2 * s:
        return "no measurable change"
    if e0 * e1 < 0 and abs(e1) > 2 * (after.gain_error_stderr or 0.0):
        return "turned past the point"
    return "closer" if abs(e1) < abs(e0) else "further away"


@dataclass(frozen=True)
class LoopSummary:
    """What a trim loop saw, for the closing lines."""

    folder: str
    accept: float
    history: tuple          # (time stamp, Outcome) in order of arrival
    interrupted: bool = False

    @property
    def diagnosed(self) -> tuple:
        return tuple(o for _, o in self.history if o.ok)

    def to_dict(self) -> dict:
        d = self.diagnosed
        return {"folder": self.folder, "accept": self.accept,
                "captures": len(self.history), "diagnosed": len(d),
                "bad": len(self.history) - len(d),
                "first_gain_error": d[0].gain_error if d else None,
                "last_gain_error": d[-1].gain_error if d else None,
                "last_verdict": d[-1].verdict if d else None,
                "accepted": bool(d) and abs(d[-1].gain_error) <= self.accept,
                "stopped_by": "interrupt" if self.interrupted else "limit or stop",
                "history": [{"time": t.isoformat(timespec="seconds"), **o.to_dict()}
                            for t, o in self.history]}

    def summary(self) -> str:
        d = self.to_dict()
        n = d["captures"]
        lines = [(f"watched {self.folder}: {n} capture{'' if n == 1 else 's'}, "
                  f"{d['diagnosed']} diagnosed, {d['bad']} could not be used")]
        if d["diagnosed"]:
            lines.append(f"gain error {100 * d['first_gain_error']:+.2f} % at the first, "
                         f"{100 * d['last_gain_error']:+.2f} % at the last "
                         f"({d['last_verdict']})")
            lines.append("within the acceptance band at the end" if d["accepted"] else
                         f"not within ±{100 * self.accept:g} % at the end: "
                         + turn_advice(self.diagnosed[-1], self.accept))
        return "\n".join(lines)


class TrimLoop:
    """Watch ``folder`` and diagnose each new capture with ``settings``.

    Parameters
    ----------
    folder : path
        Where the instrument saves its captures.
    settings : DiagnosisSettings
        How each is read and diagnosed.
    pattern : str
        File names to take (glob), default ``"*.csv"``.
    existing : bool
        Diagnose the captures already in the folder too.
    settle : int
        Looks in a row that must see a file unchanged before it is read.
    """

    def __init__(self, folder, settings: DiagnosisSettings, pattern: str = "*.csv",
                 existing: bool = False, settle: int = 2):
        self.settings = settings
        self.files = NewFiles(folder, pattern, existing=existing, settle=settle)
        self.history = []        # (datetime, Outcome)
        self.looks = 0
        self._suspect = {}       # path -> (size, mtime) when first refused

    def step(self) -> list:
        """Look once; diagnose what has settled; return the new outcomes."""
        new = []
        for path in self.files.poll():
            outcome, _ = diagnose_outcome(path, self.settings)
            key = self.files.stamp(path)
            if not outcome.ok and self._suspect.get(path) != key:
                # perhaps caught half-written: look again once it settles anew
                self._suspect[path] = key
                self.files.again(path)
                continue
            self._suspect.pop(path, None)
            self.history.append((datetime.now(), outcome))
            new.append(outcome)
        self.looks += 1
        return new

    def run(self, *, interval: float = 0.5, stop=None, max_captures: int | None = None,
            on_update=None, on_look=None) -> LoopSummary:
        """Look every ``interval`` seconds until ``stop`` (a :class:`threading.Event`) is set,
        ``max_captures`` captures have been taken, or Ctrl-C.

        ``on_update(loop, outcome)`` is called for each capture taken, ``on_look(loop)`` after
        every look.  Returns the :class:`LoopSummary`.
        """
        interrupted = False
        try:
            while True:
                for o in self.step():
                    if on_update is not None:
                        on_update(self, o)
                if on_look is not None:
                    on_look(self)
                if max_captures is not None and len(self.history) >= max_captures:
                    break
                if stop is not None:
                    if stop.wait(interval):
                        break
                else:
                    time.sleep(interval)
        except KeyboardInterrupt:
            interrupted = True
        return self.summary(interrupted)

    def summary(self, interrupted: bool = False) -> LoopSummary:
        return LoopSummary(str(self.files.folder), self.settings.accept, tuple(self.history),
                           interrupted)

    def screen(self, rows: int = 8) -> str:
        """The one screen the loop shows: where the trim stands now and the last captures."""
        tol = self.settings.accept
        head = [f"watching {self.files.folder} ({self.files.pattern}) — accepting ±{100 * tol:g} %"]
        done = [o for _, o in self.history if o.ok]
        if not done:
            head.append("waiting for the first capture …")
        else:
            last = done[-1]
            head.append(f"now: {last.verdict}, gain error {100 * last.gain_error:+.2f} % "
                        f"± {100 * (last.gain_error_stderr or 0):.2f} %  [{_gauge(last, tol)}]")
            head.append(f"turn: {turn_advice(last, tol)}")
            if len(done) > 1:
                head.append(f"since the capture before: {trend(done[-2], last)}")
        head.append("")
        head.append(f"{'time':8s}  {'file':24s} {'gain error':>18s}  verdict")
        prev = None
        lines = []
        for t, o in self.history:
            name = Path(o.file).name
            name = name if len(name) <= 24 else "…" + name[-23:]
            if o.ok:
                err = f"{100 * o.gain_error:+.2f} % ± {100 * (o.gain_error_stderr or 0):.2f} %"
                move = f"  ({trend(prev, o)})" if prev is not None else ""
                lines.append(f"{t:%H:%M:%S}  {name:24s} {err:>18s}  {o.verdict}{move}")
                prev = o
            else:
                lines.append(f"{t:%H:%M:%S}  {name:24s} {'—':>18s}  {o.status}: {o.error}")
        return "\n".join(head + lines[-rows:])


def _gauge(o: Outcome, accept: float, width: int = 21) -> str:
    """A text gauge of the gain error: the centre is zero, the bars the acceptance band, the
    ends five times it; the mark shows where the capture sits."""
    span = 5 * accept
    x = max(-1.0, min(1.0, o.gain_error / span))
    pos = round((x + 1) / 2 * (width - 1))
    cells = ["-"] * width
    half = width // 2
    band = max(1, round(half / 5))
    cells[half - band] = cells[half + band] = "|"
    cells[pos] = "●"
    return "".join(cells)

"""The trim loop (``taumatch watch``): captures written into a folder by a test thread while
the loop runs, including a half-written file and a broken one.

Nothing here measures time: the writer waits for the loop's own looks (a condition the loop
signals after each), and the loop stops on ``max_captures`` or a stop event the test sets.
The captures are textbook divider responses (divider_synth; Millman & Taub / Boylestad).
"""

import json
import os
import signal
import subprocess
import sys
import threading

import pytest
from click.testing import CliRunner
from workbench_files import capture_text, write_capture

from taumatch.cli import main
from taumatch.workbench import DiagnosisSettings, NewFiles, TrimLoop
from taumatch.workbench.trimloop import trend

SETTINGS = DiagnosisSettings(tip_r=9e6, shunt_r=1e6, accept=0.01)
GUARD = 120  # s: only to turn a hang into a failure; no assertion depends on it


class Looks:
    """Lets a writer thread wait for the loop's next look."""

    def __init__(self):
        self.cond = threading.Condition()
        self.looks = 0
        self.taken = 0

    def on_look(self, loop):
        with self.cond:
            self.looks = loop.looks
            self.taken = len(loop.history)
            self.cond.notify_all()

    def wait_looks(self, n=1):
        with self.cond:
            target = self.looks + n
            assert self.cond.wait_for(lambda: self.looks >= target, timeout=GUARD)

    def wait_taken(self, n):
        with self.cond:
            assert self.cond.wait_for(lambda: self.taken >= n, timeout=GUARD)


def test_loop_converges_ignores_a_half_written_file_and_survives_a_broken_one(tmp_path):
    """Turning the trimmer: +5 %, then a broken export, then +2 % and +0.3 %.

    The first capture is written in pieces, one look apart, so the loop sees it growing;
    it must be diagnosed once, complete (its gain error is the textbook +5 %)."""
    (tmp_path / "old.csv").write_text(capture_text(0.08, seed=1))  # there before: ignored
    loop = TrimLoop(tmp_path, SETTINGS, settle=3)
    looks, stop, errors = Looks(), threading.Event(), []

    def writer():
        try:
            text = capture_text(0.05, seed=2)
            cut = [len(text) * k // 6 for k in range(1, 6)] + [len(text)]
            with open(tmp_path / "cap01.csv", "w") as fh:
                done = 0
                for end in cut:                      # half-written for five looks
                    fh.write(text[done:end])
                    fh.flush()
                    done = end
                    looks.wait_looks(1)
            looks.wait_taken(1)
            (tmp_path / "cap02.csv").write_text("this is not a capture\n\x00\x01\n")
            looks.wait_taken(2)
            write_capture(tmp_path / "cap03.csv", 0.02, seed=3)
            looks.wait_taken(3)
            write_capture(tmp_path / "cap04.csv", 0.003, seed=4)
        except BaseException as exc:  # noqa: BLE001 - reported by the test below
            errors.append(exc)
            stop.set()

    th = threading.Thread(target=writer, daemon=True)
    th.start()
    summary = loop.run(interval=0.01, stop=stop, max_captures=4, on_look=looks.on_look)
    stop.set()
    th.join(GUARD)
    assert not errors, errors
    names = [os.path.basename(o.file) for _, o in summary.history]
    assert names == ["cap01.csv", "cap02.csv", "cap03.csv", "cap04.csv"]
    statuses = [o.status for _, o in summary.history]
    assert statuses == ["diagnosed", "unreadable", "diagnosed", "diagnosed"]
    first, _, third, last = (o for _, o in summary.history)
    # textbook truth of each capture (divider_synth); 0.5 % covers noise and 8-bit steps
    assert first.gain_error == pytest.approx(0.05, abs=0.005)
    assert first.verdict == "over-compensated" and first.shunt_change > 0
    assert third.gain_error == pytest.approx(0.02, abs=0.005)
    assert last.verdict == "compensated"
    d = summary.to_dict()
    assert d["accepted"] and d["bad"] == 1 and d["diagnosed"] == 3
    screen = loop.screen()
    assert "within the acceptance band" in screen and "closer" in screen and "cap02.csv" in screen
    assert "within the acceptance band at the end" in summary.summary()


def test_a_file_refused_while_growing_is_read_again_once_complete(tmp_path):
    """The reader refuses a truncated file; the loop waits for it to settle anew instead of
    reporting it, and diagnoses it once complete (stepped by hand: no thread needed)."""
    loop = TrimLoop(tmp_path, SETTINGS, settle=2)
    text = capture_text(0.05, seed=5)
    path = tmp_path / "cap.csv"
    path.write_text(text[:30])          # the header and a fragment of the first row
    outcomes = [o for _ in range(2) for o in loop.step()]
    assert outcomes == [] and loop.history == []   # refused once: not reported yet
    path.write_text(text)
    outcomes = [o for _ in range(3) for o in loop.step()]
    assert [o.status for o in outcomes] == ["diagnosed"]
    assert outcomes[0].gain_error == pytest.approx(0.05, abs=0.005)


def test_a_file_saved_again_under_the_same_name_is_new(tmp_path):
    files = NewFiles(tmp_path, settle=2)
    p = tmp_path / "scope.csv"
    p.write_text("a")
    assert files.poll() == [] and files.poll() == [p]
    assert files.poll() == []
    p.write_text("bb")
    assert files.poll() == [] and files.poll() == [p]


def test_trend_counts_only_changes_beyond_the_errors():
    from taumatch.workbench import Outcome

    def o(e, s=0.001):
        return Outcome("x", "diagnosed", verdict="x", gain_error=e, gain_error_stderr=s)

    assert trend(o(0.05), o(0.02)) == "closer"
    assert trend(o(0.02), o(0.05)) == "further away"
    assert trend(o(0.05), o(0.0505)) == "no measurable change"
    assert trend(o(0.05), o(-0.03)) == "turned past the point"


def test_watch_command_json_on_existing_captures(tmp_path):
    write_capture(tmp_path / "a.csv", 0.05, seed=6)
    write_capture(tmp_path / "b.csv", -0.04, seed=7)
    r = CliRunner().invoke(main, ["watch", str(tmp_path), "--existing", "--max-captures", "2",
                                  "--interval", "0.05", "--json"])
    assert r.exit_code == 0, r.output
    lines = [json.loads(x) for x in r.output.splitlines()]
    assert [x["capture"]["verdict"] for x in lines[:2]] == ["over-compensated",
                                                          "under-compensated"]
    assert lines[2]["summary"]["diagnosed"] == 2


def test_watch_stops_on_ctrl_c_with_a_summary(tmp_path):
    """SIGINT, as Ctrl-C sends it: the loop ends, prints its summary and exits 0."""
    proc = subprocess.Popen([sys.executable, "-m", "taumatch", "watch", str(tmp_path),
                             "--interval", "0.05"], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True)
    try:
        assert proc.stdout.readline().startswith("watching")
        write_capture(tmp_path / "a.csv", 0.05, seed=8)
        line = proc.stdout.readline()
        assert line.startswith("a.csv: over-compensated") and "add" in line
        proc.send_signal(signal.SIGINT)
        out, err = proc.communicate(timeout=GUARD)
    finally:
        if proc.poll() is None:
            proc.kill()
    assert proc.returncode == 0, err
    assert "1 capture, 1 diagnosed" in out and "Traceback" not in err

"""``taumatch batch``: many captures in a process pool, a broken one among them.

Captures with known gain errors come from the textbook divider formulas (divider_synth;
Millman & Taub / Boylestad); the real ones from /work/shared/real-captures (their README
says what each shows).
"""

import csv
import io
import json

import pytest
from click.testing import CliRunner
from workbench_files import shunt_trim_truth, write_capture

from taumatch.cli import main
from taumatch.workbench import DiagnosisSettings, batch_diagnose, capture_files

ERRORS = {"p1.csv": 0.05, "p2.csv": -0.03, "p3.csv": 0.004}


@pytest.fixture(scope="module")
def drawer(tmp_path_factory):
    d = tmp_path_factory.mktemp("drawer")
    for i, (name, e) in enumerate(ERRORS.items()):
        write_capture(d / name, e, seed=40 + i, periods=4)
    (d / "broken.csv").write_text("time,volts\n0,1\n1,not a number\n")
    (d / "notes.txt").write_text("not taken: the folder contributes *.csv only")
    return d


def test_batch_reports_the_broken_file_and_goes_on(drawer, tmp_path):
    out = tmp_path / "out"
    r = CliRunner().invoke(main, ["batch", str(drawer), "--jobs", "2", "--out", str(out),
                                  "--json", "--tip-r", "9M", "--shunt-r", "1M"])
    assert r.exit_code == 1, r.output       # one file failed
    data = json.loads(r.stdout)             # only JSON on stdout: no progress in --json output
    assert data["files"] == 4 and data["diagnosed"] == 3 and data["unreadable"] == 1
    rows = {row["file"].rsplit("/", 1)[-1]: row for row in data["rows"]}
    assert rows["broken.csv"]["status"] == "unreadable" and "broken.csv" in rows["broken.csv"]["error"]
    for name, e in ERRORS.items():
        row = rows[name]
        assert row["gain_error"] == pytest.approx(e, abs=0.005)   # textbook truth
        # shunt-arm trim R1·C1/R2 − C2 (textbook); 0.3 pF covers noise and 8-bit steps
        assert row["shunt_change"] == pytest.approx(shunt_trim_truth(e), abs=0.3e-12)
        assert row["shunt_change_stderr"] > 0
    assert rows["p3.csv"]["verdict"] == "compensated"
    assert [row["file"].rsplit("/", 1)[-1] for row in data["rows"]] == sorted(rows)  # file order
    table = list(csv.DictReader(io.StringIO((out / "summary.csv").read_text())))
    assert [t["file"] for t in table] == [row["file"] for row in data["rows"]]
    assert float(table[1]["gain_error"]) == rows["p1.csv"]["gain_error"]
    assert json.loads((out / "summary.json").read_text()) == data
    reports = sorted(p.name for p in out.glob("*.html"))
    assert reports == ["index.html", "p1_csv.html", "p2_csv.html", "p3_csv.html"]
    assert 'href="p1_csv.html"' in (out / "index.html").read_text()


def test_one_job_and_two_give_the_same_rows(drawer):
    s = DiagnosisSettings()
    files = capture_files([drawer / "broken.csv", drawer / "p1.csv"])
    seen = []
    one = batch_diagnose(files, s, jobs=1)
    two = batch_diagnose(files, s, jobs=2, progress=lambda d, t, o: seen.append((d, t)))
    assert one.to_dict() == two.to_dict()
    assert [r.status for r in two.rows] == ["unreadable", "diagnosed"]
    assert seen == [(1, 2), (2, 2)]


def test_files_from_folders_and_globs(drawer):
    names = [p.name for p in capture_files([drawer / "p*.csv", drawer, drawer / "p1.csv"])]
    assert names == ["p1.csv", "p2.csv", "p3.csv", "broken.csv"]   # each once, as given
    assert [p.name for p in capture_files([drawer], "*.txt")] == ["notes.txt"]


def test_batch_text_and_exit_status(drawer):
    """Text summary on stdout; the failure named on stderr in one line; exit status 1."""
    r = CliRunner().invoke(main, ["batch", str(drawer)])
    assert r.exit_code == 1
    assert r.stderr.strip() == "taumatch: 1 of 4 captures were not diagnosed (see the summary)"
    assert "UNREADABLE" in r.stdout and "4 files: 3 diagnosed" in r.stdout


@pytest.mark.parametrize("args, why", [(["nothing-here/*.csv"], "no such file or folder"),
                                       (["{drawer}", "--pattern", "*.npz"], "no file matching"),
                                       (["{drawer}", "--jobs", "0"], "0 is not in the range")])
def test_bad_batch_arguments_exit_2(drawer, args, why):
    r = CliRunner().invoke(main, ["batch", *[a.format(drawer=drawer) for a in args]])
    assert r.exit_code == 2 and why in r.output


def test_batch_of_real_captures(real_captures, tmp_path):
    """Every real export gets a row; the 12-bit calibrator capture through a 10:1 probe is
    diagnosed compensated (the folder's README: −0.08 % by an independent fit)."""
    r = CliRunner().invoke(main, ["batch", str(real_captures), "--jobs", "2", "--json"])
    assert r.exit_code in (0, 1), r.output
    data = json.loads(r.stdout)
    names = {row["file"].rsplit("/", 1)[-1]: row for row in data["rows"]}
    assert set(names) == {p.name for p in real_captures.glob("*.csv")}
    dho = names["DHO824-ch1_CH1.csv"]
    assert dho["status"] == "diagnosed" and dho["verdict"] == "compensated"
    assert dho["gain_error"] == pytest.approx(-0.0008, abs=0.003)
    assert all(row["status"] == "diagnosed" or row["error"] for row in data["rows"])
    assert (r.exit_code == 1) == any(row["status"] != "diagnosed" for row in data["rows"])


def test_progress_only_on_a_terminal_and_never_with_json():
    from taumatch.cli.progress import progress_bar, progress_wanted

    class Tty(io.StringIO):
        def isatty(self):
            return True

    assert progress_wanted(False, Tty()) and not progress_wanted(True, Tty())
    assert not progress_wanted(False, io.StringIO())
    tty = Tty()
    with progress_bar(3, "diagnosing", progress_wanted(False, tty), stream=tty) as advance:
        for k in range(1, 4):
            advance(k, f"file{k}")
    assert "diagnosing" in tty.getvalue()
    quiet = io.StringIO()
    with progress_bar(3, "diagnosing", progress_wanted(False, quiet), stream=quiet) as advance:
        advance(3)
    assert quiet.getvalue() == ""


def test_busy_line_appears_only_when_enabled():
    """The spinner of a long step (reading, fitting) shows on a terminal, never elsewhere."""
    import time

    from taumatch.cli.progress import busy

    class Tty(io.StringIO):
        def isatty(self):
            return True

    tty = Tty()
    with busy("averaging and fitting", True, after=0.0, stream=tty):
        for _ in range(1000):            # until the timer thread has drawn it (a guard only)
            if "averaging and fitting" in tty.getvalue():
                break
            time.sleep(0.01)
    assert "averaging and fitting" in tty.getvalue()
    quiet = Tty()
    with busy("averaging and fitting", False, after=0.0, stream=quiet):
        pass
    assert quiet.getvalue() == ""

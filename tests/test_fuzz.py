"""Fuzzing the command line in-process (click's CliRunner) with hostile inputs of every family
(tests/fuzz_inputs.py: capture text, binary arrays, chain specs, option values; expressions
are fuzzed by tests/test_fuzz_expressions.py).

Whatever the input, a command ends with exit status 0, 1 or 2 and never a traceback; on error
stderr is exactly one short line in the tool's style, on success nothing; no numpy, scipy or
lmfit warning is raised on the way (every warning is an error here, so one fails the test);
the inputs are unchanged; and a command that fails writes no file.

Repeatable by default (the "taumatch" hypothesis profile of conftest.py: derandomized, a few
examples per family, the file within a minute); TAUMATCH_EXPLORE=1 draws fresh examples and
TAUMATCH_FUZZ_EXAMPLES=N sets how many per family, for long runs by hand.  A few thousand
cases with time and memory limits per case: bench/stress_fuzz.py.

Expected behaviour: the project's rules (one clear line, exit status 2 for bad input and 1
for a computation that cannot succeed, inputs never modified, outputs checked before any
computation, warnings never raw) and issue 12.
"""

from __future__ import annotations

import hashlib
import os
import tempfile
import warnings
from pathlib import Path

import pytest
from click.testing import CliRunner
from fuzz_inputs import CASES, drawer
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from taumatch.cli import main

EXAMPLES = int(os.environ.get("TAUMATCH_FUZZ_EXAMPLES", "25"))


def run_case(args, inputs, folder):
    """Run one command; check everything the module text promises."""
    folder = Path(folder)
    before = {p: hashlib.sha256(p.read_bytes()).hexdigest() for p in inputs}
    files = set(folder.rglob("*"))
    cwd = os.getcwd()
    os.chdir(folder)  # anything written by mistake lands here
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error")  # a warning on any path fails the test
            result = CliRunner().invoke(main, args)
    finally:
        os.chdir(cwd)
    assert result.exception is None or isinstance(result.exception, SystemExit), \
        (args, result.exc_info)
    assert result.exit_code in (0, 1, 2), (args, result.exit_code)
    err = result.stderr.splitlines()
    if result.exit_code == 0:
        assert err == [], (args, err[:5])
    else:
        assert len(err) == 1, (args, err[:5])
        assert err[0].startswith("taumatch: error: "), (args, err[0])
        assert len(err[0]) <= 600, (args, len(err[0]), err[0][:300])
        assert set(folder.rglob("*")) == files, (args, "a failing command wrote a file")
    assert {p: hashlib.sha256(p.read_bytes()).hexdigest() for p in inputs} == before, \
        (args, "an input was modified")
    return result


@pytest.mark.parametrize("family", sorted(CASES))
def test_family_never_crashes(family):
    @settings(max_examples=EXAMPLES, suppress_health_check=list(HealthCheck))
    @given(data=st.data())
    def check(data):
        with tempfile.TemporaryDirectory() as folder:
            args, inputs = CASES[family](drawer(data=data), folder)
            run_case(args, inputs, folder)

    check()


def test_a_failing_command_writes_nothing(tmp_path):
    """The bad-inputs README's case: a valid --csv beside an image path of the wrong kind."""
    from fuzz_inputs import GOOD_SPEC

    spec = tmp_path / "chain.toml"
    spec.write_text(GOOD_SPEC, encoding="utf-8")
    for bad in (["--plot", "bad.toml"], ["--plot", "no/folder.png"], ["--plot", "ok.csv"],
                ["--plot", str(spec)]):
        r = run_case(["predict", str(spec), "--csv", "ok.csv", *bad], [spec], tmp_path)
        assert r.exit_code == 2
        assert not (tmp_path / "ok.csv").exists()


def test_the_one_line_printer_cuts_quoted_values_not_prose():
    """Regression (found by bench/stress_fuzz.py): the apostrophes of "the divider's ... the
    capture's" were taken for the quotes of a long value and the sentence between was cut."""
    from taumatch.cli import _one_line

    prose = ("the divider's time constant hides the DC gain; use a period of at least a few "
             "time constants, longer than the capture's")
    assert _one_line(prose) == prose
    value = _one_line(f"--channel: no channel named {'x' * 200!r}")
    assert value == f"--channel: no channel named '{'x' * 76}…' (200 characters)"


def test_a_channel_spanning_the_float_range_is_one_line(tmp_path):
    """Regression (found by bench/stress_fuzz.py): a channel from -1e308 to 1e308 V made the
    level histogram's span overflow (a raw RuntimeWarning); now it is refused in one line."""
    import numpy as np

    path = tmp_path / "cap.npy"
    v = np.where(np.arange(400) % 100 < 50, -1e308, 1e308)
    np.save(path, np.column_stack([np.arange(400) * 1e-6, v]))
    r = run_case(["measure", str(path)], [path], tmp_path)
    assert r.exit_code == 2 and "more than a float holds as one span" in r.stderr

"""No numpy, scipy or lmfit warning reaches the user: the commands on every example chain
spec and capture, with every warning an error (silenced at its source, never globally).

Through the command line in-process (click's CliRunner): each command ends with its exit
status and nothing on stderr when it succeeds, one line when it refuses; the extreme specs
of ../shared/bad-inputs run the same way in tests/test_bad_inputs.py, hostile inputs of every
kind in tests/test_fuzz.py.

Expected behaviour: the project's rules ("numpy/scipy/lmfit warnings never reach the user
raw; silence at the source, never globally") and issue 12.
"""

from __future__ import annotations

import warnings
from pathlib import Path

import pytest
from click.testing import CliRunner

from taumatch.cli import main

ROOT = Path(__file__).resolve().parents[1]
SPECS = sorted((ROOT / "examples").glob("*.toml"))
CAPTURES = [ROOT / "tests" / "data" / "captures" / name
            for name in ("basic.csv", "two_channels.csv", "decimal_comma.csv", "capture.npz")]
CAPTURES += sorted((ROOT / "examples").glob("*.csv"))


def _run(args):
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        result = CliRunner().invoke(main, [str(a) for a in args])
    assert result.exception is None or isinstance(result.exception, SystemExit), \
        (args, result.exc_info)
    err = result.stderr.splitlines()
    if result.exit_code == 0:
        assert err == [], (args, err[:5])
    else:
        assert result.exit_code in (1, 2) and len(err) == 1, (args, result.exit_code, err[:5])
    return result


@pytest.mark.parametrize("spec", SPECS, ids=lambda p: p.name)
def test_chain_commands_on_the_examples(spec, tmp_path):
    """bandwidth, the predicted square wave (or step) and the trim of every example: no
    warning on the way, and the examples give their figures (exit status 0)."""
    assert _run(["bandwidth", spec]).exit_code == 0
    assert _run(["predict", spec, "--input", "square" if "period" in spec.read_text()
                 else "step", "--points", "300"]).exit_code == 0
    if "adjust" in spec.read_text():
        assert _run(["trim", spec]).exit_code == 0


@pytest.mark.parametrize("capture", CAPTURES, ids=lambda p: p.name)
def test_capture_commands(capture):
    """measure and diagnose on the example and test captures: no warning on the way (a
    capture the diagnosis refuses says so in one line, exit status 1)."""
    assert _run(["measure", capture]).exit_code in (0, 2)
    _run(["diagnose", capture])

"""Every reproducer in ../shared/bad-inputs (README there: a fuzz campaign against the command
line) through the command it once broke, in-process: the exit status a user expects (2 for
bad input, 1 for a computation that cannot succeed, 0 where the input is valid), one line on
stderr on error naming the file and the field or value, nothing on stderr on success, no
warning raised on the way, and the input unchanged.

The reader's reproducers are held to their exact messages in tests/test_capture_bad_inputs.py
(the million-cell row there too, written by its recipe); here every file of the folder must
have a row in the table below, so a reproducer added to the folder fails this test until it
is given its expected outcome.

Expected behaviour: the project's rules (one clear line naming file/line/field, exit status 2
for bad input, inputs never modified; numpy/scipy warnings never reach the user raw) and the
bad-inputs README ("one line on stderr naming the file/field/value and what would be valid,
exit status 2 (1 for a computation that cannot succeed)").
"""

from __future__ import annotations

import hashlib
import re
import warnings

import pytest
from click.testing import CliRunner

from taumatch.cli import main

# file -> [(command and options, exit status, pattern of the stderr line or None)]
_RANGE = r"must be (0 or )?between .* and .*, got"
EXPECTED = {
    "npz_non_npy_member.npz": [(["measure"], 2, r"notes\.txt")],
    "npz_bad_deflate.npz": [(["measure"], 2, r"array 't': damaged array data")],
    "npy_zero_columns.npy": [(["measure"], 2, r"has no columns")],
    "long_digit_line.csv": [(["measure"], 2, r"no numeric data found")],
    "wide_no_step.csv": [(["measure"], 2, r"among CH1, .* and 4994 more; name one with --channel")],
    "huge_amplitude.csv": [(["diagnose"], 0, None), (["measure"], 0, None)],
    "deep_array.toml": [(["bandwidth"], 2, r"line 1: arrays or tables nested more than 16 deep")],
    "rise_time_undefined.toml": [(["bandwidth"], 0, None), (["predict"], 0, None)],
    "many_cables_40.toml": [(["bandwidth"], 0, None),
                            (["predict"], 1, r"many_cables_40\.toml: 200 line sections hold")],
    "make_million_cells.py": [],  # a recipe: tests/test_capture_bad_inputs.py runs what it writes
    "README.md": [],
}
for _suffix in ("gz", "bz2", "xz", "zip", "tar", "zst"):
    EXPECTED[f"plain_text_named.{_suffix}"] = [(["measure"], 0, None)]
_EXTREME = {
    "line_l_1e30.toml": r"part 2 \(line\): r must be 0 or between 1 µΩ/m and 1 MΩ/m",
    "line_length_5e-324.toml": r"part 1 \(line\): length must be between 1 µm and 10 km",
    "shunt_c_1e300.toml": r"part 3 \(shunt\): c must be between 1 aF and 1 mF",
    "source_r_1.7e308.toml": r"source: resistance must be 0 or between 1 µΩ and 1 PΩ",
    "tiny_bandwidth.toml": r"part 1 \(input\): bandwidth must be between 1 Hz and 1 THz",
    "tiny_rise_time.toml": r"source: rise_time must be between 1 fs and 1 ks",
    "tiny_source_resistance.toml": r"source: resistance must be 0 or between 1 µΩ and 1 PΩ",
    "tip_r_5e-324.toml": r"part 1 \(series\): r must be between 1 µΩ and 1 PΩ",
}
for _name, _pattern in _EXTREME.items():
    EXPECTED[f"extreme/{_name}"] = [([cmd], 2, _pattern) for cmd in ("bandwidth", "trim", "predict")]


def _files(folder):
    return sorted(str(p.relative_to(folder)) for p in folder.rglob("*") if p.is_file())


def test_every_reproducer_has_an_expected_outcome(bad_inputs):
    missing = [f for f in _files(bad_inputs) if f not in EXPECTED]
    assert not missing, f"reproducers without a row in EXPECTED: {missing}"


def run_cli(args, inputs):
    """Run the command line in-process with every warning an error; return the result after
    checking that nothing escaped and the inputs are unchanged."""
    before = [hashlib.sha256(p.read_bytes()).hexdigest() for p in inputs]
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        result = CliRunner().invoke(main, [str(a) for a in args])
    assert result.exception is None or isinstance(result.exception, SystemExit), \
        result.exc_info
    assert [hashlib.sha256(p.read_bytes()).hexdigest() for p in inputs] == before, \
        "an input was modified"
    return result


CASES = [(name, args, code, pattern) for name, rows in EXPECTED.items()
         for args, code, pattern in rows]


@pytest.mark.parametrize("name, args, code, pattern", CASES,
                         ids=[f"{c[1][0]}-{c[0]}" for c in CASES])
def test_reproducer(bad_inputs, tmp_path, monkeypatch, name, args, code, pattern):
    monkeypatch.chdir(tmp_path)  # anything written by mistake lands here, and is seen
    path = bad_inputs / name
    result = run_cli([args[0], path, *args[1:]], [path])
    err = result.stderr.splitlines()
    assert result.exit_code == code, (result.exit_code, result.stderr[:2000])
    if code == 0:
        assert err == [], err[:5]
    else:
        assert len(err) == 1, err[:5]
        line = err[0]
        assert line.startswith("taumatch: error: ") and len(line) < 400, line
        assert re.search(pattern, line), line
        assert line.count(path.name) == 1, line  # named once
    assert list(tmp_path.iterdir()) == []

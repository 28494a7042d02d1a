"""Inputs that once broke the reader (../shared/bad-inputs, see its README: a fuzz campaign
against the command line), each through ``taumatch measure`` in-process: one line on
stderr naming the file, exit status 2, the input unchanged, and a stated limit where size
is the problem. Time and memory are bounded by the limits the reader states (checked here
by size: rows, cells, bytes), never by a wall clock.

Expected behaviour: the project's rules (one clear line, exit status 2 for bad input,
inputs never modified) and the bad-inputs README ("in seconds, in bounded memory").
"""

from __future__ import annotations

import gzip
import hashlib
import io
import json
import zipfile

import numpy.lib.format as npformat
import pytest
from click.testing import CliRunner

from taumatch.capture import limits, read
from taumatch.cli import main
from taumatch.errors import InputError


def _measure(path, *options):
    """Run ``taumatch measure`` in-process; return (exit code, stdout, stderr lines)."""
    before = hashlib.sha256(path.read_bytes()).hexdigest()
    result = CliRunner().invoke(main, ["measure", str(path), *options])
    assert hashlib.sha256(path.read_bytes()).hexdigest() == before, "input modified"
    assert result.exception is None or isinstance(result.exception, SystemExit), result.exc_info
    return result.exit_code, result.stdout, result.stderr.splitlines()


def _refused(path, pattern, *options):
    code, _, err = _measure(path, *options)
    assert code == 2, err
    assert len(err) == 1, err
    assert err[0].startswith("taumatch: error: ") and str(path.name) in err[0]
    assert len(err[0]) < 400, err[0]
    import re

    assert re.search(pattern, err[0]), err[0]
    return err[0]


@pytest.mark.parametrize("name, pattern", [
    ("npz_non_npy_member.npz", r"notes\.txt"),
    ("npz_bad_deflate.npz", r"array 't': damaged array data"),
    ("npy_zero_columns.npy", r"shape \(8, 0\) has no columns"),
    ("long_digit_line.csv", r"no numeric data found"),
    ("wide_no_step.csv", r"no channel with a step in it among CH1, .* and 4994 more"),
])
def test_reproducers_give_one_line(bad_inputs, name, pattern):
    _refused(bad_inputs / name, pattern)


@pytest.mark.parametrize("suffix", ["gz", "bz2", "xz", "zip", "tar", "zst"])
def test_plain_text_under_a_compressed_name_is_read_with_a_note(bad_inputs, suffix):
    """The reproducers are plain text named .gz etc.: the reader goes by the bytes, reads
    them, and says the suffix did not match."""
    path = bad_inputs / f"plain_text_named.{suffix}"
    note = f"named .{suffix} but not compressed or archived: read as it is"
    code, out, err = _measure(path)
    assert code == 0 and err == []
    assert f"note: {note}" in out.splitlines()
    code, out, err = _measure(path, "--json")
    assert code == 0 and err == [] and json.loads(out)["capture_notes"] == [note]


def test_a_row_of_a_million_cells_is_refused_at_that_row(tmp_path, bad_inputs):
    """make_million_cells.py's file (written here by its own recipe): refused naming line 2
    and its cell count, without pandas keeping a million columns per following row."""
    path = tmp_path / "million_cells_300.csv"
    rows = ["0,0,", ",".join(["0"] * 1_000_000)] + [f"{k + 1}e-6,{(k // 10) % 2}," for k in range(300)]
    path.write_text("\n".join(rows) + "\n")
    _refused(path, r"line 2: 1000000 cells, expected 2")


def test_a_first_row_wider_than_the_column_limit(tmp_path):
    path = tmp_path / "wide.csv"
    n = limits.MAX_COLUMNS + 1
    path.write_text("".join(",".join(["0"] * n) + "\n" for _ in range(3)))
    _refused(path, rf"{n} cells in a row; a capture row may hold at most {limits.MAX_COLUMNS}")


def test_a_megabyte_line_of_digits(tmp_path):
    """The sniffer's number pattern is linear: a 1 MB line of digits ending in a letter
    (the reproducer's 12 KB line, 80 times longer) is refused, not backtracked over."""
    path = tmp_path / "digits.csv"
    path.write_text("Time,CH1\n0,0\n1," + "1" * 1_000_000 + "x\n2,0\n3,1\n4,1\n")
    _refused(path, r"line 3: cell '1111.*' in column 2 \(CH1\) is not a number")
    whole = tmp_path / "one_line.csv"
    whole.write_text("1" * 1_000_000 + "x\n")
    _refused(whole, r"no line break in the first 256 KiB")


def test_an_npz_declaring_60_million_samples_is_refused_before_inflating(tmp_path):
    """An array header declaring 60 M samples (the data not even present): refused from
    the header, with the stated limit, before anything is inflated."""
    header = io.BytesIO()
    npformat.write_array_header_1_0(header, {"descr": "<f8", "fortran_order": False,
                                             "shape": (60_000_000,)})
    path = tmp_path / "huge.npz"
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as zf:
        zf.writestr("t.npy", header.getvalue())
        zf.writestr("CH1.npy", header.getvalue())
    _refused(path, rf"array 't': 60000000 samples .* at most {limits.MAX_SAMPLES} samples per "
                   "channel")


def test_a_large_npy_is_refused_from_its_header(tmp_path):
    header = io.BytesIO()
    npformat.write_array_header_1_0(header, {"descr": "<f8", "fortran_order": False,
                                             "shape": (30_000_000, 2)})
    path = tmp_path / "huge.npy"
    path.write_bytes(header.getvalue())
    _refused(path, r"more than 20000000 samples of 3 columns")


def test_rows_past_the_sample_limit_are_refused(tmp_path, monkeypatch):
    """The row limit, lowered here so the file stays small: pandas stops one row past it
    (compressed streams are always read that way) and the error states the limit."""
    monkeypatch.setattr(limits, "MAX_SAMPLES", 1000)
    path = tmp_path / "long.csv.gz"
    path.write_bytes(gzip.compress(b"t,v\n" + b"".join(b"%d,%d\n" % (k, k % 2)
                                                       for k in range(5000))))
    _refused(path, r"more than 1000 samples of 2 columns; the reader keeps at most 1000 "
                   "samples per channel")


def test_a_compression_bomb_stops_at_the_inflated_limit(tmp_path, monkeypatch):
    """The inflated-size limit, lowered here: the decompressed stream stops there."""
    monkeypatch.setattr(limits, "MAX_INFLATED_BYTES", 1 << 20)
    path = tmp_path / "bomb.csv.gz"
    path.write_bytes(gzip.compress(b"t,v\n" + b"0,0\n" * 400_000))
    _refused(path, r"gzip content inflates past 1 MiB, the reader's limit")


@pytest.mark.parametrize("data, pattern", [
    (gzip.compress(b"t,v\n0,1\n" * 100)[:-12], r"damaged gzip data"),
    (b"\x28\xb5\x2f\xfd" + b"\x00" * 40, r"Zstandard"),
    (b"BZh9" + b"junk" * 10, r"damaged bzip2 data"),
])
def test_damaged_compressed_streams(tmp_path, data, pattern):
    path = tmp_path / "damaged.csv"
    path.write_bytes(data)
    _refused(path, pattern)


def test_time_column_and_interval_options_are_validated(tmp_path, capture_file=None):
    """``--time-column ²`` (a Unicode digit) and ``--sample-interval 1e-300``: one line each
    with what is valid (regression: a traceback, and duplicate stamps)."""
    path = tmp_path / "basic.csv"
    path.write_text("Time (s),CH1 (V)\n" + "".join(f"{k}e-6,{(k // 10) % 2}\n" for k in range(40)))
    _refused(path, r"no column named '²' for time; columns are Time, CH1, or give a 0-based "
                   r"index 0\.\.1", "--time-column", "²")
    _refused(path, r"sample interval: 1e-300 s is outside .* 1 fs to 10 ks",
             "--sample-interval", "1e-300")
    code, _, err = _measure(path, "--time-column", "0")
    assert code == 0 and err == []


def test_a_time_base_outside_the_range_is_refused(tmp_path):
    path = tmp_path / "tiny.csv"
    path.write_text("Time (s),CH1 (V)\n" + "".join(f"{k}e-300,{k % 2}\n" for k in range(10)))
    with pytest.raises(InputError, match=r"mean sample interval of 1e-300 s is outside"):
        read(path)

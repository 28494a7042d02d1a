"""A file name longer than the file system allows (ENAMETOOLONG), as an input or as an
output, is one short error line with exit status 2, never a traceback or a line thousands of
characters long (common practice, no source: Linux file names stop at 255 bytes, NAME_MAX).
Found by a second read of the hardening work: `measure` on a 3,000-character name crashed in
the reader's stat() before it opened anything."""

from __future__ import annotations

from pathlib import Path

import pytest
from click.testing import CliRunner

from taumatch.cli import main

ROOT = Path(__file__).resolve().parents[1]
LONG = "a" * 3000
CAP = str(ROOT / "data" / "demo_capture.csv")
SPEC = str(ROOT / "examples" / "bench-probe.toml")

CASES = [
    ["measure", LONG + ".csv"],
    ["bandwidth", LONG + ".toml"],
    ["measure", CAP, "--plot", LONG + ".png"],
    ["predict", SPEC, "--csv", LONG + ".csv"],
    ["diagnose", CAP, "--spec", LONG + ".toml"],
    ["correct", CAP, "-o", LONG + ".csv"],
    ["netlist", SPEC, "-o", LONG + ".cir"],
]


@pytest.mark.parametrize("args", CASES, ids=lambda a: " ".join(x[:12] for x in a[:2]))
def test_a_name_too_long_is_one_short_line(args, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    r = CliRunner().invoke(main, args)
    assert r.exit_code == 2, r.output
    lines = r.output.strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in r.output, r.output[:500]
    assert len(lines[0]) < 300, lines[0][:300]
    assert list(tmp_path.iterdir()) == []  # nothing written

"""``taumatch invert`` from the outside: output keys, values and bad input."""

import json
import subprocess
import sys

import pytest
from click.testing import CliRunner

from taumatch.cli import main


def run(*args):
    return CliRunner().invoke(main, list(args))


def test_json_keys_and_values():
    """(s+2)/((s+1)²(s+3)) step at t = 1: 2/3 − 0.75e^{−1} − 0.5e^{−1} + e^{−3}/12 (own derivation
    with the residue formula)."""
    r = run("invert", "(s+2)/((s+1)^2*(s+3))", "--input", "step", "--at", "0,1", "--json")
    assert r.exit_code == 0, r.output
    out = json.loads(r.output)
    for key in ("zeros", "poles", "gain", "numerator", "denominator", "terms", "direct",
                "time_function", "checks", "times", "values"):
        assert key in out
    import math

    want = 2 / 3 - 0.75 * math.exp(-1) - 0.5 * math.exp(-1) + math.exp(-3) / 12
    assert out["values"][1] == pytest.approx(want, rel=1e-12)
    assert out["terms"][0]["pole"] == [-1.0, 0.0]
    assert all(c["passed"] for c in out["checks"])
    assert {"name", "passed", "expected", "got"} <= set(out["checks"][0])


def test_text_output_and_plot(tmp_path):
    png = tmp_path / "r.png"
    r = run("invert", "768/(s^2+6s+25)^2", "--plot", str(png))
    assert r.exit_code == 0, r.output
    assert "partial fractions" in r.output and "checks" in r.output
    assert png.stat().st_size > 1000


@pytest.mark.parametrize("bad", ["s+", "1/0", "__import__('os')"])
def test_bad_expression_one_line_exit_2(bad):
    proc = subprocess.run([sys.executable, "-m", "taumatch", "invert", bad], capture_output=True,
                          text=True)
    assert proc.returncode == 2
    assert proc.stderr.count("\n") == 1 and "Traceback" not in proc.stderr
    assert proc.stderr.startswith("taumatch: error:")


def test_bad_input_kind_and_time():
    assert run("invert", "1/(s+1)", "--input", "pulse").exit_code == 2
    assert run("invert", "1/(s+1)", "--at", "1,x").exit_code == 2

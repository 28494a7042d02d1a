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
                          text=True, check=False)
    assert proc.returncode == 2
    assert proc.stderr.count("\n") == 1 and "Traceback" not in proc.stderr
    assert proc.stderr.startswith("taumatch: error:")


def test_bad_input_kind_and_time():
    assert run("invert", "1/(s+1)", "--input", "pulse").exit_code == 2
    assert run("invert", "1/(s+1)", "--at", "1,x").exit_code == 2


def test_expanded_resonance_keeps_its_s_squared_term():
    """Issue 10: "1e16/(s^2+2e7*s+1e16)" printed a first-order denominator and y(10 ns) = 0.993.
    Second-order step (Ogata; Nise; CHECKS.md): ωn = 1e8, ζ = 0.1 gives y(10 ns) = 0.4310."""
    import numpy as np

    r = run("invert", "1e16/(s^2+2e7*s+1e16)", "--input", "step", "--at", "10n")
    assert r.exit_code == 0, r.output
    assert "denominator 1*s^2 + 20000000*s + 1e+16" in r.output
    wn, z = 1e8, 0.1
    wd, t = wn * np.sqrt(1 - z * z), 10e-9
    want = 1 - np.exp(-z * wn * t) * (np.cos(wd * t) + z / np.sqrt(1 - z * z) * np.sin(wd * t))
    line = next(ln for ln in r.output.splitlines() if ln.strip().startswith("y(10 ns)"))
    assert float(line.split("=")[1]) == pytest.approx(want, rel=1e-9)
    assert "expression as typed vs H(jw)" in r.output


def test_high_order_pole_at_high_frequency_printed_in_a_scaled_variable():
    """(1e9/(s+1e9))^64: the forms in s exceed the float range; they are printed in x = s/w and
    the step at 64 ns is the gamma distribution's P(64, 64) (scipy.special.gammainc)."""
    from scipy.special import gammainc

    r = run("invert", "(1e9/(s+1e9))^64", "--input", "step", "--at", "64n", "--json")
    assert r.exit_code == 0, r.stderr
    out = json.loads(r.output)
    assert out["x_scale"] == pytest.approx(1e9)
    assert out["values"][0] == pytest.approx(gammainc(64, 64.0), rel=1e-9)
    text = run("invert", "(1e9/(s+1e9))^64")
    assert text.exit_code == 0 and "in x = s/w, w = 1e+09 rad/s" in text.output


def test_a_closed_form_that_fails_its_checks_is_refused():
    """Three poles of order 60: the partial fractions cancel beyond double precision; the
    command says so in one line and exits 1 instead of printing numbers that fail its checks."""
    r = run("invert", "1/((s+1)^60*(s+2)^60*(s+3)^60)")
    assert r.exit_code == 1 and r.stdout == ""
    assert r.stderr.count("\n") == 1 and "fails its check" in r.stderr


@pytest.mark.parametrize("expr, input_, want", [
    ("1/(s+1)^3", "impulse", "0"),   # was "y = nan"
    ("1/(s+1)^3", "step", "1"),
])
def test_at_1e308_gives_the_limit(expr, input_, want):
    r = run("invert", expr, "--input", input_, "--at", "1e308")
    assert r.exit_code == 0, r.stderr
    line = next(ln for ln in r.output.splitlines() if ln.strip().startswith("y(1e+308 s)"))
    assert line.split("=")[1].strip() == want


def test_value_below_its_rounding_is_not_printed_as_a_number():
    """y(10 ns) of (1e9/(s+1e9))^64 is about 1e-40; the closed form's rounding is 1e-15, so the
    value is printed as 0 with that bound, not as a confident 2.3e-15."""
    r = run("invert", "(1e9/(s+1e9))^64", "--input", "step", "--at", "10n")
    line = next(ln for ln in r.output.splitlines() if ln.strip().startswith("y(10 ns)"))
    assert "= 0 (±" in line and "rounding" in line


def test_negative_expression_is_not_taken_for_an_option():
    r = run("invert", "-1/(s+1)", "--input", "step", "--at", "1")
    assert r.exit_code == 0, r.stderr
    assert "y(1 s) = -0.6321205588" in r.output


@pytest.mark.parametrize("args", [
    ["invert"],                                          # missing argument
    ["invert", "1/(s+1)", "--jsn"],                      # unknown option
    ["correct", "/nonexistent/c.csv", "-o", "o.csv"],   # missing file
    ["diagnose", "."],                                   # a directory
    ["measure", "x.csv", "--levels", "median"],          # a bad choice
    ["divider", "--ratio", "10", "--sections", "many"],  # not an integer
    ["nosuchcommand"],
    ["--nosuchoption"],
])
def test_option_parser_errors_are_one_line_exit_2(args):
    """Errors raised by click's parser print the tool's own single line (not click's four) and
    exit 2, on several commands."""
    r = run(*args)
    assert r.exit_code == 2
    assert r.stderr.count("\n") == 1 and r.stderr.startswith("taumatch: error: "), r.stderr
    assert "--help" in r.stderr and "Usage:" not in r.stderr


def test_help_and_version_still_work():
    assert run("invert", "--help").exit_code == 0
    assert run("--version").exit_code == 0
    bare = run()
    assert "Usage:" in bare.output  # bare "taumatch" still shows the help


def test_the_library_result_is_what_the_command_prints():
    """``taumatch invert`` prints :func:`taumatch.lti.inversion.invert`'s result: the step
    of 1/(s+1)² is 1 − (1 + t)·e^{−t} (Laplace table, e.g. Nilsson & Riedel)."""
    import math

    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from taumatch.lti.inversion import default_span, invert

    res = invert("1/(s+1)^2", "step", [0.0, 1.0, 2.0])
    for t, v in zip(res.times, res.values):
        assert v == pytest.approx(1 - (1 + t) * math.exp(-t), abs=1e-15)
    printed = run("invert", "1/(s+1)^2", "--input", "step", "--at", "0,1,2")
    assert printed.output == res.summary() + "\n"
    assert json.loads(run("invert", "1/(s+1)^2", "--input", "step", "--at", "0,1,2",
                          "--json").output)["values"] == pytest.approx(list(res.values))
    # the picture's span: six time constants of the slowest pole (1 s)
    assert default_span(res.Y) == pytest.approx(6.0)
    fig, ax = res.plot()
    t, y = ax.get_lines()[0].get_data()
    assert t[-1] == pytest.approx(6.0) and y[-1] == pytest.approx(1 - 7 * math.exp(-6))
    plt.close(fig)

"""Which heavy libraries each command path loads (start-up is paid only where it is used).

Every case runs the command line in a fresh interpreter and reports which of numpy, scipy,
sympy, matplotlib, pandas and lmfit are in ``sys.modules`` afterwards.  These are tests of
module presence, never of time (bench/bench_startup.py, bench_chain.py and
bench_diagnose.py measure the time, side by side with their references).  Each absence has
a matching presence case (a picture asked for loads matplotlib; the diagnosis loads lmfit),
so the probe itself is shown to see the libraries it looks for.
"""

from __future__ import annotations

import importlib.metadata
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "examples"
DEMO = ROOT / "data" / "demo_capture.csv"
HEAVY = ("numpy", "scipy", "sympy", "matplotlib", "pandas", "lmfit")

PROBE = rf"""
import json, sys
HEAVY = {HEAVY!r}
args, report = json.loads(sys.argv[1]), sys.argv[2]
sys.argv = ["taumatch"] + args
code = 0
try:
    from taumatch.cli import main
    main()
except SystemExit as exc:
    code = exc.code
with open(report, "w") as fh:
    json.dump({{"code": code, "loaded": [m for m in HEAVY if m in sys.modules]}}, fh)
"""


def loaded(args, tmp_path, codes=(0, None)) -> set:
    """Heavy libraries loaded by ``taumatch ARGS`` in a fresh interpreter (its exit status
    one of ``codes``)."""
    report = tmp_path / "report.json"
    env = dict(os.environ, MPLBACKEND="Agg")
    out = subprocess.run([sys.executable, "-c", PROBE, json.dumps([str(a) for a in args]),
                          str(report)], cwd=tmp_path, capture_output=True, text=True, env=env,
                         timeout=300, check=False)
    got = json.loads(report.read_text())
    assert got["code"] in codes, (args, out.stderr[-2000:])
    return set(got["loaded"])


def test_bare_interpreter_loads_none_of_them(tmp_path):
    """The baseline: nothing in the environment preloads a heavy library."""
    code = f"import sys, json; print(json.dumps([m for m in {HEAVY!r} if m in sys.modules]))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert json.loads(out.stdout) == []


def _commands():
    import pkgutil

    from taumatch import cli

    return sorted(i.name[4:] for i in pkgutil.iter_modules(cli.__path__)
                  if i.name.startswith("cmd_"))


@pytest.mark.parametrize("args", [["--help"], ["--version"], []], ids=["help", "version", "bare"])
def test_help_and_version_load_nothing_heavy(args, tmp_path):
    """Bare ``taumatch`` prints the help and exits 2 (click's usage status)."""
    assert loaded(args, tmp_path, codes=(0, 2, None)) == set()


def test_every_command_help_loads_nothing_heavy(tmp_path):
    """``taumatch <command> --help`` for every command, one interpreter each."""
    for name in _commands():
        assert loaded([name, "--help"], tmp_path) == set(), name


@pytest.mark.parametrize("spec", sorted(EXAMPLES.glob("*.toml")), ids=lambda p: p.stem)
def test_bandwidth_needs_numpy_only(spec, tmp_path):
    """The chain figures come from the exact response in numpy: no scipy, no sympy, no
    picture library, no capture reader, no fitting library."""
    assert loaded(["bandwidth", spec], tmp_path) == {"numpy"}


def test_bandwidth_with_a_picture_loads_matplotlib(tmp_path):
    """The presence case: asked for a picture, the same command loads matplotlib."""
    got = loaded(["bandwidth", EXAMPLES / "bench-probe.toml", "--plot", tmp_path / "b.png"],
                 tmp_path)
    assert "matplotlib" in got and "sympy" not in got


@pytest.mark.parametrize("args", [
    ["predict", EXAMPLES / "bench-probe.toml"],
    ["predict", EXAMPLES / "hv-divider.toml", "--input", "square"],
    ["trim", EXAMPLES / "mistrimmed-probe.toml"],
    ["netlist", EXAMPLES / "bench-probe.toml", "-o", "deck.cir"],
    ["divider", "--ratio", "10", "--instrument", "1M||14p", "--cable-c", "90p"],
], ids=["predict-step", "predict-square", "trim", "netlist", "divider"])
def test_chain_commands_leave_out_sympy_pictures_captures_and_fits(args, tmp_path):
    got = loaded(args, tmp_path)
    assert "numpy" in got
    assert not got & {"sympy", "matplotlib", "pandas", "lmfit"}, got


def test_measure_reads_without_scipy_sympy_pictures_or_fits(tmp_path):
    got = loaded(["measure", DEMO], tmp_path)
    assert {"numpy", "pandas"} <= got
    assert not got & {"scipy", "sympy", "matplotlib", "lmfit"}, got


def test_diagnose_loads_the_fit_but_no_sympy_or_pictures(tmp_path):
    """The presence case for lmfit, and no sympy or matplotlib without --plot/--report."""
    got = loaded(["diagnose", DEMO], tmp_path)
    assert {"numpy", "pandas", "scipy", "lmfit"} <= got
    assert not got & {"sympy", "matplotlib"}, got


@pytest.mark.parametrize("args", [["correct", DEMO, "-o", "corrected.csv"],
                                  ["compare", DEMO, DEMO]], ids=["correct", "compare"])
def test_other_fits_draw_nothing_without_a_picture(args, tmp_path):
    got = loaded(args, tmp_path)
    assert "lmfit" in got
    assert not got & {"sympy", "matplotlib"}, got


def test_diagnose_with_a_picture_loads_matplotlib(tmp_path):
    got = loaded(["diagnose", DEMO, "--plot", tmp_path / "d.png"], tmp_path)
    assert {"matplotlib", "lmfit"} <= got


def test_version_is_the_installed_metadata(tmp_path):
    """``--version`` prints the package's ``__version__`` (no metadata scan at start-up):
    it must be what the installed distribution says."""
    import taumatch

    assert taumatch.__version__ == importlib.metadata.version("taumatch")
    out = subprocess.run([sys.executable, "-m", "taumatch", "--version"], capture_output=True,
                         text=True, check=True)
    assert out.stdout.strip() == f"taumatch, version {taumatch.__version__}"

"""One vocabulary: the library names its parameters, the command line its options.

A library message that tells the user what to give names the parameter as a Python caller
passes it (``force=True``, ``sample_interval=``); the commands print the same message with
their option (``--force``, ``--sample-interval``).  Project rule (DESIGN.md, issue 11 item
6), no outside source.
"""

from __future__ import annotations

import ast
import re
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

from taumatch.cli import main
from taumatch.cli.words import OPTIONS, cli_words
from taumatch.errors import ComputationError, InputError

ROOT = Path(__file__).resolve().parents[1] / "src" / "taumatch"


def _options() -> set:
    """Every option of every command (``--sample-interval``, ``--tol``, ...)."""
    out = set()
    for command in main.commands.values():
        for p in command.params:
            out.update(o for o in p.opts + p.secondary_opts if o.startswith("--"))
    return out - {"--help", "--version"}


def _strings(tree):
    """String constants of a module that are not docstrings (f-string parts included)."""
    docs = set()
    for node in ast.walk(tree):
        if isinstance(node, (ast.Module, ast.ClassDef, ast.FunctionDef, ast.AsyncFunctionDef)):
            body = node.body
            if body and isinstance(body[0], ast.Expr) and isinstance(body[0].value, ast.Constant):
                docs.add(id(body[0].value))
    for node in ast.walk(tree):
        if isinstance(node, ast.Constant) and isinstance(node.value, str) and id(node) not in docs:
            yield node


def test_no_library_string_names_a_command_line_option():
    """Outside ``taumatch.cli`` no message names an option of a command (docstrings may say
    what a command does with a value)."""
    flags = _options()
    pattern = re.compile(r"(?<![\w-])(" + "|".join(re.escape(f) for f in sorted(flags)) +
                         r")(?![\w-])")
    bad = []
    for path in sorted(ROOT.rglob("*.py")):
        if "cli" in path.relative_to(ROOT).parts:
            continue
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in _strings(tree):
            m = pattern.search(node.value)
            if m:
                bad.append(f"{path.relative_to(ROOT)}:{node.lineno}: {m.group(0)}")
    assert not bad, "\n".join(bad)


def test_every_translated_parameter_is_an_option():
    assert set(OPTIONS.values()) <= _options()


def test_the_library_names_the_parameter_the_command_its_option(tmp_path):
    """A 1-D .npy array has no time base: the library asks for ``sample_interval=``, the
    command for ``--sample-interval``; a clipped capture's refusal says ``force=True`` in the
    library and ``--force`` on the command line."""
    from taumatch import read_capture

    path = tmp_path / "one.npy"
    np.save(path, np.zeros(100))
    with pytest.raises(InputError, match=r"needs sample_interval=$"):
        read_capture(path)
    r = CliRunner().invoke(main, ["measure", str(path)])
    assert r.exit_code == 2 and r.output.strip().endswith("needs --sample-interval")
    assert "sample_interval" not in r.output

    clipped = Path(__file__).parent / "data" / "diagnosis" / "clipped_corner.csv"
    from taumatch import diagnose

    with pytest.raises(ComputationError, match=r"\(use force=True to override\)$"):
        diagnose(read_capture(clipped))
    r = CliRunner().invoke(main, ["diagnose", str(clipped)])
    assert r.exit_code == 1 and r.output.strip().endswith("(use --force to override)")


@pytest.mark.parametrize("text, want", [
    ("give tip_r= or chain= if a divider is there", "give --tip-r or --chain if a divider is there"),
    ("name one with channel=", "name one with --channel"),
    ("(use force=True to override)", "(use --force to override)"),
    ("tolerance (tolerances=): expected", "tolerance (--tol): expected"),
    # values, not keywords: left alone
    ("no file chain=1.csv", "no file chain=1.csv"),
    ("force=Truer", "force=Truer"),
    ("shunt_capacitance= 1", "shunt_capacitance= 1"),
])
def test_translation_touches_keywords_only(text, want):
    assert cli_words(text) == want


def test_an_option_error_echoes_a_huge_value_cut(tmp_path):
    """Thirty thousand characters given to an option: one line of error, the value cut to
    its start and its length (regression: the whole value was echoed)."""
    spec = Path(__file__).resolve().parents[1] / "examples" / "bench-probe.toml"
    capture = Path(__file__).resolve().parents[1] / "data" / "demo_capture.csv"
    for args in (["bandwidth", str(spec), "--overshoot", "9" * 30000],
                 ["diagnose", str(capture), "--accept", "x" * 30000],
                 ["measure", str(capture), "--sample-interval", "1" * 30000 + "q"],
                 ["measure", str(capture), "--decimal", "1" * 30000]):
        r = CliRunner().invoke(main, args)
        assert r.exit_code == 2, r.output
        assert len(r.output) < 400 and r.output.count("\n") == 1, r.output[:500]
        assert "…'" in r.output and "characters)" in r.output

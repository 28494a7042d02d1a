"""Fuzzing ``taumatch invert`` through the command line, in process (click's CliRunner).

Whatever the expression and options, the command ends with exit status 0, 1 or 2, never a
traceback; on error stderr is exactly one line in the tool's style; no numpy/scipy warning is
raised on the way (warnings are turned into errors here, so one would fail the test).
Repeatable by default (the "taumatch" hypothesis profile of conftest.py); TAUMATCH_EXPLORE=1
draws fresh examples and TAUMATCH_FUZZ_EXAMPLES=N sets how many.
"""

import os
import warnings

from click.testing import CliRunner
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from taumatch.cli import main

EXAMPLES = int(os.environ.get("TAUMATCH_FUZZ_EXAMPLES", "60"))

_mantissa = st.one_of(st.integers(0, 999).map(str),
                      st.floats(0, 10, allow_nan=False).map(lambda x: f"{x:.3g}"))
_number = st.tuples(_mantissa, st.one_of(st.just(""), st.integers(-400, 400).map(lambda e: f"e{e}")),
                    st.sampled_from(["", "", "", "p", "n", "u", "k", "M", "G", "f"])).map("".join)
_atom = st.one_of(_number, st.just("s"), st.just("s"), st.just("(s+1)"))


def _extend(inner):
    return st.one_of(
        st.tuples(inner, st.sampled_from(["+", "-", "*", "/", "", "**"]), inner).map("".join),
        inner.map(lambda x: f"({x})"),
        st.tuples(inner, st.integers(-70, 70)).map(lambda t: f"({t[0]})^{t[1]}"),
        inner.map(lambda x: f"-{x}"),
        st.tuples(st.integers(1, 120), inner).map(lambda t: "(" * t[0] + t[1] + ")" * t[0]),
    )


_expression = st.one_of(
    st.recursive(_atom, _extend, max_leaves=10),
    st.text(alphabet="s0123456789.eE+-*/^() pnukMGTµ", max_size=40),
    st.text(max_size=12),
)
_time = st.one_of(st.sampled_from(["0", "1n", "1e-9", "2.5", "1e308", "-1", "1e-300", "10 ms", "7u"]),
                  st.floats(0, 1e3).map(repr), st.sampled_from(["nan", "inf", "x", "1e400", "3 kHz"]))
_options = st.fixed_dictionaries({
    "--input": st.one_of(st.sampled_from(["impulse", "step", "ramp", "sine:1k"]),
                         st.sampled_from(["sine:1e300", "sine:0", "sine:-1", "pulse", "sine:", "STEP"])),
    "--at": st.lists(_time, min_size=1, max_size=3).map(",".join),
    "--json": st.booleans(),
})


def _check(result):
    assert result.exit_code in (0, 1, 2), (result.exit_code, result.output)
    assert result.exception is None or isinstance(result.exception, SystemExit), repr(result.exception)
    if result.exit_code:
        lines = result.stderr.splitlines()
        assert len(lines) == 1 and lines[0].startswith("taumatch: error: "), result.stderr
    else:
        assert result.stderr == ""


@settings(max_examples=EXAMPLES, suppress_health_check=[HealthCheck.too_slow])
@given(expr=_expression, options=_options)
def test_invert_never_crashes(expr, options):
    args = ["invert", expr, "--input", options["--input"], "--at", options["--at"]]
    if options["--json"]:
        args.append("--json")
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # a warning on any path fails the test
        result = CliRunner().invoke(main, args)
    _check(result)


def test_known_hard_cases_give_one_line():
    """The reproducers of issue 12 for expressions (shared/bad-inputs/README.md), each with the
    status it must give: 2 for input that cannot be taken, 1 for a computation that cannot."""
    cases = {
        "1/" + "(" * 190 + "s+1" + ")" * 190: 2,   # nesting beyond the stated 100 levels
        "1/((s+1)^64)^4": 2,                        # degree beyond the stated 200
        "(1e200)^2": 2,                             # a value beyond the float range
        "1/(s+1e9)^64": 2,                          # |H| about 1e-576 everywhere: refused, scale it
        "1/(s*1e-300*1e-300+1)": 2,                 # a pole at 1e600 rad/s
        "1/((s+1)^60*(s+2)^60*(s+3)^60)": 1,        # its partial fractions cancel beyond doubles
    }
    for expr, status in cases.items():
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            result = CliRunner().invoke(main, ["invert", expr])
        _check(result)
        assert result.exit_code == status, (expr, result.stderr)

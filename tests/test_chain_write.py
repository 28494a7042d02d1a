"""Writing a chain spec: dump → load gives the same chain (every shipped example, labels with
characters TOML must escape, and random chains)."""

from __future__ import annotations

import glob
from dataclasses import replace

import pytest

from taumatch.chain import (
    Adjust,
    Branch,
    Buffer,
    Chain,
    Input,
    Lead,
    Line,
    Series,
    Shunt,
    Source,
    load,
    loads,
)
from taumatch.chain.write import dump, dumps

SPECS = sorted(glob.glob("examples/*.toml")) + ["data/demo_chain.toml"]


def _same(a: Chain, b: Chain) -> bool:
    return replace(b, origin=a.origin) == a


@pytest.mark.parametrize("path", SPECS)
def test_examples_round_trip(path, tmp_path):
    chain = load(path)
    out = tmp_path / "again.toml"
    dump(chain, out, comment="written by the test\n\nsecond line")
    assert _same(chain, load(out))
    assert out.read_text(encoding="utf-8").startswith("# written by the test\n#\n# second")


def test_every_kind_and_field_and_awkward_labels():
    """Each part kind with every optional field, a branch, a trimmer range, a buffer's
    response, and labels holding quotes, backslashes, tabs, newlines, DEL and non-ASCII."""
    odd = 'tip "arm" \\ \t tab\nnew line \x7f del, Ω µ ∥ 東'
    chain = Chain(Source(47.0, amplitude=325.0, period=1e-3, rise_time=2e-7), (
        Lead(length=0.15, radius=5e-4, r=0.1, label=odd),
        Series(r=9e6, c=11.5e-12, l=1e-8, label="x"),
        Shunt(r=1e9, c=1e-12, l=1e-3, branch=Branch(r=100.0, c=1e-9),
              adjust=Adjust("branch.c", 1e-10, 1e-8)),
        Line(length=1.2, l=2.5e-7, c=6e-11, r=150.0, g=1e-12),
        Buffer(r=1e6, gain=2.0, c=9e-13, bandwidth=1.5e9, response="bessel", r_out=50.0),
        Input(r=50.0, c=1e-12, bandwidth=2e8, response="two-pole"),
    ), name='name with "quotes"')
    text = dumps(chain)
    try:  # valid TOML by Python's own reader (tomli before 3.11)
        import tomllib
    except ModuleNotFoundError:  # pragma: no cover
        import tomli as tomllib
    tomllib.loads(text)
    back = loads(text)
    assert _same(chain, back)
    assert back.parts[0].label == odd


def test_random_chains_round_trip():
    """Random valid chains (hypothesis, seeded): dump then load is the identity."""
    from hypothesis import HealthCheck, given, settings
    from hypothesis import strategies as st

    def within(lo, hi):  # physical ranges, well inside what any spec accepts
        return st.floats(lo, hi, allow_nan=False, allow_infinity=False)

    r, c, l = within(1e-2, 1e11), within(1e-15, 1e-4), within(1e-12, 1e-1)
    label = st.text(max_size=20)
    series = st.builds(Series, r=r, c=st.none() | c, l=st.none() | l, label=label)
    shunt = st.builds(Shunt, r=r, c=st.none() | c, l=st.none() | l, label=label)
    line = st.builds(Line, length=within(1e-3, 1e3), l=within(1e-8, 1e-5),
                     c=within(1e-12, 1e-9), r=st.just(0.0) | within(1e-3, 1e4), label=label)
    inp = st.builds(Input, r=r, c=st.none() | c, label=label)
    amp = within(1e-3, 1e6)

    @settings(max_examples=60, deadline=None, derandomize=True,
              suppress_health_check=[HealthCheck.too_slow])
    @given(parts=st.lists(st.one_of(series, shunt, line), max_size=6), last=inp,
           amp=amp, name=label)
    def check(parts, last, amp, name):
        chain = Chain(Source(0.0, amplitude=amp), tuple(parts) + (last,), name=name)
        assert _same(chain, loads(dumps(chain)))

    check()


def test_tolerances_round_trip():
    """Chain.tolerances survive dump → load: relative ones as percentages (7 % is the float
    0.07 again, not 0.07000000000000001), absolute ones in SI, a whole part's tolerance by
    field, the source's too (regression: dump dropped them)."""
    from taumatch.chain.tolerance import Tolerance

    text = """version = 1
[source]
resistance = "50"
amplitude = "1"
tolerance = "10%"
[[part]]
kind = "series"
r = "9M"
c = "11.5p"
tolerance = "7%"
[[part]]
kind = "line"
length = "1.2"
l = "250n"
c = "60p"
tolerance = { c = "2p", length = "0.3%" }
[[part]]
kind = "input"
r = "1M"
c = "14p"
tolerance = { r = "1%", c = 1.5e-12 }
"""
    chain = loads(text)
    assert len(chain.tolerances) == 2 + 2 + 2 + 2
    written = dumps(chain)
    assert 'tolerance = {resistance = "10%", amplitude = "10%"}' in written
    assert 'tolerance = {r = "7%", c = "7%"}' in written
    back = loads(written)
    assert back.tolerances == chain.tolerances
    assert _same(chain, back)
    tol = {(n, f): t for n, f, t in back.tolerances}
    assert tol[(1, "r")] == Tolerance(0.07) and tol[(3, "c")] == Tolerance(1.5e-12, False)
    # fractions not typed as percentages read back exactly or to the last bit (1/3: no
    # float x has x / 100 == 1/3)
    odd = replace(chain, tolerances=((1, "c", Tolerance(1 / 3)), (2, "c", Tolerance(0.1234567))))
    again = loads(dumps(odd)).tolerances
    assert again[1] == odd.tolerances[1]
    assert again[0][2].amount == pytest.approx(1 / 3, rel=2.3e-16)

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

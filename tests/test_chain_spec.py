"""Chain spec (TOML, version 1): reading values and rejecting bad input with one line.

The error-message format is our own (STYLE.md: name the thing, the value and the fix).
"""

import math

import pytest

from taumatch.chain import Adjust, Chain, Input, Lead, Line, Series, Shunt, Source, load, loads
from taumatch.chain.ground_lead import grover_inductance
from taumatch.errors import InputError

BASE = """
name = "test"
[source]
resistance = "50"
[[part]]
kind = "series"
r = "9M"
c = "11.5p"
[[part]]
kind = "input"
r = "1M"
c = "14p"
"""


def spec(extra_part="", source='resistance = "50"'):
    return f"""
[source]
{source}
{extra_part}
[[part]]
kind = "input"
r = "1M"
c = "14p"
"""


def test_full_example_values():
    """The spec of the issue reads back in SI units (prefixes: BIPM SI Brochure, table 7)."""
    text = """
    version = 1
    name = "bench probe"
    [source]
    resistance = "150 Ω"
    amplitude = "1"
    period = "1m"
    rise_time = "200n"
    [[part]]
    kind = "series"
    l = "120 nH"
    [[part]]
    kind = "series"
    r = "9M"
    c = "11.5p"
    [[part]]
    kind = "line"
    length = "1.2 m"
    r = "150 Ω/m"
    l = "250n"
    c = "60 pF/m"
    g = "0"
    [[part]]
    kind = "shunt"
    c = "17.5p"
    adjust = "c"
    min = "5p"
    max = "30p"
    branch = {r = "100", c = "1n"}
    [[part]]
    kind = "input"
    r = "1M"
    c = "14p"
    bandwidth = "200M"
    response = "bessel"
    """
    chain = loads(text)
    assert chain.name == "bench probe"
    assert chain.source == Source(150.0, 1.0, 1e-3, 200e-9)
    assert chain.parts[0] == Series(l=120e-9)
    assert chain.parts[2] == Line(length=1.2, l=250e-9, c=60e-12, r=150.0, g=0.0)
    shunt = chain.parts[3]
    assert isinstance(shunt, Shunt) and shunt.c == 17.5e-12
    assert shunt.branch.r == 100.0 and shunt.branch.c == 1e-9
    assert shunt.adjust == Adjust("c", 5e-12, 30e-12)
    assert chain.parts[4] == Input(r=1e6, c=14e-12, bandwidth=200e6, response="bessel")
    assert chain.adjustable[0] == 4


def test_numbers_as_floats_and_lead():
    """Plain TOML numbers are SI; a lead's inductance is Grover's (F. W. Grover)."""
    chain = loads(spec('[[part]]\nkind = "lead"\nlength = 0.1524\nradius = "0.5 mm"'))
    lead = chain.parts[0]
    assert isinstance(lead, Lead)
    assert lead.inductance == pytest.approx(grover_inductance(0.1524, 0.0005), rel=1e-15)
    assert chain.has_inductive_lead()


def test_chain_is_frozen_and_with_value_returns_new():
    chain = loads(BASE)
    new = chain.with_value(1, "c", 12e-12)
    assert chain.parts[0].c == 11.5e-12 and new.parts[0].c == 12e-12
    with pytest.raises(AttributeError):
        chain.name = "x"


def test_load_file_and_name_in_message(tmp_path):
    path = tmp_path / "chain.toml"
    path.write_text(spec('[[part]]\nkind = "shunt"\nc = "-2p"'), encoding="utf-8")
    with pytest.raises(InputError, match=r"^chain\.toml: part 1 \(shunt\): c must be positive, got '-2p'"):
        load(path)
    assert path.read_text(encoding="utf-8").count("-2p") == 1  # input never modified


@pytest.mark.parametrize(
    "text, pattern",
    [
        (spec('[[part]]\nkind = "shunt"\nc = "0"'), r"part 1 \(shunt\): c must be positive, got '0'"),
        (spec('[[part]]\nkind = "series"\nx = "1"'), r"part 1 \(series\): unknown key 'x'; valid keys"),
        (spec('[[part]]\nkind = "line"\nlength = "1"\nl = "250n"'),
         r"part 1 \(line\): c is required"),
        (spec('[[part]]\nkind = "widget"'), r"part 1: kind must be one of series, shunt"),
        (spec('[[part]]\nr = "1"'), r"part 1: kind is required"),
        (spec('[[part]]\nkind = "series"'), r"part 1 \(series\): give at least one of r, c, l"),
        (spec('[[part]]\nkind = "series"\nc = "11.5q"'), r"part 1 \(series\): c: unknown prefix"),
        (spec('[[part]]\nkind = "series"\nc = "11.5 H"'), r"part 1 \(series\): c: .* expected F"),
        (spec('[[part]]\nkind = "shunt"\nc = "5p"\nadjust = "q"'),
         r"part 1 \(shunt\): adjust must be one of r, c, branch.r, branch.c, got 'q'"),
        (spec('[[part]]\nkind = "shunt"\nc = "5p"\nadjust = "r"'), r"adjust = 'r' but r has no value"),
        (spec('[[part]]\nkind = "shunt"\nc = "5p"\nmin = "1p"'), r"min needs adjust"),
        (spec('[[part]]\nkind = "shunt"\nc = "5p"\nadjust = "c"\nmin = "9p"\nmax = "2p"'),
         r"min must be below max"),
        (spec('[[part]]\nkind = "shunt"\nbranch = {r = "100"}'), r"part 1 \(shunt\): branch: c is required"),
        (spec('[[part]]\nkind = "lead"\nlength = "1 mm"\nradius = "0.5 mm"'),
         r"part 1 \(lead\): length must be at least 10 times the radius"),
        (spec('[[part]]\nkind = "buffer"\nr = "1M"\ngain = "-1"'), r"part 1 \(buffer\): gain must be positive"),
        (spec(source='resistance = "-1"'), r"source: resistance must be zero or positive, got '-1'"),
        (spec(source='amplitude = "1"'), r"source: resistance is required"),
        (spec(source='resistance = "50"\nvolts = 3'), r"source: unknown key 'volts'"),
        ("[source]\nresistance = 50\n[[part]]\nkind = 'series'\nr = '1k'",
         r"chain\.toml: the chain has no input part"),
        (BASE + '[[part]]\nkind = "shunt"\nc = "1p"', r"part 2 \(input\): the input must be the last part"),
        (BASE.replace('r = "1M"', 'r = "1M"\nresponse = "bessel"'), r"response needs a bandwidth"),
        (BASE.replace('c = "14p"', 'c = "14p"\nbandwidth = "1G"\nresponse = "brick"'),
         r"part 2 \(input\): response must be one of single-pole, two-pole, bessel"),
        ("[source\nresistance = 1", r"chain\.toml: not valid TOML: .*line 1"),
        ("version = 2\n" + BASE, r"version must be 1, got 2"),
        ("colour = 'red'\n" + BASE, r"chain\.toml: unknown key 'colour'"),
        ("name = 'x'\n[[part]]\nkind='input'\nr='1M'", r"\[source\] is required"),
    ],
)
def test_spec_errors_are_one_line(text, pattern):
    with pytest.raises(InputError, match=pattern) as info:
        loads(text, origin="chain.toml")
    assert "\n" not in str(info.value)
    assert str(info.value).startswith("chain.toml: ")


def test_several_adjust_marks_and_the_trimmer_among_them():
    """Issue 14: several parts and fields may be marked; the trimmer (what `trim` and the
    1 kHz diagnosis move) is the first mark naming a plain capacitance c; a mark's own range
    is given per mark; a field marked twice, or a bare min beside several marks, is refused
    (common practice, no source: the spec's own rules)."""
    text = spec('[[part]]\nkind = "shunt"\nc = "5p"\nbranch = {r = "68", c = "15p"}\n'
                'adjust = ["branch.r", {field = "c", min = "2p", max = "30p"}, "branch.c"]\n'
                '[[part]]\nkind = "series"\nr = "9M"\nc = "1p"\nadjust = "c"')
    chain = loads(text)
    assert [(n, a.field) for n, _, a in chain.adjustments] == [
        (1, "branch.r"), (1, "c"), (1, "branch.c"), (2, "c")]
    number, _, trimmer = chain.adjustable
    assert (number, trimmer.field, trimmer.min, trimmer.max) == (1, "c", 2e-12, 30e-12)
    for bad, pattern in (
            ('adjust = ["c", "c"]', r"part 1 \(shunt\): adjust names 'c' twice"),
            ('adjust = ["c", "x"]', r"part 1 \(shunt\): adjust must be one of"),
            ('adjust = ["c"]\nmin = "1p"', r"with several adjust marks give each its range"),
            ('adjust = []', r"adjust = \[\] marks nothing"),
            ('adjust = [{field = "c", max = "4p"}]', r"lies outside the trimmer's own range")):
        with pytest.raises(InputError, match=pattern):
            loads(spec(f'[[part]]\nkind = "shunt"\nc = "5p"\n{bad}'))


def test_parts_validate_when_made_directly():
    with pytest.raises(InputError, match="line: length must be positive"):
        Line(length=-1.0, l=1e-7, c=1e-10)
    with pytest.raises(InputError, match="no input part"):
        Chain(source=Source(50.0), parts=(Series(r=1.0),))
    assert math.isclose(Line(length=1.0, l=250e-9, c=100e-12).impedance, 50.0)


def test_high_voltage_thresholds():
    """60 V dc / 30 V rms: the hazardous-live limits of IEC 61010-1 as commonly quoted."""
    assert not Source(50.0, amplitude=60.0).is_high_voltage("step")
    assert Source(50.0, amplitude=61.0).is_high_voltage("step")
    assert Source(50.0, amplitude=43.0, period=1e-3).is_high_voltage("square")
    assert not Source(50.0, amplitude=42.0).is_high_voltage("sine")


def test_trimmer_value_outside_its_own_range_is_refused():
    """A trimmer cannot sit outside its range: the spec says where (common practice)."""
    from taumatch.chain import loads

    text = ('[source]\nresistance = "50"\n[[part]]\nkind = "series"\nr = "9M"\nc = "11p"\n'
            '[[part]]\nkind = "shunt"\nc = "35p"\nadjust = "c"\nmin = "5p"\nmax = "30p"\n'
            '[[part]]\nkind = "input"\nr = "1M"\nc = "14p"\n')
    with pytest.raises(InputError, match=r"part 2 \(shunt\): c = .* outside the trimmer"):
        loads(text)

"""Tolerances in a chain spec and how a diagnosis combines them.

The reading of a tolerance as the half-width of a rectangular distribution (standard
uncertainty = half-width/√3) and the combination of independent terms of a sum in
quadrature are JCGM 100:2008 (GUM) 4.3.7 and 5.1.2 (from memory); the expected values below
are worked out from those rules in the test.
"""

from __future__ import annotations

import math

import pytest

from taumatch import InputError
from taumatch.chain import loads
from taumatch.chain.tolerance import Tolerance, parse_tolerance
from taumatch.chain_facts import facts_from_chain

SPEC = """
[source]
resistance = "50"
tolerance = { resistance = "10%" }

[[part]]
kind = "series"
l = "150n"

[[part]]
kind = "series"
r = "9M"
c = "11.5p"
tolerance = "1%"

[[part]]
kind = "line"
length = "1.2"
r = "150"
l = "250n"
c = "60p"
tolerance = { c = "5%" }

[[part]]
kind = "shunt"
c = "17.5p"
adjust = "c"
min = "5p"
max = "30p"

[[part]]
kind = "input"
r = "1M"
c = "14p"
tolerance = { c = "2p" }
"""


def test_parse_relative_absolute_and_bad():
    assert parse_tolerance("5%", "F") == Tolerance(0.05, True)
    assert parse_tolerance("2p", "F") == Tolerance(2e-12, False)
    assert parse_tolerance("2 pF", "F").half_width(1e-9) == 2e-12
    assert parse_tolerance(1e-12, "F") == Tolerance(1e-12, False)  # numbers are SI
    for bad, match in (("100%", "below|100 %"), ("-1%", "0 up to"), ("x%", "percentage"),
                       ("2 H", "F"), (True, "tolerance")):
        with pytest.raises(InputError, match=match):
            parse_tolerance(bad, "F", field="part 2 (series): tolerance.c")


def test_spec_reads_part_and_value_tolerances():
    chain = loads(SPEC)
    tol = {(n, f): t for n, f, t in chain.tolerances}
    assert tol[(0, "resistance")] == Tolerance(0.1)
    assert tol[(2, "r")] == tol[(2, "c")] == Tolerance(0.01)
    assert (2, "l") not in tol  # no value, no tolerance
    assert tol[(3, "c")] == Tolerance(0.05) and (3, "l") not in tol
    assert tol[(5, "c")] == Tolerance(2e-12, False)


@pytest.mark.parametrize("entry, match", [
    ('tolerance = "2p"', "must be relative"),
    ('tolerance = { l = "5%" }', "names 'l', which this part has no value for"),
    ('tolerance = { c = "150%" }', "100 %"),
    ('tolerance = [1]', "tolerance"),
])
def test_spec_refuses_bad_tolerances_in_one_line(entry, match):
    text = f'[source]\nresistance = "50"\n[[part]]\nkind = "series"\nr = "9M"\nc = "11.5p"\n{entry}\n' \
           '[[part]]\nkind = "input"\nr = "1M"\n'
    with pytest.raises(InputError, match=match) as err:
        loads(text, origin="probe.toml")
    assert "\n" not in str(err.value) and "probe.toml: part 1 (series)" in str(err.value)


def test_facts_combine_tolerances_of_the_arms():
    """Shunt capacitance = cable (60 pF/m × 1.2 m at ±5 %) + trimmer (17.5 pF, anywhere in
    5–30 pF: ±12.5 pF) + input (14 pF ± 2 pF): half-widths in quadrature.  The fixed part
    leaves the trimmer out.  Shunt R: the input's 1 MΩ at the default ±2 %.  Tip R from the
    spec's ±1 %.  Lead loop: 150 nH at the default ±20 %, the source's 50 Ω at ±10 %."""
    f = facts_from_chain(loads(SPEC))
    cable = 0.05 * 72e-12
    assert f.tolerance("shunt_c")[0] == pytest.approx(math.sqrt(cable**2 + 12.5e-12**2
                                                                + 2e-12**2), rel=1e-12)
    assert f.tolerance("fixed_c")[0] == pytest.approx(math.hypot(cable, 2e-12), rel=1e-12)
    assert f.fixed_c == pytest.approx(72e-12 + 14e-12, rel=1e-12)
    assert f.tolerance("trimmer") == (pytest.approx(12.5e-12), "default: anywhere in its range")
    half, origin = f.tolerance("shunt_r")
    assert half == pytest.approx(0.02 * 1e6) and origin.startswith("default: common practice")
    assert f.tolerance("tip_r") == (pytest.approx(0.01 * 9e6), "chain spec")
    assert f.tolerance("lead_r") == (pytest.approx(5.0), "chain spec")
    assert f.tolerance("lead_l")[0] == pytest.approx(0.2 * 150e-9)
    assert (f.lead_l, f.lead_r) == (pytest.approx(150e-9), pytest.approx(50.0))
    assert f.tolerance("shunt_c")[1] == "chain spec and defaults"

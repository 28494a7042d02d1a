"""Engineering notation at the edges (SI prefixes: BIPM SI Brochure, 9th edition, table 7)."""

import pytest

from taumatch import InputError, format_quantity, parse_quantity


@pytest.mark.parametrize(
    "text, unit, value",
    [
        ("9M", None, 9e6),
        ("11.5p", None, 11.5e-12),
        ("120 nH", "H", 120e-9),
        ("1.2 m", "m", 1.2),  # metres when metres are expected
        ("1.2m", None, 1.2e-3),  # milli otherwise
        ("150 Ω", "ohm", 150.0),
        ("10 kohm", "ohm", 1e4),
        ("4.7uF", "F", 4.7e-6),
        ("4.7µ", None, 4.7e-6),
        ("+4.9E+00", None, 4.9),
        ("1e-9", None, 1e-9),
        ("1%", None, 0.01),
        ("2Meg", None, 2e6),
        (3, None, 3.0),
    ],
)
def test_parse(text, unit, value):
    assert parse_quantity(text, unit) == pytest.approx(value, rel=1e-15)


@pytest.mark.parametrize("text", ["", "abc", "1.2.3", "5 q", "1 xF", "nan", "inf", True, None])
def test_parse_rejects(text):
    with pytest.raises(InputError, match="field-x"):
        parse_quantity(text, field="field-x")


def test_unit_mismatch_names_both():
    with pytest.raises(InputError, match="is in H, expected F"):
        parse_quantity("5nH", "F", field="c")


def test_format():
    assert format_quantity(11.5e-12, "F") == "11.5 pF"
    assert format_quantity(9e6, "Ω") == "9 MΩ"
    assert format_quantity(0.0, "V") == "0 V"


@pytest.mark.parametrize("text", ["1 MOhm", "1 Mohm", "1MΩ", "1 MΩ", "1 MOHM", "1 Mohms", "1 Meg", "1e6 ohm"])
def test_usual_spellings_of_megaohm(text):
    """Issue 10.5: "1 MOhm" was refused while "1 Mohm" was accepted (word units in any case;
    SI prefixes and the ohm sign: BIPM SI Brochure, 9th edition)."""
    assert parse_quantity(text, "ohm") == 1e6


def test_case_of_single_letters_still_matters():
    """m is milli, M is mega; s is second, S is siemens: those keep their case."""
    assert parse_quantity("3 mS") == pytest.approx(3e-3)
    assert parse_quantity("1 MHz", "Hz") == 1e6
    assert parse_quantity("10 khz", "Hz") == 1e4
    with pytest.raises(InputError, match="is in ohm, expected F"):
        parse_quantity("5 kOhm", "F")


def test_atto_and_peta():
    """Femto-farad uncertainties printed as "7.6e-16 F" (issue 10.5): the atto prefix (BIPM SI
    Brochure, table 7)."""
    assert format_quantity(7.6e-16, "F") == "760 aF"
    assert format_quantity(2e15, "Ω") == "2 PΩ"
    assert format_quantity(1e-19, "F") == "1e-19 F"
    assert parse_quantity("2.2 aF", "F") == pytest.approx(2.2e-18, rel=1e-15)


@pytest.mark.parametrize("value, error, text", [
    (8.537e-12, 3.512e-14, "8.537 ± 0.035 pF"),
    (8.537e-12, 7.6e-16, "8.53700 ± 0.00076 pF"),   # the error in the value's unit
    (2.0e-16, 7.6e-16, "200 ± 760 aF"),              # error larger: its prefix for both
    (26.94e-12, 0.34e-12, "26.94 ± 0.34 pF"),
    (-4.5e-12, 2e-13, "-4.50 ± 0.20 pF"),
    (1e-12, None, "1 pF"),
])
def test_value_plus_minus_error_share_one_prefix(value, error, text):
    """The error to two significant digits, the value to the same decimal place (common
    practice; JCGM 100:2008, 7.2.6), one prefix for both."""
    from taumatch.units import format_uncertain

    assert format_uncertain(value, error, "F") == text

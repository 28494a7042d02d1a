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

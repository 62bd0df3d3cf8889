"""Typed values: the units a practitioner writes.  Expected numbers are the SI
prefix definitions (BIPM SI brochure) applied by hand; rtol 1e-12 because the parser
multiplies a decimal by a power of ten once."""
import math

import pytest

from loads.errors import InputError
from tui.units import format_quantity, parse_quantity


@pytest.mark.analytic
@pytest.mark.parametrize("text, unit, expected", [
    ("47n", "F", 47e-9),
    ("47 nF", "F", 47e-9),
    ("4.7 uF", "F", 4.7e-6),
    ("4.7µF", "F", 4.7e-6),
    ("4.7 μF", "F", 4.7e-6),          # Greek mu as well as the micro sign
    ("4n7", "F", 4.7e-9),              # letter as the decimal mark
    ("60 W", "W", 60.0),
    ("60", "W", 60.0),
    ("150u", "H", 150e-6),
    ("150 uH", "H", 150e-6),
    ("25 mA", "A", 0.025),
    ("25m", "A", 0.025),
    ("4k7", "Ω", 4700.0),
    ("4K7", "Ω", 4700.0),
    ("4R7", "Ω", 4.7),
    ("3.3 kohm", "Ω", 3300.0),
    ("220 Ω", "Ω", 220.0),
    ("250k", "Ω", 250e3),
    ("2800 K", "K", 2800.0),           # kelvin, not kilo
    ("2800K", "K", 2800.0),
    ("50 Hz", "Hz", 50.0),
    ("50hz", "Hz", 50.0),
    ("100 us", "s", 100e-6),
    ("1e-3", "s", 1e-3),
    ("4,7 uF", "F", 4.7e-6),           # decimal comma
    ("-5 W", "W", -5.0),               # the sign is the model's business, not the parser's
    ("90°", "°", 90.0),
    ("5 %", "%", 5.0),
    ("60 VA", "VA", 60.0),
])
def test_parse_quantity_accepts_practitioner_spellings(text, unit, expected):
    assert math.isclose(parse_quantity(text, unit), expected, rel_tol=1e-12)


@pytest.mark.parametrize("text, unit, reason", [
    ("", "W", "a value is needed"),
    ("abc", "W", "is not a number"),
    ("4.7 uF", "W", "does not fit the unit W"),
    ("60 W", "F", "is not a prefix of F"),
    ("12 x", "", "not understood"),
    ("5 k%", "%", "no prefix"),
    ("1e999", "V", "not a finite number"),
])
def test_parse_quantity_rejects_with_a_reason(text, unit, reason):
    with pytest.raises(InputError, match=reason):
        parse_quantity(text, unit)


@pytest.mark.parametrize("value, unit, prefix, expected", [
    (4.7e-6, "F", None, "4.7 µF"),
    (47e-9, "F", "n", "47 nF"),
    (0.025, "A", "m", "25 mA"),
    (230.0, "V", "", "230 V"),
    (2800.0, "K", None, "2800 K"),
    (5.0, "%", "", "5%"),
    (None, "W", None, ""),
    (0.0, "F", None, "0 F"),
])
def test_format_quantity(value, unit, prefix, expected):
    assert format_quantity(value, unit, prefix) == expected


@pytest.mark.parametrize("value, unit", [(4.7e-6, "F"), (150e-6, "H"), (0.025, "A"), (3300.0, "Ω"), (1.5e-12, "F")])
def test_format_then_parse_round_trips(value, unit):
    # 4 significant figures shown; these values have at most 2, so the round trip is exact to rounding.
    assert math.isclose(parse_quantity(format_quantity(value, unit), unit), value, rel_tol=1e-12)

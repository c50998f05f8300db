"""Units: the registry, quantity strings and percent fields."""

import math

import pytest

from routeplan.errors import QuantityError, RouteplanError
from routeplan.units import Q, parse_fraction, parse_quantity, registry


def test_registry_is_created_once():
    assert registry() is registry()


# NIST SP 811 (2008 edition), Appendix B.8 "Factors for units listed alphabetically":
# exact definitions.
@pytest.mark.parametrize(
    "text, unit, expected",
    [
        ("1 lb", "kg", 0.45359237),  # pound (avoirdupois), exact
        ("1 oz", "g", 28.349523125),  # ounce (avoirdupois), exact
        ("1 gallon", "L", 3.785411784),  # gallon (U.S.), exact
        ("1 imperial_gallon", "L", 4.54609),  # gallon (Imperial), exact
        ("1 gal", "L", 3.785411784),  # "gal" is the U.S. gallon
    ],
)
def test_unit_factors_against_nist_sp811(text, unit, expected):
    dim = "mass" if unit in ("kg", "g") else "volume"
    value = parse_quantity(text, dim).to(unit).magnitude
    assert math.isclose(value, expected, rel_tol=1e-12)


def test_any_unit_of_the_right_dimension():
    assert math.isclose(parse_quantity("55 lb", "mass").m_as("kg"), 55 * 0.45359237)  # NIST SP 811
    assert math.isclose(parse_quantity("0.889 g/mL", "density").m_as("kg/L"), 0.889)
    assert math.isclose(parse_quantity("2.5 mol/L", "molarity").m_as("mol/m**3"), 2500)
    assert math.isclose(parse_quantity("151.16 g/mol", "molar mass").m_as("kg/mol"), 0.15116)
    assert math.isclose(parse_quantity("250 L", "volume").m_as("m**3"), 0.25)
    assert math.isclose(parse_quantity("1.5e3 g", "mass").m_as("kg"), 1.5)


def test_offset_temperatures():
    # NIST SP 811 section 4.2.1.1: T/K = t/degC + 273.15, and degF = 5/9 K from 459.67 degF
    assert math.isclose(parse_quantity("25 degC", "temperature").to("K").magnitude, 298.15)
    assert math.isclose(parse_quantity("212 degF", "temperature").to("degC").magnitude, 100.0)
    assert math.isclose(parse_quantity("-40 degC", "temperature").to("degF").magnitude, -40.0)


@pytest.mark.parametrize(
    "text, dimension, fragment",
    [
        ("1,5 kg", "mass", "decimal comma"),
        ("5 kg", "density", "is a mass"),
        ("25", "mass", "has no unit"),
        ("abc kg", "mass", "not a number"),
        ("5 blorbs", "mass", "unknown unit 'blorbs'"),
        ("", "mass", "not a number"),
        ("10 L", "mass", "is a volume"),
        ("3 mol", "molar mass", "is an amount"),
    ],
)
def test_bad_quantities_name_the_text(text, dimension, fragment):
    with pytest.raises(QuantityError) as info:
        parse_quantity(text, dimension)
    assert fragment in str(info.value)
    assert isinstance(info.value, RouteplanError)


def test_decimal_comma_is_never_fifteen():
    with pytest.raises(QuantityError) as info:
        parse_quantity("1,5 kg", "mass")
    assert "'1.5 kg'" in str(info.value)


def test_number_without_unit_suggests_one():
    with pytest.raises(QuantityError) as info:
        parse_quantity(25, "mass")
    assert "25 kg" in str(info.value)


@pytest.mark.parametrize("value, expected", [("85 %", 0.85), ("85%", 0.85), ("100 %", 1.0), (0.85, 0.85),
                                             (1, 1.0), (0, 0.0), ("0.5", 0.5), ("12.5 percent", 0.125)])
def test_percent_fields(value, expected):
    assert math.isclose(parse_fraction(value), expected)


@pytest.mark.parametrize("value, fragment", [(85, "85 %"), ("85", "85 %"), ("-5 %", "negative"),
                                             ("abc", "not a percent"), ("1,5 %", "decimal comma"),
                                             ("120 %", "above 100 %"), (True, "True"), (-0.1, "negative")])
def test_bad_percent_fields(value, fragment):
    with pytest.raises(QuantityError) as info:
        parse_fraction(value)
    assert fragment in str(info.value)


def test_zero_refused_where_asked():
    with pytest.raises(QuantityError, match="zero"):
        parse_fraction("0 %", allow_zero=False)


def test_overage_may_exceed_one_when_allowed():
    assert parse_fraction("150 %", allow_above_one=True) == 1.5


def test_q_builds_quantities():
    q = Q(2.0, "kg") * 3
    assert q.m_as("g") == 6000.0


@pytest.mark.parametrize("text", ["1e400 kg", "1e308 kg", "1e-40 kg", "nan kg", "inf kg"])
def test_numbers_out_of_any_sensible_range(text):
    with pytest.raises(QuantityError) as info:
        parse_quantity(text, "mass")
    assert text.split()[0] in str(info.value)


@pytest.mark.parametrize("text, fragment", [("10 % kg", "'%' does not belong"),
                                            ("10 percent kg", "'percent' does not belong"),
                                            ("10 dimensionless kg", "'dimensionless' does not belong"),
                                            ("10 ton", "'ton' is ambiguous"), ("2 tons", "'ton' is ambiguous")])
def test_nothing_is_guessed_inside_a_quantity(text, fragment):
    with pytest.raises(QuantityError) as info:
        parse_quantity(text, "mass")
    assert fragment in str(info.value)


def test_cubic_units_as_chemists_write_them():
    # 1 cm³ = 1 mL and 1 dm³ = 1 L exactly (NIST SP 811, the litre as a special name for dm³)
    assert math.isclose(parse_quantity("1.07 g/cm3", "density").m_as("g/mL"), 1.07)
    assert math.isclose(parse_quantity("2.5 mol/dm3", "molarity").m_as("mol/L"), 2.5)
    assert math.isclose(parse_quantity("0.25 m3", "volume").m_as("L"), 250.0)
    # metric and short tons, written out, are fine: 1 short ton = 2000 lb = 907.18474 kg (NIST SP 811)
    assert math.isclose(parse_quantity("1 short_ton", "mass").m_as("kg"), 907.18474)
    assert math.isclose(parse_quantity("2 tonne", "mass").m_as("kg"), 2000.0)


def test_hints_above_one_never_suggest_a_rejected_value():
    with pytest.raises(QuantityError) as info:
        parse_fraction(150)
    assert "at most 100 %" in str(info.value) and "1.5" not in str(info.value)
    with pytest.raises(QuantityError) as info:
        parse_fraction(200, allow_above_one=True)  # an overage may be 200 %, written as a percent
    assert "'200 %'" in str(info.value) and "as a fraction" not in str(info.value)
    assert parse_fraction("200 %", allow_above_one=True) == 2.0

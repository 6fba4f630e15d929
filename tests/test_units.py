"""Parsing and formatting of lengths, moduli, densities, temperatures."""

import pytest
from hypothesis import given
from hypothesis import strategies as st

from cutplan import units
from cutplan.units import UnitError


@pytest.mark.parametrize(
    ("text", "metres"),
    # 1 in = 25.4 mm exactly (international yard and pound agreement, 1959)
    [
        ("25.4 mm", 0.0254), ("2.5cm", 0.025), ("1.5 m", 1.5), ("1 in", 0.0254),
        ("1-1/4 in", 0.03175), ("1 1/4 in", 0.03175), ('3/4"', 0.01905), ("8 ft", 2.4384),
        ("8'", 2.4384), ("6' 3-1/2\"", 6 * 0.3048 + 3.5 * 0.0254), ("6 ft 3 in", 1.905),
        ("0.3 m", 0.3), (0, 0.0), ("0", 0.0), ("1/16 in", 0.0015875),
    ],
)
def test_parse_length(text, metres):
    assert units.parse_length(text) == pytest.approx(metres, rel=1e-12)


@pytest.mark.parametrize(
    ("text", "pascals"),
    # 1 psi = 6894.757 Pa (lbf and inch exact by the 1959 agreement)
    [("68.9 GPa", 68.9e9), ("10 Msi", 68.94757e9), ("420000 psi", 2.8958e9), ("2480 MPa", 2.48e9)],
)
def test_parse_modulus(text, pascals):
    assert units.parse_modulus(text) == pytest.approx(pascals, rel=1e-5)


@pytest.mark.parametrize(
    ("text", "kg_m3"),
    # 1 lb/in3 = 27679.9 kg/m3 (pound 0.45359237 kg, inch 0.0254 m exact)
    [("2700 kg/m3", 2700), ("2.7 g/cm3", 2700), ("0.0975 lb/in3", 2698.79), ("168.5 lb/ft3", 2699.1)],
)
def test_parse_density(text, kg_m3):
    assert units.parse_density(text) == pytest.approx(kg_m3, rel=1e-4)


@pytest.mark.parametrize(("text", "kelvin"), [("20 C", 293.15), ("68 F", 293.15), ("293.15 K", 293.15), ("-5 °C", 268.15)])
def test_parse_temperature(text, kelvin):
    assert units.parse_temperature(text) == pytest.approx(kelvin)


def test_parse_percent():
    assert units.parse_percent("0.5 %") == pytest.approx(0.005)
    with pytest.raises(UnitError):
        units.parse_percent(0.5)


@pytest.mark.parametrize("bare", [0.3, "0.3", "19.84", 19.84, "1/16", 10**400, "1" * 400])
def test_a_length_without_a_unit_is_refused_with_both_suggestions(bare):
    # a bare number could be inches or millimetres; reading it as metres made 20 m pieces
    with pytest.raises(UnitError) as info:
        units.parse_length(bare)
    assert ' in"' in str(info.value) and ' mm"' in str(info.value)


@pytest.mark.parametrize("bad", ["", "mm", "12 furlongs", "1//2 in", "abc", "1/0 in", "nan", None, [1], True, "inf mm"])
def test_bad_lengths_raise_one_error_type_naming_the_text_and_forms(bad):
    with pytest.raises(UnitError) as info:
        units.parse_length(bad)
    assert "mm" in info.value.accepted


def test_bad_temperature_below_absolute_zero():
    with pytest.raises(UnitError):
        units.parse_temperature("-300 C")


def test_format_inches_shows_rounding():
    # 20.166 in to the nearest 1/32 is 20-5/32 (20.15625) with +0.01 in left over
    assert units.format_inches(20.166 * 0.0254, 32) == "20-5/32 in (+0.01)"
    assert units.format_inches(0.0254 * 0.5, 16, show_error=False) == "1/2 in"
    assert units.format_mm(0.51487) == "514.9 mm"


@given(st.integers(0, 200), st.integers(0, 31))
def test_fractional_inches_round_trip(whole, n32):
    metres = (whole + n32 / 32) * 0.0254
    text = units.format_inches(metres, 32, show_error=False)
    assert units.parse_length(text) == pytest.approx(metres, abs=1e-12)


@given(st.floats(0.0001, 10.0))
def test_mm_round_trip(metres):
    assert units.parse_length(f"{metres * 1000!r} mm") == pytest.approx(metres, rel=1e-12)

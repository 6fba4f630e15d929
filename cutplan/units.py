"""Parse and format the quantities a builder types: lengths, moduli, densities, temperatures.

Everything inside cutplan is SI (m, kg, s, Pa, K); this module is the edge where text such as
``"1-1/4 in"``, ``"6' 3-1/2\\""`` or ``"68.9 GPa"`` becomes a float, and where lengths become
``"514.9 mm"`` or ``"20-1/4 in (+0.02)"`` again.  A length must carry its unit (a bare
``19.84`` could be inches or millimetres, and read as metres it silently makes a 20 m piece);
frequencies, moduli and densities may be bare SI numbers. Text that does not parse raises
:class:`UnitError`; whether a parsed value is sensible is the caller's business.

>>> parse_length("1-1/4 in")
0.03175
>>> round(parse_length("6' 3-1/2\\""), 5)
1.9177
>>> parse_modulus("68.9 GPa")
68900000000.0
>>> format_inches(0.5128, 32)
'20-3/16 in (+0.00)'
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from fractions import Fraction

__all__ = [
    "MM", "CM", "INCH", "FOOT", "PSI", "POUND", "ZERO_CELSIUS", "UnitError", "LENGTH_FORMS",
    "MODULUS_FORMS", "DENSITY_FORMS", "TEMPERATURE_FORMS", "PERCENT_FORMS", "FREQUENCY_FORMS",
    "bare_length_forms", "parse_length", "parse_modulus", "parse_density", "parse_frequency",
    "parse_temperature", "parse_percent", "format_mm", "fraction_inches", "format_inches",
    "INCH_DENOMINATOR", "mm_text", "inch_text", "format_length", "length_cell", "length_heading"
]

MM = 1e-3
"""One millimetre [m]."""
CM = 1e-2
"""One centimetre [m]."""
INCH = 0.0254
"""One inch [m], exact by the 1959 international yard and pound agreement."""
FOOT = 12 * INCH
"""One foot [m]."""
PSI = 6894.757293168361
"""One pound-force per square inch [Pa] (lbf = 4.4482216152605 N exactly, 1959 agreement)."""
POUND = 0.45359237
"""One avoirdupois pound [kg], exact (1959 agreement)."""
ZERO_CELSIUS = 273.15
"""0 degrees Celsius in kelvin [K], exact (SI definition)."""
ROOM_TEMPERATURE = ZERO_CELSIUS + 20.0
"""20 C in kelvin [K]: the usual reference temperature of handbook tables and the default air."""
STANDARD_PRESSURE = 101325.0
"""One standard atmosphere [Pa], exact by definition; the reference pressure of ISO 9613-1:1993."""


class UnitError(ValueError):
    """A quantity could not be read. ``text`` is what was given, ``accepted`` what may be."""

    def __init__(self, text, accepted):
        self.text = text
        self.accepted = accepted
        super().__init__(f"cannot read {text!r}; {accepted}")


LENGTH_FORMS = (
    'a length such as "25.4 mm", "2.5 cm", "1.5 m", "1-1/4 in", "3/4\\"", "8 ft", '
    "\"6' 3-1/2\\\"\" (always with a unit)"
)
MODULUS_FORMS = 'a modulus such as "68.9 GPa", "2480 MPa", "10 Msi", "420000 psi" or a plain number in Pa'
DENSITY_FORMS = (
    'a density such as "2700 kg/m3", "2.7 g/cm3", "0.0975 lb/in3", "168 lb/ft3" or a plain number in kg/m3'
)
TEMPERATURE_FORMS = 'a temperature such as "20 C", "68 F", "293.15 K" or a plain number in kelvin'
PERCENT_FORMS = 'a percentage such as "0.5 %"'
FREQUENCY_FORMS = 'a frequency such as "440 Hz", "1.2 kHz" or a plain number in Hz'

_NUMBER = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"
# 1-1/4, 1 1/4, 3/4, 2.5, 1e3
_AMOUNT = rf"(?:-?\d+\s*[- ]\s*\d+\s*/\s*\d+|-?\d+\s*/\s*\d+|{_NUMBER})"

_LENGTH_UNITS = {
    "mm": MM,
    "millimetre": MM,
    "millimetres": MM,
    "millimeter": MM,
    "millimeters": MM,
    "cm": CM,
    "m": 1.0,
    "metre": 1.0,
    "metres": 1.0,
    "meter": 1.0,
    "meters": 1.0,
    "in": INCH,
    "inch": INCH,
    "inches": INCH,
    '"': INCH,
    "″": INCH,
    "ft": FOOT,
    "foot": FOOT,
    "feet": FOOT,
    "'": FOOT,
    "′": FOOT,
}
_MODULUS_UNITS = {
    "pa": 1.0,
    "kpa": 1e3,
    "mpa": 1e6,
    "gpa": 1e9,
    "n/mm2": 1e6,
    "kn/mm2": 1e9,
    "psi": PSI,
    "ksi": 1e3 * PSI,
    "msi": 1e6 * PSI,
}
_DENSITY_UNITS = {
    "kg/m3": 1.0,
    "kg/m^3": 1.0,
    "kg/m³": 1.0,
    "g/cm3": 1e3,
    "g/cm^3": 1e3,
    "g/cm³": 1e3,
    "g/cc": 1e3,
    "g/ml": 1e3,
    "lb/in3": POUND / INCH**3,
    "lb/in^3": POUND / INCH**3,
    "lb/in³": POUND / INCH**3,
    "lb/ft3": POUND / FOOT**3,
    "lb/ft^3": POUND / FOOT**3,
    "lb/ft³": POUND / FOOT**3,
}
_FREQUENCY_UNITS = {"hz": 1.0, "khz": 1e3}


def _amount(text):
    """Value of a decimal, a fraction '3/4' or a mixed number '1-1/4' / '1 1/4' (a leading minus
    is kept, so that a range check, not the parser, refuses "-1/8 in")."""
    text = text.strip()
    if re.fullmatch(r"-\d+\s*(?:[- ]\s*\d+\s*)?/\s*\d+", text):
        return -_amount(text[1:])
    mixed = re.fullmatch(r"(\d+)\s*[- ]\s*(\d+)\s*/\s*(\d+)", text)
    if mixed:
        whole, num, den = (int(g) for g in mixed.groups())
        if den == 0:
            raise ZeroDivisionError
        return whole + num / den
    frac = re.fullmatch(r"(\d+)\s*/\s*(\d+)", text)
    if frac:
        num, den = (int(g) for g in frac.groups())
        if den == 0:
            raise ZeroDivisionError
        return num / den
    return float(text)


def _as_text(value):
    if isinstance(value, bool):
        raise TypeError
    if isinstance(value, (int, float)):
        return None
    if not isinstance(value, str):
        raise TypeError
    return value.strip()


def _finite(value, text, forms):
    try:
        value = float(value)
    except OverflowError:
        raise UnitError(_short(text), forms) from None
    if not math.isfinite(value):
        raise UnitError(_short(text), forms)
    return value


def _short(text):
    if isinstance(text, int) and not isinstance(text, bool) and text.bit_length() > 100:
        return f"a number of about {int(text.bit_length() * 0.30103)} digits"
    text = str(text)
    return text if len(text) <= 40 else f"{text[:20]}...({len(text)} characters)"


def bare_length_forms(amount_text):
    """What to say about a length given without a unit."""
    return f'a length with a unit: write "{amount_text} in" or "{amount_text} mm"'


def _scaled(value, units, forms):
    """Parse 'number unit' with a unit from ``units`` (case-insensitive); plain numbers are SI."""
    try:
        text = _as_text(value)
    except TypeError:
        raise UnitError(repr(value), forms) from None
    if text is None:
        return _finite(value, value, forms)
    match = re.fullmatch(rf"({_AMOUNT})\s*(\S*)", text)
    if not match:
        raise UnitError(_short(text), forms)
    unit = match.group(2).lower()
    try:
        amount = _amount(match.group(1))
    except (ValueError, ZeroDivisionError, OverflowError):
        raise UnitError(_short(text), forms) from None
    if unit == "":
        if units is _LENGTH_UNITS and amount != 0:
            raise UnitError(_short(text), bare_length_forms(match.group(1)))
        return _finite(amount, text, forms)
    if unit not in units:
        raise UnitError(_short(text), forms)
    return _finite(amount * units[unit], text, forms)


def parse_length(value):
    """Length in metres from text such as ``"1-1/4 in"`` or ``"6' 3-1/2\\""``; always with a unit.

    A bare number other than 0 is refused with a suggestion (``19.84`` -> "19.84 in" or "19.84 mm").

    >>> parse_length("25.4 mm")
    0.0254
    >>> parse_length('3/4"')
    0.01905
    >>> round(parse_length("8 ft"), 6)
    2.4384
    """
    try:
        text = _as_text(value)
    except TypeError:
        raise UnitError(repr(value), LENGTH_FORMS) from None
    if text is None:
        if value == 0:
            return 0.0
        shown = _short(value)
        raise UnitError(shown, bare_length_forms(shown if len(shown) < 20 else "19.84"))
    # feet and inches together: 6' 3-1/2", 6 ft 3 in, 6ft 3.5in
    both = re.fullmatch(
        rf"({_AMOUNT})\s*(?:'|′|ft|foot|feet)\s*({_AMOUNT})\s*(?:\"|″|in|inch|inches)?",
        text,
        flags=re.IGNORECASE,
    )
    if both:
        try:
            total = _amount(both.group(1)) * FOOT + _amount(both.group(2)) * INCH
        except (ValueError, ZeroDivisionError, OverflowError):
            raise UnitError(_short(text), LENGTH_FORMS) from None
        return _finite(total, text, LENGTH_FORMS)
    return _scaled(text, _LENGTH_UNITS, LENGTH_FORMS)


def parse_modulus(value):
    """Elastic modulus in Pa from ``"68.9 GPa"``, ``"10 Msi"``, ``"420000 psi"``.

    >>> round(parse_modulus("10 Msi") / 1e9, 3)
    68.948
    """
    return _scaled(value, _MODULUS_UNITS, MODULUS_FORMS)


def parse_density(value):
    """Density in kg/m^3 from ``"2700 kg/m3"``, ``"2.7 g/cm3"`` or ``"0.0975 lb/in3"``.

    >>> round(parse_density("0.0975 lb/in3"), 1)
    2698.8
    """
    return _scaled(value, _DENSITY_UNITS, DENSITY_FORMS)


def parse_frequency(value):
    """Frequency in Hz from ``"440 Hz"`` or ``"1.2 kHz"``; numbers are Hz."""
    return _scaled(value, _FREQUENCY_UNITS, FREQUENCY_FORMS)


def parse_temperature(value):
    """Temperature in kelvin from ``"20 C"``, ``"68 F"`` or ``"293.15 K"``; numbers are kelvin.

    >>> parse_temperature("20 C")
    293.15
    >>> round(parse_temperature("68 F"), 2)
    293.15
    """
    try:
        text = _as_text(value)
    except TypeError:
        raise UnitError(repr(value), TEMPERATURE_FORMS) from None
    if text is None:
        kelvin = _finite(value, value, TEMPERATURE_FORMS)
    else:
        match = re.fullmatch(rf"({_NUMBER})\s*(°?\s*[CFK]|deg\s*[CF])?", text, flags=re.IGNORECASE)
        if not match:
            raise UnitError(_short(text), TEMPERATURE_FORMS)
        amount = _finite(match.group(1), text, TEMPERATURE_FORMS)
        unit = (match.group(2) or "K").replace("°", "").replace("deg", "").strip().upper()
        if unit == "C":
            kelvin = amount + ZERO_CELSIUS
        elif unit == "F":
            kelvin = (amount - 32.0) * 5.0 / 9.0 + ZERO_CELSIUS
        else:
            kelvin = amount
    if not math.isfinite(kelvin) or kelvin <= 0:
        raise UnitError(_short(value), TEMPERATURE_FORMS + " (above absolute zero)")
    return kelvin


def parse_percent(value):
    """A fraction from ``"0.5 %"`` (0.005). A bare number is refused: write the % sign.

    >>> parse_percent("0.5 %")
    0.005
    """
    if not isinstance(value, str):
        raise UnitError(repr(value), PERCENT_FORMS)
    match = re.fullmatch(rf"({_NUMBER})\s*%", value.strip())
    if not match:
        raise UnitError(_short(value), PERCENT_FORMS)
    return _finite(match.group(1), value, PERCENT_FORMS) / 100.0


def format_mm(metres, decimals=1):
    """``"514.9 mm"``.

    >>> format_mm(0.51487)
    '514.9 mm'
    """
    return f"{metres / MM:.{decimals}f} mm"


def fraction_inches(metres, denominator=16):
    """Nearest fraction of an inch: (whole, numerator, denominator, shown_inches, error_inches).

    ``error_inches`` is the true length minus the length shown (positive: the true piece is
    longer than the fraction says).
    """
    if denominator not in (2, 4, 8, 16, 32, 64):
        raise ValueError("denominator must be 2, 4, 8, 16, 32 or 64")
    inches = metres / INCH
    sixteenths = round(inches * denominator)
    shown = Fraction(sixteenths, denominator)
    whole = int(shown)
    rest = shown - whole
    error = inches - float(shown)
    return whole, rest.numerator, rest.denominator, float(shown), error


def format_inches(metres, denominator=16, show_error=True):
    """Fractional inches to the nearest 1/``denominator``, with the rounding shown.

    >>> format_inches(20.166 * INCH, 32)
    '20-5/32 in (+0.01)'
    >>> format_inches(0.0254 * 3)
    '3 in (+0.00)'
    >>> format_inches(0.0254 * 0.25, show_error=False)
    '1/4 in'
    """
    sign = "-" if metres < 0 else ""
    whole, num, den, _shown, error = fraction_inches(abs(metres), denominator)
    if num == 0:
        body = f"{whole}"
    elif whole == 0:
        body = f"{num}/{den}"
    else:
        body = f"{whole}-{num}/{den}"
    text = f"{sign}{body} in"
    if show_error:
        error = -error if sign else error
        text += f" ({error:+.2f})"
    return text


INCH_DENOMINATOR = 32
"""Fractional inches are shown to the nearest 1/32 in unless a design sets ``inch_denominator``."""
INCH_DENOMINATORS = (8, 16, 32, 64)
"""The fractions of an inch a design may ask lengths to be shown to (``inch_denominator``)."""
UNDER_MM = 0.05
"""Shortest length shown as "under 1/N in" rather than "0 in" [mm]: anything that still shows as
0.1 mm is an amount a builder should act on."""


def mm_text(metres):
    """Millimetres as every output shows them, to 0.1 mm, without the unit.

    >>> mm_text(0.51487)
    '514.9'
    """
    return f"{metres / MM:.1f}"


def inch_text(metres, denominator=INCH_DENOMINATOR):
    """Fractional inches to the nearest 1/``denominator``, without the unit (no "under" rule).

    >>> inch_text(0.51487)
    '20-9/32'
    """
    return format_inches(metres, denominator, show_error=False)[:-3]


@dataclass(frozen=True)
class LengthParts:
    """One length as the parts every output shows: the value [m], the unit shown first ("mm" or
    "in") and the fraction of an inch it is rounded to.  Renderers take the parts they need
    (``first``, ``second``, ``mm``, ``inch``) instead of cutting formatted text apart.

    >>> q = LengthParts(0.51487, "in", 16)
    >>> q.inch, q.mm, q.first, q.second
    ('20-1/4', '514.9', '20-1/4 in', '514.9 mm')
    >>> str(q), q.cell
    ('20-1/4 in (514.9 mm)', '20-1/4 (514.9)')
    >>> LengthParts(0.0003, "in").first
    'under 1/32 in'
    """

    metres: float
    units: str = "mm"
    denominator: int = INCH_DENOMINATOR

    @property
    def mm(self):
        """Millimetres to 0.1 mm, without the unit: ``"514.9"``."""
        return mm_text(self.metres)

    @property
    def inch(self):
        """Fractional inches without the unit: ``"20-9/32"``, or ``"under 1/32"`` for an amount
        that rounds to 0 in but not to 0.0 mm (never "0 in" for something a builder should remove)."""
        text = inch_text(self.metres, self.denominator)
        if text in ("0", "-0") and abs(self.metres) >= UNDER_MM * MM:
            return f"under 1/{self.denominator}"
        return text

    def part(self, unit):
        """The length in one unit, with the unit: ``"514.9 mm"`` or ``"20-9/32 in"``."""
        return f"{self.inch} in" if unit == "in" else f"{self.mm} mm"

    @property
    def first(self):
        """The length in the unit shown first."""
        return self.part(self.units)

    @property
    def second(self):
        """The length in the other unit."""
        return self.part("mm" if self.units == "in" else "in")

    @property
    def cell(self):
        """For a table column whose heading names the units (:func:`length_heading`)."""
        return f"{self.inch} ({self.mm})" if self.units == "in" else f"{self.mm} ({self.inch})"

    def __str__(self):
        return f"{self.first} ({self.second})"


def length_parts(metres, units="mm", denominator=INCH_DENOMINATOR):
    """The :class:`LengthParts` of a length shown in ``units`` first, inches to 1/``denominator``."""
    return LengthParts(float(metres), units, denominator)


def format_length(metres, units="mm", denominator=INCH_DENOMINATOR):
    """A length the way a builder reads it, the chosen unit first.

    >>> format_length(0.51487)
    '514.9 mm (20-9/32 in)'
    >>> format_length(0.51487, "in")
    '20-9/32 in (514.9 mm)'
    >>> format_length(0.0003, "in")
    'under 1/32 in (0.3 mm)'
    """
    return str(length_parts(metres, units, denominator))


def length_cell(metres, units="mm", denominator=INCH_DENOMINATOR):
    """A length for a table cell whose heading names the units: ``"20-9/32 (514.9)"``.

    >>> length_cell(0.51487, "in")
    '20-9/32 (514.9)'
    >>> length_cell(0.0003, "in", 16)
    'under 1/16 (0.3)'
    """
    return length_parts(metres, units, denominator).cell


def length_heading(units="mm"):
    """The unit heading that goes with :func:`length_cell`: ``"in (mm)"`` or ``"mm (in)"``."""
    return "in (mm)" if units == "in" else "mm (in)"

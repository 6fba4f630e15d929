"""Limits a design, a stock table, a command-line option or a bench reading must keep, and the words
that state them.

Each check and its message are built from the one constant here (the design reader, the
command line, the trim service and the page all import them), so a message can never name a
range other than the one checked.

>>> A4_ALLOWED
'must be between 400 and 480 Hz'
>>> FREQUENCY_SPAN, TEMPERATURE_SPAN
('10 Hz to 30 kHz', '-20 C to 50 C')
"""

from __future__ import annotations

from cutplan.units import ZERO_CELSIUS

__all__ = ["A4_ALLOWED", "A4_RANGE", "FREQUENCY_RANGE", "FREQUENCY_SPAN", "MEASURED_HZ", "TEMPERATURE_RANGE", "TEMPERATURE_RANGE_C",
           "TEMPERATURE_SPAN", "IN_TUNE_CENTS", "AIR_SPEED_RANGE", "CENTS_RANGE", "RATIO_RANGE", "MAX_FILE_BYTES",
           "a4_ok", "hz_text"]

MAX_FILE_BYTES = 1_000_000
"""Largest design file or material table read [bytes]; a design is a few kB."""

A4_RANGE = (400.0, 480.0)
"""Reference pitch A4 accepted [Hz], ends included (common practice: the pitches of A4 in use,
from about 415 Hz for old instruments to 466 Hz, lie inside; outside is a typing error)."""

FREQUENCY_RANGE = (10.0, 30000.0)
"""Target frequencies and tuner readings accepted [Hz], ends included: around the range of hearing
(from memory: about 20 Hz to 20 kHz, with room for subharmonic targets and high partials)."""

MEASURED_HZ = (10.0, 48_000.0)
"""Frequencies a test piece's measurement may give for calibration [Hz]: below 10 Hz no tuner or
recording of a struck piece reads a pitch, above 48 kHz no 96 kHz recording holds one (its Nyquist
limit; common practice).  Wider than :data:`FREQUENCY_RANGE`: a test piece's upper partials may lie
above any target."""

CENTS_RANGE = (-4800.0, 9600.0)
"""Pitches given in cents from a root accepted [cents]: four octaves down to eight up."""
RATIO_RANGE = (1 / 64, 64.0)
"""Pitches given as ratios to a root accepted [-]: six octaves either way."""

TEMPERATURE_RANGE_C = (-20.0, 50.0)
"""Air temperatures accepted for air columns and resonators [C], ends included (common practice:
a workshop, a porch or a classroom)."""

TEMPERATURE_RANGE = (TEMPERATURE_RANGE_C[0] + ZERO_CELSIUS - 1e-9, TEMPERATURE_RANGE_C[1] + ZERO_CELSIUS + 1e-9)
"""The same range in kelvin [K], with a nanokelvin of slack so that "-20 C", which reads as
-20 + ZERO_CELSIUS = 253.14999999999998 K in floating point, is inside."""

AIR_SPEED_RANGE = (250.0, 450.0)
"""Speeds of sound an air-column calibration may give or a stock table may carry [m/s]: air from
about -100 C to 230 C (the ideal-gas speed, 331.3 m/s at 0 C times the square root of the
absolute temperature over that of 0 C; from memory)."""

IN_TUNE_CENTS = 2.0
"""A tuned partial this close to its target needs nothing at the bench [cents] (about a good
tuner's reading error; common practice)."""


def hz_text(hz):
    """A frequency limit as a builder reads it: "10 Hz", "30 kHz".

    >>> hz_text(440.0), hz_text(30000.0)
    ('440 Hz', '30 kHz')
    """
    return f"{hz / 1000:g} kHz" if hz >= 1000 else f"{hz:g} Hz"


def a4_ok(a4):
    """True when ``a4`` [Hz] lies in :data:`A4_RANGE`."""
    return A4_RANGE[0] <= a4 <= A4_RANGE[1]


A4_ALLOWED = f"must be between {A4_RANGE[0]:g} and {A4_RANGE[1]:g} Hz"
"""What the message says of an A4 outside :data:`A4_RANGE`."""
FREQUENCY_SPAN = f"{hz_text(FREQUENCY_RANGE[0])} to {hz_text(FREQUENCY_RANGE[1])}"
""":data:`FREQUENCY_RANGE` in words."""
TEMPERATURE_SPAN = f"{TEMPERATURE_RANGE_C[0]:g} C to {TEMPERATURE_RANGE_C[1]:g} C"
""":data:`TEMPERATURE_RANGE_C` in words."""

"""Air columns cut from calibrated stock: the measured speed of sound and end correction.

A two-resonance reading, or resonances of pipes of known length, measure the speed of sound and
the end correction of one stock size (``cutplan calibrate --kind air-column``).  Saved as a stock
file, the calibration rides on the stock size's Section (``Section.air_calibration``), and the
planner uses it for every air column and resonator cut from that stock: the end correction as
measured, and the speed of sound as measured, carried to the design's temperature with the
same ratio the air model gives (c ~ sqrt(T); ISO 9613-1:1993, Formula A.5).

A speed measured in a pipe already includes that pipe's wall losses at the frequency it was
measured at.  When the calibration records that frequency, the planner takes the losses out
(the free-air speed is the measured one divided by 1 - dc/c at that frequency and bore) and puts
back each note's own, so the test pipe is reproduced exactly and other notes get the losses of
their own frequency.  An older calibration without a frequency is used as measured, with no
further wall losses.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

from cutplan.physics import air_column
from cutplan.physics.wall_losses import wall_loss_fraction
from cutplan.units import ZERO_CELSIUS

__all__ = [
    "AirCalibration", "calibration", "applied", "humidity", "wall_losses", "speed", "column_model",
    "assumptions", "stock_toml"
]


@dataclass(frozen=True)
class AirCalibration:
    """Measured on one stock size: speed of sound [m/s] at ``temperature`` [K], end correction per
    open end [m], and what it came from."""

    speed: float
    temperature: float
    end_correction: float
    note: str = ""
    frequency: float = 0.0  # the frequency the speed was measured at [Hz]; 0 when not recorded


def calibration(spec):
    """The AirCalibration of an air-column or resonator set's stock, or None."""
    if spec.kind not in ("air-column", "resonator") or spec.section is None:
        return None
    return getattr(spec.section, "air_calibration", None)


def applied(spec):
    """The set with its stock's measured end correction (as a factor of the bore radius) in place."""
    cal = calibration(spec)
    if cal is None:
        return spec
    return dataclasses.replace(spec, end_correction=cal.end_correction / spec.section.air_radius)


def humidity(spec):
    """Relative humidity [%] of a set's air: the design's, else the stated default
    (:data:`cutplan.physics.air_column.DEFAULT_HUMIDITY`)."""
    value = getattr(spec, "humidity", None)
    return air_column.DEFAULT_HUMIDITY if value is None else value


def wall_losses(spec):
    """True when the planner adds wall losses to the set's columns (always, except for stock
    calibrated by an older measurement whose frequency was not recorded: its speed has them)."""
    cal = calibration(spec)
    return cal is None or cal.frequency > 0


def speed(spec, temperature=None):
    """Speed of sound in free air [m/s] for a set at ``temperature`` [K] (default: the set's own).

    For calibrated stock, the measured speed with the wall losses of the test pipe taken out when
    its frequency is recorded (see the module notes), carried to ``temperature``.

    >>> from types import SimpleNamespace as NS
    >>> from cutplan.physics.sections import tube
    >>> sec = tube(0.0334, 0.0034)
    >>> cal = dataclasses.replace(sec, air_calibration=AirCalibration(345.0, 293.15, 0.009))
    >>> spec = NS(kind="air-column", section=cal, temperature=293.15, humidity=50.0)
    >>> round(speed(spec), 2), round(speed(spec, 303.15) / speed(spec), 5)
    (345.0, 1.01838)
    """
    t = spec.temperature if temperature is None else temperature
    c = air_column.speed_of_sound(t, humidity(spec))
    cal = calibration(spec)
    if cal is None:
        return c
    measured = cal.speed
    if cal.frequency > 0:
        measured /= 1.0 - wall_loss_fraction(cal.frequency, spec.section.air_radius, cal.temperature)
    return c * measured / air_column.speed_of_sound(cal.temperature, humidity(spec))


def column_model(spec, temperature=None):
    """Keyword arguments of :func:`cutplan.physics.air_column.column_length` and
    ``column_frequency`` for a set (its stock's calibration applied) at ``temperature`` [K]."""
    spec = applied(spec)
    t = spec.temperature if temperature is None else temperature
    return {"radius": spec.section.air_radius, "speed": speed(spec, t), "ends": spec.ends,
            "correction": spec.end_correction, "temperature": t if wall_losses(spec) else None}


def assumptions(spec):
    """Lines for the set's assumptions when its stock is calibrated."""
    cal = calibration(spec)
    if cal is None:
        return []
    at = f" and {cal.frequency:.1f} Hz" if cal.frequency > 0 else ""
    losses = ("its wall losses taken out at that frequency and each note's own put back" if cal.frequency > 0
              else "used as measured, wall losses included (no frequency recorded)")
    return [f"stock calibrated by measurement: speed of sound {cal.speed:.2f} m/s at "
            f"{cal.temperature - ZERO_CELSIUS:.1f} C{at} (scaled to the design's air; {losses}), end correction "
            f"{cal.end_correction * 1000:.2f} mm per open end, fixed" + (f" ({cal.note})" if cal.note else "")]


def stock_toml(name, stock, speed_value, temperature, end_correction, note, header_note, frequency=0.0):
    """A user stock file (TOML text) holding one calibrated size: ``stock`` is the StockSize measured."""
    sec = stock.section
    lines = [
        f"# Calibrated by cutplan: {header_note}",
        "[table]",
        f'standard = "{stock.standard or stock.name} (calibrated by measurement)"',
        'kind = "measured"',
        'shape = "tube"',
        f'material = "{stock.material}"',
        "",
        f'[sizes."{name}"]',
        f'description = "{stock.description}, calibrated"',
        f'outer = "{sec.outer * 1000:.4f} mm"',
        f'wall = "{sec.wall * 1000:.4f} mm"',
        f'inner = "{sec.air_radius * 2000:.6f} mm"',
        f'outer_tolerance = "{stock.outer_tolerance * 1000:.4f} mm"',
        f'wall_tolerance = "{stock.wall_tolerance * 100:.2f} %"',
        f'speed_of_sound = "{speed_value:.3f} m/s"',
        f'measured_at = "{temperature - ZERO_CELSIUS:.2f} C"',
        f'end_correction = "{end_correction * 1000:.4f} mm"',
        *([f'measured_frequency = "{frequency:.3f} Hz"'] if frequency > 0 else []),
        f'calibration_note = "{note}"',
    ]
    return "\n".join(lines) + "\n"

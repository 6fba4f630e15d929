"""Air columns cut from calibrated stock: the measured speed of sound and end correction.

A two-resonance reading, or resonances of pipes of known length, measure the speed of sound and
the end correction of one stock size (``cutplan calibrate --kind air-column``).  Saved as a stock
file, the calibration rides on the stock size's Section (``Section.air_calibration``), and the
planner uses it for every air column and resonator cut from that stock: the end correction as
measured, and the speed of sound as measured, carried to the design's temperature with the
same ratio the air model gives (c ~ sqrt(T); ISO 9613-1:1993, Formula A.5).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

from cutplan.physics import air_column


@dataclass(frozen=True)
class AirCalibration:
    """Measured on one stock size: speed of sound [m/s] at ``temperature`` [K], end correction per
    open end [m], and what it came from."""

    speed: float
    temperature: float
    end_correction: float
    note: str = ""


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
    return dataclasses.replace(spec, end_correction=round(cal.end_correction / spec.section.air_radius, 6))


def speed(spec, temperature=None):
    """Speed of sound [m/s] for a set at ``temperature`` [K] (default: the set's own).

    >>> from types import SimpleNamespace as NS
    >>> from cutplan.sections import tube
    >>> sec = tube(0.0334, 0.0034)
    >>> cal = dataclasses.replace(sec, air_calibration=AirCalibration(345.0, 293.15, 0.009))
    >>> spec = NS(kind="air-column", section=cal, temperature=293.15, humidity=None)
    >>> round(speed(spec), 2), round(speed(spec, 303.15) / speed(spec), 5)
    (345.0, 1.01691)
    """
    t = spec.temperature if temperature is None else temperature
    c = air_column.speed_of_sound(t, spec.humidity)
    cal = calibration(spec)
    if cal is None:
        return c
    return c * cal.speed / air_column.speed_of_sound(cal.temperature, spec.humidity)


def assumptions(spec):
    """Lines for the set's assumptions when its stock is calibrated."""
    cal = calibration(spec)
    if cal is None:
        return []
    return [f"stock calibrated by measurement: speed of sound {cal.speed:.2f} m/s at "
            f"{cal.temperature - 273.15:.1f} C (scaled to the design's air), end correction "
            f"{cal.end_correction * 1000:.2f} mm per open end" + (f" ({cal.note})" if cal.note else "")]


def stock_toml(name, stock, speed_value, temperature, end_correction, note, header_note):
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
        f'inner = "{sec.air_radius * 2000:.4f} mm"',
        f'outer_tolerance = "{stock.outer_tolerance * 1000:.4f} mm"',
        f'wall_tolerance = "{stock.wall_tolerance * 100:.2f} %"',
        f'speed_of_sound = "{speed_value:.3f} m/s"',
        f'measured_at = "{temperature - 273.15:.2f} C"',
        f'end_correction = "{end_correction * 1000:.4f} mm"',
        f'calibration_note = "{note}"',
    ]
    return "\n".join(lines) + "\n"

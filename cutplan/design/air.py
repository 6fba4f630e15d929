"""Validate what only air-column and resonator sets have: ends, end correction, air temperature
and humidity, the longest tube, the set a resonator serves."""

from __future__ import annotations

import re

from cutplan import units
from cutplan.design.beams import material
from cutplan.design.contract import is_number
from cutplan.limits import TEMPERATURE_RANGE, TEMPERATURE_SPAN

MAX_LENGTH_RANGE = (0.01, 10.0)
"""A resonator's max_length may be given from 10 mm to 10 m [m]."""


__all__ = ["TEMPERATURE_RANGE", "air_fields"]

_HUMIDITY = re.compile(r"\s*([0-9]+(?:\.[0-9]*)?)\s*%?\s*")
_END_CORRECTIONS = ("unflanged", "flanged", "none")


def _humidity(value):
    """Relative humidity 0..100 from 50, 50.0 or "50 %"; None when it is not one."""
    if is_number(value):
        h = float(value)
    elif isinstance(value, str) and (m := _HUMIDITY.fullmatch(value)):
        h = float(m.group(1))
    else:
        return None
    return h if 0 <= h <= 100 else None


def _temperature_range(value, key, col):
    allowed = f'must be two temperatures from {TEMPERATURE_SPAN}, such as ["10 C", "30 C"]'
    if not isinstance(value, list) or len(value) != 2:
        col.add(key, value, allowed)
        return None
    temps = [col.parse(f"{key}[{j}]", v, units.parse_temperature) for j, v in enumerate(value, start=1)]
    if any(t is None for t in temps):
        return None
    lo, hi = sorted(temps)
    if not (TEMPERATURE_RANGE[0] <= lo and hi <= TEMPERATURE_RANGE[1] and hi - lo >= 1.0):
        col.add(key, value, allowed + ", at least 1 C apart")
        return None
    return (lo, hi)


def air_fields(raw, key, kind, stock_material, library, col):
    """The SetSpec fields of an air-column or resonator set."""
    fields = {}
    for k in ("model", "target", "mode_clearance"):
        if k in raw:
            col.add(f"{key}.{k}", None, f"applies to chime and bar sets, not {kind}")
    if "material" in raw:
        fields["material"] = material(raw, f"{key}.material", None, library, col)
    elif stock_material and library is not None and stock_material in library.materials:
        fields["material"] = library.materials[stock_material]
    ends = raw.get("ends", "open-open" if kind == "air-column" else "closed-open")
    if kind == "resonator" and ends != "closed-open":
        col.add(f"{key}.ends", ends, 'must be "closed-open" for a resonator')
    elif ends not in ("open-open", "closed-open"):
        col.add(f"{key}.ends", ends, 'must be "open-open" or "closed-open"')
    else:
        fields["ends"] = ends
    corr = raw.get("end_correction", "unflanged")
    if not (corr in _END_CORRECTIONS if isinstance(corr, str) else is_number(corr) and 0 <= corr <= 1.5):
        col.add(f"{key}.end_correction", corr,
                'must be "unflanged", "flanged", "none" or a factor of the inner radius from 0 to 1.5')
    else:
        fields["end_correction"] = corr
    if "temperature" in raw:
        t = col.ranged(f"{key}.temperature", raw["temperature"], units.parse_temperature, *TEMPERATURE_RANGE,
                       f"must be from {TEMPERATURE_SPAN}")
        if t is not None:
            fields["temperature"] = t
    if "humidity" in raw:
        h = _humidity(raw["humidity"])
        if h is None:
            col.add(f"{key}.humidity", raw["humidity"], 'must be a relative humidity from 0 to 100, such as 50 or "50 %"')
        else:
            fields["humidity"] = h
    if "max_length" in raw:
        m = col.ranged(f"{key}.max_length", raw["max_length"], units.parse_length, *MAX_LENGTH_RANGE,
                       "must be a length from 10 mm to 10 m")
        if m is not None:
            fields["max_length"] = m
    if "undercut" in raw:
        col.add(f"{key}.undercut", None, "applies to bar sets only")
    if "temperature_range" in raw:
        span = _temperature_range(raw["temperature_range"], f"{key}.temperature_range", col)
        if span is not None:
            fields["temperature_range"] = span
    return fields

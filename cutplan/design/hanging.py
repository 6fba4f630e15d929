"""Validate a chime set's ``hanging`` table: how the set is to hang.

``hanging = { clearance = "10 mm", tube_gap = "20 mm", breeze = "3 m/s" }``: the least clear
gap between the striker at rest and the tubes, the least gap between neighbouring tubes, and
the breeze the sail is sized for.  Every key is optional.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from cutplan import units

__all__ = [
    "HANGING_KEYS", "DEFAULT_CLEARANCE", "DEFAULT_TUBE_GAP", "DEFAULT_BREEZE", "CLEARANCE_RANGE",
    "TUBE_GAP_RANGE", "BREEZE_RANGE", "HangingSpec", "parse_speed", "hanging_options"
]

HANGING_KEYS = {"clearance", "tube_gap", "breeze"}
DEFAULT_CLEARANCE = 0.010
"""Least gap between the striker at rest and the tubes [m] (common practice: a striker touching
the tubes damps them; 10 mm lets the set ring out)."""
DEFAULT_TUBE_GAP = 0.020
"""Least gap between neighbouring tubes [m] (common practice: they must not clash as they swing)."""
DEFAULT_BREEZE = 3.0
"""Breeze the sail is sized for [m/s]: the top of a light breeze, Beaufort force 2 (1.6-3.3 m/s;
World Meteorological Organization, Manual on Codes, WMO-No. 306, code table 1100; from memory)."""
CLEARANCE_RANGE = (0.003, 0.1)
TUBE_GAP_RANGE = (0.005, 0.2)
BREEZE_RANGE = (0.5, 15.0)
_SPEED = re.compile(r"\s*([0-9]+(?:\.[0-9]*)?)\s*(m/s|km/h|mph|kn|knots?)\s*", re.IGNORECASE)
_SPEED_UNITS = {"m/s": 1.0, "km/h": 1 / 3.6, "mph": 0.44704, "kn": 1852 / 3600, "knot": 1852 / 3600,
                "knots": 1852 / 3600}
"""Speed units [m/s per unit]: 1 mph = 0.44704 m/s and 1 knot = 1852 m/h exactly (by definition)."""


@dataclass(frozen=True)
class HangingSpec:
    """How a chime set hangs, SI: clearances [m] and the design breeze [m/s]."""

    clearance: float = DEFAULT_CLEARANCE
    tube_gap: float = DEFAULT_TUBE_GAP
    breeze: float = DEFAULT_BREEZE


def parse_speed(value):
    """Speed in m/s from "3 m/s", "10 km/h", "7 mph" or "6 kn"; None when it is not one.

    >>> parse_speed("7 mph")
    3.12928
    """
    m = _SPEED.fullmatch(value) if isinstance(value, str) else None
    return None if m is None else float(m.group(1)) * _SPEED_UNITS[m.group(2).lower()]


def hanging_options(raw, key, kind, col):
    """HangingSpec from the set's ``hanging`` table, or None after noting every problem."""
    if kind != "chime":
        col.add(key, None, "applies to chime sets only")
        return None
    if not isinstance(raw, dict):
        col.add(key, raw, 'must be a table such as { clearance = "10 mm", tube_gap = "20 mm", breeze = "3 m/s" }')
        return None
    col.unknown(raw, HANGING_KEYS, key)
    clearance = col.ranged(f"{key}.clearance", raw.get("clearance", "10 mm"), units.parse_length,
                           *CLEARANCE_RANGE, "must be a length from 3 mm to 100 mm")
    gap = col.ranged(f"{key}.tube_gap", raw.get("tube_gap", "20 mm"), units.parse_length,
                     *TUBE_GAP_RANGE, "must be a length from 5 mm to 200 mm")
    breeze = parse_speed(raw.get("breeze", "3 m/s"))
    if breeze is None or not BREEZE_RANGE[0] <= breeze <= BREEZE_RANGE[1]:
        col.add(f"{key}.breeze", raw.get("breeze"), 'must be a wind speed from 0.5 to 15 m/s, such as "3 m/s" or "7 mph"')
        return None
    if clearance is None or gap is None:
        return None
    return HangingSpec(clearance, gap, breeze)

"""What a hung chime set weighs, the lines it needs and what carries it.

Every line's length comes from the set's geometry plus a knot allowance; lines and the top
hook or eye are chosen by load times a stated safety factor from ``materials/shop/hanging_lines.toml``
(each row with its kind: from memory or common practice).  SI: m, kg, N.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from cutplan import units
from cutplan.materials import shop_table
from cutplan.physics.swing import GRAVITY

__all__ = [
    "KNOT", "RING_HEIGHT_MIN", "KNOT_EFFICIENCY", "LBF", "BUY_STEP", "LineRow", "HookRow", "Table",
    "Geometry", "Masses", "Line", "Load", "load_table", "pick_line", "load_for", "buy_text", "mass_text"
]

KNOT = 0.10
"""Line used by one tie, with room to adjust [m] (common practice)."""
RING_HEIGHT_MIN = 0.10
"""Least height of the ring above the plate [m]; otherwise as high as the lines' ring radius,
so they rise at 45 degrees or steeper (common practice)."""
KNOT_EFFICIENCY = 0.5
"""Share of a line's breaking strength left at a knot [-] (from memory: common knots keep about
half to two thirds; the lower figure is used)."""
LBF = 4.4482216152605
"""One pound-force [N] (exact by definition: 0.45359237 kg x 9.80665 m/s^2)."""
BUY_STEP = {"mm": 1.0, "in": 5 * 0.3048}
"""Line is bought by the whole metre, or in 5 ft steps [m] (common practice)."""


@dataclass(frozen=True)
class LineRow:
    """A line from the table: name, diameter [m], breaking strength [N], kind, note."""

    what: str
    diameter: float
    breaking: float
    kind: str
    note: str = ""


@dataclass(frozen=True)
class HookRow:
    """An overhead fixing from the table: name, rated working load [kg], kind."""

    what: str
    rated: float
    kind: str


@dataclass(frozen=True)
class Table:
    """The line and hardware table: lines and hooks weakest first, the safety factor and its source."""

    lines: tuple[LineRow, ...]
    hooks: tuple[HookRow, ...]
    safety_factor: float
    safety_source: str
    safety_kind: str


@dataclass(frozen=True)
class Geometry:
    """Heights a set's lines span [m]: plate top to tube tops, each tube's hang hole below its
    top, striker height below the tops, the longest tube, the sail's drop and side, and the
    radius of the plate's own three line holes."""

    tops_drop: float
    hang_holes: tuple[float, ...]
    striker_height: float
    longest: float
    sail_drop: float
    sail_side: float
    ring_radius: float


@dataclass(frozen=True)
class Masses:
    """What hangs [kg]."""

    tubes: float
    striker: float
    sail: float
    plate: float


@dataclass(frozen=True)
class Line:
    """Lines of one kind to cut: what for, how many, each length [m], the row used, the load one
    carries [N]."""

    role: str
    count: int
    each: float
    row: LineRow
    load: float

    @property
    def total(self):
        """Length of all of them [m]."""
        return self.count * self.each


@dataclass(frozen=True)
class Load:
    """The whole set's weight and what carries it: mass [kg] and its parts, lines, the total
    line and what to buy [m], the hook row and the safety factor used."""

    mass: float
    masses: Masses
    lines: tuple[Line, ...]
    hook: HookRow | None
    safety_factor: float
    safety_source: str
    safety_kind: str

    @property
    def weight(self):
        """Total weight [N]."""
        return self.mass * GRAVITY

    @property
    def line_total(self):
        """All the lines cut, knots included [m]."""
        return sum(line.total for line in self.lines)

    def line_to_buy(self, shown="mm", copies=1):
        """The line to buy for ``copies`` sets, rounded up to what a shop sells [m]."""
        step = BUY_STEP.get(shown, BUY_STEP["mm"])
        return math.ceil(copies * self.line_total / step - 1e-9) * step

    @property
    def hook_rating(self):
        """Least rated working load of the top fixing [kg]: the safety factor times the mass."""
        return self.safety_factor * self.mass


def load_table(table=None):
    """The line and hardware Table (``table``: the parsed TOML; the packaged one, read once per
    process, when None)."""
    if table is None:
        table = shop_table("hanging_lines.toml")
    lines = tuple(LineRow(r["what"], units.parse_length(r["diameter"]), float(r["breaking_lbf"]) * LBF,
                          r["kind"], r.get("note", "")) for r in table["line"])
    hooks = tuple(HookRow(r["what"], float(r["rated_kg"]), r["kind"]) for r in table["hook"])
    return Table(lines, hooks, float(table["safety_factor"]), table["safety_source"], table["safety_kind"])


def pick_line(mass, table, count=1.0):
    """The weakest line whose breaking strength at a knot (KNOT_EFFICIENCY) is at least the
    safety factor times the weight of ``mass`` [kg] shared by ``count`` lines (the strongest row
    when none is enough)."""
    need = table.safety_factor * mass * GRAVITY / count
    return next((r for r in table.lines if r.breaking * KNOT_EFFICIENCY >= need), table.lines[-1])


def load_for(geometry, masses, heaviest_tube, table):
    """The Load of a set: line lengths from ``geometry``, rows by load times the safety factor.

    Each tube hangs by one line looped through its hang hole, both ends tied above the plate
    (counted as one strand for strength); the striker line runs from above the plate past the
    striker to the sail; the plate hangs by three lines rising to a ring.
    """
    g = geometry
    mass = masses.tubes + masses.striker + masses.sail + masses.plate
    tube_row = pick_line(heaviest_tube, table)
    lines = [Line("tube", 1, 2 * (g.tops_drop + x) + 2 * KNOT, tube_row, heaviest_tube * GRAVITY)
             for x in g.hang_holes]
    striker_load = (masses.striker + masses.sail) * GRAVITY
    lines.append(Line("striker and sail", 1, g.tops_drop + g.longest + g.sail_drop + 3 * KNOT,
                      pick_line(masses.striker + masses.sail, table), striker_load))
    rise = max(RING_HEIGHT_MIN, g.ring_radius)
    slope = math.hypot(rise, g.ring_radius) / rise  # line tension over its share of the weight
    plate_row = pick_line(mass * slope, table, count=3)
    lines.append(Line("plate to ring", 3, math.hypot(rise, g.ring_radius) + 2 * KNOT, plate_row,
                      mass * GRAVITY * slope / 3))
    merged = {}
    for line in lines:  # one row per role and length rounded to 5 mm, so the list stays short
        key = (line.role, line.row.what, round(line.each / 0.005))
        old = merged.get(key)
        merged[key] = line if old is None else Line(old.role, old.count + line.count, old.each, old.row, old.load)
    hook = next((h for h in table.hooks if h.rated >= table.safety_factor * mass), None)
    return Load(mass=mass, masses=masses, lines=tuple(merged.values()), hook=hook,
                safety_factor=table.safety_factor, safety_source=table.safety_source,
                safety_kind=table.safety_kind)


def buy_text(metres, shown="mm"):
    """Line to buy as a shop sells it: "5 m" or "15 ft".

    >>> buy_text(5.0), buy_text(4.572, "in")
    ('5 m', '15 ft')
    """
    if shown == "in":
        return f"{metres / 0.3048:.0f} ft"
    return f"{metres:.0f} m"


def mass_text(kg):
    """A mass in kg and lb: "3.92 kg (8.6 lb)" (1 lb = 0.45359237 kg exactly).

    >>> mass_text(3.92)
    '3.92 kg (8.6 lb)'
    """
    return f"{kg:.2f} kg ({kg / 0.45359237:.1f} lb)"

"""A chime set as an assembly: plate, hole circle, striker, sail, lines and the whole hanging mass.

``hanging_for(set_plan, options, target_mode, units)`` is called by the planner for every chime
set; the result is the set's ``hanging`` field, the one place every page, template and file
takes these numbers from.  SI inside [m, kg, N].

Geometry (tubes hang with their axes on the hole circle, the striker on the centre line):

- striker clearance: R - D/2 - d_s/2 >= the design's clearance (R hole-circle radius, D tube
  outside diameter, d_s striker diameter);
- neighbouring tubes: 2 R sin(pi/n) - D >= the design's tube gap;
- the striker fills the circle the tubes leave (never smaller than STRIKER_MIN_DIAMETER);
- striker height: the height below the level tube tops where every tube is struck furthest
  from the nodes of the modes that make its heard note (cutplan.physics.swing);
- sail: square, sized so its drag at the design breeze is SAIL_MARGIN times the push that swings
  striker and sail out to the tubes.

Loads, lines and hardware are in :mod:`cutplan.planning.hanging_load`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from cutplan.design.hanging import HangingSpec
from cutplan.physics import swing
from cutplan.planning import hanging_load

__all__ = [
    "STRIKER_MIN_DIAMETER", "STRIKER_THICKNESS", "HARDWOOD_DENSITY", "SAIL_SHEET", "SAIL_MARGIN",
    "SAIL_MIN_SIDE", "SAIL_STEP", "TOP_DROP", "SAIL_DROP", "STRIKE_END_MARGIN", "PLATE_EDGE",
    "PLATE_THICKNESS", "HOLE_DIAMETER", "STEP", "PLATE_STEP", "Sail", "Hanging", "strike_modes",
    "hanging_for"
]


STRIKER_MIN_DIAMETER = (0.050, 2.5)
"""Smallest striker disc: 50 mm, and at least 2.5 tube diameters [m, -] (common practice: a
smaller, lighter disc is a poor target and gives large tubes too weak a blow)."""
STRIKER_THICKNESS = ((0.033, 0.01905), (math.inf, 0.0254))
"""Striker disc thickness by tube outside diameter [m]: 3/4 in (19 mm) hardwood up to 1-1/4 in
tubes, 1 in (25 mm) above (common practice: heavier tubes want a heavier blow)."""
HARDWOOD_DENSITY = 706.0
"""Striker and plate wood [kg/m^3]: sugar maple, specific gravity 0.63 at 12 % moisture, times
1.12 for the moisture (USDA Wood Handbook, FPL-GTR-190, 2010, Table 5-3a; derived)."""
SAIL_SHEET = (0.003, 1190.0)
"""Sail sheet: 3 mm acrylic [m], density [kg/m^3] (acrylic sheet data, ASTM D792: SG 1.19)."""
SAIL_MARGIN = 2.0
"""Sail drag at the design breeze over the push that just brings the striker to the tubes [-]
(common practice: gusts then swing it through with some speed)."""
SAIL_MIN_SIDE = 0.060
"""Smallest sail side [m] (common practice)."""
SAIL_STEP = 0.005
"""Sail sides are rounded up to this [m] (common practice: what a saw and rule mark easily)."""
TOP_DROP = 0.040
"""Gap from the plate's underside down to the tube tops [m] (common practice)."""
SAIL_DROP = 0.075
"""Sail top below the longest tube's bottom end [m] (common practice: clear of the tubes)."""
STRIKE_END_MARGIN = 0.015
"""Least distance from the striker's face to the shortest tube's bottom end [m] (common practice:
a swinging striker must not slip past the end)."""
PLATE_EDGE = 0.020
"""Plate left outside the hole circle [m] (common practice)."""
PLATE_THICKNESS = 0.012
"""Plate thickness assumed for its weight and the line lengths [m] (common practice: 12 mm / 1/2 in)."""
HOLE_DIAMETER = 0.004
"""Line holes in the plate [m] (common practice: suits lines to 2.5 mm; larger line, line + 1.5 mm)."""
STEP = 0.0005
"""Plate geometry is rounded to 0.5 mm [m] (what a compass and rule mark)."""
PLATE_STEP = {"mm": 0.005, "in": 0.0254 / 4}
"""The plate's diameter is rounded up to a size a builder buys or marks in the plan's units [m]:
5 mm, or 1/4 in (common practice)."""


@dataclass(frozen=True)
class Sail:
    """A square wind sail: side [m], area [m^2], mass [kg], design breeze [m/s], its drag there
    [N], the push that just swings striker and sail to the tubes [N], the lightest breeze that
    does so [m/s], drag coefficient and air density used."""

    side: float
    area: float
    mass: float
    breeze: float
    drag: float
    contact_push: float
    lightest_breeze: float
    drag_coefficient: float = swing.FLAT_PLATE_DRAG
    air_density: float = swing.AIR_DENSITY
    too_light: bool = False  # no sail of this sheet can swing the striker at the design breeze


@dataclass(frozen=True)
class Hanging:
    """How a chime set hangs, SI: geometry [m], masses [kg], lines and hardware."""

    tube_outer: float
    plate_diameter: float
    plate_thickness: float
    plate_mass: float
    hole_circle_diameter: float
    hole_diameter: float
    holes: tuple[tuple[float, float, str], ...]  # (x, y, label) [m] from the plate centre, first tube at the top, clockwise
    suspension: tuple[tuple[float, float], ...]  # (x, y) [m] of the three holes the plate hangs by
    striker_diameter: float
    striker_thickness: float
    striker_mass: float
    striker_height: float  # from the tube tops down to the striker's centre [m]
    strike_fractions: tuple[float, ...]  # where each tube is struck, as a fraction of its length from the top [-]
    strike_score: float  # the weakest tube's excitation of its heard modes, 1 = a free end [-]
    strike_modes: tuple[int, ...]  # the modes the height is chosen for
    clearance_min: float
    striker_clearance: float
    tube_gap_min: float
    tube_gap: float | None
    sail: Sail
    load: hanging_load.Load

    @property
    def mass(self):
        """Everything that hangs [kg]: tubes, striker, sail, plate and lines."""
        return self.load.mass


def _striker_thickness(outer):
    return next(t for limit, t in STRIKER_THICKNESS if outer <= limit)


def _up(x, step=STEP):
    return math.ceil(x / step - 1e-9) * step


def _circle(n, outer, options):
    """Hole-circle radius and striker diameter [m] meeting the clearance and the tube gap."""
    by_gap = (outer + options.tube_gap) / (2 * math.sin(math.pi / n)) if n > 1 else 0.0
    smallest = max(STRIKER_MIN_DIAMETER[0], STRIKER_MIN_DIAMETER[1] * outer)
    striker = max(smallest, 2 * (by_gap - outer / 2 - options.clearance))
    radius = _up(max(by_gap, outer / 2 + options.clearance + striker / 2))
    striker = math.floor((2 * (radius - outer / 2 - options.clearance)) / 1e-3 + 1e-9) * 1e-3
    return radius, striker


def _plate(set_plan, radius, outer, units="mm"):
    n = len(set_plan.pieces)
    holes = []
    for k, p in enumerate(set_plan.pieces):
        angle = math.pi / 2 - 2 * math.pi * k / n  # first tube at the top, then clockwise
        holes.append((radius * math.cos(angle), radius * math.sin(angle), p.label))
    edge = max(PLATE_EDGE, outer / 2 + 0.005)
    diameter = _up(2 * _up(radius + edge), PLATE_STEP.get(units, PLATE_STEP["mm"]))
    ring = radius + edge / 2
    offset = math.pi / n  # between tubes, so the plate's own lines clear them
    suspension = tuple((ring * math.cos(math.pi / 2 + offset + 2 * math.pi * k / 3),
                        ring * math.sin(math.pi / 2 + offset + 2 * math.pi * k / 3)) for k in range(3))
    return diameter, tuple(holes), suspension


def strike_modes(target_mode):
    """Modes that make the heard note: the fundamental; with the strike note, also modes 4-6
    (the strike note is heard from modes 4, 5 and 6, near 2 : 3 : 4; Fletcher and Rossing, The
    Physics of Musical Instruments, 2nd ed., 1998, ch. 19)."""
    return (1, 4, 5, 6) if target_mode == "strike-note" else (1,)


def _striker_height(set_plan, modes, thickness):
    lengths = [p.length for p in set_plan.pieces]
    low = max(p.nodes[0] for p in set_plan.pieces if p.nodes) + thickness  # below every hang hole
    high = min(lengths) - STRIKE_END_MARGIN - thickness / 2
    return swing.best_strike_height(lengths, modes, low, high)


def _sail(striker_mass, clearance, line_to_striker, breeze):
    thickness, density = SAIL_SHEET
    sigma = thickness * density
    area = swing.sail_area(striker_mass, sigma, clearance, line_to_striker, breeze, SAIL_MARGIN)
    too_light = area is None
    side = max(SAIL_MIN_SIDE, math.sqrt(area) if area else 0.2)
    side = _up(side, SAIL_STEP)
    area = side * side
    mass = sigma * area
    push = swing.contact_push(striker_mass + mass, clearance, line_to_striker)
    return Sail(side=side, area=area, mass=mass, breeze=breeze, drag=swing.plate_drag(area, breeze),
                contact_push=push, lightest_breeze=swing.breeze_for(push, area), too_light=too_light)


def hanging_for(set_plan, options=None, target_mode="fundamental", rows=None, units="mm"):
    """The Hanging of a chime set (its pieces planned), or None for a set with no pieces.

    ``options``: HangingSpec (defaults when None); ``rows``: the line and hardware table
    (:func:`cutplan.planning.hanging_load.load_table`, read when None).
    """
    if not set_plan.pieces:
        return None
    options = options or HangingSpec()
    n = len(set_plan.pieces)
    outer = set_plan.outer
    radius, striker = _circle(n, outer, options)
    thickness = _striker_thickness(outer)
    striker_mass = HARDWOOD_DENSITY * math.pi * striker**2 / 4 * thickness
    modes = strike_modes(target_mode)
    height, score, fractions = _striker_height(set_plan, modes, thickness)
    sail = _sail(striker_mass, options.clearance, TOP_DROP + PLATE_THICKNESS + height, options.breeze)
    rows = rows if rows is not None else hanging_load.load_table()
    tube_line = hanging_load.pick_line(max(p.mass or 0.0 for p in set_plan.pieces), rows)
    hole = max(HOLE_DIAMETER, tube_line.diameter + 0.0015)
    diameter, holes, suspension = _plate(set_plan, radius, outer, units)
    plate_mass = HARDWOOD_DENSITY * math.pi * diameter**2 / 4 * PLATE_THICKNESS
    geometry = hanging_load.Geometry(
        tops_drop=TOP_DROP + PLATE_THICKNESS, hang_holes=tuple(p.nodes[0] for p in set_plan.pieces),
        striker_height=height, longest=max(p.length for p in set_plan.pieces), sail_drop=SAIL_DROP,
        sail_side=sail.side, ring_radius=math.hypot(*suspension[0]))
    masses = hanging_load.Masses(tubes=sum(p.mass or 0.0 for p in set_plan.pieces), striker=striker_mass,
                                 sail=sail.mass, plate=plate_mass)
    load = hanging_load.load_for(geometry, masses, max(p.mass or 0.0 for p in set_plan.pieces), rows)
    gap = 2 * radius * math.sin(math.pi / n) - outer if n > 1 else None
    return Hanging(
        tube_outer=outer, plate_diameter=diameter, plate_thickness=PLATE_THICKNESS, plate_mass=plate_mass,
        hole_circle_diameter=2 * radius, hole_diameter=hole, holes=holes, suspension=suspension,
        striker_diameter=striker, striker_thickness=thickness, striker_mass=striker_mass,
        striker_height=height, strike_fractions=fractions, strike_score=score, strike_modes=modes,
        clearance_min=options.clearance, striker_clearance=radius - outer / 2 - striker / 2,
        tube_gap_min=options.tube_gap, tube_gap=gap, sail=sail, load=load)

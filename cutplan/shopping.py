"""The shopping list and the shop cautions of a Plan: what to buy, and what to watch for.

Computed once from the Plan (``planner.plan`` attaches them), so every page and file states the
same list.  What the plan computes (stock sticks, plate size, drill size from the shop table) is
stated plainly; what it does not compute (cord lengths, sails, mallets) is marked a suggestion.
Lengths are SI [m]; renderers format them in the plan's units.

The shop tables live in ``materials/shop/``: ``hang_holes.toml`` (drill and line by tube size)
and ``cautions.toml`` (cautions by kind, shape and material, each with where it comes from).
"""

from __future__ import annotations

import fnmatch
import math
import tomllib
from dataclasses import dataclass, replace

from cutplan import units

HOLE_DIAMETER = 4.0e-3
"""Hole for the hanging lines in a chime plate [m] (suits 1.5-2 mm line; common practice)."""
PLATE_EDGE = 20.0e-3
"""Plate material left outside the hole circle [m] (common practice)."""
TUBE_GAP = 20.0e-3
"""Clear gap between neighbouring tubes hung from a plate [m] (common practice)."""
LINE_PER_PIECE = 0.6
"""Hanging line per chime, both ends tied, with room to adjust [m] (common practice)."""
PLATE_THICKNESS = {"mm": (12e-3, 3e-3), "in": (0.5 * 0.0254, 0.125 * 0.0254)}
"""Usual hanging-plate thickness [m]: plywood or hardwood, aluminium sheet, as sold in metric and
in inch sizes (common practice)."""


def plate_material(shown="mm"):
    """What a hanging plate is usually made of, in the plan's units (common practice; a suggestion)."""
    wood, metal = (units.format_length(t, shown) for t in PLATE_THICKNESS.get(shown, PLATE_THICKNESS["mm"]))
    return f"{wood} exterior plywood or hardwood, or {metal} aluminium sheet"


PLATE_HANGING = ("hang the plate level from a ring or swivel by three equal lines through the three "
                 "outer holes (S); the striker line runs through the centre hole")
"""How the plate itself is hung (common practice)."""
CODES = "Follow local building codes and licensed practice; these notes do not replace them."


@dataclass(frozen=True)
class Item:
    """One line of the shopping list.

    ``count`` things (or None), each ``each`` long [m] (or None), ``total`` [m] in all (or None);
    ``what`` names it, ``note`` adds detail; ``suggestion`` is True where the plan does not compute
    it (sizes and lengths there are starting points).
    """

    group: str
    what: str
    count: int | None = None
    each: float | None = None
    total: float | None = None
    note: str = ""
    suggestion: bool = False


@dataclass(frozen=True)
class Caution:
    """A shop caution and where it comes from (a sources key, or a kind such as "common practice")."""

    text: str
    source: str = ""
    where: str = ""
    kind: str = "common practice"


@dataclass(frozen=True)
class HangHole:
    """Drill size [m] and the line that fits, for tubes and rods up to ``max_outer`` [m]."""

    max_outer: float
    drill: float
    line: str
    kind: str


@dataclass(frozen=True)
class Plate:
    """A round hanging plate [mm]: diameter, pitch-circle radius, holes ((x, y) from centre, label)."""

    diameter_mm: float
    pitch_radius_mm: float
    holes: tuple
    hole_mm: float = HOLE_DIAMETER * 1000
    suspension: tuple = ()  # (x, y) [mm] of the three holes the plate hangs by


def _shop_dir():
    from cutplan.materials import packaged_dir

    return packaged_dir() / "shop"


def _read(name):
    with open(_shop_dir() / name, "rb") as fh:
        return tomllib.load(fh)


def hang_holes(table=None):
    """The hang-hole rows, smallest tube first (``table``: the parsed TOML, read when None)."""
    table = table if table is not None else _read("hang_holes.toml")
    return tuple(HangHole(units.parse_length(r["max_outer"]), units.parse_length(r["drill"]), r["line"], r["kind"])
                 for r in table["hole"])


def hang_hole_for(outer, rows):
    """The row for a tube or rod of outside diameter ``outer`` [m], or None past the table."""
    return next((r for r in rows if outer <= r.max_outer + 1e-9), None)


def cautions_for(plan, table=None):
    """Cautions that apply to the plan's kinds, shapes and materials, in table order, then codes."""
    table = table if table is not None else _read("cautions.toml")
    out = []
    for row in table["caution"]:
        for s in plan.sets:
            if "kinds" in row and s.kind not in row["kinds"]:
                continue
            if "shapes" in row and s.shape not in row["shapes"]:
                continue
            if "materials" in row and not any(fnmatch.fnmatch(s.material, p) for p in row["materials"]):
                continue
            out.append(Caution(row["text"], row.get("source", ""), row.get("where", ""), row["kind"]))
            break
    out.append(Caution(CODES))
    return tuple(out)


def hanging_plate(set_plan):
    """Plate for a chime set: one hole per tube on a pitch circle, a centre hole for the striker.

    The pitch circle leaves ``TUBE_GAP`` between neighbouring tubes of the set's diameter.
    """
    n = len(set_plan.pieces)
    tube = set_plan.outer * 1000
    radius = 0.0 if n == 1 else max(40.0, (tube + TUBE_GAP * 1000) / (2 * math.sin(math.pi / n)))
    holes = []
    for k, p in enumerate(set_plan.pieces):
        angle = math.pi / 2 - 2 * math.pi * k / n  # first tube at the top, then clockwise
        holes.append((radius * math.cos(angle), radius * math.sin(angle), p.label))
    edge = max(PLATE_EDGE * 1000, tube / 2 + 5)
    diameter = 2 * (radius + edge)
    ring = radius + edge / 2 if radius else edge * 0.6
    offset = math.pi / n if n > 1 else 0.0  # between tubes, so the lines clear them
    suspension = tuple((ring * math.cos(math.pi / 2 + offset + 2 * math.pi * k / 3),
                        ring * math.sin(math.pi / 2 + offset + 2 * math.pi * k / 3)) for k in range(3))
    return Plate(round(diameter, 1), radius, tuple(holes), suspension=suspension)


def _stock_items(plan):
    items = []
    if plan.cut_list is not None:
        for g in plan.cut_list.groups:
            counts = {}
            for s in g.sticks:
                counts[s.stock_length] = counts.get(s.stock_length, 0) + 1
            materials = sorted({s.material for s in plan.sets if s.section_text in g.group})
            what = f"{', '.join(materials)}: {g.group}" if materials else g.group
            for length, n in sorted(counts.items()):
                items.append(Item("stock", what, n, length, n * length, "sticks, from the stock layout"))
    listed = {p.label for s in plan.cut_list.sticks for p in s.cuts} if plan.cut_list is not None else set()
    for s in plan.sets:
        rest = [p for p in s.pieces if p.label not in listed]
        if rest:
            total = sum(p.cut_length for p in rest)
            items.append(Item("stock", f"{s.material}, {s.section_text}", None, None, total,
                              "the pieces' cut lengths added up; the design lists no stock, so buy this "
                              "plus saw kerf and end trim", suggestion=True))
    return items


def _drill_for(s, row, shown="mm"):
    """(drill [m], note): the table's drill, or a smaller one when the table's makes a piece's two
    bending planes beat faster than the limit (``Piece.hang_hole``, planned by hang_holes.py)."""
    splits = [p.hang_hole for p in s.pieces if getattr(p, "hang_hole", None) is not None]
    fast = [h for h in splits if h.beat_hz > h_limit() and h.largest_drill > 0]
    if not fast:
        return row.drill, "through both walls, at the hang-hole mark"
    from cutplan.hang_holes import drill_text

    drill = min(h.largest_drill for h in fast)
    return drill, (f"through both walls, at the hang-hole mark; {drill_text(drill, shown)}, smaller than the "
                   f"table's {drill_text(row.drill, shown)}, so the hole's two bending planes beat slower than "
                   f"{h_limit():g} Hz; use a line that fits it")


def h_limit():
    """The beat limit of hang holes [Hz] (:data:`cutplan.hang_holes.BEAT_LIMIT_HZ`)."""
    from cutplan.hang_holes import BEAT_LIMIT_HZ

    return BEAT_LIMIT_HZ


def _chime_items(s, rows, shown="mm"):
    n = len(s.pieces)
    plate = hanging_plate(s)
    row = hang_hole_for(s.outer, rows) if s.shape in ("tube", "rod") else None
    line = row.line if row else "braided polyester line"
    items = [Item("hanging", f"hanging line for {s.name}: {line}", None, None, n * LINE_PER_PIECE,
                  f"about {units.format_length(LINE_PER_PIECE, shown)} per tube", suggestion=True)]
    if row is not None:
        drill, note = _drill_for(s, row, shown)
        items.append(Item("hanging", f"drill bit for the hang holes ({row.kind})", 1, drill, None, note))
    items += [
        Item("hanging", f"hanging plate for {s.name}", 1, plate.diameter_mm / 1000, None,
             f"across; {plate_material(shown)}", suggestion=True),
        Item("hanging", "top ring or swivel and 3 lines to hang the plate", 1, None, None,
             f"{PLATE_HANGING}; rated for the whole set's weight with a generous margin", suggestion=True),
        Item("hanging", "striker disc", 1, plate.diameter_mm / 2000, None,
             "across, hardwood, hung on the centre line at the height of the hang holes' lower third",
             suggestion=True),
        Item("hanging", "wind sail", 1, None, None, "thin plywood or acrylic, about the plate's size, "
             "on the striker line below the tubes", suggestion=True),
    ]
    return items


def _bar_items(s):
    n = len(s.pieces)
    rail = n * ((s.width or 0.0) + 0.01)
    return [
        Item("supports", f"felt or foam strip for {s.name}", 2, rail, 2 * rail,
             "two rails under the support marks: the bars' widths side by side plus 10 mm gaps", suggestion=True),
        Item("supports", f"pins or cord for {s.name}", 2 * n, None, None,
             "two per bar at the support marks, with rubber sleeves", suggestion=True),
        Item("supports", "mallets", 2, None, None, "hard rubber or yarn for wood bars, "
             "hard plastic for metal bars", suggestion=True),
    ]


def _air_items(s):
    n = len(s.pieces)
    items = []
    if any(p.stopper for p in s.pieces):
        items.append(Item("resonators", f"sliding stoppers for {s.name}", n, None, None,
                          "to fit the bore closely; tune with them (see the stopper table)"))
    elif s.model == "closed-open" or s.kind == "resonator":
        items.append(Item("resonators", f"end caps or plugs for {s.name}", n, None, None,
                          "one per tube, to fit the stock"))
    if s.kind == "air-column":
        items.append(Item("resonators", "paddle or beaters", 1, None, None,
                          "a foam or rubber paddle for open pipes", suggestion=True))
    return items


def shopping_list(plan, rows=None):
    """Every Item to buy for the plan: stock first, then hanging, supports and resonator parts."""
    rows = rows if rows is not None else hang_holes()
    items = _stock_items(plan)
    for s in plan.sets:
        if s.kind == "chime":
            items += _chime_items(s, rows, plan.units)
        elif s.kind == "bar":
            items += _bar_items(s)
        else:
            items += _air_items(s)
    return tuple(items)


def with_shop_lists(plan):
    """The plan with its shopping list and cautions attached."""
    return replace(plan, shopping=shopping_list(plan), cautions=cautions_for(plan))

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
import functools
from dataclasses import dataclass, replace

from cutplan import units
from cutplan.layout.kits import kit_label
from cutplan.materials import shop_table
from cutplan.planning import hanging_load
from cutplan.planning.hang_holes import BEAT_LIMIT_HZ, drill_text, hang_hole_for
from cutplan.planning.hanging import SAIL_DROP
from cutplan.planning.hanging_load import buy_text, mass_text

__all__ = [
    "PLATE_THICKNESSES_SOLD", "round_in_unit", "plate_material", "PLATE_HANGING", "CODES", "ShoppingItem",
    "Caution", "HangHole", "Plate", "hang_holes", "cautions_for", "hanging_plate", "h_limit",
    "shopping_list", "with_shop_lists"
]


PLATE_THICKNESSES_SOLD = {"mm": (12e-3, 3e-3), "in": (0.5 * 0.0254, 0.125 * 0.0254)}
"""Usual hanging-plate thickness [m]: plywood or hardwood, aluminium sheet, as sold in metric and
in inch sizes (common practice)."""


def round_in_unit(metres, shown="mm"):
    """A suggested size as a round number in the plan's units [m]: to 1/4 in (1 in past a foot), or
    to 5 mm (10 mm past 300 mm). Suggestions are starting points, so a metric choice such as a
    120 mm plate reads 4-3/4 in in an inch plan, not 4-23/32 in.

    >>> round(round_in_unit(0.120, "in") / 0.0254, 3), round(round_in_unit(0.6, "in") / 0.0254, 3)
    (4.75, 24.0)
    >>> round(round_in_unit(0.1183, "mm") * 1000, 1)
    120.0
    """
    if shown == "in":
        step = units.INCH if metres > 12 * units.INCH else units.INCH / 4
    else:
        step = 10 * units.MM if metres > 300 * units.MM else 5 * units.MM
    return max(step, round(metres / step) * step)


def plate_material(shown="mm", den=units.INCH_DENOMINATOR):
    """What a hanging plate is usually made of, in the plan's units (common practice; a suggestion)."""
    sold = PLATE_THICKNESSES_SOLD.get(shown, PLATE_THICKNESSES_SOLD["mm"])
    wood, metal = (units.format_length(t, shown, den) for t in sold)
    return f"{wood} exterior plywood or hardwood, or {metal} aluminium sheet"


PLATE_HANGING = ("hang the plate level from a ring or swivel by three equal lines through the three "
                 "outer holes (S); the striker line runs through the centre hole")
"""How the plate itself is hung (common practice)."""
CODES = "Follow local building codes and licensed practice; these notes do not replace them."


@dataclass(frozen=True)
class ShoppingItem:
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
    cost: float | None = None  # price of this line, in the stock table's prices (None: not priced)
    per_kit: bool = True  # with copies = N, bought N times (False: once for all kits, e.g. a drill bit)
    buy: str = ""  # how a shop sells it, where that differs from the length ("52 m", "170 ft")


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
    holes: tuple[tuple[float, float, str], ...]
    hole_mm: float = 4.0
    suspension: tuple[tuple[float, float], ...] = ()  # (x, y) [mm] of the three holes the plate hangs by
    striker_mm: float = 0.0  # striker disc diameter [mm], drawn round the centre
    tube_mm: float = 0.0  # tube outside diameter [mm], drawn round each tube's hole


@dataclass(frozen=True)
class ShopTables:
    """The packaged shop tables, parsed: hang-hole rows (:func:`hang_holes`), the line and
    hardware Table (:func:`cutplan.planning.hanging_load.load_table`) and the caution rows."""

    hang_holes: tuple
    lines: object
    cautions: dict


@functools.cache
def shop_tables():
    """The packaged :class:`ShopTables`, read and parsed once per process (on first use)."""
    return ShopTables(hang_holes(), hanging_load.load_table(), shop_table("cautions.toml"))


def hang_holes(table=None):
    """The hang-hole rows, smallest tube first (``table``: the parsed TOML; the packaged one,
    read once per process, when None)."""
    table = table if table is not None else shop_table("hang_holes.toml")
    return tuple(HangHole(units.parse_length(r["max_outer"]), units.parse_length(r["drill"]), r["line"], r["kind"])
                 for r in table["hole"])


def _material_matches(row, s):
    """A row's material keys: a name pattern, a material class (so inline materials match too)
    or a stock-size pattern; any one of those given is enough."""
    keys = [k for k in ("materials", "classes", "stocks") if k in row]
    if not keys:
        return True
    stock = getattr(s.section, "name", "") or ""
    return (any(fnmatch.fnmatch(s.material, p) for p in row.get("materials", ()))
            or getattr(s, "material_class", "") in row.get("classes", ())
            or any(fnmatch.fnmatch(stock, p) for p in row.get("stocks", ())))


def cautions_for(plan, table=None):
    """Cautions that apply to the plan's kinds, shapes and materials (by name, class or stock
    size), and the classroom notes for a classroom design, in table order, then codes."""
    table = table if table is not None else shop_table("cautions.toml")
    out = []
    for row in table["caution"]:
        if row.get("classroom", False) and not getattr(plan, "classroom", False):
            continue
        for s in plan.sets:
            if "kinds" in row and s.kind not in row["kinds"]:
                continue
            if "shapes" in row and s.shape not in row["shapes"]:
                continue
            if not _material_matches(row, s):
                continue
            out.append(Caution(row["text"], row.get("source", ""), row.get("where", ""), row["kind"]))
            break
    out.append(Caution(CODES))
    return tuple(out)


SELECTING_KEYS = ("kinds", "shapes", "materials", "classes", "stocks", "classroom")
"""Keys of a caution row that choose the sets it applies to (see ``cautions.toml``)."""


def general_cautions(table=None):
    """The cautions that apply to every packet, whatever its pieces and materials (the rows that
    choose no sets), then codes: what a page says before there is a plan to choose by."""
    table = table if table is not None else shop_table("cautions.toml")
    out = [Caution(row["text"], row.get("source", ""), row.get("where", ""), row["kind"])
           for row in table["caution"] if not any(k in row for k in SELECTING_KEYS)]
    return (*out, Caution(CODES))


def hanging_plate(set_plan):
    """Plate for a chime set [mm], from the set's planned hanging (cutplan.planning.hanging): one hole per
    tube on the hole circle, a centre hole for the striker line, three for the plate's own lines."""
    h = set_plan.hanging
    holes = tuple((x * 1000, y * 1000, label) for x, y, label in h.holes)
    return Plate(round(h.plate_diameter * 1000, 1), h.hole_circle_diameter * 500, holes,
                 hole_mm=h.hole_diameter * 1000, suspension=tuple((x * 1000, y * 1000) for x, y in h.suspension),
                 striker_mm=h.striker_diameter * 1000, tube_mm=h.tube_outer * 1000)


def _stock_items(plan):
    items = []
    if plan.cut_list is not None:
        for g in plan.cut_list.groups:
            counts = {}
            for s in g.sticks:
                counts[s.stock_length] = counts.get(s.stock_length, 0) + 1
            # keyed on the group's material id, never on its display text (named in the plan's units)
            what = f"{g.material}: {g.group}" if g.material else g.group
            for length, n in sorted(counts.items()):
                prices = [s.price for s in g.sticks if s.stock_length == length]
                cost = None if any(p is None for p in prices) else float(sum(prices))
                items.append(ShoppingItem("stock", what, n, length, n * length, "sticks, from the stock layout", cost=cost))
    listed = {p.label for s in plan.cut_list.sticks for p in s.cuts} if plan.cut_list is not None else set()
    for s in plan.sets:
        rest = [p for p in s.pieces if p.label not in listed and kit_label(1, p.label) not in listed]
        if rest:
            total = sum(p.cut_length for p in rest) * max(1, getattr(plan, "copies", 1))
            items.append(ShoppingItem("stock", f"{s.material}, {s.section_label(plan.units)}", None, None, total,
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
    drill = min(h.largest_drill for h in fast)
    return drill, (f"through both walls, at the hang-hole mark; {drill_text(drill, shown)}, smaller than the "
                   f"table's {drill_text(row.drill, shown)}, so the hole's two bending planes beat slower than "
                   f"{h_limit():g} Hz; use a line that fits it")


def h_limit():
    """The beat limit of hang holes [Hz] (:data:`cutplan.planning.hang_holes.BEAT_LIMIT_HZ`)."""
    return BEAT_LIMIT_HZ


def _chime_items(s, rows, shown="mm", copies=1, den=units.INCH_DENOMINATOR):

    h = s.hanging
    load = h.load
    row = hang_hole_for(s.outer, rows) if s.shape in ("tube", "rod") else None
    names = sorted({line.row.what for line in load.lines})
    buy = load.line_to_buy(shown, copies)
    each = f" per kit, {units.format_length(copies * load.line_total, shown, den)} for {copies} kits" if copies > 1 else ""
    items = [ShoppingItem("hanging", f"hanging line for {s.name}: {' and '.join(names)}", None, None, buy,
                  f"{units.format_length(load.line_total, shown, den)} cut with knots{each} (see the Hanging page); buy "
                  f"{buy_text(buy, shown)}; chosen for {load.safety_factor:g} x the load "
                  f"({load.safety_source}); ratings from memory, check the maker's label", suggestion=True,
                  buy=buy_text(buy, shown))]
    if row is not None:
        drill, note = _drill_for(s, row, shown)
        line_hole = h.hole_diameter if h.hole_diameter > 0.0045 else 0.0  # a heavy set's thicker line must pass
        if line_hole > drill:
            drill, note = line_hole, "through both walls, at the hang-hole mark; sized for the line this set needs"
        items.append(ShoppingItem("hanging", f"drill bit for the hang holes ({row.kind})", 1, drill, None,
                          f"{note} (one hole per tube)", per_kit=False))
    hook = load.hook.what if load.hook is not None else "a fixing designed for the load by a qualified person"
    items += [
        ShoppingItem("hanging", f"hanging plate for {s.name}", 1, h.plate_diameter, None,
             f"across; {plate_material(shown, den)}", suggestion=True),
        ShoppingItem("hanging", "top ring or swivel and the fixing it hangs from", 1, None, None,
             f"whole set {mass_text(load.mass)}: rated {load.hook_rating:.0f} kg or more "
             f"({load.safety_factor:g} x); {hook}; {PLATE_HANGING}"),
        ShoppingItem("hanging", "striker disc", 1, h.striker_diameter, None,
             f"across, {units.format_length(h.striker_thickness, shown, den)} hardwood, on the centre line "
             f"{units.format_length(h.striker_height, shown, den)} below the tube tops", suggestion=True),
        ShoppingItem("hanging", "wind sail", 1, h.sail.side, None,
             f"square, 3 mm acrylic or thin plywood, on the striker line "
             f"{units.format_length(SAIL_DROP, shown, den)} below the longest tube", suggestion=True),
    ]
    return items


def _bar_items(s):
    n = len(s.pieces)
    rail = n * ((s.width or 0.0) + 0.01)
    return [
        ShoppingItem("supports", f"felt or foam strip for {s.name}", 2, rail, 2 * rail,
             "two rails under the support marks: the bars' widths side by side plus 10 mm gaps", suggestion=True),
        ShoppingItem("supports", f"pins or cord for {s.name}", 2 * n, None, None,
             "two per bar at the support marks, with rubber sleeves", suggestion=True),
        ShoppingItem("supports", "mallets", 2, None, None, "hard rubber or yarn for wood bars, "
             "hard plastic for metal bars", suggestion=True),
    ]


def _air_items(s):
    n = len(s.pieces)
    items = []
    if any(p.stopper for p in s.pieces):
        items.append(ShoppingItem("resonators", f"sliding stoppers for {s.name}", n, None, None,
                          "to fit the bore closely; tune with them (see the stopper table)"))
    elif s.model == "closed-open" or s.kind == "resonator":
        items.append(ShoppingItem("resonators", f"end caps or plugs for {s.name}", n, None, None,
                          "one per tube, to fit the stock"))
    if s.kind == "air-column":
        items.append(ShoppingItem("resonators", "paddle or beaters", 1, None, None,
                          "a foam or rubber paddle for open pipes", suggestion=True))
    return items


def shopping_list(plan, rows=None):
    """Every ShoppingItem to buy for the plan: stock first, then hanging, supports and resonator parts."""
    rows = rows if rows is not None else shop_tables().hang_holes
    copies = max(1, getattr(plan, "copies", 1))
    items = _stock_items(plan)
    parts = []
    for s in plan.sets:
        if s.kind == "chime":
            parts += _chime_items(s, rows, plan.units, copies, plan.inch_denominator)
        elif s.kind == "bar":
            parts += _bar_items(s)
        else:
            parts += _air_items(s)
    items += [_for_kits(i, copies) for i in parts]
    items += _cost_items(items, copies)
    # suggested sizes read as round numbers; the hanging parts are the plan's own computed sizes
    # (the plate template is drawn at them), so they are shown as computed
    return tuple(replace(it, each=round_in_unit(it.each, plan.units)) if it.suggestion and it.each is not None
                 and it.group not in ("stock", "hanging") else it for it in items)


def _for_kits(item, copies):
    """The item bought for ``copies`` kits (the hanging line is already totalled for them)."""
    if copies == 1 or not item.per_kit:
        return item
    count = None if item.count is None else item.count * copies
    total = item.total if item.total is None or item.what.startswith("hanging line") else item.total * copies
    return replace(item, count=count, total=total)


def _cost_items(items, copies):
    """Cost lines: the priced stock in all and, for kits, per kit (None when nothing is priced)."""
    priced = [i.cost for i in items if i.group == "stock"]
    if not priced or any(c is None for c in priced):
        return []
    total = float(sum(priced))
    out = [ShoppingItem("cost", "stock, priced from the stock table", None, None, None,
                f"for {copies} kits" if copies > 1 else "for the whole set", cost=total, per_kit=False)]
    if copies > 1:
        out.append(ShoppingItem("cost", "stock per kit", None, None, None, f"one kit of {copies}",
                        cost=total / copies, per_kit=False))
    return out


def with_shop_lists(plan, tables=None):
    """The plan with its shopping list and cautions attached (``tables``: the :class:`ShopTables`;
    the packaged ones when None)."""
    tables = tables if tables is not None else shop_tables()
    return replace(plan, shopping=shopping_list(plan, tables.hang_holes), cautions=cautions_for(plan, tables.cautions))

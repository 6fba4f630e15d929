"""Validate a set's section: { shape = ... } with sizes, or { stock = "<size>" } from the tables."""

from __future__ import annotations

from cutplan import units
from cutplan.physics.sections import Section, bar, rod, tube
from cutplan.spelling import closest_names, stock_size_names

__all__ = ["SECTION_KEYS", "MAX_SIZE", "MIN_SIZE", "section"]

SECTION_KEYS = {"shape", "outer", "wall", "inner", "diameter", "width", "thickness", "stock"}
MAX_SIZE = 0.5
"""Largest cross-section dimension accepted [m]."""
MIN_SIZE = 0.0005
"""Smallest cross-section dimension accepted [m] (0.5 mm: thinner is foil, or a unit slip)."""
_EXAMPLE = 'must be a table such as { shape = "tube", outer = "1 in", wall = "0.065 in" }'
_SHAPE_FOR_KIND = {
    "air-column": (("tube",), "must be tube for an air-column set"),
    "resonator": (("tube",), "must be tube for a resonator set"),
    "bar": (("bar",), 'must be "bar" for a bar set (use kind = "chime" for tubes and rods)'),
    "chime": (("tube", "rod"), 'must be "tube" or "rod" for a chime set (use kind = "bar" for bars)'),
}


def _size(col, key, value):
    size = col.parse(key, value, units.parse_length)
    if size is None:
        return None
    if size > MAX_SIZE:
        col.add(key, value, "is over 500 mm; check the unit")
        return None
    if size < MIN_SIZE:
        col.add(key, value, "is under 0.5 mm; check the unit")
        return None
    return size


def _from_stock(raw, key, library, col):
    name = raw["stock"]
    if library is None:
        return None, ""
    if not isinstance(name, str) or name not in library.stock:
        examples = ", ".join(stock_size_names(name, library.stock) or closest_names(name, library.stock))
        col.add(f"{key}.stock", name, f"is not a stock size; did you mean {examples}? (`cutplan materials` lists them)")
        return None, ""
    item = library.stock[name]
    section = item.section
    if "inner" in raw:
        inner = _size(col, f"{key}.inner", raw["inner"])
        if inner is not None and not inner < section.outer:
            col.add(f"{key}.inner", raw["inner"], "must be smaller than the outside diameter")
        elif inner is not None:
            section = Section("tube", outer=section.outer, inner=section.inner, name=name, bore=inner)
    return section, (item.material, item.outer_tolerance, item.wall_tolerance)


def _tube(raw, key, outer, col):
    if ("wall" in raw) == ("inner" in raw):
        col.add(key, None, "a tube needs exactly one of wall or inner")
        return None
    if "wall" in raw:
        wall = col.parse(f"{key}.wall", raw["wall"], units.parse_length)
        if wall is None:
            return None
        if wall >= outer / 2:
            col.add(f"{key}.wall", raw["wall"], f"must be less than the radius ({outer / 2 * 1000:.2f} mm)")
            return None
        if wall < outer * 1e-3:
            col.add(f"{key}.wall", raw["wall"], "is under 1/1000 of the outside diameter; check the unit")
            return None
        return tube(outer, wall)
    inner = col.parse(f"{key}.inner", raw["inner"], units.parse_length)
    if inner is None:
        return None
    if inner >= outer * 0.998:
        col.add(f"{key}.inner", raw["inner"], "must be smaller than the outside diameter")
        return None
    return tube(outer, (outer - inner) / 2)


def section(raw, key, kind, library, col):
    """(Section or None, stock material info) for one set."""
    if not isinstance(raw, dict):
        col.add(key, raw, _EXAMPLE)
        return None, ""
    col.unknown(raw, SECTION_KEYS, key)
    if "stock" in raw:
        return _from_stock(raw, key, library, col)
    shape = raw.get("shape")
    if shape not in ("tube", "rod", "bar"):
        col.add(f"{key}.shape", shape, 'must be "tube", "rod" or "bar" (or give stock = "<size>")')
        return None, ""
    shapes, allowed = _SHAPE_FOR_KIND[kind]
    if shape not in shapes:
        col.add(f"{key}.shape", shape, allowed)
        return None, ""
    need = {"tube": ("outer",), "rod": ("diameter",), "bar": ("width", "thickness")}[shape]
    values = {}
    for k in need:
        if k not in raw:
            col.add(f"{key}.{k}", None, f"is missing; a {shape} needs {', '.join(need)}")
            return None, ""
        values[k] = _size(col, f"{key}.{k}", raw[k])
    if any(v is None for v in values.values()):
        return None, ""
    if shape == "rod":
        return rod(values["diameter"]), ""
    if shape == "bar":
        if values["thickness"] > values["width"] * 3:
            col.add(f"{key}.thickness", raw["thickness"], "is over three times the width; a bar is struck on its face")
            return None, ""
        return bar(values["width"], values["thickness"]), ""
    made = _tube(raw, key, values["outer"], col)
    return made, ""


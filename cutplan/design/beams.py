"""Validate what only chime and bar sets have: material (with its plausible range), beam model,
target mode and the undercut arch."""

from __future__ import annotations

from cutplan import plausibility, units
from cutplan.design.contract import Undercut, is_number
from cutplan.materials import MaterialError, material_from_table
from cutplan.planning.grain import GRAINS
from cutplan.spelling import closest_names

__all__ = ["UNDERCUT_KEYS", "AIR_ONLY", "material", "undercut", "grain", "beam_fields"]

UNDERCUT_KEYS = {"ratios", "arch_width", "min_thickness"}
MODE_CLEARANCE_RANGE = (1.0, 200.0)
"""The window a set's ``mode_clearance`` may give [cents]: from 1 cent to two semitones (the
default, 30 cents, is :data:`cutplan.planning.other_modes.CLEARANCE_CENTS`)."""
MODE_CLEARANCE_ALLOWED = (f"must be a number of cents from {MODE_CLEARANCE_RANGE[0]:g} to {MODE_CLEARANCE_RANGE[1]:g}, "
                          'such as 30 or "30 cents" (how near a tuned partial another mode is flagged)')
AIR_ONLY = ("ends", "end_correction", "temperature", "humidity", "serves", "max_length", "temperature_range")


def material(raw, key, default_name, library, col):
    """The set's Material (named, from its stock size, or inline), or None after noting why."""
    value = raw.get("material", default_name or None)
    if value is None:
        if default_name is not None:  # None: the stock size that names the material was already refused
            col.add(key, None, "is missing; name one from `cutplan materials` or give { modulus, density }")
        return None
    if isinstance(value, dict):
        try:
            found = material_from_table("inline", value, col.path)
        except MaterialError as exc:
            inner = exc.key.replace("inline.", "").replace("inline", "")
            col.add(f"{key}.{inner}" if inner else key, exc.value, exc.allowed)
            return None
    elif library is None:
        return None
    elif not isinstance(value, str) or value not in library.materials:
        names = ", ".join(closest_names(value, library.materials))
        col.add(key, value, f"is not a known material; did you mean {names}? (`cutplan materials` lists them)")
        return None
    else:
        found = library.materials[value]
    lines = plausibility.material_problems(found)
    for line in lines:
        where = "an inline material" if isinstance(value, dict) else f"material {value!r}"
        col.add(key, None, f"{line}; if {where} really is so, add unusual = true to its table")
    return None if lines else found


def undercut(raw, key, section, col):
    """Undercut from { ratios = [4.0] or [4.0, 10.0], arch_width = 0.5, min_thickness = "4 mm" }."""
    if not isinstance(raw, dict):
        col.add(key, raw, 'must be a table such as { ratios = [4.0], arch_width = 0.5, min_thickness = "4 mm" }')
        return None
    col.unknown(raw, UNDERCUT_KEYS, key)
    ratios = raw.get("ratios", [4.0])
    ok = isinstance(ratios, list) and 1 <= len(ratios) <= 2 and all(is_number(r) for r in ratios)
    if ok:
        ok = 2.0 <= ratios[0] <= 6.0 and (len(ratios) == 1 or ratios[0] * 1.5 <= ratios[1] <= 20.0)
    if not ok:
        col.add(f"{key}.ratios", ratios, "must be [mode-2 ratio] from 2 to 6 (4.0 marimba, 3.0 xylophone), "
                "optionally with a mode-3 ratio such as [4.0, 10.0]")
        return None
    width = raw.get("arch_width", 0.5)
    if not is_number(width) or not 0.2 <= width <= 0.9:
        col.add(f"{key}.arch_width", width, "must be a fraction of the length from 0.2 to 0.9")
        return None
    min_t = col.parse(f"{key}.min_thickness", raw.get("min_thickness", "4 mm"), units.parse_length)
    if min_t is None:
        return None
    if section is not None and min_t >= section.thickness:
        col.add(f"{key}.min_thickness", raw.get("min_thickness"), "must be less than the bar thickness")
        return None
    return Undercut(tuple(float(r) for r in ratios), float(width), min_t)


def grain(raw, key, section, col):
    """How the bar was sawn: "flat", "quarter" or "unknown" (the default); see cutplan.planning.grain."""
    value = raw.get("grain", "unknown")
    if value not in GRAINS:
        col.add(f"{key}.grain", value, 'must be "flat" (rings along the face), "quarter" (rings across the face) '
                'or "unknown" (default)')
        return "unknown"
    if "grain" in raw and section is not None and section.shape != "bar":
        col.add(f"{key}.grain", value, "applies to bars (a rectangular section), not tubes or rods")
    return value


def mode_clearance(raw, key, col):
    """The set's window for flagging other modes near a tuned partial [cents], or None (the default)."""
    if "mode_clearance" not in raw:
        return None
    value = raw["mode_clearance"]
    cents = value if is_number(value) else None
    if isinstance(value, str):
        text = value.strip().removesuffix("cents").removesuffix("cent").strip()
        try:
            cents = float(text)
        except ValueError:
            cents = None
    if cents is None or not MODE_CLEARANCE_RANGE[0] <= cents <= MODE_CLEARANCE_RANGE[1]:
        col.add(f"{key}.mode_clearance", value, MODE_CLEARANCE_ALLOWED)
        return None
    return float(cents)


def beam_fields(raw, key, kind, section, stock_material, library, col):
    """The SetSpec fields of a chime or bar set."""
    fields = {"material": material(raw, f"{key}.material", stock_material, library, col)}
    arched = kind == "bar" and "undercut" in raw
    model = raw.get("model", "elastic-2d" if arched else "timoshenko")
    if model not in ("timoshenko", "slender", "elastic-2d"):
        col.add(f"{key}.model", model, 'must be "timoshenko", "slender" or "elastic-2d" (the default is '
                '"elastic-2d" for undercut bars, "timoshenko" otherwise)')
    elif model == "elastic-2d" and (kind != "bar" or (section is not None and section.shape != "bar")):
        col.add(f"{key}.model", model, "applies to bars of rectangular section only")
    fields["model"] = model if isinstance(model, str) else "timoshenko"
    target = raw.get("target", "fundamental")
    if target not in ("fundamental", "strike-note"):
        col.add(f"{key}.target", target, 'must be "fundamental" (default) or "strike-note"')
    fields["target_mode"] = target if isinstance(target, str) else "fundamental"
    fields["grain"] = grain(raw, key, section, col)
    fields["mode_clearance"] = mode_clearance(raw, key, col)
    for k in AIR_ONLY:
        if k in raw:
            col.add(f"{key}.{k}", None, f"applies to air-column and resonator sets, not {kind}")
    if "undercut" in raw:
        if kind != "bar":
            col.add(f"{key}.undercut", None, "applies to bar sets only")
        else:
            fields["undercut"] = undercut(raw["undercut"], f"{key}.undercut", section, col)
            if fields["undercut"] is not None and target != "fundamental":
                col.add(f"{key}.target", target, "must be fundamental for an undercut bar set")
    return fields

"""Validate one [[set]] table: name, kind, section, then the kind's own keys and its pitches;
and, across sets, that names differ and resonators serve a chime or bar set."""

from __future__ import annotations

import math

from cutplan.design import targets as target_rules
from cutplan.design.air import air_fields
from cutplan.design.beams import beam_fields
from cutplan.design.contract import KINDS, SetSpec
from cutplan.design.hanging import hanging_options
from cutplan.design.section import section as read_section
from cutplan.design.stocktable import stock_table
from cutplan.design.text import unprintable, unsafe_name
from cutplan.limits import FREQUENCY_RANGE, FREQUENCY_SPAN

__all__ = ["SET_KEYS", "MAX_NAME", "name_problem", "one_set", "check_names"]

SET_KEYS = {
    "name", "kind", "notes", "scale", "root", "count", "frequencies", "cents", "ratios", "range",
    "material", "section", "model", "target", "ends", "end_correction", "temperature",
    "humidity", "serves", "max_length", "stock", "undercut", "temperature_range", "hanging", "grain",
    "mode_clearance",
}
MAX_NAME = 40


def name_problem(name):
    """Why a set name cannot be used (it becomes part of labels and file names), or None."""
    if not isinstance(name, str) or not name.strip() or len(name) > MAX_NAME:
        return f"must be text of 1 to {MAX_NAME} characters"
    bad = unprintable(name)
    if bad:
        return f"must not hold control or format characters (found {bad})"
    why = unsafe_name(name.strip())
    return None if why is None else f"{why} (it becomes part of file names)"


def _resonator(raw, key, col):
    serves = raw.get("serves")
    if not isinstance(serves, str) or not serves:
        col.add(f"{key}.serves", serves, "must name the set whose pieces these resonators sit under")
        serves = ""
    for k in target_rules.TARGET_KEYS:
        if k in raw:
            col.add(f"{key}.{k}", None, "is not used: a resonator takes its pitches from the set it serves")
    return serves


def _pitches(raw, key, a4, temperament, col, spelling="auto"):
    if "serves" in raw:
        col.add(f"{key}.serves", None, "applies to resonator sets only")
    found = target_rules.targets(raw, key, a4, temperament, col, spelling)
    low, high = FREQUENCY_RANGE
    bad = [t for t in found if not (math.isfinite(t.frequency) and low <= t.frequency <= high)]
    if bad:
        col.add(key, bad[0].name, f"gives a pitch outside {FREQUENCY_SPAN}")
        return []
    return found


def one_set(raw, index, a4, temperament, library, col, spelling="auto"):
    """SetSpec of the index-th set (from 1), or None after noting every problem."""
    key = f"set[{index}]"
    col.unknown(raw, SET_KEYS, key)
    kind = raw.get("kind")
    if kind not in KINDS:
        col.add(f"{key}.kind", kind, f"must be one of: {', '.join(KINDS)}")
        return None
    name = raw.get("name", f"{kind}s" if index == 1 else f"set{index}")
    problem = name_problem(name)
    if problem:
        col.add(f"{key}.name", name, problem)
        name = f"set{index}"
    name = name.strip()
    if "section" not in raw:
        col.add(f"{key}.section", None, 'is missing; e.g. { shape = "tube", outer = "1 in", wall = "0.065 in" }')
        section, stock_material = None, ""
    else:
        section, stock_material = read_section(raw["section"], f"{key}.section", kind, library, col)
        if section is None and isinstance(raw["section"], dict) and "stock" in raw["section"]:
            stock_material = None  # the stock size was wrong: its material is unknown, not missing
    tolerances = {}
    if isinstance(stock_material, tuple):
        stock_material, tolerances["outer_tolerance"], tolerances["wall_tolerance"] = stock_material
    if kind in ("chime", "bar"):
        fields = beam_fields(raw, key, kind, section, stock_material, library, col)
    else:
        fields = air_fields(raw, key, kind, stock_material, library, col)
    if kind == "resonator":
        fields["serves"] = _resonator(raw, key, col)
        found = []
    else:
        found = _pitches(raw, key, a4, temperament, col, spelling)
    if "hanging" in raw:
        fields["hanging"] = hanging_options(raw["hanging"], f"{key}.hanging", kind, col)
    if "stock" in raw:
        fields["stock"] = stock_table(raw["stock"], f"{key}.stock", col)
    if section is None:
        return None
    return SetSpec(index=index, name=name, kind=kind, targets=tuple(found), section=section,
                   pitch_key=target_rules.pitch_key(raw), **fields, **tolerances)


def check_names(sets, col):
    """Set names differ; a resonator serves an existing chime or bar set."""
    seen = {}
    for s in sets:
        if s.name in seen:
            col.add(f"set[{s.index}].name", s.name, f"is used by set[{seen[s.name]}] too; names must differ")
        seen[s.name] = s.index
    by_name = {s.name: s for s in sets}
    for s in sets:
        if s.kind == "resonator" and s.serves:
            served = by_name.get(s.serves)
            if served is None:
                col.add(f"set[{s.index}].serves", s.serves, f"is not the name of a set ({', '.join(by_name)})")
            elif served.kind not in ("bar", "chime"):
                col.add(f"set[{s.index}].serves", s.serves, "must name a bar or chime set")

"""A Plan and its errors and warnings, shaped for the page's templates. Formatting only.

Lengths use :func:`cutplan.units.format_length` in the chosen units first, to 1/32 in.
Errors land beside the field whose name is the longest prefix of their key; warnings beside
the field they concern (the allowance, the stock, the section or the notes of their set).
"""

from __future__ import annotations

import re

from cutplan.render.svg import svg_files
from cutplan.units import format_length
from cutplan.web.chart import length_pitch_svg
from cutplan.web.form import field_label

__all__ = [
    "piece_rows", "node_heading", "stock_rows", "slot_for", "place_errors", "place_warnings", "preview"
]


def _len(metres, units):
    return format_length(metres, units)


def piece_rows(set_plan, units):
    """One dict of display text per piece of a set."""
    rows = []
    for p in set_plan.pieces:
        rows.append({
            "label": p.label, "note": p.note, "target": f"{p.target_hz:.2f}", "predicted": f"{p.predicted_hz:.2f}",
            "length": _len(p.length, units), "cut": _len(p.cut_length, units),
            "allowance": _len(p.allowance, units),
            "risk": f"{100 * p.sharp_risk:.0f} %",
            "node": _len(p.nodes[0], units) if p.nodes else "",
            "cents_per_mm": f"{p.cents_per_mm:.2f}",
            "partials": " ".join(f"{f:.0f}" for f in p.partials_hz[1:]),
            "mass": "" if p.mass is None else f"{p.mass * 1000:.0f} g",
            "stopper": [f"{t - 273.15:.0f} C: {_len(d, units)}" for t, d in p.stopper],
            "warnings": list(p.warnings),
        })
    return rows


def node_heading(kind):
    """What the node column means for a kind of set ('' for air columns)."""
    return {"chime": "hang hole from top", "bar": "supports from end"}.get(kind, "")


def stock_rows(cut_list, units):
    """The cut list as display text: sticks with their cuts, marks from the factory end."""
    if cut_list is None:
        return None
    sticks = []
    for i, stick in enumerate(cut_list.sticks, start=1):
        sticks.append({"number": i, "group": stick.group, "length": _len(stick.stock_length, units),
                       "cuts": [{"label": c.label, "start": _len(c.start, units), "end": _len(c.start + c.length, units),
                                 "length": _len(c.length, units)} for c in stick.cuts],
                       "offcut": _len(stick.offcut, units)})
    return {"sticks": sticks, "proven_optimal": cut_list.proven_optimal, "lower_bound": cut_list.lower_bound,
            "utilisation": f"{100 * cut_list.utilisation:.1f} %",
            "by_length": ", ".join(f"{n} x {_len(length, units)}" for length, n in cut_list.sticks_by_length),
            "cost": None if cut_list.cost is None else f"{cut_list.cost:.2f}"}


def slot_for(key, slots):
    """The form slot an error key belongs beside: the longest slot that is a prefix of the key."""
    best = ""
    for s in slots:
        if (key == s or key.startswith(s + ".") or key.startswith(s + "[")) and len(s) > len(best):
            best = s
    if best:
        return best
    m = re.match(r"set\[(\d+)\]", key)
    if m and f"set[{m.group(1)}]" in slots:
        return f"set[{m.group(1)}]"
    return "form"


def _set_error_slot(key, message, slots, own_stock):
    """Errors keyed by a whole set that concern one group of its fields: the pitches or the stock."""
    if "needs exactly one of: notes" in message and f"{key}.pitch" in slots:
        return f"{key}.pitch"
    if "longest stock" in message:
        return f"{key}.stock.lengths" if key in own_stock else "stock.lengths"
    return None


def place_errors(errors, slots, own_stock=()):
    """{slot: [message, ...]} for error records ``{"key", "message"}``; ``own_stock`` names the
    sets ("set[2]") that have their own stock fields."""
    out = {}
    for e in errors:
        slot = slot_for(e["key"], slots)
        if re.fullmatch(r"set\[\d+\]", e["key"]):
            slot = _set_error_slot(e["key"], e["message"], slots, own_stock) or slot
        out.setdefault(slot, []).append(_spoken(e["key"], e["message"], slot))
    return out


def _spoken(key, message, slot):
    """The message with its leading design key replaced by the field's label on the page
    ("Saw kerf: ..." rather than "stock.kerf: ..."); the set is named unless the message sits
    in that set's own fields."""
    if not message.startswith(key + ":"):
        return message
    label = field_label(key, beside=slot.startswith(key.split(".")[0] + ".") and slot.startswith("set["))
    return message if label is None else label + message[len(key):]


def _warning_slot(text, index, own_stock):
    stock = f"set[{index}].stock" if own_stock else "stock"
    if "allowance" in text:
        return f"{stock}.allowance"
    if "longer than common stock" in text:
        return f"{stock}.lengths"
    if text.startswith(("stubby", "short column", "wide bore")):
        return f"set[{index}].section"
    return f"set[{index}].notes"


def place_warnings(plan, design):
    """{slot: [warning, ...]}: piece warnings beside the field they concern; pieces with the same
    warning share one line ("porch-1, porch-2: ...")."""
    index = {s.name: (s.index, s.stock is not None) for s in design.sets}
    grouped = {}
    for s in plan.sets:
        i, own = index.get(s.name, (1, False))
        for p in s.pieces:
            for w in p.warnings:
                grouped.setdefault(_warning_slot(w, i, own), {}).setdefault(w, []).append(p.label)
    out = {slot: [f"{', '.join(labels)}: {w}" for w, labels in texts.items()] for slot, texts in grouped.items()}
    for w in plan.warnings:
        out.setdefault("form", []).append(w)
    return out


def preview(plan, design, units=None):
    """Everything the preview shows, as display text and inline SVG."""
    units = units or plan.units
    templates = []
    for name, text in svg_files(plan).items():
        text = re.sub(r"^<\?xml[^>]*\?>\s*", "", text)
        templates.append({"name": name.removeprefix("templates/"), "svg": text})
    return {
        "title": plan.title, "units": units, "a4": f"{plan.a4:g}", "temperament": plan.temperament,
        "sets": [{"name": s.name, "kind": s.kind, "material": s.material, "section": s.section_label(units),
                  "assumptions": list(s.assumptions), "node_heading": node_heading(s.kind),
                  "allowance_rule": getattr(s, "allowance_rule", ""),
                  "trim_end": s.pieces[0].trim_end if s.pieces else "",
                  "if_sharp": s.pieces[0].if_sharp if s.pieces else "",
                  "pieces": piece_rows(s, units)} for s in plan.sets],
        "stock": stock_rows(plan.cut_list, units),
        "chart": length_pitch_svg(plan, units),
        "templates": templates,
        "labels": [p.label for p in plan.pieces],
        "set_names": [s.name for s in plan.sets],
    }

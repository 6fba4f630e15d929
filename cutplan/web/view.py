"""A Plan and its errors and warnings, shaped for the page's templates. Formatting only.

Lengths are :class:`cutplan.units.LengthParts` in the chosen units first, inches to the plan's
fraction (``inch_denominator``); the templates show them whole or part by part.
Errors and warnings are records (code, design key, message) and land beside the field whose
name is the longest prefix of their key (a warning with no key: beside its set's notes); an error
keyed by a whole set goes by its code to the group of fields it concerns (the pitches or the
stock). The words of a message never decide where it goes.
"""

from __future__ import annotations

import re

from cutplan.design import notices
from cutplan.render.stock_layout import cut_list_view
from cutplan.render.svg import svg_files
from cutplan.units import INCH_DENOMINATOR, ZERO_CELSIUS, length_parts
from cutplan.web.chart import length_pitch_svg
from cutplan.web.form import field_label

__all__ = [
    "piece_rows", "node_heading", "stock_rows", "slot_for", "place_errors", "place_warnings", "preview"
]



def piece_rows(set_plan, units, den=INCH_DENOMINATOR):
    """One dict of display text (lengths as LengthParts) per piece of a set."""

    def _len(metres, units):
        return length_parts(metres, units, den)

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
            "stopper": [f"{t - ZERO_CELSIUS:.0f} C: {_len(d, units)}" for t, d in p.stopper],
            "warnings": [w.message for w in p.warnings],
        })
    return rows


def node_heading(kind):
    """What the node column means for a kind of set ('' for air columns)."""
    return {"chime": "hang hole from top", "bar": "supports from end"}.get(kind, "")


def stock_rows(cut_list, units, den=INCH_DENOMINATOR):
    """The cut list for the page (:func:`cutplan.render.stock_layout.cut_list_view`), or None."""
    return None if cut_list is None else cut_list_view(cut_list, units, den)


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


def _set_error_slot(key, code, slots, own_stock):
    """Errors keyed by a whole set that concern one group of its fields, by their code: the
    pitches or the stock."""
    if code in (notices.PITCH_CHOICE, notices.UNREACHABLE) and f"{key}.pitch" in slots:
        return f"{key}.pitch"
    if code == notices.LONGER_THAN_STOCK:
        return f"{key}.stock.lengths" if key in own_stock else "stock.lengths"
    return None


def place_errors(errors, slots, own_stock=()):
    """{slot: [message, ...]} for error records ``{"code", "key", "message"}``; ``own_stock``
    names the sets ("set[2]") that have their own stock fields."""
    out = {}
    for e in errors:
        slot = slot_for(e["key"], slots)
        if re.fullmatch(r"set\[\d+\]", e["key"]):
            slot = _set_error_slot(e["key"], e.get("code"), slots, own_stock) or slot
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


def _warning_slot(notice, index, slots):
    """The slot of a warning: the field of its key (the longest slot that is a prefix of it), or
    its set's notes when it has no key or the page shows no field for it."""
    if notice.key:
        slot = slot_for(notice.key, slots) if slots is not None else notice.key
        if slot != "form":
            return slot
    return f"set[{index}].notes"


def place_warnings(plan, design, slots=None):
    """{slot: [warning, ...]}: piece warnings beside the field of their key (``slots``: the
    page's message places; None takes each key as it is); pieces with the same warning share one
    line ("porch-1, porch-2: ...")."""
    index = {s.name: s.index for s in design.sets}
    grouped = {}
    for s in plan.sets:
        i = index.get(s.name, 1)
        for p in s.pieces:
            for w in p.warnings:
                grouped.setdefault(_warning_slot(w, i, slots), {}).setdefault(w, []).append(p.label)
    out = {slot: [f"{', '.join(labels)}: {w.message}" for w, labels in texts.items()]
           for slot, texts in grouped.items()}
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
                  "pieces": piece_rows(s, units, plan.inch_denominator)} for s in plan.sets],
        "stock": stock_rows(plan.cut_list, units, plan.inch_denominator),
        "chart": length_pitch_svg(plan, units),
        "templates": templates,
        "labels": [p.label for p in plan.pieces],
        "cautions": [c.text for c in plan.cautions],
        "set_names": [s.name for s in plan.sets],
    }

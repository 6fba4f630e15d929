"""The page's form fields <-> a design mapping with the design file's keys.

Field names are the design keys themselves (``title``, ``tuning.a4``, ``set[1].notes``,
``set[1].section.wall``, ``stock.kerf``), so an error on a key lands beside the field of that
name. This module only reshapes text (splits note lists and stock lines, reads whole numbers);
every value is validated afterwards by :func:`cutplan.design_from_mapping`. Keys the form does
not show (an inline material, a stock table with other shapes...) ride along in a hidden
``more`` field as JSON, so a design opened into the form saves back unchanged.

The set keys beyond name, kind, material, section and pitches are listed once, in
:data:`SET_EXTRAS`: each :class:`SetField` says where its value goes in the design, which kinds
of set it applies to, how its text reads and shows, and its label. The page draws its fields
from that list, so a new design key (a beam model, a grain choice) is one line there.
"""

from __future__ import annotations

import json
import re
from collections.abc import Callable
from dataclasses import dataclass

from cutplan.web.service import WebErrors, error

__all__ = [
    "MAX_SETS", "TOP_FIELDS", "TUNING_FIELDS", "STOCK_FIELDS", "SECTION_FIELDS", "PITCH_FIELDS",
    "SET_FIELDS", "FOR_KINDS", "SetField", "MODEL_OPTIONS", "BEAMS", "AIR", "SET_EXTRAS", "EXTRA_KEYS",
    "TABLES", "set_count", "mapping_from_form", "form_from_mapping", "FIELD_LABELS", "SET_LABELS",
    "field_label"
]

MAX_SETS = 12
"""Sets the form offers [-] (a design with more is planned through the API or a file)."""
TOP_FIELDS = ("title", "units", "inch_denominator", "paper")
TUNING_FIELDS = ("a4", "temperament", "spelling")
STOCK_FIELDS = ("lengths", "kerf", "end_trim", "allowance")
SECTION_FIELDS = ("stock", "shape", "outer", "wall", "diameter", "width", "thickness")
PITCH_FIELDS = ("notes", "scale", "root", "count", "range")
SET_FIELDS = ("name", "kind", "material", *PITCH_FIELDS)
FOR_KINDS = {k: ("chime", "bar", "air-column") for k in PITCH_FIELDS}
"""Fields that apply to some kinds of set only; the others are left out of the design."""
_STOCK_LINE = re.compile(r"\s*(.+?)\s*(?:[x*]\s*(\d+))?\s*(?:@\s*(\d+(?:\.\d+)?))?\s*")


def _text(value):
    """A scalar as the text a field shows, or None when it is not a plain string or number."""
    if isinstance(value, bool) or not isinstance(value, (str, int, float)):
        return None
    return str(value)


def _number_or_text(text):
    """Whole numbers and decimals become numbers (as TOML would hold them); other text stays."""
    text = text.strip()
    if re.fullmatch(r"[+-]?\d+", text):
        return int(text)
    if re.fullmatch(r"[+-]?\d*\.\d+(?:[eE][+-]?\d+)?|[+-]?\d+\.\d*(?:[eE][+-]?\d+)?", text):
        return float(text)
    return text


def _numbers(text):
    """'4, 10' or '4 10' -> [4.0, 10.0]; a part that is not a number stays text (the design says why)."""
    out = []
    for part in re.split(r"[\s,;:]+", text.strip()):
        if part:
            value = _number_or_text(part)
            out.append(float(value) if isinstance(value, (int, float)) else value)
    return out


def _numbers_text(value):
    if not isinstance(value, list) or not value or not all(
            isinstance(v, (int, float)) and not isinstance(v, bool) for v in value):
        return None
    return ", ".join(f"{v:g}" for v in value)


def _two_texts(text):
    """'12 C to 28 C' (or '12 C, 28 C', '12 C .. 28 C') -> ['12 C', '28 C']."""
    return [t for t in re.split(r"\s*(?:,|;|\.\.|\bto\b)\s*", text.strip()) if t]


def _two_texts_text(value):
    if not isinstance(value, list) or len(value) != 2 or not all(isinstance(v, str) for v in value):
        return None
    return f"{value[0]} to {value[1]}"


@dataclass(frozen=True)
class SetField:
    """One field of a set: its design key (dotted inside the set, e.g. ``undercut.ratios``), label,
    the kinds of set it applies to, and how field text becomes the design value (``read``) and back
    (``show``, None when the value cannot be shown and must ride in ``more``). With ``options``
    ((value, text) pairs) it is a select, with ``blank`` as the text of the empty choice."""

    key: str
    label: str
    kinds: tuple[str, ...]
    group: str = ""
    hint: str = ""
    placeholder: str = ""
    read: Callable = str
    show: Callable = _text
    options: tuple[tuple[str, str], ...] = ()
    blank: str = ""


MODEL_OPTIONS = (("timoshenko", "shear-corrected (timoshenko)"), ("slender", "slender"),
                 ("elastic-2d", "2-D elastic body (bars)"))
"""The beam models a chime or bar set may name (the design's ``model`` key)."""
BEAMS, AIR = ("chime", "bar"), ("air-column", "resonator")
SET_EXTRAS = (
    SetField("model", "Beam model", BEAMS, options=MODEL_OPTIONS,
             blank="(default: shear-corrected; 2-D for undercut bars)"),
    SetField("grain", "Sawing", ("bar",), options=(("flat", "flat-sawn"), ("quarter", "quarter-sawn"),
                                                   ("unknown", "unknown")),
             blank="(default: unknown; wood bars)"),
    SetField("mode_clearance", "Side-mode window [cents]", BEAMS, hint="another mode this near a tuned partial "
             "is flagged", placeholder="30", read=_number_or_text),
    SetField("target", "Tune", BEAMS, options=(("fundamental", "the lowest mode"), ("strike-note", "the strike note")),
             blank="(default: the lowest mode)"),
    SetField("ends", "Ends", ("air-column",), options=(("open-open", "open at both ends"),
                                                      ("closed-open", "closed at one end")),
             blank="(default: open at both ends)"),
    SetField("temperature", "Air temperature", AIR, placeholder="20 C"),
    SetField("serves", "Sits under the set", ("resonator",), hint="the name of a bar or chime set"),
    SetField("undercut.ratios", "Undercut ratios", ("bar",), "undercut",
             'mode 2 to mode 1, and mode 3: "4" (marimba), "3" (xylophone), "4, 10"', read=_numbers,
             show=_numbers_text),
    SetField("undercut.arch_width", "Arch width", ("bar",), "undercut", "fraction of the length, 0.2 to 0.9",
             placeholder="0.5", read=_number_or_text),
    SetField("undercut.min_thickness", "Thinnest at the centre", ("bar",), "undercut", placeholder="4 mm"),
    SetField("humidity", "Humidity [%]", AIR, "air", placeholder="50", read=_number_or_text),
    SetField("end_correction", "End correction", AIR, "air", 'per open end: "unflanged", "flanged", "none" '
             "or a factor of the bore radius", placeholder="unflanged", read=_number_or_text),
    SetField("max_length", "Longest tube", AIR, "air", "a resonator that would be longer than this is refused",
             placeholder="1.2 m"),
    SetField("temperature_range", "Temperature range", ("resonator",), "air",
             'for the stopper travel, e.g. "12 C to 28 C"', read=_two_texts, show=_two_texts_text),
)
"""The set's fields beyond name, kind, material, section and pitches, in page order."""
EXTRA_KEYS = {f.key for f in SET_EXTRAS}
TABLES = {f.key.split(".")[0] for f in SET_EXTRAS if "." in f.key}
"""Set keys that are tables the page edits key by key (``undercut``)."""


def _stock_lines(text):
    """'8 ft x 2; 10 ft @ 14.5' -> [{length, count}, {length, price}] (the design checks each)."""
    out = []
    for part in re.split(r"[;\n]+", text):
        if not part.strip():
            continue
        m = _STOCK_LINE.fullmatch(part)
        item = {"length": m.group(1)}
        if m.group(2):
            item["count"] = int(m.group(2))
        if m.group(3):
            item["price"] = _number_or_text(m.group(3))
        out.append(item)
    return out


def _stock_text(lengths):
    """The reverse of :func:`_stock_lines`, or None when the list has other shapes."""
    if not isinstance(lengths, list):
        return None
    parts = []
    for item in lengths:
        if isinstance(item, str):
            item = {"length": item}
        if not isinstance(item, dict) or set(item) - {"length", "count", "price"} or not isinstance(item.get("length"), str):
            return None
        count, price = item.get("count"), item.get("price")
        if (count is not None and (isinstance(count, bool) or not isinstance(count, int))) or \
                (price is not None and (isinstance(price, bool) or not isinstance(price, (int, float)))):
            return None
        parts.append(item["length"] + (f" x {count}" if count is not None else "") + (f" @ {price}" if price is not None else ""))
    return "; ".join(parts)


def _get(form, name):
    return str(form.get(name, "") or "").strip()


def _more(form, name):
    raw = _get(form, name)
    if not raw:
        return {}
    try:
        value = json.loads(raw)
    except ValueError:
        raise WebErrors([error(name, "is not readable (it carries keys the form does not show)")]) from None
    if not isinstance(value, dict):
        raise WebErrors([error(name, "is not readable (it carries keys the form does not show)")])
    return value


def _stock_from_form(form, prefix):
    table = {}
    lengths = _get(form, f"{prefix}.lengths")
    if lengths:
        table["lengths"] = _stock_lines(lengths)
    for k in STOCK_FIELDS[1:]:
        if _get(form, f"{prefix}.{k}"):
            table[k] = _get(form, f"{prefix}.{k}")
    return table


def set_count(form):
    """How many sets the form holds (at least one, at most :data:`MAX_SETS`)."""
    try:
        n = int(_get(form, "sets") or 1)
    except ValueError:
        n = 1
    return max(1, min(MAX_SETS, n))


def _set_from_form(form, i):
    p = f"set[{i}]"
    kind = _get(form, f"{p}.kind")
    raw = {}
    for k in SET_FIELDS:
        value = _get(form, f"{p}.{k}")
        if not value or (k in FOR_KINDS and kind and kind not in FOR_KINDS[k]):
            continue
        if k == "notes":
            raw[k] = [n for n in re.split(r"[\s,]+", value) if n]
        elif k == "count":
            raw[k] = _number_or_text(value)
        else:
            raw[k] = value
    for f in SET_EXTRAS:
        value = _get(form, f"{p}.{f.key}")
        if not value or (kind and kind not in f.kinds):
            continue
        table, _, sub = f.key.rpartition(".")
        (raw.setdefault(table, {}) if table else raw)[sub] = f.read(value)
    section = {}
    if _get(form, f"{p}.section.stock"):
        section["stock"] = _get(form, f"{p}.section.stock")
    else:
        shape = _get(form, f"{p}.section.shape")
        wanted = {"tube": ("outer", "wall"), "rod": ("diameter",), "bar": ("width", "thickness")}.get(shape, SECTION_FIELDS[2:])
        if shape:
            section["shape"] = shape
        for k in wanted:
            if _get(form, f"{p}.section.{k}"):
                section[k] = _get(form, f"{p}.section.{k}")
    if section:
        raw["section"] = section
    stock = _stock_from_form(form, f"{p}.stock")
    if stock:
        raw["stock"] = stock
    for k, v in _more(form, f"{p}.more").items():
        raw.setdefault(k, v)
    return raw


def mapping_from_form(form):
    """Form fields (name -> text) -> a design mapping with the design file's keys."""
    data = {k: _get(form, k) for k in TOP_FIELDS if _get(form, k)}
    if "inch_denominator" in data:
        data["inch_denominator"] = _number_or_text(data["inch_denominator"])
    tuning = {}
    if _get(form, "tuning.a4"):
        tuning["a4"] = _number_or_text(_get(form, "tuning.a4"))
    for k in TUNING_FIELDS[1:]:
        if _get(form, f"tuning.{k}"):
            tuning[k] = _get(form, f"tuning.{k}")
    if tuning:
        data["tuning"] = tuning
    data["set"] = [_set_from_form(form, i) for i in range(1, set_count(form) + 1)]
    stock = _stock_from_form(form, "stock")
    if stock:
        data["stock"] = stock
    for k, v in _more(form, "more").items():
        data.setdefault(k, v)
    return data


def _stock_to_form(stock, prefix, fields, more):
    rest = {}
    for k, v in stock.items():
        text = _stock_text(v) if k == "lengths" else _text(v) if k in STOCK_FIELDS else None
        if text is None:
            rest[k] = v
        else:
            fields[f"{prefix}.{k}"] = text
    if rest:  # keep the whole table as it was when part of it cannot be shown
        for k in list(fields):
            if k.startswith(prefix + "."):
                del fields[k]
        more["stock"] = stock


def _extras_to_form(k, v, p, fields, kind=None):
    """Put set key ``k`` into its :data:`SET_EXTRAS` fields; False when it cannot be shown there
    (then it rides in ``more``, so the design still says where it does not apply)."""
    found = {f.key: f for f in SET_EXTRAS if not isinstance(kind, str) or kind in f.kinds}
    if k in TABLES:
        if not isinstance(v, dict) or not v or any(f"{k}.{s}" not in found for s in v):
            return False
        texts = {f"{k}.{s}": found[f"{k}.{s}"].show(x) for s, x in v.items()}
    elif k in found:
        texts = {k: found[k].show(v)}
    else:
        return False
    if any(t is None for t in texts.values()):
        return False
    fields.update({f"{p}.{key}": t for key, t in texts.items()})
    return True


def _set_to_form(raw, i, fields):
    p = f"set[{i}]"
    more = {}
    for k, v in raw.items():
        if k == "notes" and isinstance(v, list) and all(isinstance(n, str) for n in v):
            fields[f"{p}.notes"] = " ".join(v)
        elif k in SET_FIELDS and _text(v) is not None:
            fields[f"{p}.{k}"] = _text(v)
        elif k == "section" and isinstance(v, dict) and all(
                s in SECTION_FIELDS and isinstance(x, str) for s, x in v.items()):
            for s, x in v.items():
                fields[f"{p}.section.{s}"] = x
        elif k == "stock" and isinstance(v, dict):
            _stock_to_form(v, f"{p}.stock", fields, more)
        elif not _extras_to_form(k, v, p, fields, raw.get("kind")):
            more[k] = v
    if more:
        fields[f"{p}.more"] = json.dumps(more, ensure_ascii=False)


def form_from_mapping(data):
    """A design mapping (e.g. a TOML file opened into the page) -> form fields (name -> text)."""
    fields, more = {}, {}
    for k, v in data.items():
        if k in TOP_FIELDS and _text(v) is not None:
            fields[k] = _text(v)
        elif k == "tuning" and isinstance(v, dict) and all(t in TUNING_FIELDS and _text(x) is not None for t, x in v.items()):
            for t, x in v.items():
                fields[f"tuning.{t}"] = _text(x)
        elif k == "stock" and isinstance(v, dict):
            _stock_to_form(v, "stock", fields, more)
        elif k == "set" and isinstance(v, list) and 0 < len(v) <= MAX_SETS and all(isinstance(s, dict) for s in v):
            for i, raw in enumerate(v, start=1):
                _set_to_form(raw, i, fields)
            fields["sets"] = str(len(v))
        else:
            more[k] = v
    if more:
        fields["more"] = json.dumps(more, ensure_ascii=False)
    fields.setdefault("sets", "1")
    return fields


FIELD_LABELS = {
    "title": "Title", "units": "Units shown first", "inch_denominator": "Inches to the nearest", "paper": "Paper", "tuning.a4": "A4",
    "tuning.temperament": "Temperament", "tuning.spelling": "Note names", "stock": "Stock on hand",
    "stock.lengths": "Lengths on hand",
    "stock.kerf": "Saw kerf", "stock.end_trim": "End trim", "stock.allowance": "Trim allowance",
}
"""The page's label for each field outside the sets (the page shows these words)."""
SET_LABELS = {
    "name": "Name", "kind": "Kind", "material": "Material", "notes": "Notes", "scale": "Scale", "root": "Root",
    "count": "Count", "range": "Range", "section": "Stock size or shape", "section.stock": "Stock size",
    "section.shape": "Shape", "section.outer": "Outside diameter", "section.wall": "Wall",
    "section.diameter": "Diameter", "section.width": "Width", "section.thickness": "Thickness",
    "stock": "This set's own stock", "stock.lengths": "This set's own stock, lengths on hand",
    "stock.kerf": "This set's saw kerf", "stock.end_trim": "This set's end trim",
    "stock.allowance": "This set's trim allowance", "undercut": "Undercut arch",
    **{f.key: f.label for f in SET_EXTRAS},
}
"""The page's label for each field of a set, by its key inside the set."""


def field_label(key, beside=False):
    """The words the page uses for a design key: 'Saw kerf', 'Set 2, Notes'; ``beside`` (the
    message sits under the field of that set) leaves the set out. None for a key the page does
    not show (the key itself is then the clearest name)."""
    m = re.fullmatch(r"set\[(\d+)\](?:\.(.+))?", key)
    if m is None:
        return _label_in(FIELD_LABELS, key)
    if m.group(2) is None:
        return f"Set {m.group(1)}"
    label = _label_in(SET_LABELS, m.group(2))
    if label is None:
        return None
    return label if beside else f"Set {m.group(1)}, {label}"


def _label_in(labels, key):
    """The label of ``key``, or of its longest labelled prefix with the rest spelled out."""
    if key in labels:
        return labels[key]
    head = max((k for k in labels if key.startswith((k + ".", k + "["))), key=len, default=None)
    if head is None:
        return None
    rest = key[len(head):].lstrip(".")
    rest = re.sub(r"\[(\d+)\]", lambda g: f" item {g.group(1)}", rest).replace(".", " ").replace("_", " ").strip()
    return f"{labels[head]} ({rest})"

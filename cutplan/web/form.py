"""The page's form fields <-> a design mapping with the design file's keys.

Field names are the design keys themselves (``title``, ``tuning.a4``, ``set[1].notes``,
``set[1].section.wall``, ``stock.kerf``), so an error on a key lands beside the field of that
name. This module only reshapes text (splits note lists and stock lines, reads whole numbers);
every value is validated afterwards by :func:`cutplan.design_from_mapping`. Keys the form does
not show (an undercut, a temperature range, an inline material...) ride along in a hidden
``more`` field as JSON, so a design opened into the form saves back unchanged.
"""

from __future__ import annotations

import json
import re

from cutplan.web.service import WebErrors, error

MAX_SETS = 12
"""Sets the form offers [-] (a design with more is planned through the API or a file)."""
TOP_FIELDS = ("title", "units", "paper")
TUNING_FIELDS = ("a4", "temperament")
STOCK_FIELDS = ("lengths", "kerf", "end_trim", "allowance")
SECTION_FIELDS = ("stock", "shape", "outer", "wall", "diameter", "width", "thickness")
PITCH_FIELDS = ("notes", "scale", "root", "count", "range")
SET_FIELDS = ("name", "kind", "material", *PITCH_FIELDS, "model", "target", "ends", "temperature", "serves")
FOR_KINDS = {
    "model": ("chime", "bar"), "target": ("chime", "bar"), "ends": ("air-column",),
    "temperature": ("air-column", "resonator"), "serves": ("resonator",),
    **{k: ("chime", "bar", "air-column") for k in PITCH_FIELDS},
}
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
    tuning = {}
    if _get(form, "tuning.a4"):
        tuning["a4"] = _number_or_text(_get(form, "tuning.a4"))
    if _get(form, "tuning.temperament"):
        tuning["temperament"] = _get(form, "tuning.temperament")
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
        else:
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

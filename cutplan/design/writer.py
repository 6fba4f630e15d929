"""A design mapping (the design file's keys) written back as design-file TOML.

The one writer of design files: the page's "save the design" and ``cutplan from-stock -o`` both
use it. Keys come out in the design contract's order (unknown keys after, as given), so the same
design gives the same bytes however its keys arrived; top-level values first, then tables, then
the ``[[set]]`` tables, with lists and tables inside a set written inline. ``tomllib`` reads the
text back equal to the mapping.
"""

from __future__ import annotations

import json
import math
import re

__all__ = ["design_toml"]

_ORDER = {
    "": ("title", "units", "inch_denominator", "paper", "material_dirs", "tuning", "set", "stock"),
    "tuning": ("a4", "temperament"),
    "set": ("name", "kind", "notes", "scale", "root", "count", "range", "frequencies", "cents", "ratios", "material",
            "section", "model", "grain", "target", "ends", "end_correction", "temperature", "humidity", "serves",
            "max_length", "temperature_range", "undercut", "stock"),
    "section": ("stock", "shape", "outer", "wall", "inner", "diameter", "width", "thickness"),
    "stock": ("lengths", "kerf", "end_trim", "allowance"),
    "lengths": ("length", "count", "price"),
}

_BARE_KEY = re.compile(r"[A-Za-z0-9_-]+")


def design_toml(mapping, header=()):
    """TOML text of a design mapping, each line of ``header`` first as a comment.

    >>> print(design_toml({"set": [{"notes": ["C5"], "kind": "bar"}], "title": 'The "porch"'}, ["saved"]), end="")
    # saved
    title = "The \\"porch\\""
    <BLANKLINE>
    [[set]]
    kind = "bar"
    notes = ["C5"]
    """
    data = _ordered(mapping)
    lines = [f"# {h}" for h in header]
    for k, v in data.items():
        if not isinstance(v, dict) and not _is_table_list(k, v):
            lines.append(f"{_key(k)} = {_value(v)}")
    for k, v in data.items():
        if isinstance(v, dict):
            lines += ["", f"[{_key(k)}]"] + [f"{_key(kk)} = {_value(vv)}" for kk, vv in v.items()]
    for k, v in data.items():
        if _is_table_list(k, v):
            for table in v:
                lines += ["", f"[[{_key(k)}]]"] + [f"{_key(kk)} = {_value(vv)}" for kk, vv in table.items()]
    return "\n".join(lines) + "\n"


def _is_table_list(key, value):
    return key == "set" and isinstance(value, list) and all(isinstance(t, dict) for t in value)


def _ordered(value, where=""):
    """The mapping with keys in the design contract's order (unknown keys after, as given)."""
    if isinstance(value, (list, tuple)):
        return [_ordered(v, where) for v in value]
    if not isinstance(value, dict):
        return value
    order = _ORDER.get(where, ())
    keys = [k for k in order if k in value] + [k for k in value if k not in order]
    return {k: _ordered(value[k], k if k in _ORDER else "") for k in keys}


def _key(key):
    key = str(key)
    return key if _BARE_KEY.fullmatch(key) else json.dumps(key, ensure_ascii=False)


def _value(value):
    """One TOML value, inline (JSON's string escapes are TOML's basic-string escapes)."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return repr(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        return repr(value) if math.isfinite(value) else ("inf" if value > 0 else "-inf")
    if isinstance(value, str):
        return json.dumps(value, ensure_ascii=False)
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{ " + ", ".join(f"{_key(k)} = {_value(v)}" for k, v in value.items()) + " }"
    raise TypeError(f"cannot write {value!r} to TOML")

"""Validate a set's pitches: notes / scale+root+count / range / frequencies / cents+root / ratios+root."""

from __future__ import annotations

import math

from cutplan import pitch, units
from cutplan.design.contract import MAX_PIECES_PER_SET, is_number
from cutplan.design.notices import PITCH_CHOICE
from cutplan.limits import CENTS_RANGE, FREQUENCY_RANGE, FREQUENCY_SPAN, RATIO_RANGE

__all__ = ["TARGET_KEYS", "FREQUENCY_RANGE", "pitch_key", "targets"]

TARGET_KEYS = ("notes", "scale", "range", "frequencies", "cents", "ratios")


def _named(f, a4):
    name, off = pitch.nearest_note(f, a4)
    return pitch.Target(f"{name}{off:+.0f}c" if abs(off) >= 0.5 else name, f)


def _root(raw, key, how, col):
    root = raw.get("root")
    if root is None:
        col.add(f"{key}.root", None, f"is missing; {how} are measured from a root note" if how != "scale"
                else 'is missing; a scale needs a root such as "D5"')
        return None
    if not isinstance(root, str):
        col.add(f"{key}.root", root, 'must be a note name in quotes such as "D5"')
        return None
    return root


def _list(value, key, how, col):
    if not isinstance(value, list) or not value:
        col.add(f"{key}.{how}", value, "must be a non-empty list")
        return None
    if len(value) > MAX_PIECES_PER_SET:
        col.add(f"{key}.{how}", f"{len(value)} values", f"is too many; at most {MAX_PIECES_PER_SET} per set")
        return None
    return value


def _frequencies(value, key, a4, col):
    out = []
    for j, v in enumerate(value, start=1):
        f = col.ranged(f"{key}.frequencies[{j}]", v, units.parse_frequency, *FREQUENCY_RANGE,
                       f"must be a frequency from {FREQUENCY_SPAN}")
        if f is not None:
            out.append(_named(f, a4))
    return out


def _relative(value, key, how, base, a4, col):
    out = []
    for j, v in enumerate(value, start=1):
        if how == "cents":
            if not is_number(v) or not CENTS_RANGE[0] <= v <= CENTS_RANGE[1]:
                col.add(f"{key}.cents[{j}]", v, f"must be a number of cents from {CENTS_RANGE[0]:g} to {CENTS_RANGE[1]:g}")
                continue
            f = base * 2 ** (v / 1200)
        else:
            if not isinstance(v, (str, int, float)) or isinstance(v, bool):
                col.add(f"{key}.ratios[{j}]", v, 'must be a ratio such as "9/8", "3:2" or 1.5')
                continue
            r = pitch.parse_ratio(v)
            if not (math.isfinite(r) and 1 / RATIO_RANGE[1] <= r <= RATIO_RANGE[1]):
                col.add(f"{key}.ratios[{j}]", v, f"must be a ratio from 1/{RATIO_RANGE[1]:g} to {RATIO_RANGE[1]:g}")
                continue
            f = base * r
        if not FREQUENCY_RANGE[0] <= f <= FREQUENCY_RANGE[1]:
            col.add(f"{key}.{how}[{j}]", v, f"gives a pitch outside {FREQUENCY_SPAN}")
            continue
        out.append(_named(f, a4))
    return out


def _given(raw):
    given = [k for k in TARGET_KEYS if k in raw]
    if "range" in raw and "scale" in raw:
        given.remove("scale")  # with a range, scale only filters the notes
    return given


def pitch_key(raw):
    """The key a set's pitches are given by ("notes", "scale", ...), or "" when not exactly one."""
    given = _given(raw)
    return given[0] if len(given) == 1 else ""


def targets(raw, key, a4, temperament, col, spelling="auto"):
    """Targets of one set, or [] after noting why they cannot be read."""
    given = _given(raw)
    if len(given) != 1:
        col.add(key, None, "needs exactly one of: notes, scale (with root and count), range, "
                "frequencies, cents (with root), ratios (with root)", PITCH_CHOICE)
        return []
    how = given[0]
    value = raw[how]
    try:
        if how == "notes":
            if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
                col.add(f"{key}.notes", value, 'must be a list of note names such as ["D5", "E5"]')
                return []
            if not value:
                col.add(f"{key}.notes", value, "is empty; give at least one note")
                return []
            if len(value) > MAX_PIECES_PER_SET:
                col.add(f"{key}.notes", f"{len(value)} notes", f"is too many; at most {MAX_PIECES_PER_SET} per set")
                return []
            root = raw.get("root")
            if root is not None and not isinstance(root, str):
                col.add(f"{key}.root", root, 'must be a note name in quotes such as "D5"')
                return []
            return pitch.note_targets(value, root, temperament, a4)
        if how == "scale":
            root, count = _root(raw, key, how, col), raw.get("count")
            if not isinstance(value, str):
                col.add(f"{key}.scale", value, 'must be a scale name in quotes such as "major-pentatonic"')
                return []
            if root is None:
                return []
            if isinstance(count, bool) or not isinstance(count, int) or not 1 <= count <= MAX_PIECES_PER_SET:
                col.add(f"{key}.count", count, f"must be a whole number from 1 to {MAX_PIECES_PER_SET}")
                return []
            return pitch.scale_targets(root, value, count, temperament, a4, spelling)
        if how == "range":
            scale = raw.get("scale", "chromatic")
            if not isinstance(value, str) or ".." not in value:
                col.add(f"{key}.range", value, 'must be LOW..HIGH such as "C4..C6"')
                return []
            if not isinstance(scale, str):
                col.add(f"{key}.scale", scale, 'must be a scale name in quotes such as "major"')
                return []
            low, _, high = value.partition("..")
            out = pitch.range_targets(low.strip(), high.strip(), scale, temperament, a4, spelling)
            if len(out) > MAX_PIECES_PER_SET:
                col.add(f"{key}.range", value, f"has {len(out)} notes; at most {MAX_PIECES_PER_SET} per set")
                return []
            return out
        if _list(value, key, how, col) is None:
            return []
        if how == "frequencies":
            return _frequencies(value, key, a4, col)
        root = _root(raw, key, how, col)
        if root is None:
            return []
        return _relative(value, key, how, pitch.note_frequency(root, a4), a4, col)
    except pitch.PitchError as exc:
        col.add(f"{key}.{how}", exc.text, f"is not {exc.accepted}")
        return []

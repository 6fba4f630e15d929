"""How builders write stock sizes and scales, read well enough to suggest cutplan's own names.

A builder at the counter says "3/4 EMT", "3/4 in EMT", "emt 3/4", "EMT 0.75" or "1-1/4 sch 40
PVC"; a scale is "pentatonic" or "minor". These helpers never accept such text in place of a
name (a design file keeps one spelling); they find the names meant, so an error line can say
"did you mean emt-3/4?" instead of listing unrelated sizes.

Trade sizes (1/2, 3/4, 1, 1-1/4 ...) are nominal names, not measured diameters: EMT 3/4 is about
0.92 in outside (ANSI C80.3), so a trade size is matched against the size in the stock name,
never against a measured diameter.
"""

from __future__ import annotations

import difflib
import re
from fractions import Fraction

__all__ = ["SIZE_TOLERANCE", "stock_size_names", "scale_names", "did_you_mean", "closest_names"]

_NAME = re.compile(r"(?P<family>[a-z][a-z0-9-]*?)-(?P<size>\d+-\d+/\d+|\d+/\d+|\d*\.\d+|\d+)(?:x(?P<wall>\d*\.\d+))?")
_WORDS = {"aluminum": "al", "aluminium": "al", "alu": "al", "conduit": "emt", "cu": "copper"}
"""Other words for the families of the stock tables (common practice at the counter)."""
_NOISE = {"in", "inch", "inches", "trade", "size", "nominal", "tube", "tubing", "pipe", "type", "schedule", "sch",
          "x", "of", "and"}
SIZE_TOLERANCE = 0.002
"""Two sizes written differently ("0.75", "3/4") are the same within this [in]."""


def _number(text):
    """'3/4' -> 0.75, '1+1/4' -> 1.25, '0.750' -> 0.75; None for other text."""
    try:
        whole, _, frac = text.partition("+")
        return float(Fraction(whole) + (Fraction(frac) if frac else 0))
    except (ValueError, ZeroDivisionError):
        return None


def _read(text):
    """(family words, numbers) of a builder's text, e.g. '3/4 in EMT' -> ({'emt'}, [0.75])."""
    t = str(text).lower().replace('"', " in ").replace("”", " in ").replace("″", " in ")
    t = re.sub(r"\bsch(?:edule)?\.?\s*(\d+)", r"sch\1", t)
    t = re.sub(r"\btype\s+([klm])\b", r"\1", t)
    t = re.sub(r"(\d)[-\s]+(\d+/\d+)", r"\1+\2", t)  # 1-1/4 and 1 1/4 are one trade size
    t = re.sub(r"(\d)\s*x\s*(\d|\.)", r"\1 \2", t)  # 0.750x0.049: outer and wall
    words, numbers = set(), []
    for token in re.split(r"[\s_,;:()-]+|(?<=[a-z])(?=\d)", t):
        token = token.strip(".")
        if not token or token in _NOISE:
            continue
        value = _number(token)
        if value is not None:
            numbers.append(value)
        else:
            words.add(_WORDS.get(token, token))
    return words, numbers


def _parts(name):
    """(family words, size, wall or None) of a stock name, e.g. 'pvc-sch40-1-1/4' -> ({'pvc', 'sch40'}, 1.25, None)."""
    m = _NAME.fullmatch(name)
    if m is None:
        return None
    size = _number(m.group("size").replace("-", "+"))
    wall = float(m.group("wall")) if m.group("wall") else None
    return set(m.group("family").split("-")), size, wall


def stock_size_names(text, names, count=3):
    """Stock names meant by a builder's way of writing a size, best first (may be empty).

    >>> names = ["emt-1", "emt-1/2", "emt-3/4", "emt-2", "copper-l-3/4", "pvc-sch40-1-1/4", "al-0.750x0.049"]
    >>> stock_size_names("3/4 EMT", names), stock_size_names("emt-0.75", names)
    (['emt-3/4'], ['emt-3/4'])
    >>> stock_size_names('1-1/4" sch 40 PVC', names), stock_size_names("3/4 type L copper", names)
    (['pvc-sch40-1-1/4'], ['copper-l-3/4'])
    """
    words, numbers = _read(text)
    parsed = {n: p for n in sorted(names) if (p := _parts(n)) is not None}
    if not words and not numbers:
        return []
    family = [n for n, (fam, _, _) in parsed.items() if fam <= words] if words else list(parsed)
    if not family:  # a family word we do not know: the size alone still narrows it
        family = [n for n, (fam, _, _) in parsed.items() if fam & words] or list(parsed)
    if not numbers:
        return family[:count]
    size = numbers[0]

    def distance(n):
        _, s, wall = parsed[n]
        d = abs(s - size)
        if wall is not None and len(numbers) > 1:
            d += abs(wall - numbers[1])
        return d

    ranked = sorted(family, key=lambda n: (distance(n), n))
    exact = [n for n in ranked if distance(n) <= SIZE_TOLERANCE]
    return (exact or ranked)[:count]


def scale_names(text, scales, count=3):
    """Scale names meant by a builder's text: 'pentatonic' -> both pentatonics, 'minor pentatonic'
    -> 'minor-pentatonic', 'minor' -> the minor scales.

    >>> scale_names("pentatonic", ["major", "natural-minor", "major-pentatonic", "minor-pentatonic"])
    ['major-pentatonic', 'minor-pentatonic']
    >>> scale_names("Minor Pentatonic", ["major", "major-pentatonic", "minor-pentatonic"])
    ['minor-pentatonic']
    """
    t = re.sub(r"[\s_]+", "-", str(text).strip().lower())
    if t in scales:
        return [t]
    words = [w for w in t.split("-") if w]
    if words:
        holding = [s for s in scales if all(any(p.startswith(w) for p in s.split("-")) for w in words)]
        if holding:
            return holding[:count]
    return difflib.get_close_matches(t, list(scales), n=count, cutoff=0.6)


def did_you_mean(names):
    """' ; did you mean a or b?' or '' (for the end of an error line)."""
    if not names:
        return ""
    shown = names[0] if len(names) == 1 else ", ".join(names[:-1]) + " or " + names[-1]
    return f"; did you mean {shown}?"


def closest_names(value, choices, count=3):
    """Names in ``choices`` nearest to a mistyped ``value`` (British spellings and part-names too).

    >>> closest_names("aluminium-6063-t5", ["aluminum-6061-t6", "aluminum-6063-t5", "maple-sugar"])
    ['aluminum-6063-t5']
    >>> closest_names("aluminium", ["aluminum-6061-t6", "aluminum-6063-t5", "maple-sugar"])
    ['aluminum-6063-t5', 'aluminum-6061-t6']
    """
    text = str(value).strip().lower().replace("aluminium", "aluminum").replace("colour", "color")
    choices = sorted(choices)
    if text in choices:
        return [text]
    within = [c for c in choices if text and text in c]
    close = difflib.get_close_matches(text, choices, n=count, cutoff=0.6)
    return (close + [c for c in within if c not in close])[:count] or choices[:count]

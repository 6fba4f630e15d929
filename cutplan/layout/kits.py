"""Identical kits (``copies = N``): the pieces of every kit for one stock layout, and labels that
sort the way people count (kit2 before kit10).

The plan's sets hold one kit; the cut list is laid out for all N, with each piece labelled
``kit<k>-<label>``; the shopping list multiplies what each kit needs (one drill bit in all).
"""

from __future__ import annotations

import re
from dataclasses import replace

__all__ = ["natural_key", "kit_label", "kit_sets"]

_DIGITS = re.compile(r"(\d+)")


def natural_key(label):
    """Sort key that orders the numbers inside a label by value.

    >>> sorted(["kit10-a-1", "kit2-a-1", "kit1-a-10", "kit1-a-2"], key=natural_key)
    ['kit1-a-2', 'kit1-a-10', 'kit2-a-1', 'kit10-a-1']
    """
    return tuple((0, int(part), "") if part.isdigit() else (1, 0, part) for part in _DIGITS.split(label) if part)


def kit_label(kit, label):
    """The label of a piece in kit number ``kit`` (from 1): "kit3-porch-1"."""
    return f"kit{kit}-{label}"


def kit_sets(sets, copies):
    """The sets with every piece repeated once per kit and relabelled; ``sets`` itself when one kit."""
    if copies <= 1:
        return sets
    out = []
    for s in sets:
        pieces = tuple(replace(p, label=kit_label(k, p.label)) for k in range(1, copies + 1) for p in s.pieces)
        out.append(replace(s, pieces=pieces))
    return out

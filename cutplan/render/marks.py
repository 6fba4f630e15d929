"""Template geometry shared by the PDF and SVG renderers: marks along a piece, tiles, plates.

Only presentation: every position comes from the Plan (lengths and nodes already computed);
nothing here computes physics.  Units are millimetres, because the templates are drawn in mm.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from cutplan.units import MM, format_inches

HOLE_DIAMETER_MM = 4.0
"""Hanging-line hole in a chime plate [mm] (suits 1.5-2 mm cord; common practice)."""
PLATE_EDGE_MM = 20.0
"""Plate material left outside the hole circle [mm] (common practice)."""
TUBE_GAP_MM = 20.0
"""Clear gap between neighbouring tubes hung from a plate [mm] (common practice)."""


@dataclass(frozen=True)
class Mark:
    """A mark across a marking strip: position from the reference end [mm], kind, label."""

    at_mm: float
    kind: str  # "end", "centre", "node", "rough-cut"
    label: str


def length_text(mm):
    """"113.1 mm (4-7/16 in)": both units, as the shop reads them."""
    return f"{mm:.1f} mm ({format_inches(mm * MM, 32, show_error=False)})"


def piece_marks(piece):
    """Marks along a piece: both ends, the centre, nodes (hang holes or supports), rough cut."""
    length = piece.length / MM
    top = "TOP END" if piece.kind == "chime" else "END A"
    node_word = "hang hole" if piece.kind == "chime" else "support"
    marks = [Mark(0.0, "end", f"{top} 0"), Mark(length, "end", f"END {length_text(length)}")]
    marks.append(Mark(length / 2, "centre", f"centre {length / 2:.1f}"))
    for i, x in enumerate(piece.nodes, start=1):
        marks.append(Mark(x / MM, "node", f"{node_word} {i}: {length_text(x / MM)}"))
    cut = piece.cut_length / MM
    if cut > length + 0.05:
        marks.append(Mark(cut, "rough-cut", f"rough cut {cut:.1f} (+{cut - length:.1f})"))
    return sorted(marks, key=lambda m: m.at_mm)


def strip_length_mm(piece):
    """How long the marking strip must be [mm]: the rough cut, or the finished length."""
    return max(piece.cut_length, piece.length) / MM


def tiles(total_mm, usable_mm, overlap_mm):
    """Split a strip of ``total_mm`` into sheets of ``usable_mm`` that overlap by ``overlap_mm``.

    >>> tiles(100, 190, 20)
    [(0.0, 100)]
    >>> tiles(400, 190, 20)
    [(0.0, 190.0), (170.0, 360.0), (340.0, 400)]
    """
    if total_mm <= usable_mm:
        return [(0.0, total_mm)]
    step = usable_mm - overlap_mm
    out, start = [], 0.0
    while start + usable_mm < total_mm:
        out.append((start, start + usable_mm))
        start += step
    out.append((start, total_mm))
    return out


@dataclass(frozen=True)
class Plate:
    """A round hanging plate: diameter, pitch-circle radius, holes ((x, y) mm from centre, label)."""

    diameter_mm: float
    pitch_radius_mm: float
    holes: tuple
    hole_mm: float = HOLE_DIAMETER_MM


def hanging_plate(set_plan):
    """Plate for a chime set: one hole per tube on a pitch circle, a centre hole for the striker.

    The pitch circle leaves ``TUBE_GAP_MM`` between neighbouring tubes of the set's diameter.
    """
    n = len(set_plan.pieces)
    tube = set_plan.outer / MM
    if n == 1:
        radius = 0.0
    else:
        radius = max(40.0, (tube + TUBE_GAP_MM) / (2 * math.sin(math.pi / n)))
    holes = []
    for k, p in enumerate(set_plan.pieces):
        angle = math.pi / 2 - 2 * math.pi * k / n  # first tube at the top, then clockwise
        holes.append((radius * math.cos(angle), radius * math.sin(angle), p.label))
    diameter = 2 * (radius + max(PLATE_EDGE_MM, tube / 2 + 5))
    return Plate(round(diameter, 1), radius, tuple(holes))


def wrap_guide_mm(set_plan):
    """Circumference of the tube [mm]: the length of the wrap-around guide for opposite holes."""
    return math.pi * set_plan.outer / MM

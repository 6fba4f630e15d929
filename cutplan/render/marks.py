"""Template geometry shared by the PDF and SVG renderers: marks along a piece, their line styles,
ruler ticks, tiles and the joining marks between tiles, plates and wrap guides.

Only presentation: every position comes from the Plan (lengths, nodes, stopper depths already
computed); nothing here computes physics.  Units are millimetres, because templates are drawn in
mm; labels take the plan's own length formatter so the plan's units come first.
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass

from cutplan.planning.shopping import hanging_plate  # noqa: F401 (the plate geometry, re-exported for renderers)
from cutplan.units import INCH_DENOMINATOR, MM, ZERO_CELSIUS, format_length

__all__ = [
    "TICK_STEP_MM", "TICK_NUMBER_MM", "Style", "STYLES", "Mark", "length_text", "piece_marks",
    "strip_length_mm", "tiles", "JoinMark", "join_marks", "ruler_ticks", "wrap_guide_mm", "assign_lanes"
]

TICK_STEP_MM = 10
"""Ticks along a strip every 10 mm [mm]."""
TICK_NUMBER_MM = 50
"""Tick numbers (mm along the piece) every 50 mm [mm]."""


@dataclass(frozen=True)
class Style:
    """How a mark is drawn: line width and dash pattern [mm], and how far it reaches past the body
    below (``below``) [mm].  The same table drives the PDF and the SVG."""

    width: float
    dash: tuple[float, ...] = ()
    below: float = 1.0


STYLES = {
    "end": Style(0.28, (), 2.0),
    "cut-tube": Style(0.28, (), 2.0),
    "node": Style(0.09, (), 1.0),
    "lower-node": Style(0.09, (0.4, 0.4), 1.0),  # a chime's lower node: shown, never drilled
    "centre": Style(0.09, (0.7, 0.5), 0.0),
    "rough-cut": Style(0.09, (0.3, 0.4), 1.0),
    "stopper": Style(0.09, (1.0, 0.4), 1.0),
    "tick": Style(0.09),
    "join": Style(0.1),
}
"""Line style per mark kind (widths and dashes in mm)."""


@dataclass(frozen=True)
class Mark:
    """A mark across a marking strip: position from the reference end [mm], kind, label."""

    at_mm: float
    kind: str  # "end", "centre", "node", "lower-node", "rough-cut", "stopper", "cut-tube"
    label: str


@functools.lru_cache(maxsize=4096)
def length_text(mm, units="mm", den=INCH_DENOMINATOR):
    """"113.1 mm (4-7/16 in)": both units, the plan's first, inches to 1/``den``, as the shop reads them.

    Remembered per (length, units, denominator): a packet states each mark's length on every tile,
    in both orientations tried and in the SVG template, and the inch fraction is worked out in
    exact fractions."""
    return format_length(mm * MM, units, den)


def piece_marks(piece, units="mm", den=INCH_DENOMINATOR):
    """Marks along a piece from its reference end.

    Chimes: both ends, the centre, the hang holes, the rough cut beyond the bottom end.  Bars:
    from a rough-cut end, half the allowance beyond each finished end, the centre line and the
    supports measured from it (see :func:`_bar_marks`).
    Stoppered resonators: the open end, the stopper face per temperature, the tube's cut end.
    """
    length = piece.length / MM
    if piece.stopper:
        marks = [Mark(0.0, "end", "OPEN END 0")]
        for t, depth in piece.stopper:
            marks.append(Mark(depth / MM, "stopper", f"stopper {t - ZERO_CELSIUS:.0f} C: {length_text(depth / MM, units, den)}"))
        cut = piece.cut_length / MM
        marks.append(Mark(cut, "cut-tube", f"CUT TUBE {length_text(cut, units, den)} (stopper end)"))
        return sorted(marks, key=lambda m: m.at_mm)
    capped = piece.kind == "resonator" or piece.model == "closed-open"
    if piece.kind == "bar":
        return _bar_marks(piece, units, den)
    top = {"chime": "TOP END"}.get(piece.kind, "OPEN END" if capped else "END")
    node_word = "hang hole" if piece.kind == "chime" else "support"
    far = "CAPPED END" if capped and piece.kind != "chime" else "END"
    marks = [Mark(0.0, "end", f"{top} 0"), Mark(length, "end", f"{far} {length_text(length, units, den)}")]
    if piece.kind == "chime":
        marks.append(Mark(length / 2, "centre", "centre"))
    for i, x in enumerate(piece.nodes, start=1):
        if piece.kind == "chime":  # one hang hole, at the top node; the lower node is only shown
            kind, label = ("node", "hang hole") if i == 1 else ("lower-node", "lower node (no hole)")
            marks.append(Mark(x / MM, kind, f"{label}: {length_text(x / MM, units, den)}"))
        else:
            marks.append(Mark(x / MM, "node", f"{node_word} {i}: {length_text(x / MM, units, den)}"))
    cut = piece.cut_length / MM
    if cut > length + 0.05:
        marks.append(Mark(cut, "rough-cut", f"rough cut {length_text(cut, units, den)}"))
    return sorted(marks, key=lambda m: m.at_mm)


def _bar_marks(piece, units, den=INCH_DENOMINATOR):
    """A bar's strip, laid from one rough-cut end: half the allowance beyond each finished end
    (the tuning sheet trims half from each end), the centre line, and the supports measured from
    the centre line, so that supports marked on the rough blank land on the finished bar's nodes."""
    length = piece.length / MM
    shift = piece.mark_offset / MM
    centre = shift + length / 2
    marks = [Mark(shift, "end", "END A"), Mark(shift + length, "end", f"END B {length_text(length, units, den)}"),
             Mark(centre, "centre", "centre line")]
    for i, x in enumerate(piece.nodes, start=1):
        d = abs(length / 2 - x / MM)
        marks.append(Mark(shift + x / MM, "node", f"support {i}: {length_text(d, units, den)} from centre"))
    if shift > 0.025:
        cut = piece.cut_length / MM
        # the rough cut at 0 is the strip's own end (named in the strip's title): no label to crowd END A
        marks += [Mark(0.0, "rough-cut", ""), Mark(cut, "rough-cut", f"rough cut {length_text(cut, units, den)}")]
    return sorted(marks, key=lambda m: m.at_mm)


def strip_length_mm(piece):
    """How long the marking strip must be [mm]: the rough cut (or tube), or the finished length."""
    return max(piece.cut_length, piece.length) / MM


def tiles(total_mm, usable_mm, overlap_mm):
    """Split a strip of ``total_mm`` into equal sheets no longer than ``usable_mm`` that overlap
    their neighbours by exactly ``overlap_mm`` (no short last sheet).

    >>> tiles(100, 190, 20)
    [(0.0, 100.0)]
    >>> tiles(400, 190, 20)
    [(0.0, 146.667), (126.667, 273.333), (253.333, 400.0)]
    """
    if total_mm <= usable_mm:
        return [(0.0, float(total_mm))]
    n = math.ceil((total_mm - overlap_mm) / (usable_mm - overlap_mm))
    span = (total_mm + (n - 1) * overlap_mm) / n
    step = span - overlap_mm
    out = [(round(k * step, 3), round(k * step + span, 3)) for k in range(n)]
    out[-1] = (out[-1][0], float(total_mm))
    return out


@dataclass(frozen=True)
class JoinMark:
    """A joining mark on a tile, along the piece [mm]: an overlap bar (``at``..``to``), the cross
    at the middle of an overlap, or a tick (``number`` True where it carries its position)."""

    kind: str  # "overlap", "cross", "tick"
    at: float
    to: float = 0.0
    number: bool = False


def join_marks(start, end, sheet, sheets, overlap_mm, limit=None):
    """Joining marks of one tile: overlap bars and crosses where it meets its neighbours, and the
    numbered ticks along the piece.  Neighbouring tiles get the same marks in their overlap."""
    out = []
    if sheet > 1:
        out += [JoinMark("overlap", start, start + overlap_mm), JoinMark("cross", start + overlap_mm / 2)]
    if sheet < sheets:
        out += [JoinMark("overlap", end - overlap_mm, end), JoinMark("cross", end - overlap_mm / 2)]
    last = end if limit is None else min(end, limit)
    for at in range(math.ceil(start / TICK_STEP_MM) * TICK_STEP_MM, int(math.floor(last)) + 1, TICK_STEP_MM):
        out.append(JoinMark("tick", float(at), number=at % TICK_NUMBER_MM == 0))
    return out


def ruler_ticks():
    """((label, length [mm], ((position [mm], tick length [mm]), ...)), ...) for the 100 mm and
    the 4 in calibration rulers; the same ticks in the PDF and the SVG."""
    metric = tuple((float(i), 6.0 if i % 50 == 0 else 4.0 if i % 10 == 0 else 2.0) for i in range(101))
    inch = tuple((i * 25.4 / 16, 6.0 if i % 32 == 0 else 4.0 if i % 16 == 0 else 3.0 if i % 8 == 0 else 1.6)
                 for i in range(65))
    return (("100 mm: this ruler must measure exactly 100 mm", 100.0, metric),
            ("4 in: this ruler must measure exactly 4 inches", 101.6, inch))


def wrap_guide_mm(set_plan):
    """Circumference of the tube [mm]: the length of the wrap-around guide for opposite holes."""
    return math.pi * set_plan.outer / MM


def _label_box(m, lane, side, start, width_mm, lane_mm):
    """Label box [mm]: x along the tile from its left edge, y up from the strip's top edge."""
    x = m.at_mm - start
    y = 1.2 + lane * lane_mm
    x0 = x + 0.5 if side == "right" else x - 0.5 - width_mm
    return (x0, y - 0.6, x0 + width_mm, y + 0.65 * lane_mm)


def _free_lane(m, x, start, width, placed, later, text_mm, lane_mm):
    """Lowest (lane, side, box) where the label of ``m`` clashes with nothing placed and does not
    cover a mark still to be placed (``later`` x positions), or None."""
    for lane in range(12):
        for side in ("right", "left"):
            box = _label_box(m, lane, side, start, text_mm(m.label), lane_mm)
            if box[0] < 0.3 or box[2] > width - 0.3:
                continue
            top = box[3]
            clash = any(b[0] - 0.6 < box[2] and box[0] < b[2] + 0.6 and b[1] < box[3] and box[1] < b[3]
                        for _, _, b in placed)
            clash = clash or any(box[0] - 0.4 <= px <= box[2] + 0.4 and box[1] <= b[3] for px, _, b in placed)
            clash = clash or any(b[0] - 0.4 <= x <= b[2] + 0.4 and b[1] <= top for _, _, b in placed)
            clash = clash or any(box[0] - 0.4 <= px <= box[2] + 0.4 for px in later)
            if not clash:
                return lane, side, box
    return None


def assign_lanes(marks, start, end, text_mm, lane_mm):
    """(Mark, lane, side) for the marks between ``start`` and ``end`` [mm]; lanes count up from the
    strip's top edge, ``lane_mm`` apart; ``text_mm(label)`` is a label's width [mm].

    A mark's line reaches up through its own lane; a label is never crossed by another mark's
    line, never overlaps another label and stays inside the tile.  The lane of a mark's label is
    the top of its line.
    """
    width = end - start
    marks = [m for m in marks if m.label and start - 1e-6 <= m.at_mm <= end + 1e-6]
    placed, out = [], []
    for i, m in enumerate(marks):
        x = m.at_mm - start
        later = [n.at_mm - start for n in marks[i + 1:]]
        choice = (_free_lane(m, x, start, width, placed, later, text_mm, lane_mm)
                  or _free_lane(m, x, start, width, placed, [], text_mm, lane_mm))
        if choice:
            lane, side, box = choice
            placed.append((x, lane, box))
            out.append((m, lane, side))
    return tuple(out)

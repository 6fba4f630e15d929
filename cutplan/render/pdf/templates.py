"""Full-size template pages: marking strips and side profiles tiled across sheets.

Each tile sits in a dashed cut-out frame and carries the same joining marks (overlap bar, cross,
numbered ticks) as its neighbours, from :func:`cutplan.render.marks.join_marks`.  Labels go in
lanes above the strip so that no mark line crosses a label; the page orientation is the one
that needs fewer sheets.  Geometry is drawn in millimetres through ``reportlab``'s ``mm``.
"""

from __future__ import annotations

from dataclasses import dataclass

from reportlab.lib import colors

from cutplan.planning.records import Piece
from cutplan.render import marks as mk
from cutplan.render.pdf.base import (
    A4,
    BOLD,
    FONT,
    LIGHT,
    TEMPLATE_MARGIN,
    fit,
    landscape,
    letter,
    mm,
    paragraph,
    text_width,
)
from cutplan.render.pdf.plates import plate_pages
from cutplan.render.pdf.rulers import RULER_TOP, RULERS_HEIGHT, rulers
from cutplan.render.phrases import CENTRE_OUT
from cutplan.units import INCH_DENOMINATOR, MM

OVERLAP_MM = 20.0
"""Overlap of tiled template sheets [mm]."""
STRIP_H_MM = 16.0
"""Height of a marking strip [mm]."""
LANE_MM = 3.4
"""Height of one label lane above a strip [mm]."""
LABEL_PT = 6.5
NUMBER_PT = 6.5
"""Tick numbers and the thickness left under an arch [pt] (6.5 pt: readable at the bench)."""
TITLE_PT = (7.5, 6.0)
"""A tile's title [pt]: its size, and the least it shrinks to before it is shortened."""
BELOW_MM = 10.5
"""Room under a strip for the joining marks and the tile's title [mm]."""
GAP_MM = 2.5
"""Space between tile frames [mm]."""
INSTRUCTION = ("Cut out each tile on its dashed frame; tape neighbours where the grey bars and crosses match, "
               "aligning the numbered ticks (mm along the piece). Lay the strip along the piece, end 0 at its "
               "reference end (a bar's strip: at the rough-cut end; its supports are measured from the centre line).")
TOP_SPACE_MM = 30.0
"""Page top to the first frame [mm] (header, heading and instruction)."""
TICK_NUMBER_CLEAR_MM = 5.0
"""A tick number is left off within this distance of a mark line [mm]."""


@dataclass(frozen=True)
class Tile:
    """One tile: the piece, its span along the piece [mm], sheet k of n, "strip" or "profile",
    and the label lanes it needs."""

    piece: Piece
    start: float
    end: float
    sheet: int
    sheets: int
    what: str
    labels: tuple[tuple[mk.Mark, int, str], ...] = ()  # (Mark, lane, side) for strips

    @property
    def height_mm(self):
        if self.what == "profile":
            return self.piece.arch.thickness / MM + 24.0
        lanes = max((lane for _, lane, _ in self.labels), default=-1) + 1
        return STRIP_H_MM + lanes * LANE_MM + 3.0 + BELOW_MM


def assign_lanes(piece, start, end, units, den=INCH_DENOMINATOR):
    """(Mark, lane, side) for every mark on the tile (see :func:`cutplan.render.marks.assign_lanes`)."""
    return mk.assign_lanes(mk.piece_marks(piece, units, den), start, end, lambda t: text_width(t, LABEL_PT) / mm, LANE_MM)


def layout(plan, size):
    """Tiles of every piece for a page of ``size`` (points), packed into rows and pages:
    [[(Tile, x from the left margin [mm], frame top from the page bottom [mm])]]."""
    w, h = size
    usable = (w - 2 * TEMPLATE_MARGIN) / mm
    tiles = []
    for p in plan.pieces:
        parts = mk.tiles(mk.strip_length_mm(p), usable, OVERLAP_MM)
        for k, (a, b) in enumerate(parts, start=1):
            tiles.append(Tile(p, a, b, k, len(parts), "strip", assign_lanes(p, a, b, plan.units, plan.inch_denominator)))
        if p.arch is not None:
            parts = mk.tiles(p.length / MM, usable, OVERLAP_MM)
            for k, (a, b) in enumerate(parts, start=1):
                tiles.append(Tile(p, a, b, k, len(parts), "profile"))
    bottom = (RULER_TOP + RULERS_HEIGHT) / mm + 4.0
    rows, row, used = [], [], 0.0
    for t in tiles:  # short tiles share a row, in order
        width = t.end - t.start
        if row and used + GAP_MM + width > usable:
            rows.append(row)
            row, used = [], 0.0
        row.append((t, used + (GAP_MM if row else 0.0)))
        used = row[-1][1] + width
    if row:
        rows.append(row)
    pages, current, y = [], [], h / mm - TOP_SPACE_MM
    for row in rows:
        height = max(t.height_mm for t, _ in row)
        if current and y - height < bottom:
            pages.append(current)
            current, y = [], h / mm - TOP_SPACE_MM
        current += [(t, x, y) for t, x in row]
        y -= height + GAP_MM
    if current:
        pages.append(current)
    return pages


def strip_bottom_mm(tile, y_top_mm):
    """Bottom edge of a strip tile's body [mm from the page bottom] for a frame top at ``y_top_mm``."""
    return y_top_mm - tile.height_mm + BELOW_MM


def orientation(plan, paper):
    """The page size (portrait or landscape) that needs fewer template sheets, and its layout."""
    portrait = A4 if paper == "a4" else letter
    options = [(size, layout(plan, size)) for size in (portrait, landscape(portrait))]
    return min(options, key=lambda o: (len(o[1]), sum(len(page) for page in o[1])))


def _frame(c, x0, y_bottom, width, height):
    c.setStrokeColor(colors.Color(0.45, 0.45, 0.45))
    c.setLineWidth(0.3)
    c.setDash(3, 2)
    c.rect(x0, y_bottom, width, height)
    c.setDash()
    c.setStrokeColor(colors.black)


def _style(c, kind):
    st = mk.STYLES[kind]
    c.setLineWidth(st.width * mm)
    if st.dash:
        c.setDash(*[d * mm for d in st.dash])
    else:
        c.setDash()


def _join(c, tile, X, y_join, y_numbers, y_bar, number_clear):
    """Overlap bars, crosses and numbered ticks: the same along-piece positions on both tiles.

    Ticks rise from ``y_join`` towards ``y_numbers``; the overlap bar is 2 mm tall from ``y_bar``.
    """
    limit = tile.piece.length / MM if tile.what == "profile" else None
    for j in mk.join_marks(tile.start, tile.end, tile.sheet, tile.sheets, OVERLAP_MM, limit):
        if j.kind == "overlap":
            c.setFillColor(LIGHT)
            c.rect(X(j.at), y_bar, (j.to - j.at) * mm, 2 * mm, fill=1, stroke=0)
            c.setFillColor(colors.black)
        elif j.kind == "cross":
            _style(c, "join")
            c.line(X(j.at) - 2 * mm, y_bar + 1 * mm, X(j.at) + 2 * mm, y_bar + 1 * mm)
            c.line(X(j.at), y_bar - 1 * mm, X(j.at), y_bar + 3 * mm)
        else:
            _style(c, "tick")
            tick = 4 if j.number else 2
            direction = 1 if y_numbers > y_join else -1
            c.line(X(j.at), y_join, X(j.at), y_join + direction * tick * mm)
            clear = all(abs(j.at - x) >= TICK_NUMBER_CLEAR_MM for x in number_clear)
            inside = tile.start + 3 <= j.at <= tile.end - 3
            if j.number and j.at > 0 and clear and inside:
                c.setFont(FONT, NUMBER_PT)
                c.drawCentredString(X(j.at), y_numbers, f"{j.at:.0f}")
    c.setDash()


def _tile_title(c, x, y, title, width):
    """A tile's title: smaller type (down to TITLE_PT[1]) before any word is cut short."""
    size = TITLE_PT[0]
    while size > TITLE_PT[1] and text_width(title, size, BOLD) > width:
        size -= 0.25
    c.setFont(BOLD, size)
    c.drawString(x, y, fit(title, size, width, BOLD))


def draw_strip(c, tile, x0, y_top, width_mm, units, den=INCH_DENOMINATOR):
    """One tile of a marking strip inside its cut-out frame whose top is ``y_top`` (points)."""
    p = tile.piece
    lanes = max((lane for _, lane, _ in tile.labels), default=-1) + 1
    top = y_top - (lanes * LANE_MM + 3.0) * mm
    y0 = top - STRIP_H_MM * mm
    _frame(c, x0, y_top - tile.height_mm * mm, (tile.end - tile.start) * mm, tile.height_mm * mm)

    def X(at_mm):
        return x0 + (at_mm - tile.start) * mm

    length = p.length / MM
    off = p.mark_offset / MM  # a bar's finished body starts half its allowance in from the rough cut
    lo, hi = max(tile.start, off), min(tile.end, off + length if not p.stopper else p.cut_length / MM)
    c.setLineWidth(0.4)
    c.setStrokeColor(colors.black)
    if hi > lo:
        c.rect(X(lo), y0, (hi - lo) * mm, STRIP_H_MM * mm)
    marks = [m for m in mk.piece_marks(p, units, den) if tile.start - 1e-6 <= m.at_mm <= tile.end + 1e-6]
    _join(c, tile, X, y0, y0 + 4.8 * mm, y0 - 3 * mm, [m.at_mm for m in marks])
    lane_of = {(m.at_mm, m.kind): (lane, side) for m, lane, side in tile.labels}
    for m in marks:
        x = X(m.at_mm)
        st = mk.STYLES[m.kind]
        lane, side = lane_of.get((m.at_mm, m.kind), (None, None))
        reach = top + (1.2 + lane * LANE_MM + 2.6) * mm if lane is not None else top + 1 * mm
        _style(c, m.kind)
        c.line(x, y0 - st.below * mm, x, reach)
        if m.kind == "node":
            mid = y0 + STRIP_H_MM * mm / 2
            c.line(x - 3 * mm, mid, x + 3 * mm, mid)
            c.circle(x, mid, 2 * mm)
        c.setDash()
        if lane is not None:
            c.setFont(FONT, LABEL_PT)
            y = top + (1.2 + lane * LANE_MM) * mm
            if side == "right":
                c.drawString(x + 0.5 * mm, y, m.label)
            else:
                c.drawRightString(x - 0.5 * mm, y, m.label)
    c.setFont(BOLD, 7.5)
    if p.stopper:
        what = f"cut tube {mk.length_text(p.cut_length / MM, units, den)}, tune with the stopper; open end 0"
    else:
        what = f"finished {mk.length_text(length, units, den)}"
        if off > 0:
            what += f"; rough cut at 0, {CENTRE_OUT}"
    title = f"{p.label}  {p.note}  sheet {tile.sheet} of {tile.sheets}:  {what}"
    _tile_title(c, x0 + 1 * mm, y0 - 8 * mm, title, (tile.end - tile.start - 2) * mm)


def draw_profile(c, tile, x0, y_top, width_mm, units, den=INCH_DENOMINATOR):
    """One tile of an arched bar's full-size side profile (top face up, arch below) in its frame."""
    p = tile.piece
    arch = p.arch
    t = arch.thickness / MM
    top = y_top - 12 * mm
    under = top - t * mm
    _frame(c, x0, y_top - tile.height_mm * mm, (tile.end - tile.start) * mm, tile.height_mm * mm)

    def X(at_mm):
        return x0 + (at_mm - tile.start) * mm

    length = p.length / MM
    lo, hi = max(tile.start, 0.0), min(tile.end, length)
    c.setStrokeColor(colors.black)
    c.setLineWidth(0.4)
    c.line(X(lo), top, X(hi), top)
    path, first = c.beginPath(), True
    for x, hh in arch.outline:
        x = x / MM
        if not tile.start - 1 <= x <= tile.end + 1:
            continue
        x = min(max(x, lo), hi)
        (path.moveTo if first else path.lineTo)(X(x), top - hh / MM * mm)
        first = False
    c.drawPath(path, stroke=1, fill=0)
    for edge in (0.0, length):
        if tile.start - 1e-6 <= edge <= tile.end + 1e-6:
            c.line(X(edge), top, X(edge), under)
    c.setDash(1, 1)
    c.setLineWidth(0.25)
    c.line(X(lo), under, X(hi), under)
    c.setDash()
    # joining marks and numbered ticks above the top face, as on the strips
    _join(c, tile, X, top, top + 4.8 * mm, top + 8 * mm, [])
    # thickness left at each station, below the blank's underside, alternating rows when crowded
    c.setFont(FONT, NUMBER_PT)
    _style(c, "tick")
    last_x = {0: -1e9, 1: -1e9}
    # every station on both halves, left to right, so crowding is judged in order along the bar
    # (the deepest point, at the centre, keeps its number on a middle sheet too)
    spots = sorted({(round(at, 6), hh) for x, hh in arch.stations for at in (x / MM, length - x / MM)})
    for at, hh in spots:
        if not tile.start - 1e-6 <= at <= tile.end + 1e-6:
            continue
        c.line(X(at), under, X(at), under - 1.5 * mm)
        if not tile.start + 2 <= at <= tile.end - 2:
            continue
        text = f"{hh / MM:.1f}"
        half = text_width(text, NUMBER_PT) / 2 + 1
        row = 0 if X(at) - half > last_x[0] else 1
        if X(at) - half <= last_x[row]:
            continue
        c.drawCentredString(X(at), under - (4 if row == 0 else 6.6) * mm, text)
        last_x[row] = X(at) + half
        if row == 1:
            c.line(X(at), under - 1.5 * mm, X(at), under - 4.3 * mm)
    c.setFont(BOLD, 7.5)
    title = (f"{p.label} side profile, full size: arch {mk.length_text(arch.depth / MM, units, den)} deep; "
             f"numbers are the thickness left (mm)   sheet {tile.sheet} of {tile.sheets}")
    _tile_title(c, x0 + 1 * mm, under - 10 * mm, title, (tile.end - tile.start - 2) * mm)


def templates(packet):
    """Marking-strip and profile pages, then the chime plates and wrap guides."""
    plan = packet.plan
    size, pages = orientation(plan, "a4" if packet.size == A4 else "letter")
    w, h = size
    width_mm = (w - 2 * TEMPLATE_MARGIN) / mm
    for group in pages:
        def draw(c, page, group=group):
            c.setFont(BOLD, 11)
            kits = getattr(plan, "copies", 1)
            c.drawString(TEMPLATE_MARGIN, h - 19 * mm, "Marking strips, full size"
                         + (f": each printed once, make {kits} of every piece ({kits} kits)" if kits > 1 else ""))
            paragraph(c, TEMPLATE_MARGIN, h - 23.5 * mm, INSTRUCTION, 7.5, w - 2 * TEMPLATE_MARGIN)
            for tile, x, y_top in group:
                draw_tile = draw_profile if tile.what == "profile" else draw_strip
                draw_tile(c, tile, TEMPLATE_MARGIN + x * mm, y_top * mm, width_mm, plan.units, plan.inch_denominator)
            rulers(c, TEMPLATE_MARGIN, RULER_TOP)
        packet.add(draw, template=True, size=size)
    plate_pages(packet)


__all__ = ["OVERLAP_MM", "STRIP_H_MM", "Tile", "assign_lanes", "layout", "orientation", "strip_bottom_mm", "templates"]

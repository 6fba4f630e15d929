"""Template pages for chime sets: the hanging plate (full size when it fits) and the wrap guide."""

from __future__ import annotations

import math

from reportlab.lib import colors

from cutplan.planning.shopping import PLATE_HANGING, plate_material
from cutplan.render import marks as mk
from cutplan.render.hanging import clearance_text
from cutplan.render.pdf.base import BOLD, FONT, SAFE, TEMPLATE_MARGIN, Placer, mm, paragraph
from cutplan.render.pdf.rulers import RULER_TOP, RULERS_HEIGHT, rulers
from cutplan.units import MM, format_length

__all__ = ["plate_pages"]


def _circle_segments(cx, cy, r, n=72):
    pts = [(cx + r * math.cos(2 * math.pi * k / n), cy + r * math.sin(2 * math.pi * k / n)) for k in range(n + 1)]
    return list(zip(pts, pts[1:], strict=False))


def _plate_page(c, page, plan, s):
    w, h = page.size
    x = TEMPLATE_MARGIN
    width = w - 2 * x
    plate = mk.hanging_plate(s)
    c.setFillColor(colors.black)
    c.setFont(BOLD, 11)
    kits = getattr(plan, "copies", 1)
    c.drawString(x, h - 19 * mm, f"Hanging plate and wrap guide: {s.name}" + (f" (make {kits})" if kits > 1 else ""))
    y = h - 25 * mm
    if s.shape == "tube":
        circ = mk.wrap_guide_mm(s)
        half = circ > width / mm - 10
        span = circ / 2 if half else circ
        y = paragraph(c, x, y, "Wrap guide: cut out, wrap round the tube at the hang-hole mark with A on the mark, "
                      "then mark B: the two holes are then opposite."
                      + (" (Half-round guide: A to B is half the circumference.)" if half else ""), 7.5, width)
        y_wrap = y - 14 * mm
        c.setLineWidth(0.3)
        c.rect(x, y_wrap, span * mm, 8 * mm)
        for at, label in ([(0, "A"), (span, "B")] if half else [(0, "A"), (circ / 2, "B"), (circ, "A")]):
            xx = x + at * mm
            c.setLineWidth(0.8)
            c.line(xx, y_wrap - 2 * mm, xx, y_wrap + 10 * mm)
            c.setFont(BOLD, 8)
            c.drawCentredString(xx, y_wrap - 5.5 * mm, label)
        y = y_wrap - 10 * mm
    bottom = RULER_TOP + RULERS_HEIGHT + 8 * mm
    units, den = plan.units, plan.inch_denominator
    note = (f"Plate {format_length(plate.diameter_mm * MM, units, den)} across, {plate_material(units, den)} (a suggestion). "
            f"Drill the line holes {format_length(plate.hole_mm * MM, units, den)} on the "
            f"{format_length(2 * plate.pitch_radius_mm * MM, units, den)} circle, one per tube; {PLATE_HANGING}. "
            f"Dotted: {clearance_text(s.hanging, units, den)}.")
    y = paragraph(c, x, y, note, 7.5, width)
    room = (y - bottom) / mm - 8
    fits = plate.diameter_mm <= min(width / mm, room)
    scale = 1.0 if fits else min(width / mm, room) / plate.diameter_mm
    if not fits:
        y = paragraph(c, x, y, "NOT TO SCALE: the plate is larger than the page; use the SVG template.",
                      7.5, width, font=BOLD)
    r_out = plate.diameter_mm / 2 * scale * mm
    cx, cy = w / 2, y - 4 * mm - r_out
    placer = Placer((SAFE, bottom - 6 * mm, w - SAFE, y))
    c.setStrokeColor(colors.black)
    c.setLineWidth(0.4)
    c.circle(cx, cy, r_out)
    for a, b in _circle_segments(cx, cy, r_out):
        placer.line(a, b)
    if plate.pitch_radius_mm:
        c.setDash(2, 2)
        c.circle(cx, cy, plate.pitch_radius_mm * scale * mm)
        c.setDash()
        for a, b in _circle_segments(cx, cy, plate.pitch_radius_mm * scale * mm):
            placer.line(a, b)
    # dotted: the striker disc and the tubes hanging below (full size), so any clash shows
    c.setDash(1, 1.5)
    c.setLineWidth(0.3)
    outlines = [(cx, cy, plate.striker_mm / 2 * scale * mm)]
    outlines += [(cx + hx * scale * mm, cy + hy * scale * mm, plate.tube_mm / 2 * scale * mm) for hx, hy, _ in plate.holes]
    for ox, oy, r in outlines:
        c.circle(ox, oy, r)
        for a, b in _circle_segments(ox, oy, r, 36):
            placer.line(a, b)
    c.setDash()
    holes = [(hx, hy, label) for hx, hy, label in plate.holes] + [(0.0, 0.0, "striker")]
    holes += [(hx, hy, "S") for hx, hy in plate.suspension]
    r_hole = plate.hole_mm / 2 * scale * mm
    centres = []
    for hx, hy, label in holes:
        px, py = cx + hx * scale * mm, cy + hy * scale * mm
        c.setLineWidth(0.4)
        c.circle(px, py, r_hole)
        c.setLineWidth(0.2)
        c.line(px - 4 * mm, py, px + 4 * mm, py)
        c.line(px, py - 4 * mm, px, py + 4 * mm)
        placer.line((px - 4 * mm, py), (px + 4 * mm, py))
        placer.line((px, py - 4 * mm), (px, py + 4 * mm))
        centres.append((px, py, label))
    c.setFillColor(colors.black)
    for px, py, label in centres:
        d = 4.5 * mm
        placer.place(c, [(px, py - d - 2.5 * mm, label, "middle"), (px, py + d, label, "middle"),
                         (px + d, py - 2.8 * mm, label, "start"), (px - d, py - 2.8 * mm, label, "end"),
                         (px + d, py + 1 * mm, label, "start"), (px - d, py + 1 * mm, label, "end")], 6.5, FONT)
    rulers(c, x, RULER_TOP)


def plate_pages(packet):
    plan = packet.plan
    for s in plan.sets:
        if s.kind != "chime" or not s.pieces:
            continue
        packet.add(lambda c, page, s=s: _plate_page(c, page, plan, s), template=True)

"""The "Hanging the set" page for each chime set: what the plan worked out for the plate,
striker, sail, lines and load, and a side view drawn to scale (a picture, not a template)."""

from __future__ import annotations

from reportlab.lib import colors

from cutplan.planning.hanging import SAIL_DROP
from cutplan.render.hanging import hanging_lines
from cutplan.render.pdf.base import BOLD, FONT, MARGIN, heading, mm, paragraph

__all__ = ["SIDE_VIEW_SCALES", "assembly_pages"]

SIDE_VIEW_SCALES = (1, 2, 2.5, 4, 5, 8, 10, 15, 20, 25, 40, 50)
"""Side-view scales tried, 1:n, largest picture first."""


def _side_view(c, plan, s, x, y_top, width, height):
    """The set seen from the side, at the largest 1:n scale that fits (x, y_top, box in points)."""
    h = s.hanging
    tall = h.plate_thickness + 0.04 + max(p.length for p in s.pieces) + SAIL_DROP + h.sail.side + 0.15
    wide = h.plate_diameter
    n = next((k for k in SIDE_VIEW_SCALES if tall / k * 1000 * mm <= height and wide / k * 1000 * mm <= width),
             SIDE_VIEW_SCALES[-1])
    k = 1000 * mm / n  # points per metre on the page

    def X(v):
        return x + width / 2 + v * k

    ring_y = y_top - 4 * mm
    plate_y = ring_y - 0.15 * k
    tops_y = plate_y - (h.plate_thickness + 0.04) * k
    c.setStrokeColor(colors.black)
    c.setLineWidth(0.3)
    c.circle(X(0), ring_y + 1.5 * mm, 1.5 * mm)
    for sx, _sy in h.suspension:
        c.line(X(0), ring_y, X(sx), plate_y)
    c.setFillColor(colors.lightgrey)
    c.rect(X(-h.plate_diameter / 2), plate_y - h.plate_thickness * k, h.plate_diameter * k, h.plate_thickness * k,
           fill=1)
    for (hx, _hy, _label), p in zip(h.holes, s.pieces, strict=True):
        c.line(X(hx), plate_y, X(hx), tops_y - p.nodes[0] * k)
        c.setFillColor(colors.white)
        c.rect(X(hx - h.tube_outer / 2), tops_y - p.length * k, h.tube_outer * k, p.length * k, fill=1)
        c.setFillColor(colors.black)
        c.circle(X(hx), tops_y - p.nodes[0] * k, 0.6 * mm, fill=1)
    longest = max(p.length for p in s.pieces)
    sail_top = tops_y - (longest + SAIL_DROP) * k
    c.line(X(0), plate_y, X(0), sail_top)
    c.setFillColor(colors.darkgrey)
    c.rect(X(-h.striker_diameter / 2), tops_y - (h.striker_height + h.striker_thickness / 2) * k,
           h.striker_diameter * k, h.striker_thickness * k, fill=1)
    c.rect(X(-h.sail.side / 2), sail_top - h.sail.side * k, h.sail.side * k, h.sail.side * k, fill=1)
    c.setFillColor(colors.black)
    c.setFont(FONT, 7)
    c.drawString(x, sail_top - h.sail.side * k - 5 * mm,
                 f"Side view at 1:{n:g} (a picture, not a template): ring, plate, tubes with their hang holes "
                 "(dots), striker, sail.")


def _page(c, page, plan, s):
    y = heading(c, page, f"Hanging the set: {s.name}")
    x, width = page.left, page.width
    for line in hanging_lines(s.hanging, plan.units, plan.inch_denominator):
        y = paragraph(c, x, y, "- " + line[0].upper() + line[1:] + ".", 8.5, width)
    y = paragraph(c, x, y - 1 * mm, "Tube tops hang level; each tube's line loops through its hang hole and "
                  "both ends are tied above the plate. Line strengths are from the table in the shop data "
                  "(a maker's label beats it); replace line that has faded in the sun.", 8, width)
    c.setFont(BOLD, 9)
    _side_view(c, plan, s, x, y - 4 * mm, width, y - 4 * mm - MARGIN - 14 * mm)


def assembly_pages(packet):
    """One page per chime set with a planned hanging."""
    plan = packet.plan
    for s in plan.sets:
        if s.kind == "chime" and getattr(s, "hanging", None) is not None:
            packet.add(lambda c, page, s=s: _page(c, page, plan, s))

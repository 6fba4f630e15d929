"""The 100 mm and 4 in calibration rulers printed on every template page (ticks shared with the SVG)."""

from __future__ import annotations

from reportlab.lib import colors

from cutplan.render import marks as mk
from cutplan.render.pdf.base import FONT, mm

__all__ = ["RULER_TOP", "RULER_GAP", "RULERS_HEIGHT", "rulers"]

RULER_TOP = 34 * mm
"""Top line of the upper (100 mm) calibration ruler, from the bottom of the page."""
RULER_GAP = 14 * mm
"""From the top line of one ruler to the next."""
RULERS_HEIGHT = 5 * mm
"""Room the rulers' captions take above ``RULER_TOP``."""


def rulers(c, x, y):
    """100 mm and 4 in calibration rulers, one above the other, at (x, y) in points (top line)."""
    c.setStrokeColor(colors.black)
    c.setFillColor(colors.black)
    c.setLineWidth(0.3)
    c.setDash()
    c.setFont(FONT, 7)
    for k, (caption, span, ticks) in enumerate(mk.ruler_ticks()):
        yy = y - k * RULER_GAP
        c.drawString(x, yy + 2 * mm, caption)
        c.line(x, yy, x + span * mm, yy)
        for at, tick in ticks:
            c.line(x + at * mm, yy, x + at * mm, yy - tick * mm)

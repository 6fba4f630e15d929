"""What every PDF page family shares: the packet of pages, the page frame, headings, paragraphs
and tables that wrap by measured width, and the plan's lengths in its own units first.

PDF points appear only in the ``cutplan.render.pdf`` package.  Nothing here computes a fact:
every number comes from the Plan and is only formatted.
"""

from __future__ import annotations

import functools
import io

from reportlab.lib import colors
from reportlab.lib.pagesizes import A4, landscape, letter
from reportlab.lib.units import mm
from reportlab.lib.utils import simpleSplit
from reportlab.pdfbase.pdfmetrics import stringWidth
from reportlab.pdfgen.canvas import Canvas
from reportlab.platypus import Table, TableStyle

from cutplan.units import length_parts

MARGIN = 15 * mm
"""Margin of text pages."""
TEMPLATE_MARGIN = 12 * mm
"""Margin of template pages (the strips start here)."""
SAFE = 6 * mm
"""No text closer than this to a paper edge (most printers cannot print nearer)."""
LIGHT = colors.Color(0.88, 0.88, 0.88)
FONT = "Helvetica"
BOLD = "Helvetica-Bold"

__all__ = ["A4", "letter", "landscape", "mm"]


def paper_size(paper):
    """Portrait page size in points for "a4" or "letter"."""
    return A4 if paper == "a4" else letter


def parts(plan, metres):
    """One length's :class:`~cutplan.units.LengthParts` in the plan's units and fraction of an inch."""
    return length_parts(metres, plan.units, plan.inch_denominator)


def length(plan, metres):
    """One length in the plan's units first: "20-5/32 in (512.3 mm)" or "512.3 mm (20-5/32 in)"."""
    return str(parts(plan, metres))


def first(plan, metres):
    """The plan's unit only ("20-5/32 in" or "512.3 mm"), for tight labels."""
    return parts(plan, metres).first


def length_lines(plan, metres):
    """The same length as two lines for a table cell, the plan's unit on top."""
    q = parts(plan, metres)
    return f"{q.first}\n{q.second}"


def text_width(text, size, font=FONT):
    return stringWidth(text, font, size)


def fit(text, size, width, font=FONT):
    """Shorten ``text`` with an ellipsis until it is at most ``width`` points wide."""
    if text_width(text, size, font) <= width:
        return text
    while text and text_width(text + "...", size, font) > width:
        text = text[:-1]
    return text + "..."


def wrap(text, size, width, font=FONT):
    """Lines of ``text`` no wider than ``width`` points (long words are broken)."""
    if not isinstance(text, str):
        return simpleSplit(text, font, size, width) or [""]
    return list(_split(text, size, width, font)) or [""]


@functools.lru_cache(maxsize=8192)
def _split(text, size, width, font):
    """:func:`wrap`'s lines, measured once per text, size, width and font (a packet's tables repeat
    their headings, phrases and lengths from page to page and plan to plan)."""
    return tuple(simpleSplit(text, font, size, width))


def cell(text, size, width, font=FONT):
    """Text wrapped to a table column (padding taken off), lines joined with newlines."""
    return "\n".join(line for part in str(text).split("\n") for line in wrap(part, size, width - 6, font))


class Packet:
    """Collects page-drawing functions so that page numbers can say "page X of N".

    Each page is drawn with ``draw(canvas, page)`` where ``page`` gives its size and margins.
    """

    def __init__(self, plan, paper):
        self.plan = plan
        self.size = paper_size(paper)
        self.pages = []

    def add(self, draw, template=False, size=None):
        self.pages.append((draw, template, size or self.size))

    def render(self):
        buf = io.BytesIO()
        c = Canvas(buf, pagesize=self.size, invariant=1, pageCompression=1)
        c.setTitle(f"{self.plan.title}: shop packet")
        c.setAuthor("cutplan")
        c.setCreator("cutplan")
        c.setSubject("cut plan")
        total = len(self.pages)
        for number, (draw, template, size) in enumerate(self.pages, start=1):
            c.setPageSize(size)
            self._frame(c, number, total, template, size)
            draw(c, Page(size, template))
            c.showPage()
        c.save()
        return buf.getvalue()

    def _frame(self, c, number, total, template, size):
        w, h = size
        left = TEMPLATE_MARGIN if template else MARGIN
        c.setFillColor(colors.black)
        right_text = "cutplan shop packet"
        c.setFont(FONT, 8)
        c.drawRightString(w - left, h - 10 * mm, right_text)
        c.setFont(BOLD, 9)
        c.drawString(left, h - 10 * mm, fit(self.plan.title, 9, w - 2 * left - text_width(right_text, 8) - 6 * mm, BOLD))
        text = f"page {number} of {total}"
        if template:
            text = "TEMPLATE - print at actual size (100 %, no fit-to-page); check the rulers.   " + text
        c.setFont(FONT, 8)
        c.drawRightString(w - left, 7 * mm, text)


class Page:
    """Size and margins of the page being drawn (templates may be landscape)."""

    def __init__(self, size, template):
        self.size = size
        self.w, self.h = size
        self.left = TEMPLATE_MARGIN if template else MARGIN
        self.width = self.w - 2 * self.left


def heading(c, page, text, y=None):
    y = page.h - 22 * mm if y is None else y
    c.setFont(BOLD, 16)
    c.setFillColor(colors.black)
    c.drawString(page.left, y, fit(text, 16, page.width, BOLD))
    return y - 8 * mm


def paragraph(c, x, y, text, size=10, width=None, leading=None, font=FONT, page=None):
    """Draw ``text`` wrapped to ``width`` points from (x, y); returns the y below it."""
    width = width if width is not None else page.w - x - MARGIN
    leading = leading or size * 1.3
    c.setFont(font, size)
    for line in wrap(text, size, width, font):
        c.drawString(x, y, line)
        y -= leading
    return y


def styled_table(data, col_widths, font_size):
    data = [[cell(v, font_size, w_, BOLD if r == 0 else FONT) for v, w_ in zip(row, col_widths, strict=True)]
            for r, row in enumerate(data)]
    table = Table(data, colWidths=col_widths, repeatRows=1)
    table.setStyle(TableStyle([
        ("FONT", (0, 0), (-1, 0), BOLD, font_size),
        ("FONT", (0, 1), (-1, -1), FONT, font_size),
        ("GRID", (0, 0), (-1, -1), 0.4, colors.black),
        ("VALIGN", (0, 0), (-1, -1), "MIDDLE"),
        ("BACKGROUND", (0, 0), (-1, 0), LIGHT),
        ("LEFTPADDING", (0, 0), (-1, -1), 2.5),
        ("RIGHTPADDING", (0, 0), (-1, -1), 2.5),
        ("TOPPADDING", (0, 0), (-1, -1), 3.5),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 3.5),
    ]))
    return table


def draw_table(c, data, col_widths, x, y_top, font_size=9):
    table = styled_table(data, col_widths, font_size)
    _, height = table.wrapOn(c, sum(col_widths), 10_000)
    table.drawOn(c, x, y_top - height)
    return y_top - height


def table_pages(header, rows, col_widths, font_size, room):
    """Split table rows into page-sized chunks: each chunk, under the header, fits ``room`` points
    (a row too tall for a page alone gets a page of its own).

    Each chunk takes rows while the table so far fits, as filling a page row by row does; the
    table's height only grows with each row added (every row is points tall), so the last row
    that fits is found by doubling the rows tried and then halving between the last fit and the
    first miss: the same chunks from a few trial tables a page instead of one per row."""
    width = sum(col_widths)

    def fits(start, end):
        _, height = styled_table([header] + rows[start:end], col_widths, font_size).wrap(width, 10_000)
        return height <= room

    pages, start = [], 0
    while start < len(rows):
        good, step = start + 1, 1  # the first row of a page is taken whatever its height
        bad = None
        while bad is None and good < len(rows):
            trial = min(len(rows), good + step)
            if fits(start, trial):
                good, step = trial, 2 * step
            else:
                bad = trial
        while bad is not None and bad - good > 1:
            mid = (good + bad) // 2
            if fits(start, mid):
                good = mid
            else:
                bad = mid
        pages.append(rows[start:good])
        start = good
    return pages or [[]]


def paragraph_height(text, size, width, leading=None, font=FONT):
    return len(wrap(text, size, width, font)) * (leading or size * 1.3)


def text_box(x, y, text, size, font=FONT, anchor="start"):
    """(x0, y0, x1, y1) [pt] that ``text`` covers when drawn at baseline (x, y)."""
    wd = text_width(text, size, font)
    x0 = x - wd if anchor == "end" else x - wd / 2 if anchor == "middle" else x
    return (x0, y - 0.25 * size, x0 + wd, y + 0.78 * size)


NEAR_PT = 1e-3
"""Points a label's box is widened by when telling which lines lie clear of it."""


def _seg_hits_box(a, b, box):
    (ax, ay), (bx, by) = a, b
    x0, y0, x1, y1 = box
    dx, dy = bx - ax, by - ay
    t0, t1 = 0.0, 1.0
    for p, q in ((-dx, ax - x0), (dx, x1 - ax), (-dy, ay - y0), (dy, y1 - ay)):
        if p == 0:
            if q < 0:
                return False
            continue
        t = q / p
        if p < 0:
            t0 = max(t0, t)
        else:
            t1 = min(t1, t)
        if t0 > t1:
            return False
    return True


class Placer:
    """Places labels where no drawn line or other label is: the first free candidate wins.

    Register every line (``line``) and fixed box (``block``) first, then ``place`` labels.
    ``bounds`` (x0, y0, x1, y1) [pt] keeps labels on the page (inside the safe margin).
    """

    def __init__(self, bounds, pad=0.8):
        self.bounds = bounds
        self.boxes = []
        self.segs = []
        self.pad = pad

    def line(self, a, b):
        self.segs.append((a, b))

    def block(self, box):
        self.boxes.append(box)

    def free(self, box):
        p = self.pad
        bx = (box[0] - p, box[1] - p, box[2] + p, box[3] + p)
        x0, y0, x1, y1 = self.bounds
        if box[0] < x0 or box[2] > x1 or box[1] < y0 or box[3] > y1:
            return False
        if any(bx[0] < o[2] and o[0] < bx[2] and bx[1] < o[3] and o[1] < bx[3] for o in self.boxes):
            return False
        # a line whose own extent stays NEAR_PT clear of the box cannot cross it (the clip's
        # rounding is some 1e-13 pt): only the others go through the clip, with the same answer
        left, bottom, right, top = bx[0] - NEAR_PT, bx[1] - NEAR_PT, bx[2] + NEAR_PT, bx[3] + NEAR_PT
        for a, b in self.segs:
            if ((a[0] < left and b[0] < left) or (a[0] > right and b[0] > right)
                    or (a[1] < bottom and b[1] < bottom) or (a[1] > top and b[1] > top)):
                continue
            if _seg_hits_box(a, b, bx):
                return False
        return True

    def _leader_free(self, a, b):
        return not any(_seg_hits_box(a, b, o) for o in self.boxes)

    def place(self, c, candidates, size, font=FONT, leader_from=None):
        """Draw the first candidate (x, y, text, anchor) that is free; returns it, or None.

        With ``leader_from`` (x, y), a thin leader line runs from there to the label's top edge;
        it must not cross another label either, and later labels keep clear of it.
        """
        for x, y, text, anchor in candidates:
            box = text_box(x, y, text, size, font, anchor)
            if self.free(box):
                if leader_from is not None:
                    end = (min(max(leader_from[0], box[0] + 1), box[2] - 1), box[3] + 0.3)
                    if not self._leader_free(leader_from, end):
                        continue
                    c.setLineWidth(0.25)
                    c.setStrokeColor(colors.black)
                    c.line(leader_from[0], leader_from[1], end[0], end[1])
                    self.line(leader_from, end)
                c.setFont(font, size)
                {"start": c.drawString, "end": c.drawRightString, "middle": c.drawCentredString}[anchor](x, y, text)
                self.block(box)
                return (x, y, text, anchor)
        return None

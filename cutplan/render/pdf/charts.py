"""Chart pages: finished length against pitch, and each piece's partials.

Labels are placed where no line or other label is (``Placer``); a label with no free place is
left off the chart (every number is also in the tables).
"""

from __future__ import annotations

import math

from reportlab.lib import colors

from cutplan.render.pdf.base import BOLD, FONT, LIGHT, SAFE, Placer, heading, mm
from cutplan.units import INCH, MM

__all__ = ["ROWS_FIRST", "ROWS_MORE", "nice_step", "ROUND_HZ_STEPS", "MIN_HZ_TICKS", "round_hz", "charts"]

ROWS_FIRST = 12
"""Spectrum rows on the chart page."""
ROWS_MORE = 20
"""Spectrum rows on each continued page."""


def _log_x(f, f_lo, f_hi, x0, width):
    return x0 + width * math.log(f / f_lo) / math.log(f_hi / f_lo)


def nice_step(raw):
    """A round axis step (1, 2 or 5 times a power of ten) near ``raw``.

    >>> nice_step(37.0)
    50.0
    """
    power = 10 ** math.floor(math.log10(raw))
    return float(min((m * power for m in (1, 2, 5, 10)), key=lambda v: abs(v - raw)))


ROUND_HZ_STEPS = ((1, 2, 5), (1, 2, 3, 5, 7), (1, 1.5, 2, 3, 4, 5, 6, 7, 8, 9))
"""Mantissas tried for the pitch axis, coarsest first, until it has MIN_HZ_TICKS ticks."""
MIN_HZ_TICKS = 4


def round_hz(f_lo, f_hi, min_gap=0.0):
    """Round frequencies (1, 2, 5 x 10^n Hz, finer when that gives fewer than MIN_HZ_TICKS) inside
    the range, for the pitch axis; neighbours at least ``min_gap`` apart in log10 units.

    >>> round_hz(230.0, 1200.0)
    [300.0, 500.0, 700.0, 1000.0]
    """
    out = []
    for steps in ROUND_HZ_STEPS:
        out = []
        for power in range(int(math.floor(math.log10(f_lo))), int(math.ceil(math.log10(f_hi))) + 1):
            for m in steps:
                f = m * 10.0 ** power
                if f_lo <= f <= f_hi and (not out or math.log10(f / out[-1]) >= min_gap):
                    out.append(f)
        if len(out) >= MIN_HZ_TICKS:
            return out
    return out


def _marker(c, shape, x, y, r=2.2):
    c.setFillColor(colors.black)
    if shape == "circle":
        c.circle(x, y, r, fill=1, stroke=0)
        return
    if shape == "square":
        c.rect(x - r, y - r, 2 * r, 2 * r, fill=1, stroke=0)
        return
    pts = [(x, y + r), (x - r, y - r), (x + r, y - r)] if shape == "triangle" else \
        [(x, y + r), (x - r, y), (x, y - r), (x + r, y)]
    p = c.beginPath()
    p.moveTo(*pts[0])
    for q in pts[1:]:
        p.lineTo(*q)
    p.close()
    c.drawPath(p, fill=1, stroke=0)


def _length_chart(c, page, plan, y_top, chart_h):
    unit, factor = ("in", INCH) if plan.units == "in" else ("mm", MM)
    x0, width = page.left + 16 * mm, page.width - 18 * mm
    pieces = plan.pieces
    f_lo = min(p.target_hz for p in pieces) / 1.15
    f_hi = max(p.target_hz for p in pieces) * 1.15
    l_hi = max(p.length for p in pieces) / factor * 1.1
    step = nice_step(l_hi / 5)
    l_hi = step * math.ceil(l_hi / step)
    base = y_top - chart_h
    placer = Placer((page.left - 9 * mm, base - 20, page.w - SAFE, y_top))
    c.setStrokeColor(colors.black)
    c.setLineWidth(0.6)
    c.rect(x0, base, width, chart_h)
    for a, b in (((x0, base), (x0 + width, base)), ((x0, base + chart_h), (x0 + width, base + chart_h)),
                 ((x0, base), (x0, base + chart_h)), ((x0 + width, base), (x0 + width, base + chart_h))):
        placer.line(a, b)
    c.setFont(FONT, 7)
    for k in range(int(round(l_hi / step)) + 1):
        val = step * k
        yy = base + chart_h * val / l_hi
        c.setStrokeColor(LIGHT)
        c.line(x0, yy, x0 + width, yy)
        placer.line((x0, yy), (x0 + width, yy))
        placer.place(c, [(x0 - 2, yy - 2, f"{val:g}", "end")], 7)
    for f in round_hz(f_lo, f_hi, math.log10(f_hi / f_lo) * 16 * mm / width):  # labels 16 mm apart or more
        xx = _log_x(f, f_lo, f_hi, x0, width)
        c.setStrokeColor(LIGHT)
        c.line(xx, base, xx, base + chart_h)
        placer.line((xx, base), (xx, base + chart_h))
        placer.place(c, [(xx, base - 9, f"{f:g} Hz", "middle")], 7)
    c.setStrokeColor(colors.black)
    c.saveState()
    c.translate(page.left + 2 * mm, base + chart_h / 2)
    c.rotate(90)
    c.setFont(FONT, 7)
    c.drawCentredString(0, 0, f"finished length, {unit}")
    c.restoreState()
    c.setFont(FONT, 7)
    c.drawCentredString(x0 + width / 2, base - 18, "pitch (log scale): each piece is a point")
    placer.block((x0 + width / 2 - 80, base - 20, x0 + width / 2 + 80, base - 11))
    markers = ["circle", "square", "triangle", "diamond"]
    points, legends = [], []
    for k, s in enumerate(plan.sets):
        shape = markers[k % len(markers)]
        prev = None
        for p in s.pieces:
            px = _log_x(p.target_hz, f_lo, f_hi, x0, width)
            py = base + chart_h * (p.length / factor) / l_hi
            c.setStrokeColor(colors.black)
            if prev:
                c.setLineWidth(0.5)
                c.line(prev[0], prev[1], px, py)
                placer.line(prev, (px, py))
            _marker(c, shape, px, py)
            placer.block((px - 2.4, py - 2.4, px + 2.4, py + 2.4))
            points.append((px, py, p.note))
            prev = (px, py)
        legends.append((shape, f"{s.name} ({s.kind})", k))
    for shape, text, k in legends:  # the key goes in a free corner of the chart
        for lx, ly in ((x0 + width - 55 * mm, y_top - 6 - 10 * k), (x0 + 4 * mm, base + 6 + 10 * k),
                       (x0 + width - 55 * mm, base + 6 + 10 * k), (x0 + 4 * mm, y_top - 6 - 10 * k)):
            if placer.free((lx - 2.4, ly - 2.4, lx + 2.4, ly + 2.4)) and placer.place(
                    c, [(lx + 3 * mm, ly - 2.5, text, "start")], 8):
                _marker(c, shape, lx, ly)
                placer.block((lx - 2.4, ly - 2.4, lx + 2.4, ly + 2.4))
                break
    for px, py, note in points:
        placer.place(c, [(px + 3, py + 3, note, "start"), (px - 3, py - 8, note, "end"),
                         (px + 3, py - 8, note, "start"), (px - 3, py + 3, note, "end"),
                         (px, py + 5, note, "middle"), (px, py - 10, note, "middle"),
                         (px, py + 11, note, "middle"), (px, py - 16, note, "middle"),
                         (px + 6, py - 3, note, "start"), (px - 6, py - 3, note, "end"),
                         (px + 5, py + 9, note, "start"), (px - 5, py - 14, note, "end")], 6.5)
    return base - 34


def _spectra(c, page, pieces, y_top, row_h=11 * mm):
    """Small spectra: one row per piece, a bar at each partial on a log axis from 0.8 f1 to 1.25 fN,
    labelled with frequency, nearest note and cents where there is room."""
    x0 = page.left + 28 * mm
    width = page.width - 30 * mm
    placer = Placer((page.left, SAFE + 6 * mm, page.w - SAFE, y_top + 2))
    labels = []
    for i, p in enumerate(pieces):
        base = y_top - (i + 1) * row_h
        f_lo, f_hi = p.partials_hz[0] * 0.8, p.partials_hz[-1] * 1.25
        c.setFillColor(colors.black)
        placer.place(c, [(page.left, base + 3, f"{p.label} {p.note}", "start")], 7.5, BOLD)
        c.setStrokeColor(colors.Color(0.55, 0.55, 0.55))
        c.setLineWidth(0.3)
        c.line(x0, base, x0 + width, base)
        placer.line((x0, base), (x0 + width, base))
        c.setStrokeColor(colors.black)
        for k, (f, (name, cents)) in enumerate(zip(p.partials_hz, p.partial_notes, strict=True)):
            x = _log_x(f, f_lo, f_hi, x0, width)
            height = row_h * 0.75 / (1 + 0.5 * k)
            c.setLineWidth(2.2)
            c.line(x, base, x, base + height)
            placer.block((x - 1.3, base, x + 1.3, base + height))
            full, short = f"{f:.0f} Hz {name} {cents:+.0f}c", f"{f:.0f}"
            labels.append([(x + 2.6, yy, t, "start") for t in (full, short) for yy in (base + height - 5, base + 3)]
                          + [(x - 2.6, base + 3, t, "end") for t in (full, short)])
    for cands in labels:
        placer.place(c, cands, 6.5)
    bottom = y_top - len(pieces) * row_h - 9
    placer.place(c, [(x0, bottom, "each row: log frequency from 0.8 x the lowest partial; "
                      "taller bars are lower partials", "start")], 6.5)


def charts(packet):
    plan = packet.plan

    def draw(c, page):
        y = heading(c, page, "Length against pitch")
        y = _length_chart(c, page, plan, y, 75 * mm)
        c.setFont(BOLD, 12)
        c.drawString(page.left, y, "Partials of each piece (nearest note and cents)")
        _spectra(c, page, plan.pieces[:ROWS_FIRST], y - 4 * mm)

    packet.add(draw)
    rest = plan.pieces[ROWS_FIRST:]
    for k in range(0, len(rest), ROWS_MORE):
        def more(c, page, group=rest[k:k + ROWS_MORE]):
            y = heading(c, page, "Partials of each piece (continued)")
            _spectra(c, page, group, y)
        packet.add(more)

"""Plan -> the printable shop packet (PDF, reportlab).

Pages: cover (what is built, assumptions, cautions, how to use), cut list, tuning sheet,
length-pitch charts and partial spectra, stock layout, then full-scale templates (marking
strips tiled across sheets, wrap guides, hanging plates) with a 100 mm and a 4 in calibration
ruler on every template page.  The same plan gives a byte-identical file (``invariant=1``).

PDF points appear only in this module; template geometry is drawn in millimetres through
``reportlab.lib.units.mm``.  Nothing here computes physics.
"""

from __future__ import annotations

import io
import math

from reportlab.lib import colors
from reportlab.lib.pagesizes import A4, letter
from reportlab.lib.units import inch, mm
from reportlab.pdfgen.canvas import Canvas
from reportlab.platypus import Table, TableStyle

from cutplan import advice
from cutplan.render import marks as mk
from cutplan.units import MM, format_inches

MARGIN = 15 * mm
TEMPLATE_MARGIN = 12 * mm
OVERLAP_MM = 20.0
"""Overlap of tiled template sheets [mm]."""
STRIP_H_MM = 16.0
STRIP_PITCH_MM = 42.0
RULER_TOP = 34 * mm
"""Top line of the upper (100 mm) calibration ruler, from the bottom of the page."""
GREY = colors.Color(0.55, 0.55, 0.55)
LIGHT = colors.Color(0.88, 0.88, 0.88)

CAUTIONS = (
    "Wear eye protection when cutting, drilling and filing; wear hearing protection when cutting metal "
    "and when striking loud bars and bells close to the ear.",
    "Clamp stock before cutting. Deburr every cut tube end and drilled hole inside and out: fresh metal "
    "edges cut skin.",
    "PVC: cut in a ventilated place, collect and vacuum the dust, never heat, burn or solvent-weld near "
    "flames; do not sand PVC without a dust mask.",
    "Anything hung overhead: use hardware rated for the load with a generous safety factor, check it "
    "every season, and follow local building codes and licensed practice for fixings into structures.",
    "Keep small parts, cords and heavy tubes away from small children; long steel tubes are heavy and "
    "swing hard in wind.",
)

HOW_TO_USE = (
    "Cut each piece long, at its rough-cut length (the allowance shown), never at the finished length.",
    "Mark and drill hang holes or set supports at the node positions measured from the reference end.",
    "Strike the piece, measure its pitch with a tuner or `cutplan measure`, and record it on the tuning sheet.",
    "Flat (too low): trim a little from the trim end, using cents per mm as a guide; trim in small steps.",
    "Sharp (too high): a tube or column cannot be lengthened; see the sharp advice on the tuning sheet.",
    "Tick cut, drilled and tuned on the cut list as you go.",
)


def _paper(paper):
    return A4 if paper == "a4" else letter


def _both(metres):
    return f"{metres / MM:.1f} mm", format_inches(metres, 32, show_error=False)


class _Packet:
    """Collects page-drawing functions so that page numbers can say "page X of N"."""

    def __init__(self, plan, paper):
        self.plan = plan
        self.size = _paper(paper)
        self.pages = []

    def add(self, draw, template=False):
        self.pages.append((draw, template))

    def render(self):
        buf = io.BytesIO()
        c = Canvas(buf, pagesize=self.size, invariant=1, pageCompression=1)
        c.setTitle(f"{self.plan.title}: shop packet")
        c.setAuthor("cutplan")
        c.setCreator("cutplan")
        c.setSubject("cut plan")
        total = len(self.pages)
        for number, (draw, template) in enumerate(self.pages, start=1):
            self._frame(c, number, total, template)
            draw(c)
            c.showPage()
        c.save()
        return buf.getvalue()

    def _frame(self, c, number, total, template):
        w, h = self.size
        c.setFont("Helvetica-Bold", 9)
        c.drawString(MARGIN if not template else TEMPLATE_MARGIN, h - 10 * mm, self.plan.title)
        c.setFont("Helvetica", 8)
        c.drawRightString(w - (MARGIN if not template else TEMPLATE_MARGIN), h - 10 * mm, "cutplan shop packet")
        text = f"page {number} of {total}"
        if template:
            text = "TEMPLATE - print at actual size (100 %, no fit-to-page); check the rulers.   " + text
        c.drawRightString(w - (MARGIN if not template else TEMPLATE_MARGIN), 7 * mm, text)


def _heading(c, packet, text, y=None):
    w, h = packet.size
    y = h - 22 * mm if y is None else y
    c.setFont("Helvetica-Bold", 16)
    c.drawString(MARGIN, y, text)
    return y - 8 * mm


def _wrap(text, width_chars):
    words, lines, line = text.split(), [], ""
    for word in words:
        if len(line) + len(word) + 1 > width_chars:
            lines.append(line)
            line = word
        else:
            line = f"{line} {word}".strip()
    if line:
        lines.append(line)
    return lines


def _fit(text, chars):
    """Break a long word (a label) into lines of at most ``chars`` characters for a table cell."""
    return "\n".join(text[i:i + chars] for i in range(0, len(text), chars)) or text


def _paragraph(c, x, y, text, size=10, width_chars=95, leading=None):
    c.setFont("Helvetica", size)
    leading = leading or size * 1.3
    for line in _wrap(text, width_chars):
        c.drawString(x, y, line)
        y -= leading
    return y


def _cover(packet):
    plan = packet.plan

    def draw(c):
        w, h = packet.size
        y = h - 30 * mm
        c.setFont("Helvetica-Bold", 22)
        c.drawString(MARGIN, y, plan.title[:60])
        y -= 10 * mm
        c.setFont("Helvetica", 11)
        c.drawString(MARGIN, y, f"Shop packet: {len(plan.pieces)} pieces in {len(plan.sets)} set(s)")
        y -= 10 * mm
        c.setFont("Helvetica-Bold", 12)
        c.drawString(MARGIN, y, "What is being built")
        y -= 6 * mm
        for s in plan.sets:
            notes = ", ".join(p.note for p in s.pieces[:12]) + (" and more" if len(s.pieces) > 12 else "")
            y = _paragraph(c, MARGIN, y, f"{s.name}: {len(s.pieces)} x {s.kind} in {s.material}, {s.section_text}. "
                           f"Notes: {notes}.", 10)
            y -= 1 * mm
        if plan.cut_list is not None:
            sticks = ", ".join(f"{n} x {length / MM:.0f} mm "
                               f"({format_inches(length, 16, show_error=False)})"
                               for length, n in plan.cut_list.sticks_by_length)
            y = _paragraph(c, MARGIN, y, f"Stock needed: {sticks}.", 10)
        y -= 4 * mm
        c.setFont("Helvetica-Bold", 12)
        c.drawString(MARGIN, y, "The lengths depend on these assumptions")
        y -= 6 * mm
        y = _paragraph(c, MARGIN, y, f"Reference pitch A4 = {plan.a4:g} Hz; {plan.temperament} temperament.", 10)
        for s in plan.sets:
            for a in s.assumptions:
                y = _paragraph(c, MARGIN, y, f"{s.name}: {a}.", 10)
        y -= 4 * mm
        box_top = y + 4 * mm
        c.setFont("Helvetica-Bold", 12)
        c.drawString(MARGIN + 3 * mm, y - 2 * mm, "Cautions")
        y -= 8 * mm
        for line in CAUTIONS:
            y = _paragraph(c, MARGIN + 3 * mm, y, "- " + line, 9.5, 100)
        c.setStrokeColor(colors.black)
        c.setLineWidth(1.2)
        c.rect(MARGIN, y - 1 * mm, w - 2 * MARGIN, box_top - y + 1 * mm)
        y -= 8 * mm
        c.setFont("Helvetica-Bold", 12)
        c.drawString(MARGIN, y, "How to use this packet")
        y -= 6 * mm
        for i, line in enumerate(HOW_TO_USE, start=1):
            y = _paragraph(c, MARGIN, y, f"{i}. {line}", 10)

    packet.add(draw)


def _styled_table(data, col_widths, font_size):
    table = Table(data, colWidths=col_widths, repeatRows=1)
    table.setStyle(TableStyle([
        ("FONT", (0, 0), (-1, 0), "Helvetica-Bold", font_size),
        ("FONT", (0, 1), (-1, -1), "Helvetica", font_size),
        ("GRID", (0, 0), (-1, -1), 0.4, colors.black),
        ("VALIGN", (0, 0), (-1, -1), "MIDDLE"),
        ("BACKGROUND", (0, 0), (-1, 0), LIGHT),
        ("LEFTPADDING", (0, 0), (-1, -1), 2.5),
        ("RIGHTPADDING", (0, 0), (-1, -1), 2.5),
        ("TOPPADDING", (0, 0), (-1, -1), 3.5),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 3.5),
    ]))
    return table


def _table(c, data, col_widths, x, y_top, font_size=9):
    table = _styled_table(data, col_widths, font_size)
    _, height = table.wrapOn(c, sum(col_widths), 1000)
    table.drawOn(c, x, y_top - height)
    return y_top - height


def _pages(header, rows, col_widths, font_size, room):
    """Split table rows into page-sized chunks: each chunk, under the header, fits ``room`` points."""
    pages, current = [], []
    for row in rows:
        trial = current + [row]
        _, height = _styled_table([header] + trial, col_widths, font_size).wrap(sum(col_widths), 10_000)
        if height > room and current:
            pages.append(current)
            current = [row]
        else:
            current = trial
    pages.append(current)
    return pages


def _cut_list(packet):
    plan = packet.plan
    w, h = packet.size
    widths = [w * f for f in (0.12, 0.06, 0.07, 0.13, 0.13, 0.13, 0.06, 0.05, 0.06, 0.05)]
    widths = [x * (w - 2 * MARGIN) / sum(widths) for x in widths]
    for s in plan.sets:
        pieces = sorted(s.pieces, key=lambda p: -p.length)
        node_head = {"chime": "hang hole\nfrom top", "bar": "supports\nfrom end"}.get(s.kind, "")
        header = ["label", "note", "Hz", "finished", "cut at", node_head or "-", "mass", "cut", "drilled", "tuned"]
        rows = []
        for p in pieces:
            fin_mm, fin_in = _both(p.length)
            cut_mm, cut_in = _both(p.cut_length)
            node = "\n".join(_both(p.nodes[0])) if p.nodes else "-"
            mass = f"{p.mass * 1000:.0f} g" if p.mass is not None else "-"
            rows.append([_fit(p.label, 13), p.note, f"{p.target_hz:.2f}", f"{fin_mm}\n{fin_in}", f"{cut_mm}\n{cut_in}",
                         node, mass, "", "", ""])
        chunks = _pages(header, rows, widths, 10, h - 52 * mm)
        n = len(chunks)
        for k, chunk in enumerate(chunks, start=1):
            def draw(c, chunk=chunk, k=k, n=n, s=s, header=header):
                more = f" ({k} of {n})" if n > 1 else ""
                y = _heading(c, packet, f"Cut list: {s.name}{more}")
                c.setFont("Helvetica", 9)
                c.drawString(MARGIN, y, f"{s.kind}, {s.material}, {s.section_text}; longest first. "
                             "Cut at the 'cut at' length, then trim to pitch (trimming raises the pitch).")
                _table(c, [header] + chunk, widths, MARGIN, y - 4 * mm, 10)
            packet.add(draw)


def _tuning(packet):
    plan = packet.plan
    header = ["label", "note", "target\nHz", "cents\nper mm", "mm per\n10 cents", "cut long by", "trim from",
              "if sharp", "measured\nbefore", "measured\nafter"]
    rows = []
    for p in plan.pieces:
        per10 = 10 / p.cents_per_mm if p.cents_per_mm else float("nan")
        allowance = (f"uncalibrated:\n+{p.allowance_uncalibrated * 1000:.1f} mm\n"
                     f"after a test\npiece: +{p.allowance_calibrated * 1000:.1f} mm")
        rows.append([_fit(p.label, 10), p.note, f"{p.target_hz:.2f}", f"{p.cents_per_mm:.2f}", f"{per10:.2f}", allowance,
                     "\n".join(_wrap(advice.trim_from(p.kind, p.model), 14)),
                     "\n".join(_wrap(advice.sharp_action(p.kind), 20)),
                     "", ""])
    w, h = packet.size
    widths = [x * (w - 2 * MARGIN) for x in (0.09, 0.05, 0.075, 0.075, 0.075, 0.13, 0.135, 0.17, 0.10, 0.10)]
    chunks = _pages(header, rows, widths, 8.5, h - 75 * mm)
    n = len(chunks)
    for k, chunk in enumerate(chunks, start=1):
        def draw(c, chunk=chunk, k=k, n=n):
            y = _heading(c, packet, "Tuning sheet" + (f" ({k} of {n})" if n > 1 else ""))
            y = _paragraph(c, MARGIN, y, "Trim in small steps: take off a third of the computed amount, strike, "
                           "measure, repeat. A piece that is flat by 10 cents needs about the 'mm per 10 cents' "
                           "shown. Air columns also drift about 3 cents per degree C: tune at the temperature "
                           "they will be played in. 'Cut long by' is the allowance that keeps the chance of a "
                           "piece coming out sharp (too short) to 5 %, from the spreads of the material and "
                           "stock tables; after one test piece is measured (cutplan calibrate) it shrinks to "
                           "the second figure.", 9, 110)
            _table(c, [header] + chunk, widths, MARGIN, y - 2 * mm, 8.5)
        packet.add(draw)


def _log_x(f, f_lo, f_hi, x0, width):
    return x0 + width * math.log(f / f_lo) / math.log(f_hi / f_lo)


def _charts(packet):
    plan = packet.plan

    def draw(c):
        w, h = packet.size
        y = _heading(c, packet, "Length against pitch")
        chart_h = 75 * mm
        x0, width = MARGIN + 15 * mm, w - 2 * MARGIN - 20 * mm
        pieces = plan.pieces
        f_lo = min(p.target_hz for p in pieces) / 1.15
        f_hi = max(p.target_hz for p in pieces) * 1.15
        l_hi = max(p.length for p in pieces) / MM * 1.1
        base = y - chart_h
        c.setLineWidth(0.6)
        c.rect(x0, base, width, chart_h)
        c.setFont("Helvetica", 7)
        step = _nice_step(l_hi / 5)
        l_hi = step * math.ceil(l_hi / step)
        for k in range(int(round(l_hi / step)) + 1):
            val = step * k
            yy = base + chart_h * val / l_hi
            c.setStrokeColor(LIGHT)
            c.line(x0, yy, x0 + width, yy)
            c.setStrokeColor(colors.black)
            c.drawRightString(x0 - 2, yy - 2, f"{val:.0f}")
        c.saveState()
        c.translate(MARGIN + 2 * mm, base + chart_h / 2)
        c.rotate(90)
        c.drawCentredString(0, 0, "finished length, mm")
        c.restoreState()
        c_note = 16.351597831287414  # C0 in Hz at A4 = 440 (12-TET), used only to place grid lines
        f = c_note * 2 ** math.floor(math.log2(f_lo / c_note))
        while f < f_hi:
            for part, label in ((1.0, "C"), (2 ** (9 / 12), "A")):
                g = f * part * plan.a4 / 440.0
                if f_lo <= g <= f_hi:
                    xx = _log_x(g, f_lo, f_hi, x0, width)
                    c.setStrokeColor(LIGHT)
                    c.line(xx, base, xx, base + chart_h)
                    c.setStrokeColor(colors.black)
                    octave = int(round(math.log2(f / c_note)))
                    c.drawCentredString(xx, base - 9, f"{label}{octave} {g:.0f} Hz")
            f *= 2
        c.drawCentredString(x0 + width / 2, base - 18, "pitch (log scale): each piece is a point")
        markers = ["circle", "square", "triangle", "diamond"]
        for k, s in enumerate(plan.sets):
            shape = markers[k % len(markers)]
            prev = None
            for p in s.pieces:
                px = _log_x(p.target_hz, f_lo, f_hi, x0, width)
                py = base + chart_h * (p.length / MM) / l_hi
                if prev:
                    c.setLineWidth(0.5)
                    c.line(prev[0], prev[1], px, py)
                _marker(c, shape, px, py)
                c.setFont("Helvetica", 6.5)
                c.drawString(px + 3, py + 3, p.note)
                prev = (px, py)
            _marker(c, shape, x0 + width - 50 * mm, y - 6 - 10 * k)
            c.setFont("Helvetica", 8)
            c.drawString(x0 + width - 47 * mm, y - 8 - 10 * k, f"{s.name} ({s.kind})")
        y = base - 28
        c.setFont("Helvetica-Bold", 12)
        c.drawString(MARGIN, y, "Partials of each piece (nearest note and cents)")
        y -= 6 * mm
        _spectra(c, packet, pieces[:12], y)

    packet.add(draw)
    rest = plan.pieces[12:]
    for k in range(0, len(rest), 20):
        def more(c, group=rest[k:k + 20]):
            w, h = packet.size
            y = _heading(c, packet, "Partials of each piece (continued)")
            _spectra(c, packet, group, y)
        packet.add(more)


def _nice_step(raw):
    """A round axis step (1, 2 or 5 times a power of ten) near ``raw``."""
    power = 10 ** math.floor(math.log10(raw))
    return min((m * power for m in (1, 2, 5, 10)), key=lambda v: abs(v - raw))


def _marker(c, shape, x, y, r=2.2):
    c.setFillColor(colors.black)
    if shape == "circle":
        c.circle(x, y, r, fill=1, stroke=0)
    elif shape == "square":
        c.rect(x - r, y - r, 2 * r, 2 * r, fill=1, stroke=0)
    elif shape == "triangle":
        p = c.beginPath()
        p.moveTo(x, y + r)
        p.lineTo(x - r, y - r)
        p.lineTo(x + r, y - r)
        p.close()
        c.drawPath(p, fill=1, stroke=0)
    else:
        p = c.beginPath()
        p.moveTo(x, y + r)
        p.lineTo(x - r, y)
        p.lineTo(x, y - r)
        p.lineTo(x + r, y)
        p.close()
        c.drawPath(p, fill=1, stroke=0)


def _spectra(c, packet, pieces, y_top):
    """Small spectra: one row per piece, a bar at each partial on a log axis from 0.8 f1 to 1.25 f4,
    labelled with frequency, nearest note and cents."""
    w, h = packet.size
    row_h = 11 * mm
    x0 = MARGIN + 28 * mm
    width = w - 2 * MARGIN - 45 * mm
    for i, p in enumerate(pieces):
        base = y_top - (i + 1) * row_h
        if base < 15 * mm:
            break
        f_lo, f_hi = p.partials_hz[0] * 0.8, p.partials_hz[-1] * 1.25
        c.setFont("Helvetica-Bold", 7.5)
        c.drawString(MARGIN, base + 3, f"{p.label} {p.note}")
        c.setStrokeColor(GREY)
        c.setLineWidth(0.3)
        c.line(x0, base, x0 + width, base)
        c.setStrokeColor(colors.black)
        for k, (f, (name, cents)) in enumerate(zip(p.partials_hz, p.partial_notes, strict=True)):
            x = _log_x(f, f_lo, f_hi, x0, width)
            height = row_h * 0.75 / (1 + 0.5 * k)
            c.setLineWidth(2.2)
            c.line(x, base, x, base + height)
            c.setFont("Helvetica", 6.5)
            c.drawString(x + 2, base + height - 5, f"{f:.0f} Hz {name} {cents:+.0f}c")
    c.setFont("Helvetica", 6.5)
    c.drawString(x0, y_top - min(len(pieces), 30) * row_h - 9,
                 "each row: log frequency from 0.8 x the lowest partial; taller bars are lower partials")


def _stock_page(packet):
    plan = packet.plan
    cut_list = plan.cut_list
    if cut_list is None:
        return
    sticks = cut_list.sticks
    per_page = 10
    for k in range(0, len(sticks), per_page):
        def draw(c, group=sticks[k:k + per_page], first=k):
            w, h = packet.size
            y = _heading(c, packet, "Stock layout")
            status = "proven optimal" if cut_list.proven_optimal else "best found (not proven optimal)"
            y = _paragraph(c, MARGIN, y, f"Layout {status}; lower bound {cut_list.lower_bound} sticks; "
                           f"utilisation {100 * cut_list.utilisation:.1f} %. Marks are measured "
                           "from each stick's factory end, after squaring it.", 9, 110)
            longest = max(s.stock_length for s in sticks) / MM
            width = w - 2 * MARGIN
            for i, stick in enumerate(group):
                base = y - (i + 1) * 20 * mm
                scale = width / longest
                c.setFont("Helvetica-Bold", 8)
                c.drawString(MARGIN, base + 11 * mm, f"stick {first + i + 1}: {stick.stock_length / MM:.0f} mm "
                             f"({format_inches(stick.stock_length, 16, show_error=False)})  {stick.group}")
                c.setLineWidth(0.6)
                c.setFillColor(colors.white)
                c.rect(MARGIN, base, stick.stock_length / MM * scale, 8 * mm, fill=1)
                for cut in stick.cuts:
                    x = MARGIN + cut.start / MM * scale
                    c.setFillColor(LIGHT)
                    c.rect(x, base, cut.length / MM * scale, 8 * mm, fill=1)
                    c.setFillColor(colors.black)
                    c.setFont("Helvetica", 6.5)
                    c.drawString(x + 1.5, base + 4.5 * mm, cut.label[:14])
                    c.drawString(x + 1.5, base + 1.2 * mm, f"at {cut.start / MM:.0f}")
                c.setFont("Helvetica", 6.5)
                c.drawRightString(MARGIN + stick.stock_length / MM * scale, base - 3 * mm,
                                  f"offcut {stick.offcut / MM:.0f} mm")
        packet.add(draw)


def _rulers(c, x, y):
    """100 mm and 4 in calibration rulers, one above the other, at (x, y) in points (top line)."""
    c.setStrokeColor(colors.black)
    c.setLineWidth(0.3)
    c.setFont("Helvetica", 7)
    c.drawString(x, y + 2 * mm, "100 mm: this ruler must measure exactly 100 mm")
    c.line(x, y, x + 100 * mm, y)
    for i in range(0, 101):
        tick = 6 if i % 50 == 0 else 4 if i % 10 == 0 else 2
        c.line(x + i * mm, y, x + i * mm, y - tick * mm)
    y2 = y - 14 * mm
    c.drawString(x, y2 + 2 * mm, "4 in: this ruler must measure exactly 4 inches")
    c.line(x, y2, x + 4 * inch, y2)
    for i in range(0, 65):
        tick = 6 if i % 32 == 0 else 4 if i % 16 == 0 else 3 if i % 8 == 0 else 1.6
        c.line(x + i * inch / 16, y2, x + i * inch / 16, y2 - tick * mm)


def _strip(c, piece, start_mm, end_mm, x0, y0, sheet, sheets):
    """Draw one tile of a marking strip; x0, y0 in points at strip coordinate start_mm."""
    length = piece.length / MM

    def X(at_mm):
        return x0 + (at_mm - start_mm) * mm

    top = y0 + STRIP_H_MM * mm
    c.setLineWidth(0.4)
    c.setStrokeColor(colors.black)
    lo, hi = max(start_mm, 0.0), min(end_mm, length)
    if hi > lo:
        c.rect(X(lo), y0, (hi - lo) * mm, STRIP_H_MM * mm)
    # overlap zones, shaded, so the sheets can be taped edge to edge at the same ticks
    c.setFillColor(LIGHT)
    if sheet > 1:
        c.rect(X(start_mm), y0 - 3 * mm, OVERLAP_MM * mm, 2 * mm, fill=1, stroke=0)
    if sheet < sheets:
        c.rect(X(end_mm - OVERLAP_MM), y0 - 3 * mm, OVERLAP_MM * mm, 2 * mm, fill=1, stroke=0)
    c.setFillColor(colors.black)
    # 10 mm ticks with numbers every 50 mm along the piece (alignment across sheets)
    c.setLineWidth(0.25)
    first = math.ceil(start_mm / 10) * 10
    for at in range(int(first), int(end_mm) + 1, 10):
        tick = 4 if at % 50 == 0 else 2
        c.line(X(at), y0, X(at), y0 + tick * mm)
        if at % 50 == 0:
            c.setFont("Helvetica", 5.5)
            c.drawCentredString(X(at), y0 + 4.8 * mm, f"{at}")
    if sheet > 1 or sheet < sheets:
        for at in (start_mm + OVERLAP_MM / 2, end_mm - OVERLAP_MM / 2):
            if (at < start_mm + OVERLAP_MM and sheet > 1) or (at > end_mm - OVERLAP_MM and sheet < sheets):
                c.setLineWidth(0.3)
                c.line(X(at) - 2 * mm, y0 - 2 * mm, X(at) + 2 * mm, y0 - 2 * mm)
                c.line(X(at), y0 - 4 * mm, X(at), y0)
    marks = [m for m in mk.piece_marks(piece) if start_mm - 1e-6 <= m.at_mm <= end_mm + 1e-6]
    for n, m in enumerate(marks):
        x = X(m.at_mm)
        c.setStrokeColor(colors.black)
        if m.kind == "node":
            c.setLineWidth(0.25)
            c.line(x, y0 - 1 * mm, x, top + 6 * mm)
            c.line(x - 3 * mm, y0 + STRIP_H_MM * mm / 2, x + 3 * mm, y0 + STRIP_H_MM * mm / 2)
            c.circle(x, y0 + STRIP_H_MM * mm / 2, 2 * mm)
        elif m.kind == "centre":
            c.setLineWidth(0.25)
            c.setDash(2, 1.5)
            c.line(x, y0, x, top + 6 * mm)
            c.setDash()
        elif m.kind == "rough-cut":
            c.setLineWidth(0.25)
            c.setDash(0.8, 1.2)
            c.line(x, y0 - 1 * mm, x, top + 6 * mm)
            c.setDash()
        else:
            c.setLineWidth(0.8)
            c.line(x, y0 - 2 * mm, x, top + 6 * mm)
        c.setFont("Helvetica", 6.5)
        lane = top + (2.0 + 3.2 * (n % 3)) * mm
        if x > X(end_mm) - 45 * mm:
            c.drawRightString(x - 1.2, lane, m.label)
        else:
            c.drawString(x + 1.2, lane, m.label)
    c.setFont("Helvetica-Bold", 8)
    c.drawString(x0, y0 - 7 * mm, f"{piece.label}  {piece.note}  finished {length:.1f} mm "
                 f"({format_inches(piece.length, 32, show_error=False)})   sheet {sheet} of {sheets}")


def _profile_tile(c, piece, start_mm, end_mm, x0, y0, sheet, sheets):
    """One sheet of an arched bar's full-size side profile (top face at the top, arch below)."""
    arch = piece.arch
    t = arch.thickness / MM
    top = y0 + t * mm

    def X(at_mm):
        return x0 + (at_mm - start_mm) * mm

    pts = [(x / MM, hh / MM) for x, hh in arch.outline if start_mm - 1 <= x / MM <= end_mm + 1]
    c.setStrokeColor(colors.black)
    c.setLineWidth(0.4)
    lo, hi = max(start_mm, 0.0), min(end_mm, piece.length / MM)
    c.line(X(lo), top, X(hi), top)
    path = c.beginPath()
    first = True
    for x, hh in pts:
        x = min(max(x, lo), hi)
        if first:
            path.moveTo(X(x), top - hh * mm)
            first = False
        else:
            path.lineTo(X(x), top - hh * mm)
    c.drawPath(path, stroke=1, fill=0)
    for edge in (0.0, piece.length / MM):
        if start_mm - 1e-6 <= edge <= end_mm + 1e-6:
            c.line(X(edge), top, X(edge), top - t * mm)
    c.setDash(1, 1)
    c.setLineWidth(0.25)
    c.line(X(lo), top - t * mm, X(hi), top - t * mm)
    c.setDash()
    c.setFont("Helvetica", 5.5)
    for x, hh in arch.stations:
        for at in {x / MM, piece.length / MM - x / MM}:
            if start_mm <= at <= end_mm:
                c.line(X(at), top - t * mm, X(at), top - (t + 1.5) * mm)
                c.drawCentredString(X(at), top - (t + 4) * mm, f"{hh / MM:.1f}")
    c.setFont("Helvetica-Bold", 8)
    c.drawString(x0, top + 2 * mm, f"{piece.label} side profile, full size: arch {arch.depth / MM:.1f} mm deep, "
                 f"{(arch.thickness - arch.depth) / MM:.1f} mm left at the centre; numbers are the thickness "
                 f"left (mm)   sheet {sheet} of {sheets}")


def _stopper_page(packet):
    """Stopper depth by temperature: one table per resonator set (sets may have their own ranges)."""
    w, h = packet.size
    for s in packet.plan.sets:
        pieces = [p for p in s.pieces if p.stopper]
        if not pieces:
            continue
        temps = [t for t, _ in pieces[0].stopper]
        header = ["label", "note"] + [f"{t - 273.15:.0f} C" for t in temps] + ["travel"]
        widths = [x * (w - 2 * MARGIN) for x in [0.12, 0.07] + [0.71 / len(temps)] * len(temps) + [0.10]]
        rows = []
        for p in pieces:
            depths = [d for _, d in p.stopper]
            rows.append([_fit(p.label, 12), p.note] + ["\n".join(_both(d)) for d in depths]
                        + [f"{(max(depths) - min(depths)) / MM:.1f} mm"])
        chunks = _pages(header, rows, widths, 8, h - 62 * mm)
        n = len(chunks)
        for k, chunk in enumerate(chunks, start=1):
            def draw(c, chunk=chunk, k=k, n=n, s=s, header=header, widths=widths):
                y = _heading(c, packet, f"Resonator stopper settings: {s.name}" + (f" ({k} of {n})" if n > 1 else ""))
                y = _paragraph(c, MARGIN, y, "Depth from the open end to the face of the stopper, by air "
                               "temperature. Warmer air carries sound faster, so the column must be longer to stay "
                               "in tune. Set the stopper for the temperature of the room the set is played in.", 9, 110)
                _table(c, [header] + chunk, widths, MARGIN, y - 2 * mm, 8)

            packet.add(draw)


def _templates(packet):
    plan = packet.plan
    w, h = packet.size
    usable_mm = (w - 2 * TEMPLATE_MARGIN) / mm
    strips = []
    for p in plan.pieces:
        parts = mk.tiles(mk.strip_length_mm(p), usable_mm, OVERLAP_MM)
        for k, (a, b) in enumerate(parts, start=1):
            strips.append((p, a, b, k, len(parts), "strip"))
        if p.arch is not None:
            parts = mk.tiles(p.length / MM, usable_mm, OVERLAP_MM)
            for k, (a, b) in enumerate(parts, start=1):
                strips.append((p, a, b, k, len(parts), "profile"))
    top_space = 28 * mm
    bottom_space = 44 * mm
    per_page = max(1, int((h - top_space - bottom_space) / (STRIP_PITCH_MM * mm)))
    for k in range(0, len(strips), per_page):
        def draw(c, group=strips[k:k + per_page]):
            c.setFont("Helvetica-Bold", 11)
            c.drawString(TEMPLATE_MARGIN, h - 20 * mm, "Marking strips, full size")
            c.setFont("Helvetica", 7.5)
            c.drawString(TEMPLATE_MARGIN, h - 24 * mm, "Tape sheets together where the grey overlap bars "
                         "match, aligning the numbered ticks. Lay the strip along the piece, top end to the end line.")
            for i, (p, a, b, sheet, sheets, what) in enumerate(group):
                y0 = h - top_space - (i + 1) * STRIP_PITCH_MM * mm + 14 * mm
                if what == "profile":
                    _profile_tile(c, p, a, b, TEMPLATE_MARGIN, y0, sheet, sheets)
                else:
                    _strip(c, p, a, b, TEMPLATE_MARGIN, y0, sheet, sheets)
            _rulers(c, TEMPLATE_MARGIN, RULER_TOP)
        packet.add(draw, template=True)
    for s in plan.sets:
        if s.kind != "chime" or not s.pieces:
            continue
        packet.add(lambda c, s=s: _plate_page(c, packet, s), template=True)


def _plate_page(c, packet, s):
    w, h = packet.size
    plate = mk.hanging_plate(s)
    c.setFont("Helvetica-Bold", 11)
    c.drawString(TEMPLATE_MARGIN, h - 20 * mm, f"Hanging plate and wrap guide: {s.name}")
    usable_w = (w - 2 * TEMPLATE_MARGIN) / mm
    y_wrap = h - 34 * mm
    if s.shape == "tube":
        circ = mk.wrap_guide_mm(s)
        half = circ > usable_w - 10
        span = circ / 2 if half else circ
        c.setFont("Helvetica", 7.5)
        c.drawString(TEMPLATE_MARGIN, y_wrap + 12 * mm,
                     "Wrap guide: wrap round the tube at the hang-hole mark with A on the mark; mark B: the two "
                     "holes are then opposite." + (" (half-round guide: A to B is half the circumference)" if half else ""))
        c.setLineWidth(0.3)
        c.rect(TEMPLATE_MARGIN, y_wrap, span * mm, 8 * mm)
        for at, label in ([(0, "A"), (span, "B")] if half else [(0, "A"), (circ / 2, "B"), (circ, "A")]):
            x = TEMPLATE_MARGIN + at * mm
            c.setLineWidth(0.8)
            c.line(x, y_wrap - 2 * mm, x, y_wrap + 10 * mm)
            c.setFont("Helvetica-Bold", 8)
            c.drawCentredString(x, y_wrap - 5 * mm, label)
    room = (h / mm) - 125
    fits = plate.diameter_mm < min(usable_w, room)
    scale = 1.0 if fits else min(usable_w, room) / plate.diameter_mm
    cx = w / 2
    cy = y_wrap - 14 * mm - plate.diameter_mm * scale / 2 * mm
    c.setFont("Helvetica", 7.5)
    note = (f"Plate {plate.diameter_mm:.0f} mm across, holes {plate.hole_mm:.0f} mm on a "
            f"{2 * plate.pitch_radius_mm:.1f} mm circle; centre hole for the striker line.")
    if not fits:
        note += " NOT TO SCALE: the plate is larger than the page; use the SVG template."
    c.drawString(TEMPLATE_MARGIN, y_wrap - 10 * mm, note)
    c.setLineWidth(0.4)
    c.circle(cx, cy, plate.diameter_mm / 2 * scale * mm)
    if plate.pitch_radius_mm:
        c.setDash(2, 2)
        c.circle(cx, cy, plate.pitch_radius_mm * scale * mm)
        c.setDash()
    for x, y, label in list(plate.holes) + [(0.0, 0.0, "striker")]:
        hx, hy = cx + x * scale * mm, cy + y * scale * mm
        c.circle(hx, hy, plate.hole_mm / 2 * scale * mm)
        c.line(hx - 4 * mm, hy, hx + 4 * mm, hy)
        c.line(hx, hy - 4 * mm, hx, hy + 4 * mm)
        c.setFont("Helvetica", 6.5)
        c.drawCentredString(hx, hy - (plate.hole_mm * scale + 4) * mm, label)
    _rulers(c, TEMPLATE_MARGIN, RULER_TOP)


def render_pdf(plan, paper=None):
    """The whole shop packet as PDF bytes (byte-identical for the same plan and paper)."""
    packet = _Packet(plan, paper or plan.paper)
    _cover(packet)
    _cut_list(packet)
    _tuning(packet)
    _charts(packet)
    _stock_page(packet)
    _stopper_page(packet)
    _templates(packet)
    return packet.render()

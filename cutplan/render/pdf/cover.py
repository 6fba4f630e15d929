"""Front pages: the cover (what is built, assumptions, cautions, how to use) and the shopping list."""

from __future__ import annotations

from reportlab.lib import colors

from cutplan.render.hanging import weight_text
from cutplan.render.pdf.base import (
    BOLD,
    FONT,
    MARGIN,
    Page,
    draw_table,
    fit,
    heading,
    length,
    mm,
    paragraph,
    paragraph_height,
    table_pages,
)
from cutplan.render.phrases import TRIM_RULE

__all__ = ["HOW_TO_USE", "BOTTOM", "cover", "amount_text", "shopping"]

HOW_TO_USE = (
    "Buy what the shopping list names; the plan computes the stock, the rest are suggestions.",
    f"Cut each piece long, at its 'cut at' length, never at the finished length: {TRIM_RULE}.",
    "Chimes: mark the hang hole from the top end. Bars: mark the centre line on the rough blank and the supports "
    "from it; trim half from each end so they stay on the nodes, and drill once the bar is at pitch.",
    "Strike the piece, measure its pitch with a tuner or `cutplan measure`, and record it on the tuning sheet.",
    "Flat (too low): trim a little from the trim end, using 'per 10 cents' as a guide, in small steps.",
    "Sharp (too high): see 'if sharp' on the tuning sheet.",
    "Tick cut, drilled and tuned on the cut list as you go.",
)


def _caution_source(caution):
    if caution.source:
        return f" [{caution.source}{', ' + caution.where if caution.where else ''}]"
    return f" [{caution.kind}]" if caution.kind else ""


BOTTOM = 15 * mm
"""Lowest a cover line may reach [pt]: above the footer and the printers' unprintable band."""


class _DryRun:
    """A canvas that draws nothing: lays the cover out once to learn where it ends."""

    def __getattr__(self, _name):
        return lambda *args, **kwargs: None


def _front(c, page, plan):
    """What is built, the assumptions and the cautions; returns the y below them."""
    x, width = page.left, page.width
    y = page.h - 30 * mm
    c.setFont(BOLD, 22)
    c.drawString(x, y, fit(plan.title, 22, width, BOLD))
    y -= 10 * mm
    c.setFont(FONT, 11)
    c.drawString(x, y, f"Shop packet: {len(plan.pieces)} pieces in {len(plan.sets)} set(s); "
                 f"lengths in {'inches' if plan.units == 'in' else 'millimetres'} first")
    y -= 10 * mm
    c.setFont(BOLD, 12)
    c.drawString(x, y, "What is being built")
    y -= 6 * mm
    for s in plan.sets:
        notes = ", ".join(p.note for p in s.pieces[:12]) + (" and more" if len(s.pieces) > 12 else "")
        y = paragraph(c, x, y, f"{s.name}: {len(s.pieces)} x {s.kind} in {s.material}, {s.section_label(plan.units)}. "
                      f"Notes: {notes}.", 10, width)
        if getattr(s, "hanging", None) is not None:
            y = paragraph(c, x, y, weight_text(s.hanging)[0].upper() + weight_text(s.hanging)[1:] + ".", 10, width)
        y -= 1 * mm
    y -= 3 * mm
    c.setFont(BOLD, 12)
    c.drawString(x, y, "The lengths depend on these assumptions")
    y -= 6 * mm
    y = paragraph(c, x, y, f"Reference pitch A4 = {plan.a4:g} Hz; {plan.temperament} temperament.", 10, width)
    for s in plan.sets:
        for a in s.assumptions:
            y = paragraph(c, x, y, f"{s.name}: {a}.", 10, width)
    y -= 4 * mm
    box_top = y + 4 * mm
    c.setFont(BOLD, 12)
    c.drawString(x + 3 * mm, y - 2 * mm, "Cautions")
    y -= 8 * mm
    for caution in plan.cautions:
        y = paragraph(c, x + 3 * mm, y, "- " + caution.text + _caution_source(caution), 9, width - 6 * mm)
    c.setStrokeColor(colors.black)
    c.setLineWidth(1.2)
    c.rect(x, y, width, box_top - y)
    return y - 8 * mm


def _how_to_use(c, page, y):
    c.setFont(BOLD, 12)
    c.drawString(page.left, y, "How to use this packet")
    y -= 6 * mm
    for i, line in enumerate(HOW_TO_USE, start=1):
        y = paragraph(c, page.left, y, f"{i}. {line}", 10, page.width)
    return y


def cover(packet):
    """The cover; "How to use this packet" goes on a page of its own when the cover is full."""
    plan = packet.plan
    layout = Page(packet.size, False)
    end = _how_to_use(_DryRun(), layout, _front(_DryRun(), layout, plan))

    if end >= BOTTOM:
        packet.add(lambda c, page: _how_to_use(c, page, _front(c, page, plan)))
        return
    packet.add(lambda c, page: _front(c, page, plan))
    packet.add(lambda c, page: _how_to_use(c, page, page.h - 22 * mm))


def amount_text(plan, item):
    if getattr(item, "buy", ""):
        return f"buy {item.buy}"
    parts = []
    if item.count is not None:
        if item.each is None or item.count != 1 or item.group == "stock":  # "1 x 5 in" reads as a board size
            parts.append(f"{item.count} x" if item.each is not None else f"{item.count}")
    if item.each is not None:
        parts.append(length(plan, item.each))
    text = " ".join(parts)
    if item.total is not None and not (item.count == 1 and item.each is not None):
        about = "about " if item.suggestion else ""
        text = (text + "; " if text else "") + f"{about}{length(plan, item.total)} in all"
    if getattr(item, "cost", None) is not None:
        text = (text + "; " if text else "") + f"cost {item.cost:.2f}"
    return text or "-"


def shopping(packet):
    """The shopping list: what the plan computes, then the suggestions, marked as such."""
    plan = packet.plan
    w, h = packet.size
    width = w - 2 * MARGIN
    widths = [width * f for f in (0.12, 0.34, 0.24, 0.30)]
    header = ["for", "what", "how much", "note"]
    rows = []
    for item in plan.shopping:
        note = ("SUGGESTION: " if item.suggestion else "") + item.note
        rows.append([item.group, item.what, amount_text(plan, item), note])
    intro = ("Built from the plan, in its units. Lines marked SUGGESTION are not computed by the plan "
             "(cord, sails, mallets and the like): sizes there are starting points. Stock counts come from "
             "the stock layout, with saw kerf and end trim already allowed.")
    if getattr(plan, "copies", 1) > 1:
        intro += (f" For {plan.copies} identical kits: counts and totals are for all of them; "
                  "one drill bit serves every kit.")
    room = h - 40 * mm - paragraph_height(intro, 9, width) - 20 * mm
    chunks = table_pages(header, rows, widths, 8.5, room)
    n = len(chunks)
    for k, chunk in enumerate(chunks, start=1):
        def draw(c, page, chunk=chunk, k=k):
            y = heading(c, page, "Shopping list" + (f" ({k} of {n})" if n > 1 else ""))
            y = paragraph(c, page.left, y, intro, 9, page.width)
            draw_table(c, [header] + chunk, widths, page.left, y - 2 * mm, 8.5)
        packet.add(draw)

"""Stock layout pages: every stick drawn to scale with its cuts, positions in the plan's units."""

from __future__ import annotations

from reportlab.lib import colors

from cutplan.render.pdf.base import BOLD, LIGHT, SAFE, Placer, fit, heading, mm, paragraph, text_width
from cutplan.render.stock_layout import cut_list_view

__all__ = ["PER_PAGE", "ROW", "stock_pages"]

PER_PAGE = 7
"""Sticks drawn on one page."""
ROW = 30 * mm
"""Height of one stick's row (name, bar, labels below)."""


def stock_pages(packet):
    plan = packet.plan
    cut_list = plan.cut_list
    if cut_list is None:
        return
    view = cut_list_view(cut_list, plan.units, plan.inch_denominator)
    sticks = cut_list.sticks
    longest = max(s.stock_length for s in sticks)
    for k in range(0, len(sticks), PER_PAGE):
        def draw(c, page, group=sticks[k:k + PER_PAGE], rows=view.sticks[k:k + PER_PAGE]):
            y = heading(c, page, "Stock layout")
            y = paragraph(c, page.left, y, f"{view.heading()}. {view.summary[0].upper() + view.summary[1:]}. "
                          "Each cut is labelled with its piece and where it starts, measured after squaring "
                          f"the end; lengths in {'inches' if plan.units == 'in' else 'mm'} first.", 9, page.width)
            scale = page.width / longest
            for i, (stick, row) in enumerate(zip(group, rows, strict=True)):
                base = y - 12 * mm - i * ROW
                placer = Placer((page.left, base - 18 * mm, page.w - SAFE, base + 12 * mm))
                c.setFillColor(colors.black)
                c.setFont(BOLD, 8)
                title = fit(f"stick {row.number}: {row.length}  {row.group}", 8,
                            page.width, BOLD)
                c.drawString(page.left, base + 10 * mm, title)
                c.setStrokeColor(colors.black)
                c.setLineWidth(0.6)
                c.setFillColor(colors.white)
                c.rect(page.left, base, stick.stock_length * scale, 8 * mm, fill=1)
                c.setFillColor(colors.black)
                for cut in stick.cuts:
                    x = page.left + cut.start * scale
                    wd = cut.length * scale
                    c.setFillColor(LIGHT)
                    c.setStrokeColor(colors.black)
                    c.rect(x, base, wd, 8 * mm, fill=1)
                    c.setFillColor(colors.black)
                    placer.line((x, base), (x, base + 8 * mm))
                    placer.line((x + wd, base), (x + wd, base + 8 * mm))
                placer.line((page.left, base), (page.left + stick.stock_length * scale, base))
                placer.line((page.left, base + 8 * mm), (page.left + stick.stock_length * scale, base + 8 * mm))
                end = page.left + stick.stock_length * scale
                placer.line((end, base), (end, base + 8 * mm))
                low = [base - k * mm for k in (3, 5.8, 8.6, 11.4, 14.2)]
                missed, narrow = [], 0
                for cut, shown in zip(stick.cuts, row.cuts, strict=True):
                    x = page.left + cut.start * scale
                    wd = cut.length * scale
                    label, at = shown.label, f"at {shown.start.first}"
                    inside = text_width(label, 6.5) < wd - 3 and text_width(at, 6.5) < wd - 3
                    if inside:
                        placer.place(c, [(x + 1.5, base + 4.5 * mm, label, "start")], 6.5)
                        placer.place(c, [(x + 1.5, base + 1.2 * mm, at, "start")], 6.5)
                    else:
                        text = f"{label} {at}"
                        mid, tw = x + wd / 2, text_width(text, 6.5)
                        r = narrow % len(low)  # a staircase: each label ends at its leader, one row lower
                        narrow += 1
                        cands = [(mid + 2, yy, text, "end") for yy in low[r:] + low[:r]]
                        cands += [(mid + dx, yy, text, "start") for yy in low for dx in (-2, 6, -tw - 6)]
                        if placer.place(c, cands, 6.5, leader_from=(x + wd / 2, base)) is None:
                            missed.append(text)
                off = f"offcut {row.offcut.first}"
                placer.place(c, [(end, yy, off, "end") for yy in low]
                             + [(page.left + page.width, yy, off, "end") for yy in low], 6.5)
                if missed:  # no room beside the bar: listed under it instead
                    placer.place(c, [(page.left, base - 17 * mm, "also: " + "; ".join(missed), "start")], 6.5)
        packet.add(draw)

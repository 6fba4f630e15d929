"""Plan -> the printable shop packet (PDF, reportlab), one module per page family.

Pages: cover and shopping list (:mod:`.cover`), cut list, tuning sheet and stopper table
(:mod:`.tables`), length-pitch chart and partials (:mod:`.charts`), stock layout (:mod:`.stock`),
then full-size templates: strips and profiles (:mod:`.templates`), plates and wrap guides
(:mod:`.plates`), with the 100 mm and 4 in rulers (:mod:`.rulers`) on every template page.
Every length is in the plan's units first.  The same plan gives a byte-identical file.
"""

from __future__ import annotations

from cutplan.render.pdf import assembly, charts, cover, stock, tables, templates
from cutplan.render.pdf.base import A4, MARGIN, TEMPLATE_MARGIN, Packet, letter, mm
from cutplan.render.pdf.rulers import RULER_TOP
from cutplan.render.pdf.templates import OVERLAP_MM, STRIP_H_MM

__all__ = ["A4", "MARGIN", "OVERLAP_MM", "RULER_TOP", "STRIP_H_MM", "TEMPLATE_MARGIN", "letter", "mm",
           "render_pdf"]


def render_pdf(plan, paper=None):
    """The whole shop packet as PDF bytes (byte-identical for the same plan and paper)."""
    packet = Packet(plan, paper or plan.paper)
    cover.cover(packet)
    cover.shopping(packet)
    assembly.assembly_pages(packet)
    tables.cut_list(packet)
    tables.tuning(packet)
    charts.charts(packet)
    stock.stock_pages(packet)
    tables.stoppers(packet)
    templates.templates(packet)
    return packet.render()

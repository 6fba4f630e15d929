"""Plan -> full-scale SVG templates (one per piece, plus plates and wrap guides), in millimetres.

Each file has ``width``/``height`` in mm and a viewBox in mm, so one user unit is one millimetre
and the file prints or cuts at 100 %.  Everything sits in one of three top-level groups, one
stroke colour per role, so a laser cutter can be told what to do with each:

- ``cut``  (default red ``#ff0000``): outlines to cut through: the template or profile outline,
  the hanging plate and its hole outlines, the wrap guide;
- ``mark`` (default blue ``#0000ff``): lines to score or draw: ticks, node and end lines,
  cross-hairs, pitch circles, rulers;
- ``text`` (default black ``#000000``): labels, to engrave or print.

These defaults follow common laser-cutter practice (red cut, blue score, black engrave); pass
``colours={"cut": ..., "mark": ..., "text": ...}`` to change them.  Cut and mark strokes are
hairlines (0.1 mm).  Line styles and ruler ticks come from :mod:`cutplan.render.marks`, as in the
PDF.  svgwrite stays inside this module.
"""

from __future__ import annotations

import math

import svgwrite

from cutplan.render import marks as mk
from cutplan.render.phrases import CENTRE_OUT, STOPPER_RULE, TRIM_RULE, sentence
from cutplan.units import INCH_DENOMINATOR, MM, format_length

__all__ = [
    "HAIRLINE", "TEXT", "MARGIN", "INCH_MM", "COLOURS", "LABEL", "LANE", "CHAR_WIDTH", "render_piece_svg",
    "render_plate_svg", "render_wrap_svg", "svg_files"
]

HAIRLINE = 0.1
"""Stroke width for cut and mark lines [mm]."""
TEXT = 3.0
"""Text height [mm]."""
MARGIN = 10.0
"""Blank border round every template [mm]."""
INCH_MM = 25.4
COLOURS = {"cut": "#ff0000", "mark": "#0000ff", "text": "#000000"}
"""Default stroke or fill colour per role (common laser-cutter practice)."""
LABEL = 2.5
"""Mark label height [mm]."""
LANE = 3.6
"""Label lane height above a strip [mm]."""
CHAR_WIDTH = 0.56
"""Average Helvetica character width as a fraction of the text height (for label lanes)."""


class _Doc:
    """An SVG drawing with the three role groups."""

    def __init__(self, width, height, colours=None):
        width, height = round(width, 3), round(height, 3)
        self.colours = {**COLOURS, **(colours or {})}
        self.dwg = svgwrite.Drawing(size=(f"{width:.3f}mm", f"{height:.3f}mm"), profile="full", debug=False)
        self.dwg.viewbox(0, 0, width, height)
        self.groups = {}
        for role in ("cut", "mark", "text"):
            if role == "text":
                g = self.dwg.g(id=role, fill=self.colours[role], stroke="none")
            else:
                g = self.dwg.g(id=role, fill="none", stroke=self.colours[role], stroke_width=HAIRLINE)
            self.groups[role] = g
            self.dwg.add(g)

    def line(self, a, b, role="mark", kind=None):
        line = self.dwg.line(a, b)
        style = mk.STYLES.get(kind) if kind else None
        if style and style.dash:
            line.dasharray(list(style.dash))
        self.groups[role].add(line)

    def rect(self, at, size, role="cut", dash=None):
        r = self.dwg.rect(at, size)
        if dash:
            r.dasharray(dash)
        self.groups[role].add(r)

    def circle(self, at, r, role="cut", dash=None):
        c = self.dwg.circle(at, r)
        if dash:
            c.dasharray(dash)
        self.groups[role].add(c)

    def polyline(self, points, role="cut"):
        self.groups[role].add(self.dwg.polyline(points))

    def text(self, text, at, size=TEXT, anchor="start"):
        self.groups["text"].add(self.dwg.text(text, insert=at, font_size=size,
                                              font_family="Helvetica, Arial, sans-serif", text_anchor=anchor))

    def tostring(self):
        return _svg_text(self.dwg)


_ATTRIBUTE_ESCAPES = (("&", "&amp;"), ("<", "&lt;"), (">", "&gt;"), ('"', "&quot;"), ("\r", "&#13;"),
                      ("\n", "&#10;"), ("\t", "&#09;"))
_TEXT_ESCAPES = _ATTRIBUTE_ESCAPES[:3]


def _escaped(text, escapes):
    for plain, entity in escapes:
        if plain in text:
            text = text.replace(plain, entity)
    return text


def _svg_text(dwg):
    """``dwg.tostring()`` written directly from the drawing's elements, byte for byte the same
    (svgwrite builds an ElementTree first, which costs more than the drawing itself): attributes
    sorted by name, empty elements closed with " />", text and attribute values escaped as
    ElementTree escapes them.  Only a drawing made without validation (``debug=False``) in the full
    profile, holding groups, lines, rectangles, circles, polylines and text, as :class:`_Doc` makes."""
    dwg.attribs.update({"xmlns": "http://www.w3.org/2000/svg", "xmlns:xlink": "http://www.w3.org/1999/xlink",
                        "xmlns:ev": "http://www.w3.org/2001/xml-events", "baseProfile": dwg.profile,
                        "version": dwg.version})
    out = []
    _write_element(dwg, out)
    # as ElementTree writes UTF-8: a character UTF-8 cannot carry (a lone surrogate) becomes a reference
    return "".join(out).encode("utf-8", "xmlcharrefreplace").decode("utf-8")


def _write_element(element, out):
    name = element.elementname
    if name == "polyline":
        element.attribs["points"] = element.points_to_string(element.points)
    out.append("<" + name)
    for key, value in sorted(element.attribs.items()):
        if value is not None:
            value = str(value)
            if value:
                out.append(f' {key}="{_escaped(value, _ATTRIBUTE_ESCAPES)}"')
    text = str(element.text) if name == "text" else ""
    if text or element.elements:
        out.append(">")
        if text:
            out.append(_escaped(text, _TEXT_ESCAPES))
        for child in element.elements:
            _write_element(child, out)
        out.append(f"</{name}>")
    else:
        out.append(" />")


def _rulers(doc, x, y):
    """The 100 mm and 4 in rulers side by side from (x, y) [mm] (ticks as in the PDF); returns the height."""
    for k, (caption, span, ticks) in enumerate(mk.ruler_ticks()):
        x0 = x + k * 115
        doc.text(caption.split(":")[0] + ": check", (x0, y - 1.5), 2.5)
        doc.line((x0, y), (x0 + span, y))
        for at, tick in ticks:
            doc.line((x0 + at, y), (x0 + at, y + tick))
    return 10.0


def render_piece_svg(plan, piece, colours=None):
    """Full-length marking strip for one piece (and an arched bar's side profile): ends, centre,
    nodes with cross-hairs, rough cut, or a stoppered tube's stopper depths and open end."""
    units, den = plan.units, plan.inch_denominator
    length = mk.strip_length_mm(piece)
    strip_h = 20.0
    labels = mk.assign_lanes(mk.piece_marks(piece, units, den), 0.0, length,
                             lambda t: len(t) * CHAR_WIDTH * LABEL, LANE)
    lanes = max((lane for _, lane, _ in labels), default=-1) + 1
    label_h = lanes * LANE + 3
    profile_h = piece.arch.thickness / MM + 16 if piece.arch is not None else 0.0
    width = max(length + 2, 4 * INCH_MM + 115) + 2 * MARGIN
    height = 2 * MARGIN + 14 + label_h + strip_h + 12 + profile_h + 14
    doc = _Doc(width, height, colours)
    x0, y0 = MARGIN, MARGIN + 14 + label_h
    kits = getattr(plan, "copies", 1)
    doc.text(f"{plan.title}: {piece.label} ({piece.note}, {piece.target_hz:.2f} Hz)"
             + (f", make {kits}" if kits > 1 else ""), (MARGIN, MARGIN + 3), 4)
    how = STOPPER_RULE if piece.stopper else TRIM_RULE
    if piece.mark_offset > 0:
        how += f": rough cut at 0 and at the far dotted line, {CENTRE_OUT}"
    doc.text(f"Print or cut at 100 % (actual size); check the rulers. {sentence(how)}",
             (MARGIN, MARGIN + 9), 2.5)
    body = piece.cut_length / MM if piece.stopper else piece.length / MM
    doc.rect((x0 + piece.mark_offset / MM, y0), (body, strip_h), role="cut")
    near = [m.at_mm for m in mk.piece_marks(piece, units, den)]
    for j in mk.join_marks(0.0, length, 1, 1, 0.0):
        tick = 5 if j.number else 3
        doc.line((x0 + j.at, y0 + strip_h), (x0 + j.at, y0 + strip_h - tick))
        if j.number and 0 < j.at < length - 3 and all(abs(j.at - x) >= 5 for x in near):
            doc.text(f"{j.at:.0f}", (x0 + j.at, y0 + strip_h - 6), 2, anchor="middle")
    lane_of = {(m.at_mm, m.kind): (lane, side) for m, lane, side in labels}
    for m in mk.piece_marks(piece, units, den):
        x = x0 + m.at_mm
        lane, side = lane_of.get((m.at_mm, m.kind), (None, None))
        base = y0 - 1.2 - (lane or 0) * LANE
        reach = base - 0.65 * LANE if lane is not None else y0 - 1
        doc.line((x, y0 + strip_h + mk.STYLES[m.kind].below), (x, reach), kind=m.kind)
        if m.kind == "node":
            doc.line((x - 3, y0 + strip_h / 2), (x + 3, y0 + strip_h / 2))
            doc.circle((x, y0 + strip_h / 2), 2.0, role="mark")
        if lane is not None:
            doc.text(m.label, (x + (0.5 if side == "right" else -0.5), base), LABEL,
                     anchor="start" if side == "right" else "end")
    y = y0 + strip_h + 12
    if piece.arch is not None:
        _profile(doc, piece, x0, y + 4, units, den)
        y += profile_h
    _rulers(doc, MARGIN, y + 2)
    return doc.tostring()


def _profile(doc, piece, x0, top, units="mm", den=INCH_DENOMINATOR):
    """Full-size side view of an arched bar: top face straight, underside following the arch
    (the numbers under it are the thickness left at each station, in mm)."""
    a = piece.arch
    t = a.thickness / MM
    points = [(x0 + x / MM, top + h / MM) for x, h in a.outline]
    outline = [(x0, top)] + points + [(x0 + piece.length / MM, top)]
    doc.polyline(outline + [(x0, top)], role="cut")
    doc.line((x0, top + t), (x0 + piece.length / MM, top + t), kind="centre")
    doc.text(f"side profile, full size: arch {format_length(a.depth, units, den)} deep, leaves "
             f"{format_length(a.thickness - a.depth, units, den)} at the centre; numbers: the thickness left (mm) "
             "(dashed: the blank's underside)", (x0, top - 2), 2.5)
    last = -1e9
    for x, h in a.stations[1:]:
        at = x0 + x / MM
        doc.line((at, top + t), (at, top + t + 2))
        if at - last > 8:
            doc.text(f"{h / MM:.1f}", (at, top + t + 5), 2, anchor="middle")
            last = at


def render_plate_svg(plan, set_plan, colours=None):
    """Round hanging plate for a chime set: hole outlines on ``cut``; cross-hairs, the pitch
    circle and the rulers on ``mark``; labels on ``text``."""
    plate = mk.hanging_plate(set_plan)
    size = max(plate.diameter_mm, 4 * INCH_MM + 115) + 2 * MARGIN
    height = plate.diameter_mm + 2 * MARGIN + 40
    doc = _Doc(size, height, colours)
    cx, cy = MARGIN + plate.diameter_mm / 2, MARGIN + 15 + plate.diameter_mm / 2
    kits = getattr(plan, "copies", 1)
    units, den = plan.units, plan.inch_denominator
    doc.text(f"{plan.title}: hanging plate for {set_plan.name}, {format_length(plate.diameter_mm * MM, units, den)} "
             "across" + (f", make {kits}" if kits > 1 else ""),
             (MARGIN, MARGIN + 3), 4)
    doc.text("Print or cut at 100 %; check the rulers. Drill all holes "
             f"{format_length(plate.hole_mm * MM, units, den)}; S: the plate's own hanging lines; the centre hole "
             "carries the striker line.", (MARGIN, MARGIN + 9), 2.5)
    doc.text("Dotted: the striker disc and the tubes hanging below, at full size.", (MARGIN, MARGIN + 13), 2.5)
    doc.circle((cx, cy), plate.diameter_mm / 2, role="cut")
    if plate.pitch_radius_mm:
        doc.circle((cx, cy), plate.pitch_radius_mm, role="mark", dash=[2, 2])
    # outlines of the striker and of each tube hanging below its hole: any clash shows
    doc.circle((cx, cy), plate.striker_mm / 2, role="mark", dash=[1, 1])
    for x, y, _label in plate.holes:
        doc.circle((cx + x, cy - y), plate.tube_mm / 2, role="mark", dash=[1, 1])
    holes = list(plate.holes) + [(0.0, 0.0, "striker")] + [(x, y, "S") for x, y in plate.suspension]
    for x, y, label in holes:
        hx, hy = cx + x, cy - y
        doc.circle((hx, hy), plate.hole_mm / 2, role="cut")
        doc.line((hx - 4, hy), (hx + 4, hy))
        doc.line((hx, hy - 4), (hx, hy + 4))
        r = math.hypot(x, y)
        if label in ("S", "striker") or r == 0:
            doc.text(label, (hx, hy + plate.hole_mm + 3), 2.5, anchor="middle")
        else:  # a tube's label just outside its outline, away from the centre
            out = plate.tube_mm / 2 + 4
            doc.text(label, (hx + x / r * out, hy - y / r * out + 1), 2.5, anchor="middle")
    _rulers(doc, MARGIN, cy + plate.diameter_mm / 2 + 12)
    return doc.tostring()


def render_wrap_svg(plan, set_plan, colours=None):
    """Wrap-around guide for marking two diametrically opposite holes on a tube."""
    circumference = mk.wrap_guide_mm(set_plan)
    width = max(circumference + 20, 4 * INCH_MM + 115) + 2 * MARGIN
    height = 2 * MARGIN + 60
    doc = _Doc(width, height, colours)
    x0, y0 = MARGIN, MARGIN + 18
    doc.text(f"{plan.title}: wrap guide for {set_plan.section_label(plan.units)}", (MARGIN, MARGIN + 3), 4)
    doc.text("Wrap round the tube at the hang-hole mark, ends meeting at A; mark at A and at B "
             "for two opposite holes.", (MARGIN, MARGIN + 9), 2.5)
    doc.rect((x0, y0), (circumference + 10, 12), role="cut")
    for at, label in ((0.0, "A"), (circumference / 2, "B"), (circumference, "A")):
        doc.line((x0 + at, y0 - 3), (x0 + at, y0 + 15))
        doc.text(label, (x0 + at, y0 - 4), 3, anchor="middle")
    doc.text("overlap", (x0 + circumference + 5, y0 + 8), 2, anchor="middle")
    _rulers(doc, MARGIN, y0 + 30)
    return doc.tostring()


def svg_files(plan, colours=None):
    """All SVG templates as {relative file name: text}."""
    files = {}
    for s in plan.sets:
        for p in s.pieces:
            if p.kind in ("chime", "bar", "air-column", "resonator"):
                files[f"templates/{p.label}.svg"] = render_piece_svg(plan, p, colours)
        if s.kind == "chime" and s.pieces:
            files[f"templates/{s.name}-plate.svg"] = render_plate_svg(plan, s, colours)
        if s.shape == "tube" and s.kind == "chime":
            files[f"templates/{s.name}-wrap.svg"] = render_wrap_svg(plan, s, colours)
    return files

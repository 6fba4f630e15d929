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
PDF.  The files are written as text directly, byte for byte as svgwrite would write them
(tests/render/test_svg_text.py compares the two).
"""

from __future__ import annotations

import math

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
    """An SVG drawing with the three role groups, written as text as it is drawn.

    The text is byte for byte what svgwrite (``svgwrite.Drawing(..., profile="full",
    debug=False)`` with the same groups and elements) writes with ``tostring()``: attributes
    sorted by name, values as ``str`` gives them (a list joined by spaces, points as "x,y"),
    values that are None or empty left out, empty elements closed with " />", text and attribute
    values escaped as ElementTree escapes them (tests/render/test_svg_text.py draws every template
    with svgwrite too and compares).  svgwrite builds an element object per line and an
    ElementTree to write them, which cost some ten times what the text itself does."""

    def __init__(self, width, height, colours=None):
        width, height = round(width, 3), round(height, 3)
        self.colours = {**COLOURS, **(colours or {})}
        self.root = {"baseProfile": "full", "height": f"{height:.3f}mm", "version": "1.1",
                     "viewBox": f"{0},{0},{width},{height}", "width": f"{width:.3f}mm",
                     "xmlns": "http://www.w3.org/2000/svg", "xmlns:ev": "http://www.w3.org/2001/xml-events",
                     "xmlns:xlink": "http://www.w3.org/1999/xlink"}
        self.group_attribs = {}
        self.groups = {}
        for role in ("cut", "mark", "text"):
            if role == "text":
                self.group_attribs[role] = {"id": role, "fill": self.colours[role], "stroke": "none"}
            else:
                self.group_attribs[role] = {"id": role, "fill": "none", "stroke": self.colours[role],
                                            "stroke-width": HAIRLINE}
            self.groups[role] = []

    def line(self, a, b, role="mark", kind=None):
        style = mk.STYLES.get(kind) if kind else None
        if style and style.dash:
            self.groups[role].append(_element("line", {"x1": a[0], "y1": a[1], "x2": b[0], "y2": b[1],
                                                       "stroke-dasharray": _spaced(style.dash)}))
        else:
            self.groups[role].append(f'<line x1="{_number(a[0])}" x2="{_number(b[0])}" y1="{_number(a[1])}" '
                                     f'y2="{_number(b[1])}" />')

    def rect(self, at, size, role="cut", dash=None):
        self.groups[role].append(_element("rect", {"x": at[0], "y": at[1], "width": size[0], "height": size[1],
                                                   "stroke-dasharray": _spaced(dash) if dash else None}))

    def circle(self, at, r, role="cut", dash=None):
        self.groups[role].append(_element("circle", {"cx": at[0], "cy": at[1], "r": r,
                                                     "stroke-dasharray": _spaced(dash) if dash else None}))

    def polyline(self, points, role="cut"):
        self.groups[role].append(_element("polyline", {"points": " ".join(f"{x},{y}" for x, y in points)}))

    def text(self, text, at, size=TEXT, anchor="start"):
        self.groups["text"].append(_element("text", {"x": at[0], "y": at[1], "font-size": size,
                                                     "font-family": "Helvetica, Arial, sans-serif",
                                                     "text-anchor": anchor}, text))

    def tostring(self):
        out = [_element("svg", self.root, body=True), "<defs />"]
        for role in ("cut", "mark", "text"):
            out.append(_element("g", self.group_attribs[role], body=bool(self.groups[role])))
            if self.groups[role]:
                out += self.groups[role]
                out.append("</g>")
        out.append("</svg>")
        # as ElementTree writes UTF-8: a character UTF-8 cannot carry (a lone surrogate) becomes a reference
        return "".join(out).encode("utf-8", "xmlcharrefreplace").decode("utf-8")


_ATTRIBUTE_ESCAPES = (("&", "&amp;"), ("<", "&lt;"), (">", "&gt;"), ('"', "&quot;"), ("\r", "&#13;"),
                      ("\n", "&#10;"), ("\t", "&#09;"))
_TEXT_ESCAPES = _ATTRIBUTE_ESCAPES[:3]


def _escaped(text, escapes):
    for plain, entity in escapes:
        if plain in text:
            text = text.replace(plain, entity)
    return text


def _number(value):
    """A coordinate as svgwrite writes it (``str``); a string is escaped as an attribute value."""
    return _escaped(value, _ATTRIBUTE_ESCAPES) if isinstance(value, str) else str(value)


def _spaced(values):
    """A list attribute (a dash pattern) as svgwrite writes it: the values joined by spaces."""
    return " ".join(str(v) for v in values if v is not None) if not isinstance(values, str) else values


def _element(name, attribs, text=None, body=False):
    """One element's text: ``<name a="..." ... />``, ``<name ...>text</name>`` when it has
    text, or only the opening tag when ``body`` (its children and closing tag follow)."""
    out = ["<" + name]
    for key in sorted(attribs):
        value = attribs[key]
        if value is not None:
            value = str(value)
            if value:
                out.append(f' {key}="{_escaped(value, _ATTRIBUTE_ESCAPES)}"')
    text = "" if text is None else str(text)
    if body:
        out.append(">")
    elif text:
        out.append(f">{_escaped(text, _TEXT_ESCAPES)}</{name}>")
    else:
        out.append(" />")
    return "".join(out)


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

"""Plan -> full-scale SVG templates (one per piece, plus plates and wrap guides), in millimetres.

Each file has ``width``/``height`` in mm and a viewBox in mm, so one user unit is one
millimetre and the file prints or cuts at 100 %.  Strokes are hairlines (0.1 mm) for a laser
cutter or plotter.  svgwrite stays inside this module.
"""

from __future__ import annotations

import svgwrite

from cutplan.render import marks as mk

HAIRLINE = 0.1
"""Stroke width for cut and mark lines [mm]."""
TEXT = 3.0
"""Text height [mm]."""
MARGIN = 10.0
"""Blank border round every template [mm]."""
INCH_MM = 25.4


def _drawing(width, height):
    width, height = round(width, 3), round(height, 3)
    dwg = svgwrite.Drawing(size=(f"{width:.3f}mm", f"{height:.3f}mm"), profile="full", debug=False)
    dwg.viewbox(0, 0, width, height)
    dwg.add(dwg.rect((0, 0), (width, height), fill="white"))
    return dwg


def _line(dwg, a, b, width=HAIRLINE, dash=None):
    line = dwg.line(a, b, stroke="black", stroke_width=width)
    if dash:
        line.dasharray(dash)
    dwg.add(line)


def _text(dwg, text, at, size=TEXT, anchor="start", rotate=None):
    t = dwg.text(text, insert=at, font_size=size, font_family="Helvetica, Arial, sans-serif",
                 text_anchor=anchor, fill="black")
    if rotate is not None:
        t.rotate(rotate, center=at)
    dwg.add(t)


def _rulers(dwg, x, y):
    """A 100 mm ruler and a 4 in ruler side by side, starting at (x, y) [mm]; returns the height."""
    _text(dwg, "check: 100 mm", (x, y - 1.5), 2.5)
    _line(dwg, (x, y), (x + 100, y))
    for i in range(0, 101):
        tick = 8 if i % 50 == 0 else 5 if i % 10 == 0 else 2.5
        _line(dwg, (x + i, y), (x + i, y + tick))
    x2 = x + 115
    _text(dwg, "check: 4 in", (x2, y - 1.5), 2.5)
    _line(dwg, (x2, y), (x2 + 4 * INCH_MM, y))
    for i in range(0, 4 * 16 + 1):
        tick = 8 if i % 32 == 0 else 5 if i % 16 == 0 else 3.5 if i % 8 == 0 else 2
        _line(dwg, (x2 + i * INCH_MM / 16, y), (x2 + i * INCH_MM / 16, y + tick))
    return 10.0


def render_piece_svg(plan, piece):
    """Full-length marking strip for one piece: ends, centre, nodes with cross-hairs, rough cut."""
    length = mk.strip_length_mm(piece)
    strip_h = 20.0
    profile_h = piece.arch.thickness * 1000 + 16 if piece.arch is not None else 0.0
    width = max(length, 4 * INCH_MM + 115) + 2 * MARGIN
    height = 2 * MARGIN + 20 + strip_h + 30 + 14 + profile_h
    dwg = _drawing(width, height)
    x0, y0 = MARGIN, MARGIN + 20
    _text(dwg, f"{plan.title}: {piece.label} ({piece.note}, {piece.target_hz:.2f} Hz)", (MARGIN, MARGIN + 3), 4)
    _text(dwg, "Print or cut at 100 % (actual size); check the rulers.", (MARGIN, MARGIN + 9), 2.5)
    finished = piece.length * 1000
    dwg.add(dwg.rect((x0, y0), (finished, strip_h), fill="none", stroke="black", stroke_width=HAIRLINE))
    for i in range(0, int(length) + 1, 10):
        tick = 3 if i % 50 else 5
        _line(dwg, (x0 + i, y0 + strip_h), (x0 + i, y0 + strip_h - tick))
        if i % 50 == 0 and 0 < i < finished - 5:
            _text(dwg, f"{i}", (x0 + i, y0 + strip_h - 6), 2, anchor="middle")
    for n, m in enumerate(mk.piece_marks(piece)):
        x = x0 + m.at_mm
        lane = y0 - 4 - 4 * (n % 3)
        if m.kind == "node":
            _line(dwg, (x, y0 - 2), (x, y0 + strip_h + 2))
            _line(dwg, (x - 3, y0 + strip_h / 2), (x + 3, y0 + strip_h / 2))
            dwg.add(dwg.circle((x, y0 + strip_h / 2), 2.0, fill="none", stroke="black", stroke_width=HAIRLINE))
        elif m.kind == "centre":
            _line(dwg, (x, y0), (x, y0 + strip_h), dash=[2, 1])
        elif m.kind == "rough-cut":
            _line(dwg, (x, y0 - 2), (x, y0 + strip_h + 2), dash=[0.5, 0.8])
        else:
            _line(dwg, (x, y0 - 6), (x, y0 + strip_h + 6), width=0.3)
        anchor = "end" if m.at_mm > length - 40 else "start"
        _text(dwg, m.label, (x + (-1 if anchor == "end" else 1), lane), 2.5, anchor=anchor)
    if piece.arch is not None:
        _profile(dwg, piece, x0, y0 + strip_h + 16)
    _rulers(dwg, MARGIN, y0 + strip_h + 20 + profile_h)
    return dwg.tostring()


def _profile(dwg, piece, x0, top):
    """Full-size side view of an arched bar: top face straight, underside following the arch."""
    a = piece.arch
    t = a.thickness * 1000
    points = [(x0 + x * 1000, top + h * 1000) for x, h in a.outline]
    outline = [(x0, top)] + points + [(x0 + piece.length * 1000, top)]
    dwg.add(dwg.polyline(outline + [(x0, top)], fill="none", stroke="black", stroke_width=HAIRLINE))
    blank = dwg.line((x0, top + t), (x0 + piece.length * 1000, top + t), stroke="black", stroke_width=HAIRLINE)
    blank.dasharray([1, 1])
    dwg.add(blank)
    _text(dwg, f"side profile, full size: arch {a.depth * 1000:.1f} mm deep, leaves "
               f"{(t - a.depth * 1000):.1f} mm at the centre (dashed: the blank's underside)", (x0, top - 2), 2.5)
    for x, h in a.stations[1:]:
        _line(dwg, (x0 + x * 1000, top + t), (x0 + x * 1000, top + t + 2))
        _text(dwg, f"{h * 1000:.1f}", (x0 + x * 1000, top + t + 5), 2, anchor="middle")


def render_plate_svg(plan, set_plan):
    """Round hanging plate for a chime set: tube holes on a pitch circle, striker hole at the centre."""
    plate = mk.hanging_plate(set_plan)
    size = max(plate.diameter_mm, 4 * INCH_MM + 115) + 2 * MARGIN
    height = plate.diameter_mm + 2 * MARGIN + 40
    dwg = _drawing(size, height)
    cx, cy = MARGIN + plate.diameter_mm / 2, MARGIN + 15 + plate.diameter_mm / 2
    _text(dwg, f"{plan.title}: hanging plate for {set_plan.name}, {plate.diameter_mm:.0f} mm across", (MARGIN, MARGIN + 3), 4)
    _text(dwg, "Print or cut at 100 %; check the rulers. Drill all holes "
               f"{plate.hole_mm:.0f} mm; the centre hole carries the striker line.", (MARGIN, MARGIN + 9), 2.5)
    dwg.add(dwg.circle((cx, cy), plate.diameter_mm / 2, fill="none", stroke="black", stroke_width=HAIRLINE))
    if plate.pitch_radius_mm:
        circle = dwg.circle((cx, cy), plate.pitch_radius_mm, fill="none", stroke="black", stroke_width=HAIRLINE)
        circle.dasharray([2, 2])
        dwg.add(circle)
    for x, y, label in list(plate.holes) + [(0.0, 0.0, "striker")]:
        hx, hy = cx + x, cy - y
        dwg.add(dwg.circle((hx, hy), plate.hole_mm / 2, fill="none", stroke="black", stroke_width=HAIRLINE))
        _line(dwg, (hx - 4, hy), (hx + 4, hy))
        _line(dwg, (hx, hy - 4), (hx, hy + 4))
        _text(dwg, label, (hx, hy + plate.hole_mm + 3), 2.5, anchor="middle")
    _rulers(dwg, MARGIN, cy + plate.diameter_mm / 2 + 12)
    return dwg.tostring()


def render_wrap_svg(plan, set_plan):
    """Wrap-around guide for marking two diametrically opposite holes on a tube."""
    circumference = mk.wrap_guide_mm(set_plan)
    width = max(circumference + 20, 4 * INCH_MM + 115) + 2 * MARGIN
    height = 2 * MARGIN + 60
    dwg = _drawing(width, height)
    x0, y0 = MARGIN, MARGIN + 18
    _text(dwg, f"{plan.title}: wrap guide for {set_plan.section_text}", (MARGIN, MARGIN + 3), 4)
    _text(dwg, "Wrap round the tube at the hang-hole mark, ends meeting at A; mark at A and at B "
               "for two opposite holes.", (MARGIN, MARGIN + 9), 2.5)
    dwg.add(dwg.rect((x0, y0), (circumference + 10, 12), fill="none", stroke="black", stroke_width=HAIRLINE))
    for at, label in ((0.0, "A"), (circumference / 2, "B"), (circumference, "A")):
        _line(dwg, (x0 + at, y0 - 3), (x0 + at, y0 + 15), width=0.3)
        _text(dwg, label, (x0 + at, y0 - 4), 3, anchor="middle")
    _text(dwg, "overlap", (x0 + circumference + 5, y0 + 8), 2, anchor="middle")
    _rulers(dwg, MARGIN, y0 + 30)
    return dwg.tostring()


def svg_files(plan):
    """All SVG templates as {relative file name: text}."""
    files = {}
    for s in plan.sets:
        for p in s.pieces:
            if p.kind in ("chime", "bar", "air-column", "resonator"):
                files[f"templates/{p.label}.svg"] = render_piece_svg(plan, p)
        if s.kind == "chime" and s.pieces:
            files[f"templates/{s.name}-plate.svg"] = render_plate_svg(plan, s)
        if s.shape == "tube" and s.kind == "chime":
            files[f"templates/{s.name}-wrap.svg"] = render_wrap_svg(plan, s)
    return files

"""The length-pitch chart as inline SVG text: one point per piece, length against pitch.

Presentation only: it draws the Plan's own lengths and target frequencies. Sets are told
apart by marker shape and line style, never by colour, and every point carries its label.
"""

from __future__ import annotations

import math
from xml.sax.saxutils import escape

from cutplan.units import MM

__all__ = ["WIDTH", "HEIGHT", "LEFT", "RIGHT", "TOP", "BOTTOM", "length_pitch_svg"]

WIDTH, HEIGHT = 640, 360
"""Chart size [px]."""
LEFT, RIGHT, TOP, BOTTOM = 64, 16, 16, 44
"""Margins [px]."""
_SHAPES = ("circle", "square", "triangle", "diamond")
_DASHES = ("", "6 3", "2 3", "8 3 2 3")


def _marker(shape, x, y, r=4.0):
    if shape == "circle":
        return f'<circle cx="{x:.1f}" cy="{y:.1f}" r="{r}"/>'
    if shape == "square":
        return f'<rect x="{x - r:.1f}" y="{y - r:.1f}" width="{2 * r}" height="{2 * r}"/>'
    if shape == "triangle":
        return f'<path d="M{x:.1f} {y - r:.1f}L{x + r:.1f} {y + r:.1f}L{x - r:.1f} {y + r:.1f}Z"/>'
    return f'<path d="M{x:.1f} {y - r:.1f}L{x + r:.1f} {y:.1f}L{x:.1f} {y + r:.1f}L{x - r:.1f} {y:.1f}Z"/>'


def _step(span):
    raw = span / 5
    mag = 10 ** math.floor(math.log10(raw))
    return next(m * mag for m in (1, 2, 5, 10) if m * mag >= raw)


def length_pitch_svg(plan, units="mm"):
    """SVG text: finished length [mm or in] against target pitch (log scale) for every piece."""
    pieces = [p for p in plan.pieces if p.length > 0 and p.target_hz > 0]
    if not pieces:
        return ""
    scale = 25.4 if units == "in" else 1.0
    unit = "in" if units == "in" else "mm"
    lengths = [p.length / MM / scale for p in pieces]
    f_lo, f_hi = min(p.target_hz for p in pieces) / 1.06, max(p.target_hz for p in pieces) * 1.06
    step = _step(max(lengths) or 1.0)
    y_hi = step * math.ceil(max(lengths) * 1.05 / step)
    w, h = WIDTH - LEFT - RIGHT, HEIGHT - TOP - BOTTOM

    def px(f):
        return LEFT + w * math.log(f / f_lo) / math.log(f_hi / f_lo)

    def py(v):
        return TOP + h * (1 - v / y_hi)

    out = [f'<svg xmlns="http://www.w3.org/2000/svg" class="chart" viewBox="0 0 {WIDTH} {HEIGHT}" '
           f'role="img" aria-label="length against pitch">',
           f'<rect x="{LEFT}" y="{TOP}" width="{w}" height="{h}" class="frame"/>']
    v = 0.0
    while v <= y_hi + 1e-9:
        out.append(f'<line x1="{LEFT}" x2="{LEFT + w}" y1="{py(v):.1f}" y2="{py(v):.1f}" class="grid"/>'
                   f'<text x="{LEFT - 6}" y="{py(v) + 4:.1f}" text-anchor="end">{v:g}</text>')
        v += step
    ticks = {}
    for p in pieces:  # one tick per distinct pitch, labelled with its note; thinned when crowded
        ticks.setdefault(round(p.target_hz, 2), p.note)
    last_x = -1e9
    for f, note in sorted(ticks.items()):
        x = px(f)
        out.append(f'<line x1="{x:.1f}" x2="{x:.1f}" y1="{TOP}" y2="{TOP + h}" class="grid"/>')
        if x - last_x >= 22:
            out.append(f'<text x="{x:.1f}" y="{TOP + h + 16}" text-anchor="middle">{escape(note)}</text>')
            last_x = x
    out.append(f'<text x="{LEFT + w / 2}" y="{HEIGHT - 6}" text-anchor="middle">target pitch (log scale), by note</text>')
    out.append(f'<text x="14" y="{TOP + h / 2}" text-anchor="middle" transform="rotate(-90 14 {TOP + h / 2})">'
               f'finished length [{unit}]</text>')
    for k, s in enumerate(plan.sets):
        pts = [(px(p.target_hz), py(p.length / MM / scale), p) for p in s.pieces if p.length > 0]
        if not pts:
            continue
        shape, dash = _SHAPES[k % len(_SHAPES)], _DASHES[k % len(_DASHES)]
        path = " ".join(f"{'M' if i == 0 else 'L'}{x:.1f} {y:.1f}" for i, (x, y, _) in enumerate(pts))
        out.append(f'<g class="set"><path d="{path}" class="trace"' + (f' stroke-dasharray="{dash}"' if dash else "") + "/>")
        for x, y, p in pts:
            out.append(f'<g class="pt">{_marker(shape, x, y)}<title>{escape(p.label)} {escape(p.note)}: '
                       f'{p.length / MM / scale:.{3 if units == "in" else 1}f} {unit}</title></g>')
        x0, y0, _ = pts[0]
        out.append(f'<text x="{x0 + 8:.1f}" y="{y0 - 8:.1f}">{escape(s.name)}</text></g>')
    out.append("</svg>")
    return "".join(out)

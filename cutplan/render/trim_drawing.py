"""The trim answer of a bar as a drawing: the side view with the cuts to make, inline SVG text.

Presentation only: the profile now, the profile after the cuts, the stations and depths all come
from the trim report (:class:`cutplan.tuning.TrimReport`); nothing here computes physics.  The
SVG uses no external asset (no fonts, images or scripts), so the page stays self-contained.
"""

from __future__ import annotations

from html import escape

from cutplan.units import INCH_DENOMINATOR, format_length

__all__ = ["WIDTH_PX", "trim_drawing"]

WIDTH_PX = 640.0
"""Drawing width on the page [px]; the height follows the bar's proportions (thickness x 3)."""


def _path(points):
    return " ".join(f"{'M' if i == 0 else 'L'}{x:.1f},{y:.1f}" for i, (x, y) in enumerate(points))


def trim_drawing(report, units="mm", den=INCH_DENOMINATOR):
    """SVG text of an undercut bar's side view with this round's cuts, or "" for other pieces."""
    if not report.profile_now:
        return ""
    xs, hs = report.profile_now
    length = xs[-1] - xs[0]
    t = max(hs)
    pad = 14.0
    sx = (WIDTH_PX - 2 * pad) / length
    sy = 3 * sx
    top = 26.0
    height = top + t * sy + 46.0

    def pt(x, h):
        return pad + (x - xs[0]) * sx, top + h * sy

    body = [pt(xs[0], 0)] + [pt(x, h) for x, h in zip(xs, hs, strict=True)] + [pt(xs[-1], 0)]
    out = [f'<svg xmlns="http://www.w3.org/2000/svg" class="trim-drawing" role="img" '
           f'viewBox="0 0 {WIDTH_PX:.0f} {height:.0f}" width="{WIDTH_PX:.0f}" height="{height:.0f}">',
           f"<title>{escape(report.label)}: side view, top face up (thickness drawn 3 x)</title>",
           f'<path d="{_path(body)} Z" fill="#e8dcc8" stroke="#333" stroke-width="1"/>']
    if report.profile_after:
        ax, ah = report.profile_after
        shift = report.trim_each_end
        after = [pt(x + shift + xs[0], h) for x, h in zip(ax, ah, strict=True)]
        out.append(f'<path d="{_path(after)}" fill="none" stroke="#b00" stroke-width="1.2" stroke-dasharray="4 2"/>')
        if report.trim_each_end > 0.05e-3:
            for x in (xs[0] + shift, xs[-1] - shift):
                x0, _ = pt(x, 0)
                out.append(f'<line x1="{x0:.1f}" y1="{top - 6:.1f}" x2="{x0:.1f}" y2="{top + t * sy + 6:.1f}" '
                           'stroke="#b00" stroke-width="1"/>')
    for k, (x, depth, mode, _raises) in enumerate(report.removal):
        h = min(hs[i] for i in range(len(xs)) if abs(xs[i] - x) <= (xs[1] - xs[0]) * 0.51)
        x0, y0 = pt(x, h)
        out.append(f'<line x1="{x0:.1f}" y1="{y0:.1f}" x2="{x0:.1f}" y2="{y0 + 14:.1f}" stroke="#b00"/>')
        out.append(f'<text x="{x0:.1f}" y="{y0 + 24 + 9 * (k % 2):.1f}" font-size="8" text-anchor="middle" '
                   f'fill="#b00">{depth * 1e3:.2f}</text>')
    for s in report.supports:
        for x in (xs[0] + length / 2 - s, xs[0] + length / 2 + s):
            x0, y0 = pt(x, 0)
            out.append(f'<circle cx="{x0:.1f}" cy="{y0 - 6:.1f}" r="3" fill="none" stroke="#333"/>')
    cx, _ = pt(xs[0] + length / 2, 0)
    out.append(f'<line x1="{cx:.1f}" y1="{top - 10:.1f}" x2="{cx:.1f}" y2="{top + t * sy:.1f}" stroke="#333" '
               'stroke-dasharray="2 2"/>')
    out.append(f'<text x="{pad:.1f}" y="12" font-size="9">end A</text>')
    out.append(f'<text x="{WIDTH_PX - pad:.1f}" y="12" font-size="9" text-anchor="end">'
               f'{escape(format_length(length, units, den))}</text>')
    out.append(f'<text x="{pad:.1f}" y="{height - 4:.1f}" font-size="8">dashed red: the underside after the cuts '
               f'(depths in mm); circles: supports; thickness drawn 3 x</text>')
    out.append("</svg>")
    return "\n".join(out)

"""The templates' SVG text is written straight as text, byte for byte what svgwrite's own
``tostring()`` (an ElementTree serialisation, the oracle) gives for the same drawing made with
svgwrite's elements: pieces, plates, wrap guides, an arched bar's profile, other colours, and
text that must be escaped."""

import dataclasses

import svgwrite

import cutplan
from cutplan.render import marks as mk
from cutplan.render import svg

ARCHED = {"title": "garden bars", "set": [{"name": "bars", "kind": "bar", "notes": ["C5", "E5"],
          "material": "rosewood-honduras", "model": "timoshenko",
          "section": {"shape": "bar", "width": "50 mm", "thickness": "22 mm"},
          "undercut": {"ratios": [4.0], "min_thickness": "6 mm"}}]}


class SvgwriteDoc:
    """The drawing the templates make, drawn with svgwrite's elements and written by svgwrite
    (the same calls as the renderer's drawing, in the full profile without validation)."""

    def __init__(self, width, height, colours=None):
        width, height = round(width, 3), round(height, 3)
        self.colours = {**svg.COLOURS, **(colours or {})}
        self.dwg = svgwrite.Drawing(size=(f"{width:.3f}mm", f"{height:.3f}mm"), profile="full", debug=False)
        self.dwg.viewbox(0, 0, width, height)
        self.groups = {}
        for role in ("cut", "mark", "text"):
            if role == "text":
                g = self.dwg.g(id=role, fill=self.colours[role], stroke="none")
            else:
                g = self.dwg.g(id=role, fill="none", stroke=self.colours[role], stroke_width=svg.HAIRLINE)
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

    def text(self, text, at, size=svg.TEXT, anchor="start"):
        self.groups["text"].add(self.dwg.text(text, insert=at, font_size=size,
                                              font_family="Helvetica, Arial, sans-serif", text_anchor=anchor))

    def tostring(self):
        return self.dwg.tostring()


def _both(monkeypatch, plan, colours=None):
    direct = svg.svg_files(plan, colours)
    with monkeypatch.context() as m:
        m.setattr(svg, "_Doc", SvgwriteDoc)
        oracle = svg.svg_files(plan, colours)
    return direct, oracle


def test_every_template_is_svgwrites_own_text(monkeypatch, example_plan):
    plan = example_plan("porch-chimes")
    odd = dataclasses.replace(plan, title='Porch & "garden" <set>\n\ttab\r \u00e9 \u2713')
    arched = cutplan.plan(cutplan.design_from_mapping(ARCHED))
    quoted = {"cut": "#00ff00", "text": 'a&b<"c">\n\t\r'}  # attribute values that must be escaped
    for p, colours in ((plan, None), (plan, quoted), (odd, None), (arched, None)):
        direct, oracle = _both(monkeypatch, p, colours)
        assert direct.keys() == oracle.keys()
        for name in oracle:
            assert direct[name] == oracle[name], name
    assert any("<polyline" in text for text in _both(monkeypatch, arched)[1].values())
    assert any("&amp;" in text and "&lt;" in text for text in _both(monkeypatch, odd)[1].values())
    assert any("&quot;" in text and "&#10;" in text for text in _both(monkeypatch, plan, quoted)[1].values())
    assert any('stroke-dasharray="' in text for text in _both(monkeypatch, plan)[1].values())

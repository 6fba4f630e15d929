"""The templates' SVG text is written straight from the drawing, byte for byte what svgwrite's own
``tostring()`` (an ElementTree serialisation, the oracle) gives for the same drawing: pieces,
plates, wrap guides, an arched bar's profile, other colours, and text that must be escaped."""

import dataclasses

import cutplan
from cutplan.render import svg

ARCHED = {"title": "garden bars", "set": [{"name": "bars", "kind": "bar", "notes": ["C5", "E5"],
          "material": "rosewood-honduras", "model": "timoshenko",
          "section": {"shape": "bar", "width": "50 mm", "thickness": "22 mm"},
          "undercut": {"ratios": [4.0], "min_thickness": "6 mm"}}]}


def _both(monkeypatch, plan, colours=None):
    direct = svg.svg_files(plan, colours)
    with monkeypatch.context() as m:
        m.setattr(svg, "_svg_text", lambda dwg: dwg.tostring())
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

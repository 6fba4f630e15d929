"""Every example's packet, on A4 and on letter: no word struck by a line, none printed over
another, none inside the 6 mm margin most printers cannot print (measured from the PDF itself)."""

from pathlib import Path

import pytest

import cutplan
from cutplan.render.pdf import render_pdf
from tests.render.layout_check import MARGIN_MM, audit_pdf

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = sorted((ROOT / "examples").glob("*.toml"))


@pytest.mark.parametrize("paper", ["a4", "letter"])
@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_no_label_is_struck_overprinted_or_in_the_margin(example_plan, path, paper):
    # the example's Plan comes from the session fixture in tests/conftest.py (planned once)
    result = audit_pdf(render_pdf(example_plan(path.stem), paper))
    assert result["struck"] == []
    assert result["over"] == []
    assert MARGIN_MM == 6.0  # common unprintable band of office printers (common practice)
    assert result["margin"] == []


def test_the_audit_finds_a_struck_word_and_an_overprint():
    # the check itself must see what it is meant to catch: a line through a word, two words
    # on top of each other, and a word 3 mm from the edge
    import io

    from reportlab.lib.pagesizes import A4
    from reportlab.lib.units import mm
    from reportlab.pdfgen.canvas import Canvas

    buf = io.BytesIO()
    c = Canvas(buf, pagesize=A4, invariant=1)
    c.setFont("Helvetica", 10)
    c.drawString(50 * mm, 200 * mm, "struck")
    c.line(48 * mm, 201 * mm, 70 * mm, 201 * mm)
    c.drawString(50 * mm, 150 * mm, "first")
    c.drawString(51 * mm, 150 * mm, "second")
    c.drawString(3 * mm, 100 * mm, "edge")
    c.showPage()
    c.save()
    result = audit_pdf(buf.getvalue())
    assert [w for _, w in result["struck"]] == ["struck"]
    assert len(result["over"]) >= 1
    assert [w for _, w in result["margin"]] == ["edge"]


THICK = """
title = "Thick bass bars"
units = "in"
paper = "{paper}"
[[set]]
name = "bass"
kind = "bar"
notes = ["C3", "G3"]
material = "padauk-african"
section = {{ shape = "bar", width = "64 mm", thickness = "40 mm" }}
undercut = {{ ratios = [4.0], arch_width = 0.5, min_thickness = "8 mm" }}
"""


@pytest.mark.parametrize("paper", ["a4", "letter"])
def test_thick_undercut_profiles_fit_without_overlap(tmp_path, paper):
    # 40 mm blanks: the side profiles once printed over their heading and each other
    path = tmp_path / "thick.toml"
    path.write_text(THICK.format(paper=paper), encoding="utf-8")
    plan = cutplan.plan(cutplan.load_design(path))
    assert all(p.arch is not None and p.arch.thickness >= 0.040 for p in plan.pieces)
    result = audit_pdf(render_pdf(plan))
    assert (result["struck"], result["over"], result["margin"]) == ([], [], [])


def test_the_fast_line_test_agrees_with_the_clip_one_segment_at_a_time():
    # the audit tests every segment against a word box at once (numpy); the answer must be the
    # one-segment Liang-Barsky clip's, edge cases included (a segment along a box edge, a point)
    import itertools

    from tests.render.layout_check import _hits, _struck

    box = (1.0, 1.0, 3.0, 2.0)
    pts = list(itertools.product((0.0, 1.0, 2.0, 3.0, 4.0), (0.0, 1.0, 1.5, 2.0, 3.0)))
    for a, b in itertools.product(pts, pts):
        assert bool(_struck([("w", box)], [(a, b)])) == _hits(box, a, b), (a, b)

"""Every example's packet, on A4 and on letter: no word struck by a line, none printed over
another, none inside the 6 mm margin most printers cannot print (measured from the PDF itself)."""

import io
import itertools
import random
from dataclasses import replace
from pathlib import Path

import pdfplumber
import pytest
from reportlab.lib.pagesizes import A4
from reportlab.lib.units import mm
from reportlab.pdfgen.canvas import Canvas

import cutplan
from cutplan.render.pdf import render_pdf
from tests.render.layout_check import (
    MARGIN_MM,
    SHRINK,
    _hits,
    _overprinted_words,
    _segments,
    _struck,
    audit_page,
    audit_pdf,
)
from tests.render.pdf_reader import read_pages

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = sorted((ROOT / "examples").glob("*.toml"))


@pytest.mark.parametrize("paper", ["a4", "letter"])
@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_no_label_is_struck_overprinted_or_in_the_margin(example_pdf, path, paper):
    # the example's packet comes from the session fixture in tests/conftest.py (planned and rendered once per run)
    result = audit_pdf(example_pdf(path.stem, paper))
    assert result["struck"] == []
    assert result["over"] == []
    assert MARGIN_MM == 6.0  # common unprintable band of office printers (common practice)
    assert result["margin"] == []


def _first_faults(c):
    """Draw the first faults the audit must see: a line through a word, two words on top of each other."""
    c.setFont("Helvetica", 10)
    c.drawString(50 * mm, 200 * mm, "struck")
    c.line(48 * mm, 201 * mm, 70 * mm, 201 * mm)
    c.drawString(50 * mm, 150 * mm, "first")
    c.drawString(51 * mm, 150 * mm, "second")


def _faults_pdf():
    """One A4 page with every fault the audit must see: a line through a word, two words on top
    of each other, one word printed twice 0.3 mm apart (pdfium's text page keeps only one copy of
    such a repeat), a word 3 mm from the edge, a word turned 90 degrees under a line, a word
    under a circle's outline and a word crossed by a rectangle's edge."""
    buf = io.BytesIO()
    c = Canvas(buf, pagesize=A4, invariant=1)
    _first_faults(c)
    c.drawString(100 * mm, 150 * mm, "twice")
    c.drawString(100.3 * mm, 150 * mm, "twice")
    c.drawString(3 * mm, 100 * mm, "edge")
    c.saveState()
    c.translate(100 * mm, 60 * mm)
    c.rotate(90)
    c.drawString(0, 0, "upward")
    c.restoreState()
    c.line(95 * mm, 65 * mm, 105 * mm, 65 * mm)
    c.drawString(145 * mm, 99 * mm, "ringed")
    c.circle(150 * mm, 95 * mm, 6 * mm, stroke=1, fill=0)
    c.drawString(145 * mm, 50 * mm, "boxed")
    c.rect(150 * mm, 45 * mm, 30 * mm, 10 * mm, stroke=1, fill=0)
    c.showPage()
    c.save()
    return buf.getvalue()


def test_the_audit_finds_a_struck_word_and_an_overprint():
    # the check itself must see what it is meant to catch: a line through a word, two words
    # on top of each other, and a word 3 mm from the edge
    buf = io.BytesIO()
    c = Canvas(buf, pagesize=A4, invariant=1)
    _first_faults(c)
    c.drawString(3 * mm, 100 * mm, "edge")
    c.showPage()
    c.save()
    result = audit_pdf(buf.getvalue())
    assert [w for _, w in result["struck"]] == ["struck"]
    assert len(result["over"]) >= 1
    assert [w for _, w in result["margin"]] == ["edge"]


def test_the_audit_finds_repeats_turned_words_and_outlines():
    # a word printed twice a hair apart, a turned word struck by a line, words under a circle's
    # outline and a rectangle's edge: each must be reported (pdfium reads a repeated word once,
    # so the reader must bring the second copy back for the overprint to be seen)
    result = audit_pdf(_faults_pdf())
    # a turned word is read top to bottom ("upward" turned 90 degrees reads "drawpu"), and the
    # letters of words printed over each other fall into one word, as pdfplumber groups them
    assert sorted(w for _, w in result["struck"]) == ["boxed", "drawpu", "ringed", "struck"]
    assert sorted(w for _, w in result["over"]) == ["fisrestcond", "ttwwiiccee"]
    assert [w for _, w in result["margin"]] == ["edge"]


def _plumber_pages(data):
    """The pages as pdfplumber (pdfminer.six underneath) reads them: the independent reader."""
    with pdfplumber.open(io.BytesIO(data)) as pdf:
        pages = list(pdf.pages)
        for page in pages:  # read everything the audit needs before the file closes
            page.objects  # noqa: B018
        return pages


def _facts(page):
    words = page.extract_words(use_text_flow=False, keep_blank_chars=False, x_tolerance=1.5, return_chars=True)
    return [(w["text"], (w["x0"], w["top"], w["x1"], w["bottom"])) for w in words], _segments(page)


@pytest.mark.parametrize("source", ["faults", "porch-chimes"])
def test_the_fast_reader_reads_what_pdfplumber_reads(example_pdf, source):
    # the audit reads pages with pdfium (fast); pdfplumber, a second and independent reader, must
    # find the same words at the same places and the same drawn segments (within 0.5 pt, the
    # precision of pdfium's single-precision coordinates is some 1e-4 pt) and so the same faults
    data = _faults_pdf() if source == "faults" else example_pdf(source, "letter")
    fast, slow = read_pages(data), _plumber_pages(data)
    assert len(fast) == len(slow)
    for n, (ours, theirs) in enumerate(zip(fast, slow, strict=True), start=1):
        (words, segs), (want_words, want_segs) = _facts(ours), _facts(theirs)
        assert [w for w, _ in words] == [w for w, _ in want_words], n
        for (text, box), (_, want) in zip(words, want_words, strict=True):
            assert box == pytest.approx(want, abs=0.5), (n, text)
        assert len(segs) == len(want_segs), n
        for seg, want in zip(segs, want_segs, strict=True):
            assert [*seg[0], *seg[1]] == pytest.approx([*want[0], *want[1]], abs=0.5), n
        assert audit_page(ours) == audit_page(theirs), n


THICK = """
title = "Thick bass bars"
units = "in"
paper = "{paper}"
[[set]]
name = "bass"
kind = "bar"
notes = ["C3", "G3"]
material = "padauk-african"
model = "timoshenko"
section = {{ shape = "bar", width = "64 mm", thickness = "40 mm" }}
undercut = {{ ratios = [4.0], arch_width = 0.5, min_thickness = "8 mm" }}
"""


@pytest.fixture(scope="module")
def thick_plan(tmp_path_factory):
    """The thick bass bars planned once for both papers: the planner only copies the design's
    paper into the plan, and the renderer is given the paper (as ``paper = ...`` in the design
    would give it).  Planned on the 1-D beam model (some 0.4 CPU s, against some 3.7 s on the
    2-D body): what the test checks is how a 40 mm blank's side profile is drawn, and the 1-D
    arches are as deep (23.4 and 24.2 mm against 23.7 and 24.6 mm) on the same 40 mm blanks."""
    path = tmp_path_factory.mktemp("thick") / "thick.toml"
    path.write_text(THICK.format(paper="a4"), encoding="utf-8")
    return cutplan.plan(cutplan.load_design(path))


@pytest.mark.parametrize("paper", ["a4", "letter"])
def test_thick_undercut_profiles_fit_without_overlap(thick_plan, paper):
    # 40 mm blanks: the side profiles once printed over their heading and each other
    plan = replace(thick_plan, paper=paper)
    assert all(p.arch is not None and p.arch.thickness >= 0.040 for p in plan.pieces)
    result = audit_pdf(render_pdf(plan))
    assert (result["struck"], result["over"], result["margin"]) == ([], [], [])


def test_the_fast_line_test_agrees_with_the_clip_one_segment_at_a_time():
    # the audit tests every segment against a word box at once (numpy); the answer must be the
    # one-segment Liang-Barsky clip's, edge cases included (a segment along a box edge, a point)
    box = (1.0, 1.0, 3.0, 2.0)
    pts = list(itertools.product((0.0, 1.0, 2.0, 3.0, 4.0), (0.0, 1.0, 1.5, 2.0, 3.0)))
    for a, b in itertools.product(pts, pts):
        assert bool(_struck([("w", box)], [(a, b)])) == _hits(box, a, b), (a, b)


def test_the_fast_line_test_agrees_with_the_clip_for_many_boxes_at_once():
    # boxes go through the line test in blocks; across block edges the answer is still the clip's
    rng = random.Random(7)
    boxes = []
    for k in range(700):
        x, y = rng.uniform(0, 40), rng.uniform(0, 40)
        boxes.append((f"w{k}", (x, y, x + rng.uniform(0, 6), y + rng.uniform(0, 3))))
    def point():
        return float(rng.randint(0, 45)), float(rng.randint(0, 45))

    segs = [(point(), point()) for _ in range(60)]
    want = [text for text, box in boxes if any(_hits(box, a, b) for a, b in segs)]
    assert _struck(boxes, segs) == want
    assert 0 < len(want) < len(boxes)


def test_the_overprint_test_agrees_with_testing_every_pair():
    # the overprint test only compares characters whose tops are near; it must give what comparing
    # every pair of (shrunk) character boxes gives
    rng = random.Random(11)
    words = []
    for k in range(120):
        x, top, size = rng.uniform(0, 300), float(rng.randint(0, 60)), rng.choice((7.0, 9.0, 16.0))
        chars = []
        for _ in range(rng.randint(1, 6)):
            w = rng.uniform(2, 9)
            chars.append({"text": "x", "x0": x, "x1": x + w, "top": top, "bottom": top + size})
            x += w
        words.append({"text": f"w{k}", "chars": chars})
    boxes = [(n, c["x0"] + SHRINK / 2, c["top"] + SHRINK, c["x1"] - SHRINK / 2, c["bottom"] - SHRINK)
             for n, w in enumerate(words) for c in w["chars"]]
    want = {n for (n, *a), (m, *b) in itertools.permutations(boxes, 2)
            if a[0] < b[2] and b[0] < a[2] and a[1] < b[3] and b[1] < a[3]}
    assert _overprinted_words(words) == want
    assert 0 < len(want) < len(words)

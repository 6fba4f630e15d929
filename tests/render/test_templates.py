"""Print-scale checks of the shop packet: rasterised PDF pages and parsed SVG geometry."""

import xml.etree.ElementTree as ET

import numpy as np
import pypdfium2
import pytest

from cutplan.design import load_design
from cutplan.materials import load_library
from cutplan.planning.planner import plan
from cutplan.render import pdf as pdf_mod
from cutplan.render import svg as svg_mod
from cutplan.render.packet import packet_files
from cutplan.render.pdf import templates
from tests.pdf_text import page_texts

DPI = 600
PX_PER_MM = DPI / 25.4

GLOCK = """
title = "Bench glockenspiel <test> & co"
paper = "{paper}"
[[set]]
name = "glock"
kind = "bar"
notes = ["C7", "E7"]
material = "aluminum-6061-t6"
section = {{ shape = "bar", width = "25 mm", thickness = "6 mm" }}
"""


def make_plan(tmp_path, text, name="d.toml"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    design, _ = load_design(path, lambda dirs: load_library(dirs))
    return plan(design)


def raster(pdf_bytes, page_index):
    doc = pypdfium2.PdfDocument(pdf_bytes)
    page = doc[page_index]
    image = page.render(scale=DPI / 72, grayscale=True).to_numpy()
    height_pt = page.get_height()
    doc.close()
    gray = image[..., 0] if image.ndim == 3 else image
    return gray, height_pt


def dark_runs(row):
    """Centres [px] of runs of dark pixels along one pixel row."""
    dark = row < 128
    edges = np.flatnonzero(np.diff(dark.astype(int)))
    starts = edges[::2] + 1 if dark[0] == 0 else np.r_[0, edges[1::2] + 1]
    ends = edges[1::2] if dark[0] == 0 else edges[::2]
    return [(s + e) / 2 for s, e in zip(starts, ends, strict=False)]


def template_pages(pdf_bytes):
    return [i for i, text in enumerate(page_texts(pdf_bytes)) if "Marking strips" in text]


def pdf_text(pdf_bytes):
    return "\n".join(page_texts(pdf_bytes))


@pytest.fixture(scope="module")
def glock(tmp_path_factory):
    """``glock(paper)`` -> the test bars' Plan, ``paper`` in the design, planned once for this
    module (the tests only read it)."""
    plans = {}

    def get(paper):
        if paper not in plans:
            plans[paper] = make_plan(tmp_path_factory.mktemp(f"glock-{paper}"), GLOCK.format(paper=paper))
        return plans[paper]

    return get


@pytest.fixture(scope="module")
def first_template_raster(glock):
    """``first_template_raster(paper)`` -> (plan, grey image of the first template page at DPI,
    page height [mm]) for the test bars, rendered and rastered once for this module."""
    made = {}

    def get(paper):
        if paper not in made:
            p = glock(paper)
            data = pdf_mod.render_pdf(p)
            gray, height_pt = raster(data, template_pages(data)[0])
            made[paper] = (p, gray, height_pt / 72 * 25.4)
        return made[paper]

    return get


@pytest.mark.parametrize("paper", ["letter", "a4"])
def test_calibration_rulers_print_at_true_size(first_template_raster, paper):
    _p, gray, page_h_mm = first_template_raster(paper)
    # the 100 mm ruler: only its 0, 50 and 100 mm ticks reach 5 mm below its top line
    ruler_top_mm = pdf_mod.RULER_TOP / pdf_mod.mm  # from the bottom of the page
    row = int(round((page_h_mm - (ruler_top_mm - 5.0)) * PX_PER_MM))
    ticks = dark_runs(gray[row])
    assert len(ticks) == 3
    assert (ticks[-1] - ticks[0]) / PX_PER_MM == pytest.approx(100.0, abs=0.2)
    # the 4 in ruler 14 mm lower: ticks at 0, 2 and 4 in
    row2 = int(round((page_h_mm - (ruler_top_mm - 14.0 - 5.0)) * PX_PER_MM))
    ticks2 = dark_runs(gray[row2])
    assert len(ticks2) == 3
    assert (ticks2[-1] - ticks2[0]) / PX_PER_MM == pytest.approx(101.6, abs=0.2)


def test_node_marks_print_where_the_plan_says(first_template_raster):
    p, gray, page_h_mm = first_template_raster("letter")
    # first strip on the page: its frame position from the template layout, its body's bottom edge
    _size, pages = templates.orientation(p, "letter")
    tile, x_mm, y_top_mm = pages[0][0]
    top_mm_from_bottom = templates.strip_bottom_mm(tile, y_top_mm) + pdf_mod.STRIP_H_MM
    row = int(round((page_h_mm - top_mm_from_bottom - 0.8) * PX_PER_MM))
    runs = dark_runs(gray[row])
    zero = (pdf_mod.TEMPLATE_MARGIN / pdf_mod.mm + x_mm) * PX_PER_MM
    piece = p.pieces[0]
    # a bar's strip is laid from its rough-cut end: END A sits half the allowance in (the piece's
    # mark_offset), so the marks are the plan's positions shifted by it
    shift = piece.mark_offset * 1000
    expected = [shift] + [shift + x * 1000 for x in piece.nodes] + [shift + piece.length * 1000]
    for want in expected:
        nearest = min(runs, key=lambda r: abs((r - zero) / PX_PER_MM - want))
        assert (nearest - zero) / PX_PER_MM == pytest.approx(want, abs=0.2), (want, runs)


def svg_tree(text):
    return ET.fromstring(text)


def test_svg_is_in_millimetres_with_matching_viewbox(glock):
    p = glock("letter")
    root = svg_tree(svg_mod.render_piece_svg(p, p.pieces[0]))
    width, height = root.get("width"), root.get("height")
    assert width.endswith("mm") and height.endswith("mm")
    box = [float(v) for v in root.get("viewBox").replace(",", " ").split()]
    assert box[2] == pytest.approx(float(width[:-2]), abs=1e-9)
    assert box[3] == pytest.approx(float(height[:-2]), abs=1e-9)


def test_svg_node_and_ruler_marks_land_within_0_05_mm(glock):
    p = glock("letter")
    piece = p.pieces[0]
    root = svg_tree(svg_mod.render_piece_svg(p, piece))
    ns = "{http://www.w3.org/2000/svg}"
    verticals = sorted({round(float(e.get("x1")), 4) for e in root.iter(f"{ns}line") if e.get("x1") == e.get("x2")})
    for x in piece.nodes:
        want = svg_mod.MARGIN + piece.mark_offset * 1000 + x * 1000  # laid from the rough-cut end
        assert min(abs(v - want) for v in verticals) < 0.05
    assert min(abs(v - (svg_mod.MARGIN + 100)) for v in verticals) < 0.05  # 100 mm ruler end
    assert min(abs(v - (svg_mod.MARGIN + 115 + 101.6)) for v in verticals) < 0.05  # 4 in ruler end


def test_user_text_is_escaped_in_svg_and_pdf(glock):
    p = glock("letter")
    text = svg_mod.render_piece_svg(p, p.pieces[0])
    assert "&lt;test&gt; &amp; co" in text
    svg_tree(text)  # parses
    assert "<test> & co" in page_texts(pdf_mod.render_pdf(p))[0]


def test_pdf_is_byte_identical_on_every_run(glock):
    p = glock("a4")
    assert pdf_mod.render_pdf(p) == pdf_mod.render_pdf(p)


def test_pdf_text_has_every_label_and_both_units(example_plan, example_pdf_text):
    from cutplan.units import format_inches

    p = example_plan("classroom-pipes")  # planned, rendered and read once per run
    text = "\n".join(example_pdf_text("classroom-pipes"))
    for piece in p.pieces:
        assert piece.label in text
        assert f"{piece.length * 1000:.1f} mm" in text
        assert format_inches(piece.length, 32, show_error=False) in text


def test_sixty_piece_packet(tmp_path):
    text = """
title = "Sixty"
[[set]]
name = "big"
kind = "chime"
range = "C3..B7"
material = "aluminum-6063-t5"
section = { stock = "al-1.000x0.065" }
"""
    p = make_plan(tmp_path, text)
    assert len(p.pieces) == 60
    files = packet_files(p)
    pages = page_texts(files["packet.pdf"])
    assert len(pages) > 10
    all_text = "\n".join(pages)
    assert "big-60" in all_text and "big-1 " in all_text
    assert sum(1 for k in files if k.startswith("templates/big-")) == 60 + 2


def test_long_piece_is_tiled_with_sheet_numbers(tmp_path):
    text = """
title = "Tall"
[[set]]
name = "tall"
kind = "chime"
frequencies = [31]
section = { stock = "emt-1" }
"""
    p = make_plan(tmp_path, text)
    assert p.pieces[0].length > 2.35
    all_text = pdf_text(pdf_mod.render_pdf(p))
    from cutplan.render import marks

    size, _pages = templates.orientation(p, "letter")  # the orientation that needs fewer sheets
    usable_mm = (size[0] - 2 * pdf_mod.TEMPLATE_MARGIN) / pdf_mod.mm
    sheets = len(marks.tiles(marks.strip_length_mm(p.pieces[0]), usable_mm, pdf_mod.OVERLAP_MM))
    assert sheets >= 10  # 2.4 m on sheets of at most about 235 mm advance (landscape letter)
    assert f"sheet 1 of {sheets}" in all_text and f"sheet {sheets} of {sheets}" in all_text


def test_tables_stop_above_the_footer(tmp_path):
    # a long set with tall tuning rows: every cut-list, tuning and stopper page must leave the band
    # between 9 and 14 mm from the bottom blank (the footer text sits at 7 mm)
    text = """
title = "Long"
[[set]]
name = "bars"
kind = "bar"
range = "C4..C6"
material = "maple-sugar"
section = { shape = "bar", width = "50 mm", thickness = "22 mm" }
[[set]]
name = "res"
kind = "resonator"
serves = "bars"
section = { stock = "pvc-sch40-2" }
temperature_range = ["10 C", "30 C"]
"""
    data = pdf_mod.render_pdf(make_plan(tmp_path, text))
    # the page titles are read with pdfium, which renders the pages anyway (it finds the same
    # pages as pypdf's text: 16 of 22 for this design; pypdf's text costs about 1.5 CPU s here)
    doc = pypdfium2.PdfDocument(data)
    checked = 0
    for i in range(len(doc)):
        words = doc[i].get_textpage().get_text_range()
        if not any(k in words for k in ("Cut list", "Tuning sheet", "stopper settings")):
            continue
        img = doc[i].render(scale=2, grayscale=True).to_numpy()
        gray = img[..., 0] if img.ndim == 3 else img
        px_mm = 2 * 72 / 25.4
        band = gray[int(gray.shape[0] - 14 * px_mm):int(gray.shape[0] - 9 * px_mm)]
        assert band.min() > 200, f"page {i + 1} draws into the footer band"
        checked += 1
    doc.close()
    assert checked >= 4

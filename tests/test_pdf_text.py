"""The tests' quick PDF text reader (pdfium) finds the same words as pypdf, an independent reader."""

from collections import Counter

import pytest
from pypdf import PdfReader

from cutplan.render.pdf import render_pdf
from tests.pdf_text import page_texts


@pytest.mark.parametrize("name", ["porch-chimes", "garden-conduit-chime"])
def test_pdfium_and_pypdf_find_the_same_words_on_every_page(tmp_path, example_plan, name):
    pdf = tmp_path / "packet.pdf"
    pdf.write_bytes(render_pdf(example_plan(name), "letter"))
    ours = page_texts(pdf)
    theirs = [page.extract_text() or "" for page in PdfReader(pdf).pages]
    assert len(ours) == len(theirs) > 3
    for i, (a, b) in enumerate(zip(ours, theirs, strict=True)):
        assert Counter(a.split()) == Counter(b.split()), f"page {i + 1}"
    assert page_texts(pdf.read_bytes()) == ours

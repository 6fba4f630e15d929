"""The tests' quick PDF text reader (pdfium) reads the text pypdf, an independent reader, reads."""

import re
from collections import Counter

import pytest
from pypdf import PdfReader

from tests.pdf_text import page_texts


def _but_whitespace(pypdf_text):
    """pypdf's text with the two differences tests/pdf_text.py names taken out: the space pypdf
    puts before a string it reads as going on from where the previous line's ``T*`` left the pen,
    and runs of spaces (pdfium's text page keeps one)."""
    return re.sub(" +", " ", pypdf_text.replace("\n ", "\n"))


@pytest.mark.parametrize("name", ["porch-chimes", "garden-conduit-chime", "music-room-marimba"])
def test_pdfium_and_pypdf_find_the_same_words_on_every_page(tmp_path, example_pdf, name):
    # music-room-marimba: two sets, so two cut lists and tuning sheets, arched bars and stoppers
    pdf = tmp_path / "packet.pdf"
    pdf.write_bytes(example_pdf(name, "letter"))
    ours = page_texts(pdf)
    theirs = [page.extract_text() or "" for page in PdfReader(pdf).pages]
    assert len(ours) == len(theirs) > 3
    tables = 0
    for i, (a, b) in enumerate(zip(ours, theirs, strict=True)):
        assert Counter(a.split()) == Counter(b.split()), f"page {i + 1}"
        # line for line, in the same order: the tests' checks of a table cell's two lines
        # ("20-1/32 in\n508.6 mm") and of a row's label on a line of its own hold for either reader
        assert a == _but_whitespace(b), f"page {i + 1}"
        if "Cut list: " in b or "Tuning sheet: " in b:
            assert a == b, f"page {i + 1}"  # the tables the tests read line by line: the very same text
            tables += 1
    assert tables >= 2
    assert page_texts(pdf.read_bytes()) == ours

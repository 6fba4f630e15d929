"""Plain text of each page of a PDF, read with pdfium (pypdfium2) for the tests.

pypdf's text extraction spends most of a packet test's time on the template pages (several
seconds for a few packets); pdfium reads the same words in about a tenth of the time.  Lines end
in "\\n".  Within a page pdfium may put a line elsewhere than pypdf does (the running header, for
one), so tests look for phrases, not for where they stand.  tests/test_pdf_text.py checks that
both readers find the same words.
"""

from __future__ import annotations

import pypdfium2 as pdfium

__all__ = ["page_texts"]


def page_texts(source) -> list[str]:
    """The text of each page of the PDF at ``source`` (a path or the file's bytes)."""
    doc = pdfium.PdfDocument(source)
    try:
        pages = []
        for i in range(len(doc)):
            page = doc[i]
            textpage = page.get_textpage()
            pages.append(textpage.get_text_range().replace("\r\n", "\n").replace("\r", "\n"))
            textpage.close()
            page.close()
        return pages
    finally:
        doc.close()

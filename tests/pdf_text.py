"""Plain text of each page of a PDF, read with pdfium (pypdfium2) for the tests.

Each string the page draws (one text object: one ``Tj``) is one line, in the order the page draws
them, each line ending in "\\n".  That is the layout pypdf's ``extract_text`` gives the packet's
pages, because reportlab ends every string it draws with ``T*`` (a move to the next line): a table
cell of two lines is two lines, a row's label a line of its own.  pdfium reads them in C, some
five times faster than pypdf (whose text extraction was most of a packet test's time).

Two differences from pypdf's text, both whitespace: pdfium's text page keeps one space of a run of
spaces, and pypdf starts a line with a space when the string lands within a line's height of
where the previous string's ``T*`` left the pen (labels on charts and marking strips).
tests/test_pdf_text.py checks, on the example packets, that the two readers give the same text
but for those two, and the very same text on the cut-list and tuning-sheet pages.
"""

from __future__ import annotations

import ctypes

import pypdfium2 as pdfium
import pypdfium2.raw as pdfium_c

__all__ = ["page_texts", "c_function", "address", "TEXT_OBJECT", "IS_GENERATED"]


def c_function(func, restype, *argtypes):
    """The pdfium function ``func`` (from pypdfium2.raw) behind a prototype of plain handles
    (``c_void_p``) and numbers: the same C function, called some four times faster, since ctypes
    converts a ``c_void_p`` argument or result far more cheaply than pypdfium2's typed pointers
    (the readers make a few such calls for every character of a packet)."""
    return ctypes.CFUNCTYPE(restype, *argtypes)(ctypes.cast(func, ctypes.c_void_p).value)


def address(handle) -> int:
    """The address a pdfium handle points at (what a ``c_void_p`` prototype takes and gives)."""
    return ctypes.cast(handle, ctypes.c_void_p).value


TEXT_OBJECT = c_function(pdfium_c.FPDFText_GetTextObject, ctypes.c_void_p, ctypes.c_void_p, ctypes.c_int)
"""FPDFText_GetTextObject as a plain-handle prototype (shared with tests/render/pdf_reader.py)."""
IS_GENERATED = c_function(pdfium_c.FPDFText_IsGenerated, ctypes.c_int, ctypes.c_void_p, ctypes.c_int)


def page_texts(source) -> list[str]:
    """The text of each page of the PDF at ``source`` (a path or the file's bytes)."""
    doc = pdfium.PdfDocument(source)
    try:
        return [_page_text(doc[i]) for i in range(len(doc))]
    finally:
        doc.close()


def _page_text(page) -> str:
    objects = [pdfium_c.FPDFPage_GetObject(page.raw, j) for j in range(pdfium_c.FPDFPage_CountObjects(page.raw))]
    order = {address(o): j for j, o in enumerate(objects)
             if pdfium_c.FPDFPageObj_GetType(o) == pdfium_c.FPDF_PAGEOBJ_TEXT}
    textpage = page.get_textpage()
    raw = address(textpage.raw)
    get_object, generated = TEXT_OBJECT, IS_GENERATED
    strings: dict[int, list[str]] = {}
    try:
        count = textpage.count_chars()
        text = textpage.get_text_range(0, count)
        if len(text) != count:  # a character outside the BMP would shift every index after it
            raise NotImplementedError("characters outside the Basic Multilingual Plane are not read")
        for k, ch in enumerate(text):
            obj = get_object(raw, k)
            if not obj or (ch.isspace() and generated(raw, k)):
                continue  # a space or line break pdfium adds between strings
            j = order[obj]
            if j in strings:
                strings[j].append(ch)
            else:
                strings[j] = [ch]
    finally:
        textpage.close()
    for j in order.values():
        if j not in strings and _has_area(objects[j]):
            # pdfium's text page leaves out a string repeated at nearly the same place ("fake
            # bold"); pypdf would read it twice, so this reader cannot stand in for it here
            raise NotImplementedError(f"pdfium's text page leaves out text object {j}")
    page.close()
    return "".join("".join(strings[j]) + "\n" for j in sorted(strings))


def _has_area(obj) -> bool:
    left, bottom, right, top = (ctypes.c_float() for _ in range(4))
    pdfium_c.FPDFPageObj_GetBounds(obj, left, bottom, right, top)
    return right.value > left.value and top.value > bottom.value

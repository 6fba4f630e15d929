"""A fast reader of the facts the layout audit needs from a PDF page, built on pdfium (pypdfium2).

It gives what pdfplumber (pdfminer.six underneath) gives for the same page, in the same form:
``chars`` (text, x0, x1, top, bottom, upright; top-down coordinates in points), ``lines``,
``rects`` and ``curves`` (stroked paths), ``width``, ``height`` and ``extract_words``.  pdfminer
reads the page in pure Python (one to four CPU seconds a packet); pdfium reads it in C, and with
this module's Python on top it takes about a sixth of that.

Where the two libraries differ, this module does what pdfminer does:

- a character's box is pdfminer's: from the baseline plus the font's descent, one font size high,
  one advance wide, turned with the text (pdfium's own "loose" box takes its substitute font's
  ascent and descent, and some of its widths);
- characters come in content-stream order (pdfium's text page sorts them into reading order);
- a text object pdfium's text page leaves out because it repeats an earlier one at nearly the
  same place (pdfium's guard against "fake bold") is read too, so an overprint is still seen;
- paths are split at each move-to and sorted into lines, rectangles and curves by pdfminer's
  rules, with the points in top-down page coordinates.

Anything this reader cannot read faithfully (form XObjects, a font without a known descent)
raises instead of being guessed.  Checked against pdfplumber on every example's packet on both
papers (same words, boxes within 0.01 pt, same segments, same audit) and on pages with turned,
scaled, letter-spaced, word-spaced and narrowed text; the two readers differ in where they put
text that follows a text rise (``Ts``), which the packet never uses.  The test
``test_the_fast_reader_reads_what_pdfplumber_reads`` checks it against pdfplumber.
"""

from __future__ import annotations

import ctypes
import itertools

import pypdfium2
import pypdfium2.raw as pdfium_c

from tests.pdf_text import IS_GENERATED, TEXT_OBJECT, address, c_function

__all__ = ["PageFacts", "read_pages"]

DESCENT = {"Helvetica": -207.0, "Helvetica-Bold": -207.0}
"""Descender of the fonts the packet uses [1/1000 em]: Adobe Core 14 AFM files, Helvetica.afm and
Helvetica-Bold.afm, "Descender -207" (the value pdfminer takes for these unembedded fonts)."""

LIGATURES = {"ﬀ": "ff", "ﬃ": "ffi", "ﬄ": "ffl", "ﬁ": "fi", "ﬂ": "fl", "ﬆ": "st", "ﬅ": "st"}
"""Ligature characters spelled out in a word's text, as pdfplumber does by default."""


class PageFacts:
    """One page: ``width``, ``height`` [pt], ``chars``, ``lines``, ``rects``, ``curves``."""

    def __init__(self, width, height, chars, lines, rects, curves):
        self.width, self.height = width, height
        self.chars, self.lines, self.rects, self.curves = chars, lines, rects, curves

    def extract_words(self, x_tolerance=1.5, y_tolerance=3.0, keep_blank_chars=False,
                      use_text_flow=False, return_chars=False):
        """Words as pdfplumber's ``extract_words`` makes them (its default directions: upright
        lines top to bottom and characters left to right; turned text the other way about)."""
        if keep_blank_chars or use_text_flow:
            raise ValueError("only keep_blank_chars=False and use_text_flow=False are implemented")
        words = []
        for upright, group in itertools.groupby(self.chars, key=lambda c: c["upright"]):
            if upright:
                lines = _clusters(list(group), lambda c: c["top"], y_tolerance)
                sort_key, step_tol, line_tol = (lambda c: (c["x0"], c["x0"])), x_tolerance, y_tolerance
            else:
                lines = _clusters(list(group), lambda c: c["x0"], x_tolerance)
                sort_key, step_tol, line_tol = (lambda c: (c["top"], c["bottom"])), y_tolerance, x_tolerance
            for line in lines:
                for chars in _split_words(sorted(line, key=sort_key), upright, step_tol, line_tol):
                    words.append(_merge(chars, upright, return_chars))
        return words


def _clusters(chars, key, tolerance):
    """pdfplumber's ``cluster_objects``: values sorted and chained while each is within
    ``tolerance`` of the one before; objects sorted by cluster, content order kept inside one."""
    values = sorted(set(map(key, chars)))
    ids, n, last = {}, 0, None
    for v in values:
        if last is not None and v > last + tolerance:
            n += 1
        ids[v] = n
        last = v
    ordered = sorted(chars, key=lambda c: ids[key(c)])
    return [list(g) for _, g in itertools.groupby(ordered, key=lambda c: ids[key(c)])]


def _split_words(chars, upright, step_tol, line_tol):
    word = []
    for ch in chars:
        if ch["text"].isspace():
            if word:
                yield word
            word = []
            continue
        if word:
            prev = word[-1]
            if upright:
                a, b, c, ay, cy = prev["x0"], prev["x1"], ch["x0"], prev["top"], ch["top"]
            else:
                a, b, c, ay, cy = prev["top"], prev["bottom"], ch["top"], prev["x0"], ch["x0"]
            if c < a or c > b + step_tol or abs(cy - ay) > line_tol:
                yield word
                word = []
        word.append(ch)
    if word:
        yield word


def _merge(chars, upright, return_chars):
    word = {"text": "".join(LIGATURES.get(c["text"], c["text"]) for c in chars),
            "x0": min(c["x0"] for c in chars), "x1": max(c["x1"] for c in chars),
            "top": min(c["top"] for c in chars), "bottom": max(c["bottom"] for c in chars),
            "upright": upright}
    if return_chars:
        word["chars"] = chars
    return word


def read_pages(data: bytes) -> list[PageFacts]:
    """The facts of every page of the PDF ``data``."""
    doc = pypdfium2.PdfDocument(data)
    try:
        return [_read_page(doc[i]) for i in range(len(doc))]
    finally:
        doc.close()


_VOID, _INT = ctypes.c_void_p, ctypes.c_int
_CHAR_ORIGIN = c_function(pdfium_c.FPDFText_GetCharOrigin, _INT, _VOID, _INT, _VOID, _VOID)
_SEGMENT = c_function(pdfium_c.FPDFPath_GetPathSegment, _VOID, _VOID, _INT)
_SEGMENT_POINT = c_function(pdfium_c.FPDFPathSegment_GetPoint, _INT, _VOID, _VOID, _VOID)
_SEGMENT_TYPE = c_function(pdfium_c.FPDFPathSegment_GetType, _INT, _VOID)
_SEGMENT_CLOSE = c_function(pdfium_c.FPDFPathSegment_GetClose, _INT, _VOID)
"""The pdfium calls made for every character and every path segment, on plain handles
(:func:`tests.pdf_text.c_function`)."""


def _read_page(page):
    width, height = page.get_size()
    objects = [pdfium_c.FPDFPage_GetObject(page.raw, j) for j in range(pdfium_c.FPDFPage_CountObjects(page.raw))]
    kinds = [pdfium_c.FPDFPageObj_GetType(o) for o in objects]
    if pdfium_c.FPDF_PAGEOBJ_FORM in kinds:
        raise NotImplementedError("form XObjects are not read")
    chars = _chars(page, objects, kinds, height)
    lines, rects, curves = [], [], []
    for obj, kind in zip(objects, kinds, strict=True):
        if kind == pdfium_c.FPDF_PAGEOBJ_PATH:
            _sort_path(obj, height, lines, rects, curves)
    page.close()
    return PageFacts(width, height, chars, lines, rects, curves)


def _matrix(obj):
    m = pdfium_c.FS_MATRIX()
    if not pdfium_c.FPDFPageObj_GetMatrix(obj, m):
        raise RuntimeError("pdfium gave no matrix for a page object")
    return m.a, m.b, m.c, m.d, m.e, m.f


def _font_name(textpage, k):
    buf = ctypes.create_string_buffer(128)
    flags = ctypes.c_int()
    n = pdfium_c.FPDFText_GetFontInfo(textpage.raw, k, buf, len(buf), flags)
    return buf.raw[:max(n - 1, 0)].decode("latin-1")


def _chars(page, objects, kinds, height):
    """Characters in content-stream order with pdfminer's boxes.

    pdfium's text page leaves out a text object that repeats an earlier one at nearly the same
    place (its guard against "fake bold"), which is just the overprint the audit looks for.
    Such objects are moved up off the page, each by its own offset, read from a fresh text page
    and moved back by the same offset in the numbers."""
    index = {address(o): j for j, o in enumerate(objects)}
    by_object: dict[int, list[dict]] = {}
    _read_text(page, objects, index, by_object, height)
    texts = [j for j, kind in enumerate(kinds) if kind == pdfium_c.FPDF_PAGEOBJ_TEXT]
    left_out = [j for j in texts if j not in by_object]
    if left_out:
        offsets = {}
        for n, j in enumerate(left_out, start=1):
            offsets[j] = REPEAT_SHIFT * n
            pdfium_c.FPDFPageObj_Transform(objects[j], 1, 0, 0, 1, 0, offsets[j])
        moved: dict[int, list[dict]] = {}
        _read_text(page, objects, index, moved, height)
        for j in left_out:
            if j in moved:
                by_object[j] = [dict(ch, top=ch["top"] + offsets[j], bottom=ch["bottom"] + offsets[j])
                                for ch in moved[j]]
            elif _has_area(objects[j]):
                raise RuntimeError(f"pdfium's text page leaves out text object {j} even when moved apart")
    return [ch for j in sorted(by_object) for ch in by_object[j]]


REPEAT_SHIFT = 4096.0
"""Points a left-out text object is moved up by (times its number), far above any page."""


def _has_area(obj):
    left, bottom, right, top = (ctypes.c_float() for _ in range(4))
    pdfium_c.FPDFPageObj_GetBounds(obj, left, bottom, right, top)
    return right.value > left.value and top.value > bottom.value


def _read_text(page, objects, index, by_object, height):
    """Add the characters of a fresh text page of ``page`` to ``by_object`` (object index ->
    characters in the object's order)."""
    textpage = page.get_textpage()
    raw, handle_now = address(textpage.raw), textpage.raw
    per_object: dict[int, tuple] = {}
    widths: dict[tuple, float] = {}
    x, y = ctypes.c_double(), ctypes.c_double()
    at_x, at_y = ctypes.addressof(x), ctypes.addressof(y)
    m, advance = pdfium_c.FS_MATRIX(), ctypes.c_float()
    text_object, generated, origin = TEXT_OBJECT, IS_GENERATED, _CHAR_ORIGIN
    try:
        count = textpage.count_chars()
        text = textpage.get_text_range(0, count)
        if len(text) != count:  # a character outside the BMP: read each one by its index instead
            text = "".join(chr(pdfium_c.FPDFText_GetUnicode(handle_now, k)) for k in range(count))
        for k, ch in enumerate(text):
            obj = text_object(raw, k)
            if not obj or (ch.isspace() and generated(raw, k)):
                continue  # pdfium generates only spaces and line breaks (between strings)
            j = index[obj]
            if j not in per_object:
                pdfium_c.FPDFText_GetMatrix(handle_now, k, m)
                font = _font_name(textpage, k)
                if font not in DESCENT:
                    raise NotImplementedError(f"no descent known for font {font!r}")
                size = pdfium_c.FPDFText_GetFontSize(handle_now, k)
                low = DESCENT[font] * size / 1000
                a, b, c, d = m.a, m.b, m.c, m.d
                per_object[j] = (a, b, c, d, size, font, pdfium_c.FPDFTextObj_GetFont(objects[j]), low, low + size,
                                 b == 0 and c == 0 and a > 0 and d > 0, a * d > 0 and b * c <= 0, [])
                by_object[j] = per_object[j][-1]
            a, b, c, d, size, font, handle, low, high, plain, upright, chars = per_object[j]
            key = (font, size, ch)
            adv = widths.get(key)
            if adv is None:
                # the font's own advance width (the one pdfium lays the glyphs out with; its
                # "loose" box takes some widths from its substitute font instead)
                pdfium_c.FPDFFont_GetGlyphWidth(handle, ord(ch), size, advance)
                adv = widths[key] = advance.value
            origin(raw, k, at_x, at_y)
            ox, oy = x.value, y.value
            if plain:  # upright text: the general corners' extremes
                chars.append({"text": ch, "x0": ox, "x1": ox + a * adv, "top": height - (oy + d * high),
                              "bottom": height - (oy + d * low), "upright": upright})
            else:
                xs = (ox + c * low, ox + c * high, ox + a * adv + c * low, ox + a * adv + c * high)
                ys = (oy + d * low, oy + d * high, oy + b * adv + d * low, oy + b * adv + d * high)
                chars.append({"text": ch, "x0": min(xs), "x1": max(xs), "top": height - max(ys),
                              "bottom": height - min(ys), "upright": upright})
    finally:
        textpage.close()


def _sort_path(obj, height, lines, rects, curves):
    """Split a path object at each move-to and file each piece as pdfminer does: one segment is a
    line (kept whether stroked or not), a closed axis-aligned four-sided piece a rectangle, the
    rest curves; points and Bezier controls in top-down page coordinates."""
    a, b, c, d, e, f = _matrix(obj)
    fill_mode, stroke = ctypes.c_int(), ctypes.c_int()
    pdfium_c.FPDFPath_GetDrawMode(obj, fill_mode, stroke)
    px, py = ctypes.c_float(), ctypes.c_float()
    at_x, at_y = ctypes.addressof(px), ctypes.addressof(py)
    handle = address(obj)
    move, line, bezier = pdfium_c.FPDF_SEGMENT_MOVETO, pdfium_c.FPDF_SEGMENT_LINETO, pdfium_c.FPDF_SEGMENT_BEZIERTO
    pieces: list[list] = []
    pending: list = []
    for k in range(pdfium_c.FPDFPath_CountSegments(obj)):
        seg = _SEGMENT(handle, k)
        _SEGMENT_POINT(seg, at_x, at_y)
        pt = (a * px.value + c * py.value + e, height - (b * px.value + d * py.value + f))
        kind = _SEGMENT_TYPE(seg)
        closes = _SEGMENT_CLOSE(seg)
        if kind == move:
            pieces.append([("m", pt)])
        elif kind == line:
            if closes and pt == pieces[-1][0][1]:
                # pdfium turns "h" away from the start into a line back to it, closed
                pieces[-1].append(("h",))
                continue
            pieces[-1].append(("l", pt))
        elif kind == bezier:
            pending.append(pt)
            if len(pending) == 3:
                pieces[-1].append(("c", *pending))
                pending = []
        else:
            raise NotImplementedError(f"path segment type {kind}")
        if closes:
            pieces[-1].append(("h",))
    for path in pieces:
        if len(path) > 1:
            _file_piece(path, bool(stroke.value), lines, rects, curves)


def _file_piece(path, stroke, lines, rects, curves):
    shape = "".join(op[0] for op in path)
    pts = [op[-1] if op[0] != "h" else path[0][-1] for op in path]
    if len(shape) > 3 and shape[-2:] == "lh" and pts[-2] == pts[0]:
        shape = shape[:-2] + "h"
        pts.pop()
    if shape in ("ml", "mlh"):
        lines.append({"pts": pts, "stroke": stroke})
        return
    if shape in ("mlllh", "mllll"):
        (x0, y0), (x1, y1), (x2, y2), (x3, y3), _ = pts
        square = (x0 == x1 and y1 == y2 and x2 == x3 and y3 == y0) or (y0 == y1 and x1 == x2 and y2 == y3 and x3 == x0)
        if pts[0] == pts[4] and square:
            xs, ys = (x0, x2), (y0, y2)
            rects.append({"x0": min(xs), "x1": max(xs), "top": min(ys), "bottom": max(ys), "stroke": stroke})
            return
    curves.append({"pts": pts, "path": path, "stroke": stroke})

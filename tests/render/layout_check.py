"""Layout audit of a PDF: words struck by drawn lines, words over other words, words in the margin.

Text boxes come from pdfium (tests/render/pdf_reader.py: character boxes grouped into words
the way pdfplumber groups them); lines are the stroked segments of lines, rectangles and curves.
The reader is checked against pdfplumber (pdfminer.six underneath, a second, independent reader)
in tests/render/test_layout.py.  A box is shrunk by a small tolerance before testing,
so a line that only grazes a box edge (a table grid beside its cell text) does not count.
"""

from __future__ import annotations

import numpy as np

from tests.render.pdf_reader import read_pages

PT_PER_MM = 72 / 25.4
MARGIN_MM = 6.0
SHRINK = 0.6
"""Points taken off each side of a word box before testing it against lines and other words."""
NEAR = 1e-3
"""Points a segment's bounding box is widened by when picking the pairs the clip tests."""


def _segments(page):
    segs = []
    for obj in page.lines:
        pts = obj["pts"]
        segs += list(zip(pts, pts[1:], strict=False))
    for r in page.rects:
        if not r.get("stroke"):
            continue
        x0, x1, top, bottom = r["x0"], r["x1"], r["top"], r["bottom"]
        corners = [(x0, top), (x1, top), (x1, bottom), (x0, bottom), (x0, top)]
        segs += list(zip(corners, corners[1:], strict=False))
    for cv in page.curves:
        if not cv.get("stroke"):
            continue
        segs += _path_segments(cv.get("path") or [("m", cv["pts"][0])] + [("l", q) for q in cv["pts"][1:]])
    return segs


def _path_segments(path, steps=12):
    """Straight pieces of a path: lines as they are, cubic Beziers sampled at ``steps`` points."""
    segs, here, start = [], None, None
    for op, *pts in path:
        if op == "m":
            here = start = pts[0]
        elif op == "l":
            segs.append((here, pts[0]))
            here = pts[0]
        elif op == "c" and here is not None:
            (x0, y0), (x1, y1), (x2, y2), (x3, y3) = here, *pts
            prev = here
            for k in range(1, steps + 1):
                t = k / steps
                u = 1 - t
                q = (u ** 3 * x0 + 3 * u * u * t * x1 + 3 * u * t * t * x2 + t ** 3 * x3,
                     u ** 3 * y0 + 3 * u * u * t * y1 + 3 * u * t * t * y2 + t ** 3 * y3)
                segs.append((prev, q))
                prev = q
            here = pts[-1]
        elif op == "h" and here is not None and start is not None:
            segs.append((here, start))
            here = start
    return segs


def _hits(box, a, b):
    """Does segment a-b cross the rectangle box = (x0, top, x1, bottom)? (Liang-Barsky clip)."""
    x0, top, x1, bottom = box
    (ax, ay), (bx, by) = a, b
    dx, dy = bx - ax, by - ay
    t0, t1 = 0.0, 1.0
    for p, q in ((-dx, ax - x0), (dx, x1 - ax), (-dy, ay - top), (dy, bottom - ay)):
        if p == 0:
            if q < 0:
                return False
            continue
        t = q / p
        if p < 0:
            t0 = max(t0, t)
        else:
            t1 = min(t1, t)
        if t0 > t1:
            return False
    return True


def _struck(boxes, segs, chunk=256):
    """Texts of the boxes that any segment crosses: :func:`_hits` for every box and segment at
    once (the same comparisons in float64, so the same answer, in a fraction of the time).

    Only the pairs whose bounding boxes come within :data:`NEAR` of each other go through the
    clip: a segment whose own box stays clear of a word box cannot cross it, and the margin is
    far above the clip's rounding (some 1e-13 pt on a page), so no pair the clip would call a hit
    is left out.  The pairs are found in blocks of ``chunk`` boxes to bound the memory."""
    if not segs or not boxes:
        return []
    ends = np.array([(a[0], a[1], b[0], b[1]) for a, b in segs], dtype=float)
    ax, ay, bx, by = ends.T
    dx, dy = bx - ax, by - ay
    left, right = np.minimum(ax, bx) - NEAR, np.maximum(ax, bx) + NEAR
    low, high = np.minimum(ay, by) - NEAR, np.maximum(ay, by) + NEAR
    rects = np.array([box for _, box in boxes], dtype=float).reshape(-1, 4)
    hit = np.zeros(len(rects), dtype=bool)
    for start in range(0, len(rects), chunk):
        block = rects[start:start + chunk]
        x0, top, x1, bottom = (col[:, None] for col in block.T)
        near = (left <= x1) & (right >= x0) & (low <= bottom) & (high >= top)
        bi, si = np.nonzero(near)
        if bi.size == 0:
            continue
        x0, top, x1, bottom = block[bi].T
        sax, say, sdx, sdy = ax[si], ay[si], dx[si], dy[si]
        t0, t1 = np.zeros(bi.size), np.ones(bi.size)
        ok = np.ones(bi.size, dtype=bool)
        for p, q in ((-sdx, sax - x0), (sdx, x1 - sax), (-sdy, say - top), (sdy, bottom - say)):
            zero = p == 0
            ok &= ~(zero & (q < 0))
            t = np.divide(q, p, out=np.zeros(bi.size), where=~zero)
            t0 = np.where(p < 0, np.maximum(t0, t), t0)
            t1 = np.where(p > 0, np.minimum(t1, t), t1)
        # t0 only rises and t1 only falls, so t0 > t1 at the end is t0 > t1 at any step
        hit[start + bi[ok & (t0 <= t1)]] = True
    return [text for (text, _), h in zip(boxes, hit, strict=True) if h]


def _char_boxes(words):
    boxes, owner = [], []
    for n, w in enumerate(words):
        for ch in w["chars"]:
            if ch["text"].strip():
                boxes.append((ch["x0"] + SHRINK / 2, ch["top"] + SHRINK, ch["x1"] - SHRINK / 2, ch["bottom"] - SHRINK))
                owner.append(n)
    return np.array(boxes, dtype=float).reshape(-1, 4), np.array(owner, dtype=int)


def _overprinted_words(words):
    """Indices of words with a character drawn over another character (of any word).

    Two boxes overlap when each starts before the other ends, on both axes (strictly).  Of two
    overlapping boxes, the one whose top is higher (or either, on a tie) has the other's top at or
    below its own top and above its own bottom; so each box is tested only against the boxes
    whose tops lie in that band (found on the boxes sorted by top), and a hit marks both: the same
    comparisons as testing every pair, on a fraction of the pairs."""
    boxes, owner = _char_boxes(words)
    if len(boxes) < 2:
        return set()
    x0, top, x1, bottom = boxes.T
    order = np.argsort(top, kind="stable")
    tops = top[order]
    lo = np.searchsorted(tops, top, side="left")
    hi = np.maximum(lo, np.searchsorted(tops, bottom, side="left"))
    counts = hi - lo
    i = np.repeat(np.arange(len(boxes)), counts)
    j = order[np.arange(counts.sum()) - np.repeat(np.cumsum(counts) - counts, counts) + np.repeat(lo, counts)]
    hit = ((i != j) & (x0[i] < x1[j]) & (x0[j] < x1[i]) & (top[i] < bottom[j]) & (top[j] < bottom[i]))
    return set(owner[i[hit]].tolist()) | set(owner[j[hit]].tolist())


def audit_page(page):
    """(struck, overprinted, in_margin) lists of word texts for one page (a
    :class:`~tests.render.pdf_reader.PageFacts`, or a pdfplumber page: the same attributes)."""
    words = page.extract_words(use_text_flow=False, keep_blank_chars=False, x_tolerance=1.5, return_chars=True)
    boxes = [(w["text"], (w["x0"] + SHRINK, w["top"] + SHRINK, w["x1"] - SHRINK, w["bottom"] - SHRINK))
             for w in words]
    segs = _segments(page)
    struck = _struck(boxes, segs)
    over = [words[i]["text"] for i in sorted(_overprinted_words(words))]
    m = MARGIN_MM * PT_PER_MM
    w, h = page.width, page.height
    margin = [wd["text"] for wd in words
              if wd["x0"] < m or wd["x1"] > w - m or wd["top"] < m or wd["bottom"] > h - m]
    return struck, over, margin


def audit_pdf(data, read=read_pages):
    """{"pages": n, "struck": [(page, word)], "over": [...], "margin": [...]} for PDF bytes;
    ``read(data)`` gives the pages (the fast reader unless a test passes another)."""
    pages = read(data)
    out = {"pages": len(pages), "struck": [], "over": [], "margin": []}
    for n, page in enumerate(pages, start=1):
        struck, over, margin = audit_page(page)
        out["struck"] += [(n, t) for t in struck]
        out["over"] += [(n, t) for t in over]
        out["margin"] += [(n, t) for t in margin]
    return out

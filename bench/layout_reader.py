"""The layout audit's two PDF readers side by side on every example's packet (needs the test extra).

One row per example and paper: pages, CPU seconds to read and audit the packet with pdfplumber
(pdfminer.six) and with the pdfium reader the tests use (tests/render/pdf_reader.py), and whether
the two give the same words (text and boxes within 0.5 pt) and the same audit.
Run from the repository root: python bench/layout_reader.py
"""

from __future__ import annotations

import io
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

import pdfplumber  # noqa: E402

import cutplan  # noqa: E402
from cutplan.render.pdf import render_pdf  # noqa: E402
from tests.render.layout_check import audit_page  # noqa: E402
from tests.render.pdf_reader import read_pages  # noqa: E402

WORDS = {"use_text_flow": False, "keep_blank_chars": False, "x_tolerance": 1.5, "return_chars": False}


def _plumber(data):
    with pdfplumber.open(io.BytesIO(data)) as pdf:
        return [(page.extract_words(**WORDS), audit_page(page)) for page in pdf.pages]


def _pdfium(data):
    return [(page.extract_words(**WORDS), audit_page(page)) for page in read_pages(data)]


def _same(a, b):
    if len(a) != len(b):
        return False
    for (words_a, audit_a), (words_b, audit_b) in zip(a, b, strict=True):
        if audit_a != audit_b or [w["text"] for w in words_a] != [w["text"] for w in words_b]:
            return False
        if any(abs(wa[k] - wb[k]) > 0.5 for wa, wb in zip(words_a, words_b, strict=True)
               for k in ("x0", "x1", "top", "bottom")):
            return False
    return True


def main():
    print(f"{'example':28} {'paper':6} {'pages':>5} {'plumber s':>9} {'pdfium s':>8} {'same':>5}")
    totals = [0.0, 0.0]
    for path in sorted((ROOT / "examples").glob("*.toml")):
        plan = cutplan.plan(cutplan.load_design(path))
        for paper in ("a4", "letter"):
            data = render_pdf(plan, paper)
            t0 = time.process_time()
            slow = _plumber(data)
            t1 = time.process_time()
            fast = _pdfium(data)
            t2 = time.process_time()
            totals = [totals[0] + t1 - t0, totals[1] + t2 - t1]
            print(f"{path.stem:28} {paper:6} {len(fast):5d} {t1 - t0:9.2f} {t2 - t1:8.2f} "
                  f"{'yes' if _same(slow, fast) else 'NO':>5}")
    print(f"{'total':28} {'':6} {'':5} {totals[0]:9.2f} {totals[1]:8.2f}")


if __name__ == "__main__":
    main()

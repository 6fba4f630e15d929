"""Layout audit of every example's shop packet on both paper sizes (needs the test extra).

Prints one row per example and paper: pages, words struck by lines, words over other words,
words inside the 6 mm margin.  Run from the repository root: python bench/layout_audit.py
"""

from __future__ import annotations

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

import cutplan  # noqa: E402
from cutplan.render.pdf import render_pdf  # noqa: E402
from tests.render.layout_check import audit_pdf  # noqa: E402


def main(verbose=False):
    print(f"{'example':28} {'paper':6} {'pages':>5} {'struck':>6} {'over':>5} {'margin':>6}")
    totals = [0, 0, 0, 0]
    for path in sorted((ROOT / "examples").glob("*.toml")):
        plan = cutplan.plan(cutplan.load_design(path))
        for paper in ("a4", "letter"):
            res = audit_pdf(render_pdf(plan, paper))
            row = [res["pages"], len(res["struck"]), len(res["over"]), len(res["margin"])]
            totals = [a + b for a, b in zip(totals, row, strict=True)]
            print(f"{path.stem:28} {paper:6} {row[0]:5d} {row[1]:6d} {row[2]:5d} {row[3]:6d}")
            if verbose:
                for key in ("struck", "over", "margin"):
                    if res[key]:
                        print(f"    {key}: {res[key][:40]}")
    print(f"{'total':28} {'':6} {totals[0]:5d} {totals[1]:6d} {totals[2]:5d} {totals[3]:6d}")


if __name__ == "__main__":
    main("-v" in sys.argv)

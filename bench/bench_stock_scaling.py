"""Benchmark: how the cut-list optimiser's cost grows with the number of pieces.

Run: python bench/bench_stock_scaling.py [--sizes 100,200,300,500] [--check-load]

One row per instance: pieces, stock, sticks (or cost), the bound, the gap to it, proven or not,
master LP solves, operations counted (the work the search is bounded by) and CPU seconds.
Stock kinds: one 8 ft length; two and four priced lengths; and exact triplets (three pieces
that fill a 1000 mm stick exactly, no kerf, so the optimum is known: pieces / 3 sticks).  More
rows are the slow cases found by hand: 400 chimes on too little stock (the total-length bound
answers), 400 chimes on three priced lengths, 200 on six and on eight priced lengths (the stick
mixes grow as a power of the number of lengths), and 400 on free 8 ft offcuts (price 0) beside
priced 12 ft sticks.  Target: every row under 30 CPU s.
``--check-load`` lays the 300-piece two-price instance out quietly and again with two busy
loops competing for the cores, and compares the layouts byte for byte.  ``--layouts FILE``
writes every row's layout to FILE (one JSON line each), to compare runs byte for byte.
"""

import json
import random
import subprocess
import sys
import time

from cutplan.layout import optimiser
from cutplan.layout.optimiser import Item, StockError, StockType, layout

INCH = 0.0254
KERF, TRIM = 1.6e-3, 3.2e-3
KINDS = {
    "one 8 ft": [StockType(96 * INCH)],
    "2 priced": [StockType(96 * INCH, price=12.0), StockType(120 * INCH, price=14.0)],
    "4 priced": [StockType(72 * INCH, price=9.5), StockType(96 * INCH, price=12.0),
                 StockType(120 * INCH, price=14.0), StockType(144 * INCH, price=17.5)],
}


def chimes(n, seed):
    rng = random.Random(seed)
    return [Item(f"p{i}", round(rng.uniform(0.15, 0.9), 4)) for i in range(n)]


def triplets(n, seed):
    """n pieces (n a multiple of 3) in triplets of 251-499 mm that sum to 1000 mm exactly."""
    rng = random.Random(seed)
    out = []
    for k in range(n // 3):
        a = rng.randint(251, 498)  # a = 499 leaves no b, c of at least 251 mm
        b = rng.randint(max(251, 501 - a), min(499, 749 - a))
        out += [a, b, 1000 - a - b]
    rng.shuffle(out)
    return [Item(f"t{i}", mm / 1000) for i, mm in enumerate(out)]


class Counting(optimiser._Work):
    """The optimiser's work counter, remembering how many operations were spent."""

    last = None

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self.start = self.ops_left
        Counting.last = self


LAYOUTS = []
"""Every row's layout as one JSON line (--layouts)."""


def run(name, items, types, kerf=KERF, trim=TRIM):
    Counting.last = None
    start = time.process_time()
    try:
        out = layout(items, types, kerf=kerf, end_trim=trim)
    except StockError as exc:
        cpu = time.process_time() - start
        LAYOUTS.append(json.dumps({"row": [name, len(items)], "refused": str(exc)}, sort_keys=True))
        return [name, len(items), "refused", "", "", "", 0, 0, f"{cpu:.2f}", str(exc)[:60]]
    cpu = time.process_time() - start
    LAYOUTS.append(json.dumps({"row": [name, len(items)], "sticks": [[s.stock_length, [list(c) for c in s.cuts]]
                                                                      for s in out.sticks],
                               "proven": out.proven_optimal, "cost": out.cost, "bound": out.lower_bound,
                               "cost_bound": out.cost_lower_bound}, sort_keys=True))
    work = Counting.last
    ops = (work.start - max(work.ops_left, 0)) if work else 0
    if out.cost is not None:
        shown, bound = f"{out.cost:.0f} $", f"{out.cost_lower_bound:.0f} $"
        gap = f"{out.cost - out.cost_lower_bound:.0f} $"
    else:
        shown, bound, gap = f"{len(out.sticks)}", f"{out.lower_bound}", f"{out.gap}"
    return [name, len(items), shown, bound, gap, "yes" if out.proven_optimal else "no",
            out.lp_solves, ops, f"{cpu:.2f}", out.method]


def rows(sizes):
    for n in sizes:
        for kind, types in KINDS.items():
            yield run(kind, chimes(n, n), types)
        yield run("triplets", triplets(n - n % 3, n), [StockType(1.0)], kerf=0.0, trim=0.0)
    few = chimes(400, 7)
    count = int(sum(it.length + KERF for it in few) / (96 * INCH)) - 2
    yield run("too little", few, [StockType(96 * INCH, count=count)])
    yield run("3 priced", chimes(400, 9), KINDS["4 priced"][:3])
    for k in (6, 8):
        lengths = [StockType((60 + 12 * j) * INCH, price=8.0 + j) for j in range(k)]
        yield run(f"{k} priced", chimes(200, 10 + k), lengths)
    yield run("free + priced", chimes(400, 11), [StockType(96 * INCH, count=60, price=0.0),
                                                  StockType(144 * INCH, price=17.5)])


def layout_text(n=300):
    out = layout(chimes(n, n), KINDS["2 priced"], kerf=KERF, end_trim=TRIM)
    return json.dumps({"sticks": [[s.stock_length, [list(c) for c in s.cuts]] for s in out.sticks],
                       "proven": out.proven_optimal, "cost": out.cost}, sort_keys=True)


def check_under_load():
    quiet = layout_text()
    loops = [subprocess.Popen([sys.executable, "-c", "while True: pass"]) for _ in range(2)]
    try:
        loaded = layout_text()
    finally:
        for p in loops:
            p.kill()
            p.wait()
    print(f"300 pieces, two priced lengths, quiet vs two busy loops: {'identical' if quiet == loaded else 'DIFFERENT'}")
    return quiet == loaded


def main(argv):
    sizes = [100, 200, 300, 400, 500]
    if "--sizes" in argv:
        sizes = [int(x) for x in argv[argv.index("--sizes") + 1].split(",")]
    optimiser._Work = Counting
    head = ["stock", "pieces", "result", "bound", "gap", "proven", "LP solves", "operations", "CPU s", "method"]
    print(" | ".join(head))
    worst = 0.0
    for row in rows(sizes):
        print(" | ".join(str(x) for x in row), flush=True)
        worst = max(worst, float(row[8]))
    print(f"slowest row: {worst:.2f} CPU s (target: under 30)")
    if "--layouts" in argv:
        with open(argv[argv.index("--layouts") + 1], "w") as fh:
            fh.write("\n".join(LAYOUTS) + "\n")
    ok = worst < 30.0
    if "--check-load" in argv:
        ok = check_under_load() and ok
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))

"""Benchmark: cut-list optimisation over a fixed, seeded set of instances.

Run: python bench/bench_stock.py [--check-load]
Prints one row per instance: pieces, sticks used, lower bound, proven optimal, master LP solves
(the work the search is bounded by), CPU seconds and method.  Target: every instance up to 60
pieces proven optimal.  ``--check-load`` also lays the seeded priced 45-piece instance (#08)
out quietly and again with two busy loops competing for the cores, and compares the layouts
byte for byte.
"""

import json
import random
import subprocess
import sys
import time

from cutplan.layout.optimiser import Item, StockType, layout

INCH = 0.0254


def instances():
    """24 instances, 10 to 80 pieces; piece lengths like chime and bar sets (seeded)."""
    out = []
    sizes = [10, 15, 20, 25, 30, 35, 40, 45, 50, 55, 60, 60, 60, 60, 65, 70, 75, 80, 80, 80, 30, 40, 50, 60]
    for k, n in enumerate(sizes):
        rng = random.Random(1000 + k)
        kind = k % 4
        if kind == 0:  # chime tubes on 8 ft sticks
            lengths = [rng.uniform(0.15, 0.9) for _ in range(n)]
            stock = [StockType(96 * INCH)]
        elif kind == 1:  # long conduit chimes on 10 ft sticks
            lengths = [rng.uniform(0.4, 1.6) for _ in range(n)]
            stock = [StockType(120 * INCH)]
        elif kind == 2:  # bars on 2.4 m and 3 m boards
            lengths = [rng.uniform(0.2, 0.7) for _ in range(n)]
            stock = [StockType(2.4), StockType(3.0)]
        else:  # priced mix
            lengths = [rng.uniform(0.15, 1.0) for _ in range(n)]
            stock = [StockType(96 * INCH, price=12.0), StockType(120 * INCH, price=14.0)]
        items = [Item(f"p{i}", round(x, 4)) for i, x in enumerate(lengths)]
        out.append((f"#{k + 1:02d} kind{kind}", items, stock))
    return out


def layout_text(index):
    """The layout of one instance as canonical JSON text (for byte comparison)."""
    _, items, stock = instances()[index]
    result = layout(items, stock, kerf=1.6e-3, end_trim=3.2e-3)
    return json.dumps({"sticks": [[s.stock_length, [list(c) for c in s.cuts], s.offcut] for s in result.sticks],
                       "proven": result.proven_optimal, "cost": result.cost}, sort_keys=True)


def check_under_load(index=7):
    """Lay instance #08 out quietly, then with two busy loops; compare byte for byte."""
    quiet = layout_text(index)
    loops = [subprocess.Popen([sys.executable, "-c", "while True: pass"]) for _ in range(2)]
    try:
        start = time.process_time()
        loaded = layout_text(index)
        cpu = time.process_time() - start
    finally:
        for p in loops:
            p.kill()
            p.wait()
    data = json.loads(quiet)
    print(f"\n#{index + 1:02d} priced 45 pieces: quiet and loaded layouts byte-identical: {quiet == loaded}; "
          f"proven optimal: {data['proven']}; cost {data['cost']}; CPU under load {cpu:.3f} s")


def main():
    import scipy.optimize  # noqa: F401  (import once, outside the timings)

    print(f"{'instance':14} {'pieces':>6} {'sticks':>6} {'bound':>5} {'gap':>4} {'proven':>6} {'cost':>7} "
          f"{'cost_lb':>7} {'LPs':>5} {'cpu s':>7}  method")
    worst_60, unproven_60 = 0.0, 0
    for name, items, stock in instances():
        start = time.process_time()
        result = layout(items, stock, kerf=1.6e-3, end_trim=3.2e-3)
        dt = time.process_time() - start
        if len(items) <= 60:
            worst_60 = max(worst_60, dt)
            unproven_60 += not result.proven_optimal
        cost = f"{result.cost:7.2f}" if result.cost is not None else "      -"
        cost += f" {result.cost_lower_bound:7.2f}" if result.cost_lower_bound is not None else "       -"
        print(f"{name:14} {len(items):6d} {len(result.sticks):6d} {result.lower_bound:5d} {result.gap:4d} "
              f"{'yes' if result.proven_optimal else 'no':>6} {cost} {result.lp_solves:5d} {dt:7.3f}  {result.method}")
    print(f"instances with <= 60 pieces not proven optimal: {unproven_60}; slowest: {worst_60:.3f} CPU s")
    if "--check-load" in sys.argv:
        check_under_load()


if __name__ == "__main__":
    main()

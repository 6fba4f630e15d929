"""Benchmark: the from-stock search over every root, scale and count.

Run: python bench/bench_from_stock.py
Target: the full search (12 roots x 4 octaves from C2, 5 scales, counts 3 to 12) in at most 5 s
of CPU on a 2-core machine.  CPU seconds (``time.process_time``), so a busy machine should not
change them much.

Rows per inventory (demo scenarios):
  map       the lowest root that fits for every scale and count (table + bounds + bisection)
  exhaust   the same answers by testing every root from the bottom: a cross-check of the
            bisection, and what the search costs without it
  search    one `cutplan from-stock --count 5` search, with the chosen set confirmed by plan()
  plan-tbl  the per-pitch table built through cutplan.plan() instead of the vectorised engine
"""

import time

from cutplan import pitch
from cutplan.fromstock import search

SCALES = ("major", "natural-minor", "major-pentatonic", "minor-pentatonic", "blues")
COUNTS = tuple(range(3, 13))
LOW, HIGH = "C2", "C8"  # roots from C2 up; notes up to C8 (stubby pieces are left out anyway)
CHIME = {"kind": "chime", "section": {"stock": "al-1.000x0.065"}}
BAR = {"kind": "bar", "material": "maple-sugar", "section": {"shape": "bar", "width": "38 mm", "thickness": "19 mm"}}
INVENTORIES = [
    ("porch: 1 x 8 ft tube", CHIME, {"lengths": [{"length": "8 ft", "count": 1}], "kerf": "1/16 in"}),
    ("garage: mixed tube", CHIME, {"lengths": [{"length": "8 ft", "count": 1}, {"length": "4 ft", "count": 1},
                                               {"length": "600 mm", "count": 3}], "kerf": "1/16 in",
                                   "end_trim": "1/8 in"}),
    ("classroom: 2 maple boards", BAR, {"lengths": [{"length": "2.4 m", "count": 2}], "kerf": "3 mm"}),
]


def exhaustive(found):
    """Lowest fitting root per (scale, count) by testing every root from the bottom with the same
    bounds, first fit and exhaustive check, without bisection: (answers, sets tested, CPU s)."""
    start = time.process_time()
    tested, out = 0, {}
    for s in SCALES:
        for c in COUNTS:
            out[(s, c)] = None
            for r in found.roots(s, c):
                tested += 1
                cuts = found.cut_lengths(r, s, c)
                if not found.bounded_out(cuts) and (found.room.first_fit(cuts) or found.room.exact_fit(cuts)):
                    out[(s, c)] = pitch.note_name(r)
                    break
    return out, tested, time.process_time() - start


def main():
    import scipy.optimize  # noqa: F401  (imports outside the timings)

    import cutplan  # noqa: F401

    search.lowest_roots(CHIME, INVENTORIES[0][2], SCALES[:1], (3,), LOW, HIGH)  # warm the imports
    print(f"{'inventory':28} {'row':9} {'candidates':>10} {'tested':>7} {'CPU s':>7}  notes")
    worst = 0.0
    for name, base, stock in INVENTORIES:
        answers, stats = search.lowest_roots(base, stock, SCALES, COUNTS, LOW, HIGH)
        found, _, _ = search._prepare(base, stock, SCALES, list(COUNTS), LOW, HIGH, 440.0, "equal", "mm", ())
        roots = sum(len(found.roots(s, c)) for s in SCALES for c in COUNTS)
        worst = max(worst, stats["total_s"])
        probes = (stats["sets_bounded_out"] + stats["sets_first_fit"]
                  + stats["sets_exact"] + stats["sets_packed"])
        print(f"{name:28} {'map':9} {roots:10d} {probes:7d} {stats['total_s']:7.2f}  "
              f"table {stats['table_s']:.2f} s for {stats['pitches']} pitches, exact {stats['exact_s']:.2f} s, "
              f"optimiser {stats['pack_s']:.2f} s, "
              f"{sum(v is not None for v in answers.values())}/{len(answers)} (scale, count) fit")
        brute, packed, seconds = exhaustive(found)
        agree = "agrees" if brute == answers else "DIFFERS: " + ", ".join(
            f"{k}: {answers[k]} vs {brute[k]}" for k in answers if answers[k] != brute[k])
        print(f"{'':28} {'exhaust':9} {roots:10d} {packed:7d} {seconds:7.2f}  {agree} with the bisection")
        result = search.search(base, stock, SCALES, count=5, lowest=LOW, highest=HIGH)
        st = result.stats
        print(f"{'':28} {'search':9} {'':10} {st['sets_packed']:7d} {st['total_s']:7.2f}  optimiser layouts; "
              f"chose {result.chosen.root} {result.chosen.scale}; confirming plan() {st['confirm_s']:.2f} s")
    base, stock = INVENTORIES[0][1], INVENTORIES[0][2]
    found, _, _ = search._prepare(base, stock, SCALES, list(COUNTS), LOW, HIGH, 440.0, "equal", "mm", ())
    freqs = [pitch.midi_frequency(k) for k in found.keys]
    start = time.process_time()
    search.table._planned_cut_lengths(base, {"stock": {"kerf": "1/16 in"}}, freqs, ())
    print(f"{INVENTORIES[0][0]:28} {'plan-tbl':9} {len(freqs):10d} {'':7} {time.process_time() - start:7.2f}  "
          "building the cut-length table alone (cutplan.plan() in batches)")
    print(f"full search (every root from {LOW}, {len(SCALES)} scales, counts {COUNTS[0]}-{COUNTS[-1]}): "
          f"slowest inventory {worst:.2f} CPU s (target 5 s)")


if __name__ == "__main__":
    main()

"""Benchmark: the uniform-beam solves of one or a few pieces, in plain floats against the array
solver (the same roots bit for bit), and planning the bundled examples without arched bars.

Run: python bench/bench_small_solves.py        (prints a table; never run as a test; about 20 CPU s)

Each row is the best CPU time of 5 runs of a batch of calls made past the memo
(:mod:`cutplan.physics.remember`), with the few-bracket float path (``FEW_IN_FLOATS``) as shipped
and with it switched off (every bracket through the array solver), and whether the two answers are
identical bit for bit.
"""

from __future__ import annotations

import math
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

import cutplan  # noqa: E402
from cutplan.physics import uniform  # noqa: E402
from cutplan.planning.service import guarded_plan  # noqa: E402

_RNG = np.random.default_rng(7)
SECTIONS = [(10 ** _RNG.uniform(-6, -0.7), 10 ** _RNG.uniform(-1.3, 0)) for _ in range(40)]
TUBE = (68.9e9 * 8.73e-9, 0.333, 0.53 * 26e9 * 1.23e-4, 2700 * 8.73e-9)  # 1 in x 0.065 in aluminium, SI
EXAMPLES = ["porch-chimes", "garden-conduit-chime", "just-copper", "classroom-pipes", "workshop-marimba"]


def cpu_best(fn, repeat=5):
    best = math.inf
    for _ in range(repeat):
        start = time.process_time()
        fn()
        best = min(best, time.process_time() - start)
    return best


def cases():
    one = [(np.array([g]), np.array([g * r])) for g, r in SECTIONS]
    targets = np.geomspace(200.0, 4000.0, 40)
    slender = [(g, g * r) for g, r in SECTIONS if g < 0.03][:40]
    sets = [(np.array([g for g, _ in slender[i:i + 8]]), np.array([s for _, s in slender[i:i + 8]]))
            for i in range(0, len(slender), 8)]
    nodes = [(uniform.fundamental_omegas(g, s2), g, s2) for g, s2 in sets]
    return [
        ("modes 1-6 of one piece, 40 sections", lambda: [uniform.omegas.__wrapped__(g, s2, 6) for g, s2 in one]),
        ("mode 4 of one piece, 40 sections", lambda: [uniform.omegas.__wrapped__(g, s2, 4) for g, s2 in one]),
        ("mode-1 length of one piece, 40 targets",
         lambda: [uniform.fundamental_lengths.__wrapped__(t, *TUBE) for t in targets]),
        ("mode-1 lengths of 8 pieces, 5 sets",
         lambda: [uniform.fundamental_lengths.__wrapped__(targets[i:i + 8], *TUBE) for i in range(0, 40, 8)]),
        ("mode-1 nodes of up to 8 pieces, a few sets", lambda: [uniform.fundamental_nodes.__wrapped__(om, g, s2)
                                                       for om, g, s2 in nodes]),
    ]


def main():
    print(f"{'solve':42} {'floats s':>9} {'arrays s':>9} {'x':>6}  same bits")
    shipped = uniform.FEW_IN_FLOATS
    for name, fn in cases():
        floats_t, floats = cpu_best(fn), fn()
        uniform.FEW_IN_FLOATS = 0
        try:
            arrays_t, arrays = cpu_best(fn), fn()
        finally:
            uniform.FEW_IN_FLOATS = shipped
        same = all(np.asarray(a).tobytes() == np.asarray(b).tobytes() for a, b in zip(floats, arrays, strict=True))
        print(f"{name:42} {floats_t:9.4f} {arrays_t:9.4f} {arrays_t / floats_t:6.1f}  {same}")
    designs = [cutplan.load_design(ROOT / "examples" / f"{n}.toml") for n in EXAMPLES]
    for d in designs:  # once first: imports, shop tables and the wood bar's 3-D twisting fit
        guarded_plan(d)
    t = cpu_best(lambda: [guarded_plan(d) for d in designs], 3)
    print(f"{'plan the 5 examples without arched bars':42} {t:9.4f}  (memo warm, as when planned again)")


if __name__ == "__main__":
    main()

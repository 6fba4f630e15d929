"""Benchmark: the product's hot spots outside the 2-D bar solver, in CPU milliseconds per call.

Each row is timed fresh (what a first call costs) and, where the answer is remembered, again (what
the page's re-plans, the checks and the test suite pay for the same question).

Run: python bench/bench_hot_spots.py      (prints a table; never run as a test)
"""

import math
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

import cutplan  # noqa: E402
from cutplan.audio.partials import find_partials_and_hum  # noqa: E402
from cutplan.audio.synth import RATE, tone  # noqa: E402
from cutplan.materials import load_library  # noqa: E402
from cutplan.physics import air_column, uniform  # noqa: E402
from cutplan.planning import uncertainty  # noqa: E402
from cutplan.render.pdf import render_pdf  # noqa: E402
from cutplan.render.svg import svg_files  # noqa: E402


def cpu_ms(fn, repeat=7):
    """Best CPU milliseconds of ``repeat`` runs (after one warm-up)."""
    fn()
    best = math.inf
    for _ in range(repeat):
        start = time.process_time()
        fn()
        best = min(best, time.process_time() - start)
    return best * 1e3


def fresh(fn):
    """The solver without its memo (every call solves)."""
    return getattr(fn, "__wrapped__", fn)


def main():
    g, s2 = np.linspace(0.001, 0.01, 8), np.linspace(0.0005, 0.004, 8)
    hz = np.linspace(400.0, 900.0, 8)
    ratios = uncertainty.air_ratios(0.3, 0.01, 0.61, 2, 293.15)

    def column_hz(x):
        return float(air_column.column_frequency(x, 0.01, 343.2, temperature=293.15))

    def column_hz_fresh(x):
        return float(fresh(air_column.column_frequency)(x, 0.01, 343.2, temperature=293.15))

    samples = tone([440.0, 1214.4, 2376.0], [1.0, 0.5, 0.3], [2.0, 1.0, 0.5], 5.0)
    porch_file = ROOT / "examples" / "porch-chimes.toml"
    porch = cutplan.plan(cutplan.load_design(porch_file))
    rows = [
        ("load_library() (shipped tables)", lambda: load_library(), None),
        ("uniform.omegas, 8 pieces x 4 modes", lambda: fresh(uniform.omegas)(g, s2, 4),
         lambda: uniform.omegas(g, s2, 4)),
        ("uniform.fundamental_omegas, 8 pieces", lambda: fresh(uniform.fundamental_omegas)(g, s2),
         lambda: uniform.fundamental_omegas(g, s2)),
        ("uniform.fundamental_lengths, 8 pieces", lambda: fresh(uniform.fundamental_lengths)(hz, 10.0, 1.0, 1e6, 1e-5),
         lambda: uniform.fundamental_lengths(hz, 10.0, 1.0, 1e6, 1e-5)),
        ("cut_length_for_risk, air column", lambda: uncertainty.cut_length_for_risk(
            column_hz_fresh, 0.3, column_hz(0.3) * 0.999, ratios, 0.05),
         lambda: uncertainty.cut_length_for_risk(column_hz, 0.3, column_hz(0.3) * 0.999, ratios, 0.05)),
        ("find_partials_and_hum, 5 s at 44.1 kHz", lambda: find_partials_and_hum(samples, RATE), None),
        ("svg_files, porch chimes", lambda: svg_files(porch), None),
        ("render_pdf, porch chimes", lambda: render_pdf(porch), None),
        ("plan porch chimes again (load + plan)", lambda: cutplan.plan(cutplan.load_design(porch_file)), None),
    ]
    print(f"{'hot spot':44s} {'fresh ms':>10s} {'remembered ms':>14s}")
    for label, first, again in rows:
        again_ms = f"{cpu_ms(again):14.3f}" if again else f"{'-':>14s}"
        print(f"{label:44s} {cpu_ms(first):10.3f} {again_ms}")


if __name__ == "__main__":
    main()

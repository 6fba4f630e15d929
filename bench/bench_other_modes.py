"""Benchmark: cost of the sideways/twisting modes per piece and of the E-and-G calibration fit.

Run: python bench/bench_other_modes.py        (prints a table of CPU seconds; never run as a test)

CPU seconds (time.process_time), not wall time, so that a busy machine changes little; the last
column is the ratio to planning the same piece without its other modes.
"""

import time

import numpy as np

from cutplan.materials import load_library
from cutplan.physics import side_modes, timoshenko
from cutplan.physics.sections import bar
from cutplan.tuning.calibrate_moduli import _partial_frequencies, fit_moduli


def cpu(fn, repeat=5):
    best = float("inf")
    for _ in range(repeat):
        start = time.process_time()
        fn()
        best = min(best, time.process_time() - start)
    return best


def main():
    lib = load_library()
    maple = lib.materials["maple-sugar"]
    e, g, rho = maple.modulus_for("timoshenko"), maple.shear_modulus_for("timoshenko"), maple.density
    sec = bar(0.055, 0.024)
    kappa = sec.shear_coefficient(maple.poisson)
    ei, mu = e * sec.second_moment, rho * sec.area
    kga, ri = kappa * g * sec.area, rho * sec.second_moment
    base = cpu(lambda: timoshenko.frequencies(0.42, ei, mu, kga, ri, modes=4))
    rows = [
        ("bending modes 1-4, uniform (reference)", base),
        ("sideways modes 1-6, uniform", cpu(lambda: side_modes.sideways_frequencies(0.42, 0.055, 0.024, e, g, rho,
                                                                                     kappa, 6))),
        ("twisting modes 1-6, uniform", cpu(lambda: side_modes.twisting_frequencies_bar(0.42, 0.055, 0.024, g, rho, 6))),
        ("sideways modes 1-6, arched (FE)", cpu(lambda: side_modes.sideways_frequencies_arched(
            0.42, 0.055, 0.024, 0.014, 0.5, 2.0, e, g, rho, kappa, 6))),
        ("twisting modes 1-6, arched (FE)", cpu(lambda: side_modes.twisting_frequencies_arched(
            0.42, 0.055, 0.024, 0.014, 0.5, 2.0, g, rho, 6))),
    ]
    f = _partial_frequencies(maple, sec, "timoshenko", 12.5e9, 12.5e9 / 13, 0.42, 3)
    rng = np.random.default_rng(0)
    measured = [(0.42, n, x * 2 ** (rng.normal(0, 0.2) / 1200)) for n, x in enumerate(f, start=1)]
    rows.append(("fit E and G from 3 partials", cpu(lambda: fit_moduli(measured, maple, sec), repeat=3)))
    print(f"{'task':42} {'CPU s':>9} {'x ref':>7}")
    for name, t in rows:
        print(f"{name:42} {t:9.4f} {t / base:7.1f}")


if __name__ == "__main__":
    main()

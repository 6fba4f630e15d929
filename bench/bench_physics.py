"""Benchmark: physics solvers, finite-element convergence, planning and start-up time.

Run: python bench/bench_physics.py        (prints tables; never run as a test)
"""

import math
import subprocess
import sys
import time
from pathlib import Path

import numpy as np

from cutplan.physics import beam, beam_fe, timoshenko
from cutplan.sections import tube

ROOT = Path(__file__).resolve().parent.parent


def timed(fn, repeat=3):
    best = math.inf
    for _ in range(repeat):
        start = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - start)
    return best


def tube_constants():
    s = tube(0.0254, 0.065 * 0.0254)
    e, rho, nu = 68.9e9, 2700.0, 0.33
    g = e / (2 * (1 + nu))
    return e * s.second_moment, rho * s.area, s.shear_coefficient(nu) * g * s.area, rho * s.second_moment


def vectorised():
    ei, mu, kga, ri = tube_constants()
    targets = np.geomspace(100, 5000, 10_000)
    lengths = np.linspace(0.15, 2.0, 10_000)
    rows = [
        ("slender lengths, 10,000 targets", timed(lambda: beam.free_free_length(targets, ei, mu))),
        ("shear-corrected f1, 10,000 lengths", timed(lambda: timoshenko.fundamental_frequencies(lengths, ei, mu, kga, ri), 1)),
        ("shear-corrected lengths, 10,000 targets", timed(lambda: timoshenko.fundamental_lengths(targets, ei, mu, kga, ri), 1)),
        ("shear-corrected modes 1-6, one piece", timed(lambda: timoshenko.frequencies(0.5, ei, mu, kga, ri, 6))),
    ]
    print(f"{'solver':44} {'seconds':>9}")
    for name, t in rows:
        print(f"{name:44} {t:9.4f}")


def convergence():
    ei, mu, kga, ri = tube_constants()
    exact = timoshenko.frequencies(0.5, ei, mu, kga, ri, modes=6)
    print("\nFinite elements against the exact transfer matrix, 1 in x 0.065 in Al tube, 0.5 m")
    print("error in cents, modes 1..6 (order = polynomial order of the elements)")
    print(f"{'order':>5} {'elements':>8} " + " ".join(f"{'mode ' + str(n):>10}" for n in range(1, 7)) + f" {'ms':>7}")
    for order in (2, 3, 4):
        for elements in (5, 10, 20, 40, 80):
            start = time.perf_counter()
            fe = beam_fe.free_free_modes(0.5, ei, kga, mu, ri, modes=6, elements=elements, order=order)
            ms = (time.perf_counter() - start) * 1000
            err = 1200 * np.log2(fe.frequencies / exact)
            print(f"{order:5d} {elements:8d} " + " ".join(f"{e:10.5f}" for e in err) + f" {ms:7.1f}")


def arch_convergence():
    from cutplan.physics import undercut

    e, g, rho, kappa, b, t = 13.86e9, 0.111 * 13.86e9, 706.0, 0.85, 0.05, 0.022
    args = (0.40, b, t, 0.013, 0.5, e, g, rho, kappa)
    saved = undercut.ELEMENTS_END, undercut.ELEMENTS_ARCH
    undercut.ELEMENTS_END, undercut.ELEMENTS_ARCH = 40, 80
    ref = undercut.bar_modes(*args, modes=3).frequencies
    print("\nArched bar (400 x 50 x 22 mm maple, 13 mm deep parabolic arch): error against a 240-element mesh")
    print(f"{'end el.':>7} {'arch el.':>8} " + " ".join(f"{'mode ' + str(n):>10}" for n in (1, 2, 3)))
    for ends, arch in ((2, 3), (3, 5), (4, 6), (6, 10), (10, 16)):
        undercut.ELEMENTS_END, undercut.ELEMENTS_ARCH = ends, arch
        f = undercut.bar_modes(*args, modes=3).frequencies
        print(f"{ends:7d} {arch:8d} " + " ".join(f"{x:10.5f}" for x in 1200 * np.log2(f / ref)))
    undercut.ELEMENTS_END, undercut.ELEMENTS_ARCH = saved
    print(f"(planning uses {saved[0]} end and {saved[1]} arch elements per half, order {undercut.ORDER})")


def measuring():
    from cutplan.audio.analysis import measure
    from cutplan.audio.synth import tone

    rate = 44100
    x = tone([587.33 * r for r in (1, 2.677, 4.967, 7.939)], [1, 0.7, 0.5, 0.3], [2, 1, 0.5, 0.3], 5.0, rate)
    t = timed(lambda: measure(x, rate, "chime"))
    print(f"\n{'measure a 5 s recording (44.1 kHz)':44} {t:9.4f}")


FOUR_OCTAVES = """
title = "Four-octave undercut set"
[[set]]
name = "bars"
kind = "bar"
range = "C3..C7"
scale = "chromatic"
material = "rosewood-honduras"
section = { shape = "bar", width = "55 mm", thickness = "24 mm" }
undercut = { ratios = [4.0], arch_width = 0.5, min_thickness = "5 mm" }
[[set]]
name = "res"
kind = "resonator"
serves = "bars"
section = { stock = "pvc-sch40-1" }
temperature_range = ["12 C", "28 C"]
max_length = "1.2 m"
"""


def undercut_set():
    import tempfile

    from cutplan.design import load_design
    from cutplan.materials import load_library
    from cutplan.planner import plan

    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "four.toml"
        path.write_text(FOUR_OCTAVES)
        design = load_design(path, lambda d: load_library(d))[0]
        t = timed(lambda: plan(design), 1)
    bars = len(design.sets[0].targets)
    print(f"{'plan ' + str(bars) + ' undercut bars + resonators (target < 10 s)':44} {t:9.4f}")


def planning_and_startup():
    from cutplan.design import load_design
    from cutplan.materials import load_library
    from cutplan.planner import plan

    print(f"\n{'what':44} {'seconds':>9}")
    for path in sorted((ROOT / "examples").glob("*.toml")):
        t = timed(lambda p=path: plan(load_design(p, lambda d: load_library(d))[0]))
        print(f"{'plan ' + path.name:44} {t:9.4f}")
    cmd = [sys.executable, "-c", "from cutplan.cli import cli; cli(['--help'])"]
    t = timed(lambda: subprocess.run(cmd, capture_output=True, check=True), 3)
    print(f"{'cutplan --help (new process)':44} {t:9.4f}")
    cmd2 = [sys.executable, "-c", "pass"]
    t2 = timed(lambda: subprocess.run(cmd2, capture_output=True, check=True), 3)
    print(f"{'  of which bare Python start-up':44} {t2:9.4f}")


if __name__ == "__main__":
    vectorised()
    convergence()
    arch_convergence()
    measuring()
    undercut_set()
    planning_and_startup()

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
from cutplan.physics.sections import tube

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


def cpu_timed(fn, repeat=5):
    """Best CPU seconds of ``repeat`` runs."""
    best = math.inf
    for _ in range(repeat):
        start = time.process_time()
        fn()
        best = min(best, time.process_time() - start)
    return best


def vectorised():
    from cutplan.physics import uniform

    ei, mu, kga, ri = tube_constants()
    targets = np.geomspace(100, 5000, 10_000)
    lengths = np.linspace(0.15, 2.0, 10_000)
    slender = cpu_timed(lambda: beam.free_free_length(targets, ei, mu), 20)
    shear = cpu_timed(lambda: timoshenko.fundamental_lengths(targets, ei, mu, kga, ri))
    back = timoshenko.fundamental_frequencies(timoshenko.fundamental_lengths(targets, ei, mu, kga, ri), ei, mu, kga, ri)
    g, s2 = timoshenko.uniform_parameters(lengths[:100], ei, mu, kga, ri)
    rows = [
        ("slender lengths, 10,000 targets", slender, ""),
        ("shear-corrected lengths, 10,000 targets", shear, f"{shear / slender:,.0f} x slender (target <= 0.05 s)"),
        ("shear-corrected f1, 10,000 lengths", cpu_timed(
            lambda: timoshenko.fundamental_frequencies(lengths, ei, mu, kga, ri)), ""),
        ("modes 1-4 of 100 pieces", cpu_timed(lambda: uniform.omegas(g, s2, 4)), ""),
        ("mode-4 lengths, 100 targets", cpu_timed(lambda: uniform.mode_lengths(targets[:100], 4, ei, mu, kga, ri)), ""),
        ("shear-corrected modes 1-6, one piece", cpu_timed(lambda: timoshenko.frequencies(0.5, ei, mu, kga, ri, 6)), ""),
    ]
    print(f"{'solver':44} {'cpu s':>9}")
    for name, t, note in rows:
        print(f"{name:44} {t:9.5f}  {note}")
    print(f"forward model against length solve, worst of 10,000: {np.max(np.abs(1200 * np.log2(back / targets))):.1e} cent")
    loops = [subprocess.Popen([sys.executable, "-c", "while True: pass"]) for _ in range(2)]
    try:
        slender_l = cpu_timed(lambda: beam.free_free_length(targets, ei, mu), 20)
        shear_l = cpu_timed(lambda: timoshenko.fundamental_lengths(targets, ei, mu, kga, ri))
    finally:
        for p in loops:
            p.kill()
            p.wait()
    print(f"with two busy loops: slender {slender_l:.5f} s, shear-corrected {shear_l:.5f} s "
          f"({shear_l / slender_l:,.0f} x slender)")


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
    t = timed(lambda: measure(x, rate))
    print(f"\n{'measure a 5 s recording (44.1 kHz)':44} {t:9.4f}")


def undercut_solves():
    """Finite-element solves and CPU per arched bar, four octaves (one BLAS thread)."""
    from cutplan.physics import undercut
    from cutplan.physics.sections import shear_coefficient_cowper_rectangle

    e, rho, nu = 13.86e9, 706.0, 0.424
    g, kappa = 0.111 * e, shear_coefficient_cowper_rectangle(nu)
    targets = 130.81 * 2 ** (np.arange(49) / 12)
    guess = jac = None
    solves = []
    start = time.process_time()
    for f in targets:
        r = undercut.design_undercut(f, (4.0,), 0.055, 0.024, e, g, rho, kappa, 0.005, guess=guess, jacobian=jac)
        guess, jac = (r.length, r.depth, r.exponent), r.jacobian
        solves.append(r.solves)
    cpu = time.process_time() - start
    one = cpu_timed(lambda: undercut.bar_modes(0.4, 0.05, 0.022, 0.013, 0.5, e, g, rho, kappa, modes=4), 20)
    print(f"\n49 arched maple bars 1:4: {np.mean(solves):.1f} FE solves per bar (max {max(solves)}), "
          f"{cpu / 49 * 1000:.1f} ms CPU per bar; one FE solve {one * 1000:.2f} ms CPU")


def startup():
    cmd = [sys.executable, "-c", "from cutplan.cli import cli; cli(['--help'])"]
    t = timed(lambda: subprocess.run(cmd, capture_output=True, check=True), 3)
    print(f"\n{'cutplan --help (new process)':44} {t:9.4f}")
    cmd2 = [sys.executable, "-c", "pass"]
    t2 = timed(lambda: subprocess.run(cmd2, capture_output=True, check=True), 3)
    print(f"{'  of which bare Python start-up':44} {t2:9.4f}")
    print("(whole plans, quiet and under load: bench/bench_plan.py)")


if __name__ == "__main__":
    vectorised()
    convergence()
    arch_convergence()
    measuring()
    undercut_solves()
    startup()

"""Benchmark: cost of the sideways/twisting modes of one bar, and the 3-D model's mesh study.

Run: python bench/bench_side_modes.py        (prints two tables; never run as a test)

CPU seconds (time.process_time, best of the repeats), quiet and with two busy loops
(``python -c "while True: pass"``) competing for the cores; "same" says whether the loaded run
gave bit-identical frequencies.  The mesh study solves one arched maple bar (400 x 55 x 24 mm,
parabolic arch over half the length, 14 mm deep, flat-sawn) on the product mesh and finer ones.
"""

import subprocess
import sys
import time

from cutplan.materials import load_library
from cutplan.physics import side_modes, solid3d, undercut
from cutplan.planning import grain

L, B, T, DEPTH, FRACTION, EXPONENT = 0.40, 0.055, 0.024, 0.014, 0.5, 2.0


def cpu(fn, repeat=3):
    best, out = float("inf"), None
    for _ in range(repeat):
        start = time.process_time()
        out = fn()
        best = min(best, time.process_time() - start)
    return best, out


def busy_loops(count=2):
    return [subprocess.Popen([sys.executable, "-c", "while True: pass"]) for _ in range(count)]


def h(x):
    return undercut.arch_thickness(x, L, T, DEPTH, FRACTION, EXPONENT)


def tasks():
    maple = load_library().materials["maple-sugar"]
    consts = grain.solid_constants(maple, "flat")
    e_x, _, _, g_xy, g_xz, _, nu_xy, _, _ = grain.axis_constants(maple, "flat")
    rho = maple.density
    kappa = 10 * (1 + nu_xy) / (12 + 11 * nu_xy)

    def fitted():
        side_modes.twisting_stiffening.cache_clear()
        return tuple(side_modes.twisting_frequencies_bar_solid(L, B, T, consts, rho, 6))

    return [
        ("arched bar, 3-D model (product mesh)",
         lambda: solid3d.solve_side_modes(L, B, T, h, consts, rho, FRACTION, modes=6)),
        ("uniform wood bar, warping fit + closed form", fitted),
        ("uniform wood bar, closed form (fit cached)",
         lambda: tuple(side_modes.twisting_frequencies_bar_solid(L, B, T, consts, rho, 6))),
        ("arched bar, old beam models (reference)",
         lambda: (tuple(side_modes.sideways_frequencies_arched(L, B, T, DEPTH, FRACTION, EXPONENT, e_x, g_xy, rho,
                                                               kappa, 6)),
                  tuple(side_modes.twisting_frequencies_arched(L, B, T, DEPTH, FRACTION, EXPONENT, g_xz, rho, 6)))),
    ]


def cost_table():
    print(f"{'side modes of one bar':44} {'quiet cpu':>9} {'loaded cpu':>10}  same")
    for name, fn in tasks():
        quiet, a = cpu(fn)
        loops = busy_loops()
        try:
            loaded, b = cpu(fn)
        finally:
            for p in loops:
                p.kill()
                p.wait()
        print(f"{name:44} {quiet:9.3f} {loaded:10.3f}  {'yes' if repr(a) == repr(b) else 'NO'}")


def mesh_study():
    maple = load_library().materials["maple-sugar"]
    consts = grain.solid_constants(maple, "flat")
    rows = [("product: quarter, 20-node", solid3d.PRODUCT_MESH, "hex20", True),
            ("quarter, 27-node", solid3d.PRODUCT_MESH, "hex27", True),
            ("quarter, 20-node, finer", (28, 4, 3), "hex20", True),
            ("whole length, 27-node (test check)", (24, 4, 3), "hex27", False),
            ("quarter, 27-node, finest", (32, 4, 4), "hex27", True)]
    print()
    print(f"{'mesh (half-length x half-width x thickness)':44} {'cpu s':>6} {'side 1':>8} {'side 2':>8} "
          f"{'twist 1':>8} {'twist 2':>8}  [Hz]")
    for name, mesh, element, symmetry in rows:
        t, r = cpu(lambda m=mesh, e=element, s=symmetry: solid3d.solve_side_modes(
            L, B, T, h, consts, maple.density, FRACTION, modes=2, mesh=m, element=e, symmetry=s), repeat=1)
        label = f"{name} {mesh}"
        print(f"{label:44} {t:6.2f} {r.sideways[0]:8.1f} {r.sideways[1]:8.1f} {r.twisting[0]:8.1f} "
              f"{r.twisting[1]:8.1f}")


if __name__ == "__main__":
    cost_table()
    mesh_study()

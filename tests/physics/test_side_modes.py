"""Sideways bending and twisting of bars: the turned-section solution, closed forms, arched bars."""

import math

import numpy as np
import pytest

from cutplan.physics import side_modes, timoshenko, torsion
from cutplan.physics.sections import shear_coefficient_cowper_rectangle

E, G, RHO = 69e9, 26e9, 2700.0  # aluminium 6061-T6, Aluminum Association typical values
KAPPA = shear_coefficient_cowper_rectangle(0.33)  # Cowper 1966, Table 1: 10(1+nu)/(12+11nu)


def test_sideways_bending_is_face_bending_of_the_turned_section():
    # turned-section solution: a bar b wide and t thick bends sideways exactly as a bar t wide and
    # b thick bends on its face (same area, I = t b^3 / 12, same Cowper kappa for a rectangle)
    b, t, length = 0.040, 0.015, 0.35
    side = side_modes.sideways_frequencies(length, b, t, E, G, RHO, KAPPA, modes=4)
    area, second = t * b, t * b**3 / 12
    turned = timoshenko.frequencies(length, E * second, RHO * area, KAPPA * G * area, RHO * second, modes=4)
    assert side == pytest.approx(turned, rel=1e-12)


def test_slender_sideways_mode_matches_the_euler_bernoulli_bar_formula():
    # Blevins 1979 Table 8-1 free-free root (beta_1 L)^2 = 22.3733 -> f1 = 1.02792 (b / L^2) sqrt(E/rho)
    # with the width b in place of the thickness; a 2 m long, 10 mm wide bar is so slender that
    # shear and rotary inertia move it by under 0.05 % (about 1 cent; hence the tolerance)
    b, t, length = 0.010, 0.030, 2.0
    side = side_modes.sideways_frequencies(length, b, t, E, G, RHO, KAPPA, modes=1)
    assert side[0] == pytest.approx(1.02792 * b / length**2 * math.sqrt(E / RHO), rel=5e-4)


def test_sideways_mode_is_below_the_fundamental_when_the_bar_is_thicker_than_wide():
    b, t, length = 0.020, 0.030, 0.4
    side = side_modes.sideways_frequencies(length, b, t, E, G, RHO, KAPPA, modes=1)
    face = side_modes.sideways_frequencies(length, t, b, E, G, RHO, KAPPA, modes=1)  # turned: face bending
    assert side[0] < face[0]


def test_uniform_bar_twisting_follows_the_closed_form():
    # f_n = (n / 2L) sqrt(G J / rho Ip), J from the Timoshenko & Goodier series, Ip = b t (b^2+t^2)/12
    b, t, length = 0.050, 0.022, 0.55
    f = side_modes.twisting_frequencies_bar(length, b, t, 1.54e9, 706.0, modes=3)
    c = math.sqrt(1.54e9 * torsion.torsion_constant_rectangle(b, t) / (706.0 * torsion.polar_moment_rectangle(b, t)))
    assert f == pytest.approx(np.array([1, 2, 3]) * c / (2 * length), rel=1e-12)


def test_arched_bar_without_an_arch_is_the_uniform_bar():
    # the non-uniform finite elements against the exact transfer-matrix solution (depth 0)
    b, t, length = 0.055, 0.024, 0.42
    fe = side_modes.sideways_frequencies_arched(length, b, t, 0.0, 0.5, 2.0, E, G, RHO, KAPPA, modes=3)
    exact = side_modes.sideways_frequencies(length, b, t, E, G, RHO, KAPPA, modes=3)
    assert np.all(np.abs(1200 * np.log2(fe / exact)) < 0.01)
    tw = side_modes.twisting_frequencies_arched(length, b, t, 0.0, 0.5, 2.0, G, RHO, modes=3)
    tw_exact = side_modes.twisting_frequencies_bar(length, b, t, G, RHO, modes=3)
    assert np.all(np.abs(1200 * np.log2(tw / tw_exact)) < 0.05)  # linear elements, see test_torsion


def test_an_arch_lowers_the_first_sideways_and_twisting_modes():
    b, t, length = 0.055, 0.024, 0.42
    args = (length, b, t)
    flat = side_modes.sideways_frequencies_arched(*args, 0.0, 0.5, 2.0, E, G, RHO, KAPPA, modes=1)
    arched = side_modes.sideways_frequencies_arched(*args, 0.014, 0.5, 2.0, E, G, RHO, KAPPA, modes=1)
    assert arched[0] < flat[0]
    tw_flat = side_modes.twisting_frequencies_arched(*args, 0.0, 0.5, 2.0, G, RHO, modes=1)
    tw_arched = side_modes.twisting_frequencies_arched(*args, 0.014, 0.5, 2.0, G, RHO, modes=1)
    # twisting stiffness goes as h^3 in the thin middle: the first twist drops a lot
    assert tw_arched[0] < 0.7 * tw_flat[0]


def test_arched_sideways_modes_match_an_exact_stepped_bar():
    # independent check: the arched profile cut into 300 uniform steps (midpoint thickness), each
    # solved exactly by the Timoshenko transfer matrix; stepping a smooth profile errs as 1/N^2
    from cutplan.physics import undercut

    b, t, length, depth, alpha, p = 0.055, 0.024, 0.40, 0.014, 0.5, 2.0
    n = 300
    mid = (np.arange(n) + 0.5) / n * length
    h = undercut.arch_thickness(mid, length, t, depth, alpha, p)
    ei_ref, mu_ref = E * t * b**3 / 12, RHO * b * t
    segments = [(1 / n, hi / t, hi / t, ei_ref / (KAPPA * G * b * hi * length**2),
                 RHO * hi * b**3 / 12 / (mu_ref * length**2)) for hi in h]
    omegas = timoshenko.dimensionless_frequencies(0.0, 0.0, 2, segments=segments)
    exact = omegas / (2 * math.pi * length**2) * math.sqrt(ei_ref / mu_ref)
    fe = side_modes.sideways_frequencies_arched(length, b, t, depth, alpha, p, E, G, RHO, KAPPA, modes=2)
    assert np.all(np.abs(1200 * np.log2(fe / exact)) < 0.05)  # 0.003 cent measured with 300 steps


def test_arched_twisting_modes_match_an_exact_stepped_shaft():
    # independent check: 400 uniform steps, each the exact wave-equation transfer matrix
    # theta1 = theta0 cos kl + T0 sin kl / (c k), T1 = -theta0 c k sin kl + T0 cos kl,
    # c = G J, k = omega sqrt(rho Ip / G J); free ends: T = 0 at both
    from scipy.optimize import brentq

    from cutplan.physics import undercut

    b, t, length, depth, alpha, p = 0.055, 0.024, 0.40, 0.014, 0.5, 2.0
    n = 400
    mid = (np.arange(n) + 0.5) / n * length
    h = undercut.arch_thickness(mid, length, t, depth, alpha, p)
    c = G * torsion.torsion_constant_rectangle(b, h)
    m = RHO * torsion.polar_moment_rectangle(b, h)
    step = length / n

    def end_torque(omega):
        theta, torque = 1.0, 0.0
        for ci, mi in zip(c, m, strict=True):
            k = omega * math.sqrt(mi / ci)
            cs, sn = math.cos(k * step), math.sin(k * step)
            theta, torque = theta * cs + torque * sn / (ci * k), -theta * ci * k * sn + torque * cs
        return torque

    grid = np.linspace(100.0, 2 * math.pi * 6000.0, 300)
    vals = [end_torque(w) for w in grid]
    roots = [brentq(end_torque, a, z) for a, z, fa, fz in zip(grid, grid[1:], vals, vals[1:], strict=False)
             if fa * fz < 0][:2]
    exact = np.array(roots) / (2 * math.pi)
    fe = side_modes.twisting_frequencies_arched(length, b, t, depth, alpha, p, G, RHO, modes=2)
    # linear elements and 1/N^2 stepping: 0.004 and 0.05 cent measured for modes 1 and 2
    assert np.all(np.abs(1200 * np.log2(fe / exact)) < 0.1)

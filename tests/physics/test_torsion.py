"""Saint-Venant torsion constants and free-free twisting frequencies against published values."""

import math

import numpy as np
import pytest

from cutplan.physics import torsion

# Timoshenko & Goodier, Theory of Elasticity, 3rd ed., 1970, ch. 10, table of k1 = J / (a b^3)
# for a rectangle with sides a >= b (the same three-figure table is reproduced in structural
# software documentation for rectangular sections): a/b -> k1
TIMOSHENKO_GOODIER_K1 = [
    (1.0, 0.141),
    (1.5, 0.196),
    (2.0, 0.229),
    (2.5, 0.249),
    (3.0, 0.263),
    (4.0, 0.281),
    (5.0, 0.291),
    (10.0, 0.312),
]


@pytest.mark.parametrize(("aspect", "k1"), TIMOSHENKO_GOODIER_K1)
def test_rectangle_torsion_constant_matches_published_table(aspect, k1):
    # the table gives three figures, so agreement to half a unit in the last place
    j = torsion.torsion_constant_rectangle(aspect * 0.01, 0.01)
    assert j / (aspect * 0.01 * 0.01**3) == pytest.approx(k1, abs=0.0006)


def test_rectangle_torsion_constant_does_not_depend_on_which_side_is_called_width():
    assert torsion.torsion_constant_rectangle(0.05, 0.02) == torsion.torsion_constant_rectangle(0.02, 0.05)


def test_thin_strip_tends_to_one_third_b_cubed():
    # Timoshenko & Goodier 1970, ch. 10: for a narrow rectangle J -> a b^3 / 3 (k1 -> 1/3)
    j = torsion.torsion_constant_rectangle(1.0, 0.001)
    assert j / (1.0 * 0.001**3) == pytest.approx(1 / 3 * (1 - 0.630 * 0.001), rel=1e-4)


@pytest.mark.parametrize("aspect", [1.0, 1.5, 2.0, 3.0, 5.0, 10.0, 30.0])
def test_roark_closed_form_agrees_with_the_series(aspect):
    # Young & Budynas, Roark's Formulas for Stress and Strain, 7th ed., 2002, Table 10.1 case 4:
    # K = a b^3 [16/3 - 3.36 (b/a)(1 - b^4/12a^4)] (half-sides); the table's approximation is
    # within a fraction of a per cent of the exact series for every aspect ratio
    exact = torsion.torsion_constant_rectangle(aspect, 1.0)
    assert torsion.torsion_constant_rectangle_roark(aspect, 1.0) == pytest.approx(exact, rel=0.003)


def test_tube_torsion_constant_is_the_polar_moment():
    # Roark 7th ed. Table 10.1 (hollow concentric circle): K = pi (D^4 - d^4) / 32;
    # 1.000 x 0.065 in tube: D = 25.4 mm, d = 22.098 mm
    outer, inner = 0.0254, 0.0254 - 2 * 0.065 * 0.0254
    expected = math.pi * (outer**4 - inner**4) / 32
    assert torsion.torsion_constant_tube(outer, inner) == pytest.approx(expected, rel=1e-12)
    assert torsion.torsion_constant_tube(outer, inner) == pytest.approx(torsion.polar_moment_tube(outer, inner))


def test_round_rod_twists_at_half_wavelength_of_the_shear_wave():
    # closed form f_n = (n / 2L) sqrt(G J / rho Ip) (Blevins 1979, ch. 8); for a circle J = Ip,
    # so f_n = n sqrt(G / rho) / 2L: aluminium G = 26 GPa, rho = 2700 kg/m^3 (Aluminum
    # Association typical values) -> sqrt(G/rho) = 3103.1 m/s; L = 0.6 m -> 2585.9 Hz per mode
    d = 0.016
    gj = 26e9 * torsion.torsion_constant_tube(d)
    rho_ip = 2700 * torsion.polar_moment_tube(d)
    f = torsion.free_free_twisting_frequency(np.array([1, 2, 3]), 0.6, gj, rho_ip)
    assert f == pytest.approx(np.array([1, 2, 3]) * math.sqrt(26e9 / 2700) / 1.2, rel=1e-12)
    assert f[0] == pytest.approx(2585.9, abs=0.1)


def test_rectangular_bar_twists_lower_than_its_shear_wave_speed_says():
    # J < Ip for a rectangle: 50 x 22 mm, J = k1 a b^3 with k1(a/b = 2.27) about 0.24
    # (Timoshenko & Goodier table, interpolated), Ip = b t (b^2 + t^2) / 12
    j = torsion.torsion_constant_rectangle(0.050, 0.022)
    ip = torsion.polar_moment_rectangle(0.050, 0.022)
    assert 0.238 < j / (0.050 * 0.022**3) < 0.244
    assert j / ip == pytest.approx(0.2404 * 0.050 * 0.022**3 / ip, rel=0.01)


def test_finite_elements_give_back_the_closed_form_for_a_uniform_piece():
    # closed form f_n = (n / 2L) sqrt(GJ / rho Ip); linear elements with a consistent mass are
    # high by about (n pi / N)^2 / 24: 0.044 cent for mode 3 on N = 400 elements
    gj, rho_ip, length = 31.0, 2.0e-4, 0.45
    fe = torsion.twisting_frequencies(length, lambda x: np.full_like(x, gj), lambda x: np.full_like(x, rho_ip),
                                      modes=3)
    exact = torsion.free_free_twisting_frequency(np.array([1, 2, 3]), length, gj, rho_ip)
    cents = 1200 * np.log2(fe / exact)
    assert np.all(cents > 0)
    assert np.all(cents < 1200 / math.log(2) * (np.array([1, 2, 3]) * math.pi / 400) ** 2 / 24 * 1.05)


def test_stepped_shaft_matches_its_transcendental_equation():
    # Two uniform halves (GJ1, I1 | GJ2, I2), free ends: continuity of twist and torque at the
    # joint gives Z1 tan(k1 L/2) + Z2 tan(k2 L/2) = 0 with k = omega sqrt(I/GJ), Z = sqrt(GJ I)
    # (wave-equation textbook result, e.g. Blevins 1979 ch. 8 for shafts in series; derived here)
    from scipy.optimize import brentq

    length, gj1, i1, gj2, i2 = 1.0, 1.0, 1.0, 4.0, 2.0

    def gj(x):
        return np.where(x < length / 2, gj1, gj2)

    def ip(x):
        return np.where(x < length / 2, i1, i2)

    def eq(w):
        k1, k2 = w * math.sqrt(i1 / gj1), w * math.sqrt(i2 / gj2)
        z1, z2 = math.sqrt(gj1 * i1), math.sqrt(gj2 * i2)
        return z1 * math.sin(k1 / 2) * math.cos(k2 / 2) + z2 * math.sin(k2 / 2) * math.cos(k1 / 2)

    grid = np.linspace(0.1, 12.0, 2000)
    vals = [eq(w) for w in grid]
    roots = [brentq(eq, a, b) for a, b, fa, fb in zip(grid, grid[1:], vals, vals[1:], strict=False) if fa * fb < 0][:2]
    fe = torsion.twisting_frequencies(length, gj, ip, modes=2, elements=800)
    assert fe == pytest.approx(np.array(roots) / (2 * math.pi), rel=2e-4)

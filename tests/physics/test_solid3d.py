"""Sideways and twisting modes from the 3-D model, and the grain of wood bars.

The product solves a quarter of the bar with 20-node bricks (cutplan.physics.solid3d).  The
independent check here is another 3-D model: 27-node triquadratic bricks, the whole length (no
mid-length symmetry, so both symmetry classes come out of one solve) and a finer mesh.
"""

import math

import pytest

from cutplan.materials import load_library
from cutplan.physics import side_modes, solid3d, timoshenko, torsion, undercut
from cutplan.physics.sections import bar
from cutplan.planning import grain


def cents(a, b):
    return 1200 * math.log2(a / b)


# an arched marimba-like bar: 400 x 55 x 24 mm, parabolic arch over the middle half, 14 mm deep
ARCH = {"length": 0.40, "width": 0.055, "thickness": 0.024, "depth": 0.014, "fraction": 0.5, "exponent": 2.0}


def _h(a=ARCH):
    return lambda x: undercut.arch_thickness(x, a["length"], a["thickness"], a["depth"], a["fraction"], a["exponent"])


@pytest.fixture(scope="module")
def maple():
    return load_library().materials["maple-sugar"]


@pytest.fixture(scope="module")
def arched_reference(maple):
    """Independent 3-D model of the arched bar, flat- and quarter-sawn (27-node bricks, whole length)."""
    out = {}
    for sawing in ("flat", "quarter"):
        out[sawing] = solid3d.solve_side_modes(
            ARCH["length"], ARCH["width"], ARCH["thickness"], _h(), grain.solid_constants(maple, sawing),
            maple.density, ARCH["fraction"], modes=3, mesh=(24, 4, 3), symmetry=False, element="hex27")
    return out


def _product(maple, sawing):
    return side_modes.solid_side_modes(ARCH["length"], ARCH["width"], ARCH["thickness"], ARCH["depth"],
                                       ARCH["fraction"], ARCH["exponent"], grain.solid_constants(maple, sawing),
                                       maple.density, 3)


@pytest.mark.slow
@pytest.mark.parametrize("sawing", ["flat", "quarter"])
def test_arched_bar_side_modes_agree_with_an_independent_3d_model(maple, arched_reference, sawing):
    # independent check: finer whole-length 27-node brick model (above); within 10 cents
    product, ref = _product(maple, sawing), arched_reference[sawing]
    for kind in ("sideways", "twisting"):
        got, want = getattr(product, kind), getattr(ref, kind)
        for n in range(3):
            assert abs(cents(got[n], want[n])) < 10, (kind, n + 1, got[n], want[n])


def test_flat_against_quarter_sawn_twisting_as_the_3d_model_says(maple, arched_reference):
    # flat-sawn maple twists in its face with G_LT = 0.063 E_L, quarter-sawn with G_LR = 0.111 E_L
    # (Wood Handbook 2010, Table 5-1): the flat-sawn bar twists lower by a few hundred cents
    shift_ref = cents(arched_reference["quarter"].twisting[0], arched_reference["flat"].twisting[0])
    shift = cents(_product(maple, "quarter").twisting[0], _product(maple, "flat").twisting[0])
    assert shift_ref > 200
    assert abs(shift - shift_ref) < 10


@pytest.mark.parametrize("sawing", ["flat", "quarter"])
def test_uniform_wood_bar_side_modes_match_the_3d_model(maple, sawing):
    # the planner's uniform-bar models (Saint-Venant twisting of the orthotropic rectangle,
    # Lekhnitskii 1981, stiffened by warping as fitted to the 3-D model of a bar 8 widths long;
    # the shear-corrected beam sideways) against the independent 3-D model (27-node bricks, whole
    # length) of a 370 x 50 x 22 mm maple bar: modes 1-3 within 10 cents
    length, width, thick = 0.37, 0.050, 0.022
    consts = grain.solid_constants(maple, sawing)
    ref = solid3d.solve_side_modes(length, width, thick, lambda x: thick + 0 * x, consts, maple.density, 0.0,
                                   modes=3, mesh=(20, 3, 2), symmetry=False, element="hex27")
    twist = side_modes.twisting_frequencies_bar_solid(length, width, thick, consts, maple.density, modes=3)
    e_x, _, _, g_xy, _, _, nu_xy, _, _ = grain.axis_constants(maple, sawing)
    side = side_modes.sideways_frequencies(length, width, thick, e_x, g_xy, maple.density,
                                           bar(width, thick).shear_coefficient(nu_xy), modes=3)
    for n in range(3):
        assert abs(cents(twist[n], ref.twisting[n])) < 10, ("twisting", n + 1, twist[n], ref.twisting[n])
        assert abs(cents(side[n], ref.sideways[n])) < 10, ("sideways", n + 1, side[n], ref.sideways[n])


def test_uniform_isotropic_bar_in_3d_agrees_with_saint_venant_and_timoshenko():
    # aluminium 400 x 40 x 20 mm: Saint-Venant twisting (Timoshenko & Goodier 1970, ch. 10, J of
    # a rectangle) and the Timoshenko beam sideways (Timoshenko 1921) are the textbook models;
    # the free ends' warping lifts 3-D twisting a little (within 6 cents)
    e, nu, rho = 68.9e9, 0.33, 2700.0
    g = e / (2 * (1 + nu))
    length, width, thick = 0.40, 0.040, 0.020
    modes = solid3d.solve_side_modes(length, width, thick, lambda x: thick + 0 * x,
                                     solid3d.Orthotropic.isotropic(e, nu), rho, 0.0, modes=2)
    sv = torsion.free_free_twisting_frequency(1, length, g * torsion.torsion_constant_rectangle(width, thick),
                                              rho * torsion.polar_moment_rectangle(width, thick))
    assert 0 <= cents(modes.twisting[0], sv) < 6
    kappa = bar(width, thick).shear_coefficient(nu)
    area, second = width * thick, thick * width**3 / 12
    side = timoshenko.frequencies(length, e * second, rho * area, kappa * g * area, rho * second, modes=1)[0]
    assert abs(cents(modes.sideways[0], side)) < 3


def test_sawing_conventions_give_the_handbook_shear_moduli(maple):
    # Wood Handbook 2010, Table 5-1 (sugar maple): G_LR/E_L = 0.111, G_LT/E_L = 0.063,
    # E_R/E_L = 0.132, E_T/E_L = 0.065. Flat-sawn: thickness radial, width tangential.
    e_l = maple.modulus_for("timoshenko")
    flat_thick, flat_side = grain.bending_plane_constants(maple, "flat")
    quarter_thick, quarter_side = grain.bending_plane_constants(maple, "quarter")
    assert flat_thick.shear_modulus == pytest.approx(0.111 * e_l)
    assert flat_thick.modulus_across == pytest.approx(0.132 * e_l)
    assert flat_side.shear_modulus == pytest.approx(0.063 * e_l)
    assert quarter_thick.shear_modulus == pytest.approx(0.063 * e_l)
    assert quarter_side.modulus_across == pytest.approx(0.132 * e_l)
    unknown_thick, _ = grain.bending_plane_constants(maple, "unknown")
    assert unknown_thick.shear_modulus == pytest.approx(math.sqrt(0.111 * 0.063) * e_l)


def test_metals_ignore_the_grain():
    alu = load_library().materials["aluminum-6061-t6"]
    assert grain.axis_constants(alu, "flat") == grain.axis_constants(alu, "quarter")
    assert grain.grain_spread_cents(alu, "unknown", 0.05, 0.02) == 0.0

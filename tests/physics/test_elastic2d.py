"""The 2-D plane-stress bar: against the exact Timoshenko beam, a mesh study, symmetry, rod theory."""

import math
from functools import lru_cache

import numpy as np
import pytest

from cutplan.physics import elastic2d, timoshenko, undercut
from cutplan.physics.sections import shear_coefficient_cowper_rectangle

# Sugar maple along the grain (USDA Wood Handbook FPL-GTR-190, 2010, key wood-handbook-2010:
# Table 5-3a MOE 12.6 GPa x 1.10 (the shear allowance of its footnote, from memory), Table 5-1
# G_LR/E_L = 0.111, nu_LR = 0.424, SG 0.63 -> 706 kg/m3 as 1000 x SG x 1.12 (from memory for the
# SG basis)); E across the grain taken equal to E along, as the planner does without grain data.
E, G, RHO, NU = 13.86e9, 0.111 * 13.86e9, 706.0, 0.424
# Aluminium 6061-T6: E 68.9 GPa, nu 0.33, rho 2700 kg/m3 (ASM Handbook vol. 2, 1990, from
# memory); G = E / 2(1 + nu) for an isotropic metal.
E_AL, NU_AL, RHO_AL = 68.9e9, 0.33, 2700.0
G_AL = E_AL / (2 * (1 + NU_AL))


def cents(a, b):
    return 1200 * math.log2(a / b)


def timoshenko_uniform(length, width, thick, e, g, rho, nu, modes):
    """Exact free-free Timoshenko frequencies [Hz], Cowper's shear coefficient for a rectangle."""
    kappa = shear_coefficient_cowper_rectangle(nu)
    area, second = width * thick, width * thick**3 / 12
    return timoshenko.frequencies(length, e * second, rho * area, kappa * g * area, rho * second, modes)


@pytest.mark.parametrize("length, thick, e, g, nu, rho", [
    (0.30, 0.010, E_AL, G_AL, NU_AL, RHO_AL),   # glockenspiel-like aluminium bar, L/t = 30
    (0.45, 0.022, E, G, NU, RHO),               # marimba blank before undercutting, L/t = 20
    (0.30, 0.025, E, G, NU, RHO),               # a short, stubby xylophone blank, L/t = 12
])
def test_uniform_bar_agrees_with_timoshenko_within_3_cents(length, thick, e, g, nu, rho):
    # Reference: Timoshenko, Phil. Mag. 41 (1921) 744 (shear and rotary inertia), solved exactly
    # by transfer matrices, with Cowper, J. Appl. Mech. 33 (1966) 335, kappa = 10(1+nu)/(12+11nu).
    # The 2-D body shares no beam assumption with it; they differ by the beam theory's error.
    flat = elastic2d.profile_modes([0.0, length], [thick, thick], 0.05, e, e, g, nu, rho, modes=3)
    exact = timoshenko_uniform(length, 0.05, thick, e, g, rho, nu, 3)
    for a, b in zip(flat.frequencies, exact, strict=True):
        assert abs(cents(a, b)) < 3.0


def arch(length=0.38, thick=0.022, depth=0.016, fraction=0.6, exponent=2.5, stations=201):
    """A deep marimba-style arch (the centre left at 6 mm of 22 mm) as stations."""
    xs = np.linspace(0.0, length, stations)
    return xs, undercut.arch_thickness(xs, length, thick, depth, fraction, exponent)


@lru_cache(maxsize=4)
def deep_arch_modes(along, through):
    xs, hs = arch()
    return elastic2d.profile_modes(xs, hs, 0.06, E, E, G, NU, RHO, modes=4, elements_along=along,
                                   elements_through=through)


def test_refining_the_mesh_moves_modes_1_to_3_by_under_half_a_cent():
    # Independent model: the same body on a mesh twice as fine each way (four times the elements).
    coarse = deep_arch_modes(elastic2d.ELEMENTS_ALONG, elastic2d.ELEMENTS_THROUGH)
    fine = deep_arch_modes(2 * elastic2d.ELEMENTS_ALONG, 2 * elastic2d.ELEMENTS_THROUGH)
    for a, b in zip(coarse.frequencies[:3], fine.frequencies[:3], strict=True):
        assert abs(cents(a, b)) < 0.5


def test_refining_the_mesh_of_a_uniform_bar_moves_nothing():
    xs, hs = [0.0, 0.45], [0.022, 0.022]
    coarse = elastic2d.profile_modes(xs, hs, 0.05, E, E, G, NU, RHO, modes=3)
    fine = elastic2d.profile_modes(xs, hs, 0.05, E, E, G, NU, RHO, modes=3, elements_along=120, elements_through=8)
    for a, b in zip(coarse.frequencies, fine.frequencies, strict=True):
        assert abs(cents(a, b)) < 0.5


def test_an_arch_lowers_mode_1_most_and_moves_its_nodes_toward_the_ends():
    # Fletcher and Rossing, The Physics of Musical Instruments, 2nd ed. 1998, ch. 19 (from memory
    # for the chapter): removing wood at mid-bar lowers f1 most, so f2/f1 rises above the uniform
    # bar's 2.76 toward 4; and the mode-1 nodes of a uniform bar sit at 0.224 L.
    xs, hs = arch()
    arched = deep_arch_modes(elastic2d.ELEMENTS_ALONG, elastic2d.ELEMENTS_THROUGH)
    flat = elastic2d.profile_modes([0.0, xs[-1]], [hs[0], hs[0]], 0.06, E, E, G, NU, RHO, modes=4)
    assert arched.frequencies[1] / arched.frequencies[0] > flat.frequencies[1] / flat.frequencies[0] + 0.5
    assert len(arched.nodes[0]) == 2 and arched.nodes[0][0] / xs[-1] < 0.224 - 0.02
    assert flat.nodes[0][0] / xs[-1] == pytest.approx(0.224, abs=0.005)
    assert list(arched.frequencies) == sorted(arched.frequencies)


def test_a_profile_cut_on_one_side_mirrors_exactly():
    # Physics, not a value: the bar turned end for end is the same bar.  A lopsided cut (wood
    # taken off near end A only) gives the same frequencies and mirrored nodes from end B.
    xs = np.array([0.0, 0.05, 0.12, 0.2, 0.3, 0.4])
    hs = np.array([0.020, 0.018, 0.012, 0.015, 0.020, 0.020])
    one = elastic2d.profile_modes(xs, hs, 0.05, E, E, G, NU, RHO, modes=3)
    two = elastic2d.profile_modes(xs[-1] - xs[::-1], hs[::-1], 0.05, E, E, G, NU, RHO, modes=3)
    for a, b in zip(one.frequencies, two.frequencies, strict=True):
        assert abs(cents(a, b)) < 0.05
    assert one.nodes[0][0] == pytest.approx(0.4 - two.nodes[0][-1], abs=2e-4)


def test_lengthwise_modes_are_sorted_out_and_match_rod_theory():
    # Rod theory: free-free longitudinal mode 1 of a slender rod at sqrt(E/rho) / 2L (Rayleigh,
    # The Theory of Sound, 1877, vol. 1 sec. 150; lateral inertia lowers it by a fraction of
    # (pi nu r / L)^2 / 2, under 0.1 % here).  It falls between bending modes 5 and 6; six bending
    # modes are still reported, none of them twice.
    length, thick = 0.30, 0.010
    m = elastic2d.profile_modes([0.0, length], [thick, thick], 0.025, E_AL, E_AL, G_AL, NU_AL, RHO_AL, modes=6)
    rod = math.sqrt(E_AL / RHO_AL) / (2 * length)
    assert m.longitudinal and m.longitudinal[0] == pytest.approx(rod, rel=0.003)
    assert len(m.frequencies) == 6 and m.frequencies[4] < rod < m.frequencies[5]
    exact = timoshenko_uniform(length, 0.025, thick, E_AL, G_AL, RHO_AL, NU_AL, 6)
    for a, b in zip(m.frequencies, exact, strict=True):
        assert abs(cents(a, b)) < 10.0


def test_width_does_not_change_the_frequencies():
    # Plane stress: the width multiplies stiffness and mass alike.
    a = elastic2d.profile_modes([0.0, 0.3], [0.02, 0.02], 0.03, E, E, G, NU, RHO, modes=2)
    b = elastic2d.profile_modes([0.0, 0.3], [0.02, 0.02], 0.07, E, E, G, NU, RHO, modes=2)
    assert a.frequencies == pytest.approx(b.frequencies, rel=1e-9)


@pytest.mark.parametrize("xs, hs", [([0.0], [0.02]), ([0.1, 0.3], [0.02, 0.02]), ([0.0, 0.3], [0.02, 0.0]),
                                    ([0.0, 0.2, 0.1], [0.02, 0.02, 0.02])])
def test_bad_stations_are_refused(xs, hs):
    with pytest.raises(elastic2d.ProfileError):
        elastic2d.profile_modes(xs, hs, 0.05, E, E, G, NU, RHO)


def test_undercut_bar_agrees_with_a_3d_solid_model():
    # No published finite-element or measured partials of an undercut bar with its full profile
    # and constants were found in the stored corpora, so the check is an independent model: the
    # 3-D elastic solid (tests/physics/solid3d.py: quadratic hexahedra, half the width), on the
    # music-room-sized arch, centre left at 6 mm of 24 mm.  With Poisson's ratio 0 the width
    # cannot bend anticlastically, so 3-D and plane stress describe the same body and must agree
    # to discretisation error (the 3-D mesh is coarse: it sits about 1 cent stiff).
    from tests.physics.solid3d import vertical_bending

    length, thick, depth = 0.433, 0.024, 0.018
    xs = np.linspace(0.0, length, 201)
    hs = undercut.arch_thickness(xs, length, thick, depth, 0.5, 2.0)
    e, rho = 21e9, 975.0
    solid = vertical_bending(xs, hs, 0.055, e, 0.0, rho, modes=3)
    plane = elastic2d.profile_modes(xs, hs, 0.055, e, e, e / 2, 0.0, rho, modes=3).frequencies
    for a, b in zip(plane, solid, strict=True):
        assert abs(cents(a, b)) < 3.0
    # the arch took f2/f1 from the uniform bar's 2.7 to about 5: both models see the same shape
    assert plane[1] / plane[0] == pytest.approx(solid[1] / solid[0], rel=0.002)

"""The 2-D plane-stress bar on a non-uniform (stepped) bar, against an exact beam solution and a 3-D solid.

The oracle (tests/physics/stepped_beam.py) solves a bar of piecewise-uniform thickness exactly
by transfer matrices of Timoshenko segments, the centroid jumping at each step; the 2-D model is
a finite-element mesh of the same side view.  A bar thinner in its middle third is a crude
undercut.
"""

import math
from functools import lru_cache

import numpy as np
import pytest

from cutplan.physics import elastic2d
from cutplan.physics.sections import shear_coefficient_cowper_rectangle
from tests.physics.stepped_beam import stepped_frequencies

# Aluminium 6061-T6: E 68.9 GPa, nu 0.33, rho 2700 kg/m3 (ASM Handbook vol. 2, 1990, from
# memory); G = E / 2(1 + nu) for an isotropic metal.
E, NU, RHO = 68.9e9, 0.33, 2700.0
G = E / (2 * (1 + NU))
LENGTH, ENDS, WIDTH = 0.6, 0.020, 0.03
RAMP = 0.005
"""Each step is a 5 mm ramp, one element of the 2-D mesh (120 along) and of the 3-D mesh below."""


def cents(a, b):
    return 1200 * math.log2(a / b)


def stations(middle):
    """(x, h) of the bar: the ends ENDS thick, the middle third ``middle`` thick."""
    third = LENGTH / 3
    xs = [0.0, third, third + RAMP, 2 * third - RAMP, 2 * third, LENGTH]
    return xs, [ENDS, ENDS, middle, middle, ENDS, ENDS]


def segments(middle, ramp_steps=3):
    """The same bar as uniform segments; each ramp as a staircase of ``ramp_steps``."""
    def ramp(a, b):
        return [(RAMP / ramp_steps, a + (b - a) * (k + 0.5) / ramp_steps) for k in range(ramp_steps)]
    third = LENGTH / 3
    return ([(third, ENDS)] + ramp(ENDS, middle) + [(third - 2 * RAMP, middle)] + ramp(middle, ENDS)
            + [(third, ENDS)])


@lru_cache(maxsize=4)
def beam(middle, nu=NU):
    kappa = shear_coefficient_cowper_rectangle(nu)
    return stepped_frequencies(segments(middle), WIDTH, E, E / (2 * (1 + nu)), RHO, kappa, modes=3)


@lru_cache(maxsize=4)
def plane(middle, nu=NU):
    xs, hs = stations(middle)
    return elastic2d.profile_modes(xs, hs, WIDTH, E, E, E / (2 * (1 + nu)), nu, RHO, modes=3,
                                   elements_along=120).frequencies


def test_the_oracle_gives_the_uniform_euler_bernoulli_roots():
    # Blevins, Formulas for Natural Frequency and Mode Shape, 1979, Table 8-1 (free-free beam):
    # beta_n L = 4.73004074, 7.85320462, 10.99560784.  A bar 1000 times as long as thick, cut
    # into three segments of equal thickness, with shear made stiff: rotary inertia is all that
    # is left of Timoshenko's theory, about 0.01 cent here.
    length, thick = 1.0, 0.001
    f = stepped_frequencies([(length / 3, thick)] * 3, 0.01, E, 1e6 * E, RHO, 1.0, modes=3)
    scale = math.sqrt(E * thick**2 / 12 / RHO) / (2 * math.pi * length**2)
    for got, beta in zip(f, (4.73004074, 7.85320462, 10.99560784), strict=True):
        assert abs(cents(got, beta**2 * scale)) < 0.02


def test_a_slender_bar_with_a_shallow_step_agrees_with_the_exact_stepped_beam_within_1_cent():
    # Oracle: the exact transfer-matrix solution of the stepped Timoshenko beam (Pestel and
    # Leckie, Matrix Methods in Elastomechanics, 1963; Naguleswaran, J. Sound Vib. 252 (2002)
    # 751 for the stepped Euler-Bernoulli beam), with Cowper's shear coefficient, J. Appl. Mech.
    # 33 (1966) 335.  L / t = 30; the middle third 1 mm thinner.  Measured when written: 2-D
    # minus beam -0.5, -0.3, +0.6 cents for modes 1-3 (the uniform bar: +0.1, +0.2, +0.5).
    for a, b in zip(plane(0.019), beam(0.019), strict=True):
        assert abs(cents(a, b)) < 1.0


def test_a_deep_step_is_softer_in_2d_than_plane_sections_allow():
    # The same bar with the middle third 6 mm thinner (30 %): near each step the stress in the
    # thick part's underside builds up over a length about its depth, which a beam's plane
    # sections cannot show, so the beam is too stiff (measured when written: 2-D minus beam
    # -11.1, -20.5, -4.6 cents for modes 1-3 on this mesh; the 2-D mesh twice as fine each way
    # moves them 0.8, 1.6 and 0.5 cents further down).  The 3-D test below confirms the 2-D value.
    for a, b in zip(plane(0.014)[:2], beam(0.014)[:2], strict=True):
        assert cents(a, b) < -3.0
    shallow = [abs(cents(a, b)) for a, b in zip(plane(0.019), beam(0.019), strict=True)]
    deep = [abs(cents(a, b)) for a, b in zip(plane(0.014), beam(0.014), strict=True)]
    assert deep[0] > shallow[0] and deep[1] > shallow[1]


def test_the_deep_step_in_3d_agrees_with_2d_within_2_cents():
    # Independent model: the 3-D elastic solid (tests/physics/solid3d.py, 27-node bricks, half
    # the width).  With Poisson's ratio 0 plane stress and 3-D describe the same body.  The 3-D
    # mesh is coarse (10 mm along, 5 mm ramps as single elements, 3 through, 1 across the
    # half-width): measured when written, 2-D minus 3-D -0.5, -1.1, -0.4 cents; with 7.5 mm
    # along and 5 through, -0.1, -0.2, -0.1 (the tolerance covers the coarse mesh's error).
    from tests.physics.solid3d import vertical_bending

    xs, hs = stations(0.014)
    third = LENGTH / 3
    edges = np.concatenate([np.linspace(0.0, third, 21), np.linspace(third + RAMP, 2 * third - RAMP, 20),
                            np.linspace(2 * third, LENGTH, 21)])
    solid = vertical_bending(xs, hs, WIDTH, E, 0.0, RHO, modes=3, along=edges, across=1, through=3)
    for a, b in zip(plane(0.014, nu=0.0), solid, strict=True):
        assert abs(cents(a, b)) < 2.0


@pytest.mark.parametrize("middle", [0.019, 0.014])
def test_the_step_lowers_mode_1_in_both_models(middle):
    # Physics, not a value: taking material off the middle third lowers mode 1 in both models
    # (Rayleigh's quotient: the middle carries most of mode 1's bending energy).
    uniform = beam(ENDS)[0]
    assert beam(middle)[0] < uniform and plane(middle)[0] < uniform

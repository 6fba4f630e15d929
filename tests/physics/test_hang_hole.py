"""Hang holes split a tube's bending mode: the perturbation estimate against a finite-element beam."""

import math

import numpy as np
import pytest

from cutplan.physics import beam_fe
from cutplan.physics.hang_hole import compliance_integrals, hang_hole_shifts, second_moments_left

INCH = 0.0254
OUTER, INNER = 1.0 * INCH, (1.0 - 2 * 0.065) * INCH  # 1 in x 0.065 in tube


def test_no_hole_leaves_the_section_whole():
    # I = pi (D^4 - d^4) / 64 for a tube (exact)
    i0 = math.pi * (OUTER**4 - INNER**4) / 64
    assert second_moments_left(OUTER, INNER, 0.0) == (i0, i0)


def test_thin_wall_limit_of_the_second_moment_removed():
    # thin wall (mean radius R, wall h): the strip |x| < c takes two arcs of half-angle
    # phi = asin(c / R); I = R^3 h int sin^2 over the arcs (exact for h -> 0):
    # in the hole's plane 2 R^3 h (phi + sin(2 phi) / 2), across it 2 R^3 h (phi - sin(2 phi) / 2)
    r, h, c = 0.05, 1e-5, 0.01
    i0 = math.pi * ((2 * r + h) ** 4 - (2 * r - h) ** 4) / 64
    phi = math.asin(c / r)
    in_plane, across = second_moments_left(2 * r + h, 2 * r - h, c)
    assert i0 - in_plane == pytest.approx(2 * r**3 * h * (phi + math.sin(2 * phi) / 2), rel=1e-4)
    assert i0 - across == pytest.approx(2 * r**3 * h * (phi - math.sin(2 * phi) / 2), rel=1e-4)


@pytest.mark.parametrize("hole_in", [0.125, 0.25])
def test_shifts_match_a_finite_element_beam_with_the_hole(hole_in):
    # Independent model: the Timoshenko finite-element beam (Reddy 2006, ch. 5) with EI(z) of the
    # drilled section along the hole, 1 in x 0.065 in 6063 aluminium (E 68.9 GPa, G 25.9 GPa,
    # 2700 kg/m^3; ASM typical) 504 mm long, hole at the mode-1 node 0.2242 L (Blevins 1979,
    # Table 8-1). First order in the hole's size: within 3 %.
    length, hole, xc = 0.504, hole_in * INCH, 0.2242 * 0.504
    e, g, rho = 68.9e9, 25.9e9, 2700.0
    area = math.pi * (OUTER**2 - INNER**2) / 4
    i0 = math.pi * (OUTER**4 - INNER**4) / 64

    def rigidity(k):
        def ei(x):
            x = np.asarray(x, dtype=float)
            z = x - xc
            out = np.full(x.shape, i0)
            for idx in zip(*np.nonzero(np.abs(z) < hole / 2), strict=True):
                out[idx] = second_moments_left(OUTER, INNER, math.sqrt((hole / 2) ** 2 - z[idx] ** 2))[k]
            return e * out
        return ei

    breaks = np.unique(np.concatenate([np.linspace(0, length, 61), xc + np.linspace(-hole / 2, hole / 2, 9)]))

    def f1(ei):
        return beam_fe.free_free_modes(length, ei, 0.53 * g * area, rho * area, rho * i0, modes=1,
                                       breaks=breaks, order=4, symmetric=False).frequencies[0]

    whole = f1(e * i0)
    for k, shift in enumerate(hang_hole_shifts(length, OUTER, INNER, hole, 0.2242)):
        fe_shift = f1(rigidity(k)) / whole - 1
        assert shift == pytest.approx(fe_shift, rel=3e-2)


def test_bending_across_the_hole_barely_changes():
    # the strip at the neutral axis: the across-plane loss is under 2 % of the in-plane one
    in_plane, across = compliance_integrals(OUTER, INNER, 0.25 * INCH)
    assert 0 < across < 0.02 * in_plane

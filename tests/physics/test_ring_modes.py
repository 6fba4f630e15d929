"""Ring (ovalling) modes of thin tubes, against an independent extensible-ring model."""

import numpy as np
import pytest

from cutplan.physics.ring_modes import ring_frequencies


def _extensible_ring(outer, inner, modulus, density, poisson, n):
    """Lower (flexural) frequency [Hz] of mode n of a ring that may also stretch: an independent
    model.  Radial w = A cos(n theta), tangential v = B sin(n theta); membrane strain
    (v' + w) / R and change of curvature (v' - w'') / R^2 (Soedel, Vibrations of Shells and
    Plates, 2004, ring equations, from memory) give a 2 x 2 stiffness against the mass of both
    motions.  Per unit length of tube, plane strain: E' = E / (1 - nu^2)."""
    h = (outer - inner) / 2
    r = (outer + inner) / 4
    e = modulus / (1 - poisson**2)
    ea, ei, mu = e * h, e * h**3 / 12, density * h
    k = np.array([[ea / r**2 + ei * n**4 / r**4, ea * n / r**2 + ei * n**3 / r**4],
                  [ea * n / r**2 + ei * n**3 / r**4, ea * n**2 / r**2 + ei * n**2 / r**4]])
    return np.sqrt(np.linalg.eigvalsh(k / mu)[0]) / (2 * np.pi)


@pytest.mark.parametrize(("outer_in", "wall_in", "tolerance"),
                         # h / R = 0.06, 0.06, 0.14 (thin) and 0.23 (schedule 40 PVC, thick: 1 %)
                         [(2.197, 0.065, 5e-3), (3.25, 0.100, 5e-3), (1.0, 0.065, 5e-3), (1.315, 0.133, 1e-2)])
def test_thin_ring_formula_matches_the_extensible_ring(outer_in, wall_in, tolerance):
    # the inextensional formula (Blevins 1979, ch. 12, from memory) is the thin limit of the
    # extensible ring above; the difference is of order (h / R)^2
    outer, inner = outer_in * 0.0254, (outer_in - 2 * wall_in) * 0.0254
    f = ring_frequencies(outer, inner, 68.9e9, 2700.0, 0.33, modes=3)
    for n, fn in zip((2, 3, 4), f, strict=True):
        assert fn == pytest.approx(_extensible_ring(outer, inner, 68.9e9, 2700.0, 0.33, n), rel=tolerance)


def test_mode_ratios_follow_n_n2_minus_1_over_root_n2_plus_1():
    # inextensional ring modes: f_n proportional to n (n^2 - 1) / sqrt(n^2 + 1) (Blevins 1979,
    # ch. 12; Soedel 2004; from memory): f3 / f2 = 24/sqrt(10) / (6/sqrt(5)) = 2.828
    f = ring_frequencies(0.05, 0.047, 200e9, 7850.0, 0.3, modes=2)
    assert f[1] / f[0] == pytest.approx(4 / np.sqrt(2), rel=1e-12)


def test_ovalling_of_two_inch_conduit_and_a_big_aluminium_tube():
    # ANSI C80.3 2 in EMT (OD 2.197 in, wall 0.065 in), steel E 200 GPa, 7850 kg/m^3, nu 0.3
    # (handbook values, from memory): the n = 2 mode near 1.5 kHz; 3-1/4 in x 0.100 in
    # aluminium (E 68.9 GPa, 2700 kg/m^3, nu 0.33; Aluminum Association typical): near 1 kHz.
    # Check values from the extensible-ring model above (independent), to 0.5 %.
    emt = ring_frequencies(2.197 * 0.0254, 2.067 * 0.0254, 200e9, 7850.0, 0.3, modes=1)[0]
    assert emt == pytest.approx(_extensible_ring(2.197 * 0.0254, 2.067 * 0.0254, 200e9, 7850.0, 0.3, 2), rel=5e-3)
    assert 1400 < emt < 1550
    big = ring_frequencies(3.25 * 0.0254, 3.05 * 0.0254, 68.9e9, 2700.0, 0.33, modes=1)[0]
    assert 1000 < big < 1100


def test_a_rod_has_no_ring_modes():
    with pytest.raises(ValueError):
        ring_frequencies(0.02, 0.0, 200e9, 7850.0, 0.3)

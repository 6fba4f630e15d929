"""A bar that is its own mirror image, solved as two half problems, against the whole body solved at once."""

import numpy as np
import pytest

from cutplan.physics import elastic2d, mirror_modes, undercut
from cutplan.physics.width_terms import WidthConstants

# Aluminium 6061-T6: E 68.9 GPa, nu 0.33, rho 2700 kg/m3 (ASM Handbook vol. 2, 1990, from
# memory); G = E / 2(1 + nu) for an isotropic metal.
E, NU, RHO = 68.9e9, 0.33, 2700.0
G = E / (2 * (1 + NU))


def solve(xs, hs, width, whole, monkeypatch, modes=4):
    elastic2d.forget_solves()
    if whole:  # the other method: no mirror found, so the whole body is solved at once
        monkeypatch.setattr(mirror_modes, "mirror_partners", lambda *a: None)
    try:
        return elastic2d.profile_modes(xs, hs, width, E, E, G, NU, RHO, modes=modes,
                                       width_constants=WidthConstants.isotropic(E, NU))
    finally:
        monkeypatch.undo()
        elastic2d.forget_solves()


@pytest.mark.parametrize("length, width, depth", [(0.42, 0.055, 0.016), (0.10, 0.055, 0.018)])
def test_the_halves_give_the_modes_and_nodes_of_the_whole_body(length, width, depth, monkeypatch):
    # A long bar (no other mode below the fourth bending mode) and a short wide one (nine
    # cross-width and lengthwise modes there, so a half asks again for more): the same mesh, so
    # the same modes to rounding, and the same modes sorted out as not bending.
    xs = np.linspace(0.0, length, 97)
    hs = undercut.arch_thickness(xs, length, 0.024, depth, 0.5, 2.0)
    halves = solve(xs, hs, width, False, monkeypatch)
    whole = solve(xs, hs, width, True, monkeypatch)
    assert len(halves.frequencies) == len(whole.frequencies) == 4
    np.testing.assert_allclose(halves.frequencies, whole.frequencies, rtol=1e-9)
    for a, b in zip(halves.nodes, whole.nodes, strict=True):
        np.testing.assert_allclose(a, b, rtol=0, atol=1e-9)
    top = whole.frequencies[-1]
    assert len([f for f in whole.longitudinal if f < top]) == (0 if length > 0.2 else 9)
    np.testing.assert_allclose([f for f in halves.longitudinal if f < top],
                               [f for f in whole.longitudinal if f < top], rtol=1e-9)


def test_a_bar_that_is_not_its_own_mirror_image_is_solved_whole(monkeypatch):
    # A profile cut deeper toward one end: no mirror pairs, so no halves; the same bar cut
    # evenly pairs each node with its mirror image.  The solver's own mesh is watched as it asks.
    real, asked = mirror_modes.mirror_partners, []

    def watched(straight, mapped, length, thickness):
        asked.append((mapped, length, real(straight, mapped, length, thickness)))
        return asked[-1][2]

    monkeypatch.setattr(mirror_modes, "mirror_partners", watched)
    xs = np.array([0.0, 0.1, 0.3])
    for hs in (np.array([0.02, 0.01, 0.02]), np.array([0.02, 0.02, 0.02])):
        elastic2d.forget_solves()
        elastic2d.profile_modes(xs, hs, 0.04, E, E, G, NU, RHO, modes=2, elements_along=12, elements_through=2,
                                width_constants=WidthConstants.isotropic(E, NU))
    elastic2d.forget_solves()
    assert asked[0][2] is None
    mapped, length, partner = asked[1]
    assert partner is not None and np.allclose(mapped[0] + mapped[0][partner], length, rtol=0, atol=1e-15)

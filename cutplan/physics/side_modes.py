r"""The other ways a bar rings: sideways bending and twisting, for uniform and arched bars.

A bar resting on its supports is struck on its face and tuned by its bending through the
thickness.  It can also bend sideways, in the plane of its width, and twist about its axis.
Sideways bending is the same shear-corrected free-free beam turned through 90 degrees: the
second moment of area about the other axis, t b^3 / 12 instead of b t^3 / 12 (the mass, shear
area and Cowper shear coefficient of the rectangle are the same).  For an arched bar the
remaining thickness h(x) replaces t along the arch.  Twisting uses :mod:`torsion`.

These beam models are good for uniform bars.  On an arched bar the section's centre line bends
and the thin middle warps: the beam models put twisting mode 1 a few hundred cents too low and
sideways mode 1 too high, so the planner takes an arched bar's modes from the 3-D model
(:func:`solid_side_modes`, :mod:`cutplan.physics.solid3d`).

References
----------
.. [1] Timoshenko, S. P., "On the correction for shear of the differential equation for
   transverse vibrations of prismatic bars", Philosophical Magazine 41 (1921) 744-746.
.. [2] Cowper, G. R., "The shear coefficient in Timoshenko's beam theory", J. Appl. Mech. 33
   (1966) 335-340 (kappa of a rectangle, either way up).
"""

from __future__ import annotations

import numpy as np

from cutplan.physics import beam_fe, solid3d, timoshenko, torsion, undercut
from cutplan.physics.remember import SharedMemo

__all__ = [
    "sideways_frequencies", "twisting_frequencies_bar", "twisting_frequencies_tube",
    "sideways_frequencies_arched", "twisting_frequencies_arched", "twisting_frequencies_bar_orthotropic",
    "solid_side_modes", "twisting_stiffening", "twisting_frequencies_bar_solid", "MEMO_SIZE",
    "remembered_side_modes", "remember_side_modes", "forget_side_modes"
]


def sideways_frequencies(length, width, thickness, modulus, shear_modulus, density, kappa, modes=3):
    """Sideways (in-plane) bending frequencies [Hz] of a uniform free-free bar.

    Parameters
    ----------
    length, width, thickness : float
        L, b (the struck face's width), t [m].
    modulus, shear_modulus : float
        E, G [Pa].
    density : float
        rho [kg/m^3].
    kappa : float
        Shear coefficient of the rectangle [-].
    modes : int
        How many modes [-].

    Examples
    --------
    A bar 25 mm wide and 10 mm thick bends sideways as one 10 mm wide and 25 mm thick bends on its face:

    >>> E, G = 69e9, 26e9
    >>> side = sideways_frequencies(0.3, 0.025, 0.010, E, G, 2700, 0.85, modes=1)
    >>> face = timoshenko.frequencies(0.3, E * 0.010 * 0.025**3 / 12, 2700 * 0.010 * 0.025,
    ...                               0.85 * G * 0.010 * 0.025, 2700 * 0.010 * 0.025**3 / 12, modes=1)
    >>> bool(abs(side[0] - face[0]) < 1e-9 * face[0])
    True
    """
    area = width * thickness
    second = thickness * width**3 / 12
    return timoshenko.frequencies(length, modulus * second, density * area, kappa * shear_modulus * area,
                                  density * second, modes=modes)


def twisting_frequencies_bar(length, width, thickness, shear_modulus, density, modes=3):
    """Twisting frequencies [Hz] of a uniform free-free rectangular bar (Saint-Venant).

    >>> f = twisting_frequencies_bar(0.4, 0.05, 0.02, 1.2e9, 700.0, modes=2)
    >>> bool(abs(f[1] - 2 * f[0]) < 1e-9 * f[0])
    True
    """
    gj = shear_modulus * torsion.torsion_constant_rectangle(width, thickness)
    rho_ip = density * torsion.polar_moment_rectangle(width, thickness)
    return torsion.free_free_twisting_frequency(np.arange(1, modes + 1), length, gj, rho_ip)


def twisting_frequencies_tube(length, outer, inner, shear_modulus, density, modes=3):
    """Twisting frequencies [Hz] of a free-free round tube or rod: n / 2L sqrt(G / rho)."""
    gj = shear_modulus * torsion.torsion_constant_tube(outer, inner)
    rho_ip = density * torsion.polar_moment_tube(outer, inner)
    return torsion.free_free_twisting_frequency(np.arange(1, modes + 1), length, gj, rho_ip)


def _thickness(length, thickness, depth, arch_fraction, exponent):
    def h(x):
        return undercut.arch_thickness(x, length, thickness, depth, arch_fraction, exponent)

    return h


def _breaks(length, arch_fraction, per_part=8):
    """Element edges at the arch edges, so the kink in the profile falls on a boundary."""
    a = (1 - arch_fraction) * length / 2
    left = np.concatenate([np.linspace(0.0, a, per_part + 1), np.linspace(a, length / 2, 2 * per_part + 1)[1:]])
    return np.concatenate([left, (length - left[::-1])[1:]])


def sideways_frequencies_arched(length, width, thickness, depth, arch_fraction, exponent, modulus, shear_modulus,
                                density, kappa, modes=3):
    """Sideways bending frequencies [Hz] of an arched (undercut) bar, non-uniform finite elements.

    The section at x is the rectangle b x h(x) turned through 90 degrees: EI = E h b^3 / 12,
    kappa G A = kappa G b h, mu = rho b h, rho I = rho h b^3 / 12.  Parameters as for
    :func:`cutplan.physics.undercut.bar_modes`.
    """
    h = _thickness(length, thickness, depth, arch_fraction, exponent)
    return beam_fe.free_free_modes(
        length,
        lambda x: modulus * h(x) * width**3 / 12,
        lambda x: kappa * shear_modulus * width * h(x),
        lambda x: density * width * h(x),
        lambda x: density * h(x) * width**3 / 12,
        modes=modes, order=3, breaks=_breaks(length, max(arch_fraction, 1e-6)),
    ).frequencies


def twisting_frequencies_arched(length, width, thickness, depth, arch_fraction, exponent, shear_modulus, density,
                                modes=3):
    """Twisting frequencies [Hz] of an arched bar: J and I_p of the rectangle b x h(x) along it."""
    h = _thickness(length, thickness, depth, arch_fraction, exponent)

    def gj(x):
        return shear_modulus * torsion.torsion_constant_rectangle(width, h(x), terms=8)

    def rho_ip(x):
        hx = h(x)
        return density * width * hx * (width**2 + hx**2) / 12

    return torsion.twisting_frequencies(length, gj, rho_ip, modes=modes)


def twisting_frequencies_bar_orthotropic(length, width, thickness, g_width, g_thickness, density, modes=3):
    """Twisting frequencies [Hz] of a uniform free-free orthotropic rectangular bar (Saint-Venant),
    G_xy of the length-width plane and G_xz of the length-thickness plane.

    >>> iso = twisting_frequencies_bar(0.4, 0.05, 0.02, 1.2e9, 700.0, modes=1)
    >>> ortho = twisting_frequencies_bar_orthotropic(0.4, 0.05, 0.02, 1.2e9, 1.2e9, 700.0, modes=1)
    >>> bool(abs(iso[0] - ortho[0]) < 1e-9 * iso[0])
    True
    """
    gj = torsion.orthotropic_rectangle_rigidity(width, thickness, g_width, g_thickness)
    rho_ip = density * torsion.polar_moment_rectangle(width, thickness)
    return torsion.free_free_twisting_frequency(np.arange(1, modes + 1), length, gj, rho_ip)


MEMO_SIZE = 512
"""3-D solves each process remembers (:func:`solid_side_modes` and :func:`twisting_stiffening`
together), the least recently used dropped first."""

_MEMO = SharedMemo(MEMO_SIZE)


def forget_side_modes():
    """Empty this process's memo of 3-D solves (as a fresh process has it)."""
    _MEMO.clear()


def remembered_side_modes():
    """A copy of the 3-D solves this process remembers ({key: value}; the values are frozen), to
    hand to another process planning the same designs (see :func:`remember_side_modes`)."""
    return _MEMO.copy()


def remember_side_modes(solves):
    """Take 3-D solves made by another process (from :func:`remembered_side_modes`) into this one's
    memo; a solve it already has is kept, and the oldest drop out past :data:`MEMO_SIZE`.

    The values are the very answers the other process computed, so a plan here is bit for bit
    the plan it would have made by solving.

    >>> kept = remembered_side_modes(); remember_side_modes(kept); remembered_side_modes() == kept
    True
    """
    _MEMO.take(solves)


def _number(value):
    """A float's bits as a memo-key part (bit for bit: -0.0 is not 0.0)."""
    return np.float64(value).tobytes()


def solid_side_modes(length, width, thickness, depth, arch_fraction, exponent, constants, density, modes=6):
    """Sideways and twisting frequencies [Hz] of an arched bar from the 3-D model
    (:func:`cutplan.physics.solid3d.solve_side_modes`), remembered: the same bar is solved once per
    process (and, handed on by :func:`remember_side_modes`, once for several).  ``constants`` is a
    :class:`cutplan.physics.solid3d.Orthotropic`."""
    key = ("solid", *map(_number, (length, width, thickness, depth, arch_fraction, exponent)), constants,
           _number(density), int(modes))

    def solve():
        h = _thickness(length, thickness, depth, arch_fraction, exponent)
        return solid3d.solve_side_modes(length, width, thickness, h, constants, density, arch_fraction, modes=modes)

    return _MEMO.get(key, solve)


def twisting_stiffening(width, thickness, constants, density):
    """c [m^2] in f_n^2 = f_n,SV^2 (1 + c k_n^2), k_n = n pi / L: how much a uniform bar of this
    section twists above Saint-Venant, fitted once per section to the 3-D model of a bar 8 times
    as long as its larger side (modes 1-3, least squares).

    Twisting of a wood bar is stiffened by the restrained warping of its section, the more so the
    softer its shear against E along the grain (flat-sawn maple: about 15 cents on mode 1 and 125
    cents on mode 3 at 400 x 50 x 22 mm); the k^2 law is that of warping torsion (Vlasov, V. Z.,
    Thin-Walled Elastic Beams, 2nd ed., 1961), its size here comes from the 3-D model.  Remembered
    as :func:`solid_side_modes` is: one 3-D solve per section and material.
    """
    key = ("stiffening", _number(width), _number(thickness), constants, _number(density))
    return _MEMO.get(key, lambda: _stiffening(width, thickness, constants, density))


def _stiffening(width, thickness, constants, density):
    """:func:`twisting_stiffening`, solved."""
    length = 8 * max(width, thickness)
    modes = solid3d.solve_side_modes(length, width, thickness, lambda x: thickness + 0 * x, constants, density,
                                     0.0, modes=3)
    sv = twisting_frequencies_bar_orthotropic(length, width, thickness, constants.g_xy, constants.g_xz, density,
                                              modes=len(modes.twisting))
    k2 = (np.arange(1, len(sv) + 1) * np.pi / length) ** 2
    y = (np.asarray(modes.twisting) / sv) ** 2 - 1
    return float(max(np.sum(k2 * y) / np.sum(k2 * k2), 0.0))


def twisting_frequencies_bar_solid(length, width, thickness, constants, density, modes=3):
    """Twisting frequencies [Hz] of a uniform orthotropic bar: Saint-Venant with the warping
    stiffening of :func:`twisting_stiffening` (checked against the 3-D model in the tests)."""
    sv = twisting_frequencies_bar_orthotropic(length, width, thickness, constants.g_xy, constants.g_xz, density,
                                              modes)
    c = twisting_stiffening(width, thickness, constants, density)
    k2 = (np.arange(1, modes + 1) * np.pi / length) ** 2
    return sv * np.sqrt(1 + c * k2)

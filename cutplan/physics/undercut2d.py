r"""Undercut bars designed on the 2-D elastic body.

The arch has the same three unknowns as in :mod:`undercut` (blank length L, centre depth d as a
fraction of the most allowed, shape exponent p when a third partial is tuned), but the partials
are those of the plane-stress body of :mod:`elastic2d`, solved on the very stations that are
printed.  The search starts from the fast 1-D beam design (its targets shifted by the
neighbouring bar's 2-D against 1-D offset, when one is known), and then takes Broyden steps on
the 2-D residuals, with the 1-D Jacobian as the first estimate (output space mapping: the 1-D
model supplies the directions, the 2-D solve the values).  It stops when mode 1 and every tuned
ratio are within :data:`TOLERANCE_CENTS` of the targets in the 2-D model.

References
----------
.. [1] Bandler, J. W. et al., "Space mapping: the state of the art", IEEE Transactions on
   Microwave Theory and Techniques 52 (2004) 337-361 (output space mapping with Broyden
   updates; from memory for the section).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from cutplan.physics import elastic2d, undercut

__all__ = [
    "TOLERANCE_CENTS", "MAX_SOLVES", "ARCH_STATIONS", "END_STATIONS", "PlaneConstants", "arch_stations",
    "Undercut2d", "design_undercut_2d", "trimmed_profile"
]

TOLERANCE_CENTS = 0.02
"""The 2-D search stops when mode 1 and every tuned ratio are this close [cents]."""
MAX_SOLVES = 16
"""Most 2-D solves one bar may take [-] (a work bound; about 2-5 are used)."""
ARCH_STATIONS = 48
"""Stations on each half of the arch [-] (piecewise linear between them: well under 0.01 mm
from the smooth curve for the bars of the examples)."""
END_STATIONS = 4
"""Stations on each solid end [-]."""


@dataclass(frozen=True)
class PlaneConstants:
    """Elastic constants of the thickness plane: E along, E across, G, Poisson [Pa, Pa, Pa, -], rho
    [kg/m^3]."""

    modulus_along: float
    modulus_across: float
    shear_modulus: float
    poisson: float
    density: float

    def modes(self, xs, hs, width, modes=4):
        return elastic2d.profile_modes(xs, hs, width, self.modulus_along, self.modulus_across, self.shear_modulus,
                                       self.poisson, self.density, modes=modes)


def arch_stations(length, thickness, depth, arch_fraction, exponent):
    """(x, h) stations [m] of the whole bar, end A to end B: the ends, the arch edges, and
    :data:`ARCH_STATIONS` points on each half of the arch."""
    a = (1.0 - arch_fraction) * length / 2
    ends = np.linspace(0.0, a, END_STATIONS + 1)
    half = np.linspace(a, length / 2, ARCH_STATIONS + 1)
    left = np.concatenate([ends, half[1:]])
    xs = np.concatenate([left, length - left[-2::-1]])
    hs = undercut.arch_thickness(xs, length, thickness, depth, arch_fraction, exponent)
    return xs, hs


@dataclass(frozen=True)
class Undercut2d(undercut.Undercut):
    """A solved arch in the 2-D model: the 1-D record's fields (the frequencies and nodes those of
    the 2-D solve, ``jacobian`` the 1-D start's), plus the 2-D minus 1-D residuals at the solution
    (``offset_cents``: the next bar's starting shift)."""

    offset_cents: tuple = ()

    def outline(self):
        """(x [m], remaining thickness [m]) along the whole bar, end A to end B: the profile that
        was solved."""
        xs, hs = arch_stations(self.length, self.thickness, self.depth, self.arch_fraction, self.exponent)
        return tuple((float(x), float(h)) for x, h in zip(xs, hs, strict=True))


def design_undercut_2d(target, ratios, width, thickness, plane, kappa, min_thickness, arch_fraction=0.5,
                       guess=None, jacobian=None, offset=None):
    """Blank length and arch whose 2-D modes sound ``target`` with partials at ``ratios``.

    Parameters
    ----------
    target : float
        Mode-1 frequency [Hz].
    ratios : sequence of float
        (f2/f1,) or (f2/f1, f3/f1) [-].
    width, thickness : float
        Blank b and t [m].
    plane : PlaneConstants
        Constants of the thickness plane.
    kappa : float
        Shear coefficient for the 1-D starting design [-].
    min_thickness : float
        Thinnest the centre may be left [m].
    arch_fraction : float
        Arch width as a fraction of L [-].
    guess, jacobian :
        The neighbouring bar's 1-D start values and Jacobian (see :func:`undercut.design_undercut`).
    offset : tuple of float, optional
        The neighbouring bar's 2-D minus 1-D residuals [cents]: the 1-D design aims that much off.

    Raises
    ------
    undercut.UndercutError
        When no arch within the limits reaches the tuning in the 2-D model.
    """
    ratios = tuple(ratios)
    three = len(ratios) >= 2
    goal = np.zeros(1 + len(ratios)) if offset is None or len(offset) != 1 + len(ratios) else np.array(offset)
    shifted = [target * 2 ** (-goal[0] / 1200)] + [r * 2 ** (-o / 1200) for r, o in zip(ratios, goal[1:], strict=True)]
    def one_d(aim, ratios_aimed):
        return undercut.design_undercut(aim, ratios_aimed, width, thickness, plane.modulus_along,
                                        plane.shear_modulus, plane.density, kappa, min_thickness, arch_fraction,
                                        guess=guess, jacobian=jacobian)

    try:
        start = one_d(shifted[0], shifted[1:])
    except undercut.UndercutError:
        if not np.any(goal):
            raise
        # the neighbour's 2-D offset aims the 1-D start where no 1-D arch reaches: start from the
        # asked-for tuning itself (an error then names the builder's ratios, not the aimed-off ones)
        goal = np.zeros_like(goal)
        start = one_d(target, ratios)
    max_depth = thickness - min_thickness
    lower = np.array([-np.inf, 0.0] + ([1.0] if three else []))
    upper = np.array([np.inf, 1.0] + ([10.0] if three else []))
    v = np.array([math.log(start.length), start.depth / max_depth] + ([start.exponent] if three else []))
    jac = np.array(start.jacobian, dtype=float)
    count = [0]

    def evaluate(v):
        count[0] += 1
        length, depth = math.exp(v[0]), v[1] * max_depth
        shape = v[2] if three else start.exponent
        xs, hs = arch_stations(length, thickness, depth, arch_fraction, shape)
        m = plane.modes(xs, hs, width, modes=4)
        f = m.frequencies
        res = [1200 * math.log2(f[0] / target)] + [1200 * math.log2(f[k + 1] / f[0] / r) for k, r in enumerate(ratios)]
        return np.array(res), m

    r, modes = evaluate(v)
    one_d = np.array([start.fundamental_residual_cents, *start.ratio_residuals_cents]) - goal
    offset_now = r - one_d
    best = (np.max(np.abs(r)), v, r, modes)
    while np.max(np.abs(r)) >= TOLERANCE_CENTS and count[0] < MAX_SOLVES:
        step = undercut.bounded_step(jac, r, v, lower, upper)
        if not np.any(step):
            break  # pinned at a bound
        v_new = np.clip(v + step, lower, upper)
        r_new, modes_new = evaluate(v_new)
        taken = v_new - v
        jac = jac + np.outer(r_new - r - jac @ taken, taken) / float(taken @ taken)
        v, r, modes = v_new, r_new, modes_new
        if np.max(np.abs(r)) < best[0]:
            best = (np.max(np.abs(r)), v, r, modes)
    _, v, r, modes = best
    length, depth = math.exp(v[0]), v[1] * max_depth
    shape = v[2] if three else start.exponent
    if abs(r[0]) > 0.5 or any(abs(x) > 2.0 for x in r[1:]):
        raise undercut.UndercutError(
            f"no arch of width {arch_fraction:g} x L reaches {':'.join(f'{x:g}' for x in (1,) + ratios)} in the "
            f"2-D model (best leaves {(thickness - depth) * 1000:.1f} mm at the centre, min "
            f"{min_thickness * 1000:.1f} mm, and misses by {max(abs(x) for x in r):.1f} cents); try another arch "
            "width, a thicker blank or a lower min_thickness")
    return Undercut2d(length=length, depth=depth, arch_fraction=arch_fraction, exponent=shape, thickness=thickness,
                      frequencies=tuple(float(f) for f in modes.frequencies), nodes=tuple(modes.nodes[0]),
                      ratio_residuals_cents=tuple(float(x) for x in r[1:]), fundamental_residual_cents=float(r[0]),
                      offset_cents=tuple(float(x) for x in offset_now), jacobian=start.jacobian,
                      solves=count[0])


def trimmed_profile(stations, length):
    """The stations of a bar cut to ``length`` [m] by taking the same amount off each end, the
    arch left where it is (a longer ``length`` adds blank at the thickness of the ends)."""
    xs = np.array([x for x, _ in stations])
    hs = np.array([h for _, h in stations])
    trim = (xs[-1] - length) / 2
    if trim >= 0:
        inner = xs[(xs > trim) & (xs < xs[-1] - trim)]
        new_x = np.concatenate([[trim], inner, [xs[-1] - trim]])
        return new_x - trim, np.interp(new_x, xs, hs)
    return np.concatenate([[0.0], xs - trim, [length]]), np.concatenate([[hs[0]], hs, [hs[-1]]])

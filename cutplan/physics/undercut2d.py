r"""Undercut bars designed on the 2-D elastic body, the bar's width resolved.

The arch has the same three unknowns as in :mod:`undercut` (blank length L, centre depth d as a
fraction of the most allowed, shape exponent p when a third partial is tuned), but the partials
are those of the 2-D body of :mod:`elastic2d`, solved on the very stations that are printed.  The
body that designs is the width-resolved one (:mod:`cutplan.physics.width_terms`: a 3-D body
within about 1 cent; plane stress is 5 (wood) to 19 (aluminium) cents low on a deep arch), and it
costs about six plane-stress solves, so the search runs in two layers of output space mapping:

1. the fast 1-D beam design starts the search (its targets shifted by the neighbouring bar's
   plane-stress against 1-D offset, when one is known); Broyden steps on the plane-stress
   residuals, with the 1-D Jacobian as the first estimate, bring the plane-stress body to its
   aims within :data:`TOLERANCE_CENTS`;
2. the width-resolved body is solved at that profile; the plane-stress aims are shifted by what
   it still misses (at first by the neighbouring bar's width-resolved against plane-stress
   offset), and step 1 is redone from where it stopped, until the width-resolved body hits mode 1
   and every tuned ratio within :data:`WIDTH_TOLERANCE_CENTS` (at most
   :data:`MAX_WIDTH_SOLVES` width-resolved solves; the best one is kept).

References
----------
.. [1] Bandler, J. W. et al., "Space mapping: the state of the art", IEEE Transactions on
   Microwave Theory and Techniques 52 (2004) 337-361 (output space mapping with Broyden
   updates; from memory for the section).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from cutplan.physics import elastic2d, undercut
from cutplan.physics.width_terms import WidthConstants

__all__ = [
    "TOLERANCE_CENTS", "MAX_SOLVES", "CROSS_WIDTH_BAND", "WIDTH_TOLERANCE_CENTS", "MAX_WIDTH_SOLVES", "ARCH_STATIONS", "END_STATIONS",
    "PlaneConstants", "arch_stations", "SolvedArch2d", "design_undercut_2d", "trimmed_profile"
]

TOLERANCE_CENTS = 0.02
"""The plane-stress search stops when mode 1 and every tuned ratio are this close to its aims [cents]."""
MAX_SOLVES = 16
"""Most plane-stress solves one round of the search may take [-] (a work bound; about 1-5 are used)."""
WIDTH_TOLERANCE_CENTS = 0.1
"""The design is done when the width-resolved body's mode 1 and every tuned ratio are this close
to the targets [cents]."""
MAX_WIDTH_SOLVES = 4
"""Most width-resolved solves one bar may take [-] (a work bound; 1-2 are used)."""
CROSS_WIDTH_BAND = 0.25
"""A mode that is not lengthwise bending this close to the second partial (as a fraction of it)
is named as what keeps a refused bar off its ratio [-]."""
ARCH_STATIONS = 48
"""Stations on each half of the arch [-] (piecewise linear between them: well under 0.01 mm
from the smooth curve for the bars of the examples)."""
END_STATIONS = 4
"""Stations on each solid end [-]."""


@dataclass(frozen=True)
class PlaneConstants:
    """Elastic constants of the thickness plane: E along, E across, G, Poisson [Pa, Pa, Pa, -], rho
    [kg/m^3]; and ``width``, the constants of the width axis (:class:`WidthConstants`): given,
    :meth:`modes` resolves the width, else it is plane stress."""

    modulus_along: float
    modulus_across: float
    shear_modulus: float
    poisson: float
    density: float
    width: WidthConstants | None = None

    def modes(self, xs, hs, width, modes=4):
        return elastic2d.profile_modes(xs, hs, width, self.modulus_along, self.modulus_across, self.shear_modulus,
                                       self.poisson, self.density, modes=modes, width_constants=self.width)

    def plane_stress(self):
        """The same constants without the width axis: the fast plane-stress body."""
        return replace(self, width=None)


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
class SolvedArch2d(undercut.SolvedArch):
    """A solved arch in the 2-D model: the 1-D record's fields (the frequencies, nodes and
    residuals those of the designing body's solve, ``jacobian`` the 1-D start's, ``solves`` the
    plane-stress solves), plus the plane-stress minus 1-D residuals (``offset_cents``) and the
    width-resolved minus plane-stress residuals (``width_offset_cents``) at the solution: the
    next bar's starting shifts; ``width_solves`` the width-resolved solves taken."""

    offset_cents: tuple = ()
    width_offset_cents: tuple = ()
    width_solves: int = 0

    def outline(self):
        """(x [m], remaining thickness [m]) along the whole bar, end A to end B: the profile that
        was solved."""
        xs, hs = arch_stations(self.length, self.thickness, self.depth, self.arch_fraction, self.exponent)
        return tuple((float(x), float(h)) for x, h in zip(xs, hs, strict=True))


def design_undercut_2d(target, ratios, width, thickness, plane, kappa, min_thickness, arch_fraction=0.5,
                       guess=None, jacobian=None, offset=None, width_offset=None):
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
        Constants of the thickness plane; with ``plane.width`` the width-resolved body designs,
        without it plane stress.
    kappa : float
        Shear coefficient for the 1-D starting design [-].
    min_thickness : float
        Thinnest the centre may be left [m].
    arch_fraction : float
        Arch width as a fraction of L [-].
    guess, jacobian :
        The neighbouring bar's 1-D start values and Jacobian (see :func:`undercut.design_undercut`).
    offset : tuple of float, optional
        The neighbouring bar's plane-stress minus 1-D residuals [cents]: the 1-D design aims that
        much off.
    width_offset : tuple of float, optional
        The neighbouring bar's width-resolved minus plane-stress residuals [cents]: the
        plane-stress search aims that much off from the start.

    Raises
    ------
    undercut.UndercutError
        When no arch within the limits reaches the tuning in the 2-D model.
    """
    ratios = tuple(ratios)
    three = len(ratios) >= 2
    size = 1 + len(ratios)
    coarse = plane.plane_stress()

    def vector(value):
        return np.zeros(size) if value is None or len(value) != size else np.array(value, dtype=float)

    offset, aim = vector(offset), -vector(width_offset) if plane.width is not None else np.zeros(size)

    def one_d(goal):
        shifted = [target * 2 ** (-goal[0] / 1200)] + [r * 2 ** (-o / 1200) for r, o in zip(ratios, goal[1:],
                                                                                         strict=True)]
        return undercut.design_undercut(shifted[0], shifted[1:], width, thickness, coarse.modulus_along,
                                        coarse.shear_modulus, coarse.density, kappa, min_thickness, arch_fraction,
                                        guess=guess, jacobian=jacobian)

    goal = offset - aim  # the 1-D start aims where the plane-stress body then sounds ``aim``
    try:
        start = one_d(goal)
    except undercut.UndercutError:
        if not np.any(goal):
            raise
        # the neighbours' offsets aim the 1-D start where no 1-D arch reaches: start from the
        # asked-for tuning itself (an error then names the builder's ratios, not the aimed-off ones)
        goal, aim = np.zeros(size), np.zeros(size)
        start = one_d(goal)
    max_depth = thickness - min_thickness
    bounds = (np.array([-np.inf, 0.0] + ([1.0] if three else [])), np.array([np.inf, 1.0] + ([10.0] if three else [])))
    v = np.array([math.log(start.length), start.depth / max_depth] + ([start.exponent] if three else []))
    jac = np.array(start.jacobian, dtype=float)
    count = [0]

    def profile(v):
        return arch_stations(math.exp(v[0]), thickness, v[1] * max_depth, arch_fraction,
                             v[2] if three else start.exponent)

    def residuals(m):
        f = m.frequencies
        return np.array([1200 * math.log2(f[0] / target)]
                        + [1200 * math.log2(f[k + 1] / f[0] / r) for k, r in enumerate(ratios)])

    # the plane-stress body only steers when the width-resolved one designs: it is asked for the
    # partials that are tuned (a short bar then need not hunt for a fourth bending mode among its
    # cross-width ones); designing alone, it gives the four partials the plan shows
    steering = size if plane.width is not None else 4

    def evaluate(v):
        count[0] += 1
        m = coarse.modes(*profile(v), width, modes=steering)
        return residuals(m), m

    r, modes = evaluate(v)
    start_residuals = np.array([start.fundamental_residual_cents, *start.ratio_residuals_cents]) - goal
    offset_now = r - start_residuals
    v, r, modes, jac = _search(evaluate, v, r, modes, jac, aim, bounds, count)
    best = (np.max(np.abs(r)), v, r, modes, np.zeros(size))
    width_solves = 0
    if plane.width is not None:
        best = (math.inf,) + best[1:]
        while width_solves < MAX_WIDTH_SOLVES:
            width_solves += 1
            fine = plane.modes(*profile(v), width, modes=4)
            r_fine = residuals(fine)
            if np.max(np.abs(r_fine)) < best[0]:
                best = (np.max(np.abs(r_fine)), v, r_fine, fine, r_fine - r)
            if np.max(np.abs(r_fine)) < WIDTH_TOLERANCE_CENTS or width_solves == MAX_WIDTH_SOLVES:
                break
            aim = aim - r_fine  # what the width-resolved body misses, the plane-stress body aims off
            v, r, modes, jac = _search(evaluate, v, r, modes, jac, aim, bounds, count)
    _, v, r, modes, width_offset_now = best
    length, depth = math.exp(v[0]), v[1] * max_depth
    shape = v[2] if three else start.exponent
    if abs(r[0]) > 0.5 or any(abs(x) > 2.0 for x in r[1:]):
        tuning = ':'.join(f'{x:g}' for x in (1,) + ratios)
        missed = (f"best leaves {{left}} at the centre, min {{least}}, "
                  f"and misses by {max(abs(x) for x in r):.1f} cents")
        lengths = {"left": thickness - depth, "least": min_thickness}
        across = _cross_width_mode(modes, r) if plane.width is not None else None
        if across is not None:
            raise undercut.UndercutError(
                f"the bar also bends across its {{width}} width at {across:.0f} Hz, close to its second "
                f"partial ({modes.frequencies[1]:.0f} Hz), which pulls that partial off {tuning} ({missed}); make "
                "the top bars narrower, or tune only the fundamental (or a lower ratio) there", width=width, **lengths)
        raise undercut.UndercutError(
            f"no arch of width {arch_fraction:g} x L reaches {tuning} in the 2-D model ({missed}); try another arch "
            "width, a thicker blank or a lower min_thickness", **lengths)
    return SolvedArch2d(length=length, depth=depth, arch_fraction=arch_fraction, exponent=shape, thickness=thickness,
                      frequencies=tuple(float(f) for f in modes.frequencies), nodes=tuple(modes.nodes[0]),
                      ratio_residuals_cents=tuple(float(x) for x in r[1:]), fundamental_residual_cents=float(r[0]),
                      offset_cents=tuple(float(x) for x in offset_now), jacobian=start.jacobian,
                      solves=count[0], width_offset_cents=tuple(float(x) for x in width_offset_now),
                      width_solves=width_solves)


def _cross_width_mode(modes, r):
    """The frequency [Hz] of a mode that is not a lengthwise bending mode (one that bends the
    section across the width) within :data:`CROSS_WIDTH_BAND` of the second partial, when the
    tuned ratios are what the design misses; else None."""
    if len(modes.frequencies) < 2 or not any(abs(x) > 2.0 for x in r[1:]):
        return None
    f2 = modes.frequencies[1]
    near = [f for f in modes.longitudinal if abs(math.log(f / f2)) < math.log(1 + CROSS_WIDTH_BAND)]
    return min(near, key=lambda f: abs(math.log(f / f2))) if near else None


def _search(evaluate, v, r, modes, jac, aim, bounds, count):
    """Broyden steps until the residuals ``r`` are within :data:`TOLERANCE_CENTS` of ``aim`` (or
    :data:`MAX_SOLVES` more solves): (v, r, modes, Jacobian), the best point found."""
    lower, upper = bounds
    limit = count[0] + MAX_SOLVES
    best = (np.max(np.abs(r - aim)), v, r, modes)
    while np.max(np.abs(r - aim)) >= TOLERANCE_CENTS and count[0] < limit:
        step = undercut.bounded_step(jac, r - aim, v, lower, upper)
        if not np.any(step):
            break  # pinned at a bound
        v_new = np.clip(v + step, lower, upper)
        r_new, modes_new = evaluate(v_new)
        taken = v_new - v
        jac = jac + np.outer(r_new - r - jac @ taken, taken) / float(taken @ taken)
        v, r, modes = v_new, r_new, modes_new
        if np.max(np.abs(r - aim)) < best[0]:
            best = (np.max(np.abs(r - aim)), v, r, modes)
    return best[1], best[2], best[3], jac


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

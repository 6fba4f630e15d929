r"""A hang hole through both walls of a tube: the bending mode splits in two.

A hole drilled across a tube along a diameter removes wall where it matters for bending in the
plane that holds the hole's axis (the wall at the extreme fibres) and almost nothing for bending
across it (the wall at the neutral axis).  So the one bending mode of a round tube becomes two,
a little apart, and the note beats at their difference.

Beam estimate: over the hole the second moment drops from I0 to I(z) (z along the tube from the
hole's centre).  The moment is continuous through so short a soft stretch, so to first order
(Rayleigh's quotient written with the compliance M^2 / EI)

.. math:: \frac{\Delta f}{f} = -\frac{1}{2}\,\frac{\phi''(\xi_h)^2}{\beta^4}\,
          \frac{1}{L}\int \left(\frac{I_0}{I(z)} - 1\right) dz

with :math:`\phi` the free-free mode shape normalised to :math:`\int_0^1 \phi^2 d\xi = 1`
(Blevins 1979, Table 8-1), :math:`\xi_h` the hole's place as a fraction of the length L, and
:math:`\int_0^1 \phi''^2 d\xi = \beta^4`.  Mass taken out at a node moves nothing to first order.
Stress concentration round the hole is left out, so this is an estimate.

References
----------
.. [1] Blevins, R. D., Formulas for Natural Frequency and Mode Shape, 1979, Table 8-1 (free-free
   beam mode shapes; from memory for the table number).
.. [2] Rayleigh's quotient for a local change of stiffness: e.g. Meirovitch, L., Elements of
   Vibration Analysis, 2nd ed., McGraw-Hill, 1986, ch. 7 (from memory).
"""

from __future__ import annotations

import functools
import math

import numpy as np

from cutplan.physics import beam

__all__ = ["second_moments_left", "compliance_integrals", "hang_hole_shifts"]

_GAUSS = np.polynomial.legendre.leggauss(48)


def _strip(lo, hi, f):
    """Integral of f(x) over [lo, hi] by 48-point Gauss-Legendre quadrature."""
    x, w = _GAUSS
    mid, half = (hi + lo) / 2, (hi - lo) / 2
    return float(np.sum(w * f(mid + half * x)) * half)


def second_moments_left(outer, inner, half_chord):
    """(I in the hole's plane, I across it) [m^4] of a tube section with the strip |x| < c cut
    away by a hole along y (c = ``half_chord`` [m], c < inner radius).

    In the hole's plane (about the x axis) the strip takes wall at the top and bottom, where y is
    largest; across it (about the y axis) it takes wall at the neutral axis.
    """
    ro, ri = outer / 2, inner / 2
    i0 = math.pi * (outer**4 - inner**4) / 64
    if half_chord <= 0:
        return i0, i0

    def about_x(x):
        return 2.0 / 3.0 * ((ro * ro - x * x) ** 1.5 - (ri * ri - x * x) ** 1.5)

    def about_y(x):
        return 2.0 * x * x * (np.sqrt(ro * ro - x * x) - np.sqrt(ri * ri - x * x))

    return i0 - _strip(-half_chord, half_chord, about_x), i0 - _strip(-half_chord, half_chord, about_y)


@functools.lru_cache(maxsize=4096)
def compliance_integrals(outer, inner, hole):
    """(int (I0 / I - 1) dz in the hole's plane, the same across it) [m] over a round hole of
    diameter ``hole`` [m] drilled through both walls (the chord at z is 2 sqrt((d/2)^2 - z^2)).

    The same quadrature as :func:`second_moments_left`, for all stations along the hole at once.
    Kept per (outer, inner, hole): a set's pieces share one section, and the largest-drill scan
    asks for the same drills piece after piece.
    """
    if not 0 < hole < inner:
        raise ValueError("the hole must be smaller than the bore")
    ro2, ri2 = (outer / 2) ** 2, (inner / 2) ** 2
    i0 = math.pi * (outer**4 - inner**4) / 64
    x, w = _GAUSS
    half = hole / 2
    chords = np.sqrt(np.clip(half * half - (half * x) ** 2, 0.0, None))  # half-chord at each station
    xs = chords[:, None] * x[None, :]  # points across each strip
    about_x = 2.0 / 3.0 * ((ro2 - xs * xs) ** 1.5 - (ri2 - xs * xs) ** 1.5)
    about_y = 2.0 * xs * xs * (np.sqrt(ro2 - xs * xs) - np.sqrt(ri2 - xs * xs))
    left = [i0 - (about @ w) * chords for about in (about_x, about_y)]
    return tuple(float(np.sum(w * (i0 / i - 1.0)) * half) for i in left)


def hang_hole_shifts(length, outer, inner, hole, position, mode=1):
    r"""Relative frequency changes (in the hole's plane, across it) [-] of bending mode ``mode``
    of a free-free tube with a hang hole.

    Parameters
    ----------
    length : float
        L [m].
    outer, inner : float
        Outside and inside diameters [m].
    hole : float
        Drill diameter d [m].
    position : float
        Hole centre as a fraction of the length from one end [-] (a node: 0.224 for mode 1).
    mode : int
        Bending mode [-].

    Examples
    --------
    1 in x 0.065 in tube, 504 mm long (D5 in 6063 aluminium), 3/16 in hole at the mode-1 node:

    >>> s = hang_hole_shifts(0.504, 0.0254, 0.0254 - 2 * 0.001651, 0.1875 * 0.0254, 0.2242)
    >>> [round(1200 * math.log2(1 + x), 2) for x in s]
    [-1.13, -0.01]
    """
    beta = beam.free_free_root(mode)
    sigma = (math.cosh(beta) - math.cos(beta)) / (math.sinh(beta) - math.sin(beta))
    bx = beta * position
    # phi'' with phi normalised as in Blevins (end amplitude 2, int phi^2 = 1)
    curvature = beta**2 * (math.cosh(bx) - math.cos(bx) - sigma * (math.sinh(bx) - math.sin(bx)))
    weight = curvature**2 / beta**4 / length
    return tuple(-0.5 * weight * c for c in compliance_integrals(outer, inner, hole))

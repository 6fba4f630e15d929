"""The uniform free-free Timoshenko beam's determinant for one piece, in plain floats.

The same formulas as :mod:`cutplan.physics.uniform` (Sylvester's formula for the transfer matrix
and the half-piece determinants), written operation for operation as the array code does them and
in the same order, so each value rounds the same and is the same bit for bit where numpy's cosh,
sinh, cos and sin are the C library's.  :mod:`uniform` solves a few brackets with these (the
Illinois steps of :func:`cutplan.physics.roots.bracketed_roots_each`), without numpy's overhead at
every step.  Each function raises where the arrays would give inf or nan (overflow, 0 / 0); the
caller then solves with the arrays.

References
----------
.. [1] Timoshenko, S. P., "On the correction for shear of the differential equation for
   transverse vibrations of prismatic bars", Philosophical Magazine 41 (1921) 744-746.
"""

from __future__ import annotations

import math

__all__ = ["even_odd", "coefficients", "half_determinant", "symmetric", "deflection", "search_dip"]


def even_odd(z, s):
    """cosh(s sqrt z) and sinh(s sqrt z) / sqrt z, continued to z < 0 as cos and sin."""
    r = math.sqrt(abs(z))
    if z >= 0:
        return math.cosh(s * r), (s if r == 0 else math.sinh(s * r) / r)
    return math.cos(s * r), math.sin(s * r) / r


def coefficients(omega, g, s2, s):
    """(C0, C1, C2, C3, a, b, E1) of expm(s A) at dimensionless ``omega`` for one piece (see
    :func:`cutplan.physics.uniform.coefficients`)."""
    b = omega * omega
    a = b * s2
    p = a + b * g
    d = a - b * g
    disc = math.sqrt(d * d + 4.0 * b)
    z2 = -0.5 * (p + disc)
    if z2 != 0:
        q = p + disc
        z1 = 2.0 * b * (1.0 - a * g) / (q if q != 0 else 1.0)
    else:
        z1 = 0.0
    e1, o1 = even_odd(z1, s)
    e2, o2 = even_odd(z2, s)
    spread = disc if disc > 0 else 1.0
    c0 = (e2 * z1 - e1 * z2) / spread
    c1 = (o2 * z1 - o1 * z2) / spread
    c2 = (e1 - e2) / spread
    c3 = (o1 - o2) / spread
    return c0, c1, c2, c3, a, b, e1


def half_determinant(omega, g, s2, family):
    """One family (0 symmetric, 1 antisymmetric) of the half-piece determinant, scaled by cosh^2
    (see :func:`cutplan.physics.uniform.half_determinants`)."""
    c0, c1, c2, c3, a, b, e1 = coefficients(omega, g, s2, 0.5)
    m = max(abs(e1), 1.0)
    scale = 1.0 / (m * m)
    if family == 0:
        return (-b * c2 * c3 - (c0 - a * c2) * (b * g * c3 - c1)) * scale
    return ((c0 - b * g * c2) * (c3 * (a * a + b) - a * c1) - b * c2 * (c1 - (a + b * g) * c3)) * scale


def symmetric(omega, g, s2):
    """The symmetric half-piece determinant divided by cosh^2 (mode 1 lies in this family)."""
    c0, c1, c2, c3, a, b, e1 = coefficients(omega, g, s2, 0.5)
    m = max(abs(e1), 1.0)
    return (-b * c2 * c3 - (c0 - a * c2) * (b * g * c3 - c1)) / (m * m)


def deflection(xi, omega, g, s2, start0, start1):
    """w(xi) of the mode at ``omega`` started with (w0, psi0) = (start0, start1) at the free end."""
    c0, c1, c2, c3, a, b, _ = coefficients(omega, g, s2, xi)
    return (c0 - b * g * c2) * start0 + (c1 - (a + b * g) * c3) * start1


def search_dip(fun, a, b, sign, ratio, steps):
    """Golden-section search of ``sign * fun`` (a float function) for its minimum in [a, b], the
    steps of :func:`cutplan.physics.uniform.omegas`'s dip search: (argmin, whether the minimum
    crosses zero)."""
    for _ in range(steps):
        x1 = b - ratio * (b - a)
        x2 = a + ratio * (b - a)
        if sign * fun(x1) < sign * fun(x2):
            b = x2
        else:
            a = x1
    mid = 0.5 * (a + b)
    return mid, sign * fun(mid) < 0

r"""Uniform free-free Timoshenko beam in closed form, vectorised over many pieces at once.

With the dimensionless state ``(w, psi, M, V)`` of :mod:`timoshenko` and ``a = Omega^2 s2``,
``b = Omega^2``, the state matrix A has the even characteristic polynomial

.. math:: z^2 + (a + b g) z - b (1 - a g) = 0, \qquad z = \lambda^2,

whose roots z1 > z2 are always distinct (the discriminant is (a - b g)^2 + 4 b > 0).  By
Sylvester's formula the transfer matrix over a fraction s of the length is
``expm(s A) = C0 I + C1 A + C2 A^2 + C3 A^3`` with

.. math::
    C_0 = \frac{E_2 z_1 - E_1 z_2}{z_1 - z_2}, \; C_1 = \frac{O_2 z_1 - O_1 z_2}{z_1 - z_2}, \;
    C_2 = \frac{E_1 - E_2}{z_1 - z_2}, \; C_3 = \frac{O_1 - O_2}{z_1 - z_2},

``E_i = cosh(s sqrt z_i)``, ``O_i = sinh(s sqrt z_i) / sqrt z_i`` (cos and sin / sqrt(-z) where
z_i < 0).  A is sparse, so the entries of the free-end block are short polynomials in a, b, g
and the C's, and the frequency equation needs no matrix arithmetic at all.  A uniform piece is
symmetric about its middle, so the determinant splits into a symmetric family (slope and shear
zero at the middle; modes 1, 3, 5 ... of a slender piece) and an antisymmetric one (deflection
and moment zero; modes 2, 4, ...).  Above the critical frequency (a g > 1, both z negative) a
symmetric and an antisymmetric mode can lie arbitrarily close; solving the families apart keeps
every such pair.  Within a family, roots are bracketed on a grid no coarser than 1/16 of a
radian of either wave number, and a dip of the determinant that does not cross zero is searched
for a hidden pair.

References
----------
.. [1] Timoshenko, S. P., "On the correction for shear of the differential equation for
   transverse vibrations of prismatic bars", Philosophical Magazine 41 (1921) 744-746.
.. [2] Huang, T. C., "The effect of rotatory inertia and of shear deformation on the frequency
   and normal mode equations of uniform beams with simple end conditions", J. Appl. Mech. 28
   (1961) 579-584 (the two spectra above the critical frequency; from memory).
"""

from __future__ import annotations

import math

import numpy as np

from cutplan.physics import uniform_floats
from cutplan.physics.beam import free_free_length, free_free_root
from cutplan.physics.remember import remembered
from cutplan.physics.roots import bracketed_roots, bracketed_roots_each

__all__ = [
    "PHASE_STEP", "coefficients", "half_determinants", "fundamental_omegas", "omegas",
    "fundamental_lengths", "mode_lengths", "deflection", "fundamental_nodes"
]

PHASE_STEP = np.pi / 16
"""Largest step of either wave number between grid points when bracketing modes [rad]."""

FEW_IN_FLOATS = 16
"""Up to this many brackets (or dips) of one family are solved one at a time in plain floats
(:mod:`cutplan.physics.uniform_floats`), the same steps and the same roundings as the arrays (so
the same roots bit for bit), without the array overhead per step; more are solved as arrays [-]
(the floats win below about 20, measured)."""

_REMEMBERED = 512
"""Answers each solver below keeps for the same arguments [-] (see :mod:`cutplan.physics.remember`)."""


def _even_odd(z, s):
    """cosh(s sqrt z) and sinh(s sqrt z) / sqrt z, continued to z < 0 as cos and sin."""
    r = np.sqrt(np.abs(z))
    if np.all(z > 0):  # the usual cases first: one family of functions for every element
        return np.cosh(s * r), np.sinh(s * r) / r
    if np.all(z < 0):
        return np.cos(s * r), np.sin(s * r) / r
    safe = np.where(r == 0, 1.0, r)
    pos = z >= 0
    even = np.where(pos, np.cosh(s * r), np.cos(s * r))
    odd = np.where(r == 0, s, np.where(pos, np.sinh(s * r), np.sin(s * r)) / safe)
    return even, odd


def coefficients(omega, g, s2, s=1.0):
    """(C0, C1, C2, C3, a, b, E1) of expm(s A) for the uniform beam at dimensionless ``omega``.

    Broadcasts over ``omega``, ``g``, ``s2`` and ``s``.  E1 = cosh(s sqrt z1) (or its cosine)
    is returned for scaling.
    """
    omega = np.asarray(omega, dtype=float)
    b = omega * omega
    a = b * s2
    p = a + b * g
    disc = np.sqrt((a - b * g) ** 2 + 4.0 * b)
    z2 = -0.5 * (p + disc)
    z1 = np.where(z2 != 0, 2.0 * b * (1.0 - a * g) / np.where(p + disc != 0, p + disc, 1.0), 0.0)
    e1, o1 = _even_odd(z1, s)
    e2, o2 = _even_odd(z2, s)
    spread = np.where(disc > 0, disc, 1.0)
    c0 = (e2 * z1 - e1 * z2) / spread
    c1 = (o2 * z1 - o1 * z2) / spread
    c2 = (e1 - e2) / spread
    c3 = (o1 - o2) / spread
    return c0, c1, c2, c3, a, b, e1


def half_determinants(omega, g, s2):
    """(symmetric, antisymmetric) determinants of the half piece, scaled by cosh^2 [-].

    Symmetric: slope and shear force vanish at the middle; antisymmetric: deflection and
    bending moment vanish there.  Their zeros together are the free-free frequencies.
    """
    c0, c1, c2, c3, a, b, e1 = coefficients(omega, g, s2, 0.5)
    scale = 1.0 / np.maximum(np.abs(e1), 1.0) ** 2
    sym = (-b * c2 * c3 - (c0 - a * c2) * (b * g * c3 - c1)) * scale
    anti = ((c0 - b * g * c2) * (c3 * (a * a + b) - a * c1) - b * c2 * (c1 - (a + b * g) * c3)) * scale
    return sym, anti


def _roots_few_in_floats(float_fun, fun, lo, hi, f_lo=None, f_hi=None):
    """:func:`bracketed_roots` of ``fun``, through its plain-float twin ``float_fun(x, k)`` when
    there are at most :data:`FEW_IN_FLOATS` brackets (the same roots bit for bit)."""
    if np.size(lo) <= FEW_IN_FLOATS:
        try:
            return bracketed_roots_each(float_fun, lo, hi, f_lo, f_hi)
        except (ArithmeticError, ValueError):  # overflow or 0 / 0: the arrays give inf or nan there
            pass
    return bracketed_roots(fun, lo, hi, f_lo, f_hi)


def _symmetric(omega, g, s2):
    """The symmetric half-piece determinant alone (mode 1 lies in this family)."""
    c0, c1, c2, c3, a, b, e1 = coefficients(omega, g, s2, 0.5)
    return (-b * c2 * c3 - (c0 - a * c2) * (b * g * c3 - c1)) / np.maximum(np.abs(e1), 1.0) ** 2


def _symmetric_scalar(omega, g, s2):
    """:func:`half_determinants` (symmetric family) for one piece, in plain floats (no array
    overhead: a single forward solve is then about ten times faster)."""
    b = omega * omega
    a = b * s2
    p = a + b * g
    disc = math.sqrt((a - b * g) ** 2 + 4.0 * b)
    z2 = -0.5 * (p + disc)
    z1 = 2.0 * b * (1.0 - a * g) / (p + disc)

    def even_odd(z):
        r = math.sqrt(abs(z))
        if r == 0:
            return 1.0, 0.5
        if z >= 0:
            return math.cosh(0.5 * r), math.sinh(0.5 * r) / r
        return math.cos(0.5 * r), math.sin(0.5 * r) / r

    e1, o1 = even_odd(z1)
    e2, o2 = even_odd(z2)
    c0, c1 = (e2 * z1 - e1 * z2) / disc, (o2 * z1 - o1 * z2) / disc
    c2, c3 = (e1 - e2) / disc, (o1 - o2) / disc
    return (-b * c2 * c3 - (c0 - a * c2) * (b * g * c3 - c1)) / max(abs(e1), 1.0) ** 2


def _fundamental_omega_scalar(g, s2):
    """Omega_1 of one piece: the same bracket and Illinois iteration as the arrays, in floats."""
    eb = free_free_root(1) ** 2
    lo, hi = 0.2 * eb, eb * (1 + 1e-9)
    f_lo, f_hi = _symmetric_scalar(lo, g, s2), _symmetric_scalar(hi, g, s2)
    if (f_lo > 0) == (f_hi > 0):
        raise ValueError("piece too stubby for the beam model (length under about twice its depth)")
    x, side = hi, 0
    for _ in range(200):
        xn = (lo * f_hi - hi * f_lo) / (f_hi - f_lo) if f_hi != f_lo else 0.5 * (lo + hi)
        if not lo < xn < hi:
            xn = 0.5 * (lo + hi)
        fx = _symmetric_scalar(xn, g, s2)
        step, x = abs(xn - x), xn
        if fx == 0:
            break
        if (fx > 0) == (f_lo > 0):
            lo, f_lo = xn, fx
            f_hi = 0.5 * f_hi if side == 1 else f_hi
            side = 1
        else:
            hi, f_hi = xn, fx
            f_lo = 0.5 * f_lo if side == -1 else f_lo
            side = -1
        if hi - lo <= 4e-16 * abs(xn) or step <= 4e-16 * abs(xn):
            break
    return x


@remembered(_REMEMBERED)
def fundamental_omegas(g, s2):
    """Omega_1 of many pieces at once [-] (mode 1 is the first symmetric root).

    Examples
    --------
    >>> round(float(fundamental_omegas(0.0, 0.0)[0]), 7)
    22.3732854
    """
    g, s2 = np.broadcast_arrays(np.atleast_1d(np.asarray(g, dtype=float)), np.asarray(s2, dtype=float))
    g, s2 = g.ravel().copy(), s2.ravel().copy()
    if g.size == 1:
        return np.array([_fundamental_omega_scalar(float(g[0]), float(s2[0]))])
    eb = free_free_root(1) ** 2
    lo = np.full(g.shape, 0.2 * eb)
    hi = np.full(g.shape, eb * (1 + 1e-9))
    f_lo, f_hi = _symmetric(lo, g, s2), _symmetric(hi, g, s2)
    if np.any(np.sign(f_lo) == np.sign(f_hi)):
        raise ValueError("piece too stubby for the beam model (length under about twice its depth)")
    gs, ss = g.tolist(), s2.tolist()
    return _roots_few_in_floats(lambda x, k: uniform_floats.symmetric(x, gs[k], ss[k]),
                                lambda x, k: _symmetric(x, g[k], s2[k]), lo, hi, f_lo, f_hi)


def _grid(g, s2, top, floor=0.5):
    """Per-piece grids in Omega (rows), no coarser than PHASE_STEP in either wave number."""
    c = np.sqrt(g) + np.sqrt(s2)

    def u_of(om):
        return np.sqrt(om) + c * om

    u_lo, u_hi = u_of(floor), u_of(top)
    count = int(np.ceil(np.max(u_hi - u_lo) / PHASE_STEP)) + 2
    u = u_lo[:, None] + (u_hi - u_lo)[:, None] * np.linspace(0.0, 1.0, count)[None, :]
    cc = c[:, None]
    t = 2.0 * u / (1.0 + np.sqrt(1.0 + 4.0 * cc * u))  # sqrt(Omega) from u = t + c t^2
    return t * t


def _crossings(grid, det):
    """(rows, lo, hi) of the grid intervals where ``det`` changes sign, and (rows, lo, hi, sign) of
    its dips: |det| lower at a sample than at both neighbours, all three of one sign."""
    sign = np.sign(det)
    rows, cols = np.nonzero(sign[:, :-1] * sign[:, 1:] < 0)
    mag = np.abs(det)
    dip = ((sign[:, :-2] == sign[:, 1:-1]) & (sign[:, 1:-1] == sign[:, 2:]) & (mag[:, 1:-1] < mag[:, :-2])
           & (mag[:, 1:-1] < mag[:, 2:]))
    drow, dcol = np.nonzero(dip)
    return ((rows, grid[rows, cols], grid[rows, cols + 1]),
            (drow, grid[drow, dcol], grid[drow, dcol + 2], sign[drow, dcol + 1]))


def _needed_below(crossings, count, modes):
    """Per row, the ``modes``-th lowest upper end of the sign changes of both families (inf where a
    row has fewer): a bracket or dip starting at or above it holds no root among the lowest
    ``modes`` (at least ``modes`` roots lie below its start), so it need not be solved."""
    rows = np.concatenate([c[0] for c in crossings])
    his = np.concatenate([c[2] for c in crossings])
    order = np.lexsort((his, rows))
    rows, his = rows[order], his[order]
    counts = np.bincount(rows, minlength=count)
    first = np.concatenate([[0], np.cumsum(counts)[:-1]]).astype(int)
    limit = np.full(count, np.inf)
    enough = counts >= modes
    limit[enough] = his[first[enough] + modes - 1]
    return limit


def _family_roots(crossing, dips, g, s2, family):
    """(row, root) of one family's determinant: each sign change's root, and the two roots a dip
    of |det| hides when a golden-section search of it finds that it crosses zero.  A few brackets
    are solved in plain floats (:data:`FEW_IN_FLOATS`), the same roots bit for bit.
    """
    def fun_of(rows):
        return lambda x, k: half_determinants(x, g[rows[k]], s2[rows[k]])[family]

    def float_fun_of(rows):
        gs, ss = g[rows].tolist(), s2[rows].tolist()
        return lambda x, k: uniform_floats.half_determinant(x, gs[k], ss[k], family)

    rows, lo, hi = crossing
    all_rows, all_lo, all_hi = [rows], [lo], [hi]
    drow, dlo, dhi, dsign = dips
    if drow.size:
        mid, crossed = _search_dips(fun_of(drow), float_fun_of(drow), dlo, dhi, dsign)
        for a, b in ((dlo, mid), (mid, dhi)):
            all_rows.append(drow[crossed])
            all_lo.append(a[crossed])
            all_hi.append(b[crossed])
    rows = np.concatenate(all_rows)
    if rows.size == 0:
        return rows, np.zeros(0)
    return rows, _roots_few_in_floats(float_fun_of(rows), fun_of(rows), np.concatenate(all_lo), np.concatenate(all_hi))


def _below(brackets, limit):
    """The brackets (rows, lo, ...) that start below their row's ``limit``."""
    keep = brackets[1] < limit[brackets[0]]
    return tuple(part[keep] for part in brackets)


def _search_dips(fun, float_fun, lo, hi, sign):
    """:func:`_search_dip`, in plain floats one dip at a time when there are a few (the same
    steps, the same result bit for bit)."""
    if lo.size <= FEW_IN_FLOATS:
        try:
            return _search_dip_floats(float_fun, lo, hi, sign)
        except (ArithmeticError, ValueError):  # overflow or 0 / 0: the arrays give inf or nan there
            pass
    return _search_dip(fun, lo, hi, sign)


_GOLDEN = (np.sqrt(5.0) - 1.0) / 2.0
"""The golden-section ratio [-]."""
_GOLDEN_STEPS = 80
"""Golden-section steps of a dip search [-] (the bracket shrinks to 1e-17 of its width)."""


def _search_dip(fun, lo, hi, sign):
    """Golden-section search of ``sign * fun`` for its minimum in each [lo, hi]: (argmin, whether
    the minimum crosses zero, i.e. two roots hide there)."""
    ratio = _GOLDEN
    k = np.arange(lo.size)
    a, b = lo.copy(), hi.copy()
    for _ in range(_GOLDEN_STEPS):
        x1 = b - ratio * (b - a)
        x2 = a + ratio * (b - a)
        left = sign * fun(x1, k) < sign * fun(x2, k)
        b = np.where(left, x2, b)
        a = np.where(left, a, x1)
    mid = 0.5 * (a + b)
    return mid, sign * fun(mid, k) < 0


def _search_dip_floats(float_fun, lo, hi, sign):
    """:func:`_search_dip` with ``float_fun(x, k)`` of one float, one dip at a time."""
    found = [uniform_floats.search_dip(lambda x, k=k: float_fun(x, k), a, b, s, float(_GOLDEN), _GOLDEN_STEPS)
             for k, (a, b, s) in enumerate(zip(lo.tolist(), hi.tolist(), sign.tolist(), strict=True))]
    return np.array([m for m, _ in found], dtype=float), np.array([c for _, c in found], dtype=bool)


@remembered(_REMEMBERED)
def omegas(g, s2, modes):
    """Omega_1 .. Omega_modes of many pieces at once, in ascending order (rows) [-].

    Examples
    --------
    >>> [round(float(x), 6) for x in omegas(0.0, 0.0, 4)[0]]
    [22.373285, 61.672823, 120.903392, 199.859448]
    """
    g, s2 = np.broadcast_arrays(np.atleast_1d(np.asarray(g, dtype=float)), np.asarray(s2, dtype=float))
    g, s2 = g.ravel().copy(), s2.ravel().copy()
    top = free_free_root(modes) ** 2 * 1.001
    grid = _grid(g, s2, top)
    dets = half_determinants(grid, g[:, None], s2[:, None])
    found = [_crossings(grid, dets[family]) for family in (0, 1)]
    # only the lowest ``modes`` roots of each row are wanted: brackets and dips above them are
    # left unsolved (the answer is the same; a stubby piece has many roots below ``top``)
    limit = _needed_below([c for c, _ in found], g.size, modes)
    found = [_family_roots(_below(crossing, limit), _below(dips, limit), g, s2, family)
             for family, (crossing, dips) in enumerate(found)]
    rows = np.concatenate([r for r, _ in found])
    roots = np.concatenate([x for _, x in found])
    order = np.lexsort((roots, rows))
    rows, roots = rows[order], roots[order]
    counts = np.bincount(rows, minlength=g.size)
    if np.any(counts < modes):
        raise ValueError("could not bracket all requested modes (piece too stubby for the model)")
    first = np.concatenate([[0], np.cumsum(counts)[:-1]])
    return roots[first[:, None] + np.arange(modes)[None, :]]


def _length_parameters(frequency, flexural_rigidity, mass_per_length, shear_rigidity, rotary_inertia, mode=1):
    """Slender length and (Omega, g, s2) at the slender length, for target frequencies [Hz]."""
    target = np.atleast_1d(np.asarray(frequency, dtype=float)).ravel()
    slender = np.atleast_1d(free_free_length(target, flexural_rigidity, mass_per_length, mode=mode))
    om = np.full(target.shape, free_free_root(mode) ** 2)
    g = flexural_rigidity / (shear_rigidity * slender**2)
    s2 = rotary_inertia / (mass_per_length * slender**2)
    return target, slender, om, g, s2


@remembered(_REMEMBERED)
def fundamental_lengths(frequency, flexural_rigidity, mass_per_length, shear_rigidity, rotary_inertia):
    """Lengths [m] whose mode 1 sounds each target frequency [Hz], all at once.

    With x = L / L_slender the piece sounds the target when the symmetric determinant vanishes
    at Omega = Omega_1,slender x^2, g = g_slender / x^2, s2 = s2_slender / x^2: one bracketed
    root per target, x in [0.5, 1] (shear and rotary inertia only lower the pitch).
    """
    _, slender, om, g, s2 = _length_parameters(frequency, flexural_rigidity, mass_per_length, shear_rigidity,
                                               rotary_inertia)

    def fun(x, k):
        x2 = x * x
        return _symmetric(om[k] * x2, g[k] / x2, s2[k] / x2)

    lo = np.full(slender.shape, 0.5)
    hi = np.full(slender.shape, 1.0 + 1e-9)
    everything = np.arange(slender.size)
    f_lo, f_hi = fun(lo, everything), fun(hi, everything)
    if np.any(np.sign(f_lo) == np.sign(f_hi)):
        raise ValueError("piece too stubby for the beam model (length under about twice its depth)")
    oms, gs, ss = om.tolist(), g.tolist(), s2.tolist()

    def float_fun(x, k):
        x2 = x * x
        return uniform_floats.symmetric(oms[k] * x2, gs[k] / x2, ss[k] / x2)

    return slender * _roots_few_in_floats(float_fun, fun, lo, hi, f_lo, f_hi)


@remembered(_REMEMBERED)
def mode_lengths(frequency, mode, flexural_rigidity, mass_per_length, shear_rigidity, rotary_inertia,
                 rtol=5e-14):
    """Lengths [m] whose mode ``mode`` sounds each target frequency [Hz] (vectorised secant).

    f_n is close to a power of L, so a secant iteration on log f against log L from the slender
    length converges in a few steps (each solves every unfinished piece's modes at once); a
    piece stops when its frequency is within ``rtol`` (relative) of the target.
    """
    target, slender, _, g0, s20 = _length_parameters(frequency, flexural_rigidity, mass_per_length, shear_rigidity,
                                                     rotary_inertia, mode)
    scale = np.sqrt(flexural_rigidity / mass_per_length) / (2 * np.pi)
    goal = np.log(target)

    def miss_at(x, k):
        om = omegas(g0[k] / x**2, s20[k] / x**2, mode)[:, mode - 1]
        return np.log(om * scale / (slender[k] * x) ** 2) - goal[k]

    everything = np.arange(target.size)
    x0 = np.ones(target.shape)
    m0 = miss_at(x0, everything)
    x1 = x0 * np.exp(m0 / 2.0)
    m1 = miss_at(x1, everything)
    for _ in range(40):
        act = np.nonzero(np.abs(m1) >= rtol)[0]
        if act.size == 0:
            break
        dx = np.log(x1[act]) - np.log(x0[act])
        dm = m1[act] - m0[act]
        slope = np.where((np.abs(dx) > 1e-15) & (dm != 0), dm / np.where(dx == 0, 1.0, dx), -2.0)
        slope = np.clip(slope, -4.0, -1.0)
        x0[act], m0[act] = x1[act], m1[act]
        x1[act] = x1[act] * np.exp(-m1[act] / slope)
        m1[act] = miss_at(x1[act], act)
    return slender * x1


def deflection(xi, omega, g, s2, start):
    """w(xi) of the mode at ``omega`` started with (w0, psi0) = ``start`` at the free end xi = 0."""
    c0, c1, c2, c3, a, b, _ = coefficients(omega, g, s2, xi)
    return (c0 - b * g * c2) * start[0] + (c1 - (a + b * g) * c3) * start[1]


@remembered(_REMEMBERED)
def fundamental_nodes(omega, g, s2):
    """Node of mode 1 nearer the reference end, as a fraction of the length, for many pieces [-].

    The other node is its mirror image (1 - xi) by symmetry.

    Examples
    --------
    >>> round(float(fundamental_nodes(fundamental_omegas(0.0, 0.0), 0.0, 0.0)[0]), 5)
    0.22416
    """
    omega, g, s2 = (np.atleast_1d(np.asarray(v, dtype=float)) for v in (omega, g, s2))
    omega, g, s2 = (v.ravel().copy() for v in np.broadcast_arrays(omega, g, s2))
    c0, c1, c2, c3, a, b, _ = coefficients(omega, g, s2, 0.5)
    # slope and shear force vanish at the middle: pick the better-conditioned of the two rows
    r1 = (b * c3, c0 - a * c2)
    r3 = (b * (b * g * c3 - c1), -b * c2)
    use1 = np.hypot(*r1) >= np.hypot(*r3)
    start = (np.where(use1, r1[1], r3[1]), -np.where(use1, r1[0], r3[0]))

    def fun(x, k):
        return deflection(x, omega[k], g[k], s2[k], (start[0][k], start[1][k]))

    args = [v.tolist() for v in (omega, g, s2, start[0], start[1])]

    def float_fun(x, k):
        return uniform_floats.deflection(x, *(v[k] for v in args))

    return _roots_few_in_floats(float_fun, fun, np.zeros(omega.shape), np.full(omega.shape, 0.5))

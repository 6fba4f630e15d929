r"""Bars of varying section as a 2-D elastic body: plane stress through the thickness.

A bar with a flat top and a profile cut from its underside (an undercut arch, or wood a builder
took off one side) is meshed in its side view, the (x, y) plane, x along the bar and y through
the thickness.  Each column of the mapped mesh runs from the flat top (y = 0) down to the
underside at y = -h(x), h piecewise linear between the given stations.  The material is
orthotropic in that plane (plane stress, the bar's width b as the out-of-plane thickness):

.. math::
    \begin{bmatrix}\varepsilon_{xx}\\ \varepsilon_{yy}\\ \gamma_{xy}\end{bmatrix} =
    \begin{bmatrix} 1/E_x & -\nu_{xy}/E_x & 0\\ -\nu_{xy}/E_x & 1/E_y & 0\\ 0 & 0 & 1/G_{xy}
    \end{bmatrix}
    \begin{bmatrix}\sigma_{xx}\\ \sigma_{yy}\\ \tau_{xy}\end{bmatrix}

with E_x along the bar (the grain), E_y across it, G_xy the shear modulus of that plane and
nu_xy the Poisson ratio (contraction across per extension along).  Quadratic (9-node Lagrange)
quadrilaterals are assembled with scikit-fem; the free-free eigenproblem K u = omega^2 M u is
solved by sparse shift-invert Lanczos (scipy ``eigsh``) below the first elastic mode, and the
three rigid-body modes (two translations, one rotation) are dropped.  The body also has
lengthwise (longitudinal) modes and, with the width resolved, cross-width ones; the bending
partials are told from them by :mod:`cutplan.physics.bending_partials`.  A width-resolved bar that is its own mirror image about
its midpoint (an arch centred on it) is solved as its symmetric and antisymmetric halves
(:mod:`cutplan.physics.mirror_modes`): the same modes for about two thirds of the work.

A section that stays plane and a straight centre line are not assumed, so this solves the deep
arch of a marimba bar, where a 1-D beam model is too stiff.

Plane stress lets the width contract freely.  Where Poisson's ratio across the width matters (a
metal bar about twice as wide as thick, or the thin middle of an arch), the 3-D body is stiffer:
by about 19 cents for modes 1-2 of an aluminium arch 55 x 24 mm cut to 6 mm (nu = 0.33).  Given
``width_constants`` (:class:`cutplan.physics.width_terms.WidthConstants`), the width is resolved
by polynomial terms across it (:mod:`cutplan.physics.width_terms`), which brings the model within
about 1 cent of the 3-D body; without them the model is plane stress.  Wood along the grain
couples the width only weakly (E across the width is a small fraction of E along).

References
----------
.. [1] Lekhnitskii, S. G., Anisotropic Plates, Gordon and Breach, 1968, ch. 1 (plane stress in
   an orthotropic body; from memory for the chapter).
.. [2] Gustafsson, T. and McBain, G. D., "scikit-fem: A Python package for finite element
   assembly", Journal of Open Source Software 5(52) (2020) 2369.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

# scikit-fem and scipy.sparse.linalg are imported where used: a chime plan (0.72 s CPU) never needs them; at the top they add 0.9 s (measured)
import numpy as np

from cutplan.physics import mirror_modes, width_terms
from cutplan.physics.bending_partials import sort_modes
from cutplan.physics.blas import single_thread
from cutplan.physics.remember import SharedMemo

__all__ = [
    "ELEMENTS_ALONG", "ELEMENTS_THROUGH", "RIGID_MODES", "ProfileError", "ProfileModes", "MEMO_SIZE", "forget_solves",
    "remembered_solves", "remember_solves", "profile_modes"
]

ELEMENTS_ALONG = 60
"""Quadratic elements along the bar [-] (mesh study in tests/physics/test_elastic2d.py)."""
ELEMENTS_THROUGH = 4
"""Quadratic elements through the thickness [-]."""
RIGID_MODES = 3
"""Rigid-body modes of a free body in the plane: two translations and a rotation [-]."""


class ProfileError(ValueError):
    """The stations do not describe a bar (lengths, thicknesses or constants out of range)."""


@dataclass(frozen=True)
class ProfileModes:
    """Bending modes in the thickness plane of a bar of varying section.

    frequencies : tuple of float
        Bending frequencies [Hz], ascending.
    nodes : tuple of tuple of float
        For each bending mode, the places along the flat top where it does not move up or
        down [m from end A].
    longitudinal : tuple of float
        The other modes found on the way [Hz]: lengthwise ones and, with the width resolved,
        cross-width ones; each an ``OtherMode`` (a float with ``kind`` and, where it splits a
        partial, ``partial``) from :mod:`cutplan.physics.bending_partials`.
    elements : (int, int)
        Quadratic elements along and through the bar [-].
    """

    frequencies: tuple[float, ...]
    nodes: tuple[tuple[float, ...], ...]
    longitudinal: tuple[float, ...]
    elements: tuple[int, int]


MEMO_SIZE = 512
"""Solves remembered per process [-]: a design planned again (the page after each edit, ``trim``
after ``plan``, a packet's several outputs) re-uses its bars' solves instead of repeating them."""

_MEMO = SharedMemo(MEMO_SIZE)


def forget_solves():
    """Empty the memo of :func:`profile_modes` (the next solves are made afresh)."""
    _MEMO.clear()


def remembered_solves():
    """A copy of the solves this process remembers ({key: ProfileModes}; the values are frozen), to
    hand to another process planning the same designs (see :func:`remember_solves`)."""
    return _MEMO.copy()


def remember_solves(solves):
    """Take solves made by another process (from :func:`remembered_solves`) into this one's memo;
    a solve it already has is kept, and the oldest drop out past :data:`MEMO_SIZE`."""
    _MEMO.take(solves)


def profile_modes(xs, thickness, width, modulus_along, modulus_across, shear_modulus, poisson, density,
                  modes=4, elements_along=ELEMENTS_ALONG, elements_through=ELEMENTS_THROUGH, width_constants=None,
                  width_order=width_terms.WIDTH_ORDER):
    """Free-free bending modes of a bar with a flat top and a profile cut from the underside.

    The same inputs (bit for bit) give the same :class:`ProfileModes`, remembered for the last
    :data:`MEMO_SIZE` solves of the process (the result is immutable, so sharing it is safe).

    Parameters
    ----------
    xs : sequence of float
        Stations from end A (0) to end B (the bar length) [m], increasing.
    thickness : sequence of float
        Remaining thickness at each station [m]; piecewise linear between stations.
    width : float
        Bar width b [m] (plane stress: the frequencies do not depend on it; with
        ``width_constants`` they do).
    modulus_along, modulus_across : float
        Young's moduli E_x along the bar and E_y across it, in the thickness plane [Pa].
    shear_modulus : float
        Shear modulus G_xy of the thickness plane [Pa].
    poisson : float
        Poisson ratio nu_xy (contraction across per extension along) [-].
    density : float
        rho [kg/m^3].
    modes : int
        Bending modes wanted [-].
    elements_along, elements_through : int
        Mesh size [-] (the defaults are converged to well under 0.5 cent for modes 1-4).
    width_constants : WidthConstants, optional
        The constants of the width axis; given, the width is resolved (not plane stress).
    width_order : int
        Power pairs kept across the width when it is resolved [-].

    Returns
    -------
    ProfileModes

    Examples
    --------
    A uniform aluminium bar 300 x 25 x 10 mm (E = 69 GPa, G = 26 GPa, nu = 0.33,
    rho = 2700 kg/m^3); Euler-Bernoulli gives 577.4 Hz, shear lowers it a little:

    >>> m = profile_modes([0.0, 0.3], [0.01, 0.01], 0.025, 69e9, 69e9, 26e9, 0.33, 2700.0, modes=2)
    >>> [round(f) for f in m.frequencies]
    [575, 1574]
    """
    key = (np.asarray(xs, dtype=float).tobytes(), np.asarray(thickness, dtype=float).tobytes(), float(width),
           float(modulus_along), float(modulus_across), float(shear_modulus), float(poisson), float(density),
           int(modes), int(elements_along), int(elements_through), width_constants, int(width_order))
    return _MEMO.get(key, lambda: _solve_profile(xs, thickness, width, modulus_along, modulus_across, shear_modulus,
                                                 poisson, density, modes, elements_along, elements_through,
                                                 width_constants, width_order))


def _solve_profile(xs, thickness, width, modulus_along, modulus_across, shear_modulus, poisson, density,
                   modes, elements_along, elements_through, width_constants, width_order):
    """:func:`profile_modes` without the memo: the mesh, the assembly and the eigen-solve."""
    xs = np.asarray(xs, dtype=float)
    hs = np.asarray(thickness, dtype=float)
    _check(xs, hs, width, modulus_along, modulus_across, shear_modulus, poisson, density, modes)
    with single_thread():
        stiffness, mass, means, top, mirror = _assemble(xs, hs, width, modulus_along, modulus_across,
                                                        shear_modulus, poisson, density,
                                                        int(elements_along), int(elements_through),
                                                        width_constants, int(width_order))
        return _solve(xs, hs, stiffness, mass, means, top, modulus_along, density, int(modes),
                      (int(elements_along), int(elements_through)), mirror)


def _check(xs, hs, width, e_along, e_across, shear, poisson, density, modes):
    if xs.ndim != 1 or xs.size < 2 or xs.shape != hs.shape:
        raise ProfileError("stations and thicknesses must be two equal-length lists of at least 2")
    if not np.all(np.isfinite(xs)) or not np.all(np.isfinite(hs)):
        raise ProfileError("stations and thicknesses must be finite")
    if abs(xs[0]) > 1e-12 or np.any(np.diff(xs) <= 0):
        raise ProfileError("stations must start at 0 (end A) and increase")
    if np.any(hs <= 0):
        raise ProfileError("every thickness must be positive")
    for name, value in (("width", width), ("modulus_along", e_along), ("modulus_across", e_across),
                        ("shear_modulus", shear), ("density", density)):
        if not (value > 0 and math.isfinite(value)):
            raise ProfileError(f"{name} must be positive, not {value}")
    if not (-1.0 < poisson and poisson**2 < e_along / e_across):
        raise ProfileError(f"poisson {poisson} gives a material that is not positive definite")
    if modes < 1:
        raise ProfileError("ask for at least one mode")


def _mesh(xs, hs, nx, ny):
    """Quadrilaterals in (x, eta), eta = depth below the top as a fraction of h(x) (0 to 1)."""
    length = xs[-1]
    # stations that are kinks of the profile become mesh lines when the mesh can afford it
    grid = np.linspace(0.0, length, nx + 1)
    moved = np.zeros(nx + 1, dtype=bool)
    spacing = length / nx
    for k in _kinks(xs, hs):
        j = int(np.rint(k / spacing))
        if 0 < j < nx and not moved[j]:
            grid[j], moved[j] = k, True
    eta = np.linspace(0.0, 1.0, ny + 1)
    px = np.repeat(grid, ny + 1)
    py = np.tile(eta, nx + 1)
    idx = np.arange((nx + 1) * (ny + 1)).reshape(nx + 1, ny + 1)
    # counter-clockwise in (x, -eta): (i, j+1) is below (i, j)
    t = np.array([idx[:-1, 1:].ravel(), idx[1:, 1:].ravel(), idx[1:, :-1].ravel(), idx[:-1, :-1].ravel()])
    return np.array([px, py]), t


def _kinks(xs, hs):
    """Stations where the slope of the profile changes by more than a little [m]."""
    if xs.size < 3:
        return []
    slope = np.diff(hs) / np.diff(xs)
    turn = np.abs(np.diff(slope))
    scale = max(float(np.max(np.abs(slope))), 1e-12)
    return [float(x) for x, s in zip(xs[1:-1], turn, strict=True) if s > 0.05 * scale]


def _assemble(xs, hs, width, e_along, e_across, shear, poisson, density, nx, ny, width_constants=None, order=0):
    from skfem import Basis, ElementQuad2, MeshQuad, MeshQuad2

    p, t = _mesh(xs, hs, nx, ny)
    # quadratic geometry: every node, mid-edge and centre ones too, lies at y = -eta h(x), so the
    # element sides follow a curved underside to third order
    straight = MeshQuad2.from_mesh(MeshQuad(p, t))
    x, eta = straight.doflocs
    mesh = MeshQuad2(np.array([x, -eta * np.interp(x, xs, hs)]), straight.t)
    basis = Basis(mesh, ElementQuad2(), intorder=4)
    if width_constants is not None:
        partner = mirror_modes.mirror_partners(straight.doflocs, mesh.doflocs, float(xs[-1]), float(np.max(hs)))
        k, m, means, top, along = _assemble_width(basis, hs, width, e_along, e_across, shear, poisson, density,
                                                  width_constants, order)
        return k, m, means, top, None if partner is None else (partner, along)
    nu_across = poisson * e_across / e_along
    det = 1.0 - poisson * nu_across
    d11, d22, d12, d33 = e_along / det, e_across / det, poisson * e_across / det, shear
    # plane stress on two fields (u_x, u_y) of the scalar basis: exx = du_x/dx, eyy = du_y/dy,
    # gxy = du_x/dy + du_y/dx; the energy's constants by kind pair (value, d/dx, d/dy) and field pair
    c = np.zeros((3, 3, 2, 2))
    c[1, 1] = [[d11, 0.0], [0.0, d33]]
    c[2, 2] = [[d33, 0.0], [0.0, d22]]
    c[1, 2] = [[0.0, d12], [d33, 0.0]]
    c[2, 1] = [[0.0, d33], [d12, 0.0]]
    k, m = width_terms.kron_assemble(basis, width * c, width * density * np.eye(2))
    nodes = np.arange(basis.N)
    dof_x, dof_y = 2 * nodes, 2 * nodes + 1
    locs = basis.doflocs
    top = nodes[np.abs(locs[1]) < 1e-12 * max(1.0, float(np.max(hs)))]
    top = top[np.argsort(locs[0, top])]
    means = _means(2, dof_x, [(dof_x, 1.0)], dof_y, [(dof_y, 1.0)])
    # plane stress is solved whole even when the bar is its own mirror image: at this size the
    # halves' extra set-up costs more than it saves (measured on a four-octave set: 4.3 against 3.0 s)
    return k, m, means, (dof_y[top], locs[0, top]), None


def _means(fields, slot_x, parts_x, slot_z, parts_z):
    """vec -> (along, through) displacements averaged across the width, each a vector of the
    model's size with them at ``slot_x`` / ``slot_z`` and zero elsewhere (``parts``: the DOFs
    and weights that make each average); ``.fields`` the fields per node.  ``vec`` may be a
    block of vectors (one per column)."""
    def means(vec):
        out = []
        for slot, parts in ((slot_x, parts_x), (slot_z, parts_z)):
            v = np.zeros_like(vec)
            v[slot] = sum(weight * vec[dofs] for dofs, weight in parts)
            out.append(v)
        return out

    means.fields = fields  # type: ignore[attr-defined]
    return means


def _assemble_width(basis, hs, width, e_along, e_across, shear, poisson, density, constants, order):
    """The width-resolved body (:mod:`width_terms`) on the scalar quadratic basis: DOFs of the
    mid-width fields pick the modes."""
    try:
        k, m, fields = width_terms.assemble(basis, width, e_along, e_across, shear, poisson, density, constants,
                                            max(1, order))
    except ValueError as exc:
        raise ProfileError(str(exc)) from None
    n_f, nodes = len(fields), np.arange(basis.N)
    dof_x, dof_y = n_f * nodes + fields.index((0, 0)), n_f * nodes + fields.index((2, 0))
    # the mean of sigma^n across the width is 1 / (n + 1): a mode that bends the bar along its
    # length moves the width's mean; one that bends the section across the width (a plate mode
    # of a short, wide bar) barely does, and is not a bending mode of the bar
    parts_x = [(n_f * nodes + f, 1.0 / (n + 1)) for f, (c, n) in enumerate(fields) if c == 0]
    parts_z = [(n_f * nodes + f, 1.0 / (n + 1)) for f, (c, n) in enumerate(fields) if c == 2]
    locs = basis.doflocs
    top = nodes[np.abs(locs[1]) < 1e-12 * max(1.0, float(np.max(hs)))]
    top = top[np.argsort(locs[0, top])]
    along = tuple(c == 0 for c, _ in fields)
    return k, m, _means(n_f, dof_x, parts_x, dof_y, parts_z), (dof_y[top], locs[0, top]), along


def _solve(xs, hs, k, m, means, top, e_along, density, modes, elements, mirror=None):
    from scipy.sparse.linalg import LinearOperator, splu

    length = float(xs[-1])
    h_min = float(np.min(hs))
    # Euler-Bernoulli estimate of mode 1 on the thinnest section: the shift sits well below it
    omega1 = 22.373 / length**2 * math.sqrt(e_along * h_min**2 / 12.0 / density)
    sigma = -0.25 * omega1**2
    want = RIGID_MODES + modes + 2
    n = k.shape[0]
    if mirror is not None:
        # a bar that is its own mirror image: its symmetric and antisymmetric modes apart, each a
        # problem of half the size (the same modes; the bending ones alternate between the two)
        sorted_last: list = []

        def enough(vals, vecs):
            sorted_last[:] = [vals, sort_modes(vals, vecs, m, means, top, omega1)]
            return len(sorted_last[1][0]) >= modes

        # each half first asks for its rigid-body modes, its share of the bending modes and one
        # more; Lanczos bases of 2 k + 4 vectors (fewest solves on the long bars of a four-octave set)
        vals, vecs, _ = mirror_modes.lowest_modes(k, m, mirror_modes.half_bases(*mirror), sigma,
                                                  (1 + (modes + 1) // 2 + 1, 2 + modes // 2 + 1), enough,
                                                  ncv=lambda count: 2 * count + 4)
        # the modes returned are those the last question was asked of: their sorting is reused
        same = sorted_last and sorted_last[0].size == vals.size and np.array_equal(sorted_last[0], vals)
        bending, longitudinal, node_sets = (sorted_last[1] if same
                                            else sort_modes(vals, vecs, m, means, top, omega1))
        return ProfileModes(frequencies=tuple(bending[:modes]), nodes=tuple(node_sets[:modes]),
                            longitudinal=tuple(longitudinal), elements=elements)
    # one factorisation with minimum-degree ordering on the symmetric pattern, several times
    # faster than SuperLU's default ordering on the width-resolved body; K - sigma M is positive
    # definite (sigma < 0), so the diagonal pivots are taken as they come (partial pivoting filled
    # the factors six times as much on a short uniform bar, measured: 10.8 against 1.7 million
    # entries).  Plane stress takes the same factorisation, kept while more modes are asked for.
    lu = splu((k - sigma * m).tocsc(), permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0,
              options={"SymmetricMode": True})
    op = LinearOperator(k.shape, matvec=lu.solve, dtype=float)
    vals = vecs = None
    while True:
        count = min(want, n - 2)
        found = (vals, vecs) if vals is not None else None
        new_vals, new_vecs = mirror_modes.more_modes(op, m, sigma, count - (0 if vals is None else vals.size),
                                                     None, found)
        if vals is None:
            vals, vecs = new_vals, new_vecs
        else:
            order = np.argsort(np.concatenate([vals, new_vals]), kind="stable")
            vals, vecs = np.concatenate([vals, new_vals])[order], np.hstack([vecs, new_vecs])[:, order]
        bending, longitudinal, node_sets = sort_modes(vals, vecs, m, means, top, omega1)
        if len(bending) >= modes or count >= n - 2:
            break
        # too few bending modes among those solved (a short, wide bar has many cross-width and
        # longitudinal modes below its fourth bending mode): ask for twice as many at once, so
        # a deep hunt takes a few solves, not dozens of ever larger ones (the modes already
        # found are kept and only the new ones solved)
        want *= 2
    return ProfileModes(frequencies=tuple(bending[:modes]), nodes=tuple(node_sets[:modes]),
                        longitudinal=tuple(longitudinal), elements=elements)

r"""The side-view bar with its width resolved: polynomial terms across the width (a 3-D body in 2-D).

Plane stress (:mod:`elastic2d`) lets every fibre contract across the width as it pleases.  A wide
bar of a material with a real Poisson's ratio (a metal, about twice as wide as thick, or the thin
middle of an arch, several times as wide as thick) cannot: as the curvature changes along the
bar, the anticlastic bowing of the section must change with it, and the 3-D body is stiffer
(about 19 cents for modes 1-2 of an aluminium arch 55 x 24 mm cut to 6 mm, nu = 0.33).

Here the displacement of the bar's side view is expanded across the half-width ``a = b / 2`` in
powers of sigma = s / a (s the distance from the mid-width plane), keeping the modes symmetric
about that plane (the thickness-direction bending and stretching):

.. math::
    u_x = \sum_{k=0}^{P} \sigma^{2k} U_k(x, z), \quad
    u_z = \sum_{k=0}^{P} \sigma^{2k} W_k(x, z), \quad
    u_s = \sum_{k=1}^{P} \sigma^{2k-1} S_k(x, z),

each field a 9-node quadratic element field of the side-view mesh.  The 3-D orthotropic strain
energy and kinetic energy are integrated across the width exactly (the moments of sigma), so
the model is the 3-D body restricted to these shapes across the width (Kantorovich's method): it
can only be stiffer than the 3-D body and approaches it as the order P grows.  P = 1 holds the
Saint-Venant anticlastic bending of a uniform bar exactly (u_s = nu kappa s z,
u_z = -nu kappa s^2 / 2 ...); measured against 27-node-brick 3-D solids on converged meshes,
P = 2 is within 0.7 cent (an arch 55 x 24 mm cut to 6 mm) and within 0.3 cent (uniform bars up
to four times as wide as thick) for modes 1-3, where plane stress is up to 19 cents low.

References
----------
.. [1] Kantorovich, L. V. and Krylov, V. I., Approximate Methods of Higher Analysis, Noordhoff,
   1958, ch. 4 (reducing a problem's dimension by a chosen dependence on one variable; from
   memory for the chapter).
.. [2] Timoshenko, S. P. and Goodier, J. N., Theory of Elasticity, 3rd ed., McGraw-Hill, 1970,
   sec. 102 (pure bending of prismatic bars: anticlastic curvature; from memory for the
   section).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

__all__ = ["WIDTH_ORDER", "KINDS", "WidthConstants", "field_terms", "assemble", "kron_assemble"]

WIDTH_ORDER = 2
"""Highest power pair kept across the width, P [-] (see the module notes for its accuracy)."""


@dataclass(frozen=True)
class WidthConstants:
    """The elastic constants that involve the width axis [Pa, -]: E across the width, G of the
    length-width and width-thickness planes, and Poisson's ratios nu_xs (width contraction per
    extension along) and nu_sz (thickness contraction per extension across the width)."""

    modulus_width: float
    shear_length_width: float
    shear_width_thickness: float
    poisson_length_width: float
    poisson_width_thickness: float

    @classmethod
    def isotropic(cls, modulus, poisson):
        g = modulus / (2 * (1 + poisson))
        return cls(modulus, g, g, poisson, poisson)


def field_terms(order):
    """(component, power of sigma) of each field: 0 along, 1 across the width, 2 through."""
    out = [(0, 0), (2, 0)]
    for k in range(1, order + 1):
        out += [(1, 2 * k - 1), (0, 2 * k), (2, 2 * k)]
    return out


def _stiffness_3d(e_along, e_thick, g_xz, nu_xz, w):
    """6 x 6 stiffness in Voigt order (xx, ss, zz, xs, xz, sz), engineering shears [Pa]."""
    e_x, e_s, e_z = e_along, w.modulus_width, e_thick
    nu_xs, nu_sz = w.poisson_length_width, w.poisson_width_thickness
    compliance = np.array([
        [1 / e_x, -nu_xs / e_x, -nu_xz / e_x],
        [-nu_xs / e_x, 1 / e_s, -nu_sz / e_s],
        [-nu_xz / e_x, -nu_sz / e_s, 1 / e_z],
    ])
    if np.min(np.linalg.eigvalsh(compliance)) <= 0:
        raise ValueError("the width constants with the plane's give a material that is not positive definite")
    d = np.zeros((6, 6))
    d[:3, :3] = np.linalg.inv(compliance)
    d[3, 3], d[4, 4], d[5, 5] = w.shear_length_width, g_xz, w.shear_width_thickness
    return d


def assemble(basis, width, e_along, e_thick, g_xz, nu_xz, density, w, order=WIDTH_ORDER):
    """Stiffness and mass of the width-resolved bar on a scalar quadratic ``basis`` of the side view.

    Every strain is a sum of (a field's value or its x or z derivative) x a constant, so the
    stiffness is a sum over the nine pairs of those three kinds of the scalar matrix of that pair
    (e.g. the integral of dphi_a/dx dphi_b/dz) times a small field-by-field matrix of constants
    (a Kronecker product); the mass is the scalar mass matrix times the fields' mass moments.

    Returns (K, M, fields): global DOF ``len(fields) * node + f`` for field ``f`` of
    :func:`field_terms`; K and M in CSC form.
    """
    fields = field_terms(order)
    n_f = len(fields)
    half = width / 2
    moments = np.array([0.0 if j % 2 else 2 * half / (j + 1) for j in range(4 * order + 3)])
    d = _stiffness_3d(e_along, e_thick, g_xz, nu_xz, w)
    # generalised strains: (strain component, power of sigma); each field's share of them
    strains = sorted({s for c, n in fields for s in _strain_parts(c, n)})
    where = {s: i for i, s in enumerate(strains)}
    d_g = np.array([[d[i, j] * moments[n + m] for j, m in strains] for i, n in strains])
    m_g = np.array([[density * moments[n1 + n2] if c1 == c2 else 0.0 for c2, n2 in fields] for c1, n1 in fields])
    kinds = KINDS
    coefficients = np.zeros((3, 3, n_f, n_f))
    for f, (c, n) in enumerate(fields):
        for g, (c2, n2) in enumerate(fields):
            for s1, k1, a1 in _strain_terms(c, n, half):
                for s2, k2, a2 in _strain_terms(c2, n2, half):
                    coefficients[kinds.index(k1), kinds.index(k2), f, g] += d_g[where[s1], where[s2]] * a1 * a2
    k, m = kron_assemble(basis, coefficients, m_g)
    return k, m, fields


KINDS = ("value", "dx", "dz")
"""What of a scalar field a strain takes: its value, its x or its z derivative."""


def kron_assemble(basis, coefficients, mass):
    """K = sum over kind pairs (i, j) of S_ij (x) C_ij and M = S_00 (x) ``mass``, in CSC form.

    S_ij is the scalar matrix of :data:`KINDS` i and j on the scalar ``basis`` (the integral of
    e.g. dphi_a/dx dphi_b/dz), ``coefficients`` C the (3, 3, n, n) field-by-field constants and
    ``mass`` the (n, n) one; global DOF ``n * node + field``.
    """
    from scipy.sparse import csc_matrix  # here, not at the top: a plan without 2-D bars never loads scipy

    n_f = mass.shape[0]
    values = np.stack([np.asarray(phi[0]) for phi in basis.basis])  # (a, e, q)
    grads = np.stack([phi[0].grad for phi in basis.basis])  # (a, 2, e, q)
    shapes = (values, grads[:, 0], grads[:, 1])
    dx = basis.dx  # (e, q)
    dofs = basis.element_dofs  # (a, e)
    inverse, gather, indices, indptr = _layout(dofs.tobytes(), dofs.dtype.str, dofs.shape, basis.N, n_f)
    pairs = inverse.max() + 1
    scalar = np.zeros((3, 3, pairs))
    for i in range(3):
        for j in range(3):
            if np.any(coefficients[i, j]) or (i == j == 0):
                local = np.einsum("aeq,beq,eq->eab", shapes[i], shapes[j], dx)
                scalar[i, j] = np.bincount(inverse, weights=local.ravel(), minlength=pairs)
    size = n_f * basis.N
    k_blocks = np.einsum("ijp,ijfg->pfg", scalar, coefficients)
    m_blocks = scalar[0, 0][:, None, None] * mass[None, :, :]
    out = []
    for blocks in (k_blocks, m_blocks):
        matrix = csc_matrix((blocks.ravel()[gather], indices, indptr), shape=(size, size))
        matrix.eliminate_zeros()
        out.append(matrix)
    return out[0], out[1]


@lru_cache(maxsize=8)
def _layout(dofs_bytes, dtype, shape, nodes, n_f):
    """Where the entries go, for a scalar basis whose element DOFs (a, e) are given as bytes, dtype
    and shape and ``n_f`` fields per node: (the node pair of each element entry (e, a, b), and
    for the CSC matrix: the (pair, field, field) entry of each stored value, row indices, column
    pointers).  The same mesh sizes give the same layout, so it is worked out once per process."""
    dofs = np.frombuffer(dofs_bytes, dtype=dtype).reshape(shape).astype(np.int64)
    pair = (dofs[:, None, :] * nodes + dofs[None, :, :]).transpose(2, 0, 1).ravel()  # (e, a, b)
    keys, inverse = np.unique(pair, return_inverse=True)
    first, second = keys // nodes, keys % nodes  # pairs sorted by first node, then second
    # CSC of a symmetric pattern: column (c, g) holds the rows (r, f), r over the pairs (c, r) in
    # order, f inner; the value there is the (r, c) pair's entry (f, g)
    mirror = np.searchsorted(keys, second * nodes + first)
    # stored entry (pair q, column field g, row field f) sits at the start of its column node's
    # block, then g (a column each), then q's place among that node's pairs, then f: computed and
    # scattered, not sorted (the same order as a lexsort on those keys, at a fraction of the cost)
    per_node = np.bincount(first, minlength=nodes)
    start = np.concatenate([[0], np.cumsum(per_node)[:-1]])
    rank = np.arange(keys.size) - start[first]
    g, f = np.arange(n_f)[None, :, None], np.arange(n_f)[None, None, :]  # (pair, g, f) by broadcasting
    place = ((n_f * n_f * start[first] + n_f * rank)[:, None, None] + g * (n_f * per_node[first])[:, None, None]
             + f).ravel()
    gather = np.empty(place.size, dtype=np.int64)
    gather[place] = (((n_f * mirror)[:, None, None] + f) * n_f + g).ravel()
    indices = np.empty(place.size, dtype=np.int64)
    indices[place] = np.broadcast_to((n_f * second)[:, None, None] + f, (keys.size, n_f, n_f)).ravel()
    counts = np.repeat(per_node * n_f, n_f)
    return inverse, gather, indices, np.concatenate([[0], np.cumsum(counts)])


def _strain_terms(component, power, half):
    """((strain, power), 'dx' | 'dz' | 'value', factor) of one field sigma^n F(x, z).

    Voigt strains 0 xx, 1 ss, 2 zz, 3 xs, 4 xz, 5 sz; d/ds = (1 / a) d/dsigma.
    """
    n = power
    if component == 0:  # along: xx from d/dx, xz from d/dz, xs from d/ds
        out = [((0, n), "dx", 1.0), ((4, n), "dz", 1.0)]
        return out + ([((3, n - 1), "value", n / half)] if n else [])
    if component == 1:  # across the width (odd powers)
        return [((3, n), "dx", 1.0), ((5, n), "dz", 1.0), ((1, n - 1), "value", n / half)]
    out = [((2, n), "dz", 1.0), ((4, n), "dx", 1.0)]  # through the thickness
    return out + ([((5, n - 1), "value", n / half)] if n else [])


def _strain_parts(component, power):
    return [s for s, _, _ in _strain_terms(component, power, 1.0)]

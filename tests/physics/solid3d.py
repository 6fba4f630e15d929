"""A 3-D elastic bar for tests: an independent check of the 2-D plane-stress model.

Isotropic linear elasticity (Lame constants), 27-node quadratic hexahedra with quadratic
geometry, assembled with scikit-fem; the bar is meshed over half its width with u_y = 0 on the
mid-width plane, which keeps the modes symmetric about it (vertical bending and lengthwise
modes) and leaves out twisting and sideways bending.  Vertical bending modes are those with more
kinetic energy in z (through the thickness) than along x.  Slow (seconds per bar): tests only.

The matrices are integrated over all local basis pairs at once (:func:`assemble`) from the
scalar quadratic basis: the nine products of its gradients, H_ij = sum over the quadrature points
of dphi_a/dx_i dphi_b/dx_j dx, are contracted with the stiffness tensor C_cidj (the 6 x 6 D of
engineering strains written out), so the displacement's three components share one scalar basis
and its products.  The unknowns are numbered component by component (u_x of every node, then u_y,
then u_z: :func:`components`).  :func:`assemble_with_forms` integrates the same body with
scikit-fem's bilinear forms on the vector basis, one basis pair at a time, several times slower,
and tests/physics/test_solid_reference.py checks that the two agree.
"""

import math

import numpy as np

from cutplan.physics.blas import single_thread


def vertical_bending(xs, hs, width, modulus, poisson, density, modes=3, along=40, across=2, through=3,
                     constants=None):
    """Vertical bending frequencies [Hz] of a bar with a flat top and underside -h(x).

    ``along`` is a count of equal elements along the bar, or the element edges themselves [m]
    (fine at a step, coarse elsewhere).  ``constants`` (cutplan.physics.solid3d.Orthotropic, axes
    x along, y across the width, z through the thickness) replaces the isotropic modulus and
    Poisson's ratio.
    """
    with single_thread():  # a second BLAS thread only spins against the first on these small products
        return _vertical_bending(xs, hs, width, modulus, poisson, density, modes, along, across, through, constants)


def _vertical_bending(xs, hs, width, modulus, poisson, density, modes, along, across, through, constants):
    from scipy.sparse.linalg import eigsh

    xs, hs = np.asarray(xs, float), np.asarray(hs, float)
    length = xs[-1]
    edges = np.asarray(along, float) if np.ndim(along) else np.linspace(0, length, along + 1)
    basis = bar_basis(xs, hs, width, edges, across, through)
    k, m = assemble(basis, material_matrix(modulus, poisson, constants), density)
    along_x, along_y, along_z = components(basis)
    fixed = along_y[np.isclose(basis.doflocs[1], 0.0)]  # u_y = 0 on the mid-width plane
    free = np.setdiff1d(np.arange(k.shape[0]), fixed)
    k, m = k[free][:, free].tocsc(), m[free][:, free].tocsc()
    along_x, along_z = (np.searchsorted(free, np.intersect1d(free, s)) for s in (along_x, along_z))
    omega1 = 22.373 / length**2 * math.sqrt(modulus * hs.min() ** 2 / 12 / density)
    vals, vecs = eigsh(k, k=3 + modes + 4, M=m, sigma=-0.25 * omega1**2, v0=np.ones(k.shape[0]))
    out = []
    for lam_i, vec in sorted(zip(vals, vecs.T, strict=True), key=lambda p: p[0]):
        if lam_i < 1e-6 * omega1**2:
            continue
        mv = m @ vec
        if vec[along_z] @ mv[along_z] > vec[along_x] @ mv[along_x]:
            out.append(math.sqrt(lam_i) / (2 * math.pi))
    return out[:modes]


def bar_basis(xs, hs, width, edges, across, through):
    """The scalar 27-node basis of the half-width bar: ``edges`` along [m], ``across`` elements over
    the half width, ``through`` over the thickness; the top flat at z = 0, the underside at -h(x)."""
    from skfem import Basis, ElementHex2, MeshHex, MeshHex2

    box = MeshHex.init_tensor(np.asarray(edges, float), np.linspace(0, width / 2, across + 1),
                              np.linspace(0, 1, through + 1))
    straight = MeshHex2.from_mesh(box)
    x, y, eta = straight.doflocs
    return Basis(MeshHex2(np.array([x, y, -eta * np.interp(x, xs, hs)]), straight.t), ElementHex2(), intorder=4)


def components(basis):
    """The unknowns of u_x, u_y and u_z, each in the scalar basis's order of its nodes."""
    return tuple(np.arange(basis.N) + c * basis.N for c in range(3))


SHEARS = ((0, 1), (0, 2), (1, 2))
"""The engineering shear strains, in order: gamma_xy, gamma_xz, gamma_yz."""


def material_matrix(modulus, poisson, constants=None):
    """The 6 x 6 stiffness D of the body (strains e_xx, e_yy, e_zz, gamma_xy, gamma_xz, gamma_yz):
    isotropic from E and nu (Lame constants), or ``constants`` (Orthotropic) when given."""
    d = np.zeros((6, 6))
    if constants is None:
        lam = modulus * poisson / ((1 + poisson) * (1 - 2 * poisson))
        mu = modulus / (2 * (1 + poisson))
        d[:3, :3] = lam + 2 * mu * np.eye(3)
        d[3:, 3:] = mu * np.eye(3)
    else:
        d[:3, :3] = constants.normal_stiffness()
        d[3:, 3:] = np.diag([constants.g_xy, constants.g_xz, constants.g_yz])
    return d


def stiffness_tensor(d):
    """C_cidj of the 6 x 6 D: the strain of the displacement phi e_c has the engineering strain
    k = sum over i of P[k, c, i] dphi/dx_i (normal strains e_mm: P = 1 at c = i = m; shears
    gamma_pq: P = 1 at (c, i) = (p, q) and (q, p)), so C = P^T D P."""
    p = np.zeros((6, 3, 3))
    for m in range(3):
        p[m, m, m] = 1.0
    for k, (a, b) in enumerate(SHEARS, start=3):
        p[k, a, b] = p[k, b, a] = 1.0
    return np.einsum("kci,kl,ldj->cidj", p, d, p)


def assemble(basis, d, density):
    """Stiffness and mass matrices (scipy CSR) of the displacement on a scalar basis, its unknowns
    numbered as :func:`components` says: K = sum over elements and quadrature points of
    B^T D B dx, M = sum of density N^T N dx.  Each element's gradient products H_ij (all nine,
    the points side by side) are one matrix product; K's element matrix is then C_cidj H_ij, and
    M's the scalar mass on each component."""
    from scipy.sparse import block_diag, coo_matrix

    grads = np.array([field[0].grad for field in basis.basis])     # (local, 3, elements, points)
    values = np.array([np.asarray(field[0]) for field in basis.basis])  # (local, elements, points)
    dx = basis.dx                                                  # (elements, points)
    elements, local = basis.nelems, basis.Nbfun
    g = grads.transpose(2, 1, 0, 3).reshape(elements, 3 * local, -1)   # (elements, (i, a), points)
    h = (g * dx[:, None, :]) @ g.transpose(0, 2, 1)                # (elements, (i, a), (j, b))
    h = h.reshape(elements, 3, local, 3, local).transpose(1, 3, 0, 2, 4).reshape(9, -1)
    c = stiffness_tensor(d).transpose(0, 2, 1, 3).reshape(9, 9)    # ((c, d), (i, j))
    ke = (c @ h).reshape(3, 3, elements, local, local).transpose(2, 0, 3, 1, 4).reshape(
        elements, 3 * local, 3 * local)                            # (elements, (c, a), (d, b))
    n = values.transpose(1, 0, 2)                                  # (elements, local, points)
    me = (n * (density * dx)[:, None, :]) @ n.transpose(0, 2, 1)   # (elements, a, b)
    dofs = np.concatenate([basis.element_dofs.T + c * basis.N for c in range(3)], axis=1)  # (elements, (c, a))
    rows = np.broadcast_to(dofs[:, :, None], ke.shape).ravel()
    cols = np.broadcast_to(dofs[:, None, :], ke.shape).ravel()
    shape = (3 * basis.N, 3 * basis.N)
    scalar = basis.element_dofs.T                                  # (elements, a)
    s_rows = np.broadcast_to(scalar[:, :, None], me.shape).ravel()
    s_cols = np.broadcast_to(scalar[:, None, :], me.shape).ravel()
    mass = coo_matrix((me.ravel(), (s_rows, s_cols)), shape=(basis.N, basis.N)).tocsr()
    return coo_matrix((ke.ravel(), (rows, cols)), shape=shape).tocsr(), block_diag([mass] * 3, format="csr")


def assemble_with_forms(basis, modulus, poisson, density, constants=None):
    """The same matrices from scikit-fem's bilinear forms, written out from the energy: the strain
    tensor with the Lame constants, or the orthotropic normal and shear terms."""
    from skfem import BilinearForm, asm
    from skfem.helpers import ddot, sym_grad, trace

    lam = modulus * poisson / ((1 + poisson) * (1 - 2 * poisson))
    mu = modulus / (2 * (1 + poisson))

    @BilinearForm
    def stiffness(u, v, _):
        eu, ev = sym_grad(u), sym_grad(v)
        return 2 * mu * ddot(eu, ev) + lam * trace(eu) * trace(ev)

    if constants is not None:
        normal = constants.normal_stiffness()
        shears = ((0, 1, constants.g_xy), (0, 2, constants.g_xz), (1, 2, constants.g_yz))

        @BilinearForm
        def stiffness(u, v, _):  # noqa: F811 (the orthotropic body)
            gu, gv = u.grad, v.grad
            out = sum(normal[i, j] * gu[i, i] * gv[j, j] for i in range(3) for j in range(3))
            for i, j, g in shears:
                out = out + g * (gu[i, j] + gu[j, i]) * (gv[i, j] + gv[j, i])
            return out

    @BilinearForm
    def mass(u, v, _):
        return density * (u[0] * v[0] + u[1] * v[1] + u[2] * v[2])

    return asm(stiffness, basis), asm(mass, basis)

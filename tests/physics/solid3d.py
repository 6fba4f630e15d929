"""A 3-D elastic bar for tests: an independent check of the 2-D plane-stress model.

Isotropic linear elasticity (Lame constants), 27-node quadratic hexahedra with quadratic
geometry, assembled with scikit-fem; the bar is meshed over half its width with u_y = 0 on the
mid-width plane, which keeps the modes symmetric about it (vertical bending and lengthwise
modes) and leaves out twisting and sideways bending.  Vertical bending modes are those with more
kinetic energy in z (through the thickness) than along x.  Slow (seconds per bar): tests only.

The matrices are integrated over all local basis pairs at once (:func:`assemble`, each element's
B^T D B at each quadrature point); :func:`assemble_with_forms` integrates the same body with
scikit-fem's bilinear forms, one basis pair at a time, several times slower, and
tests/physics/test_solid_reference.py checks that the two agree.
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
    from skfem import Basis, ElementHex2, ElementVector, MeshHex, MeshHex2

    xs, hs = np.asarray(xs, float), np.asarray(hs, float)
    length = xs[-1]
    edges = np.asarray(along, float) if np.ndim(along) else np.linspace(0, length, along + 1)
    box = MeshHex.init_tensor(edges, np.linspace(0, width / 2, across + 1),
                              np.linspace(0, 1, through + 1))
    straight = MeshHex2.from_mesh(box)
    x, y, eta = straight.doflocs
    basis = Basis(MeshHex2(np.array([x, y, -eta * np.interp(x, xs, hs)]), straight.t),
                  ElementVector(ElementHex2()), intorder=4)
    k, m = assemble(basis, material_matrix(modulus, poisson, constants), density)
    fixed = basis.get_dofs(lambda p: np.isclose(p[1], 0.0)).all(["u^2"])
    free = np.setdiff1d(np.arange(k.shape[0]), fixed)
    k, m = k[free][:, free].tocsc(), m[free][:, free].tocsc()
    along_x, _, along_z = (np.searchsorted(free, np.intersect1d(free, s)) for s in basis.split_indices())
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


def assemble(basis, d, density):
    """Stiffness and mass matrices (scipy CSR) of a vector basis: K = sum over elements and
    quadrature points of B^T D B dx, M = sum of density N^T N dx.  Each element's sum over its
    quadrature points and strains is one matrix product (the points and strains side by side)."""
    from scipy.sparse import coo_matrix

    grads = np.array([field[0].grad for field in basis.basis])     # (local, 3, 3, elements, points)
    values = np.array([np.asarray(field[0]) for field in basis.basis])  # (local, 3, elements, points)
    strain = np.concatenate([np.stack([grads[:, i, i] for i in range(3)], axis=1),
                             np.stack([grads[:, i, j] + grads[:, j, i] for i, j in SHEARS], axis=1)], axis=1)
    dx = basis.dx                                                  # (elements, points)
    elements, local = basis.nelems, basis.Nbfun
    b = strain.transpose(2, 0, 3, 1)                               # (elements, local, points, 6)
    n = values.transpose(2, 0, 3, 1)                               # (elements, local, points, 3)
    w = dx[:, None, :, None]

    def pairs(left, right):  # sum over points and components of left[e, i] . right[e, j], for each element
        return left.reshape(elements, local, -1) @ right.reshape(elements, local, -1).transpose(0, 2, 1)

    ke = pairs(b * w, b @ d)
    me = pairs(n * (density * w), n)
    dofs = basis.element_dofs                                      # (local, elements)
    rows = np.broadcast_to(dofs.T[:, :, None], ke.shape).ravel()
    cols = np.broadcast_to(dofs.T[:, None, :], ke.shape).ravel()
    shape = (basis.N, basis.N)
    return (coo_matrix((ke.ravel(), (rows, cols)), shape=shape).tocsr(),
            coo_matrix((me.ravel(), (rows, cols)), shape=shape).tocsr())


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

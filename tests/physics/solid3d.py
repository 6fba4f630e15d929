"""A 3-D elastic bar for tests: an independent check of the 2-D plane-stress model.

Isotropic linear elasticity (Lame constants), 27-node quadratic hexahedra with quadratic
geometry, assembled with scikit-fem; the bar is meshed over half its width with u_y = 0 on the
mid-width plane, which keeps the modes symmetric about it (vertical bending and lengthwise
modes) and leaves out twisting and sideways bending.  Vertical bending modes are those with more
kinetic energy in z (through the thickness) than along x.  Slow (seconds per bar): tests only.
"""

import math

import numpy as np


def vertical_bending(xs, hs, width, modulus, poisson, density, modes=3, along=40, across=2, through=3,
                     constants=None):
    """Vertical bending frequencies [Hz] of a bar with a flat top and underside -h(x).

    ``along`` is a count of equal elements along the bar, or the element edges themselves [m]
    (fine at a step, coarse elsewhere).  ``constants`` (cutplan.physics.solid3d.Orthotropic, axes
    x along, y across the width, z through the thickness) replaces the isotropic modulus and
    Poisson's ratio.
    """
    from scipy.sparse.linalg import eigsh
    from skfem import Basis, BilinearForm, ElementHex2, ElementVector, MeshHex, MeshHex2, asm
    from skfem.helpers import ddot, sym_grad, trace

    xs, hs = np.asarray(xs, float), np.asarray(hs, float)
    length = xs[-1]
    edges = np.asarray(along, float) if np.ndim(along) else np.linspace(0, length, along + 1)
    box = MeshHex.init_tensor(edges, np.linspace(0, width / 2, across + 1),
                              np.linspace(0, 1, through + 1))
    straight = MeshHex2.from_mesh(box)
    x, y, eta = straight.doflocs
    basis = Basis(MeshHex2(np.array([x, y, -eta * np.interp(x, xs, hs)]), straight.t),
                  ElementVector(ElementHex2()), intorder=4)
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

    k, m = asm(stiffness, basis), asm(mass, basis)
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

r"""Sideways and twisting modes of a bar (uniform or arched) as a 3-D orthotropic elastic body.

The bar lies along x (length L), its width b along y, its thickness along z; the arch is cut into
the underside (z = 0), so the top face z = t stays flat and the remaining thickness at x is h(x).
The material is orthotropic with its axes on x, y, z (E_x along the grain; E_y, E_z across it;
G_xy, G_xz, G_yz; Poisson ratios nu_xy, nu_xz, nu_yz with nu_ji = nu_ij E_j / E_i).

Twisting and sideways bending are the modes that are odd under the mirror y -> -y (the plane
through the middle of the width): u_x and u_z change sign, u_y does not.  Thickness-direction
bending and stretching are even, and are left to the bending models.  The bar is also symmetric
about its middle x = L/2, so a quarter of it (0 <= x <= L/2, 0 <= y <= b/2) is meshed and solved
twice, with the mid-length plane even (u_x = 0: sideways modes 1, 3, ..., twisting 2, 4, ...)
and odd (u_y = u_z = 0: sideways 2, 4, ..., twisting 1, 3, ...).  Each mode is called twisting
or sideways by which motion carries more of its kinetic energy: a rotation theta(x) of the
section about its centroid, or a sideways shift v(x).

Elements are 20-node quadratic serendipity bricks (scikit-fem ``ElementHexS2``) on a structured
mesh whose nodes follow the arch through the thickness; element edges fall on the arch's ends.
On an arched marimba bar the 27-node triquadratic brick (``ElementHex2``) gives the same modes
within 0.3 cent on the same mesh at three to four times the cost.  :data:`PRODUCT_MESH` keeps
twisting mode 1 within about 5 cents and sideways mode 1 within 1 cent of a mesh about twice as
fine in every direction; the tests check it against an independent model (27-node bricks, the
whole length, no mid-length symmetry, a finer mesh) and ``bench/bench_side_modes.py`` prints
the mesh study and the cost per bar.

References
----------
.. [1] Zienkiewicz, O. C., Taylor, R. L. and Zhu, J. Z., The Finite Element Method: Its Basis and
   Fundamentals, 7th ed., Butterworth-Heinemann, 2013, ch. 6 (3-D elasticity) and ch. 16
   (symmetry of structures: a symmetric body's modes split into even and odd sets).
.. [2] Lekhnitskii, S. G., Theory of Elasticity of an Anisotropic Body, Mir, 1981 (the
   orthotropic compliance matrix and the reciprocity nu_ij / E_i = nu_ji / E_j).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

# scikit-fem and scipy.sparse are imported where used: a chime plan (0.72 s CPU) never needs them; at the top they add 0.9 s (measured)
import numpy as np

from cutplan.physics.blas import single_thread

__all__ = ["PRODUCT_MESH", "TOLERANCE", "Orthotropic", "SideModes", "solve_side_modes"]

PRODUCT_MESH = (20, 3, 2)
"""Elements along the half-length, across the half-width and through the thickness [-]."""
TOLERANCE = 1e-9
"""Lanczos stops when each mode's residual is this small against its value [-]: on the 49 arched
bars of a four-octave set the side modes stay within 1e-9 cent of the modes solved to machine
precision, for a fifth fewer solves (measured); they are compared in windows of cents."""


@dataclass(frozen=True)
class Orthotropic:
    """Elastic constants on the bar's axes x (length), y (width), z (thickness) [Pa, -]."""

    e_x: float
    e_y: float
    e_z: float
    g_xy: float
    g_xz: float
    g_yz: float
    nu_xy: float
    nu_xz: float
    nu_yz: float

    @classmethod
    def isotropic(cls, modulus, poisson):
        g = modulus / (2 * (1 + poisson))
        return cls(modulus, modulus, modulus, g, g, g, poisson, poisson, poisson)

    def normal_stiffness(self):
        """The 3 x 3 block of the stiffness matrix relating normal stresses to normal strains [Pa]."""
        ex, ey, ez = self.e_x, self.e_y, self.e_z
        s = np.array([
            [1 / ex, -self.nu_xy / ex, -self.nu_xz / ex],
            [-self.nu_xy / ex, 1 / ey, -self.nu_yz / ey],
            [-self.nu_xz / ex, -self.nu_yz / ey, 1 / ez],
        ])
        if np.min(np.linalg.eigvalsh(s)) <= 0:
            raise ValueError("these elastic constants are not a stable material (compliance not positive)")
        return np.linalg.inv(s)


@dataclass(frozen=True)
class SideModes:
    """Sideways and twisting frequencies [Hz] of one bar, each in ascending order."""

    sideways: tuple[float, ...]
    twisting: tuple[float, ...]


def _axis(length, n):
    return np.linspace(0.0, length, n + 1)


def _half_length_axis(length, arch_fraction, n):
    """x stations on 0..L/2 with a station at the arch's end (the profile's kink)."""
    a = (1 - arch_fraction) * length / 2 if arch_fraction > 0 else 0.0
    if a <= 1e-9 * length or arch_fraction <= 0:
        return _axis(length / 2, n)
    n_end = max(1, round(n * a / (length / 2)))
    n_arch = max(2, n - n_end)
    return np.concatenate([np.linspace(0.0, a, n_end + 1), np.linspace(a, length / 2, n_arch + 1)[1:]])


def _mesh(xs, width_edges, thickness, h, nz):
    """Structured hex mesh; z of each node follows the remaining thickness h(x) (top face flat)."""
    from skfem import MeshHex

    zeta = np.linspace(0.0, 1.0, nz + 1)
    mesh = MeshHex.init_tensor(xs, width_edges, zeta)
    p = mesh.p.copy()
    p[2] = thickness - h(p[0]) * (1.0 - p[2])
    return MeshHex(p, mesh.t)


def _assemble(basis, constants, density, block=128):
    """Global stiffness and mass matrices, DOF 3 n + i for component i at scalar DOF n.

    scikit-fem supplies the mesh, the elements, their mapping and quadrature; the element matrices
    are formed here with numpy over blocks of elements (several times faster than scikit-fem's
    Python-level loop over basis pairs for a 27-node brick; ``bench/bench_side_modes.py``).
    """
    from scipy.sparse import csr_matrix

    c = constants.normal_stiffness()
    d = np.zeros((6, 6))  # Voigt order xx, yy, zz, xy, xz, yz (engineering shear strains)
    d[:3, :3] = c
    d[3, 3], d[4, 4], d[5, 5] = constants.g_xy, constants.g_xz, constants.g_yz
    grads = np.stack([phi[0].grad for phi in basis.basis])  # (a, k, e, q)
    values = np.stack([np.asarray(phi[0]) for phi in basis.basis])  # (a, e, q)
    dofs = basis.element_dofs  # (a, e)
    n_a, n_e = dofs.shape
    pairs = ((0, 1), (0, 2), (1, 2))
    k_data, m_data = [], []
    for start in range(0, n_e, block):
        sl = slice(start, min(start + block, n_e))
        g = grads[:, :, sl]
        w = basis.dx[sl]
        b = np.zeros(w.shape + (n_a, 3, 6))  # (e, q, a, i, v): strain v of shape function a along i
        for i in range(3):
            b[..., i, i] = g[:, i].transpose(1, 2, 0)
        for v, (k, l) in enumerate(pairs, start=3):
            b[..., k, v] = g[:, l].transpose(1, 2, 0)
            b[..., l, v] = g[:, k].transpose(1, 2, 0)
        b = b.reshape(w.shape + (3 * n_a, 6))
        db = (b @ d) * w[..., None, None]
        # sum over quadrature points and strains as one batched matrix product per element
        x = b.transpose(0, 2, 1, 3).reshape(w.shape[0], 3 * n_a, -1)
        y = db.transpose(0, 2, 1, 3).reshape(w.shape[0], 3 * n_a, -1)
        ke = x @ y.transpose(0, 2, 1)
        me_scalar = density * np.einsum("aeq,beq,eq->eab", values[:, sl], values[:, sl], w)
        me = np.einsum("eab,ij->eaibj", me_scalar, np.eye(3)).reshape(-1, 3 * n_a, 3 * n_a)
        k_data.append(ke.ravel())
        m_data.append(me.ravel())
    size = 3 * basis.N
    inverse, indices, indptr = _pattern(dofs.tobytes(), dofs.dtype.str, dofs.shape, size)
    # the entries of every element summed into the matrices' one shared pattern (the same mesh
    # sizes give the same pattern, so it is worked out once per process)
    k = csr_matrix((np.bincount(inverse, np.concatenate(k_data), indices.size), indices, indptr), shape=(size, size))
    m = csr_matrix((np.bincount(inverse, np.concatenate(m_data), indices.size), indices, indptr), shape=(size, size))
    m.eliminate_zeros()  # the components do not couple in the mass matrix
    return k, m


@lru_cache(maxsize=4)
def _pattern(dofs_bytes, dtype, shape, size):
    """(where each element-matrix entry goes among the stored entries, CSR indices, CSR indptr) of
    the global matrices for the element DOFs (a, e) given as bytes, dtype and shape, elements in order
    and each element's entries row by row in the order :func:`_assemble` makes them."""
    dofs = np.frombuffer(dofs_bytes, dtype=dtype).reshape(shape).astype(np.int64)
    n_a = shape[0]
    vec = (3 * dofs.T[:, :, None] + np.arange(3)).reshape(-1, 3 * n_a)  # (e, 3 a)
    flat = (vec[:, :, None] * size + vec[:, None, :]).ravel()
    # np.unique(flat, return_inverse=True) by a sort: the same arrays, many times faster than its
    # hashing on these millions of entries (numpy 2; 2.8 against 0.3 s on the checks' 27-node mesh)
    order = np.argsort(flat, kind="stable")
    ordered = flat[order]
    new = np.empty(flat.size, dtype=bool)
    new[:1] = True
    np.not_equal(ordered[1:], ordered[:-1], out=new[1:])
    keys = ordered[new]
    inverse = np.empty(flat.size, dtype=np.intp)
    inverse[order] = np.cumsum(new) - 1
    rows = keys // size
    return inverse, keys % size, np.searchsorted(rows, np.arange(size + 1))


def solve_side_modes(length, width, thickness, h, constants, density, arch_fraction=0.0, modes=6,
                     mesh=PRODUCT_MESH, symmetry=True, element="hex20"):
    """Sideways and twisting frequencies [Hz] of a free bar, 3-D finite elements.

    Parameters
    ----------
    length, width, thickness : float
        L, b, t of the blank [m].
    h : callable
        Remaining thickness h(x) [m] at x [m] from one end (vectorised); ``lambda x: t + 0 * x``
        for a uniform bar.
    constants : Orthotropic
        Elastic constants on the bar's axes.
    density : float
        rho [kg/m^3].
    arch_fraction : float
        Fraction of the length the arch spans [-] (0 for none): an element edge is put at its end.
    modes : int
        Modes of each kind kept [-].
    mesh : (int, int, int)
        Elements along the half-length, across the half-width and through the thickness
        (``symmetry=False`` doubles the first two, so the mesh size is the same).
    symmetry : bool
        Solve a quarter twice (even and odd about mid-length); False solves the half bar odd in
        y only, over its whole length (the independent check).
    element : str
        "hex20" (20-node serendipity quadratic brick, the product's) or "hex27" (27-node
        triquadratic Lagrange brick, used by the independent check).

    Returns
    -------
    SideModes
    """
    from scipy.sparse.linalg import LinearOperator, eigsh, splu
    from skfem import Basis, ElementHex2, ElementHexS2


    nx, ny, nz = mesh
    half_x = _half_length_axis(length, arch_fraction, nx)
    xs = half_x if symmetry else np.concatenate([half_x, (length - half_x[::-1])[1:]])
    m = _mesh(xs, _axis(width / 2, ny), thickness, h, nz)
    basis = Basis(m, {"hex27": ElementHex2, "hex20": ElementHexS2}[element](), intorder=4)
    with single_thread():
        k, mm = _assemble(basis, constants, density)
    # odd in y: u_x = u_z = 0 on the mid-width plane y = 0
    plane = basis.get_dofs(lambda p: np.isclose(p[1], 0.0)).all()
    fixed = [3 * plane, 3 * plane + 2]
    rigid = 3  # y shift, rotation about x, rotation about z
    cases = [([], rigid)]
    if symmetry:
        mid = basis.get_dofs(lambda p: np.isclose(p[0], length / 2)).all()
        # even about mid-length (u_x = 0 there): y shift and x rotation are rigid; odd: z rotation
        cases = [([3 * mid], 2), ([3 * mid + 1, 3 * mid + 2], 1)]
    scale = _frequency_scale(length, width, thickness, constants, density)
    side, twist, ceiling = [], [], math.inf
    for extra, n_rigid in cases:
        d = np.unique(np.concatenate(fixed + extra))
        free = np.setdiff1d(np.arange(k.shape[0]), d)
        kf, mf = k[free][:, free], mm[free][:, free]
        want = n_rigid + (modes + 2 if symmetry else 2 * modes + 4)
        sigma = -(2 * math.pi * scale) ** 2
        with single_thread():
            # shift-invert about a point below the lowest mode; minimum-degree ordering on the
            # symmetric pattern factors these 3-D stiffness matrices several times faster than
            # SuperLU's default column ordering
            lu = splu((kf - sigma * mf).tocsc(), permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0,
                      options={"SymmetricMode": True})
            op = LinearOperator(kf.shape, matvec=lu.solve, dtype=float)
            vals, vecs = eigsh(kf, k=want, M=mf, sigma=sigma, which="LM", OPinv=op,
                               v0=np.ones(kf.shape[0]), tol=TOLERANCE)
        order = np.argsort(vals)[n_rigid:]
        # modes above the highest one found in either half could be missing from the other half
        ceiling = min(ceiling, math.sqrt(max(vals[order[-1]], 0.0)) / (2 * math.pi))
        for j in order:
            u = np.zeros(k.shape[0])
            u[free] = vecs[:, j]
            f = math.sqrt(max(vals[j], 0.0)) / (2 * math.pi)
            (twist if _is_twisting(basis, u, thickness, h) else side).append(f)
    side = [f for f in sorted(side) if f <= ceiling][:modes]
    twist = [f for f in sorted(twist) if f <= ceiling][:modes]
    return SideModes(tuple(side), tuple(twist))


def _frequency_scale(length, width, thickness, c, density):
    """A frequency near the lowest side mode [Hz], where the shift-invert solve is centred."""
    return 0.1 * math.sqrt(c.g_xy / density) * min(width, thickness) / (length * max(width, thickness))


def _is_twisting(basis, u, thickness, h):
    """True when rotation of the sections carries more kinetic energy than their sideways shift."""
    p = basis.doflocs
    uy, uz = u[1::3], u[2::3]
    y, z = p[1], p[2]
    off = y > 1e-6 * np.max(y)
    theta = uz[off] / y[off]
    zc = thickness - h(p[0][off]) / 2
    v = uy[off] + theta * (z[off] - zc)
    e_twist = np.sum(theta**2 * (y[off] ** 2 + (z[off] - zc) ** 2))
    e_side = np.sum(v**2)
    return bool(e_twist > e_side)

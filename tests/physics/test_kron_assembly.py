"""The fast assembly of the 2-D bar's matrices against scikit-fem's own assembly (an independent
method: its form assembly over the same basis, combined with scipy's Kronecker product)."""

import numpy as np
import pytest
from scipy.sparse import kron
from skfem import Basis, BilinearForm, ElementQuad2, MeshQuad, MeshQuad2

from cutplan.physics import elastic2d, undercut, width_terms


def _basis(nx, ny):
    """A mapped quadratic side-view mesh of an arched bar (the solver's own mesh)."""
    xs = np.linspace(0.0, 0.4, 41)
    hs = undercut.arch_thickness(xs, 0.4, 0.024, 0.016, 0.5, 2.0)
    p, t = elastic2d._mesh(xs, hs, nx, ny)
    straight = MeshQuad2.from_mesh(MeshQuad(p, t))
    x, eta = straight.doflocs
    return Basis(MeshQuad2(np.array([x, -eta * np.interp(x, xs, hs)]), straight.t), ElementQuad2(), intorder=4)


def _scalar(basis, i, j):
    """The scalar matrix of kinds i, j (value, d/dx, d/dz) by scikit-fem's form assembly."""
    def kind(w, k):
        return w if k == 0 else w.grad[k - 1]

    return BilinearForm(lambda u, v, w: kind(u, j) * kind(v, i)).assemble(basis)


@pytest.mark.parametrize("mesh, fields", [((6, 2), 3), ((9, 3), 8), ((elastic2d.ELEMENTS_ALONG, 2), 2)])
def test_kron_assembly_matches_form_assembly_with_kronecker_products(mesh, fields):
    basis = _basis(*mesh)
    rng = np.random.default_rng(7)
    coefficients = rng.standard_normal((3, 3, fields, fields))
    coefficients[1, 2] = 0.0  # a kind pair left out is left out of the sum
    mass = rng.standard_normal((fields, fields))
    k, m = width_terms.kron_assemble(basis, coefficients, mass)
    want_k = sum(kron(_scalar(basis, i, j), coefficients[i, j]) for i in range(3) for j in range(3))
    want_m = kron(_scalar(basis, 0, 0), mass)
    scale = abs(want_k).max()
    assert abs(k - want_k).max() < 1e-12 * scale
    assert abs(m - want_m).max() < 1e-12 * abs(want_m).max()
    assert k.format == m.format == "csc" and k.has_sorted_indices

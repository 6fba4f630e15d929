"""The 3-D reference solid of the tests (tests/physics/solid3d.py) integrates its matrices over all
basis pairs at once, from the scalar basis's gradient products; here they are checked against
scikit-fem's own bilinear forms on the vector basis, written out from the strain energy
(isotropic with the Lame constants, and orthotropic), on a small mesh."""

import numpy as np
import pytest
from skfem import Basis, ElementHex2, ElementVector, MeshHex, MeshHex2

from cutplan.materials import load_library
from cutplan.physics.solid3d import Orthotropic
from cutplan.planning import grain
from tests.physics.solid3d import assemble, assemble_with_forms, bar_basis, components, material_matrix

# flat-sawn sugar maple on the bar's axes, from the packaged table (Wood Handbook 2010, Tables 5-1
# and 5-2); the values only need to be a valid orthotropic body here
MAPLE = Orthotropic(*grain.axis_constants(load_library().materials["maple-sugar"], "flat", "elastic-2d"))


def _bases():
    """Two quadratic bricks of a bar whose underside slopes, as the reference meshes its bars: the
    scalar basis the reference assembles on, and the vector basis of scikit-fem's forms."""
    xs, hs = [0.0, 0.07], [0.02, 0.02 - 0.1 * 0.07]
    scalar = bar_basis(xs, hs, 0.04, [0.0, 0.03, 0.07], 1, 1)
    box = MeshHex.init_tensor(np.array([0.0, 0.03, 0.07]), np.array([0.0, 0.02]), np.array([0.0, 1.0]))
    straight = MeshHex2.from_mesh(box)
    x, y, eta = straight.doflocs
    vector = Basis(MeshHex2(np.array([x, y, -eta * (0.02 - 0.1 * x)]), straight.t), ElementVector(ElementHex2()),
                   intorder=4)
    return scalar, vector


def _same_unknowns(scalar, vector):
    """For each unknown of the reference (component c at a node), the vector basis's unknown of that
    component at the node at the same place."""
    def key(points):
        return [tuple(p) for p in np.round(points.T, 12)]

    out = []
    for c, dofs in enumerate(vector.split_indices()):
        where = {k: d for k, d in zip(key(vector.doflocs[:, dofs]), dofs, strict=True)}
        out.extend(where[k] for k in key(scalar.doflocs))
    return np.array(out)


@pytest.mark.parametrize("poisson, constants", [(0.33, None), (0.3, MAPLE)])
def test_the_reference_solid_assembles_what_the_bilinear_forms_give(poisson, constants):
    scalar, vector = _bases()
    assert np.array_equal(np.concatenate(components(scalar)), np.arange(3 * scalar.N))
    k, m = assemble(scalar, material_matrix(68.9e9, poisson, constants), 2700.0)
    k_forms, m_forms = assemble_with_forms(vector, 68.9e9, poisson, 2700.0, constants)
    same = _same_unknowns(scalar, vector)
    assert sorted(same) == list(range(vector.N))
    for mine, theirs in ((k, k_forms), (m, m_forms)):
        theirs = theirs[same][:, same]
        assert abs(mine - theirs).max() <= 1e-12 * abs(theirs).max()

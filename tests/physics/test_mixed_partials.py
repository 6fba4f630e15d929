"""Short, wide arched bars: which solved mode is bending partial n when bending along the bar mixes
with bending across its width, checked against a 3-D solid and against plane stress (which has no
width modes to mix with)."""

import math
from functools import lru_cache

import numpy as np
import pytest

from cutplan.materials import load_library
from cutplan.physics.undercut2d import arch_stations
from cutplan.planning import grain
from cutplan.planning.frequency import plane_constants

# Two bars of a four-octave flat-sawn rosewood set tuned 1:4 (the set of bench/bench_elastic2d.py,
# as planned when this was written): F#6, 135.16 mm long, 40 x 24 mm, arch over the middle half
# cut 17.09 mm deep; E5, 247.73 mm long, 55 x 24 mm, cut 15.26 mm deep.  Before partials were
# told by shape, they printed partials 3 and 4 as 41964 and 84825 Hz (F#6) and 8968 and 11770 Hz
# (E5): the real partial 3 failed the old "half its energy in bending" test and was skipped.
BARS = {"F#6": (0.13516, 0.01709, 0.040), "E5": (0.24773, 0.01526, 0.055),
        "F#6 wide": (0.13433, 0.01716, 0.055)}
"""(length, centre depth, width) [m]; "F#6 wide" is F#6 planned 55 mm wide (a bar that plans, with
a mode across its width near its tuned second partial)."""
SHORT = ("E5", "F#6")
THICKNESS = 0.024
MESH = (40, 2, 3)
"""3-D mesh: quadratic bricks along, across the half width, through (about 2 CPU s a bar)."""


def cents(a, b):
    return 1200 * math.log2(a / b)


def profile(note):
    length, depth, width = BARS[note]
    xs, hs = arch_stations(length, THICKNESS, depth, 0.5, 2.0)
    return xs, hs, width


def rosewood():
    return load_library().materials["rosewood-honduras"]


@lru_cache(maxsize=4)
def planar(note, resolved=True):
    """The 2-D body's solve (width resolved, as bars are designed; or plane stress)."""
    xs, hs, width = profile(note)
    body = plane_constants(rosewood(), "flat")
    return (body if resolved else body.plane_stress()).modes(xs, hs, width, modes=4)


@lru_cache(maxsize=4)
def solid(note):
    """[(Hz, bending share, lengthwise share, nodes)] of the 3-D solid (tests/physics/solid3d.py's
    bricks and matrices, half the width, symmetric about mid-width as the 2-D body is): the shares
    are the kinetic energy of the width-mean u_z (u_x) over the mode's, the nodes the sign changes
    of the width-mean u_z along the top."""
    from scipy.sparse.linalg import eigsh

    from tests.physics.solid3d import assemble, bar_basis, components, material_matrix

    xs, hs, width = profile(note)
    along, across, through = MESH
    mat = rosewood()
    constants = grain.solid_constants(mat, "flat", "elastic-2d")
    basis = bar_basis(xs, hs, width, np.linspace(0, xs[-1], along + 1), across, through)
    k, m = assemble(basis, material_matrix(None, None, constants), mat.density)
    comps = components(basis)
    fixed = comps[1][np.isclose(basis.doflocs[1], 0.0)]
    free = np.setdiff1d(np.arange(k.shape[0]), fixed)
    omega1 = 22.373 / xs[-1] ** 2 * math.sqrt(constants.e_x * hs.min() ** 2 / 12 / mat.density)
    vals, vecs = eigsh(k[free][:, free].tocsc(), k=24, M=m[free][:, free].tocsc(), sigma=-0.25 * omega1**2,
                       v0=np.ones(free.size))
    order = np.argsort(vals)
    full = np.zeros((k.shape[0], vals.size))
    full[free] = vecs[:, order]
    px, py, pz = basis.doflocs
    # the width mean of a quadratic field: Simpson's rule on each element across (exact for it)
    ys = np.unique(py.round(12))
    weights = np.zeros(ys.size)
    for e in range(across):
        weights[2 * e:2 * e + 3] += np.array([1.0, 4.0, 1.0]) / (6 * across)
    _, line = np.unique(np.stack([px.round(12), pz.round(12)]), axis=1, return_inverse=True)
    line = line.ravel()
    w_y = weights[np.searchsorted(ys, py.round(12))]
    top = np.isclose(pz, 0.0) & np.isclose(py, 0.0)
    top_order = np.argsort(px[top])
    out = []
    total = np.einsum("ij,ij->j", full, m @ full)
    for j in range(vals.size):
        if vals[order[j]] < 1e-6 * omega1**2:
            continue
        shares, means = [], []
        for c in (2, 0):
            mean = np.bincount(line, weights=w_y * full[comps[c], j])[line]
            v = np.zeros(k.shape[0])
            v[comps[c]] = mean
            shares.append(v @ (m @ v) / total[j])
            means.append(mean)
        w = means[0][top][top_order]
        nodes = int(np.count_nonzero((w[:-1] == 0) | (w[:-1] * w[1:] < 0)))
        out.append((math.sqrt(vals[order[j]]) / (2 * math.pi), shares[0], shares[1], nodes))
    return out


def solid_partial(note, n):
    """(Hz of the 3-D mode that is partial n, [Hz of the other 3-D modes that split it]): among the
    modes with n + 1 nodes that move the width's mean more across than along, the strongest; the
    split ones hold at least half its share within a quarter of it."""
    modes = solid(note)
    same = [(f, s, a) for f, s, a, nodes in modes if nodes == n + 1 and s >= 0.1]
    f, s, _ = max(((f, s, a) for f, s, a in same if s >= a), key=lambda t: t[1])
    return f, [g for g, t, _ in same if g != f and t >= 0.5 * s and abs(math.log(g / f)) < math.log(1.25)]


@pytest.mark.parametrize("note", SHORT)
def test_partials_one_to_three_are_the_3d_solids_modes_of_the_same_shape(note):
    # Independent model: the 3-D orthotropic solid (mesh 40 x 2 x 3 quadratic bricks over half the
    # width).  Measured when written, 2-D against 3-D: F#6 1480/1481, 5920/5926, 13501/13507 Hz;
    # E5 660/660, 2638/2639, 5747/5746 Hz.  The 3-D mesh is about 0.1 % stiff (a 60 x 4 x 4 mesh
    # gives 13496 Hz for F#6's third), so 0.3 % (5 cents) is the tolerance.
    got = planar(note).frequencies
    for n in (1, 2, 3):
        assert abs(cents(got[n - 1], solid_partial(note, n)[0])) < 5.0, (n, got)


@pytest.mark.parametrize("note", SHORT)
def test_a_split_third_partial_is_split_in_the_3d_solid_too(note):
    # The 3-D solid shares partial 3 between two modes of comparable strength, F#6 13507 and 15317
    # Hz (bending shares 0.42 and 0.38), E5 5746 and 5483 Hz (0.40 and 0.30); the 2-D body names
    # the same second mode (15313 and 5484 Hz when written) as splitting partial 3.
    partner_3d = solid_partial(note, 3)[1]
    partner_2d = [f for f in planar(note).longitudinal if f.partial == 3 and f.kind == "cross-width"]
    assert len(partner_3d) >= 1 and len(partner_2d) == 1
    assert min(abs(cents(partner_2d[0], g)) for g in partner_3d) < 5.0


def test_partial_four_of_the_short_bar_lies_in_the_3d_solids_split():
    # The 3-D solid splits F#6's partial 4 between 19745 and 20268 Hz (shares 0.29 and 0.53 on the
    # 40 x 2 x 3 mesh; 19642 and 20199 Hz, 0.23 and 0.61, on a 60 x 4 x 4 mesh): which of the two is
    # stronger depends on how well the width's bending is resolved.  The 2-D body (order-2 terms
    # across the width) gives 19863 Hz, inside the 3-D split, 35 cents (2 %) from the 3-D stronger
    # mode when written (40 allowed); its other mode of that shape, 20347 Hz, is named as splitting
    # partial 4.
    got = planar("F#6")
    stronger, others = solid_partial("F#6", 4)
    span = sorted([stronger, *others])
    assert span[0] * 0.995 < got.frequencies[3] < span[-1] * 1.005
    assert abs(cents(got.frequencies[3], stronger)) < 40.0
    assert any(f.partial == 4 for f in got.longitudinal)


@pytest.mark.parametrize("note", SHORT)
def test_partials_three_and_four_sit_where_plane_stress_puts_the_unmixed_bending(note):
    # Plane stress has no width modes, so its partials 3 and 4 are bending alone (F#6 14250 and
    # 19855 Hz, E5 5622 and 8931 Hz when written): the mixed partial and the mode that splits it
    # lie either side of it (the two repel), within 10 %; the old answers (41964, 84825 Hz for F#6,
    # 8968 Hz as E5's partial 3) were partials 6 and 9, and 4.
    plane = planar(note, resolved=False).frequencies
    got = planar(note)
    for n in (3, 4):
        assert abs(math.log(got.frequencies[n - 1] / plane[n - 1])) < math.log(1.10), n
    partner = [f for f in got.longitudinal if f.partial == 3][0]
    assert min(partner, got.frequencies[2]) < plane[2] < max(partner, got.frequencies[2])
    assert list(got.frequencies) == sorted(got.frequencies)


def test_the_cross_width_mode_near_a_tuned_partial_is_in_the_3d_solid():
    # F#6 planned 55 mm wide: the 2-D body has a mode across the width at 5997 Hz, 23 cents above
    # the tuned second partial (5920 Hz), which the plan warns of.  The 3-D solid has it at 5992
    # Hz (bending share 0.001: not a bending mode), 18 cents above its own partial 2 (5926 Hz).
    got = planar("F#6 wide")
    p2 = got.frequencies[1]
    near = [f for f in got.longitudinal if f.kind == "cross-width" and abs(cents(f, p2)) < 30.0]
    assert len(near) == 1
    solid_near = [f for f, s, a, _ in solid("F#6 wide") if s < 0.1 and abs(cents(f, near[0])) < 5.0]
    assert len(solid_near) == 1
    assert abs(cents(solid_near[0], solid_partial("F#6 wide", 2)[0])) < 30.0


def test_the_other_modes_keep_their_kind_when_a_solve_is_handed_to_another_process():
    # The memo's solves travel between test workers and processes by pickle (remembered_solves);
    # a plain float would lose what kind of mode it is and the partial it splits.
    import pickle

    got = pickle.loads(pickle.dumps(planar("F#6")))
    assert got == planar("F#6")
    assert [(f.kind, f.partial) for f in got.longitudinal] == [(f.kind, f.partial) for f in planar("F#6").longitudinal]

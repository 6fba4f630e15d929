"""The uniform-beam solves of a few pieces run in plain floats (:data:`cutplan.physics.uniform.FEW_IN_FLOATS`)
and give what the array solver gives: the same Illinois steps on the same determinant (Dowell and
Jarratt, BIT 11, 1971), so the same roots; bit for bit where numpy's cosh, sinh, cos and sin are
the C library's (as on the x86-64 machines this was measured on), to about 1e-13 (some hundreds
of units in the last place) elsewhere.  The oracle is the array solver itself, forced for every bracket."""

import numpy as np
import pytest

from cutplan.physics import roots, uniform

RTOL = 1e-13
"""Agreement asked for [-]: about 1e-13 of a root, some hundreds of units in the last place (bit for
bit where measured)."""

# shear and rotary-inertia parameters from slender (a long chime) to stubby (length under four
# depths), fixed seed; the cases the planner, the other-modes check and the reach check ask for
_RNG = np.random.default_rng(20261203)
SECTIONS = [(10 ** _RNG.uniform(-6, -0.7), 10 ** _RNG.uniform(-1.3, 0)) for _ in range(24)]


def _arrays_only(monkeypatch):
    monkeypatch.setattr(uniform, "FEW_IN_FLOATS", 0)


@pytest.mark.parametrize("modes", [1, 4, 6])
def test_a_few_pieces_modes_in_floats_are_the_array_solvers(monkeypatch, modes):
    floats = [uniform.omegas.__wrapped__(g, g * r, modes) for g, r in SECTIONS]
    _arrays_only(monkeypatch)
    arrays = [uniform.omegas.__wrapped__(g, g * r, modes) for g, r in SECTIONS]
    for a, b in zip(floats, arrays, strict=True):
        np.testing.assert_allclose(a, b, rtol=RTOL, atol=0)


def test_fundamentals_lengths_and_nodes_in_floats_are_the_array_solvers(monkeypatch):
    g = np.array([g for g, _ in SECTIONS[:5]])
    s2 = np.array([g * r for g, r in SECTIONS[:5]])
    # a 1 in x 0.065 in aluminium tube (EI, mu, kappa G A, rho I in SI), targets 300 Hz to 3 kHz
    # (I = pi/64 (D^4 - d^4) = 8.73e-9 m^4, A = pi/4 (D^2 - d^2) = 1.23e-4 m^2; shear coefficient kappa 0.53)
    tube = (68.9e9 * 8.73e-9, 0.333, 0.53 * 26e9 * 1.23e-4, 2700 * 8.73e-9)
    targets = np.geomspace(300.0, 3000.0, 5)

    def solve():
        om = uniform.fundamental_omegas.__wrapped__(g, s2)
        return (om, uniform.fundamental_nodes.__wrapped__(om, g, s2),
                uniform.fundamental_lengths.__wrapped__(targets, *tube),
                uniform.fundamental_lengths.__wrapped__(targets[:1], *tube))

    floats = solve()
    _arrays_only(monkeypatch)
    for a, b in zip(floats, solve(), strict=True):
        np.testing.assert_allclose(a, b, rtol=RTOL, atol=0)


def test_bracketed_roots_one_at_a_time_match_the_arrays():
    # cos x cosh x = 1 (the free-free beam's frequency equation; Blevins, Formulas for Natural
    # Frequency and Mode Shape, 1979, table 8-1): beta_n L = 4.73004, 7.85320, 10.99561
    lo, hi = np.array([4.2, 7.4, 10.5]), np.array([5.2, 8.4, 11.5])
    each = roots.bracketed_roots_each(lambda x, _k: np.cos(x) - 1.0 / np.cosh(x), lo, hi)
    arrays = roots.bracketed_roots(lambda x, _k: np.cos(x) - 1.0 / np.cosh(x), lo, hi)
    np.testing.assert_array_equal(each, arrays)  # numpy's own cos and cosh on both sides
    np.testing.assert_allclose(each, [4.73004, 7.85320, 10.99561], atol=5e-6)

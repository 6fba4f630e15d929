"""The closed-form solvers remember answers for the same arguments: a remembered answer is the
very answer a fresh solve gives (bit for bit), a caller's change to its copy never reaches the next
caller, and a refusal is given again every time.

Oracles: Blevins, Formulas for Natural Frequency and Mode Shape, 1979, Table 8-1 (free-free
slender beam, (beta_n L)^2 = 22.3733, 61.6728, 120.9034, 199.8594); the unremembered solver
(``__wrapped__``) for bit-for-bit identity.
"""

import numpy as np
import pytest

from cutplan.physics import undercut, uniform
from cutplan.physics.remember import remembered


def test_a_remembered_answer_is_the_fresh_solve_bit_for_bit():
    rng = np.random.default_rng(3)
    g, s2 = rng.uniform(1e-4, 0.05, 7), rng.uniform(1e-5, 0.02, 7)
    for fn, args in ((uniform.omegas, (g, s2, 4)), (uniform.fundamental_omegas, (g, s2)),
                     (uniform.fundamental_lengths, (np.linspace(300.0, 2000.0, 7), 12.0, 0.8, 4e6, 3e-6))):
        fresh = fn.__wrapped__(*args)
        first, again = fn(*args), fn(*args)
        assert first.tobytes() == fresh.tobytes() and again.tobytes() == fresh.tobytes()


def test_a_caller_changing_its_answer_does_not_change_the_next_one():
    first = uniform.omegas(0.0, 0.0, 4)
    first[:] = 0.0
    # Blevins 1979, Table 8-1: (beta_n L)^2 of the free-free slender beam
    assert uniform.omegas(0.0, 0.0, 4)[0] == pytest.approx([22.3733, 61.6728, 120.9034, 199.8594], rel=2e-6)


def test_a_refusal_and_a_non_finite_answer_are_not_kept():
    calls = []

    @remembered(4)
    def shaky(x):
        calls.append(x)
        if x < 0:
            raise ValueError("negative")
        return np.array([np.inf if x == 0 else x])

    for _ in range(2):
        with pytest.raises(ValueError):
            shaky(-1.0)
        assert np.isinf(shaky(0.0)[0])
        assert shaky(2.0)[0] == 2.0
    assert calls == [-1.0, 0.0, 2.0, -1.0, 0.0]  # only the finite answer is remembered


def test_equal_looking_arguments_of_other_bits_are_other_questions():
    calls = []

    @remembered(4)
    def sign_of(x):
        calls.append(x)
        return np.copysign(1.0, np.asarray([x]))

    assert sign_of(0.0)[0] == 1.0 and sign_of(-0.0)[0] == -1.0  # IEEE 754: -0.0 keeps its sign bit
    assert len(calls) == 2


def test_an_arched_bar_solve_is_remembered_as_a_fresh_copy():
    # inputs only (a 450 x 50 x 22 mm wooden blank, no arch); the oracle is the unremembered solve
    args = (0.45, 0.05, 0.022, 0.0, 0.5, 12e9, 0.8e9, 700.0, 5 / 6)
    fresh = undercut.bar_modes.__wrapped__(*args, modes=3)
    first = undercut.bar_modes(*args, modes=3)
    first.frequencies[:] = 0.0
    first.deflection[:] = 0.0
    again = undercut.bar_modes(*args, modes=3)
    for name in ("frequencies", "x", "deflection"):
        assert getattr(again, name).tobytes() == getattr(fresh, name).tobytes()

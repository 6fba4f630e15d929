"""The 3-D side-mode solves a process remembers can be handed to another (as the test workers and
the page's worker processes do with the 2-D solves): the process that takes them answers with the
very values the first one solved, bit for bit, and solves nothing itself."""

from __future__ import annotations

import pickle

import pytest

from cutplan.materials import load_library
from cutplan.physics import side_modes, solid3d
from cutplan.planning import grain

# an arched marimba-like bar, 400 x 55 x 24 mm, a parabolic arch 14 mm deep over the middle half;
# the values only need to be a valid bar here: the check is sameness, not accuracy
ARCHED = (0.40, 0.055, 0.024, 0.014, 0.5, 2.0)


@pytest.fixture
def memo_kept():
    """The 3-D solves this process remembered before the test, put back after it (the test empties
    the memo; later tests that plan the examples again then still find them)."""
    kept = side_modes.remembered_side_modes()
    yield
    side_modes.forget_side_modes()
    side_modes.remember_side_modes(kept)


def test_solves_handed_to_a_fresh_memo_are_the_same_and_not_solved_again(memo_kept, monkeypatch):
    maple = load_library().materials["maple-sugar"]
    constants = grain.solid_constants(maple, "flat")
    side_modes.forget_side_modes()
    arched = side_modes.solid_side_modes(*ARCHED, constants, maple.density, 3)
    stiffening = side_modes.twisting_stiffening(0.055, 0.024, constants, maple.density)
    assert side_modes.solid_side_modes(*ARCHED, constants, maple.density, 3) is arched  # remembered here
    handed = pickle.loads(pickle.dumps(side_modes.remembered_side_modes()))  # as the workers hand them on
    assert len(handed) == 2  # the arched bar's solve and its section's stiffening fit

    side_modes.forget_side_modes()  # a fresh process

    def no_solve(*args, **kwargs):
        raise AssertionError("a handed-on solve was solved again")

    monkeypatch.setattr(solid3d, "solve_side_modes", no_solve)
    side_modes.remember_side_modes(handed)
    again = side_modes.solid_side_modes(*ARCHED, constants, maple.density, 3)
    assert again == arched and again.sideways == arched.sideways and again.twisting == arched.twisting
    assert side_modes.twisting_stiffening(0.055, 0.024, constants, maple.density) == stiffening
    with pytest.raises(AssertionError, match="solved again"):  # another bar is not among them
        side_modes.solid_side_modes(0.39, *ARCHED[1:], constants, maple.density, 3)

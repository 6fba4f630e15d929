"""The 2-D solver remembers its recent solves: the same inputs give the very same answer, any
change of input is solved afresh, and a design planned twice gives byte-identical output."""

from __future__ import annotations

import pytest

import cutplan
from cutplan.physics import elastic2d
from cutplan.render.table import render_json

# a uniform aluminium bar 300 x 25 x 10 mm (E 69 GPa, G 26 GPa, nu 0.33, rho 2700 kg/m^3); the
# values only need to be a valid bar here: the check is sameness, not accuracy
BAR = ([0.0, 0.3], [0.01, 0.01], 0.025, 69e9, 69e9, 26e9, 0.33, 2700.0)


def test_the_same_inputs_give_the_same_answer_and_a_changed_one_is_solved_again():
    first = elastic2d.profile_modes(*BAR, modes=2)
    assert elastic2d.profile_modes(*BAR, modes=2) is first
    thinner = elastic2d.profile_modes(BAR[0], [0.0099, 0.0099], *BAR[2:], modes=2)
    assert thinner is not first and thinner.frequencies[0] < first.frequencies[0]
    assert elastic2d.profile_modes(*BAR, modes=3) is not first


# the music-room marimba's section and arch on its two lowest notes: two arched bars, the second
# started from the first as in any set, show the same as the whole octave at a quarter of the solves
TWO_BARS = {"title": "Two bars for the classroom", "set": [{
    "name": "bars", "kind": "bar", "notes": ["C4", "D4"], "material": "rosewood-honduras",
    "section": {"shape": "bar", "width": "55 mm", "thickness": "24 mm"},
    "undercut": {"ratios": [4.0], "arch_width": 0.5, "min_thickness": "6 mm"}}]}


@pytest.fixture
def memo_kept():
    """The solves this process remembered before the test, put back after it (the test empties
    the memo; later tests that plan the examples again then still find them)."""
    kept = elastic2d.remembered_solves()
    yield
    elastic2d.remember_solves(kept)


def test_a_design_planned_again_gives_byte_identical_output(memo_kept):
    design = cutplan.design_from_mapping(TWO_BARS)
    elastic2d.forget_solves()
    fresh = render_json(cutplan.plan(design))
    again = render_json(cutplan.plan(design))
    assert again == fresh

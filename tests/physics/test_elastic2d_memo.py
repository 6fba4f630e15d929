"""The 2-D solver remembers its recent solves: the same inputs give the very same answer, any
change of input is solved afresh, and a design planned twice gives byte-identical output."""

from __future__ import annotations

import cutplan
from cutplan.physics import elastic2d
from cutplan.render.table import render_json
from tests.conftest import EXAMPLES_DIR

# a uniform aluminium bar 300 x 25 x 10 mm (E 69 GPa, G 26 GPa, nu 0.33, rho 2700 kg/m^3); the
# values only need to be a valid bar here: the check is sameness, not accuracy
BAR = ([0.0, 0.3], [0.01, 0.01], 0.025, 69e9, 69e9, 26e9, 0.33, 2700.0)


def test_the_same_inputs_give_the_same_answer_and_a_changed_one_is_solved_again():
    first = elastic2d.profile_modes(*BAR, modes=2)
    assert elastic2d.profile_modes(*BAR, modes=2) is first
    thinner = elastic2d.profile_modes(BAR[0], [0.0099, 0.0099], *BAR[2:], modes=2)
    assert thinner is not first and thinner.frequencies[0] < first.frequencies[0]
    assert elastic2d.profile_modes(*BAR, modes=3) is not first


def test_a_design_planned_again_gives_byte_identical_output():
    design = cutplan.load_design(str(EXAMPLES_DIR / "music-room-marimba.toml"))
    elastic2d.forget_solves()
    fresh = render_json(cutplan.plan(design))
    again = render_json(cutplan.plan(design))
    assert again == fresh

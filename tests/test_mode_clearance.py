"""The set key ``mode_clearance``: how near a tuned partial another mode is flagged [cents].

The bar is the quarter-sawn sugar-maple F4 of test_other_modes, whose first twisting mode lies
26 cents from a tuned partial (that test's figure, from the warping-stiffened Saint-Venant model);
the default window is 30 cents (common practice, see cutplan.planning.other_modes).
"""

import pytest
from click.testing import CliRunner

import cutplan
from cutplan.cli import cli
from cutplan.design import DesignErrors

BAR = {"name": "b", "kind": "bar", "notes": ["F4"], "material": "maple-sugar", "grain": "quarter",
       "section": {"shape": "bar", "width": "46 mm", "thickness": "22 mm"}}


def _twisting_flagged(**extra):
    plan = cutplan.plan(cutplan.design_from_mapping({"title": "t", "set": [{**BAR, **extra}]}))
    return any(n.message.startswith("twisting mode 1") for n in plan.pieces[0].warnings)


@pytest.mark.parametrize("value, flagged", [(5, False), ("5 cents", False), (30, True), ("40 cents", True)])
def test_the_design_key_sets_the_window(value, flagged):
    assert _twisting_flagged(mode_clearance=value) is flagged


def test_without_the_key_the_default_window_applies():
    assert _twisting_flagged() is True


@pytest.mark.parametrize("value", [0, -3, 500, "wide", True, [30]])
def test_a_bad_window_is_one_line_naming_the_key(value):
    with pytest.raises(DesignErrors) as info:
        cutplan.design_from_mapping({"set": [{**BAR, "mode_clearance": value}]})
    (err,) = info.value.errors
    assert err.key == "set[1].mode_clearance" and "from 1 to 200" in str(err)


def test_an_air_column_set_refuses_the_key():
    with pytest.raises(DesignErrors) as info:
        cutplan.design_from_mapping({"set": [{"kind": "air-column", "notes": ["C5"],
                                              "section": {"stock": "pvc-sch40-1"}, "mode_clearance": 30}]})
    assert [e.key for e in info.value.errors] == ["set[1].mode_clearance"]


def test_the_command_line_refuses_a_bad_window_with_exit_2(tmp_path):
    path = tmp_path / "d.toml"
    path.write_text('[[set]]\nname = "b"\nkind = "bar"\nnotes = ["F4"]\nmaterial = "maple-sugar"\n'
                    'section = { shape = "bar", width = "46 mm", thickness = "22 mm" }\nmode_clearance = 900\n')
    result = CliRunner().invoke(cli, ["plan", str(path)])
    assert result.exit_code == 2 and "Traceback" not in result.output
    lines = [line for line in result.output.splitlines() if line.strip()]
    assert len(lines) == 1 and "set[1].mode_clearance: 900" in lines[0]

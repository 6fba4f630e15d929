"""The first five minutes: bundled examples from any folder, copies of them, quiet starters."""

from click.testing import CliRunner

import cutplan
from cutplan.cli import cli
from cutplan.starters import STARTERS


def test_examples_lists_every_bundled_design():
    result = CliRunner().invoke(cli, ["examples"])
    assert result.exit_code == 0
    for name in ("porch-chimes", "workshop-marimba", "classroom-pipes"):
        assert name in result.output


def test_new_from_copies_an_example_that_plans(tmp_path):
    target = tmp_path / "mine.toml"
    result = CliRunner().invoke(cli, ["new", "--from", "porch-chimes", str(target)])
    assert result.exit_code == 0, result.output
    assert cutplan.plan(cutplan.load_design(target)).title == "Porch chimes in D pentatonic"


def test_new_from_an_unknown_example_is_one_line_and_exit_2(tmp_path):
    result = CliRunner().invoke(cli, ["new", "--from", "kettle", str(tmp_path / "x.toml")])
    assert result.exit_code == 2
    assert len(result.output.strip().splitlines()) == 1
    assert "--from" in result.output and "porch-chimes" in result.output
    assert not (tmp_path / "x.toml").exists()


def test_starters_plan_without_warnings(tmp_path):
    for kind, text in STARTERS.items():
        path = tmp_path / f"{kind}.toml"
        path.write_text(text, encoding="utf-8")
        plan = cutplan.plan(cutplan.load_design(path))
        assert all(p.warnings == () for p in plan.pieces), kind  # every warning a plan has is a piece's

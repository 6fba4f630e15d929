"""Several errors are never folded into one line: each is its own ``error:`` line, with no
escaped newline (``\\x0a``) in it, even when one of them comes from the math module ("math
domain error") and the planning call is guarded against numeric trouble.

The oracle is the errors themselves: two errors in, two lines out, each as written.
"""

from __future__ import annotations

import pytest
from click.testing import CliRunner

from cutplan.cli import cli
from cutplan.cli.common import BadInput
from cutplan.design import DesignError, DesignErrors
from cutplan.numeric import NumericError, checked_plan, quiet_numbers
from tests.web.conftest import PORCH

TWO = [DesignError("porch.toml", "set[1]", "porch", "cannot be planned: math domain error"),
       DesignError("porch.toml", "set[2]", "low", "cannot be planned: math domain error")]


def test_a_designs_errors_pass_the_numeric_guard_whole():
    def make():
        raise DesignErrors(TWO)

    with pytest.raises(DesignErrors) as caught:
        checked_plan(make, "porch.toml")
    assert [e.key for e in caught.value.errors] == ["set[1]", "set[2]"]


def test_a_math_domain_error_of_its_own_is_one_numeric_line():
    import math

    with pytest.raises(NumericError) as caught:
        checked_plan(lambda: math.sqrt(-1.0), "porch.toml")
    assert "\n" not in str(caught.value) and "math domain error" in str(caught.value)
    with pytest.raises(NumericError):
        quiet_numbers(math.exp, 1e6)  # math range error


def test_the_command_line_prints_each_error_on_its_own_line(monkeypatch):
    import cutplan.planning.service as service  # the one guarded plan service every front end calls

    def failing(design, progress=None, stock_override=None, tables=None):
        raise DesignErrors(TWO)

    monkeypatch.setattr(service, "plan", failing)
    result = CliRunner().invoke(cli, ["plan", str(PORCH)])
    assert result.exit_code == 2
    lines = result.output.strip().splitlines()
    assert lines == [f"error: {e}" for e in TWO]
    assert "\\x0a" not in result.output


def test_a_message_of_several_lines_becomes_several_error_lines():
    assert BadInput(["first\nsecond", "third"]).lines == ["first", "second", "third"]
    assert BadInput(["a \x1b[31mred\x1b[0m name"]).lines[0].count("\\x1b") == 2  # escapes still shown escaped

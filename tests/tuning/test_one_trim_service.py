"""The command line and the page call one trim service: the same input gets the same check and
the same words from both (the ``trim`` command through click's CliRunner against the page's
``trim_answer``).

The readings are of our own; the advice itself is checked in test_trim_service.py.
"""

from __future__ import annotations

import pytest
from click.testing import CliRunner

import cutplan
from cutplan.cli import cli
from cutplan.tuning.trim_service import MAX_STATE_BYTES
from cutplan.web.service import WebErrors
from cutplan.web.trim import trim_answer

ARCHED = '''title = "one arched bar"
[[set]]
name = "bars"
kind = "bar"
notes = ["C5"]
material = "rosewood-honduras"
model = "timoshenko"
section = { shape = "bar", width = "50 mm", thickness = "22 mm" }
undercut = { ratios = [4.0], arch_width = 0.5, min_thickness = "6 mm" }
'''


@pytest.fixture(scope="module")
def arched(tmp_path_factory):
    path = tmp_path_factory.mktemp("arched") / "bar.toml"
    path.write_text(ARCHED)
    design = cutplan.load_design(path)
    return path, design, cutplan.plan(design)


def _cli_line(*args):
    result = CliRunner().invoke(cli, ["trim", *[str(a) for a in args]])
    assert result.exit_code == 2 and "Traceback" not in result.output, result.output
    lines = [line for line in result.output.splitlines() if line.strip()]
    assert len(lines) == 1, lines
    return lines[0]


def _page_error(*args, **kwargs):
    with pytest.raises(WebErrors) as info:
        trim_answer(*args, **kwargs)
    (err,) = info.value.errors
    return err


def _tail(text):
    """The words after the key, which both front ends must share."""
    return text.split(": ", 1)[1] if ": " in text else text


@pytest.mark.parametrize("length_now", ["1 mm", "5 m", "long"])
def test_a_bad_length_now_gets_the_same_words(arched, length_now):
    path, design, plan = arched
    piece = plan.pieces[0]
    line = _cli_line(path, piece.label, "--measured", f"{piece.target_hz:.1f}", "--length-now", length_now)
    err = _page_error(design, plan, piece.label, f"{piece.target_hz:.1f}", length_now=length_now)
    assert line.startswith("error: --length-now: ") and err["key"] == "trim.length_now"
    assert _tail(line.removeprefix("error: ")) == _tail(err["message"])


@pytest.mark.parametrize("measured", ["5", "abc", "600, 500"])
def test_a_bad_reading_gets_the_same_words(arched, measured):
    path, design, plan = arched
    label = plan.pieces[0].label
    line = _cli_line(path, label, "--measured", measured)
    err = _page_error(design, plan, label, measured)
    assert line.startswith("error: --measured: ") and err["key"] == "trim.measured"
    assert _tail(line.removeprefix("error: ")) == _tail(err["message"])


@pytest.mark.parametrize("state", ["{not json", '{"format": "other"}', "[1, 2]", "x" * (MAX_STATE_BYTES + 1)])
def test_damaged_rounds_are_refused_alike(arched, tmp_path, state):
    # the rounds come from a file beside the design (command line) or back from the page
    path, design, plan = arched
    piece = plan.pieces[0]
    state_file = tmp_path / "rounds.json"
    state_file.write_text(state)
    line = _cli_line(path, piece.label, "--measured", f"{piece.target_hz:.1f}", "--state", state_file)
    err = _page_error(design, plan, piece.label, f"{piece.target_hz:.1f}", state=state)
    assert err["key"] == "trim.state"
    assert "start the rounds afresh" in line
    # the same words after each names where the rounds came from
    assert line.split(f"{state_file}: ", 1)[1] == err["message"].split("the rounds sent back: ", 1)[1]


def test_an_unknown_piece_is_named_alike(arched):
    path, design, plan = arched
    line = _cli_line(path, "bars-9", "--measured", "500")
    err = _page_error(design, plan, "bars-9", "500")
    assert err["key"] == "trim.piece" and _tail(line.removeprefix("error: ")) == _tail(err["message"])

"""Each fixed phrase, limit and physical constant is written once in the package, and every front end
takes its cautions from the one source chosen by the set's materials."""

import ast
import functools
from pathlib import Path

import pytest
from click.testing import CliRunner

from cutplan import limits, units
from cutplan.cli import cli
from cutplan.cli.common import OPTION_HELP
from cutplan.planning.shopping import CODES, general_cautions
from cutplan.render import phrases

PACKAGE = Path(__file__).resolve().parents[1] / "cutplan"
SOURCES = sorted(p for p in PACKAGE.rglob("*") if p.suffix in (".py", ".html", ".js", ".css"))


@functools.cache
def _lower_texts():
    """(file, lower-cased text) of every package source file, read once per test process."""
    return tuple((p.relative_to(PACKAGE).as_posix(), p.read_text(encoding="utf-8").lower()) for p in SOURCES)


def _text_hits(phrase):
    """(file, count) of every package source file (code, templates, scripts) that holds ``phrase``."""
    hits = [(name, text.count(phrase.lower())) for name, text in _lower_texts()]
    return [(name, n) for name, n in hits if n]


@functools.cache
def _constants():
    """(file, line, value) of every numeric literal in the package's Python code, and (file, text)
    of every string literal but docstrings (they may quote examples): each file parsed once per
    test process, not once per parameter, and let go (a tree kept alive would be walked by every
    later garbage collection).  One walk: it meets a statement before the expression in it, so a
    docstring's statement comes before its string."""
    numbers, strings = [], []
    for path in PACKAGE.rglob("*.py"):
        name, docs = path.relative_to(PACKAGE).as_posix(), set()
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.Expr) and isinstance(node.value, ast.Constant):
                docs.add(id(node.value))
            if isinstance(node, ast.Constant) and type(node.value) in (int, float):
                numbers.append((name, node.lineno, node.value))
            elif isinstance(node, ast.Constant) and isinstance(node.value, str) and id(node) not in docs:
                strings.append((name, node.value))
    return tuple(numbers), tuple(strings)


def _number_hits(value):
    """Where a numeric literal equal to ``value`` is written in the package's Python code."""
    return [(name, line) for name, line, v in _constants()[0] if v == value]


def _code_strings():
    """String literals of the code, docstrings left out (they may quote examples)."""
    return _constants()[1]


@pytest.mark.parametrize("phrase", [phrases.TRIM_RAISES, phrases.STOPPER_RULE, phrases.CENTRE_OUT,
                                    phrases.SAFETY_HEADING, CODES])
def test_each_shared_phrase_is_written_once(phrase):
    assert [n for _, n in _text_hits(phrase)] == [1], _text_hits(phrase)


@pytest.mark.parametrize("words", ["eye protection", "hearing protection", "never heat", "burn pvc",
                                   "rated hardware", "local codes"])
def test_caution_wording_lives_only_in_the_cautions_table(words):
    # materials/shop/cautions.toml is the one caution source; the package holds no copy of its words
    assert _text_hits(words) == []


@pytest.mark.parametrize("value", [
    273.15,  # 0 C in kelvin (SI brochure, 9th ed., 2019, 2.3.1: t/C = T/K - 273.15)
    101325.0,  # one standard atmosphere [Pa] (ISO 9613-1:1993 reference pressure)
    480.0, 30000.0, 450.0, 9600.0,  # the top of the A4, frequency, air-speed and cents ranges
])
def test_each_constant_and_limit_is_written_once(value):
    assert len(_number_hits(value)) == 1, _number_hits(value)


@pytest.mark.parametrize("value", [293.15, 253.15, 323.15])
def test_temperatures_are_derived_from_zero_celsius_not_retyped(value):
    assert _number_hits(value) == []


@pytest.mark.parametrize("text", ["400 and 480", "10 and 30000", "10 hz to 30 khz", "-20 c to 50 c",
                                  "-20 c and 50 c", "250 and 450", "-4800 to 9600", "1/64 to 64"])
def test_messages_are_built_from_the_limits_they_state(text):
    assert [name for name, s in _code_strings() if text in s.lower()] == []


def test_limits_say_what_they_check():
    # 0 C = 273.15 K exactly (SI brochure, 9th ed., 2019, 2.3.1); -20 C and 50 C from it
    assert units.ZERO_CELSIUS == 273.15
    assert limits.TEMPERATURE_RANGE[0] < 253.15 < 323.15 < limits.TEMPERATURE_RANGE[1]
    assert limits.TEMPERATURE_RANGE[1] - limits.TEMPERATURE_RANGE[0] == pytest.approx(70.0)
    assert limits.A4_ALLOWED == f"must be between {limits.A4_RANGE[0]:g} and {limits.A4_RANGE[1]:g} Hz"
    assert limits.a4_ok(limits.A4_RANGE[0]) and limits.a4_ok(limits.A4_RANGE[1])
    assert not limits.a4_ok(limits.A4_RANGE[1] + 0.01)


@pytest.mark.parametrize("argv", [["scale", "C4 major 3", "--a4", "481"], ["measure", "--frequency", "440", "--a4", "399"]])
def test_the_command_line_states_the_a4_limit_it_checks(argv):
    result = CliRunner().invoke(cli, argv)
    assert result.exit_code == 2
    assert limits.A4_ALLOWED in result.output


def _from_stock(stock_size):
    result = CliRunner().invoke(cli, ["from-stock", "--have", "8 ft x 1", "--stock-size", stock_size, "--count", "3"])
    assert result.exit_code == 0, result.output
    return result.output


def test_from_stock_gives_an_aluminium_set_no_pvc_caution():
    out = _from_stock("al-1.000x0.065")
    assert "PVC" not in out and "Plastics" not in out
    assert phrases.SAFETY_HEADING in out and "Deburr" in out  # the metal cautions, from the same table
    assert CODES in out


def test_from_stock_gives_a_pvc_set_the_pvc_caution_and_not_the_metal_ones():
    out = _from_stock("pvc-sch40-1")
    assert "PVC: cut in a ventilated place" in out
    assert "fresh metal edges" not in out


def test_the_page_header_says_only_what_holds_for_every_packet():
    texts = [c.text for c in general_cautions()]
    assert texts[-1] == CODES
    assert not any("PVC" in t or "metal" in t for t in texts)


@pytest.mark.parametrize("key", sorted(OPTION_HELP))
def test_each_shared_option_help_is_written_once(key):
    # the commands that take the same option share its help text (common practice: one wording)
    hits = [(name, n) for name, n in _text_hits(OPTION_HELP[key]) if name.startswith("cli/")]
    assert hits == [("cli/common.py", 1)], hits

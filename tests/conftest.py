"""Session fixtures: each bundled example is planned once per test session and shared.

Planning the examples (the arched-bar ones most of all) is the slowest thing the tests do;
tests that only read a plan take it from here instead of planning again.  The fixtures return
fresh copies of the JSON, so a test may change what it gets without affecting others.
"""

from __future__ import annotations

import copy
import json
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES_DIR = ROOT / "examples"


@pytest.fixture(scope="session")
def _example_cache():
    return {}


def _planned(cache, name):
    """(Plan, progress steps) of the example, planned once per session (per worker under xdist)."""
    key = ("plan", name)
    if key not in cache:
        import cutplan

        calls = []
        plan = cutplan.plan(cutplan.load_design(EXAMPLES_DIR / f"{name}.toml"), progress=calls.append)
        cache[key] = (plan, sum(calls))
    return cache[key]


def _json_output(cache, name):
    """The text ``cutplan plan EXAMPLE --format json`` prints, run once per session (lazily: a
    test that only reads the Plan does not pay for the command line's own planning)."""
    key = ("json", name)
    if key not in cache:
        from click.testing import CliRunner

        from cutplan.cli import cli

        result = CliRunner().invoke(cli, ["plan", str(EXAMPLES_DIR / f"{name}.toml"), "--format", "json"])
        assert result.exit_code == 0, result.output
        cache[key] = result.output
    return cache[key]


@pytest.fixture(scope="session")
def example_plan(_example_cache):
    """``example_plan("porch-chimes")`` -> the Plan of examples/porch-chimes.toml (planned once).

    The Plan is shared: read it, or derive a new one with ``dataclasses.replace``; never change it."""
    return lambda name: _planned(_example_cache, name)[0]


@pytest.fixture(scope="session")
def example_progress(_example_cache):
    """``example_progress(name)`` -> how many progress steps planning the example reported."""
    return lambda name: _planned(_example_cache, name)[1]


@pytest.fixture(scope="session")
def example_json(_example_cache):
    """``example_json(name)`` -> a fresh copy of ``cutplan plan EXAMPLE --format json`` (run once)."""
    return lambda name: copy.deepcopy(json.loads(_json_output(_example_cache, name)))



def pytest_terminal_summary(terminalreporter):
    """Repeat, in red, why the real-browser tests did not run.  Read from the skip reports, so the
    reason reaches the summary from pytest-xdist's worker processes too (tests/web/browser.py)."""
    reasons = []
    for report in terminalreporter.stats.get("skipped", []):
        longrepr = report.longrepr
        text = (longrepr[2] if isinstance(longrepr, tuple) else str(longrepr)).removeprefix("Skipped: ")
        if text.startswith("REAL-BROWSER TESTS SKIPPED") and text not in reasons:
            reasons.append(text)
    for reason in reasons:
        terminalreporter.write_sep("!", reason, red=True, bold=True)

"""Session fixtures: each bundled example is planned once per test session and shared.

Planning the examples (the arched-bar ones most of all) is the slowest thing the tests do;
tests that only read a plan take it from here instead of planning again.  The fixtures return
fresh copies of the JSON, so a test may change what it gets without affecting others.

Under pytest-xdist (``--dist loadgroup`` in pyproject.toml) every test that plans an example with
undercut bars, by a fixture here, the command line or the page, runs in one test process (the
``xdist_group`` "arched-examples", given by :func:`pytest_collection_modifyitems`): that process
plans the example once, and its command-line and page runs re-use the 2-D solves the solver
remembers, instead of a second process solving the same bars again.  The real-browser tests join
the group too, so each Chromium of that module starts once.
"""

from __future__ import annotations

import copy
import inspect
import json
import tomllib
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES_DIR = ROOT / "examples"
ARCHED_EXAMPLES = tuple(sorted(
    p.stem for p in EXAMPLES_DIR.glob("*.toml")
    if any("undercut" in s for s in tomllib.loads(p.read_text(encoding="utf-8")).get("set", []))))
"""The examples with undercut (arched) bars: the costly ones to plan."""
ARCHED_GROUP = "arched-examples"
GROUPED_MODULES = ("tests/web/test_browser.py",)
"""Modules run whole in :data:`ARCHED_GROUP` (their module-scoped browsers start once)."""


def _source(fn):
    """The code of a function from its ``def`` on (a parametrized test's other cases are in its
    decorators; the test id names the case that runs)."""
    try:
        text = inspect.getsource(fn)
    except (OSError, TypeError):
        return ""
    return text[text.find("def "):]


def _plans_an_arched_example(item):
    """True when the test names an arched example in its id, its own code or a fixture it uses."""
    if any(name in item.nodeid for name in ARCHED_EXAMPLES):
        return True
    fixtures = getattr(getattr(item, "_fixtureinfo", None), "name2fixturedefs", {})
    sources = [_source(getattr(item, "function", None))]
    sources += [_source(d.func) for defs in fixtures.values() for d in defs if d.baseid]  # the project's own
    return any(name in text for text in sources for name in ARCHED_EXAMPLES)


@pytest.hookimpl(tryfirst=True)  # before pytest-xdist reads the groups
def pytest_collection_modifyitems(config, items):
    for item in items:
        if item.nodeid.split("::")[0] in GROUPED_MODULES or _plans_an_arched_example(item):
            item.add_marker(pytest.mark.xdist_group(ARCHED_GROUP))


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

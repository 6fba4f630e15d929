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
    if name not in cache:
        from click.testing import CliRunner

        import cutplan
        from cutplan.cli import cli

        path = EXAMPLES_DIR / f"{name}.toml"
        calls = []
        plan = cutplan.plan(cutplan.load_design(path), progress=calls.append)
        result = CliRunner().invoke(cli, ["plan", str(path), "--format", "json"])
        assert result.exit_code == 0, result.output
        cache[name] = (plan, sum(calls), result.output)
    return cache[name]


@pytest.fixture(scope="session")
def example_plan(_example_cache):
    """``example_plan("porch-chimes")`` -> the Plan of examples/porch-chimes.toml (planned once)."""
    return lambda name: _planned(_example_cache, name)[0]


@pytest.fixture(scope="session")
def example_progress(_example_cache):
    """``example_progress(name)`` -> how many progress steps planning the example reported."""
    return lambda name: _planned(_example_cache, name)[1]


@pytest.fixture(scope="session")
def example_json(_example_cache):
    """``example_json(name)`` -> a fresh copy of ``cutplan plan EXAMPLE --format json`` (run once)."""
    return lambda name: copy.deepcopy(json.loads(_planned(_example_cache, name)[2]))

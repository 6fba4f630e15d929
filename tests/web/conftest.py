"""Shared fixtures for the web tests: the Flask test client, the example designs, and one pair of
arched bars whose 2-D solves are made once per test run."""

import tomllib
from pathlib import Path

import pytest

from cutplan.web.service import Planner
from tests.conftest import process_solves, solves_added, take_solves

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = sorted((ROOT / "examples").glob("*.toml"))
PORCH = ROOT / "examples" / "porch-chimes.toml"

ARCHED_PAIR = {"title": "garden bars", "set": [{
    "name": "garden", "kind": "bar", "notes": ["C4", "D4"], "material": "maple-sugar",
    "section": {"shape": "bar", "width": "50 mm", "thickness": "22 mm"},
    "undercut": {"ratios": [4.0], "arch_width": 0.5, "min_thickness": "6 mm"}}],
    "stock": {"lengths": [{"length": "2.4 m"}]}}
"""Two undercut maple bars, C4 and D4: the workshop example's bar section and its first two notes.
Every web test that needs arched bars planned plans this pair (as a mapping, on the page, or as
the workshop file with the arch added), so the bars' 2-D solves are the same everywhere and are
made once per run (:func:`arched_pair_solves`)."""


def example_mapping(path):
    """The design file's keys, as a client would send them to the JSON API."""
    return tomllib.loads(Path(path).read_text(encoding="utf-8"))


@pytest.fixture(scope="session")
def app():
    from cutplan.web.app import create_app

    return create_app()


@pytest.fixture()
def client(app):
    return app.test_client()


def _pair_solves():
    """The solves (2-D, and the 3-D side modes) planning :data:`ARCHED_PAIR` adds to this process's memos."""
    before = process_solves()
    Planner().compute(ARCHED_PAIR)
    return solves_added(before)


@pytest.fixture(scope="session")
def arched_pair_solves(shared):
    """``arched_pair_solves()`` puts the solves of :data:`ARCHED_PAIR` (2-D, and the 3-D side modes)
    into this process's memos (made once per run, across pytest-xdist workers, by the ``shared``
    cache of tests/conftest.py).

    A plan of the pair in this process (a Planner, the page's server thread, the command line)
    then finds them remembered instead of solving the bars again; it still goes through every
    step of planning and reports each bar as solved.  Call it just before that plan: other
    tests' solves may have pushed the pair's out of the memo's bounded size since."""
    return lambda: take_solves(shared(("web", "arched-pair-solves"), _pair_solves))

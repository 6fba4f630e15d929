"""Fixtures of the trim tests: the first removal advice on two bars of the music-room marimba,
solved once per test run and shared.

test_trim_service.py asks ``trim`` (the command line and the page) for this advice, and
test_trim_state_lock.py asks for it from two processes at once; the advice's 2-D solves are the
same each time, so they are made once (under pytest-xdist by whichever worker asks first,
through the ``shared`` fixture of tests/conftest.py) and handed to each process that advises.
"""

from __future__ import annotations

from pathlib import Path

import pytest

import cutplan
from cutplan.physics import elastic2d
from cutplan.tuning import trim_report

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
MARIMBA = EXAMPLES / "music-room-marimba.toml"

FIRST_READINGS = {"bars-1": "255.2, 1049.8", "bars-2": "290.1, 1182.0"}
"""What bars 1 and 2 of the music-room marimba "sound" at the bench before any cut [Hz] (invented
readings; both ask for wood to be removed), as the ``--measured`` option takes them."""


@pytest.fixture(scope="session")
def first_advice_solves(shared, example_plan):
    """The 2-D solves of the removal advice for :data:`FIRST_READINGS` ({key: solve}, as
    ``cutplan.physics.elastic2d.remembered_solves`` gives them); take them into a process's memo
    with ``elastic2d.remember_solves`` before asking ``trim`` for that advice."""
    def compute():
        design, plan = cutplan.load_design(MARIMBA), example_plan("music-room-marimba")
        before = set(elastic2d.remembered_solves())
        for label, measured in FIRST_READINGS.items():
            trim_report(design, plan, label, [float(f) for f in measured.split(",")])
        return {k: v for k, v in elastic2d.remembered_solves().items() if k not in before}

    return shared(("first-advice-solves", "music-room-marimba", tuple(FIRST_READINGS.items())), compute)

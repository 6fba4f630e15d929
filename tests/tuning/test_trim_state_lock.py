"""The trim-state file is read, advised on and written under a lock: two ``cutplan trim`` runs on
the same design at once (two real processes) both keep their round.

The race is forced, not left to timing: each run is the real command, with two signals added
around its locked step.  It says when it calls for the lock, and once it has read the rounds on
record it says so and waits for the test's word before advising and writing.  The test holds the
first run there until the second has called for the lock too (or, were there no lock, has read
the same rounds), then lets both go: without the lock both would have read the empty state, and
the later write would drop the other's round.

The design is the music-room marimba's two lowest bars, planned as in the example (the second
started from the first), with the readings of tests/tuning/conftest.py.  Each run is handed the
2-D solves of the example's plan and of that advice, and the 3-D side-mode solves, as a process
that planned the example before would have them, so the runs spend their time on the command and
the lock rather than on the arches.
"""

from __future__ import annotations

import json
import pickle
import subprocess
import sys
import time
from pathlib import Path

import pytest

import cutplan
from cutplan.physics import elastic2d
from tests.conftest import process_solves
from tests.tuning.conftest import FIRST_READINGS

ROOT = Path(__file__).resolve().parents[2]

TWO_BARS = """title = "Two bars for the classroom"
[[set]]
name = "bars"
kind = "bar"
notes = ["C4", "D4"]
material = "rosewood-honduras"
section = { shape = "bar", width = "55 mm", thickness = "24 mm" }
undercut = { ratios = [4.0], arch_width = 0.5, min_thickness = "6 mm" }
"""

RUN = """
import pickle, sys, time
from pathlib import Path

import cutplan.cli.shop as shop
from cutplan.cli import cli
from cutplan.physics import elastic2d, side_modes

signals, label = Path(sys.argv[1]), sys.argv[2]
solves, sideways = pickle.loads((signals / "solves.pickle").read_bytes())
elastic2d.remember_solves(solves)
side_modes.remember_side_modes(sideways)
lock, advise = shop.locked, shop.trim_reading


def calling_for_the_lock(*args, **kwargs):
    (signals / f"{label}.waiting").touch()
    return lock(*args, **kwargs)


def held_after_reading(*args, **kwargs):  # called with the rounds on record already read
    (signals / f"{label}.inside").touch()
    while not (signals / "go").exists():
        time.sleep(0.01)
    return advise(*args, **kwargs)


shop.locked, shop.trim_reading = calling_for_the_lock, held_after_reading
sys.argv = ["cutplan", "trim", *sys.argv[3:]]
cli()
"""


def _wait_for(condition, runs, what):
    """Poll until ``condition()``; fail at once, with the runs' output, if a run ends first."""
    deadline = time.monotonic() + 600
    while not condition():
        ended = [run for run in runs if run.poll() is not None]
        assert not ended and time.monotonic() < deadline, (what, [run.communicate() for run in ended])
        time.sleep(0.01)


@pytest.mark.slow
def test_two_trims_at_once_lose_no_round(tmp_path, example_plan, first_advice_solves):
    design = tmp_path / "two.toml"
    design.write_text(TWO_BARS, encoding="utf-8")
    example_plan("music-room-marimba")
    elastic2d.remember_solves(first_advice_solves)
    cutplan.plan(cutplan.load_design(design))  # its solves remembered here (made again if dropped since)
    signals = tmp_path / "signals"
    signals.mkdir()
    (signals / "solves.pickle").write_bytes(pickle.dumps(process_solves()))  # (2-D, 3-D)
    runs = {label: subprocess.Popen([sys.executable, "-c", RUN, str(signals), label, str(design), label,
                                     "--measured", measured], cwd=ROOT, text=True,
                                    stdout=subprocess.PIPE, stderr=subprocess.PIPE)
            for label, measured in FIRST_READINGS.items()}
    procs = list(runs.values())

    def inside():
        return [label for label in runs if (signals / f"{label}.inside").exists()]

    _wait_for(lambda: inside(), procs, "a run to read the rounds under the lock")
    held = inside()
    assert len(held) == 1, "both runs read the rounds at once: the state is not locked"
    (second,) = set(runs) - set(held)
    _wait_for(lambda: (signals / f"{second}.waiting").exists() or second in inside(), procs,
              "the other run to call for the lock")
    (signals / "go").touch()
    for run in procs:
        out, err = run.communicate(timeout=600)
        assert run.returncode == 0, out + err
    state = json.loads((tmp_path / "two.trim-state.json").read_text())
    # without the lock both runs read the empty state and the later write drops the other's round
    assert sorted(state["pieces"]) == ["bars-1", "bars-2"]
    assert all(state["pieces"][label]["pending"]["removal"] for label in runs)
    assert [p.name for p in tmp_path.iterdir() if p.name.endswith("cutplan-lock")] == []

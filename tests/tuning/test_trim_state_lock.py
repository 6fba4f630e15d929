"""The trim-state file is read, advised on and written under a lock: two ``cutplan trim`` runs on
the same design at once (two real processes) both keep their round."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]

TWO_BARS = """title = "Two bars for the classroom"
[[set]]
name = "bars"
kind = "bar"
notes = ["C4", "D4"]
material = "rosewood-honduras"
section = { shape = "bar", width = "55 mm", thickness = "24 mm" }
undercut = { ratios = [4.0], arch_width = 0.5, min_thickness = "6 mm" }
model = "timoshenko"
"""
# the arches designed on the 1-D beam (a fraction of the 2-D design's solves): the lock is around
# reading, advising on and writing the rounds, whichever model designed the bars


@pytest.mark.slow
def test_two_trims_at_once_lose_no_round(tmp_path):
    design = tmp_path / "two.toml"
    design.write_text(TWO_BARS)
    command = [sys.executable, "-c", "from cutplan.cli import cli; cli()", "trim", str(design)]
    # both bars read flat (invented readings; they only need to ask for wood to be removed)
    readings = {"bars-1": "255.2, 1049.8", "bars-2": "286.0, 1180.0"}
    runs = [subprocess.Popen(command + [label, "--measured", measured], cwd=ROOT, text=True,
                             stdout=subprocess.PIPE, stderr=subprocess.PIPE)
            for label, measured in readings.items()]
    for run in runs:
        out, err = run.communicate(timeout=600)
        assert run.returncode == 0, out + err
    state = json.loads((tmp_path / "two.trim-state.json").read_text())
    # without the lock both runs read the empty state and the later write drops the other's round
    assert sorted(state["pieces"]) == ["bars-1", "bars-2"]
    assert all(state["pieces"][label]["pending"]["removal"] for label in readings)
    assert [p.name for p in tmp_path.iterdir() if p.name.endswith("cutplan-lock")] == []

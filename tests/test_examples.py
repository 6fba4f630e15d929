"""Every bundled example plans, renders and stays stable against a committed expected plan."""

import json
import math
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = sorted((ROOT / "examples").glob("*.toml"))
EXPECTED = Path(__file__).parent / "data" / "expected"


def close(a, b, path="plan"):
    """Compare plans: numbers within 1e-6 relative (or 1e-6 absolute), everything else equal."""
    if isinstance(a, dict):
        assert set(a) == set(b), f"{path}: keys differ: {set(a) ^ set(b)}"
        for k in a:
            close(a[k], b[k], f"{path}.{k}")
    elif isinstance(a, list):
        assert len(a) == len(b), f"{path}: lengths differ"
        for i, (x, y) in enumerate(zip(a, b, strict=True)):
            close(x, y, f"{path}[{i}]")
    elif isinstance(a, float) or isinstance(b, float):
        assert math.isclose(a, b, rel_tol=1e-6, abs_tol=1e-6 + 0.011), f"{path}: {a} != {b}"
    else:
        assert a == b, f"{path}: {a!r} != {b!r}"


def test_there_are_examples_of_every_kind():
    kinds = set()
    for path in EXAMPLES:
        kinds |= {line.split('"')[1] for line in path.read_text().splitlines() if line.startswith("kind = ")}
    assert {"chime", "bar", "air-column", "resonator"} <= kinds
    assert len(EXAMPLES) >= 5


@pytest.mark.parametrize("path", EXAMPLES, ids=[p.stem for p in EXAMPLES])
def test_example_plan_is_stable(path, example_json):
    # `cutplan plan EXAMPLE --format json`, run once per session (tests/conftest.py; exit code checked there)
    got = example_json(path.stem)
    expected_file = EXPECTED / f"{path.stem}.json"
    # to refresh on purpose: cutplan plan examples/X.toml --format json > tests/data/expected/X.json
    expected = json.loads(expected_file.read_text(encoding="utf-8"))
    close(got, expected)


@pytest.mark.parametrize("path", EXAMPLES, ids=[p.stem for p in EXAMPLES])
def test_example_renders_every_output(path, example_packet):
    # `cutplan plan EXAMPLE -o FOLDER`, run once per session (tests/conftest.py; exit code checked there)
    _, out, _ = example_packet(path.stem)
    assert (out / "plan.csv").read_text().startswith("set,label,note")
    json.loads((out / "plan.json").read_text())

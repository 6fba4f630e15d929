"""Property-based fuzzing: whatever a design file or the main command options hold, cutplan
exits 0 or 2, never with a traceback, and an exit-0 plan has no NaN, infinite, zero or negative
length. Fixed seed (derandomize) and a few hundred examples, so it stays quick; the long run is
bench/bench_hardening.py."""

from __future__ import annotations

import json

import numpy as np
import pytest
from click.testing import CliRunner
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import cutplan.cli.common
from cutplan import materials
from cutplan.cli import cli
from tests.fuzzing import bad_lengths, broken_wav, mutated_design, to_toml

# slow: some 35 CPU seconds of generated designs, options and recordings; each distinct recording
# analysed once (tests/audio/memo.py): the damaged WAVs that still ring hold one of a few tones.
pytestmark = [pytest.mark.slow, pytest.mark.usefixtures("one_analysis_per_recording")]


@pytest.fixture(scope="module", autouse=True)
def packaged_tables_read_once():
    """The packaged material and stock tables, read once for this module instead of once per
    generated design or command (some 17 ms each, more than half of these tests' time): every
    example reads the same files.  A user folder (a design's ``material_dirs``, ``--materials``)
    is still read each time, as are the tables themselves in tests/test_materials.py."""
    real = materials.load_library
    kept = []

    def load_library(extra_dirs=(), include_packaged=True):
        if list(extra_dirs) or not include_packaged:
            return real(extra_dirs, include_packaged)
        if not kept:
            kept.append(real())
        return kept[0]

    with pytest.MonkeyPatch.context() as patch:
        patch.setattr(materials, "load_library", load_library)
        patch.setattr(cutplan.cli.common, "load_library", load_library)
        yield

QUICK = settings(derandomize=True, max_examples=150, deadline=None, database=None,
                 suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])


def _invoke(args):
    result = CliRunner().invoke(cli, args)
    text = result.output
    assert result.exit_code in (0, 2), (args, result.exit_code, text, result.exception)
    assert "Traceback" not in text, text
    if result.exit_code == 2:
        lines = [ln for ln in text.splitlines() if ln.strip()]
        assert lines and all(ln.startswith("error: ") for ln in lines), text
        assert "\x1b" not in text  # escape codes are shown escaped, never sent to the terminal
    return result


@QUICK
@given(seed=st.integers(0, 2**32 - 1))
def test_any_design_gives_exit_0_or_2_and_sane_lengths(tmp_path_factory, seed):
    rng = np.random.default_rng(seed)
    design = mutated_design(rng)
    if any(isinstance(s, dict) and s.get("kind") == "bar" and "undercut" in s for s in design.get("set", [])):
        design["set"][0].pop("undercut", None)  # arched bars take seconds each: the bench covers them
    path = tmp_path_factory.mktemp("fuzz") / "design.toml"
    path.write_text(to_toml(design), encoding="utf-8")
    result = _invoke(["plan", str(path), "--format", "json"])
    if result.exit_code == 0:
        assert bad_lengths(json.loads(result.output)) == []


@settings(derandomize=True, max_examples=300, deadline=None, database=None)
@given(seed=st.integers(0, 2**32 - 1))
def test_any_design_mapping_validates_or_names_each_problem_in_one_line(seed):
    # validation only (no planning), so arched-bar keys are covered too
    import cutplan
    from cutplan.design import DesignErrors

    design = mutated_design(np.random.default_rng(seed), n_mutations=3)
    try:
        cutplan.design_from_mapping(design)
    except DesignErrors as exc:
        assert exc.errors and all("\n" not in str(e) and "\x1b" not in str(e) for e in exc.errors)


OPTION_WORDS = ["8 ft", "8 ft x 2", "96 x 2", "3 m x 2 @ 12.50", "1e9 m", "-1 mm", "0 mm", "1/16", "1/16 in",
                "-1/8 in", "50 mm", "2 mm", "\x1b[2J", "", "x", "10 ft x 0", "10 ft x 99999999", "nan mm"]


@QUICK
@given(stock=st.lists(st.sampled_from(OPTION_WORDS), max_size=2), kerf=st.sampled_from(OPTION_WORDS),
       trim=st.sampled_from(OPTION_WORDS))
def test_cutlist_options_give_exit_0_or_2(stock, kerf, trim):
    args = ["cutlist", "examples/porch-chimes.toml", "--kerf", kerf, "--end-trim", trim, "--format", "json"]
    for s in stock or ["8 ft"]:
        args += ["--stock", s]
    result = _invoke(args)
    if result.exit_code == 0:
        data = json.loads(result.output)
        for stick in data["sticks"]:
            assert stick["offcut_mm"] >= 0 and all(c["start_mm"] >= 0 and c["length_mm"] > 0 for c in stick["cuts"])


@QUICK
@given(measured=st.floats(allow_nan=True, allow_infinity=True, min_value=None, max_value=None),
       label=st.sampled_from(["pipes-1", "pipes-15", "pipes-99"]),
       length=st.sampled_from([None, "640 mm", "25 in", "1 mm", "19.84", "10 m", "-5 mm"]))
def test_trim_options_give_exit_0_or_2(measured, label, length):
    args = ["trim", "examples/classroom-pipes.toml", label, "--measured", repr(measured)]
    if length is not None:
        args += ["--length-now", length]
    _invoke(args)


@QUICK
@given(seed=st.integers(0, 2**32 - 1), near=st.sampled_from([None, "D5", "C0", "X9", "A4"]))
def test_broken_recordings_give_one_line(tmp_path_factory, seed, near):
    _damage, data = broken_wav(np.random.default_rng(seed))
    path = tmp_path_factory.mktemp("wav") / "take.wav"
    path.write_bytes(data)
    _invoke(["measure", str(path)] + (["--near", near] if near else []))

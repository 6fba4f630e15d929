"""Session fixtures: each bundled example is planned once per test run and shared.

Planning the examples (the arched-bar ones most of all) is the slowest thing the tests do;
tests that only read a plan take it from here instead of planning again.  The fixtures return
fresh copies of the JSON, so a test may change what it gets without affecting others.  So are
the examples' packets: what ``cutplan plan EXAMPLE -o`` writes (``example_packet``) and the
packet rendered on either paper, as bytes (``example_pdf``) and page texts (``example_pdf_text``).

Under pytest-xdist the worker processes share these results too (:func:`shared_result`): the
first worker to need one computes it under a file lock and leaves it, pickled, in the run's
temporary folder; the others wait for it and read it.  The scheduler below keeps each test file
on one worker (its module fixtures made once) and hands out the heaviest files first, so no long
file is left to run alone at the end.
"""

from __future__ import annotations

import copy
import fcntl
import hashlib
import json
import os
import pickle
from pathlib import Path

import pytest

# One BLAS thread per test process, set before numpy or scipy loads their BLAS (they read it once):
# pytest-xdist already runs one test process per core, so a second BLAS thread in each only spins
# against the other process (measured on a two-core machine: the whole suite's CPU 184 -> 170 s).
# A thread count set in the environment is kept; the product's own limit is checked in
# tests/physics/test_blas.py with the count raised on purpose.
for _name in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_name, "1")

from tests.bytecode import start_warming  # noqa: E402
from tests.pdf_text import page_texts  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES_DIR = ROOT / "examples"

HEAVY_FIRST = (
    "tests/render/test_layout.py",
    "tests/web/test_browser.py",
    "tests/test_elastic_plans.py",
    "tests/tuning/test_removal_rounds.py",
    "tests/physics/test_mixed_partials.py",
    "tests/physics/test_width_terms.py",
    "tests/tuning/test_trim_state_lock.py",
    "tests/physics/test_solid3d.py",
    "tests/audio/test_measure.py",
    "tests/test_calibrate_elastic.py",
    "tests/test_unreachable.py",
    "tests/test_fuzz.py",
    "tests/audio/test_recordings.py",
    "tests/physics/test_stepped_bar.py",
    "tests/test_width_modes.py",
    "tests/test_grain.py",
    "tests/test_one_truth.py",
    "tests/web/test_request_limits.py",
    "tests/render/test_templates.py",
    "tests/tuning/test_trim_service.py",
    "tests/render/test_quantities.py",
    "tests/test_hardening.py",
    "tests/audio/test_hum.py",
    "tests/web/test_progress.py",
    "tests/test_imports.py",
    "tests/test_output_folders.py",
    "tests/physics/test_elastic2d_memo.py",
    "tests/test_from_stock.py",
)
"""Test files in the order the workers start them, heaviest first (wall seconds of each file in a
whole-suite run beside other busy programs, the case the suite's time target is set for; the web
page's browser tests second, so that the first two files do not wait on the same shared plan);
files not named follow in collection order.  The order only changes how evenly the workers are
loaded, never what runs."""

_RESULTS: dict = {}


def shared_result(key, compute, basetemp=None):
    """``compute()``, made once per test run: kept in this process, and under pytest-xdist in a
    pickle beside the workers' temporary folders (``basetemp``: this worker's), made by whichever
    worker asks first while the others wait on its lock.  ``key`` (a string or tuple of plain
    values) names the result; the value must pickle.  Treat what it returns as read-only."""
    if key in _RESULTS:
        return _RESULTS[key]
    if basetemp is None or os.environ.get("PYTEST_XDIST_WORKER") is None:
        value = compute()
    else:
        folder = Path(basetemp).parent / "shared-results"
        folder.mkdir(exist_ok=True)
        stem = hashlib.sha256(repr(key).encode()).hexdigest()[:24]
        path = folder / f"{stem}.pickle"
        with open(folder / f"{stem}.lock", "w") as lock:
            fcntl.flock(lock, fcntl.LOCK_EX)  # released when the file closes (or the process dies)
            if path.exists():
                value = pickle.loads(path.read_bytes())
            else:
                value = compute()
                part = folder / f"{stem}.part"
                part.write_bytes(pickle.dumps(value, protocol=pickle.HIGHEST_PROTOCOL))
                part.replace(path)
    _RESULTS[key] = value
    return value


@pytest.fixture(scope="module")
def one_analysis_per_recording():
    """Each distinct recording analysed once in the module that asks (tests/audio/memo.py), with
    ``pytestmark = pytest.mark.usefixtures("one_analysis_per_recording")`` and its reason beside it."""
    from tests.audio.memo import analyses_remembered

    with analyses_remembered():
        yield


@pytest.fixture(scope="session")
def shared(tmp_path_factory):
    """``shared(key, compute)`` -> :func:`shared_result` for this run (one result across workers)."""
    basetemp = tmp_path_factory.getbasetemp()
    return lambda key, compute: shared_result(key, compute, basetemp)


def process_solves():
    """The solves this process remembers: the 2-D ones (:mod:`cutplan.physics.elastic2d`) and the
    3-D side-mode ones (:mod:`cutplan.physics.side_modes`), as ``(2-D, 3-D)`` dicts."""
    from cutplan.physics import elastic2d, side_modes

    return elastic2d.remembered_solves(), side_modes.remembered_side_modes()


def solves_added(before):
    """What this process has remembered since ``before`` (a :func:`process_solves`), in its form."""
    return tuple({k: v for k, v in now.items() if k not in old} for now, old in zip(process_solves(), before, strict=True))


def take_solves(solves):
    """Take solves made by another process (from :func:`solves_added`) into this one's memos."""
    from cutplan.physics import elastic2d, side_modes

    flat, solid = solves
    elastic2d.remember_solves(flat)
    side_modes.remember_side_modes(solid)


def _with_solves(compute):
    """``compute`` as a shareable result: its value and the solves (2-D and 3-D side modes) it
    added to this process's memos.

    A worker that reads the value also takes the solves into its own memos, so planning the same
    design again there (the command line, the page, a trim) finds them as the first worker did."""
    def run():
        before = process_solves()
        value = compute()
        return value, solves_added(before)
    return run


_MERGED: set = set()


def _shared_example(shared, key, compute):
    """The value of a :func:`_with_solves` result, its solves taken into this process's memos."""
    value, solves = shared(key, _with_solves(compute))
    if key not in _MERGED:
        _MERGED.add(key)
        take_solves(solves)
    return value


def _plan_example(name):
    """(Plan, progress steps) of an example."""
    import cutplan

    calls = []
    plan = cutplan.plan(cutplan.load_design(EXAMPLES_DIR / f"{name}.toml"), progress=calls.append)
    return plan, sum(calls)


def _json_example(name):
    """The text ``cutplan plan EXAMPLE --format json`` prints."""
    from click.testing import CliRunner

    from cutplan.cli import cli

    result = CliRunner().invoke(cli, ["plan", str(EXAMPLES_DIR / f"{name}.toml"), "--format", "json"])
    assert result.exit_code == 0, result.output
    return result.output


@pytest.fixture(scope="session")
def example_plan(shared):
    """``example_plan("porch-chimes")`` -> the Plan of examples/porch-chimes.toml (planned once).

    The Plan is shared: read it, or derive a new one with ``dataclasses.replace``; never change it."""
    return lambda name: _shared_example(shared, ("plan", name), lambda: _plan_example(name))[0]


@pytest.fixture(scope="session")
def example_progress(shared):
    """``example_progress(name)`` -> how many progress steps planning the example reported."""
    return lambda name: _shared_example(shared, ("plan", name), lambda: _plan_example(name))[1]


@pytest.fixture(scope="session")
def example_json(shared, example_plan):
    """``example_json(name)`` -> a fresh copy of ``cutplan plan EXAMPLE --format json`` (run once;
    lazily: a test that only reads the Plan does not pay for the command line's own planning)."""
    def run(name):
        example_plan(name)  # the plan's solves first: the command line then finds them remembered
        return _json_example(name)

    return lambda name: copy.deepcopy(json.loads(_shared_example(shared, ("json", name), lambda: run(name))))


def _packet_example(name, folder):
    """(what ``cutplan plan EXAMPLE -o FOLDER`` printed, FOLDER, the text of each packet page)."""
    from click.testing import CliRunner

    from cutplan.cli import cli

    result = CliRunner().invoke(cli, ["plan", str(EXAMPLES_DIR / f"{name}.toml"), "-o", str(folder)])
    assert result.exit_code == 0, result.output
    return result.stdout, str(folder), page_texts(folder / "packet.pdf")


@pytest.fixture(scope="session")
def example_packet(shared, example_plan, tmp_path_factory):
    """``example_packet(name)`` -> (stdout, folder, pages): ``cutplan plan EXAMPLE -o FOLDER`` run
    once per run, what it printed, the folder it wrote (read it, never change it) and the text of
    each page of its packet.pdf (:func:`tests.pdf_text.page_texts`)."""
    def run(name):
        example_plan(name)  # the plan's solves first, as for example_json
        return _packet_example(name, tmp_path_factory.mktemp(f"packet-{name}") / "packet")

    def get(name):
        stdout, folder, pages = _shared_example(shared, ("packet", name), lambda: run(name))
        return stdout, Path(folder), list(pages)

    return get


def _render_example(plan, paper):
    from cutplan.render.pdf import render_pdf

    return render_pdf(plan, paper)


@pytest.fixture(scope="session")
def example_pdf(shared, example_plan, example_packet):
    """``example_pdf(name, paper=None)`` -> the bytes of example ``name``'s packet.pdf on ``paper``
    (the design's own paper if None), made once per run: on the design's own paper the file
    ``example_packet`` wrote (the command line renders the same ``render_pdf(plan, plan.paper)``),
    on the other paper rendered from the shared Plan."""
    def get(name, paper=None):
        plan = example_plan(name)
        paper = paper or plan.paper
        if paper == plan.paper:
            return shared(("pdf", name, paper), lambda: (example_packet(name)[1] / "packet.pdf").read_bytes())
        return shared(("pdf", name, paper), lambda: _render_example(plan, paper))

    return get


@pytest.fixture(scope="session")
def example_pdf_text(shared, example_plan, example_pdf, example_packet):
    """``example_pdf_text(name, paper=None)`` -> the text of each page of :func:`example_pdf`'s
    packet (:func:`tests.pdf_text.page_texts`), read once per run; a tuple, so nobody changes it."""
    def get(name, paper=None):
        plan = example_plan(name)
        paper = paper or plan.paper
        if paper == plan.paper:
            return shared(("pdf-text", name, paper), lambda: tuple(example_packet(name)[2]))
        return shared(("pdf-text", name, paper), lambda: tuple(page_texts(example_pdf(name, paper))))

    return get


@pytest.hookimpl(optionalhook=True)
def pytest_xdist_make_scheduler(config, log):
    """Whole test files to each worker, the heaviest (:data:`HEAVY_FIRST`) first; only for the
    default ``--dist load`` (an explicit ``--dist`` is left to pytest-xdist)."""
    if config.getoption("dist") != "load":
        return None
    from xdist.scheduler import LoadScopeScheduling

    rank = {name: i for i, name in enumerate(HEAVY_FIRST)}

    class HeavyFilesFirst(LoadScopeScheduling):
        def _split_scope(self, nodeid):
            return nodeid.split("::", 1)[0]

        def _assign_work_unit(self, node):
            if not getattr(self, "_ordered", False):
                units = sorted(self.workqueue.items(), key=lambda unit: rank.get(unit[0], len(rank)))
                self.workqueue.clear()
                self.workqueue.update(units)
                self._ordered = True
            super()._assign_work_unit(node)

    return HeavyFilesFirst(config, log)


_WARMING: list = []


@pytest.hookimpl(trylast=True)  # after pytest-xdist's, which says whether workers will run
def pytest_configure(config):
    """Under pytest-xdist, compile the test modules and the package once for all workers while they
    start (:mod:`tests.bytecode`; only where bytecode may be written, as ``.ci/run`` allows)."""
    _WARMING.append(start_warming(config, ROOT / "cutplan", ROOT / "tests"))


def pytest_unconfigure(config):
    for thread in filter(None, _WARMING):
        thread.join()
    _WARMING.clear()


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

"""A long plan reports how far it has got: the page asks ``GET /progress?job=ID`` while its
preview (sent with ``X-Cutplan-Job: ID``) plans, in the server's thread or in a worker process.

The oracle for the counts is the design: one solve per undercut bar, so two notes give 0, 1
and 2 of 2 in order.
"""

from __future__ import annotations

import threading
import time

import pytest

from cutplan.web.app import create_app
from cutplan.web.progress import MAX_JOBS, ProgressBoard
from cutplan.web.service import Planner
from cutplan.web.workers import WorkerPool
from tests.web.conftest import ARCHED_PAIR
from tests.web.jobs import counting

TWO_BARS = ARCHED_PAIR
"""Two undercut bars (C4 and D4) on the 2-D model; in this process their 2-D solves are taken from
the run's shared memo (``arched_pair_solves``): what is tested here is the reporting, and each bar
is still designed and reported as solved."""
TWO_BARS_1D = {**ARCHED_PAIR, "set": [{**ARCHED_PAIR["set"][0], "model": "timoshenko"}]}
"""The same two bars designed on the 1-D model: the worker process is a fresh interpreter with no
solves remembered, and the 1-D design (less than half the 2-D design's time) reports each bar the
same way, through the same progress callback, from the worker back to the server."""


@pytest.mark.parametrize("workers, data", [(0, TWO_BARS), (1, TWO_BARS_1D)], ids=["0", "1"])
def test_a_plan_reports_each_arched_bar_solved(workers, data, arched_pair_solves):
    if workers == 0:
        arched_pair_solves()
    seen = []
    planner = Planner(workers=workers)
    try:
        planner.plan(data, progress=lambda done, total: seen.append((done, total)))
        again = []
        planner.plan(data, progress=lambda done, total: again.append((done, total)))
    finally:
        planner.close()
    assert seen == [(0, 2), (1, 2), (2, 2)]
    assert again == []  # a cached plan has nothing to solve


def test_a_worker_job_sends_its_progress_back_before_its_answer():
    pool = WorkerPool(1, warm=False)  # counting and pow need no planner (tests/web/jobs.py imports nothing)
    seen = []
    try:
        assert pool.run(counting, (3,), progress=lambda done, total: seen.append((done, total))) == 3
        assert pool.run(pow, (2, 5)) == 32  # a job without progress on the same worker
    finally:
        pool.close()
    assert seen == [(1, 3), (2, 3), (3, 3)]


def test_the_page_answers_progress_while_a_preview_plans(monkeypatch, arched_pair_solves):
    from cutplan.web import form as webform

    arched_pair_solves()  # the preview is held at its first bar below; the bars need no solving
    app = create_app()
    client = app.test_client()
    job = "abcdef0123456789"
    release, asked = threading.Event(), []
    real = app.planner.compute

    def slow_compute(data, lib=None, progress=None):
        def held(done, total):
            progress(done, total)
            if done == 1:
                assert release.wait(120)
        return real(data, lib, held)

    monkeypatch.setattr(app.planner, "compute", slow_compute)
    body = webform.form_from_mapping(TWO_BARS)
    out = {}
    poster = threading.Thread(target=lambda: out.setdefault(
        "resp", app.test_client().post("/preview", data=body, headers={"X-Cutplan-Job": job})))
    poster.start()
    try:
        deadline = time.monotonic() + 120
        while time.monotonic() < deadline and not asked:
            answer = client.get(f"/progress?job={job}").get_json()
            if answer["done"] == 1:
                asked.append(answer)
            time.sleep(0.05)
    finally:
        release.set()
        poster.join(120)
    assert asked == [{"done": 1, "total": 2}]
    assert out["resp"].get_json()["ok"]
    assert client.get(f"/progress?job={job}").get_json() == {"done": 0, "total": 0}  # forgotten when done


def test_the_board_keeps_only_valid_ids_and_a_bounded_number_of_jobs():
    board = ProgressBoard()
    assert board.reporter("../x") is None and board.reporter("") is None
    for k in range(MAX_JOBS + 5):
        board.reporter(f"job-{k:08d}")(1, 2)
    assert board.get("job-00000000") is None  # the oldest forgotten
    assert board.get(f"job-{MAX_JOBS + 4:08d}") == (1, 2)

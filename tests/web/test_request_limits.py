"""The page serves only itself and no request holds a planning process for long: posts from other
web sites are refused, every loopback address it is bound to is accepted as a Host, a plan past
its time limit or whose client went away has its worker stopped, and a queue that stays full
answers "busy" instead of waiting for ever.

The oracle for the origin rules is the Fetch standard (WHATWG, "Fetch", sections on the
`Origin` and `Sec-Fetch-Site` request headers): a browser names the sending site on every POST.
"""

from __future__ import annotations

import os
import threading
import time

import pytest

from cutplan.web.app import create_app
from cutplan.web.service import Planner, WebErrors
from cutplan.web.workers import Stopped, WorkerPool
from tests.web.conftest import PORCH, example_mapping
from tests.web.jobs import holding

POST_ROUTES = ["/", "/preview", "/packet.zip", "/packet.pdf", "/design.toml", "/listen", "/api/trim",
               "/api/plan", "/api/packet"]


@pytest.mark.parametrize("route", POST_ROUTES)
@pytest.mark.parametrize("headers", [{"Origin": "http://elsewhere.example"}, {"Origin": "null"},
                                     {"Sec-Fetch-Site": "cross-site"}, {"Sec-Fetch-Site": "same-site"}])
def test_a_post_from_another_site_is_refused(client, route, headers):
    resp = client.post(route, data={"title": "x"}, headers=headers)
    assert resp.status_code == 403
    assert resp.get_json()["errors"][0]["key"] == "(request)"


@pytest.mark.parametrize("headers", [{}, {"Sec-Fetch-Site": "same-origin", "Origin": "http://localhost"},
                                     {"Sec-Fetch-Site": "none"}])
def test_the_pages_own_posts_and_scripts_are_served(client, headers):
    resp = client.post("/api/plan", json=example_mapping(PORCH), headers=headers)
    assert resp.status_code == 200, resp.get_data(as_text=True)[:300]


@pytest.mark.parametrize("host, header", [("127.0.0.2", "127.0.0.2:8750"), ("::1", "[::1]:8750"),
                                          ("127.0.0.1", "127.0.0.1:8750")])
def test_every_loopback_address_it_is_bound_to_is_accepted(host, header):
    # RFC 5735 section 3 and RFC 4291 section 2.5.3: 127.0.0.0/8 and ::1 are loopback
    app = create_app(host=host)
    for name, status in ((header, 200), ("rebound.example:8750", 400)):
        with app.test_client().get("/static/cutplan.css", headers={"Host": name}) as resp:
            assert resp.status_code == status


def test_a_planning_worker_loads_the_planner_before_its_first_job():
    # the oracle is the worker interpreter's own table of loaded modules (sys.modules); the light
    # pools below (warm=False) start without those imports, which their jobs do not need
    loaded = "'cutplan.planning.planner' in __import__('sys').modules"
    for pool, expected in ((WorkerPool(1), True), (WorkerPool(1, warm=False), False)):
        try:
            assert pool.run(eval, (loaded,)) is expected
        finally:
            pool.close()


def test_a_job_past_its_time_limit_is_stopped_and_the_worker_replaced():
    pool = WorkerPool(1, warm=False)  # the jobs here are sleep and pow: no planner needed
    try:
        with pytest.raises(Stopped) as caught:
            pool.run(time.sleep, (60,), limit=0.5)
        assert caught.value.reason == "time"
        assert pool.run(pow, (2, 10)) == 1024  # a fresh worker takes the next job
    finally:
        pool.close()


def test_a_job_whose_client_went_away_is_stopped():
    pool = WorkerPool(1, warm=False)  # the jobs here are getpid and sleep: no planner needed
    try:
        assert pool.run(os.getpid, ()) != os.getpid()
        first = pool.run(os.getpid, ())
        with pytest.raises(Stopped) as caught:
            pool.run(time.sleep, (60,), gone=lambda: True)
        assert caught.value.reason == "gone"
        assert pool.run(os.getpid, ()) != first  # that worker was killed, not left sleeping
    finally:
        pool.close()


def test_a_full_queue_answers_busy_instead_of_waiting_for_ever():
    pool = WorkerPool(1, warm=False)  # the jobs here are holding and pow: no planner needed
    started, release = threading.Event(), threading.Event()
    # the holder's job tells it has started (its one progress step), then holds the only worker
    # until its client "goes away" at the end of the test
    holder = threading.Thread(target=lambda: pytest.raises(Stopped, pool.run, holding, (60,), gone=release.is_set,
                                                           progress=lambda done, total: started.set()))
    try:
        holder.start()
        assert started.wait(30)
        with pytest.raises(Stopped) as caught:
            pool.run(pow, (2, 3), wait=0.2)
        assert caught.value.reason == "busy"
    finally:
        release.set()
        holder.join(timeout=30)
        pool.close()


def test_the_page_stops_planning_for_a_client_that_went_away():
    app = create_app(workers=1)
    try:
        resp = app.test_client().post("/api/plan", json=example_mapping(PORCH),
                                      environ_overrides={"waitress.client_disconnected": lambda: True})
        assert resp.status_code == 422
        assert resp.get_json()["errors"][0]["key"] == "(request)"
    finally:
        app.planner.close()


def test_an_absurd_plan_on_the_page_is_a_422_naming_the_design():
    data = {"set": [{"kind": "chime", "notes": ["C1"],
                     "section": {"shape": "tube", "outer": "1 in", "wall": "0.065 in"},
                     "material": {"modulus": "1000 GPa", "density": "1 kg/m3", "unusual": True}}]}
    with pytest.raises(WebErrors) as caught:
        Planner().plan(data)
    assert "30 m" in caught.value.errors[0]["message"]


def _porch_form():
    from cutplan.web import form as webform

    return webform.form_from_mapping(example_mapping(PORCH))


@pytest.mark.parametrize("body", ['{"title": ' + "[" * 5000 + "]" * 5000 + "}",
                                  '{"tuning": {"a4": ' + "9" * 5000 + "}}"])
def test_hostile_json_is_a_422_not_a_500(client, body):
    resp = client.post("/api/plan", data=body, content_type="application/json")
    assert resp.status_code == 422 and resp.get_json()["errors"][0]["key"] == "(design)"


@pytest.mark.parametrize("text, words", [(b"a = " + b"[" * 3000 + b"]" * 3000 + b"\n", "deep"),
                                         (b'title = 1979-05-27\n', "date")])
def test_a_design_file_no_design_can_be_is_a_422(client, text, words):
    import io

    resp = client.post("/", data={"action": "open", "design_file": (io.BytesIO(text), "d.toml")},
                       content_type="multipart/form-data")
    assert resp.status_code == 422 and words in resp.get_data(as_text=True)


def test_listening_to_a_set_of_two_dozen_pieces(client):
    # the arpeggio's start times round either way; none may run one sample past the end
    from cutplan.web import form as webform

    data = example_mapping(PORCH)
    data["set"][0].pop("scale", None)
    data["set"][0].pop("root", None)
    data["set"][0].pop("count", None)
    data["set"][0]["notes"] = [f"{n}{o}" for o in (5, 6, 7) for n in "CDEFGAB"] + ["C8", "D4", "E4"]
    data["stock"]["lengths"] = [{"length": "8 ft"}]
    fields = webform.form_from_mapping(data)
    fields["listen"] = data["set"][0]["name"]
    resp = client.post("/listen", data=fields)
    assert resp.status_code == 200 and resp.data[:4] == b"RIFF"


def test_a_length_now_far_from_the_piece_is_named(client):
    fields = _porch_form()
    fields.update({"trim.piece": "porch-1", "trim.measured": "600", "trim.length_now": "1e308 m"})
    resp = client.post("/api/trim", data=fields)
    assert resp.status_code == 422 and "trim.length_now" in resp.get_json()["errors"]


def test_two_hundred_slow_connections_do_not_lock_out_a_real_visitor():
    # loopback only, bounded in count (200) and time (each socket times out in 20 s)
    import re
    import socket
    import subprocess
    import sys
    import urllib.request
    from pathlib import Path

    root = Path(__file__).resolve().parents[2]
    proc = subprocess.Popen([sys.executable, "-c", "from cutplan.cli import cli; cli()", "serve", "--port", "0",
                             "--workers", "1"], cwd=root, stderr=subprocess.PIPE, text=True)
    slow = []
    try:
        line = proc.stderr.readline()
        port = int(re.search(r":(\d+)/", line).group(1))
        for _ in range(200):
            s = socket.create_connection(("127.0.0.1", port), timeout=20)
            s.sendall(b"POST /preview HTTP/1.1\r\nHost: 127.0.0.1\r\n")  # and never the rest
            slow.append(s)
        with urllib.request.urlopen(f"http://127.0.0.1:{port}/static/cutplan.css", timeout=20) as resp:
            assert resp.status == 200
    finally:
        for s in slow:
            s.close()
        proc.kill()
        proc.wait(timeout=20)
        proc.stderr.close()


class _Serving:
    """Run a waitress server in a thread; closing it from the test thread may race its select
    loop (a closed descriptor), which is the test's own doing and not reported."""

    def __init__(self, server):
        self.server, self.closing = server, False
        self.thread = threading.Thread(target=self._run, daemon=True)
        self.thread.start()

    def _run(self):
        try:
            self.server.run()
        except (OSError, ValueError):
            if not self.closing:
                raise

    def close(self):
        self.closing = True
        self.server.close()
        self.thread.join(timeout=10)


def _served(port):
    import urllib.request

    with urllib.request.urlopen(f"http://127.0.0.1:{port}/static/cutplan.css", timeout=20) as resp:
        return resp.status


def _closed_by_server(sock, deadline):
    """True once the server has closed ``sock`` (recv gives b"" or a reset) before ``deadline``."""
    import socket

    while time.monotonic() < deadline:
        try:
            sock.sendall(b"a")  # one more byte of a header that never ends
            sock.settimeout(0.3)
            if sock.recv(1024) == b"":
                return True
        except socket.timeout:
            continue
        except OSError:  # reset or broken pipe: closed
            return True
    return False


def test_a_client_that_dribbles_its_headers_is_cut_off_while_others_are_served():
    # A byte every 0.3 s keeps waitress's idle clock (channel_timeout) from ever running out;
    # the header limit counts from the request's first byte instead (common practice for
    # servers facing slow clients: a total time for the request head).
    import socket

    from cutplan.web.server import listening_socket, make_server

    sock = listening_socket("127.0.0.1", 0)
    serving = _Serving(make_server(create_app(), sock, threads=2, header_timeout=0.8, idle_timeout=30,
                                   check_interval=0.1))
    port = sock.getsockname()[1]
    slow = socket.create_connection(("127.0.0.1", port), timeout=5)
    try:
        slow.sendall(b"GET / HTTP/1.1\r\nHost: 127.0.0.1\r\nX-Slow: ")
        assert _served(port) == 200  # a normal request is served meanwhile
        started = time.monotonic()
        assert _closed_by_server(slow, started + 20)
        assert time.monotonic() - started < 20  # cut off well before the idle limit (30 s) would
        assert _served(port) == 200
    finally:
        slow.close()
        serving.close()


def test_a_quiet_keep_alive_connection_is_left_alone_within_the_idle_limit():
    # the header limit is for a request being read, not for a connection between requests
    import http.client

    from cutplan.web.server import listening_socket, make_server

    sock = listening_socket("127.0.0.1", 0)
    server = make_server(create_app(), sock, threads=2, header_timeout=0.3, idle_timeout=30, check_interval=0.1)
    # waitress looks for overdue connections when its loop wakes, at the latest every
    # asyncore_loop_timeout (1 s by default): waking every 0.1 s, it looks several times
    # within the quiet spell below, each time past the header limit
    server.adj.asyncore_loop_timeout = 0.1
    serving = _Serving(server)
    conn = http.client.HTTPConnection("127.0.0.1", sock.getsockname()[1], timeout=10)
    try:
        for k in range(2):
            if k:
                time.sleep(1.0)  # longer than the header limit, on the same connection
            conn.request("GET", "/static/cutplan.css")
            resp = conn.getresponse()
            resp.read()
            assert resp.status == 200
            if not k:
                first = conn.sock
        assert conn.sock is first  # the same connection served both (none was opened again)
    finally:
        conn.close()
        serving.close()

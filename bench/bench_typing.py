"""Benchmark on loopback: typing into a heavy design on the page.

Starts ``cutplan serve --port 0`` in a child process.  The design is 49 undercut bars (C3 to C7
chromatic, our own workshop demo).  First the time of one preview (``POST /preview`` with a new
title, so it is planned afresh), then eight edits 0.4 s apart, as the page sends them while
someone types: each new edit abandons the previous request (the page aborts its fetch; here the
connection is closed), so the server stops planning it.  Target: the last edit's answer within
twice a single preview's time.  Wall-clock times, so run it on a quiet machine.

    python bench/bench_typing.py
"""

from __future__ import annotations

import http.client
import sys
import threading
import time
import urllib.parse
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "bench"))

from bench_web import _start_server  # noqa: E402

EDITS = 8
GAP_S = 0.4


def _design(title):
    from cutplan.web.form import form_from_mapping

    data = {"title": title, "set": [{"name": "bars", "kind": "bar", "range": "C3..C7", "scale": "chromatic",
                                     "material": "maple-sugar",
                                     "section": {"shape": "bar", "width": "50 mm", "thickness": "22 mm"},
                                     "undercut": {"ratios": [4.0]}}],
            "stock": {"lengths": [{"length": "2.4 m"}]}}
    return urllib.parse.urlencode(form_from_mapping(data)).encode()


def _send(host, port, title):
    conn = http.client.HTTPConnection(host, port, timeout=600)
    conn.request("POST", "/preview", body=_design(title),
                 headers={"Content-Type": "application/x-www-form-urlencoded", "Accept": "application/json"})
    return conn


def main():
    proc, url = _start_server()
    try:
        parsed = urllib.parse.urlparse(url)
        host, port = parsed.hostname, parsed.port
        _send(host, port, "warm-up").getresponse().read()  # the worker's imports
        start = time.perf_counter()
        _send(host, port, "single").getresponse().read()
        single = time.perf_counter() - start
        conns = []
        for k in range(EDITS):
            if conns:
                conns[-1].close()  # the page aborts the stale fetch
            conns.append(_send(host, port, f"edit {k}"))
            if k < EDITS - 1:
                time.sleep(GAP_S)
        sent = time.perf_counter()
        status = [None]

        def last():
            resp = conns[-1].getresponse()
            resp.read()
            status[0] = resp.status

        t = threading.Thread(target=last)
        t.start()
        t.join(600)
        answered = time.perf_counter() - sent
        print(f"{'single preview of 49 undercut bars':44} {single:8.2f} s")
        print(f"{'last of 8 edits 0.4 s apart (stale aborted)':44} {answered:8.2f} s  (HTTP {status[0]}; "
              f"{answered / single:.2f} x a single preview; target under 2)")
    finally:
        proc.kill()
        proc.wait()


if __name__ == "__main__":
    main()

"""Web page benchmark on loopback: the porch preview, and 20 plan requests at once.

Starts ``cutplan serve --port 0`` in a child process, then:

1. the porch preview (``POST /preview``, the live page's request) N times, each with a new title so
   that the plan is computed afresh (cold), and N times with the same design (warm: the server
   keeps the last few plans);
2. 20 concurrent ``POST /api/plan`` requests (each a fresh porch design): all must succeed.

Server time is the ``Server-Timing`` header the page sets (time inside the application);
the client time includes HTTP on loopback. CPU seconds of the server process and its planning workers
come from /proc. ``--busy`` adds two spinning processes (2 cores on the build machine) for the run.

    python bench/bench_web.py [--repeat 9] [--busy]
"""

from __future__ import annotations

import argparse
import concurrent.futures
import json
import os
import re
import statistics
import subprocess
import sys
import time
import tomllib
import urllib.parse
import urllib.request
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
PORCH = ROOT / "examples" / "porch-chimes.toml"
TARGET_MS = 300.0
"""Median server time wanted for the porch preview [ms]."""
CONCURRENT = 20


def _stat(pid):
    return Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()


def _cpu_seconds(pid):
    """CPU seconds of the server process and its live children (the planning workers)."""
    total = 0.0
    for entry in Path("/proc").iterdir():
        if not entry.name.isdigit():
            continue
        try:
            fields = _stat(entry.name)
        except OSError:
            continue
        if entry.name == str(pid) or fields[1] == str(pid):
            total += (int(fields[11]) + int(fields[12])) / os.sysconf("SC_CLK_TCK")
    return total


def _start_server():
    proc = subprocess.Popen([sys.executable, "-c", "from cutplan.cli import cli; cli()", "serve", "--port", "0"],
                            stderr=subprocess.PIPE, text=True)
    line = proc.stderr.readline()
    m = re.search(r"(http://\S+)/", line)
    if not m:
        proc.kill()
        raise SystemExit(f"server did not start: {line}")
    return proc, m.group(1)


def _post(url, body, content_type):
    req = urllib.request.Request(url, data=body, headers={"Content-Type": content_type, "Accept": "application/json"})
    start = time.perf_counter()
    with urllib.request.urlopen(req, timeout=600) as resp:
        payload = resp.read()
        status = resp.status
        timing = resp.headers.get("Server-Timing", "")
    client_ms = 1000 * (time.perf_counter() - start)
    m = re.search(r"dur=([\d.]+)", timing)
    return status, float(m.group(1)) if m else float("nan"), client_ms, payload


def _form(title):
    from cutplan.web.form import form_from_mapping

    data = tomllib.loads(PORCH.read_text(encoding="utf-8"))
    data["title"] = title
    return urllib.parse.urlencode(form_from_mapping(data)).encode()


def _row(name, server_ms, client_ms, extra=""):
    med, p90 = statistics.median(server_ms), sorted(server_ms)[int(0.9 * (len(server_ms) - 1))]
    return f"{name:<34} {len(server_ms):>4} {med:>10.0f} {p90:>10.0f} {statistics.median(client_ms):>10.0f}  {extra}"


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=9, help="Preview requests per row.")
    ap.add_argument("--busy", action="store_true", help="Run with two spinning processes (a busy machine).")
    args = ap.parse_args()
    spinners = [subprocess.Popen([sys.executable, "-c", "while True: pass"]) for _ in range(2 if args.busy else 0)]
    proc, base = _start_server()
    try:
        _post(base + "/preview", _form("warm-up"), "application/x-www-form-urlencoded")
        print(f"cutplan web bench on {base}{' (machine busy: 2 spinning processes)' if args.busy else ''}")
        print(f"{'request':<34} {'n':>4} {'server ms':>10} {'p90 ms':>10} {'client ms':>10}")
        cpu0 = _cpu_seconds(proc.pid)
        cold = [_post(base + "/preview", _form(f"Porch {k}"), "application/x-www-form-urlencoded") for k in range(args.repeat)]
        cpu_cold = (_cpu_seconds(proc.pid) - cpu0) / args.repeat
        warm = [_post(base + "/preview", _form("Porch 0"), "application/x-www-form-urlencoded") for _ in range(args.repeat)]
        assert all(r[0] == 200 and json.loads(r[3])["ok"] for r in cold + warm)
        med = statistics.median(r[1] for r in cold)
        print(_row("porch preview, new design (cold)", [r[1] for r in cold], [r[2] for r in cold],
                   f"CPU {cpu_cold:.2f} s/request; target {TARGET_MS:.0f} ms: {'met' if med < TARGET_MS else 'NOT met'}"))
        print(_row("porch preview, same design (warm)", [r[1] for r in warm], [r[2] for r in warm],
                   f"target {TARGET_MS:.0f} ms: {'met' if statistics.median(r[1] for r in warm) < TARGET_MS else 'NOT met'}"))
        data = tomllib.loads(PORCH.read_text(encoding="utf-8"))
        bodies = [json.dumps({**data, "title": f"Porch load {k}"}).encode() for k in range(CONCURRENT)]
        start = time.perf_counter()
        with concurrent.futures.ThreadPoolExecutor(CONCURRENT) as pool:
            results = list(pool.map(lambda b: _post(base + "/api/plan", b, "application/json"), bodies))
        wall = time.perf_counter() - start
        ok = sum(1 for r in results if r[0] == 200 and len(json.loads(r[3])["pieces"]) == 5)
        print(_row(f"{CONCURRENT} concurrent /api/plan", [r[1] for r in results], [r[2] for r in results],
                   f"{ok}/{CONCURRENT} succeeded in {wall:.1f} s wall"))
        if ok != CONCURRENT:
            raise SystemExit(f"only {ok} of {CONCURRENT} concurrent plan requests succeeded")
    finally:
        proc.terminate()
        proc.wait(timeout=30)
        for s in spinners:
            s.kill()
            s.wait()


if __name__ == "__main__":
    main()

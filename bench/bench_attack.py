"""Benchmark: generated attacks on what the second hardening round closed.

Run: python bench/bench_attack.py [--designs 400] [--recordings 150] [--folders 60] [--requests 300]
[--pairs 20] [--homes 20] [--trims 4] (prints a table; never run as a test; about 4 CPU minutes with
the defaults).  Every kind of input is generated from fixed seeds:

* designs mutated at every key (tests/fuzzing.py) through ``plan --format json``;
* damaged recordings (tests/fuzzing.py) through ``measure``;

* damaged ``--materials`` folders (pipes, device links, folders and link loops named *.toml,
  malformed rows, out-of-range values, escape codes, deep nesting) through ``materials`` and
  ``plan``; special files run in a subprocess with a time limit, so a hang is counted, not suffered;
* the page: every POST route with generated designs (tests/fuzzing.py), some from a foreign
  Origin, through the Flask test client (in-process: nothing leaves the machine);
* ``plan -o DIR --force`` over folders of the user's own things (own plan.csv, empty folders,
  folder links, a private folder): refused or nothing of theirs changed;
* concurrent writers: pairs of ``plan -o`` runs into one packet holding a user's file, and pairs of
  ``trim`` runs keeping their rounds in one state file (a round lost counts as data lost);
* hostile page inputs on every route: 5000-digit numbers, JSON and TOML nested 10,000 deep, a TOML
  date, ``count: null``, ``length_now = "1e308 m"``, price 0, listening to 24 pieces.

Columns: runs, exit 0 (HTTP 2xx), exit 2 (HTTP 4xx), tracebacks (HTTP 500, or an exit code other
than 0 and 2), hangs, absurd exit 0 (a plan with an impossible length or a piece whose predicted
pitch misses its target by more than 5 cents, a foreign post served, a measurement with no
fundamental), data lost.
"""

from __future__ import annotations

import argparse
import io
import json
import math
import os
import subprocess
import sys
import tempfile
from pathlib import Path

import numpy as np
from click.testing import CliRunner

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from cutplan.cli import cli  # noqa: E402
from tests.fuzzing import bad_lengths, broken_wav, mutated_design, to_toml  # noqa: E402
from tests.tuning.test_trim_state_lock import TWO_BARS  # noqa: E402

DESIGN = ('[[set]]\nkind = "chime"\nnotes = ["D5", "E5"]\nmaterial = "{material}"\n'
          'section = {{ stock = "al-1.000x0.065" }}\n')
TABLES = [
    '[{name}]\nmodulus = "{v}"\ndensity = "2700 kg/m3"\nclass = "metal"\n',
    '[{name}]\nmodulus = "70 GPa"\ndensity = "{v}"\nunusual = true\n',
    '[{name}]\nmodulus = "70 GPa"\ndensity = "2700 kg/m3"\nshear_ratio = {n}\n',
    '[{name}]\nmodulus = "70 GPa"\ndensity = "2700 kg/m3"\npoisson = {n}\n',
    '{name} = {n}\n',
    '[table]\nwall_factor = {n}\n[sizes.x]\nouter = "1 in"\nwall = "0.065 in"\n',
    '[table]\nshape = "tube"\n[sizes.x]\nouter = "1 in"\nwall = "0.065 in"\ninner = "{v}"\n',
    '[sizes.x]\nouter = "{v}"\nwall = "0.065 in"\n',
    'sizes = {{ x = {n} }}\n',
    'table = {n}\n[sizes.x]\nouter = "1 in"\nwall = "0.065 in"\n',
    '[{name}]\nmodulus = "70 GPa"\ndensity = "2700 kg/m3"\ndescription = "\\u001b[2J{v}"\n',
    'x = ' + '[' * 2000 + ']' * 2000 + '\n',
]
VALUES = ["abc", "1e308 GPa", "-1 mm", "0", "2 in", "70 MPa", "nan", "1e-300 kg/m3", "\\u001b[31m", "3.7e78 GPa"]
NUMBERS = ["1e308", "-1", "0", '"abc"', "inf", "nan", "[1, 2]", "{ a = 1 }", "true", "1.0"]
SPECIAL = ["fifo", "device", "folder", "loop"]


def _cli(args):
    result = CliRunner().invoke(cli, [str(a) for a in args])
    return result.exit_code, "Traceback" in result.output or result.exit_code not in (0, 2)


def _row():
    return dict(runs=0, ok=0, refused=0, tracebacks=0, hangs=0, absurd=0, lost=0)


def _off_target(plan_json):
    """Pieces whose predicted pitch misses the target by more than 5 cents (the plan's own model)."""
    return [p["label"] for p in plan_json["pieces"]
            if p.get("target_hz") and p.get("predicted_hz")
            and abs(1200 * math.log2(p["predicted_hz"] / p["target_hz"])) > 5]


def designs(n, work):
    row = _row()
    path = work / "design.toml"
    for seed in range(n):
        path.write_text(to_toml(mutated_design(np.random.default_rng(seed))), encoding="utf-8")
        result = CliRunner().invoke(cli, ["plan", str(path), "--format", "json"])
        row["runs"] += 1
        row["tracebacks"] += "Traceback" in result.output or result.exit_code not in (0, 2)
        row["ok" if result.exit_code == 0 else "refused"] += result.exit_code in (0, 2)
        if result.exit_code == 0:
            plan = json.loads(result.output)
            row["absurd"] += bool(bad_lengths(plan) or _off_target(plan))
    return row


def recordings(n, work):
    row = _row()
    path = work / "take.wav"
    for seed in range(n):
        path.write_bytes(broken_wav(np.random.default_rng(10_000 + seed))[1])
        result = CliRunner().invoke(cli, ["measure", str(path), "--format", "json"])
        row["runs"] += 1
        row["tracebacks"] += "Traceback" in result.output or result.exit_code not in (0, 2)
        row["ok" if result.exit_code == 0 else "refused"] += result.exit_code in (0, 2)
        if result.exit_code == 0:
            data = json.loads(result.output)
            f1 = data.get("fundamental_hz")
            row["absurd"] += not (isinstance(f1, (int, float)) and math.isfinite(f1) and f1 > 0)
    return row


NESTED_TOML = "title = 'x'\n" + "a = " + "[" * 10_000 + "]" * 10_000 + "\n"


def hostile(work):
    """The page's hostile inputs, each on the routes that take it (test client, in-process)."""
    from cutplan.web import form as webform
    from cutplan.web.app import create_app

    row = _row()
    client = create_app().test_client()
    design = {"title": "porch", "set": [{"kind": "chime", "name": "porch", "notes": ["D5", "E5"],
                                      "section": {"stock": "al-1.000x0.065"}}]}
    porch = webform.form_from_mapping(design)
    notes = next(k for k in porch if k.endswith(".notes"))
    stock = next((k for k in porch if k.endswith("section.stock")), notes)
    cases = [
        ("/api/plan", "json", "{\"title\": " + "9" * 5000 + "}"),
        ("/api/plan", "json", "[" * 10_000 + "]" * 10_000),
        ("/api/plan", "json", json.dumps({**design, "set": [{**design["set"][0], "count": None}]})),
        ("/api/plan", "json", json.dumps({**design, "set": [{**design["set"][0], "notes": None, "scale": "major",
                                                             "root": "D5", "count": None}]})),
        ("/api/plan", "json", json.dumps({**design, "stock": {"lengths": [{"length": "8 ft", "price": 0}]}})),
        ("/api/plan", "json", json.dumps({**design, "stock": {"lengths": [{"length": "1e308 m", "count": 1}]}})),
        ("/api/plan", "json", json.dumps({**design, "tuning": {"a4": 1}}).replace('"a4": 1', '"a4": ' + "4" * 5000)),
        ("/api/plan", "json", json.dumps({**design, "set": [{**design["set"][0], "notes": [
            f"{n}{o}" for o in (4, 5, 6) for n in "CDEFGAB"] + ["C7", "D7", "E7"]}]})),
        ("/api/packet", "json", "{" * 5000),
        ("/", "form", {**porch, notes.replace("notes", "count"): "null"}),
        ("/", "form", {**porch, notes: "9" * 5000}),
        ("/preview", "form", {**porch, "stock.lengths": "1e308 m"}),
        ("/api/trim", "form", {**porch, "trim.piece": "porch-1", "trim.length_now": "1e308 m",
                               "trim.measured": "600"}),
        ("/api/trim", "form", {**porch, "trim.piece": "porch-1", "trim.measured": "9" * 5000}),
        ("/listen", "form", {**porch, notes: " ".join(f"{n}{o}" for o in (4, 5, 6, 7)
                                                                    for n in "CDEFGA"), "listen": "porch"}),
        ("/", "file", NESTED_TOML),
        ("/", "file", "title = 'x'\nwhen = 1979-05-27T07:32:00Z\n[[set]]\nkind = 'chime'\n"),
        ("/packet.zip", "form", {**porch, stock: "x" * 5000}),
        ("/packet.pdf", "form", {**porch, "units": "\x1b[2J"}),
        ("/design.toml", "form", {**porch, "title": "[" * 5000}),
    ]
    for route, how, body in cases:
        for foreign in (False, True):
            headers = {"Origin": "http://elsewhere.example", "Sec-Fetch-Site": "cross-site"} if foreign else {}
            if how == "json":
                resp = client.post(route, data=body, content_type="application/json", headers=headers)
            elif how == "file":
                resp = client.post(route, data={"design_file": (io.BytesIO(body.encode()), "d.toml"), "action": "open"},
                                   content_type="multipart/form-data", headers=headers)
            else:
                resp = client.post(route, data=body, headers=headers)
            row["runs"] += 1
            status = resp.status_code
            row["tracebacks"] += status >= 500
            row["ok" if status < 300 else "refused"] += status < 500
            row["absurd"] += foreign and status < 300
            resp.close()
    return row


def _tally(procs, row, timeout):
    """Wait for processes run side by side and count them into ``row`` (a hang is killed)."""
    for p in procs:
        try:
            _, err = p.communicate(timeout=timeout)
        except subprocess.TimeoutExpired:
            p.kill()
            row["hangs"] += 1
            continue
        row["runs"] += 1
        row["tracebacks"] += "Traceback" in err
        row["ok" if p.returncode == 0 else "refused"] += p.returncode in (0, 2)


def trims(n, work):
    """Pairs of ``trim`` runs on one design at once: both rounds must be kept in its state file."""
    row = _row()
    command = [sys.executable, "-c", "from cutplan.cli import cli; cli()", "trim"]
    for k in range(n):
        design = work / f"bars-{k}.toml"
        design.write_text(TWO_BARS)
        procs = [subprocess.Popen(command + [str(design), label, "--measured", measured], cwd=ROOT, text=True,
                                  stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
                 for label, measured in (("bars-1", "255.2, 1049.8"), ("bars-2", "286.0, 1180.0"))]
        _tally(procs, row, 600)
        state = work / f"bars-{k}.trim-state.json"
        kept = json.loads(state.read_text())["pieces"] if state.exists() else {}
        row["lost"] += 2 - len(set(kept) & {"bars-1", "bars-2"})
    return row


def folders(n, work):
    row = dict(runs=0, ok=0, refused=0, tracebacks=0, hangs=0, absurd=0, lost=0)
    rng = np.random.default_rng(11)
    for k in range(n):
        folder = work / f"tables-{k}"
        folder.mkdir()
        name = f"shop-{k}"
        special = SPECIAL[k % len(SPECIAL)] if k < 2 * len(SPECIAL) else None
        if special:
            path = folder / "shop.toml"
            {"fifo": lambda: os.mkfifo(path), "device": lambda: path.symlink_to("/dev/zero"),
             "folder": path.mkdir, "loop": lambda: path.symlink_to(path.name)}[special]()
        else:
            text = TABLES[int(rng.integers(len(TABLES)))].format(
                name=name, v=VALUES[int(rng.integers(len(VALUES)))], n=NUMBERS[int(rng.integers(len(NUMBERS)))])
            (folder / "shop.toml").write_text(text)
        design = work / f"design-{k}.toml"
        design.write_text(DESIGN.format(material=name))
        for args in (["materials", "--materials", folder], ["plan", design, "--materials", folder, "--format", "json"]):
            row["runs"] += 1
            if special:
                try:
                    done = subprocess.run([sys.executable, "-c", "from cutplan.cli import cli; cli()",
                                           *map(str, args)], capture_output=True, text=True, timeout=60, cwd=ROOT)
                except subprocess.TimeoutExpired:
                    row["hangs"] += 1
                    continue
                code, tb = done.returncode, "Traceback" in done.stderr + done.stdout
            else:
                code, tb = _cli(args)
            row["tracebacks"] += tb
            row["ok" if code == 0 else "refused"] += code in (0, 2)
    return row


def requests(n, work):
    from cutplan.web import form as webform
    from cutplan.web.app import create_app

    row = dict(runs=0, ok=0, refused=0, tracebacks=0, hangs=0, absurd=0, lost=0)
    client = create_app().test_client()
    routes = ["/", "/preview", "/packet.zip", "/packet.pdf", "/design.toml", "/listen", "/api/trim",
              "/api/plan", "/api/packet"]
    for k in range(n):
        rng = np.random.default_rng(50_000 + k)
        design = mutated_design(rng)
        route = routes[k % len(routes)]
        foreign = k % 7 == 0
        headers = {"Origin": "http://elsewhere.example"} if foreign else {}
        if route.startswith("/api/plan") or route == "/api/packet":
            resp = client.post(route, data=json.dumps(design, default=str), content_type="application/json",
                               headers=headers)
        else:
            try:
                fields = webform.form_from_mapping(design)
            except Exception:  # noqa: BLE001 - a design the form cannot show: post it raw
                fields = {"title": str(design.get("title", ""))}
            fields.update({"listen": "porch", "trim.piece": "porch-1", "trim.measured": "600"})
            resp = client.post(route, data=fields, headers=headers)
        row["runs"] += 1
        status = resp.status_code
        row["tracebacks"] += status >= 500
        row["ok" if status < 300 else "refused"] += status < 500
        if foreign and status < 300:
            row["absurd"] += 1  # a foreign post served
        elif route == "/api/plan" and status == 200 and bad_lengths(json.loads(resp.get_data(as_text=True))):
            row["absurd"] += 1
        resp.close()
    return row


def homes(n, work):
    row = dict(runs=0, ok=0, refused=0, tracebacks=0, hangs=0, absurd=0, lost=0)
    design = ROOT / "examples" / "porch-chimes.toml"
    for k in range(n):
        home = work / f"home-{k}"
        (home / "docs").mkdir(parents=True)
        (home / "docs" / "letter.txt").write_text(f"mine {k}")
        if k % 2:
            (home / "plan.csv").write_text("my own sheet")
        if k % 3 == 0:
            (home / "empty").mkdir()
        if k % 4 == 0:
            (home / "link").symlink_to(home / "docs")
        os.chmod(home / "docs", 0o700)
        before = _state(home)
        code, tb = _cli(["plan", design, "-o", home, "--force"])
        row["runs"] += 1
        row["tracebacks"] += tb
        row["ok" if code == 0 else "refused"] += code in (0, 2)
        after = _state(home)
        row["lost"] += sum(1 for key, value in before.items() if after.get(key) != value)
    return row


def _state(root):
    out = {}
    for dirpath, dirs, files in os.walk(root, followlinks=False):
        for name in dirs + files:
            full = os.path.join(dirpath, name)
            st = os.lstat(full)
            if os.path.islink(full):
                out[full] = ("link", os.readlink(full))
            elif os.path.isdir(full):
                out[full] = ("dir", st.st_mode & 0o7777)
            else:
                out[full] = ("file", st.st_mode & 0o7777, Path(full).read_bytes())
    return out


def pairs(n, work):
    row = dict(runs=0, ok=0, refused=0, tracebacks=0, hangs=0, absurd=0, lost=0)
    a, b = ROOT / "examples" / "porch-chimes.toml", ROOT / "examples" / "garden-conduit-chime.toml"
    out = work / "packet"
    command = [sys.executable, "-c", "from cutplan.cli import cli; cli()", "plan"]
    subprocess.run(command + [str(a), "-o", str(out)], check=True, capture_output=True, cwd=ROOT)
    (out / "mine.txt").write_text("only copy")
    for _ in range(n):
        procs = [subprocess.Popen(command + [str(d), "-o", str(out), "--force"], cwd=ROOT, text=True,
                                  stdout=subprocess.DEVNULL, stderr=subprocess.PIPE) for d in (a, b)]
        _tally(procs, row, 300)
        kept = (out / "mine.txt").is_file() and (out / "mine.txt").read_text() == "only copy"
        leftovers = [p for p in work.iterdir() if p.name.startswith(".packet")]
        row["lost"] += (not kept) + len(leftovers)
    return row


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--designs", type=int, default=400)
    parser.add_argument("--recordings", type=int, default=150)
    parser.add_argument("--trims", type=int, default=4)
    parser.add_argument("--folders", type=int, default=60)
    parser.add_argument("--requests", type=int, default=300)
    parser.add_argument("--pairs", type=int, default=20)
    parser.add_argument("--homes", type=int, default=20)
    args = parser.parse_args()
    rows = []
    with tempfile.TemporaryDirectory() as tmp:
        work = Path(tmp)
        rows.append(("generated designs (plan --json)", designs(args.designs, work)))
        rows.append(("damaged recordings (measure)", recordings(args.recordings, work)))
        rows.append(("damaged --materials folders", folders(args.folders, work)))
        rows.append(("page POST routes (test client)", requests(args.requests, work)))
        rows.append(("--force over a user's folder", homes(args.homes, work)))
        rows.append(("hostile page inputs, every route", hostile(work)))
        rows.append(("concurrent plan -o pairs", pairs(args.pairs, work)))
        rows.append(("concurrent trim pairs, one state", trims(args.trims, work)))
    head = ["runs", "exit 0", "exit 2", "tracebacks", "hangs", "absurd exit 0", "data lost"]
    print(f"{'input':32} " + " ".join(f"{h:>13}" for h in head))
    for name, r in rows:
        values = [r["runs"], r["ok"], r["refused"], r["tracebacks"], r["hangs"], r["absurd"], r["lost"]]
        print(f"{name:32} " + " ".join(f"{v:>13}" for v in values))


if __name__ == "__main__":
    main()

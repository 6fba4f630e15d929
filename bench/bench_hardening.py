"""Benchmark: the hardening promise over many generated inputs.

Run: python bench/bench_hardening.py [--designs 5000] [--recordings 1000] [--kills 40]
(prints a table; never run as a test). Designs are mutated at every key (tests/fuzzing.py) and
planned through the command line in-process; broken WAVs are measured; ``plan -o`` is killed
with SIGKILL at random moments and the folder is checked to be one whole packet. Figures are
CPU seconds, so they do not depend on how busy the machine is.
"""

from __future__ import annotations

import argparse
import collections
import json
import signal
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
from click.testing import CliRunner

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from cutplan.cli import cli  # noqa: E402
from tests.fuzzing import bad_lengths, broken_wav, mutated_design, to_toml  # noqa: E402


def _run(args):
    result = CliRunner().invoke(cli, args)
    crashed = result.exit_code not in (0, 2) or "Traceback" in result.output
    return result, crashed


def designs(n, work):
    codes, crashes, bad, worst = collections.Counter(), [], 0, (0.0, None)
    path = work / "design.toml"
    start = time.process_time()
    for seed in range(n):
        design = mutated_design(np.random.default_rng(seed))
        path.write_text(to_toml(design), encoding="utf-8")
        t0 = time.process_time()
        result, crashed = _run(["plan", str(path), "--format", "json"])
        spent = time.process_time() - t0
        worst = max(worst, (spent, seed), key=lambda w: w[0])
        codes[result.exit_code] += 1
        if crashed:
            crashes.append((seed, repr(result.exception)[:120]))
        elif result.exit_code == 0 and bad_lengths(json.loads(result.output)):
            bad += 1
    return codes, crashes, bad, time.process_time() - start, worst


def recordings(n, work):
    by_damage, crashes = collections.defaultdict(collections.Counter), []
    path = work / "take.wav"
    start = time.process_time()
    for seed in range(n):
        damage, data = broken_wav(np.random.default_rng(10_000 + seed))
        path.write_bytes(data)
        near = ["--near", "D5"] if seed % 3 == 0 else []
        result, crashed = _run(["measure", str(path), *near])
        by_damage[damage][result.exit_code] += 1
        if crashed:
            crashes.append((damage, repr(result.exception)[:120]))
    return by_damage, crashes, time.process_time() - start


def _packet_state(out, refs):
    """'old', 'new', 'missing' or 'mixed' for the folder after a kill."""
    if not out.exists():
        return "missing"
    files = {str(p.relative_to(out)): p.read_bytes() for p in out.rglob("*") if p.is_file()}
    for name, ref in refs.items():
        if files == ref:
            return name
    return "mixed"


def kills(n, work):
    a, b = ROOT / "examples" / "porch-chimes.toml", ROOT / "examples" / "garden-conduit-chime.toml"
    out, refs = work / "packet", {}
    for name, design in (("new", b), ("old", a)):
        subprocess.run([sys.executable, "-c", "from cutplan.cli import cli; cli()", "plan", str(design), "-o", str(out), "--force"],
                       check=True, capture_output=True, cwd=ROOT)
        refs[name] = {str(p.relative_to(out)): p.read_bytes() for p in out.rglob("*") if p.is_file()}
    states, rng, stale = collections.Counter(), np.random.default_rng(7), 0
    for _ in range(n):
        proc = subprocess.Popen([sys.executable, "-c", "from cutplan.cli import cli; cli()", "plan", str(b),
                                 "-o", str(out), "--force"], cwd=ROOT, stdout=subprocess.DEVNULL,
                                stderr=subprocess.DEVNULL)
        time.sleep(float(rng.uniform(0.3, 6.0)))
        proc.send_signal(signal.SIGKILL)
        proc.wait()
        states[_packet_state(out, refs)] += 1
        stale += sum(1 for p in work.iterdir() if p.name.startswith(".packet"))
        subprocess.run([sys.executable, "-c", "from cutplan.cli import cli; cli()", "plan", str(a), "-o", str(out),
                        "--force"], check=True, capture_output=True, cwd=ROOT)  # back to the old packet
    leftovers = [p.name for p in work.iterdir() if p.name.startswith(".packet")]
    return states, stale, leftovers


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--designs", type=int, default=5000)
    parser.add_argument("--recordings", type=int, default=1000)
    parser.add_argument("--kills", type=int, default=40)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        work = Path(tmp)
        codes, d_crash, bad, d_cpu, worst = designs(args.designs, work)
        by_damage, r_crash, r_cpu = recordings(args.recordings, work)
        states, stale, leftovers = kills(args.kills, work) if args.kills else ({}, 0, [])
    print(f"{'input':34} {'runs':>6} {'exit 0':>7} {'exit 2':>7} {'crash':>6} {'CPU s':>7} {'CPU ms/run':>10}")
    print(f"{'generated designs (plan --json)':34} {args.designs:6d} {codes[0]:7d} {codes[2]:7d} {len(d_crash):6d} "
          f"{d_cpu:7.1f} {1000 * d_cpu / max(args.designs, 1):10.1f}")
    r0 = sum(c[0] for c in by_damage.values())
    r2 = sum(c[2] for c in by_damage.values())
    print(f"{'broken recordings (measure)':34} {args.recordings:6d} {r0:7d} {r2:7d} {len(r_crash):6d} "
          f"{r_cpu:7.1f} {1000 * r_cpu / max(args.recordings, 1):10.1f}")
    print(f"\nexit-0 plans with a NaN/inf/zero/negative length: {bad}")
    print(f"slowest design: {worst[0]:.2f} CPU s (seed {worst[1]})")
    print("\nbroken recordings by damage:  " + ", ".join(
        f"{k} {dict(v)}" for k, v in sorted(by_damage.items())))
    if args.kills:
        print(f"\nplan -o killed with SIGKILL {args.kills} times: folder afterwards {dict(states)}; "
              f"hidden temporary folders right after a kill: {stale}, after the next run: {len(leftovers)}")
    for seed, exc in (d_crash + r_crash)[:10]:
        print(f"  crash: {seed}: {exc}")


if __name__ == "__main__":
    main()

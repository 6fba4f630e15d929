"""Benchmark: whole plans as the command line runs them, in CPU seconds, quiet and under load.

Run: python bench/bench_plan.py            (prints a table; never run as a test)

Each row runs ``cutplan plan DESIGN --format json`` in a fresh process and reports the CPU
seconds the process used (user + system, from wait4), once on a quiet machine and once with two
busy loops (``python3 -c "while True: pass"``) competing for the cores; the loops are killed
afterwards.  A result that changes with load is a bug, so the JSON of both runs is compared.
Targets: 49 undercut bars (1-D beam model) + 49 resonators <= 3 s (the default 2-D model is in
bench_elastic2d.py), 100 chimes with stock <= 2 s, porch <= 0.6 s.
"""

import hashlib
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent

FOUR_OCTAVES = """
title = "Four-octave undercut set"
[[set]]
name = "bars"
kind = "bar"
range = "C3..C7"
scale = "chromatic"
material = "rosewood-honduras"
model = "timoshenko"
section = { shape = "bar", width = "55 mm", thickness = "24 mm" }
undercut = { ratios = [4.0], arch_width = 0.5, min_thickness = "5 mm" }
[[set]]
name = "res"
kind = "resonator"
serves = "bars"
section = { stock = "pvc-sch40-1" }
temperature_range = ["12 C", "28 C"]
max_length = "1.2 m"
"""


def hundred_chimes():
    """100 aluminium chimes from 220 Hz to 1760 Hz (demo data), cut from 8 ft sticks."""
    freqs = ", ".join(f"{220.0 * 2 ** (3 * k / 99):.3f}" for k in range(100))
    return f"""
title = "Hundred chimes"
[[set]]
name = "chimes"
kind = "chime"
frequencies = [{freqs}]
material = "aluminum-6063-t5"
section = {{ stock = "al-1.000x0.065" }}
[stock]
lengths = [{{ length = "8 ft" }}]
kerf = "1/16 in"
end_trim = "1/8 in"
allowance = "risk 5 %"
"""


def cpu_of(args):
    """(CPU seconds of a child process, its stdout hash, wall seconds)."""
    start = time.perf_counter()
    with tempfile.TemporaryFile() as out:
        proc = subprocess.Popen(args, stdout=out, stderr=subprocess.DEVNULL)
        _, status, usage = os.wait4(proc.pid, 0)
        proc.returncode = os.waitstatus_to_exitcode(status)
        out.seek(0)
        digest = hashlib.sha256(out.read()).hexdigest()[:12]
    if proc.returncode != 0:
        raise SystemExit(f"{' '.join(args)} failed with exit code {proc.returncode}")
    return usage.ru_utime + usage.ru_stime, digest, time.perf_counter() - start


def best_of(args, repeat):
    runs = [cpu_of(args) for _ in range(repeat)]
    return min(r[0] for r in runs), runs[0][1], min(r[2] for r in runs)


def busy_loops(count=2):
    return [subprocess.Popen([sys.executable, "-c", "while True: pass"]) for _ in range(count)]


def main():
    cutplan = [str(Path(sys.executable).with_name("cutplan"))]
    with tempfile.TemporaryDirectory() as tmp:
        four = Path(tmp) / "four-octaves.toml"
        four.write_text(FOUR_OCTAVES)
        chimes = Path(tmp) / "hundred-chimes.toml"
        chimes.write_text(hundred_chimes())
        rows = [
            ("49 undercut bars + 49 resonators", cutplan + ["plan", str(four), "--format", "json"], 3.0, 1),
            ("100 chimes with stock", cutplan + ["plan", str(chimes), "--format", "json"], 2.0, 3),
            ("porch example", cutplan + ["plan", str(ROOT / "examples" / "porch-chimes.toml"), "--format", "json"],
             0.6, 3),
            ("cutplan --help", cutplan + ["--help"], None, 3),
        ]
        print(f"{'plan --format json':34} {'target':>6} {'quiet cpu':>9} {'loaded cpu':>10} {'quiet wall':>10} "
              f"{'loaded wall':>11}  same output")
        for name, args, target, repeat in rows:
            quiet, digest_q, wall_q = best_of(args, repeat)
            loops = busy_loops()
            try:
                loaded, digest_l, wall_l = best_of(args, repeat)
            finally:
                for p in loops:
                    p.kill()
                    p.wait()
            goal = f"{target:6.1f}" if target else "     -"
            print(f"{name:34} {goal} {quiet:9.2f} {loaded:10.2f} {wall_q:10.2f} {wall_l:11.2f}  "
                  f"{'yes' if digest_q == digest_l else 'NO'}")
    print("(CPU seconds of the whole process, best of the runs; wall seconds for reference only)")


if __name__ == "__main__":
    main()

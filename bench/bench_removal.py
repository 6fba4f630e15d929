"""Benchmark: removal advice for undercut bars (``cutplan trim`` on a bar's partials), CPU seconds.

Run: python bench/bench_removal.py          (prints a table; never run as a test)

For the music-room marimba's lowest and highest bars, one trim report (the first round, from the
planned arch on the rough blank, f1 and f2 read 15 cents off) is timed in CPU seconds
(time.process_time) with each model behind :func:`cutplan.tuning.profile_model.profile_modes`:
the 2-D elastic body (the default) and the 1-D shear-corrected beam FE.  The report's model
solves (one per station pair, one for the end trim, the base and the chord steps) and the CPU
per solve are shown; the advice must be identical on a second run.

Target: one report <= 5 CPU s with the 2-D model.
"""

import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))


def main():
    import cutplan
    from cutplan.tuning import profile_model, removal
    from cutplan.tuning.arched import bar_data, planned_profile

    design = cutplan.load_design(ROOT / "examples" / "music-room-marimba.toml")
    plan = cutplan.plan(design)
    spec = design.sets[0]
    bars = [p for p in plan.pieces if p.arch is not None]
    rows = []
    original = profile_model.profile_modes
    for name, modes in (("elastic-2d", original),
                        ("beam-fe", lambda xs, hs, w, ea, ex, g, nu, rho, modes=4:
                         profile_model._beam_fe_modes(xs, hs, w, ea, g, nu, rho, modes))):
        removal.profile_modes = modes
        try:
            for piece in (bars[0], bars[-1]):
                xs, hs = planned_profile(piece, piece.cut_length)
                measured = [piece.target_hz * 2 ** (-15 / 1200), 4 * piece.target_hz * 2 ** (15 / 1200)]
                targets = [piece.target_hz, 4 * piece.target_hz]
                bar = bar_data(spec)
                t0 = time.process_time()
                advice = removal.advise_removal(bar, xs, hs, measured, targets)
                cpu = time.process_time() - t0
                again = removal.advise_removal(bar, xs, hs, measured, targets)
                rows.append((name, piece.label, advice.solves, cpu, cpu / advice.solves,
                             advice.removal == again.removal and advice.trim_each_end == again.trim_each_end))
        finally:
            removal.profile_modes = original
    print(f"{'model':<11} {'bar':<8} {'solves':>6} {'CPU s':>7} {'per solve':>10}  identical")
    for name, label, solves, cpu, per, same in rows:
        print(f"{name:<11} {label:<8} {solves:>6} {cpu:>7.2f} {per * 1000:>8.1f} ms  {same}")


if __name__ == "__main__":
    main()

"""Trim rounds for undercut bars: the profile now (from the plan and the rounds made), the cuts
for this round (:mod:`cutplan.tuning.removal`) and the rounds mapping for the next one."""

from __future__ import annotations

import copy
from dataclasses import replace

import numpy as np

from cutplan.numeric import quiet
from cutplan.physics import beam_fe
from cutplan.physics.undercut import arch_thickness
from cutplan.render.phrases import removal_lines
from cutplan.tuning import removal
from cutplan.tuning.profile_model import elastic_constants
from cutplan.tuning.trim_service import (
    IN_TUNE_CENTS,
    TrimError,
    TrimReport,
    check_state,
    profile_arrays,
    profile_entry,
    with_lines,
)

__all__ = ["MATCH_LENGTH", "planned_profile", "bar_data", "support_distances", "arched_report"]

MATCH_LENGTH = 0.2e-3
"""A length now within this of the profile's own is the same bar [m]."""


def planned_profile(piece, length_now):
    """(xs, hs) [m] of the planned arch, centred on a blank ``length_now`` long (half of any
    allowance at each end, as the packet marks it)."""
    a = piece.arch
    xs = removal.model_grid(length_now)
    shift = (length_now - piece.length) / 2
    return xs, arch_thickness(xs - shift, piece.length, a.thickness, a.depth, a.arch_width, a.exponent)


def bar_data(spec):
    """The model's constants of a set's material, sawing and section (the plan's, the width resolved)."""
    e, across, g, nu, width = elastic_constants(spec.material, getattr(spec, "grain", "unknown"))
    return removal.BarData(spec.section.width, e, across, g, nu, spec.material.density, spec.undercut.min_thickness,
                           width)


def support_distances(bar, xs, hs):
    """Distances of the mode-1 nodes from the centre line [m] of the profile (the model's own
    nodes where it reports them, else the 1-D model's mode shape)."""
    length = float(xs[-1] - xs[0])
    r = bar.modes(xs, hs)  # as many modes as the advice solves: the same solve, remembered
    nodes = getattr(r, "nodes", None)
    if nodes:
        found = nodes[0]
    else:
        found = beam_fe.node_positions(r, 1)
    return tuple(sorted({round(abs(length / 2 - (x - xs[0])), 6) for x in found}))


def _profile_now(piece, entry, length_now, done, messages):
    """(xs, hs, rounds made) from the stored entry, the length now and whether the last advice was made."""
    rounds = list(entry.get("rounds", [])) if entry else []
    if entry:
        pending = entry.get("pending")
        if pending and done:
            xs, hs = profile_arrays(pending["after"])
            rounds.append({k: v for k, v in pending.items() if k != "after"})
            messages.append(("round-made", f"round {len(rounds)} counted as made"))
        else:
            xs, hs = profile_arrays(entry["profile"])
            if pending:
                messages.append(("round-not-made", "the last advice is not counted as made (say it was done "
                                                   "when you have made it)"))
    else:
        if done:
            messages.append(("no-rounds", "no earlier advice is on record for this piece; starting from the plan"))
        xs, hs = planned_profile(piece, length_now if length_now is not None else piece.cut_length)
        return xs, hs, rounds
    if length_now is not None:
        length = xs[-1] - xs[0]
        if length_now > length + MATCH_LENGTH:
            raise TrimError("length_now", f"the bar was {length * 1e3:.1f} mm after the rounds on record; "
                                          "it cannot be longer now (start the rounds afresh if it is another bar)")
        if length_now < length - MATCH_LENGTH:
            xs, hs = removal.trimmed(xs, hs, (length - length_now) / 2)
    return xs, hs, rounds


def arched_report(design, plan, piece, spec, partials, confidence, questions, length_now, state, done):
    """The trim report of an undercut bar, with this round's cuts and the rounds mapping after it."""
    state = copy.deepcopy(check_state(state))
    entry = state["pieces"].get(piece.label)
    messages = list(questions)
    xs, hs, rounds = _profile_now(piece, entry, length_now, done, messages)
    bar = bar_data(spec)
    measured = [p.measured_hz for p in partials]
    targets = [p.target_hz for p in partials]
    tuned = [p for p in partials if p.target_hz is not None]
    length = float(xs[-1] - xs[0])
    base = dict(label=piece.label, note=piece.note, partials=partials, length_now=length, confidence=confidence,
                profile_now=(tuple(xs), tuple(hs)))
    new_entry = {"profile": profile_entry(xs, hs), "rounds": rounds}
    if questions or all(abs(p.cents) < IN_TUNE_CENTS for p in tuned):
        action = "re-record" if questions else "in-tune"
        report = TrimReport(action=action, length_needed=length, supports=support_distances(bar, xs, hs),
                            messages=tuple(messages), predicted_after_hz=tuple(measured), **base)
    else:
        advice = quiet(removal.advise_removal, bar, xs, hs, measured, targets)
        after_x, after_h = np.asarray(advice.after[0]), np.asarray(advice.after[1])
        for mode in advice.unreachable:
            messages.append(("unreachable", f"removal alone cannot bring partial {mode} to its target"))
        action = "remove" if advice.removal else "trim"
        report = TrimReport(action=action, length_needed=length - 2 * advice.trim_each_end, removal=advice.removal,
                            blend=length / (2 * removal.STATIONS),
                            trim_each_end=advice.trim_each_end, predicted_after_hz=advice.predicted_after_hz,
                            unreachable=advice.unreachable, supports=support_distances(bar, after_x, after_h),
                            messages=tuple(messages), profile_after=advice.after, **base)
        new_entry["pending"] = {"measured_hz": [round(f, 3) for f in measured],
                                "removal": [{"x_mm": round(x * 1e3, 2), "depth_mm": round(d * 1e3, 3)}
                                            for x, d, _, _ in advice.removal],
                                "trim_each_end_mm": round(advice.trim_each_end * 1e3, 3),
                                "after": profile_entry(after_x, after_h)}
    state["pieces"][piece.label] = new_entry
    return replace(with_lines(report, removal_lines(piece, report, plan.units, plan.inch_denominator)), state=state)

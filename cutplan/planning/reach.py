"""What a chime or bar set's section can reach, and a failed set's refusal in a builder's words.

A shear-corrected beam model covers a piece down to a length of a few times its depth; shorter,
it has no bending fundamental to give (the pieces' modes turn into shear and thickness modes
that no beam formula follows).  So the highest pitch a section and material can be planned for
is the pitch of the shortest piece the model still covers.  :func:`refusal` turns a set the
solver could not plan (a note above that limit, or numbers the solver could not use) into one
line naming the key, the value and what is allowed; :func:`missed_target` checks a planned
length against its target with the very f(L) the plan was made with, so a length found on the
wrong branch of a solver is refused, not printed.
"""

from __future__ import annotations

import math

import numpy as np

from cutplan import pitch
from cutplan.design import DesignError, notices
from cutplan.design.notices import set_key
from cutplan.planning.frequency import beam_frequency_function
from cutplan.units import format_length

__all__ = ["REACH_CENTS", "SHORTEST_DEPTHS", "highest_reachable", "missed_target", "refusal"]

REACH_CENTS = 5.0
"""Largest miss of a planned length's own pitch from its target [cents] (the solvers converge to
well under a cent; the usual 5-cent tuning window, common practice)."""

SHORTEST_DEPTHS = 2.0
"""Shortest piece a beam model is used for, in depths of its section [-]: below about twice its
depth a piece no longer bends as a beam (its pitch is set by shear and by the section's own
deformation; Timoshenko's correction itself is a first-order one in depth / length: Han, Benaroya
and Wei, J. Sound Vib. 225, 1999, from memory)."""


def _frequency_function(spec):
    model = spec.model if spec.model in ("slender", "timoshenko") else "timoshenko"
    return beam_frequency_function(spec.material, spec.section, model, spec.target_mode == "strike-note")


def _pitch_of(f_at, length):
    try:
        f = float(f_at(length))
    except (ValueError, ArithmeticError, FloatingPointError):
        return None
    return f if math.isfinite(f) and f > 0 else None


def highest_reachable(spec):
    """(highest pitch [Hz], shortest length [m]) the set's beam model covers for its section and
    material, or None when it covers no length at all.  Found by shortening from 60 depths in 2 %
    steps down to where the model first fails (above it the model's pitch rises as the piece
    shortens), never below :data:`SHORTEST_DEPTHS` depths."""
    f_at = _frequency_function(spec)
    length, best = 60 * spec.section.depth, None
    while length >= SHORTEST_DEPTHS * spec.section.depth:
        f = _pitch_of(f_at, length)
        if f is None:
            break
        best = (f, length)
        length *= 0.98
    return best


def _unreachable(spec, f_at):
    """The targets whose length the model cannot give (in order)."""
    out = []
    for t in spec.targets:
        try:
            lengths = np.atleast_1d(f_at.lengths_for([t.frequency]))
            ok = bool(np.all(np.isfinite(lengths)) and np.all(lengths > 0))
        except (ValueError, ArithmeticError, FloatingPointError):
            ok = False
        if not ok:
            out.append(t)
    return out


def refusal(design, spec):
    """The one-line DesignError for a chime or bar set the solver could not plan (or planned off
    target): the first target the model cannot reach, and the highest pitch it can."""
    key = set_key(spec, spec.pitch_key) if spec.pitch_key else set_key(spec)
    try:
        f_at = _frequency_function(spec)
        bad = _unreachable(spec, f_at)
        top = highest_reachable(spec)
    except (ValueError, ArithmeticError, FloatingPointError):
        bad, top = list(spec.targets), None
    what = f'{spec.kind} set "{spec.name}"'
    if top is None:
        return DesignError(design.path, set_key(spec, "section"), None,
                           f"gives no piece the beam model can plan for {what} with this material (its numbers "
                           f"give no bending pitch at any length); check the section's sizes and the material's "
                           f"modulus, density and shear_ratio", notices.CANNOT_PLAN)
    high, shortest = top
    first = bad[0] if bad else max(spec.targets, key=lambda t: t.frequency)
    name, off = pitch.nearest_note(high, design.a4)
    note = name if off >= 0 else pitch.nearest_note(high * 2 ** (-1 / 12), design.a4)[0]  # the note at or below
    limit = f"{high:.0f} Hz (just above {note})"
    return DesignError(
        design.path, key, first.name,
        f"({first.frequency:.1f} Hz) is too high for {what}: the shortest piece the beam model covers, "
        f"{format_length(shortest, design.units, design.inch_denominator)} ({shortest / spec.section.depth:.1f} x its "
        f"{format_length(spec.section.depth, design.units, design.inch_denominator)} depth), sounds {limit}; choose notes up to that, "
        f"or a slimmer section (a thinner bar, a smaller tube)", notices.UNREACHABLE)


def _worst_miss(f_at, pieces):
    """Largest |cents| between the pitch of the planned lengths and their targets, one vectorised
    call (None when the model fails at any of them)."""
    lengths = np.array([p.length for p in pieces])
    targets = np.array([p.target_hz for p in pieces])
    try:
        f = np.atleast_1d(np.asarray(f_at(lengths), dtype=float))
    except (ValueError, ArithmeticError, FloatingPointError):
        return None
    if not (np.all(np.isfinite(f)) and np.all(f > 0)):
        return None
    return float(np.max(np.abs(1200 * np.log2(f / targets))))  # pitch.cents, element by element


def missed_target(design, spec, pieces):
    """A DesignError for a set with a piece the plan cannot stand behind: its predicted pitch, or
    its length put back into the set's own f(L), more than :data:`REACH_CENTS` off its target, or
    a length under :data:`SHORTEST_DEPTHS` depths, where no beam model applies.  None when every
    piece reaches its target."""
    if not pieces:
        return None
    depth = spec.section.depth
    worst = _worst_miss(_frequency_function(spec), pieces)
    printed = max(abs(pitch.cents(p.predicted_hz, p.target_hz)) if p.predicted_hz > 0 else math.inf
                  for p in pieces)
    short = min(p.length for p in pieces) < SHORTEST_DEPTHS * depth
    if worst is not None and worst <= REACH_CENTS and printed <= REACH_CENTS and not short:
        return None
    return refusal(design, spec)

"""Hang holes of chime tubes: how far the drilled hole splits the tuned bending mode, the beat it
makes, and the largest drill that keeps the beat under :data:`BEAT_LIMIT_HZ`.

The drill comes from the shop table (``materials/shop/hang_holes.toml``, by tube size); the
split is the beam estimate of :mod:`cutplan.physics.hang_hole`, at the piece's planned hang
point, for the mode the piece is tuned by (mode 1, or mode 4 for a strike-note chime).  The
result goes on ``Piece.hang_hole`` and, when the beat is faster than the limit, a warning names
the drill that would keep it under.
"""

from __future__ import annotations

import dataclasses
import functools
import math
from fractions import Fraction

from cutplan.design.notices import HANG_HOLE_BEAT, Notice, set_key
from cutplan.physics.hang_hole import hang_hole_shifts
from cutplan.planning.records import HangHoleSplit

__all__ = [
    "BEAT_LIMIT_HZ", "DRILL_STEP", "SMALLEST_DRILL", "hang_hole_for", "split_for", "drill_text", "warning",
    "with_hang_holes"
]

BEAT_LIMIT_HZ = 1.5
"""Fastest beat between the two bending planes accepted without a warning [Hz] (common practice,
a judgement: a slower beat is heard as a gentle swell in a ringing chime, a faster one as a
wobble; the usual 1/8-3/16 in holes in 1 in tube up to the sixth octave stay under it)."""

DRILL_STEP = 0.0254 / 64
"""Fractional drill sizes go up in 1/64 in steps [m] (common practice, jobber drill sets)."""

SMALLEST_DRILL = 0.0254 / 16
"""Smallest drill suggested [m] (1/16 in: a thinner hole will not take a hanging line; common
practice)."""


def hang_hole_for(outer, rows):
    """The row for a tube or rod of outside diameter ``outer`` [m], or None past the table."""
    return next((r for r in rows if outer <= r.max_outer + 1e-9), None)


def _mode(spec):
    return 4 if getattr(spec, "target_mode", "fundamental") == "strike-note" else 1


def split_for(spec, piece, drill):
    """The HangHoleSplit of a chime tube drilled with ``drill`` [m] at its first node, or None."""
    sec = spec.section
    inner = getattr(sec, "solid_inner", sec.inner)
    if spec.kind != "chime" or sec.shape != "tube" or not piece.nodes or not 0 < drill < inner:
        return None
    mode = _mode(spec)
    position = piece.nodes[0] / piece.length
    in_plane, across = hang_hole_shifts(piece.length, sec.outer, inner, drill, position, mode)
    heard = piece.partials_hz[mode - 1] if len(piece.partials_hz) >= mode else piece.predicted_hz
    beat = heard * (across - in_plane)
    largest = _largest_drill(piece.length, sec.outer, inner, position, mode, heard)
    return HangHoleSplit(drill=drill, mode=mode, in_plane_cents=1200 * math.log2(1 + in_plane),
                         across_cents=1200 * math.log2(1 + across), beat_hz=beat, largest_drill=largest)


@functools.lru_cache(maxsize=4096)
def _largest_drill(length, outer, inner, position, mode, heard):
    """Largest drill in 1/64 in steps whose beat stays under the limit [m] (0 if none does).
    Kept per piece (a scan of up to 64 drills; the same design is planned again and again)."""
    best, d = 0.0, SMALLEST_DRILL
    while d < min(inner, 0.0254) - 1e-12:
        in_plane, across = hang_hole_shifts(length, outer, inner, d, position, mode)
        if heard * (across - in_plane) > BEAT_LIMIT_HZ:
            break
        best, d = d, d + DRILL_STEP
    return best


def drill_text(drill, units="mm"):
    """A drill size as sold: "11/64 in (4.37 mm)", or "4.37 mm (11/64 in)" in mm plans.

    >>> drill_text(0.0254 * 11 / 64, "in")
    '11/64 in (4.37 mm)'
    """
    frac = Fraction(round(drill / 0.0254 * 64), 64)
    inch = f"{frac.numerator}/{frac.denominator} in" if frac.denominator > 1 else f"{frac.numerator} in"
    mm = f"{drill * 1000:.2f} mm"
    return f"{inch} ({mm})" if units == "in" else f"{mm} ({inch})"


def warning(split, units_text):
    """The warning for a split whose beat is over the limit, or None. ``units_text(m)`` formats a
    drill size."""
    if split is None or split.beat_hz <= BEAT_LIMIT_HZ:
        return None
    fix = (f"a {units_text(split.largest_drill)} hole keeps it under {BEAT_LIMIT_HZ:g} Hz" if split.largest_drill
           else "no drill that takes a line keeps it under the limit; hang by a loop round the tube instead")
    return (f"hang hole {units_text(split.drill)}: bending in the hole's plane drops "
            f"{abs(split.in_plane_cents):.1f} cents, across it {abs(split.across_cents):.1f}, so the note "
            f"beats at {split.beat_hz:.2f} Hz (beam estimate); {fix}")


def with_hang_holes(spec, pieces, rows, units="mm"):
    """The chime pieces with ``hang_hole`` filled in from the shop table ``rows`` (and a warning
    when the beat is over the limit); other pieces unchanged."""
    if spec.kind != "chime" or spec.section.shape != "tube":
        return list(pieces)
    row = hang_hole_for(spec.section.outer, rows)
    if row is None:
        return list(pieces)
    out = []
    for p in pieces:
        split = split_for(spec, p, row.drill)
        if split is None:
            out.append(p)
            continue
        text = warning(split, lambda m: drill_text(m, units))
        warnings = tuple(p.warnings) + ((Notice(HANG_HOLE_BEAT, set_key(spec, "section"), text),) if text else ())
        out.append(dataclasses.replace(p, hang_hole=split, warnings=warnings))
    return out

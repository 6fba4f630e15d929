"""What the width-resolved 2-D body tells of a bar beyond its partials' frequencies: a partial
split between two modes, and a mode of the width near a tuned partial.

On a short, wide bar, bending along the bar mixes with bending across its width: the motion of
one partial is shared by two (or three) modes a few per cent apart
(:func:`cutplan.physics.elastic2d.profile_modes` lists the strongest as the partial and tags the
others with the partial they split).  A strike sounds both, so the plan says so rather than print
one number.  A mode across the width that is not mixed in, but lies within the warning window of a
tuned partial, beats with it or makes the bar buzz, as a sideways or twisting mode would
(:mod:`cutplan.planning.other_modes` warns of those; this module of the width's own modes, which
the 2-D body holds and the side-mode models do not).
"""

from __future__ import annotations

import math

from cutplan.design.notices import MODE_NEAR_PARTIAL, PARTIAL_SPLIT, Notice
from cutplan.planning.other_modes import resize_advice
from cutplan.units import INCH_DENOMINATOR, format_length

__all__ = ["split_partials", "width_mode_warnings"]

_ORDINALS = ("first", "second", "third", "fourth", "fifth", "sixth")


def _ordinal(n):
    return _ORDINALS[n - 1] if 1 <= n <= len(_ORDINALS) else f"{n}th"


def _cents_words(off):
    return f"{abs(off):.0f} cent{'' if round(abs(off)) == 1 else 's'} {'above' if off > 0 else 'below'}"


def _partial_name(n, tuned):
    return "fundamental" if n == 1 else f"{'tuned ' if tuned else ''}{_ordinal(n)} partial"


def split_partials(modes, count):
    """{partial n: (the other modes that share it, ascending)} for the first ``count`` partials of a
    2-D solve (``modes``: :class:`cutplan.physics.elastic2d.ProfileModes`; each mode a frequency
    [Hz] with its ``kind``); partials that are not split are left out."""
    out: dict[int, list] = {}
    for f in modes.longitudinal:
        n = getattr(f, "partial", 0)
        if 1 <= n <= min(count, len(modes.frequencies)):
            out.setdefault(n, []).append(f)
    return {n: tuple(sorted(v)) for n, v in sorted(out.items())}


def width_mode_warnings(piece, modes, width, tuned, clearance_cents, key=None, units="mm",
                        denominator=INCH_DENOMINATOR):
    """Notices (keyed ``key``) for a bar planned on the 2-D body, from its solve ``modes``: each
    reported partial that is split (:data:`PARTIAL_SPLIT`), and each mode across the width, not
    one that splits a partial (that warning covers it), within ``clearance_cents`` of a tuned
    partial (mode numbers ``tuned``; :data:`MODE_NEAR_PARTIAL`).  ``width`` [m] is the bar's, said in
    the design's ``units`` (inches to ``denominator``)."""
    out = []
    partials = piece.partials_hz
    bar = f"{piece.note} bar" if piece.note else "bar"
    width_text = format_length(width, units, denominator)
    for n, others in split_partials(modes, len(partials)).items():
        p = partials[n - 1]
        near = " and ".join(f"{float(f):.0f} Hz ({_cents_words(1200 * math.log2(f / p))})" for f in others)
        across = any(getattr(f, "kind", "") == "cross-width" for f in others)
        mixing = (f"on a bar this short and {width_text} wide, bending along the bar mixes with bending "
                  "across its width" if across else "the arch couples bending to a lengthwise mode")
        which = _partial_name(n, n in tuned and piece.arch is not None)
        if n in tuned:
            advice = ("tune it by the louder of the two, check the ratio by ear, and expect a beat"
                      + ("; a narrower bar moves the width's bending away" if across else ""))
        else:
            advice = "it is listed at the stronger mode; expect a doubled or rough overtone there"
        out.append(Notice(PARTIAL_SPLIT, key,
                          f"partial {n} split: the {bar}'s {which} ({p:.0f} Hz) shares its motion with "
                          f"{'a mode' if len(others) == 1 else 'modes'} at {near}: {mixing}, so a strike sounds "
                          f"{'both' if len(others) == 1 else 'them together'}; {advice}"))
    for f in modes.longitudinal:
        if getattr(f, "kind", "") != "cross-width" or getattr(f, "partial", 0):
            continue
        for k in tuned:
            if k > len(partials):
                continue
            off = 1200 * math.log2(float(f) / partials[k - 1])
            if abs(off) > clearance_cents:
                continue
            out.append(Notice(MODE_NEAR_PARTIAL, key,
                              f"cross-width mode: the {bar} bends across its {width_text} width at {float(f):.0f} Hz, "
                              f"{_cents_words(off)} the {_partial_name(k, piece.arch is not None)} (partial {k}, "
                              f"{partials[k - 1]:.0f} Hz): expect a buzz or a beat; "
                              f"{resize_advice('width')}"))
    return out

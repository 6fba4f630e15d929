"""Name the fundamental of a struck piece from its partials, weighing the kinds' patterns.

The partials come from :func:`cutplan.audio.partials.find_partials` (every strong partial, with
level and decay; mains hum left out and named in a note).  Each kind of piece has its own pattern of partials (below); every pattern is
tried on every plausible fundamental and the readings are ranked by how much of the sound they
explain, how complete the pattern is, and whether the fundamental itself is in the recording.
A reading whose fundamental is not in the recording is only taken when it explains two or more
partials, and is then reported as estimated, with a warning; so is a reading that another, with
a different fundamental, nearly matches (low confidence).  ``--kind`` narrows the patterns tried;
``--near`` the fundamentals.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from cutplan.audio.hum import hum_note
from cutplan.audio.partials import Partial, find_partials_and_hum
from cutplan.audio.wav import RecordingError
from cutplan.numeric import quiet
from cutplan.pitch import nearest_note

__all__ = [
    "PATTERNS", "KIND_PATTERNS", "MATCH_TOLERANCE", "ABSENT_FACTOR", "LOW_CONFIDENCE", "MIN_FUNDAMENTAL_HZ",
    "Reading", "Measurement", "readings", "identify", "measure"
]

PATTERNS = {
    # ratios of partials to the fundamental, and how far the highest listed may fall below nominal
    "free-free": ((1.0, 2.7565, 5.4039, 8.9330, 13.3443, 18.6380), 0.30),
    "chime": ((1.0, 2.7565, 5.4039, 8.9330, 13.3443, 18.6380), 0.30),
    "bar": ((1.0, 2.7565, 5.4039, 8.9330, 13.3443, 18.6380), 0.30),
    "tuned-bar": ((1.0, 4.0, 10.0), 0.12),
    "xylophone-bar": ((1.0, 3.0, 6.0), 0.12),
    "open-open": ((1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0), 0.04),
    "closed-open": ((1.0, 3.0, 5.0, 7.0, 9.0, 11.0), 0.04),
}
"""Partial patterns by kind: nominal ratios and the largest fractional drop allowed for the highest
listed partial.  Free-free bars and tubes 1 : 2.756 : 5.404 : 8.933 : 13.34 : 18.64, the squares of
the roots of cos x cosh x = 1 over the first (Euler-Bernoulli; Fletcher & Rossing, The Physics of
Musical Instruments, 2nd ed., 1998, ch. 2, from memory for the chapter); shear lowers the upper
partials of real pieces by up to about 30 % (common practice, from our solver's range of pieces).
Tuned (marimba) bars 1 : 4 : 10 and xylophone bars 1 : 3 : 6 (same book, the chapter on bars, from
memory); undercut bars at the bench miss the upper targets by several percent (common practice).
Open air columns all harmonics, closed ones the odd harmonics (same book, ch. 8, from memory)."""

KIND_PATTERNS = {
    "any": ("free-free", "tuned-bar", "xylophone-bar", "open-open", "closed-open"),
    "chime": ("chime",),
    "bar": ("bar", "tuned-bar", "xylophone-bar"),
    "tuned-bar": ("tuned-bar",),
    "xylophone-bar": ("xylophone-bar",),
    "air-column": ("open-open", "closed-open"),
    "open-open": ("open-open",),
    "closed-open": ("closed-open",),
    "resonator": ("closed-open",),
}
"""Which patterns each ``--kind`` tries."""

MATCH_TOLERANCE = 0.015
"""How far a partial may lie above (and, beyond the allowed drop, below) its pattern's ratio [-]
(a quarter of a semitone; common practice)."""
ABSENT_FACTOR = 0.6
"""Weight of a reading whose fundamental is not in the recording [-] (common practice: a struck
piece almost always sounds its fundamental; prefer readings that hear it)."""
LOW_CONFIDENCE = 0.5
"""Below this confidence (the 0..1 score) a reading is reported with a warning, and the trim service
questions it before any advice [-] (common practice)."""
MIN_FUNDAMENTAL_HZ = 20.0
"""Lowest fundamental reported [Hz]; anything lower is not a piece ringing."""


@dataclass(frozen=True)
class Reading:
    """One hypothesis: a pattern on a fundamental [Hz], its score 0..1, whether the fundamental
    is in the recording, and ((partial index, mode), ...) it explains."""

    pattern: str
    fundamental_hz: float
    score: float
    heard: bool
    modes: tuple[tuple[int, int], ...]


@dataclass(frozen=True)
class Measurement:
    """What a recording says: the fundamental [Hz], every strong partial, the confidence 0..1,
    the pattern used, whether the fundamental was heard, each partial's mode in that pattern
    (None: not explained), the ranked readings and the warnings for the builder."""

    fundamental_hz: float
    partials_hz: tuple[float, ...]
    confidence: float
    pattern: str
    fundamental_heard: bool
    partials: tuple[Partial, ...] = ()
    modes: tuple[int | None, ...] = ()
    readings: tuple[Reading, ...] = ()
    warnings: tuple[str, ...] = ()


def _window(ratios, drop, k):
    """(low, high) multiple of the fundamental where mode k + 1 of a pattern may lie."""
    allowed = drop * (k / (len(ratios) - 1)) if len(ratios) > 1 else 0.0
    return ratios[k] * (1 - allowed - MATCH_TOLERANCE), ratios[k] * (1 + MATCH_TOLERANCE)


def _reading(name, ratios, drop, f1, partials, heard_index=None):
    """Score the pattern on fundamental ``f1``: share of the sound explained, completeness, heard."""
    amps = [10 ** (p.level_db / 20) for p in partials]
    used, modes = set(), []
    top_hz = max(p.hz for p in partials) * 1.02
    predicted = 0
    for k in range(len(ratios)):
        lo, hi = _window(ratios, drop, k)
        if f1 * lo > top_hz:
            break
        predicted += 1
        if k == 0 and heard_index is not None:
            hits = [heard_index]
        else:
            hits = [i for i, p in enumerate(partials) if f1 * lo <= p.hz <= f1 * hi and i not in used]
        if hits:
            i = max(hits, key=amps.__getitem__)
            used.add(i)
            modes.append((i, k + 1))
    heard = any(m == 1 for _, m in modes)
    share = sum(amps[i] for i, _ in modes) / sum(amps)
    completeness = len(modes) / max(predicted, 1)
    score = share * (0.7 + 0.3 * completeness) * (1.0 if heard else ABSENT_FACTOR)
    return Reading(name, f1, score, heard, tuple(sorted(modes)))


def readings(partials, names, patterns=PATTERNS, near=None):
    """Every reading of the partials by the named patterns, best first (see the module docstring)."""
    out = []
    for name in names:
        ratios, drop = patterns[name]
        for i, p in enumerate(partials):
            if near is None or abs(math.log2(p.hz / near)) <= 0.5:
                out.append(_reading(name, ratios, drop, p.hz, partials, heard_index=i))
            for k in range(1, min(len(ratios), 4)):
                lo, hi = _window(ratios, drop, k)
                for mult in sorted({ratios[k], (lo + hi) / 2, lo + MATCH_TOLERANCE * ratios[k]}):
                    f1 = p.hz / mult
                    if near is not None and abs(math.log2(f1 / near)) > 0.5:
                        continue
                    r = _reading(name, ratios, drop, f1, partials)
                    if not r.heard and len(r.modes) >= 2:
                        out.append(r)
    out.sort(key=lambda r: (-r.score, not r.heard, r.fundamental_hz))
    return out


def _fundamental(reading, partials, ratios):
    """The reading's fundamental [Hz]: the partial heard, or the lowest explained over its ratio."""
    for i, mode in reading.modes:
        if mode == 1:
            return partials[i].hz, None
    i, mode = min(reading.modes, key=lambda im: im[1])
    return partials[i].hz / ratios[mode - 1], (i, mode)


def _describe(reading, f1):
    name, off = nearest_note(f1, 440.0)
    return f"{f1:.1f} Hz ({name} {off:+.0f} cents) as {reading.pattern}"


def identify(partials, kind="any", near=None, ratios=None):
    """Choose the fundamental from the partials; returns a :class:`Measurement`.

    ``ratios``, if given, are the partial ratios expected for this very piece (for instance the
    planned partials of a cut piece); they replace the kind's patterns, so that a missing
    fundamental is estimated from the right ratio.

    Examples
    --------
    A struck undercut bar of our own at D5, partials 1 : 3.93 : 9.1, reads as a tuned bar:

    >>> from cutplan.audio.partials import Partial
    >>> m = identify([Partial(587.3, 0.0, 1.5), Partial(2308.1, -6.0, 0.4), Partial(5344.4, -6.0, 0.15)])
    >>> round(m.fundamental_hz, 1), m.pattern, m.modes
    (587.3, 'tuned-bar', (1, 2, 3))
    """
    partials = tuple(p if isinstance(p, Partial) else Partial(float(p[0]), float(p[1]), None) for p in partials)
    if ratios is not None:
        patterns, names = {"planned": (tuple(float(r) for r in ratios), 0.03)}, ["planned"]
    else:
        patterns, names = PATTERNS, KIND_PATTERNS.get(kind, (kind,))
    ranked = readings(partials, names, patterns, near)
    if not ranked:
        strongest = ", ".join(f"{p.hz:.1f}" for p in sorted(partials, key=lambda p: -p.level_db)[:4])
        unconstrained = readings(partials, names, patterns)
        said = ""
        if unconstrained:
            top = unconstrained[0]
            said = f"; they read as {_describe(top, _fundamental(top, partials, patterns[top.pattern][0])[0])}"
        asked = f"the expected {near:.1f} Hz" if ratios is not None else f"{near:.1f} Hz (--near)"
        raise RecordingError(f"no partial within half an octave of {asked}; the recording's strongest "
                             f"partials are {strongest} Hz{said}: is this the right piece?")
    best = ranked[0]
    pattern_ratios = patterns[best.pattern][0]
    f1, estimated_from = _fundamental(best, partials, pattern_ratios)
    if f1 < MIN_FUNDAMENTAL_HZ:
        raise RecordingError(f"no tonal fundamental above {MIN_FUNDAMENTAL_HZ:g} Hz: strike the piece and let it ring")
    rivals = []
    for r in ranked[1:]:
        f_r = _fundamental(r, partials, patterns[r.pattern][0])[0]
        if all(abs(1200 * math.log2(f_r / g)) > 50 for g in [f1] + [g for _, g in rivals]):
            rivals.append((r, f_r))
    runner = rivals[0][0].score if rivals else 0.0
    confidence = round(max(0.0, min(1.0, best.score * (1 - 0.5 * runner / best.score))), 2)
    warnings = []
    if estimated_from is not None:
        i, mode = estimated_from
        warnings.append(f"the fundamental ({f1:.1f} Hz, {best.pattern}) is not in the recording: estimated from "
                        f"partial {mode} at {partials[i].hz:.1f} Hz; strike the piece again (away from a node of "
                        "mode 1), or give --kind and --near to confirm")
    if confidence < LOW_CONFIDENCE:
        others = "; ".join(_describe(r, f_r) for r, f_r in rivals[:2])
        warnings.append(f"low confidence ({confidence:.2f}): " + (f"other readings fit nearly as well ({others}); "
                        if others else "few partials fit the pattern; ") + "give --kind and --near to choose")
    modes = dict(best.modes)
    left = len(partials) - len(modes)
    if left and kind != "any" and ratios is None:
        warnings.append(f"{left} of the {len(partials)} strong partials fit no {kind} pattern: if this is another kind "
                        "of piece, give that --kind (or --kind any)")
    return Measurement(float(f1), tuple(p.hz for p in partials), confidence, best.pattern, estimated_from is None,
                       partials, tuple(modes.get(i) for i in range(len(partials))), tuple(ranked[:5]),
                       tuple(warnings))


def measure(samples, rate, kind="any", near=None, ratios=None):
    """Fundamental and partials of a struck piece from its samples (see :func:`identify`).

    Numeric warnings stay inside; a recording with no tonal peak, or none near ``near`` [Hz],
    raises :class:`RecordingError`.  Mains hum left out of the partials is named among the warnings.
    """

    partials, hum = quiet(find_partials_and_hum, samples, rate)
    m = quiet(identify, partials, kind, near, ratios)
    return replace(m, warnings=m.warnings + (hum_note(hum),)) if hum else m

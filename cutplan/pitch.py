"""Note names, reference pitch, temperaments and scales to frequencies; cents.

Scientific pitch notation: middle C is C4 (MIDI 60) and A4 (MIDI 69) is the reference pitch,
440 Hz by default (ISO 16:1975).  Sharps and flats may be written ``#``/``b`` or with the
Unicode signs.

>>> round(note_frequency("C4"), 4)
261.6256
>>> nearest_note(445.0)
('A4', 19.56)
>>> [t.name for t in scale_targets("D5", "major-pentatonic", 5)]
['D5', 'E5', 'F#5', 'A5', 'B5']
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from fractions import Fraction

from cutplan.spelling import did_you_mean, scale_names

__all__ = [
    "A4_FREQUENCY", "A4_MIDI", "SCALES", "JUST_RATIOS", "PYTHAGOREAN_RATIOS", "TEMPERAMENT_FORMS",
    "PitchError", "NOTE_FORMS", "SCALE_FORMS", "scale_forms", "Target", "parse_note", "note_name",
    "SPELLINGS", "spelled_names", "midi_frequency", "note_frequency", "cents", "nearest_note",
    "parse_ratio", "parse_temperament", "degree_frequency", "scale_offsets", "scale_targets",
    "range_targets", "note_targets", "parse_scale_spec", "spec_targets"
]

A4_FREQUENCY = 440.0
"""Standard tuning frequency [Hz]: the A above middle C. ISO 16:1975."""
A4_MIDI = 69
"""MIDI note number of A4 (MIDI 1.0 specification; middle C = C4 = 60)."""

_LETTERS = {"C": 0, "D": 2, "E": 4, "F": 5, "G": 7, "A": 9, "B": 11}
_SHARP_NAMES = ["C", "C#", "D", "D#", "E", "F", "F#", "G", "G#", "A", "A#", "B"]

SCALES = {
    "major": (0, 2, 4, 5, 7, 9, 11),
    "natural-minor": (0, 2, 3, 5, 7, 8, 10),
    "harmonic-minor": (0, 2, 3, 5, 7, 8, 11),
    "major-pentatonic": (0, 2, 4, 7, 9),
    "minor-pentatonic": (0, 3, 5, 7, 10),
    "whole-tone": (0, 2, 4, 6, 8, 10),
    "chromatic": tuple(range(12)),
    "blues": (0, 3, 5, 6, 7, 10),
    "ionian": (0, 2, 4, 5, 7, 9, 11),
    "dorian": (0, 2, 3, 5, 7, 9, 10),
    "phrygian": (0, 1, 3, 5, 7, 8, 10),
    "lydian": (0, 2, 4, 6, 7, 9, 11),
    "mixolydian": (0, 2, 4, 5, 7, 9, 10),
    "aeolian": (0, 2, 3, 5, 7, 8, 10),
    "locrian": (0, 1, 3, 5, 6, 8, 10),
}
"""Scales as semitone steps above the root within one octave (standard music theory)."""

JUST_RATIOS = tuple(
    Fraction(r)
    for r in ("1", "16/15", "9/8", "6/5", "5/4", "4/3", "45/32", "3/2", "8/5", "5/3", "9/5", "15/8")
)
"""5-limit just ratios for the 12 chromatic degrees above a root (the major-scale degrees are
1, 9/8, 5/4, 4/3, 3/2, 5/3, 15/8: standard; the chromatic fill-ins 16/15, 6/5, 45/32, 8/5, 9/5
are the usual 5-limit choices, common practice)."""

PYTHAGOREAN_RATIOS = tuple(
    Fraction(r)
    for r in (
        "1", "256/243", "9/8", "32/27", "81/64", "4/3", "729/512", "3/2", "128/81", "27/16", "16/9",
        "243/128",
    )
)
"""Pythagorean ratios (powers of 3/2 folded into one octave) for the 12 degrees above a root."""

TEMPERAMENT_FORMS = '"equal", "equal-N" (N steps per octave, e.g. "equal-19"), "just" or "pythagorean"'


class PitchError(ValueError):
    """A note, scale, temperament or ratio could not be read."""

    def __init__(self, text, accepted):
        self.text = text
        self.accepted = accepted
        super().__init__(f"cannot read {text!r}; {accepted}")


NOTE_FORMS = 'a note such as "C4", "F#5", "Bb3", "E♭4" (letter, optional #/b, octave number)'
SCALE_FORMS = "one of: " + ", ".join(SCALES)


def scale_forms(text):
    """What an unknown scale name could have been, then every scale:
    'a scale name; did you mean major-pentatonic or minor-pentatonic? (one of: major, ...)'."""
    hint = did_you_mean(scale_names(text, SCALES))
    return f"a scale name{hint} ({SCALE_FORMS})" if hint else SCALE_FORMS


@dataclass(frozen=True)
class Target:
    """One wanted pitch: a display name (note name or a label) and its frequency [Hz]."""

    name: str
    frequency: float


def parse_note(text):
    """MIDI number of a note name.

    >>> parse_note("C4"), parse_note("A4"), parse_note("Bb3"), parse_note("C♯5")
    (60, 69, 58, 73)
    """
    if not isinstance(text, str):
        raise PitchError(repr(text), NOTE_FORMS)
    clean = text.strip().replace("♯", "#").replace("♭", "b")
    match = re.fullmatch(r"([A-Ga-g])(#{1,2}|b{1,2})?(-?\d{1,2})", clean)
    if not match:
        raise PitchError(text, NOTE_FORMS)
    letter, accidental, octave = match.groups()
    accidental = accidental or ""
    shift = accidental.count("#") - accidental.count("b")
    midi = 12 * (int(octave) + 1) + _LETTERS[letter.upper()] + shift
    if not 0 <= midi <= 127:
        raise PitchError(text, NOTE_FORMS + " between C-1 and G9")
    return midi


def note_name(midi):
    """Name of a MIDI number with sharps.

    >>> note_name(60), note_name(70)
    ('C4', 'A#4')
    """
    midi = int(midi)
    return f"{_SHARP_NAMES[midi % 12]}{midi // 12 - 1}"


_FLAT_NAMES = ["C", "Db", "D", "Eb", "E", "F", "Gb", "G", "Ab", "A", "Bb", "B"]
_LETTER_ORDER = "CDEFGAB"
SPELLINGS = ("auto", "sharps", "flats")
"""How scale notes are spelled: from the key (flats in flat keys), or always sharps or flats."""
_MODE_OF_MAJOR = {"major": 0, "ionian": 0, "major-pentatonic": 0, "dorian": 2, "phrygian": 4, "lydian": 5,
                  "mixolydian": 7, "natural-minor": 9, "aeolian": 9, "harmonic-minor": 9, "minor-pentatonic": 9,
                  "blues": 9, "locrian": 11}
"""Semitones from the major key whose signature a scale uses up to its root: a mode of C major
is written with no sharps or flats; the minor scales use the relative major's signature
(standard music theory: Kostka, Payne & Almen, Tonal Harmony, ch. 1, key signatures; from memory)."""
_FLAT_MAJOR_KEYS = {5, 10, 3, 8, 1}
"""Pitch classes of the major keys written with flats: F, Bb, Eb, Ab, Db (one to five flats).
F#/Gb (six) is written with sharps unless the root is written with a flat (same source)."""


def _prefers_flats(root_midi, scale, root_text, spelling):
    if spelling in ("sharps", "flats"):
        return spelling == "flats"
    text = (root_text or "").strip().replace("♭", "b").replace("♯", "#")
    if len(text) > 1 and text[1] in "b#":
        return text[1] == "b"
    major = (root_midi - _MODE_OF_MAJOR.get(scale, 0)) % 12
    return major in _FLAT_MAJOR_KEYS


def _letter_name(midi, letter):
    """``midi`` written on the note letter ``letter`` ('Bb3', 'Cb5', 'E#4'), or None past a double accidental."""
    natural = _LETTERS[letter]
    shift = (midi - natural + 6) % 12 - 6
    if abs(shift) > 1:
        return None
    octave = (midi - shift - natural) // 12 - 1
    return f"{letter}{'#' if shift > 0 else 'b' * -shift}{octave}"


def spelled_names(root_midi, offsets, scale, root_text=None, spelling="auto"):
    """Names of the notes ``root_midi + offset``, spelled from the key: every letter once in a
    seven-note scale; other scales take the letters of the major key whose signature they use.

    >>> spelled_names(53, [0, 2, 4, 5, 7, 9, 11, 12], "major")  # F major: one flat
    ['F3', 'G3', 'A3', 'Bb3', 'C4', 'D4', 'E4', 'F4']
    >>> spelled_names(62, [0, 2, 3, 5, 7, 8, 11], "harmonic-minor")  # the raised seventh stays sharp
    ['D4', 'E4', 'F4', 'G4', 'A4', 'Bb4', 'C#5']
    """
    flats = _prefers_flats(root_midi, scale, root_text, spelling)
    plain = _FLAT_NAMES if flats else _SHARP_NAMES
    if spelling == "auto" and scale in _MODE_OF_MAJOR:
        tonic = (root_midi - _MODE_OF_MAJOR[scale]) % 12
        text = (root_text or "").strip()
        letter0 = plain[tonic][0]
        if text and text[0].upper() in _LETTERS:  # the root's own letter decides the key's letters
            letter0 = _LETTER_ORDER[(_LETTER_ORDER.index(text[0].upper()) - _DEGREE[_MODE_OF_MAJOR[scale]]) % 7]
        key_letters = {(tonic + step) % 12: _LETTER_ORDER[(_LETTER_ORDER.index(letter0) + i) % 7]
                       for i, step in enumerate(SCALES["major"])}
        if scale == "harmonic-minor":  # the raised seventh sits on the letter of the natural seventh
            key_letters[(root_midi + 11) % 12] = key_letters.pop((root_midi + 10) % 12)
    else:
        key_letters = {}
    named = [(root_midi + off, key_letters.get((root_midi + off) % 12)) for off in offsets]
    out = [_letter_name(m, letter) if letter else f"{plain[m % 12]}{m // 12 - 1}" for m, letter in named]
    if None in out:  # a key past seven sharps or flats (A# major): plain names read better
        out = [f"{plain[m % 12]}{m // 12 - 1}" for m, _ in named]
    return out


_DEGREE = {0: 0, 2: 1, 4: 2, 5: 3, 7: 4, 9: 5, 11: 6}
"""Scale degree (0-6) of each step of the major scale, for the modes' letters."""


def midi_frequency(midi, a4=A4_FREQUENCY):
    """Equal-tempered frequency [Hz] of a (possibly fractional) MIDI number: 440 * 2^((m-69)/12)."""
    return a4 * 2.0 ** ((midi - A4_MIDI) / 12.0)


def note_frequency(note, a4=A4_FREQUENCY):
    """Equal-tempered frequency [Hz] of a note name or MIDI number."""
    midi = parse_note(note) if isinstance(note, str) else note
    return midi_frequency(midi, a4)


def cents(frequency, reference):
    """Interval from ``reference`` up to ``frequency`` in cents: 1200 log2(f/ref).

    >>> round(cents(880.0, 440.0), 6)
    1200.0
    """
    return 1200.0 * math.log2(frequency / reference)


def nearest_note(frequency, a4=A4_FREQUENCY):
    """(name, cents offset) of the nearest 12-TET note to a frequency, offset to 0.01 cent."""
    if not (frequency > 0 and math.isfinite(frequency)):
        raise PitchError(repr(frequency), "a positive frequency in Hz")
    midi = A4_MIDI + 12.0 * math.log2(frequency / a4)
    nearest = int(round(midi))
    return note_name(nearest), round(100.0 * (midi - nearest), 2)


def parse_ratio(text):
    """A frequency ratio from "9/8", "3:2" or "1.5".

    >>> parse_ratio("9/8"), parse_ratio("3:2")
    (1.125, 1.5)
    """
    forms = 'a ratio such as "9/8", "3:2" or "1.5"'
    if isinstance(text, (int, float)) and not isinstance(text, bool):
        value = float(text)
    elif isinstance(text, str):
        match = re.fullmatch(r"\s*(\d+(?:\.\d+)?)\s*(?:[/:]\s*(\d+(?:\.\d+)?))?\s*", text)
        if not match:
            raise PitchError(text, forms)
        den = float(match.group(2)) if match.group(2) else 1.0
        if den == 0:
            raise PitchError(text, forms)
        value = float(match.group(1)) / den
    else:
        raise PitchError(repr(text), forms)
    if not (value > 0 and math.isfinite(value)):
        raise PitchError(str(text), forms)
    return value


def parse_temperament(text):
    """("equal", 12), ("equal", 19), ("just", 12) or ("pythagorean", 12)."""
    if not isinstance(text, str):
        raise PitchError(repr(text), TEMPERAMENT_FORMS)
    clean = text.strip().lower()
    if clean in ("equal", "equal-12", "12-tet"):
        return "equal", 12
    match = re.fullmatch(r"equal-(\d{1,3})", clean)
    if match and 1 <= int(match.group(1)) <= 144:
        return "equal", int(match.group(1))
    if clean in ("just", "pythagorean"):
        return clean, 12
    raise PitchError(text, TEMPERAMENT_FORMS)


def degree_frequency(root_midi, semitones, temperament="equal", a4=A4_FREQUENCY):
    """Frequency [Hz] of the degree ``semitones`` (12-TET count) above a root, in a temperament.

    The root itself is always at its equal-tempered pitch.  Just and Pythagorean degrees use the
    ratio tables above; "equal-N" maps each degree to the nearest of N steps per octave.

    >>> round(degree_frequency(60, 4, "just"), 3)  # E above C4, 5/4
    327.032
    """
    kind, steps = parse_temperament(temperament)
    root = midi_frequency(root_midi, a4)
    octave, degree = divmod(int(semitones), 12)
    if kind == "just":
        return root * 2.0**octave * float(JUST_RATIOS[degree])
    if kind == "pythagorean":
        return root * 2.0**octave * float(PYTHAGOREAN_RATIOS[degree])
    step = round(semitones * steps / 12.0)
    return root * 2.0 ** (step / steps)


def scale_offsets(scale, count):
    """First ``count`` semitone offsets of a named scale, climbing through octaves."""
    if scale not in SCALES:
        raise PitchError(scale, scale_forms(scale))
    steps = SCALES[scale]
    return [12 * (i // len(steps)) + steps[i % len(steps)] for i in range(count)]


def scale_targets(root, scale, count, temperament="equal", a4=A4_FREQUENCY, spelling="auto"):
    """``count`` notes of a named scale from ``root`` upwards, spelled from the key (see :func:`spelled_names`)."""
    root_midi = parse_note(root) if isinstance(root, str) else int(root)
    offsets = scale_offsets(scale, count)
    names = spelled_names(root_midi, offsets, scale, root if isinstance(root, str) else None, spelling)
    return [Target(name, degree_frequency(root_midi, off, temperament, a4)) for name, off in zip(names, offsets)]


def range_targets(low, high, scale="chromatic", temperament="equal", a4=A4_FREQUENCY, spelling="auto"):
    """Notes from ``low`` to ``high`` inclusive that belong to ``scale`` built on ``low``.

    >>> [t.name for t in range_targets("C4", "C5", "major")][-3:]
    ['A4', 'B4', 'C5']
    """
    lo, hi = parse_note(low), parse_note(high)
    if hi < lo:
        raise PitchError(f"{low}..{high}", "a range from low to high, such as C4..C6")
    if scale not in SCALES:
        raise PitchError(scale, scale_forms(scale))
    steps = set(SCALES[scale])
    offsets = [m - lo for m in range(lo, hi + 1) if (m - lo) % 12 in steps]
    names = spelled_names(lo, offsets, scale, low, spelling)
    return [Target(name, degree_frequency(lo, off, temperament, a4)) for name, off in zip(names, offsets)]


def note_targets(notes, root=None, temperament="equal", a4=A4_FREQUENCY):
    """Targets for explicit note names; with a just or Pythagorean temperament, relative to root
    (the first note when no root is given)."""
    midis = [parse_note(n) for n in notes]
    base = parse_note(root) if root else (min(midis) if midis else 60)
    kind, _ = parse_temperament(temperament)
    out = []
    for n, m in zip(notes, midis, strict=True):
        offset = m - base
        if kind in ("just", "pythagorean") and offset < 0:
            octaves = (-offset + 11) // 12
            freq = degree_frequency(base - 12 * octaves, offset + 12 * octaves, temperament, a4)
        else:
            freq = degree_frequency(base, offset, temperament, a4)
        out.append(Target(_written(n, m), freq))
    return out


def _written(text, midi):
    """A note as the builder wrote it, tidied ('bb3' -> 'Bb3', 'E♭4' -> 'Eb4'); sharps for odd forms."""
    clean = text.strip().replace("♯", "#").replace("♭", "b")
    return clean[0].upper() + clean[1:] if re.fullmatch(r"[A-Ga-g](#|b)?-?\d{1,2}", clean) else note_name(midi)


def parse_scale_spec(spec):
    """Read a scale spec: "D5 major-pentatonic 5", "C4 major" (one octave), or "C4..C6 [SCALE]".

    Returns a dict with keys root/scale/count or low/high/scale.
    """
    forms = '"ROOT SCALE [COUNT]" such as "D5 major-pentatonic 5", or "LOW..HIGH [SCALE]"'
    parts = spec.split() if isinstance(spec, str) else []
    if not parts:
        raise PitchError(str(spec), forms)
    if ".." in parts[0]:
        low, _, high = parts[0].partition("..")
        scale = parts[1] if len(parts) > 1 else "chromatic"
        if len(parts) > 2:
            raise PitchError(spec, forms)
        return {"low": low, "high": high, "scale": scale}
    if len(parts) not in (2, 3):
        raise PitchError(spec, forms)
    root, scale = parts[0], parts[1]
    if scale not in SCALES:
        raise PitchError(scale, scale_forms(scale))
    if len(parts) == 3:
        if not parts[2].isdigit() or not 1 <= int(parts[2]) <= 200:
            raise PitchError(parts[2], "a count of notes from 1 to 200")
        count = int(parts[2])
    else:
        count = len(SCALES[scale]) + 1
    return {"root": root, "scale": scale, "count": count}


def spec_targets(spec, temperament="equal", a4=A4_FREQUENCY, spelling="auto"):
    """Targets for a scale spec string (see :func:`parse_scale_spec`)."""
    parsed = parse_scale_spec(spec)
    if "low" in parsed:
        return range_targets(parsed["low"], parsed["high"], parsed["scale"], temperament, a4, spelling)
    return scale_targets(parsed["root"], parsed["scale"], parsed["count"], temperament, a4, spelling)

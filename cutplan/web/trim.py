"""Trim at the bench: a tuner reading or a recording of one piece -> the measure and trim answer.

The same steps as the ``measure`` and ``trim`` commands: :func:`cutplan.audio.analysis.measure`
names the fundamental (near the piece's target, with the plan's partial pattern), and
:func:`cutplan.calibrate.trim_advice` says how much to take off and from which end. A recording
is read from memory, or from a private temporary folder under a fixed name: nothing from the
request becomes a file path.
"""

from __future__ import annotations

import os
import tempfile
from dataclasses import dataclass

from cutplan.render.phrases import trim_lines
from cutplan.web.service import WebErrors, error

MIN_HZ, MAX_HZ = 10.0, 30000.0
"""Tuner readings accepted [Hz] (the ``measure --frequency`` range)."""


@dataclass(frozen=True)
class TrimAnswer:
    """What the page shows: the measurement and the advice, as lines of text."""

    label: str
    measured_hz: float
    note: str
    cents: float
    confidence: float
    partials_hz: tuple
    lines: tuple

    def as_dict(self):
        """JSON-ready."""
        return {"label": self.label, "measured_hz": round(self.measured_hz, 3), "note": self.note,
                "cents": self.cents, "confidence": self.confidence,
                "partials_hz": [round(f, 2) for f in self.partials_hz], "lines": list(self.lines)}


def _recording_frequency(recording, kind, piece):
    """Fundamental of a WAV recording given as bytes, via a private temporary folder."""
    from cutplan.audio.analysis import measure
    from cutplan.audio.wav import RecordingError, read_wav

    with tempfile.TemporaryDirectory(prefix="cutplan-trim-") as folder:
        path = os.path.join(folder, "recording.wav")
        with open(path, "wb") as fh:
            fh.write(recording)
        try:
            samples, rate = read_wav(path)
            m = measure(samples, rate, kind, piece.target_hz, list(piece.partial_ratios))
        except RecordingError as exc:
            raise WebErrors([error("trim.recording", str(exc))]) from None
    return m.fundamental_hz, tuple(m.partials_hz), m.confidence


def _number(text, key):
    try:
        value = float(str(text).strip())
    except ValueError:
        raise WebErrors([error(key, f"{text!r} is not a frequency in Hz")]) from None
    if not MIN_HZ <= value <= MAX_HZ:
        raise WebErrors([error(key, f"{value:g} must be between {MIN_HZ:g} and {MAX_HZ:g} Hz")])
    return value


def trim_answer(design, plan, label, measured="", recording=b"", length_now=""):
    """The measure and trim answer for piece ``label`` of a planned design, or :class:`WebErrors`.

    ``measured`` is a tuner reading [Hz] as text, ``recording`` the bytes of a WAV file (give
    one of them); ``length_now`` the piece's length now as text (default: its cut length).
    """
    from cutplan import pitch
    from cutplan.calibrate import CalibrationError, trim_advice
    from cutplan.models import piece_frequency_function
    from cutplan.units import UnitError, parse_length

    pieces = {p.label: p for p in plan.pieces}
    if label not in pieces:
        raise WebErrors([error("trim.piece", f"{label!r} is not a piece of this design")])
    piece = pieces[label]
    spec = next(s for s in design.sets if s.name == piece.set)
    measured = str(measured or "").strip()
    if bool(measured) == bool(recording):
        raise WebErrors([error("trim.measured", "give a tuner reading or a recording (one of them)")])
    if recording:
        kind = spec.kind if spec.kind in ("chime", "bar") else spec.ends
        hz, partials, confidence = _recording_frequency(recording, kind, piece)
    else:
        hz = _number(measured, "trim.measured")
        partials, confidence = (hz,), 1.0
    now = None
    if str(length_now or "").strip():
        try:
            now = parse_length(length_now)
        except UnitError as exc:
            raise WebErrors([error("trim.length_now", f"{exc.text!r} is not {exc.accepted}")]) from None
        if not 0.5 * piece.length <= now <= 2 * piece.cut_length:  # the same range as `cutplan trim`
            from cutplan.units import format_length

            raise WebErrors([error("trim.length_now", f"{length_now!r} must be between half the planned length "
                                   f"({format_length(0.5 * piece.length, plan.units)}) and twice the cut length "
                                   f"({format_length(2 * piece.cut_length, plan.units)})")])
    try:
        advice = trim_advice(piece, piece_frequency_function(spec, piece), hz, now, plan.units)
    except CalibrationError as exc:
        raise WebErrors([error("trim.measured", str(exc))]) from None
    units = plan.units
    name, off = pitch.nearest_note(hz, plan.a4)
    lines = [f"measured {hz:.2f} Hz = {name} {off:+.1f} cents"
             + (f" (confidence {confidence:.2f}); partials " + ", ".join(f"{f:.1f}" for f in partials) + " Hz"
                if recording else "")]
    lines += trim_lines(piece, advice, hz, units)  # the trim command's own lines, word for word
    return TrimAnswer(label, hz, name, off, confidence, partials, tuple(lines))

"""Trim at the bench on the page: a tuner reading or a recording of one piece -> the trim answer.

The page is one more front end of :mod:`cutplan.tuning.trim_service`, the service the ``trim``
command calls: the same checks, messages and fields, and the same lines word for word.  A
recording is read from memory, or from a private temporary folder under a fixed name: nothing
from the request becomes a file path.  The rounds of an undercut bar travel with the page (the
``trim.state`` field holds what the last answer returned; ``trim.done`` says its cuts were made).
"""

from __future__ import annotations

import json
import os
import tempfile
from dataclasses import dataclass
from typing import Any

from cutplan import pitch
from cutplan.audio.analysis import measure
from cutplan.audio.wav import RecordingError, read_wav
from cutplan.render.trim_drawing import trim_drawing
from cutplan.tuning import TrimError, parse_length_now, parse_measured, trim_report
from cutplan.tuning.trim_service import find_piece, recorded_partials
from cutplan.web.service import WebErrors, error

__all__ = ["MIN_HZ", "MAX_HZ", "MAX_STATE_BYTES", "TrimAnswer", "trim_answer"]

MIN_HZ, MAX_HZ = 10.0, 30000.0
"""Tuner readings accepted [Hz] (the service's range)."""
MAX_STATE_BYTES = 200_000
"""Largest rounds mapping accepted back from the page [bytes]."""


@dataclass(frozen=True)
class TrimAnswer:
    """What the page shows: the measurement, the service's report, its lines and drawing."""

    label: str
    measured_hz: float
    note: str
    cents: float
    confidence: float
    partials_hz: tuple[float, ...]
    lines: tuple[str, ...]
    report: dict[str, Any]
    drawing: str = ""
    state: str = ""

    def as_dict(self):
        """JSON-ready: the report's fields (``partials``, ``removal``, ``predicted_after_hz``...)
        with the page's own (``measured_hz``, ``note``, ``lines``, ``drawing``, ``state``)."""
        return {**self.report, "label": self.label, "measured_hz": round(self.measured_hz, 3), "note": self.note,
                "cents": self.cents, "confidence": self.confidence,
                "partials_hz": [round(f, 2) for f in self.partials_hz], "lines": list(self.lines),
                "drawing": self.drawing, "state": self.state}


def _recording(recording, kind, piece):
    """The measurement of a WAV recording given as bytes, via a private temporary folder."""
    with tempfile.TemporaryDirectory(prefix="cutplan-trim-") as folder:
        path = os.path.join(folder, "recording.wav")
        with open(path, "wb") as fh:
            fh.write(recording)
        try:
            samples, rate = read_wav(path)
            return measure(samples, rate, kind, piece.target_hz, list(piece.partial_ratios))
        except RecordingError as exc:
            raise WebErrors([error("trim.recording", str(exc))]) from None


def _state(text):
    text = str(text or "").strip()
    if not text:
        return None
    if len(text) > MAX_STATE_BYTES:
        raise WebErrors([error("trim.measured", "the rounds sent back are too large; start the rounds afresh")])
    try:
        return json.loads(text)
    except json.JSONDecodeError:
        raise WebErrors([error("trim.measured", "the rounds sent back are not readable; start the rounds afresh")]) \
            from None


def trim_answer(design, plan, label, measured="", recording=b"", length_now="", state="", done=False):
    """The trim answer for piece ``label`` of a planned design, or :class:`WebErrors`.

    ``measured`` is a tuner reading [Hz] as text (a bar's partials separated by commas),
    ``recording`` the bytes of a WAV file (give one of them); ``length_now`` the piece's length now
    as text (default: its cut length); ``state`` the rounds the last answer returned (JSON text).
    """
    measured = str(measured or "").strip()
    try:
        piece, spec = find_piece(design, plan, label)
        if bool(measured) == bool(recording):
            raise TrimError("measured", "give a tuner reading or a recording (one of them)")
        now = parse_length_now(length_now, piece, plan.units) if str(length_now or "").strip() else None
        if recording:
            kind = spec.kind if spec.kind in ("chime", "bar") else spec.ends
            m = _recording(recording, kind, piece)
            (partials, confidence), found = recorded_partials(m, piece), tuple(m.partials_hz)
        else:
            partials, confidence = parse_measured(measured), 1.0
            found = partials
        report = trim_report(design, plan, label, partials, confidence, bool(recording), now,
                             _state(state) if piece.arch is not None else None, bool(done))
    except TrimError as exc:
        raise WebErrors([error(f"trim.{exc.key}", str(exc))]) from None
    hz = partials[0]
    name, off = pitch.nearest_note(hz, plan.a4)
    lines = [f"measured {hz:.2f} Hz = {name} {off:+.1f} cents"
             + (f" (confidence {confidence:.2f}); partials " + ", ".join(f"{f:.1f}" for f in found) + " Hz"
                if recording else "")]
    lines += report.lines  # the trim command's own lines, word for word
    return TrimAnswer(label, hz, name, off, confidence, found, tuple(lines), report.as_dict(),
                      trim_drawing(report, plan.units),
                      json.dumps(report.state) if report.state is not None else "")

"""Trim at the bench on the page: a tuner reading or a recording of one piece -> the trim answer.

The page is one more front end of :mod:`cutplan.tuning.trim_service` (:func:`trim_reading`), the service the ``trim``
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
from cutplan.audio.wav import read_wav
from cutplan.render.trim_drawing import trim_drawing
from cutplan.tuning import TrimError
from cutplan.tuning.trim_service import trim_reading
from cutplan.web.service import WebErrors, error

__all__ = ["TrimAnswer", "trim_answer"]


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


def _samples(recording):
    """(samples, rate) of a WAV recording given as bytes, read via a private temporary folder
    (raises RecordingError, which the trim service turns into a one-line error)."""

    with tempfile.TemporaryDirectory(prefix="cutplan-trim-") as folder:
        path = os.path.join(folder, "recording.wav")
        with open(path, "wb") as fh:
            fh.write(recording)
        return read_wav(path)


def trim_answer(design, plan, label, measured="", recording=b"", length_now="", state="", done=False):
    """The trim answer for piece ``label`` of a planned design, or :class:`WebErrors`.

    ``measured`` is a tuner reading [Hz] as text (a bar's partials separated by commas),
    ``recording`` the bytes of a WAV file (give one of them); ``length_now`` the piece's length now
    as text (default: its cut length); ``state`` the rounds the last answer returned (JSON text).
    """

    try:  # the one trim service, with the command line's checks
        reading = trim_reading(design, plan, label, measured, (lambda: _samples(recording)) if recording else None,
                               length_now, state, bool(done), state_where="the rounds sent back")
    except TrimError as exc:
        raise WebErrors([error(f"trim.{exc.key}", str(exc))]) from None
    report, partials, confidence, found = reading.report, reading.partials, reading.confidence, reading.heard
    hz = partials[0]
    name, off = pitch.nearest_note(hz, plan.a4)
    lines = [f"measured {hz:.2f} Hz = {name} {off:+.1f} cents"
             + (f" (confidence {confidence:.2f}); partials " + ", ".join(f"{f:.1f}" for f in found) + " Hz"
                if recording else "")]
    lines += report.lines  # the trim command's own lines, word for word
    return TrimAnswer(label, hz, name, off, confidence, found, tuple(lines), report.as_dict(),
                      trim_drawing(report, plan.units, plan.inch_denominator),
                      json.dumps(report.state) if report.state is not None else "")

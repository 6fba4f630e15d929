"""One trim service for the command line and the page: the same checks, messages and fields.

A reading (a tuner's partials, or a recording's) of one planned piece goes in; a
:class:`TrimReport` comes out: each tuned partial against its target in cents, what to do, the
partials expected afterwards, and for undercut bars where and how deep to remove wood from the
underside (:mod:`cutplan.tuning.removal`).  Front ends only parse their inputs with the
functions here, call :func:`trim_report`, and print ``report.lines`` or ``report.as_dict()``.

Rounds (undercut bars).  What was removed so far is kept in a state mapping (JSON-ready): per
piece, the profile now (stations and thickness, from end A) and the last advice.  The next
reading says whether that advice was made (``done``): if so its profile becomes the profile now,
otherwise it is dropped.  The command line keeps the mapping in a file next to the design
(:data:`STATE_SUFFIX`); the page sends it back with the next reading.

A reading that is far from the target, or a recording read with low confidence, is always
questioned first: the report asks to record again before any cut, and never advises a new
piece on such a reading.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass, field, replace
from typing import Any

import numpy as np

from cutplan.audio.analysis import LOW_CONFIDENCE, measure
from cutplan.audio.wav import RecordingError
from cutplan.limits import FREQUENCY_RANGE, FREQUENCY_SPAN, IN_TUNE_CENTS
from cutplan.numeric import quiet
from cutplan.planning.frequency import piece_frequency_function
from cutplan.render.phrases import trim_report_lines
from cutplan.tuning.calibrate import FAR_OFF_CENTS, CalibrationError, trim_advice
from cutplan.units import INCH_DENOMINATOR, UnitError, format_length, parse_length

__all__ = [
    "IN_TUNE_CENTS", "PARTIAL_MATCH", "STATE_FORMAT", "STATE_SUFFIX",
    "TrimError", "PartialReading", "TrimReport", "parse_measured", "parse_length_now", "recorded_partials",
    "find_piece", "tuned_targets", "trim_report", "with_lines", "new_state", "check_state",
    "profile_arrays", "profile_entry"
]


PARTIAL_MATCH = 0.06
"""A recorded peak within this fraction of fundamental x planned ratio is taken as that partial
[-] (about 100 cents)."""
STATE_FORMAT = "cutplan-trim-state/1"
STATE_SUFFIX = ".trim-state.json"
"""The command line keeps the rounds of design ``X.toml`` in ``X.trim-state.json`` beside it."""


class TrimError(ValueError):
    """Bad trim input: ``key`` names the field, the text says what is allowed (one line)."""

    def __init__(self, key, message):
        super().__init__(message)
        self.key = key


@dataclass(frozen=True)
class PartialReading:
    """One partial: its mode (1-based), target [Hz] (None when not tuned), measured [Hz], cents."""

    mode: int
    target_hz: float | None
    measured_hz: float
    cents: float | None


@dataclass(frozen=True)
class TrimReport:
    """Everything either front end shows about one reading of one piece (SI inside)."""

    label: str
    note: str
    action: str  # "in-tune" | "trim" | "remove" | "sharp" | "re-record"
    partials: tuple[PartialReading, ...]
    length_now: float
    length_needed: float | None
    removal: tuple[tuple[float, float, int, bool], ...] = ()  # ((x [m] from end A, depth [m], mode mostly moved, raises it), ...) in work order
    blend: float = 0.0  # each cut fades to nothing this far either side of its station [m]
    trim_each_end: float = 0.0
    predicted_after_hz: tuple[float, ...] = ()
    unreachable: tuple[int, ...] = ()
    supports: tuple[float, ...] = ()  # distances of the supports or hang points from the centre line [m]
    confidence: float = 1.0
    lines: tuple[str, ...] = ()
    messages: tuple[tuple[str, str], ...] = ()  # ((code, text), ...)
    profile_after: tuple[tuple[float, ...], ...] = ()  # (xs, hs) [m] of an undercut bar after the advised cuts
    profile_now: tuple[tuple[float, ...], ...] = ()
    state: dict[str, Any] | None = field(default=None, compare=False)

    def as_dict(self):
        """The JSON fields (``partials``, ``removal``, ``predicted_after_hz`` and the rest)."""
        return {
            "label": self.label, "note": self.note, "action": self.action,
            "partials": [{"mode": p.mode, "target_hz": None if p.target_hz is None else round(p.target_hz, 3),
                          "measured_hz": round(p.measured_hz, 3),
                          "cents": None if p.cents is None else round(p.cents, 2)} for p in self.partials],
            "removal": [{"x_mm": round(x * 1e3, 1), "depth_mm": round(d * 1e3, 2), "mostly_moves_mode": m,
                         "raises": up} for x, d, m, up in self.removal],
            "blend_mm": round(self.blend * 1e3, 1),
            "trim_each_end_mm": round(self.trim_each_end * 1e3, 2),
            "length_now_mm": round(self.length_now * 1e3, 1),
            "length_needed_mm": None if self.length_needed is None else round(self.length_needed * 1e3, 1),
            "predicted_after_hz": [round(f, 2) for f in self.predicted_after_hz],
            "unreachable_modes": list(self.unreachable),
            "supports_from_centre_mm": [round(s * 1e3, 1) for s in self.supports],
            "confidence": self.confidence,
            "messages": [{"code": c, "text": t} for c, t in self.messages],
            "lines": list(self.lines),
        }


def parse_measured(text, key="measured"):
    """Partials 1, 2, ... [Hz] from "349.2" or "349.2, 1398, 3490" (rising), or :class:`TrimError`."""
    try:
        values = tuple(float(v) for v in str(text).replace(";", ",").split(",") if v.strip())
    except ValueError:
        raise TrimError(key, f"{text!r} is not a frequency in Hz (or partials 1, 2, 3 separated by commas)") from None
    if not values:
        raise TrimError(key, "give the frequency the piece sounds now, in Hz")
    for v in values:
        if not FREQUENCY_RANGE[0] <= v <= FREQUENCY_RANGE[1]:
            raise TrimError(key, f"{v:g} must be a frequency from {FREQUENCY_SPAN}")
    if any(b <= a for a, b in zip(values, values[1:], strict=False)):
        raise TrimError(key, f"{text!r}: partials must rise, in mode order (1, 2, 3)")
    return values


def parse_length_now(text, piece, units="mm", key="length_now", den=INCH_DENOMINATOR):
    """The piece's length now [m] from text, within half the planned and twice the cut length."""
    try:
        now = parse_length(text)
    except UnitError as exc:
        raise TrimError(key, f"{exc.text!r} is not {exc.accepted}") from None
    if not 0.5 * piece.length <= now <= 2 * piece.cut_length:
        raise TrimError(key, f"{text!r} must be between half the planned length "
                             f"({format_length(0.5 * piece.length, units, den)}) and twice the cut length "
                             f"({format_length(2 * piece.cut_length, units, den)})")
    return now


def recorded_partials(measurement, piece) -> tuple[tuple[float, ...], float]:
    """(partials 1, 2, ... [Hz] in mode order, stopping at the first one not heard, confidence)."""
    f1 = measurement.fundamental_hz
    out = [f1]
    for ratio in piece.partial_ratios[1:]:
        want = f1 * ratio
        near = [f for f in measurement.partials_hz if abs(f / want - 1) <= PARTIAL_MATCH]
        if not near:
            break
        out.append(min(near, key=lambda f: abs(math.log(f / want))))
    return tuple(out), float(measurement.confidence)


def find_piece(design, plan, label):
    """(piece, its set's spec), or :class:`TrimError` naming the labels."""
    pieces = {p.label: p for p in plan.pieces}
    if label not in pieces:
        names = ", ".join(list(pieces)[:8]) + ("..." if len(pieces) > 8 else "")
        raise TrimError("piece", f"{label!r} is not a piece of this design; labels are {names}")
    piece = pieces[label]
    return piece, next(s for s in design.sets if s.name == piece.set)


def tuned_targets(piece, count):
    """Target of each of the first ``count`` partials [Hz]; None where the plan does not tune it."""
    targets = [piece.target_hz]
    ratios = piece.arch.ratios if piece.arch is not None else ()
    targets += [piece.target_hz * r for r in ratios]
    return tuple(targets[i] if i < len(targets) else None for i in range(count))


def _questioned(piece, cents1, confidence, from_recording):
    """((code, text), ...) when the reading must be confirmed before any cut."""
    out = []
    if abs(cents1) > FAR_OFF_CENTS:
        out.append(("far-off", f"this reading is {abs(cents1):.0f} cents from the target: record again and check "
                                "that it is this piece and its fundamental (not another partial, or the strike note "
                                "of another piece) before cutting anything"))
    if from_recording and confidence < LOW_CONFIDENCE:
        out.append(("low-confidence", f"the recording was read with low confidence ({confidence:.2f}): record again "
                                      "(strike firmly at the centre, quiet room, let it ring) before cutting anything"))
    return tuple(out)


def trim_report(design, plan, label, measured_hz, confidence=1.0, from_recording=False, length_now=None,
                state=None, done=False):
    """The trim answer for piece ``label`` sounding ``measured_hz`` (partials 1, 2, ...).

    ``length_now`` [m] defaults to the piece's cut length (or, for an undercut bar with rounds in
    ``state``, its length after them); ``state`` is the mapping of earlier rounds (None: none),
    ``done`` says the last advice in it was made.  Raises :class:`TrimError` for bad input.
    """
    piece, spec = find_piece(design, plan, label)
    measured = tuple(float(f) for f in measured_hz)
    targets = tuned_targets(piece, len(measured))
    partials = tuple(PartialReading(i + 1, t, f, None if t is None else 1200 * math.log2(f / t))
                     for i, (f, t) in enumerate(zip(measured, targets, strict=True)))
    questions = _questioned(piece, partials[0].cents, confidence, from_recording)
    if piece.arch is not None:
        from cutplan.tuning.arched import arched_report  # here: arched imports this module

        return arched_report(design, plan, piece, spec, partials, confidence, questions, length_now, state, done)
    return _plain_report(plan, piece, spec, partials, confidence, questions, length_now)


MAX_STATE_BYTES = 200_000
"""Largest rounds mapping accepted from a file or from the page [bytes] (a bar's rounds are a few kB)."""
KEYS = {"piece": "piece", "measured": "measured", "recording": "recording", "length_now": "length_now",
        "state": "state"}
"""The names a front end's inputs go by in :class:`TrimError` (the page: these; the command line
gives its options)."""


@dataclass(frozen=True)
class TrimReading:
    """What a reading gave: the report, the partials taken as modes 1, 2, ..., every partial
    heard (a recording's peaks, or the tuner's values) and the confidence."""

    report: TrimReport
    partials: tuple
    heard: tuple
    confidence: float


def parse_state(text, where="state", key="state"):
    """The rounds mapping from JSON text ('' or None: no rounds yet), size-checked and checked
    for its format, or :class:`TrimError`."""
    text = str(text or "").strip()
    if not text:
        return None
    if len(text.encode("utf-8")) > MAX_STATE_BYTES:
        raise TrimError(key, f"{where}: the rounds are over {MAX_STATE_BYTES} bytes; move them away (or start "
                             "the rounds afresh)")
    try:
        state = json.loads(text)
    except (json.JSONDecodeError, RecursionError):
        raise TrimError(key, f"{where}: not a {STATE_FORMAT} file (not readable JSON); move it away to start the "
                             "rounds afresh") from None
    return check_state(state, where)


def trim_reading(design, plan, label, measured="", recording=None, length_now="", state="", done=False,
                 keys=None, state_where="state"):
    """The one trim service both front ends call: every check, then :func:`trim_report`.

    ``measured``: a tuner reading as text ("583.1" or a bar's "349.1, 1398.6"); ``recording``: a
    callable giving ``(samples, rate)`` of a WAV recording (give exactly one of the two);
    ``length_now``: text (default: the cut length, or the length after the rounds); ``state``:
    the rounds as JSON text (undercut bars only; ``state_where`` names it in errors); ``done``:
    the last advice was made.  ``keys`` renames the inputs in errors (see :data:`KEYS`).
    Returns a :class:`TrimReading`; raises :class:`TrimError` (key and one line) for bad input.
    """

    keys = {**KEYS, **(keys or {})}
    measured = str(measured or "").strip()
    if bool(measured) == (recording is not None):
        raise TrimError(keys["measured"], "give a tuner reading or a recording (one of them)")
    try:
        piece, spec = find_piece(design, plan, label)
    except TrimError as exc:
        raise TrimError(keys["piece"], str(exc)) from None
    text_now = str(length_now or "").strip()
    now = (parse_length_now(text_now, piece, plan.units, keys["length_now"], plan.inch_denominator) if text_now
           else None)
    if recording is not None:
        kind = spec.kind if spec.kind in ("chime", "bar") else spec.ends
        try:
            samples, rate = recording()
            m = measure(samples, rate, kind, piece.target_hz, list(piece.partial_ratios))
        except RecordingError as exc:
            raise TrimError(keys["recording"], str(exc)) from None
        partials, confidence = recorded_partials(m, piece)
        heard = tuple(m.partials_hz)
    else:
        partials, confidence = parse_measured(measured, keys["measured"]), 1.0
        heard = partials
    rounds = parse_state(state, state_where, keys["state"]) if piece.arch is not None else None
    report = trim_report(design, plan, label, partials, confidence, recording is not None, now, rounds, done)
    return TrimReading(report, tuple(partials), tuple(heard), confidence)


def _plain_report(plan, piece, spec, partials, confidence, questions, length_now):
    """Uniform bars, chimes and air columns: the length to trim (and the supports for it)."""
    f1 = partials[0].measured_hz
    try:
        advice = quiet(trim_advice, piece, piece_frequency_function(spec, piece), f1, length_now, plan.units,
                       plan.inch_denominator)
    except CalibrationError as exc:
        raise TrimError("measured", str(exc)) from None
    except (ValueError, ArithmeticError):
        raise TrimError("measured", f"no length between half and one and a half times the length now brings "
                                    f"{piece.label} from {f1:.2f} Hz to {piece.target_hz:.2f} Hz; check the reading "
                                    "(another partial?) and the piece") from None
    scale = piece.target_hz / f1
    predicted = tuple(p.measured_hz * scale for p in partials)
    if questions:
        action = "re-record"
    elif abs(partials[0].cents) < IN_TUNE_CENTS:
        action = "in-tune"
    else:
        action = "trim" if advice.remove > 0 else "sharp"
    supports = ()
    if piece.nodes and piece.kind == "bar":  # a chime hangs from its top node: trim_lines says where
        fractions = [x / piece.length for x in piece.nodes]
        supports = tuple(sorted({round(abs(0.5 - f) * advice.length_needed, 7) for f in fractions}))
    report = TrimReport(piece.label, piece.note, action, partials, advice.length_now, advice.length_needed,
                        predicted_after_hz=predicted, supports=supports, confidence=confidence, messages=questions)
    return with_lines(report, trim_report_lines(piece, report, advice, plan.units, plan.inch_denominator))


def with_lines(report, lines):
    return replace(report, lines=tuple(lines))


def new_state():
    """An empty rounds mapping."""
    return {"format": STATE_FORMAT, "pieces": {}}


def check_state(state, where="state"):
    """The rounds mapping, checked: a mapping of the right format, or :class:`TrimError`."""
    if state is None:
        return new_state()
    if not isinstance(state, dict) or state.get("format") != STATE_FORMAT or not isinstance(state.get("pieces"), dict):
        raise TrimError("state", f"{where}: not a {STATE_FORMAT} file; move it away to start the rounds afresh")
    return state


def profile_arrays(entry):
    """(xs, hs) [m] of a stored profile ({"x_mm": [...], "thickness_mm": [...]})."""
    xs = np.asarray(entry["x_mm"], dtype=float) * 1e-3
    hs = np.asarray(entry["thickness_mm"], dtype=float) * 1e-3
    return xs, hs


def profile_entry(xs, hs):
    """A profile as stored (mm, rounded to a micrometre)."""
    return {"x_mm": [round(float(x) * 1e3, 3) for x in xs], "thickness_mm": [round(float(h) * 1e3, 4) for h in hs]}

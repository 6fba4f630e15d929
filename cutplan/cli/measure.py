"""The ``measure`` command: every strong partial of a recording, and the fundamental named from them."""

from __future__ import annotations

import json

import click

from cutplan import pitch
from cutplan.audio.analysis import Measurement, measure
from cutplan.audio.partials import Partial
from cutplan.audio.wav import RecordingError, read_wav
from cutplan.cli.common import fail, option_help
from cutplan.limits import A4_ALLOWED, FREQUENCY_RANGE, FREQUENCY_SPAN, a4_ok

__all__ = ["MEASURE_KINDS", "MIN_CONFIDENCE", "measure_file", "measure_command"]

MEASURE_KINDS = ["any", "chime", "bar", "tuned-bar", "xylophone-bar", "air-column", "open-open", "closed-open"]


MIN_CONFIDENCE = 0.2
"""Least confidence (0..1) a measured fundamental needs to be reported (common practice: below it
the partials found fit the piece's pattern too poorly to trust the pitch)."""


def measure_file(recording, kind, near_hz, ratios=None):
    """Measurement of a WAV file, or exit 2 with one line saying why it cannot be used."""
    try:
        samples, rate = read_wav(recording)
        return measure(samples, rate, kind, near_hz, ratios)
    except RecordingError as exc:
        fail(f"{recording}: {exc}")


@click.command("measure")
@click.argument("recording", required=False, type=click.Path(dir_okay=False))
@click.option("--frequency", type=float, help="A frequency read from a tuner instead of a recording [Hz].")
@click.option("--kind", type=click.Choice(MEASURE_KINDS), default="any", show_default=True,
              help="What was struck: the partial patterns tried when naming the fundamental (any: all of them; "
                   "bar: plain, tuned and xylophone bars; air-column: open and closed).")
@click.option("--near", help='Expected note, e.g. "D5": only fundamentals within half an octave are considered.')
@click.option("--a4", type=float, default=440.0, show_default=True, help=option_help("a4"))
@click.option("--format", "fmt", type=click.Choice(["text", "json"]), default="text", show_default=True,
              help=option_help("format"))
def measure_command(recording, frequency, kind, near, a4, fmt):
    """Measure the pitch and partials of a struck piece from a WAV recording.

    \b
    Every partial within 30 dB of the strongest is listed with its level and decay time; the
    fundamental is named from the partials in the sound, weighing the patterns of the kinds of
    piece, and a doubtful reading says so.
    \b
    Examples:
      cutplan measure porch-1.wav --near D5
      cutplan measure pipe.wav --kind closed-open --format json
      cutplan measure --frequency 583.1
    """

    if (recording is None) == (frequency is None):
        fail("measure: give a RECORDING or --frequency (one of them)")
    if not a4_ok(a4):
        fail(f"--a4: {a4} {A4_ALLOWED}")
    near_hz = None
    if near:
        try:
            near_hz = pitch.note_frequency(near, a4)
        except pitch.PitchError as exc:
            fail(f"--near: {exc.text!r} is not {exc.accepted}")
    if frequency is not None:
        if not FREQUENCY_RANGE[0] <= frequency <= FREQUENCY_RANGE[1]:
            fail(f"--frequency: {frequency} must be a frequency from {FREQUENCY_SPAN}")
        m = Measurement(frequency, (frequency,), 1.0, "tuner", True, (Partial(frequency, 0.0, None),), (1,))
    else:
        m = measure_file(recording, kind, near_hz)
        if m.confidence < MIN_CONFIDENCE:
            fail(f"{recording}: the strongest pattern ({m.fundamental_hz:.1f} Hz) has confidence {m.confidence:.2f}, "
                 f"under {MIN_CONFIDENCE}: too unsure to report; record one clear strike close to the piece, or give "
                 "--near NOTE or --kind")
    name, off = pitch.nearest_note(m.fundamental_hz, a4)
    if fmt == "json":
        click.echo(json.dumps(_measurement_json(m, name, off, a4)))
        return
    click.echo(f"fundamental {m.fundamental_hz:.3f} Hz = {name} {off:+.2f} cents (confidence {m.confidence:.2f}"
               + (f", {m.pattern} pattern)" if m.pattern != "tuner" else ")")
               + ("" if m.fundamental_heard else " - estimated, not in the recording"))
    if recording is not None:
        click.echo("partials (level at the strike, decay time to 1/e, mode in that pattern):")
        for p, mode in zip(m.partials, m.modes, strict=True):
            decay = "rings on" if p.decay_s is None else f"{p.decay_s:6.3f} s"
            click.echo(f"  {p.hz:10.2f} Hz  x{p.hz / m.fundamental_hz:6.3f}  {p.level_db:6.1f} dB  {decay:>9}  "
                       + (f"mode {mode}" if mode else "not in the pattern"))
    for line in m.warnings:
        click.echo(f"! {line}")


def _measurement_json(m, name, off, a4):
    """The JSON record of a measurement (fundamental, every partial, the readings weighed, warnings)."""
    def reading(r):
        note, cents = pitch.nearest_note(r.fundamental_hz, a4)
        return {"pattern": r.pattern, "fundamental_hz": round(r.fundamental_hz, 3), "note": note, "cents": cents,
                "fundamental_heard": r.heard, "score": round(r.score, 3)}

    return {"fundamental_hz": round(m.fundamental_hz, 4), "note": name, "cents": off,
            "partials_hz": [round(f, 3) for f in m.partials_hz], "confidence": m.confidence,
            "pattern": m.pattern, "fundamental_heard": m.fundamental_heard,
            "partials": [{"hz": round(p.hz, 3), "level_db": p.level_db,
                          "decay_s": None if p.decay_s is None else round(p.decay_s, 4), "mode": mode}
                         for p, mode in zip(m.partials, m.modes, strict=True)],
            "readings": [reading(r) for r in m.readings], "warnings": list(m.warnings)}



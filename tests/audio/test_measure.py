"""Synthesized recordings against the analyser: pitch within 0.5 cent, fundamental named right."""

import math
import struct
from functools import cache

import numpy as np
import pytest
from click.testing import CliRunner
from scipy.io import wavfile

from cutplan.audio.analysis import measure
from cutplan.audio.synth import tone
from cutplan.audio.wav import RecordingError, read_wav
from cutplan.cli import cli

RATE = 44100
# A 1 in x 0.065 in aluminium chime tube's partial ratios from the shear-corrected solver
# (1 : 2.677 : 4.967 : 7.939, computed with cutplan.physics.timoshenko for a 0.5 m piece)
CHIME = (1.0, 2.677, 4.967, 7.939)


def recording(f1, seconds, weak_fundamental=False, snr_db=None, ratios=CHIME, seed=0):
    rng = np.random.default_rng(seed)
    amps = [1.0, 0.7, 0.5, 0.3]
    if weak_fundamental:
        amps[0] = amps[1] / 10  # 20 dB below the second partial
    x = tone([f1 * r for r in ratios], amps[: len(ratios)], [2.0, 1.0, 0.5, 0.3][: len(ratios)], seconds, RATE,
             phases=list(rng.uniform(0, 2 * math.pi, len(ratios))))
    if snr_db is not None:
        power = np.mean(x**2)
        x = x + rng.normal(0, math.sqrt(power / 10 ** (snr_db / 10)), x.size)
    return 0.8 * x / np.max(np.abs(x))


def write(path, x, subtype):
    if subtype == "int16":
        wavfile.write(path, RATE, (x * 32767).astype(np.int16))
    elif subtype == "int32":
        wavfile.write(path, RATE, (x * 2147483647).astype(np.int32))
    else:
        wavfile.write(path, RATE, x.astype(np.float32))
    return path


CASES = [
    (f1, seconds, weak, snr, subtype)
    for f1 in (146.83, 587.33, 1760.0)  # D3, D5, A6 (12-TET at A4 = 440, ISO 16)
    for seconds in (0.5, 5.0)
    for weak, snr in ((False, None), (False, 20.0), (True, None))
    for subtype in ("int16", "float32")
]


@cache
def case_recording(f1, seconds, weak, snr):
    """:func:`recording` made once for both sample formats of a case (read-only: write() copies)."""
    x = recording(f1, seconds, weak, snr)
    x.flags.writeable = False
    return x


@pytest.mark.parametrize(("f1", "seconds", "weak", "snr", "subtype"), CASES)
def test_round_trip_within_half_a_cent(tmp_path, f1, seconds, weak, snr, subtype):
    path = write(tmp_path / "r.wav", case_recording(f1, seconds, weak, snr), subtype)
    samples, rate = read_wav(path)
    m = measure(samples, rate, "chime")
    assert abs(1200 * math.log2(m.fundamental_hz / f1)) < 0.5
    assert m.fundamental_heard


def test_stereo_and_24_or_32_bit(tmp_path):
    x = recording(440.0, 1.0)
    stereo = np.stack([x, x], axis=1)
    wavfile.write(tmp_path / "s.wav", RATE, (stereo * 2147483647).astype(np.int32))
    samples, rate = read_wav(tmp_path / "s.wav")
    assert abs(1200 * math.log2(measure(samples, rate).fundamental_hz / 440.0)) < 0.5


@pytest.mark.parametrize(("kind", "ratios"), [("closed-open", (1, 3, 5, 7)), ("open-open", (1, 2, 3, 4))])
def test_air_column_patterns(kind, ratios):
    x = recording(220.0, 1.0, ratios=ratios)
    m = measure(x, RATE, kind)
    assert abs(1200 * math.log2(m.fundamental_hz / 220.0)) < 0.5


def test_missing_fundamental_is_still_named_near_the_right_note():
    # no energy at all at f1: the estimate comes from the upper partials (nominal ratios), so it
    # may be tens of cents off, but it must not jump to another partial
    x = tone([587.33 * r for r in CHIME[1:]], [0.7, 0.5, 0.3], [1.0, 0.5, 0.3], 1.0, RATE)
    m = measure(x, RATE, "chime")
    assert not m.fundamental_heard
    assert abs(1200 * math.log2(m.fundamental_hz / 587.33)) < 100
    assert m.confidence < 0.9


def test_cli_measure_json(tmp_path):
    path = write(tmp_path / "r.wav", recording(587.33, 1.0), "int16")
    result = CliRunner().invoke(cli, ["measure", str(path), "--format", "json"])
    assert result.exit_code == 0
    import json

    data = json.loads(result.output)
    assert data["note"] == "D5" and abs(data["cents"]) < 0.5
    assert set(data) == {"fundamental_hz", "note", "cents", "partials_hz", "confidence", "pattern",
                         "fundamental_heard", "partials", "readings", "warnings"}
    assert set(data["partials"][0]) == {"hz", "level_db", "decay_s", "mode"}


def test_cli_measure_typed_frequency():
    result = CliRunner().invoke(cli, ["measure", "--frequency", "583.1"])
    assert result.exit_code == 0 and "D5 -12.51" in result.output


def _two_hour_header(path):
    # a valid header whose data chunk claims two hours of 16-bit mono at 44.1 kHz (not written out)
    frames = 2 * 3600 * RATE
    data = frames * 2
    with open(path, "wb") as fh:
        fh.write(b"RIFF" + struct.pack("<I", 36 + data) + b"WAVE")
        fh.write(b"fmt " + struct.pack("<IHHIIHH", 16, 1, 1, RATE, RATE * 2, 2, 16))
        fh.write(b"data" + struct.pack("<I", data))
        fh.write(b"\0" * 1000)


BAD = {
    "empty file": lambda p: p.write_bytes(b""),
    "not a wav": lambda p: p.write_text("this is a text file, not audio"),
    "8-bit": lambda p: wavfile.write(p, RATE, ((recording(440, 1.0) * 127) + 128).astype(np.uint8)),
    "silence": lambda p: wavfile.write(p, RATE, np.zeros(RATE, dtype=np.int16)),
    "white noise": lambda p: wavfile.write(
        p, RATE, (np.random.default_rng(5).normal(0, 0.2, 2 * RATE) * 32767).clip(-32767, 32767).astype(np.int16)),
    "two hours": _two_hour_header,
    "too short": lambda p: wavfile.write(p, RATE, (recording(440, 0.5)[:500] * 32767).astype(np.int16)),
    "clipped square": lambda p: wavfile.write(p, RATE, (np.sign(np.sin(np.arange(RATE) * 0.05)) * 32767).astype(np.int16)),
}


@pytest.mark.parametrize("name", sorted(BAD))
def test_bad_recordings_give_one_line_and_exit_code_2(tmp_path, name):
    path = tmp_path / "bad.wav"
    BAD[name](path)
    result = CliRunner().invoke(cli, ["measure", str(path)])
    assert result.exit_code == 2, (name, result.output)
    lines = [ln for ln in result.output.splitlines() if ln.strip()]
    assert len(lines) == 1 and lines[0].startswith("error: ") and "bad.wav" in lines[0]
    assert "Traceback" not in result.output


def test_reader_refuses_before_reading_samples(tmp_path):
    _two_hour_header(tmp_path / "long.wav")
    with pytest.raises(RecordingError, match="minutes long"):
        read_wav(tmp_path / "long.wav")


def test_missing_fundamental_with_the_planned_ratios_is_within_half_a_cent():
    # when the piece's own partial ratios are known (from the plan), the estimate is exact
    x = tone([587.33 * r for r in CHIME[1:]], [0.7, 0.5, 0.3], [1.0, 0.5, 0.3], 1.0, RATE)
    m = measure(x, RATE, "chime", ratios=CHIME)
    assert not m.fundamental_heard
    assert abs(1200 * math.log2(m.fundamental_hz / 587.33)) < 0.5

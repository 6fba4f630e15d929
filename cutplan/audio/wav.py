"""WAV files: read PCM 16/24/32-bit and float (mono or more channels), write 16-bit PCM.

The RIFF header is read here (no scipy.io), checked before any samples are decoded, and every
way it can be broken is one sentence in a :class:`RecordingError`:

* a RIFF size of 0 or 12 (what an interrupted recorder leaves) is ignored: chunks are read to
  the end of the file;
* a data size of 0xFFFFFFFF (the streaming convention, length unknown while recording), or of
  0 beside such a RIFF size, means "to the end of the file", in whole frames; a data size
  running past the end of the file is read as far as the file goes;
* a channel count, sample rate or block size that cannot be true is refused by name.

Format: Microsoft/IBM "Multimedia Programming Interface and Data Specifications 1.0", 1991,
RIFF WAVE chunk layout (from memory); WAVE_FORMAT_EXTENSIBLE sub-format code at byte 24.
"""

from __future__ import annotations

import os
import stat
import struct

import numpy as np

__all__ = [
    "MAX_SECONDS", "MAX_CHANNELS", "RATE_RANGE", "STREAMING", "RecordingError", "wav_info", "read_wav",
    "wav_bytes"
]

MAX_SECONDS = 600.0
"""Longest recording accepted [s]: a struck piece rings for seconds, not minutes."""
MAX_CHANNELS = 32
"""Most channels accepted [-] (a recorder has 1 or 2; interfaces up to a few dozen)."""
RATE_RANGE = (4000, 768000)
"""Sample rates accepted [Hz]."""
STREAMING = 0xFFFFFFFF
"""Data size a streaming recorder writes before it knows the length."""
_DTYPES = {(1, 16): "<i2", (1, 32): "<i4", (3, 32): "<f4", (3, 64): "<f8"}


class RecordingError(ValueError):
    """A recording cannot be used; the message says why, in one line."""


def _fmt(body):
    if len(body) < 16:
        raise RecordingError("the WAV format chunk is damaged (shorter than 16 bytes)")
    code, channels, rate, _byte_rate, block, bits = struct.unpack("<HHIIHH", body[:16])
    if code == 0xFFFE and len(body) >= 26:
        code = struct.unpack("<H", body[24:26])[0]
    if not 1 <= channels <= MAX_CHANNELS:
        raise RecordingError(f"the WAV header gives {channels} channels; a recording has 1 to {MAX_CHANNELS}")
    if not RATE_RANGE[0] <= rate <= RATE_RANGE[1]:
        raise RecordingError(f"the WAV header gives a sample rate of {rate} Hz; "
                             f"expected {RATE_RANGE[0]} to {RATE_RANGE[1]} Hz")
    if code == 1 and bits == 8:
        raise RecordingError("8-bit WAV is too coarse to measure pitch; record 16-bit or better")
    if not ((code == 1 and bits in (16, 24, 32)) or (code == 3 and bits in (32, 64))):
        raise RecordingError(f"unsupported WAV encoding (format {code}, {bits}-bit); use PCM 16/24/32-bit or float")
    if block != channels * bits // 8:
        raise RecordingError(f"the WAV block size {block} does not match {channels} channel(s) x {bits} bits; "
                             "the header is damaged")
    return code, channels, rate, block, bits


def wav_info(path):
    """(sample rate [Hz], channels, bits, format code, frames, data offset) from the RIFF header."""
    try:
        info = os.stat(path)
        if not stat.S_ISREG(info.st_mode):
            raise RecordingError("is not a regular file; give a WAV recording")
        size = info.st_size
        if size == 0:
            raise RecordingError("the file is empty")
        with open(path, "rb") as fh:
            head = fh.read(12)
            if len(head) < 12 or head[:4] not in (b"RIFF", b"RF64") or head[8:12] != b"WAVE":
                raise RecordingError("not a WAV file (no RIFF/WAVE header)")
            interrupted = struct.unpack("<I", head[4:8])[0] <= 12  # RIFF size never filled in
            fmt = None
            while True:
                chunk = fh.read(8)
                if len(chunk) < 8:
                    break
                cid, clen = chunk[:4], struct.unpack("<I", chunk[4:])[0]
                if cid == b"fmt ":
                    if clen > 1024:
                        raise RecordingError("the WAV format chunk is damaged (impossible size)")
                    fmt = _fmt(fh.read(clen))
                    fh.seek(clen % 2, 1)
                elif cid == b"data":
                    if fmt is None:
                        raise RecordingError("the WAV data comes before its format chunk")
                    code, channels, rate, block, bits = fmt
                    offset = fh.tell()
                    available = size - offset
                    if clen == STREAMING or (clen == 0 and interrupted):
                        clen = available  # length unknown when the header was written: to the end
                    elif clen // block / rate > MAX_SECONDS:
                        raise RecordingError(f"the recording is {clen // block / rate / 60:.0f} minutes long; "
                                             f"trim it to one strike (at most {MAX_SECONDS / 60:.0f} minutes)")
                    return rate, channels, bits, code, min(clen, available) // block, offset
                else:
                    fh.seek(clen + (clen % 2), 1)
    except OSError as exc:
        raise RecordingError(f"cannot be read ({exc.strerror})") from None
    raise RecordingError("no audio data in the WAV file" if fmt else "no format chunk in the WAV file")


def _decode(raw, code, bits, channels):
    if (code, bits) == (1, 24):
        b = np.frombuffer(raw, dtype=np.uint8).reshape(-1, 3).astype(np.int32)
        ints = b[:, 0] | (b[:, 1] << 8) | (b[:, 2] << 16)
        ints = np.where(ints >= 1 << 23, ints - (1 << 24), ints)
        data = ints.astype(np.float64) / float(1 << 23)
    else:
        data = np.frombuffer(raw, dtype=_DTYPES[(code, bits)]).astype(np.float64)
        if code == 1:
            data /= float(2 ** (bits - 1))
    data = data.reshape(-1, channels)
    if channels == 1:
        return data[:, 0]
    mixed = data.mean(axis=1)
    # channels in opposite phase (a microphone wired backwards) cancel in the mix: then take the
    # loudest channel alone rather than call the recording silent
    loudest = data[:, int(np.argmax(np.sum(data.astype(float) ** 2, axis=0)))]
    if np.sum(mixed.astype(float) ** 2) < 0.01 * np.sum(loudest.astype(float) ** 2):
        return loudest
    return mixed


def read_wav(path):
    """Mono samples as floats in [-1, 1] and the sample rate [Hz]."""
    rate, channels, bits, code, frames, offset = wav_info(path)
    if frames == 0:
        raise RecordingError("the recording has no samples")
    seconds = frames / rate
    if seconds > MAX_SECONDS:
        raise RecordingError(f"the recording is {seconds / 60:.0f} minutes long; trim it to one strike "
                             f"(at most {MAX_SECONDS / 60:.0f} minutes)")
    block = channels * bits // 8
    try:
        with open(path, "rb") as fh:
            fh.seek(offset)
            raw = fh.read(frames * block)
    except OSError as exc:
        raise RecordingError(f"cannot be read ({exc.strerror})") from None
    raw = raw[: len(raw) // block * block]
    if not raw:
        raise RecordingError("the recording has no samples")
    samples = _decode(raw, code, bits, channels)
    if not np.all(np.isfinite(samples)):
        raise RecordingError("the recording holds values that are not numbers (a damaged float WAV)")
    return samples, int(rate)


def wav_bytes(samples, rate):
    """16-bit PCM mono WAV as bytes (samples in [-1, 1])."""
    clipped = np.nan_to_num(np.clip(np.asarray(samples, dtype=np.float64), -1.0, 1.0))
    data = (clipped * 32767).round().astype("<i2").tobytes()
    rate = int(rate)
    header = struct.pack("<4sI4s4sIHHIIHH4sI", b"RIFF", 36 + len(data), b"WAVE", b"fmt ", 16, 1, 1,
                         rate, rate * 2, 2, 16, b"data", len(data))
    return header + data + (b"\0" if len(data) % 2 else b"")

"""WAV files: read PCM 16/24/32-bit and float (mono or stereo), write 16-bit PCM.

The header is checked before any samples are read, so that a file that is not a WAV, an 8-bit
file or a recording hours long is refused at once with one clear sentence.
"""

from __future__ import annotations

import os
import struct

import numpy as np

MAX_SECONDS = 600.0
"""Longest recording accepted [s]: a struck piece rings for seconds, not minutes."""


class RecordingError(ValueError):
    """A recording cannot be used; the message says why, in one line."""


def wav_info(path):
    """(sample rate [Hz], channels, bits, format code, frames) from the RIFF header."""
    try:
        size = os.path.getsize(path)
        with open(path, "rb") as fh:
            head = fh.read(12)
            if size == 0:
                raise RecordingError("the file is empty")
            if len(head) < 12 or head[:4] not in (b"RIFF", b"RF64") or head[8:12] != b"WAVE":
                raise RecordingError("not a WAV file (no RIFF/WAVE header)")
            fmt = None
            while True:
                chunk = fh.read(8)
                if len(chunk) < 8:
                    break
                cid, clen = chunk[:4], struct.unpack("<I", chunk[4:])[0]
                if cid == b"fmt ":
                    body = fh.read(clen)
                    if len(body) < 16:
                        raise RecordingError("the WAV format chunk is damaged")
                    code, channels, rate, _, block, bits = struct.unpack("<HHIIHH", body[:16])
                    if code == 0xFFFE and len(body) >= 26:
                        code = struct.unpack("<H", body[24:26])[0]
                    fmt = (code, channels, rate, block, bits)
                    if clen % 2:
                        fh.read(1)
                elif cid == b"data":
                    if fmt is None:
                        raise RecordingError("the WAV data comes before its format chunk")
                    code, channels, rate, block, bits = fmt
                    if rate <= 0 or channels <= 0 or block <= 0:
                        raise RecordingError("the WAV header is damaged")
                    return rate, channels, bits, code, clen // block
                else:
                    fh.seek(clen + (clen % 2), 1)
    except OSError as exc:
        raise RecordingError(f"cannot be read ({exc.strerror})") from None
    raise RecordingError("no audio data in the WAV file")


def read_wav(path):
    """Mono samples as floats in [-1, 1] and the sample rate [Hz]."""
    rate, channels, bits, code, frames = wav_info(path)
    if code == 1 and bits == 8:
        raise RecordingError("8-bit WAV is too coarse to measure pitch; record 16-bit or better")
    if not ((code == 1 and bits in (16, 24, 32)) or (code == 3 and bits in (32, 64))):
        raise RecordingError(f"unsupported WAV encoding (format {code}, {bits}-bit); use PCM 16/24/32-bit or float")
    seconds = frames / rate
    if seconds > MAX_SECONDS:
        raise RecordingError(f"the recording is {seconds / 60:.0f} minutes long; trim it to one strike "
                             f"(at most {MAX_SECONDS / 60:.0f} minutes)")
    from scipy.io import wavfile

    try:
        rate, data = wavfile.read(path)
    except (ValueError, OSError) as exc:
        raise RecordingError(f"the WAV file could not be decoded ({exc})") from None
    data = np.asarray(data)
    if data.ndim == 2:
        data = data.astype(np.float64).mean(axis=1)
    if data.dtype.kind == "i":
        full = float(2 ** (8 * data.dtype.itemsize - 1))
        samples = data.astype(np.float64) / full
    else:
        samples = data.astype(np.float64)
    if samples.size == 0:
        raise RecordingError("the recording has no samples")
    return samples, int(rate)


def wav_bytes(samples, rate):
    """16-bit PCM mono WAV as bytes (samples in [-1, 1])."""
    import io

    from scipy.io import wavfile

    clipped = np.clip(np.asarray(samples, dtype=np.float64), -1.0, 1.0)
    buf = io.BytesIO()
    wavfile.write(buf, int(rate), (clipped * 32767).round().astype(np.int16))
    return buf.getvalue()

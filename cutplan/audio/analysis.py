"""Find the partials of a struck piece in a recording and name its fundamental.

Method: the recording is made mono, its loudest stretch after the strike is taken, weighted
with a Hann window, zero-padded eight times and transformed; each spectral peak is located to
a fraction of a bin by fitting a parabola to the log magnitude of the three highest samples
(for a Hann-windowed sinusoid the log-magnitude peak is nearly parabolic).  The fundamental is
then chosen as the candidate whose predicted pattern of partials (free-free 1 : 2.756 : 5.404 :
8.933, with room for shear lowering the upper ones; odd harmonics for a closed column; all
harmonics for an open one) explains the most spectral energy, so a weak or missing fundamental
is still named right.

References
----------
.. [1] Smith, J. O., Spectral Audio Signal Processing, W3K Publishing, 2011, "Quadratic
   Interpolation of Spectral Peaks" (from memory for the section title).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from cutplan.audio.wav import RecordingError

PATTERNS = {
    # ratios of partials to the fundamental, and how far each may fall below its nominal value
    "chime": ((1.0, 2.7565, 5.4039, 8.9330, 13.3443), 0.25),
    "bar": ((1.0, 2.7565, 5.4039, 8.9330, 13.3443), 0.30),
    "tuned-bar": ((1.0, 4.0, 10.0), 0.04),
    "xylophone-bar": ((1.0, 3.0, 6.0), 0.04),
    "closed-open": ((1.0, 3.0, 5.0, 7.0, 9.0), 0.04),
    "open-open": ((1.0, 2.0, 3.0, 4.0, 5.0, 6.0), 0.04),
}
"""Partial patterns by kind: nominal ratios (Euler-Bernoulli free-free ratios 1 : 2.756 : 5.404 :
8.933, Fletcher & Rossing, The Physics of Musical Instruments, 2nd ed., 1998, ch. 2 (from memory
for the chapter); tuned bars 1:4:10 and 1:3:6, the same book's chapter on bars (from memory);
odd and all harmonics for closed and open air columns) and the
largest fractional drop allowed for the highest listed partial (shear lowers the upper free-free
partials of real pieces; common practice from our solver's range of pieces)."""

MIN_SECONDS = 0.05
"""Shortest recording measured [s]."""
PEAK_PROMINENCE_DB = 25.0
"""How far a partial must rise above the median spectral level [dB]; white noise peaks reach
about 12 dB, a ringing partial 40 dB or more."""
LOCAL_PROMINENCE_DB = 20.0
"""How far a partial must rise above the median level of its own third-octave band [dB]: a
click or a thump has a broad spectrum whose ripples stand out from the whole spectrum's median
but not from their neighbours (common practice for telling tones from transients)."""
MIN_FUNDAMENTAL_HZ = 20.0
"""Lowest fundamental reported [Hz]; anything lower is not a piece ringing."""


def _band_floor(mag, bin_hz, f_min):
    """Median level [dB] of the third-octave band each bin lies in."""
    floor = np.full(mag.size, np.inf)
    lo = f_min
    while lo < mag.size * bin_hz:
        a, b = int(lo / bin_hz), min(mag.size, int(lo * 2 ** (1 / 3) / bin_hz) + 1)
        if b > a:
            floor[a:b] = np.median(mag[a:b])
        lo *= 2 ** (1 / 3)
    return floor


@dataclass(frozen=True)
class Measurement:
    """What a recording says: fundamental [Hz], partials [Hz], confidence 0..1, kind pattern used."""

    fundamental_hz: float
    partials_hz: tuple
    confidence: float
    pattern: str
    fundamental_heard: bool


def _segment(samples, rate):
    """The part of the recording from just before the loudest moment, at most 8 s."""
    x = np.asarray(samples, dtype=np.float64)
    x = x - x.mean()
    if x.size < MIN_SECONDS * rate:
        raise RecordingError(f"the recording is {x.size / rate:.3f} s long; at least {MIN_SECONDS} s is needed")
    peak = float(np.max(np.abs(x)))
    if peak < 1e-4:
        raise RecordingError("the recording is silent; strike the piece nearer the microphone")
    clipped = np.mean(np.abs(x) > 0.999 * peak)
    if peak > 0.99 and clipped > 0.2:
        raise RecordingError("the recording is clipped throughout; record at a lower level")
    hop = max(1, int(0.01 * rate))
    energy = np.convolve(x * x, np.ones(hop), mode="same")
    start = max(0, int(np.argmax(energy)) - hop)
    end = min(x.size, start + int(8 * rate))
    seg = x[start:end]
    if seg.size < MIN_SECONDS * rate:
        seg = x[-int(MIN_SECONDS * rate):]
    return seg


def spectrum_peaks(samples, rate, max_peaks=16, f_min=20.0):
    """Spectral peaks [(frequency Hz, magnitude dB)] sorted by frequency, interpolated."""
    seg = _segment(samples, rate)
    n = seg.size
    size = 1 << int(math.ceil(math.log2(n * 8)))
    window = np.hanning(n)
    spec = np.abs(np.fft.rfft(seg * window, size))
    mag = 20 * np.log10(spec + 1e-300)
    floor = float(np.median(mag[(np.arange(mag.size) * rate / size) > f_min]))
    bin_hz = rate / size
    lo = max(1, int(f_min / bin_hz))
    local = (mag[lo:-1] > mag[lo - 1:-2]) & (mag[lo:-1] >= mag[lo + 1:])
    idx = np.flatnonzero(local) + lo
    idx = idx[mag[idx] > floor + PEAK_PROMINENCE_DB]
    idx = idx[mag[idx] > _band_floor(mag, bin_hz, f_min)[idx] + LOCAL_PROMINENCE_DB]
    if idx.size == 0:
        raise RecordingError("no clear partials: the recording sounds like noise or hum, not a ringing piece")
    # keep the strongest, at least 1/3 semitone apart (zero padding gives many small side maxima)
    order = idx[np.argsort(-mag[idx])]
    kept = []
    for i in order:
        f = i * bin_hz
        if all(abs(math.log2(f / (k * bin_hz))) > 1 / 36 for k in kept):
            kept.append(i)
        if len(kept) >= max_peaks:
            break
    peaks = []
    for i in kept:
        a, b, c = mag[i - 1], mag[i], mag[i + 1]
        denom = a - 2 * b + c
        delta = 0.5 * (a - c) / denom if denom != 0 else 0.0
        peaks.append(((i + delta) * bin_hz, b - 0.25 * (a - c) * delta))
    top = max(m for _, m in peaks)
    peaks = [(f, m) for f, m in peaks if m > top - 60]
    return sorted(peaks), floor


def _score(candidate, peaks, ratios, drop):
    """Energy-weighted share of the peaks explained by the pattern on ``candidate``."""
    weights = [10 ** (m / 20) for _, m in peaks]
    total = sum(weights)
    explained, matched = 0.0, []
    for k, r in enumerate(ratios):
        allowed = drop * (k / (len(ratios) - 1)) if len(ratios) > 1 else 0
        lo, hi = candidate * r * (1 - allowed - 0.015), candidate * r * 1.015
        hits = [(w, f) for (f, _), w in zip(peaks, weights, strict=True) if lo <= f <= hi]
        if hits:
            w, f = max(hits)
            explained += w
            matched.append((k, f))
    return explained / total, matched


def identify(peaks, kind="chime", near=None, ratios=None):
    """Choose the fundamental from the peaks for a kind's pattern; returns a Measurement.

    ``ratios``, if given, are the partial ratios expected for this very piece (for instance the
    planned partials of a cut piece); they replace the kind's nominal pattern, so that a missing
    fundamental is estimated from the right ratio.
    """
    if ratios is not None:
        return _identify(peaks, ["planned"], {"planned": (tuple(ratios), 0.03)}, near)
    names = {"chime": ["chime"], "bar": ["bar", "tuned-bar", "xylophone-bar"],
             "air-column": ["open-open", "closed-open"], "open-open": ["open-open"],
             "closed-open": ["closed-open"], "resonator": ["closed-open"]}.get(kind, [kind])
    return _identify(peaks, names, PATTERNS, near)


def _identify(peaks, names, patterns, near):
    best = None
    for name in names:
        ratios, drop = patterns[name]
        cands = set()
        for f, _ in peaks:
            for k, r in enumerate(ratios[:4]):
                allowed = drop * (k / (len(ratios) - 1)) if len(ratios) > 1 else 0
                for shrink in (0.0, allowed / 2, allowed):
                    cands.add(f / (r * (1 - shrink)))
        for cand in sorted(cands):
            if near is not None and abs(math.log2(cand / near)) > 0.5:
                continue
            share, matched = _score(cand, peaks, ratios, drop)
            heard = any(k == 0 for k, _ in matched)
            count = len(matched)
            # prefer: more energy explained, more partials matched, a heard fundamental, lower f
            key = (round(share, 3), count, heard, -cand)
            if count >= (1 if len(peaks) == 1 else 2) or (heard and len(peaks) == 1):
                if best is None or key > best[0]:
                    best = (key, cand, matched, name, share)
    if best is None:
        # a single clean peak (or nothing fits the pattern): call the strongest peak the fundamental
        usable = [p for p in peaks if near is None or abs(math.log2(p[0] / near)) <= 0.5]
        if not usable:
            raise RecordingError(f"no partial within half an octave of {near:.1f} Hz (--near); "
                                 "is this the right piece and note?")
        f, _ = max(usable, key=lambda p: p[1])
        return Measurement(float(f), tuple(float(p[0]) for p in peaks), 0.3, names[0], True)
    _, cand, matched, name, share = best
    exact = [f for k, f in matched if k == 0]
    ratios = patterns[name][0]
    if exact:
        fundamental = exact[0]
        heard = True
    else:
        # estimate from the lowest matched partial, using the measured ratio pattern's nominal value
        k, f = min(matched)
        fundamental = f / ratios[k]
        heard = False
    if fundamental < MIN_FUNDAMENTAL_HZ or (near is not None and abs(math.log2(fundamental / near)) > 0.5):
        where = f"within half an octave of {near:.1f} Hz" if near is not None else f"above {MIN_FUNDAMENTAL_HZ:g} Hz"
        raise RecordingError(f"no tonal fundamental {where}: the recording sounds like a click or thump; "
                             "strike the piece and let it ring")
    confidence = max(0.0, min(1.0, share * (len(matched) / min(len(ratios), 4)) ** 0.5 * (1.0 if heard else 0.7)))
    return Measurement(float(fundamental), tuple(float(f) for _, f in sorted(matched)),
                       round(float(confidence), 2), name, heard)


def measure(samples, rate, kind="chime", near=None, ratios=None):
    """Fundamental and partials of a struck piece from its samples (see :func:`identify`).

    Numeric warnings stay inside; a recording with no tonal peak, or none near ``near`` [Hz],
    raises :class:`RecordingError`.
    """
    from cutplan.numeric import quiet

    peaks, _floor = quiet(spectrum_peaks, samples, rate)
    return quiet(identify, peaks, kind, near, ratios)

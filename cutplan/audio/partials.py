"""Find every strong partial of a struck piece in a recording: frequency, level and decay time.

Method
------
1. The recording is made mono and cut from just before its loudest moment (the strike), at most
   :data:`MAX_SECONDS` long.
2. Spectra of stretches 1/8 s, 1/4 s, ... up to the whole cut, each from the strike, weighted with
   the four-term Blackman-Harris window and zero-padded to at least :data:`PAD` times their length.
   That window's highest side lobe is 92 dB down [1]_, so a steady tone shows one peak, never a
   row of side lobes; a fast-decaying partial shows in the short stretches, a slow one is resolved
   in the long ones.  A peak counts when it is the highest point within the window's main-lobe
   half-width (4 bins [1]_) and stands :data:`PROMINENCE_DB` above the median of its third-octave
   band (a click's broad spectrum has ripples, not peaks).
3. Each candidate is followed in time by demodulating at its frequency (a sliding windowed
   one-bin transform, frames short enough to separate it from its neighbours): the log-amplitude
   envelope falls along a straight line for an exponentially decaying partial, whose slope gives
   the decay time and whose value at the strike gives the partial's level.
4. Partials within :data:`STRONG_DB` of the strongest, ringing at least :data:`MIN_DECAY_S`, are
   kept; a line of mains hum (at a harmonic of 50 or 60 Hz, there before the strike and as loud
   at the end; :mod:`cutplan.audio.hum`) is left out and reported apart.  Each frequency is read from the spectrum whose length best suits its decay (about
   2.5 decay times, long enough to separate it from its neighbours), to a fraction of a bin by a
   parabola through the log magnitude of the three highest samples [2]_.  The decay does not bias
   the peak: the spectrum of a real window times a decaying exponential is still symmetric about
   the tone's frequency.

References
----------
.. [1] Harris, F. J., "On the use of windows for harmonic analysis with the discrete Fourier
   transform", Proc. IEEE 66(1), 51-83, 1978: four-term Blackman-Harris window, coefficients
   0.35875, 0.48829, 0.14128, 0.01168, highest side lobe -92 dB, main lobe half-width 4 bins.
.. [2] Smith, J. O. and Serra, X., "PARSHL: an analysis/synthesis program for non-harmonic sounds
   based on a sinusoidal representation", Proc. ICMC 1987 (quadratic interpolation of the
   log-magnitude peak; from memory).
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass

# scipy.fft and scipy.ndimage are imported where used: a chime plan (0.72 s CPU) never needs them; at the top they add 0.20 s (measured)
import numpy as np

from cutplan.audio.hum import hum_lines, is_hum
from cutplan.audio.wav import RecordingError

__all__ = [
    "MIN_SECONDS", "MAX_SECONDS", "DROPOUT_SAMPLES", "PAD", "PROMINENCE_DB", "STRONG_DB", "MIN_DECAY_S", "AUDIBLE_HZ", "BH4",
    "MAIN_LOBE_BINS", "Partial", "blackman_harris", "strike_segment", "find_partials"
]

MIN_SECONDS = 0.05
"""Shortest recording measured [s]."""
MAX_SECONDS = 8.0
"""Longest stretch after the strike that is analysed [s]."""
DROPOUT_SAMPLES = 64
"""Exact zeros in a row that make a gap in a recording [samples]: a recorder or browser that fell
behind fills the frames it missed with digital silence, which no microphone's noise floor gives
for so long amid a ringing tone (common practice); the partials are read from the longest stretch
between such gaps."""
PAD = 8
"""Least zero-padding factor of each spectrum [-] (the parabola's bias falls fast with it)."""
PROMINENCE_DB = 20.0
"""How far a peak must rise above the median of its third-octave band [dB]: the peaks of white
noise reach about 12 dB, a ringing partial 40 dB or more (common practice)."""
STRONG_DB = 30.0
"""Partials this far below the strongest (level at the strike) are listed [dB]."""
MIN_DECAY_S = 0.02
"""A partial must ring at least this long (amplitude time constant) to be a tone, not a click [s]
(common practice: a tone needs a few tens of periods to be heard as pitched)."""
AUDIBLE_HZ = (20.0, 20000.0)
"""The audible band searched [Hz] (common practice)."""
BH4 = (0.35875, 0.48829, 0.14128, 0.01168)
"""Four-term Blackman-Harris window coefficients, Harris 1978 (see [1] above)."""
MAIN_LOBE_BINS = 4.0
"""Main-lobe half-width of that window [bins], Harris 1978."""
HUM_MATCH_HZ = 1.0
"""A candidate this close to a hum line found before the strike is that line [Hz] (the line is
read there from a stretch as short as 0.2 s, to about a third of a hertz)."""


@dataclass(frozen=True)
class Partial:
    """One partial: frequency [Hz], level at the strike relative to the strongest partial [dB],
    decay time [s] (amplitude falls by 1/e; None when it rings longer than the recording shows)."""

    hz: float
    level_db: float
    decay_s: float | None


def blackman_harris(n):
    """Four-term Blackman-Harris window of ``n`` samples (Harris 1978, periodic form).

    The coefficients sum to 1 at the centre:

    >>> float(blackman_harris(8)[4])
    1.0
    """
    k = 2 * np.pi * np.arange(n) / n
    a0, a1, a2, a3 = BH4
    return a0 - a1 * np.cos(k) + a2 * np.cos(2 * k) - a3 * np.cos(3 * k)


@functools.lru_cache(maxsize=32)
def _window(n):
    """:func:`blackman_harris` of ``n`` samples, made once per length and shared read-only (the
    spectra of recordings at one rate use the same lengths, 1/8 s, 1/4 s, ...)."""
    w = blackman_harris(n)
    w.flags.writeable = False
    return w


def strike_segment(samples, rate):
    """The samples from just before the loudest moment on, at most :data:`MAX_SECONDS`, mean removed."""
    return _strike(samples, rate)[2]


def _strike(samples, rate):
    """(the whole recording mean removed, the sample the strike segment starts at, the segment)."""
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
    first, end = _clean_stretch(np.asarray(samples), x.size)
    energy = np.convolve(x[first:end] * x[first:end], np.ones(hop), mode="same")
    start = first + max(0, int(np.argmax(energy)) - hop)
    seg = x[start:min(end, start + int(MAX_SECONDS * rate))]
    if seg.size < MIN_SECONDS * rate:
        start = x.size - int(MIN_SECONDS * rate)
        seg = x[start:]
    return x, start, seg


def _clean_stretch(raw, size):
    """(first, end) sample of the longest stretch of the recording with no dropout inside it: a
    run of :data:`DROPOUT_SAMPLES` or more exact zeros between sounding samples is a gap in the
    capture, not sound, and a spectrum across it would be smeared.  The whole recording when it
    has none (silence before the strike or after the ring is no gap)."""
    zero = np.flatnonzero(raw.ravel() == 0)
    if zero.size < DROPOUT_SAMPLES:
        return 0, size
    breaks = np.flatnonzero(np.diff(zero) != 1)
    runs = zip(np.r_[zero[0], zero[breaks + 1]], np.r_[zero[breaks], zero[-1]] + 1, strict=True)
    gaps = [(a, b) for a, b in runs if b - a >= DROPOUT_SAMPLES and a > 0 and b < size]
    if not gaps:
        return 0, size
    edges = [0] + [e for gap in gaps for e in gap] + [size]
    stretches = list(zip(edges[::2], edges[1::2], strict=True))
    return max(stretches, key=lambda se: se[1] - se[0])


def _band_floor(mag, bin_hz, f_min, lobe_hz):
    """Median level [dB] of the third-octave band each bin lies in, the band widened to at least
    ten main-lobe widths so that one peak never fills it."""
    floor = np.full(mag.size, np.inf)
    lo = f_min
    while lo < mag.size * bin_hz:
        hi = lo * 2 ** (1 / 3)
        extra = max(0.0, 5 * lobe_hz - (hi - lo) / 2)
        a, b = int(lo / bin_hz), min(mag.size, int(hi / bin_hz) + 1)
        wa, wb = max(0, int((lo - extra) / bin_hz)), min(mag.size, int((hi + extra) / bin_hz) + 1)
        if b > a:
            floor[a:b] = np.median(mag[wa:wb])
        lo = hi
    return floor


@dataclass(frozen=True)
class _Spectrum:
    seconds: float
    bin_hz: float
    mag_db: np.ndarray
    lobe_hz: float
    floor_db: np.ndarray

    def peak_near(self, f, within):
        """Interpolated (frequency, dB) of the highest sample within ``within`` Hz of ``f``."""
        a = max(1, int((f - within) / self.bin_hz))
        b = min(self.mag_db.size - 1, int((f + within) / self.bin_hz) + 1)
        if b <= a:
            return None
        i = a + int(np.argmax(self.mag_db[a:b]))
        if i in (a, b - 1) and b - a > 2:
            return None  # still rising at the edge: not a peak of this partial
        if self.mag_db[i] < self.floor_db[i] + PROMINENCE_DB:
            return None  # the partial does not stand out in this stretch (it starts later, or is gone)
        return self._interpolate(i)

    def _interpolate(self, i):
        a, b, c = self.mag_db[i - 1], self.mag_db[i], self.mag_db[i + 1]
        denom = a - 2 * b + c
        delta = 0.5 * (a - c) / denom if denom < 0 else 0.0
        return (i + delta) * self.bin_hz, b - 0.25 * (a - c) * delta


def _spectrum(seg, rate, n):
    from scipy.fft import next_fast_len, rfft  # here: scipy.fft and .ndimage add 0.32 s CPU to start-up (measured)

    size = next_fast_len(PAD * n, real=True)
    padded = np.zeros(size)  # the windowed stretch, zero-padded: the transform need not copy it again
    np.multiply(seg[:n], _window(n), out=padded[:n])
    mag = np.abs(rfft(padded, overwrite_x=True))
    mag += 1e-300  # 20 log10(|X| + 1e-300), in place: these arrays are megabytes long
    np.log10(mag, out=mag)
    mag *= 20
    lobe = MAIN_LOBE_BINS * rate / n
    return _Spectrum(n / rate, rate / size, mag, lobe, _band_floor(mag, rate / size, AUDIBLE_HZ[0], lobe))


def _peaks(sp, f_lo, f_hi):
    """Interpolated peak frequencies [Hz] of one spectrum that count as partial candidates."""
    from scipy.ndimage import maximum_filter1d

    span = max(3, int(2 * sp.lobe_hz / sp.bin_hz) | 1)
    lo, hi = max(1, int(f_lo / sp.bin_hz)), min(sp.mag_db.size - 1, int(f_hi / sp.bin_hz))
    mag = sp.mag_db
    top = maximum_filter1d(mag, span, mode="nearest")
    idx = np.flatnonzero((mag[lo:hi] >= top[lo:hi]) & (mag[lo:hi] > mag[lo - 1:hi - 1])) + lo
    if idx.size == 0:
        return []
    idx = idx[mag[idx] > sp.floor_db[idx] + PROMINENCE_DB]
    idx = idx[mag[idx] > mag[idx].max() - STRONG_DB - 20] if idx.size else idx
    return [sp._interpolate(int(i))[0] for i in idx]


def _envelope(seg, rate, f, neighbour_hz):
    """(times [s], amplitude [dB re full scale]) of the partial at ``f``: a sliding windowed one-bin
    transform whose frames are long enough to keep the nearest other partial (``neighbour_hz``
    away) outside the window's main lobe."""
    frame_s = min(0.25, max(0.01, 1.5 * MAIN_LOBE_BINS / neighbour_hz))
    m = min(seg.size, int(frame_s * rate))
    hop = max(1, m // 4)
    w = _window(m)
    kernel = w * np.exp(-2j * np.pi * f * np.arange(m) / rate) * (2 / w.sum())
    frames = np.lib.stride_tricks.sliding_window_view(seg, m)[::hop]
    amp = np.abs(frames @ kernel)
    times = (np.arange(amp.size) * hop + m / 2) / rate
    return times, 20 * np.log10(amp + 1e-300)


def _decay(times, env_db):
    """(decay time [s] or None, level at the strike [dB]) from an envelope."""
    top = int(np.argmax(env_db))
    peak = env_db[top]
    tail = float(np.median(env_db[-max(1, env_db.size // 10):]))
    floor = max(peak - 40.0, tail + 6.0) if tail < peak - 20.0 else peak - 40.0
    stop = top
    while stop + 1 < env_db.size and env_db[stop + 1] > floor:
        stop += 1
    if stop - top < 3:
        return (0.0 if tail < peak - 20.0 else None), peak
    t, e = times[top:stop + 1], env_db[top:stop + 1]
    slope, intercept = np.polyfit(t, e, 1)
    span = t[-1] - t[0]
    if slope >= 0 or -slope * span < 1.0:
        return None, peak  # less than 1 dB over what the recording shows: rings on
    return float(-20 / math.log(10) / slope), float(min(intercept, peak + 6.0))


def find_partials(samples, rate):
    """Every strong partial of a struck piece, sorted by frequency (see the module's Method).

    Raises RecordingError when nothing rings (silence, noise, a click, a clipped square).
    """
    return find_partials_and_hum(samples, rate)[0]


def find_partials_and_hum(samples, rate):
    """(every strong partial as :func:`find_partials` finds them, the frequencies [Hz] of the mains
    hum lines left out of them)."""
    x, start, seg = _strike(samples, rate)
    hum = hum_lines(x, rate, start)
    f_lo, f_hi = AUDIBLE_HZ[0], min(AUDIBLE_HZ[1], 0.45 * rate)
    lengths, n = [], int(rate / 8)
    while n < seg.size:
        lengths.append(n)
        n *= 2
    lengths.append(seg.size)
    spectra = [_spectrum(seg, rate, n) for n in lengths]
    cands = []
    for sp in reversed(spectra):  # longest first: the finest resolution wins
        for f in _peaks(sp, f_lo, f_hi):
            if all(abs(f - g) > sp.lobe_hz for g in cands):
                cands.append(f)
    cands.sort()
    found, dropped = [], []
    for k, f in enumerate(cands):
        others = [abs(f - g) for j, g in enumerate(cands) if j != k] + [2 * f]
        d = min(others)
        times, env = _envelope(seg, rate, f, d)
        tau, level = _decay(times, env)
        if tau is not None and tau < MIN_DECAY_S:
            continue
        if tau is None and is_hum(f, hum, max(spectra[-1].lobe_hz, HUM_MATCH_HZ)):
            dropped.append((f, level))  # steady mains hum, not a partial of the piece
            continue
        found.append((f, level, tau, d))
    if not found:
        raise RecordingError("no clear partials: the recording sounds like noise, hum or a click, not a ringing "
                             "piece; strike the piece and let it ring")
    strongest = max(level for _, level, _, _ in found)
    out = []
    for f, level, tau, d in found:
        if level < strongest - STRONG_DB:
            continue
        out.append(Partial(_refine(spectra, f, tau, d), round(float(level - strongest), 1), tau))
    return tuple(out), tuple(float(f) for f, level in dropped if level >= strongest - STRONG_DB)


def _refine(spectra, f, tau, neighbour_hz):
    """The frequency read from the spectrum that best suits a partial's decay and neighbours."""
    want = 2.5 * tau if tau else math.inf
    usable = [sp for sp in spectra if 2 * sp.lobe_hz < neighbour_hz] or spectra[-1:]
    usable.sort(key=lambda sp: abs(math.log(sp.seconds / want)) if want < math.inf else -sp.seconds)
    for sp in usable:
        got = sp.peak_near(f, sp.lobe_hz)
        if got:
            return float(got[0])
    return float(f)

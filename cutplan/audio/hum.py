"""Mains hum in a bench recording: steady lines at 50 or 60 Hz and their harmonics.

A recorder near mains wiring, a charger or a lamp picks up the supply frequency and its
harmonics.  They are there before the piece is struck and stay, at one level, to the end of the
recording; a struck piece's partials start at the strike and die away.  So a line counts as hum
when

1. it lies within :data:`MAINS_TOLERANCE` of a harmonic of 50 Hz or 60 Hz (:data:`MAINS_HZ`),
2. it stands out in the stretch before the strike (the recording must hold at least
   :data:`MIN_PREROLL_S` of it), and
3. it is as loud in the last stretch of the recording as before the strike, within
   :data:`STEADY_DB` (it neither starts with the strike nor decays).

The partial finder leaves such lines out, and the measurement names them in a note.  A line that
fails 2 or 3, such as a partial that happens to sit on 100 Hz, stays a partial.
"""

from __future__ import annotations

import numpy as np

__all__ = ["MAINS_HZ", "MAINS_TOLERANCE", "HARMONICS", "MIN_PREROLL_S", "STEADY_DB", "PROMINENCE_DB", "hum_lines", "is_hum",
           "hum_note"]

MAINS_HZ = (50.0, 60.0)
"""Nominal supply frequencies [Hz] (IEC 60038, IEC standard voltages: 50 Hz and 60 Hz systems;
from memory)."""
MAINS_TOLERANCE = 0.01
"""How far the supply may stray from nominal, as a fraction [-] (EN 50160: 50 Hz +/- 1 % for
99.5 % of a year on interconnected systems; from memory)."""
HARMONICS = 25
"""Harmonics of the supply looked at [-] (EN 50160 sets limits up to the 25th; from memory)."""
MIN_PREROLL_S = 0.2
"""Least recording before the strike in which hum can be seen [s] (a window that long resolves
lines 50 Hz apart: the Blackman-Harris main lobe is 4 bins = 20 Hz half-width; Harris 1978)."""
STEADY_DB = 3.0
"""Largest change in a hum line's level between before the strike and the end [dB]: a partial
that rang on unchanged through the recording would still be heard starting at the strike
(common practice)."""
PROMINENCE_DB = 20.0
"""How far a hum line must stand above the median level around it [dB] (as for partials)."""
BH4 = (0.35875, 0.48829, 0.14128, 0.01168)
"""Four-term Blackman-Harris window coefficients (Harris, Proc. IEEE 66(1), 1978)."""


def _levels(x, rate):
    """(bin width [Hz], magnitude [dB]) of a Blackman-Harris-windowed, 8x zero-padded spectrum."""
    n = x.size
    k = 2 * np.pi * np.arange(n) / n
    a0, a1, a2, a3 = BH4
    w = a0 - a1 * np.cos(k) + a2 * np.cos(2 * k) - a3 * np.cos(3 * k)
    size = 8 * n
    mag = np.abs(np.fft.rfft(x * w, size)) * 2 / w.sum()
    return rate / size, 20 * np.log10(mag + 1e-300)


def _line(bin_hz, mag_db, f, lobe_hz):
    """(frequency [Hz], level [dB]) of the highest point within the supply's tolerance of ``f``
    when it stands :data:`PROMINENCE_DB` above the median of the ten main lobes around it, else None."""
    half = max(MAINS_TOLERANCE * f, bin_hz)
    a, b = int((f - half) / bin_hz), int((f + half) / bin_hz) + 2
    if a < 1 or b >= mag_db.size:
        return None
    i = a + int(np.argmax(mag_db[a:b]))
    wa, wb = max(0, int((f - 10 * lobe_hz) / bin_hz)), min(mag_db.size, int((f + 10 * lobe_hz) / bin_hz))
    if mag_db[i] < np.median(mag_db[wa:wb]) + PROMINENCE_DB:
        return None
    return i * bin_hz, float(mag_db[i])


def hum_lines(x, rate, strike):
    """Frequencies [Hz] of the mains-hum lines in the recording ``x`` (mono, mean removed) whose
    strike begins at sample ``strike``: at a supply harmonic, there before the strike and as loud
    at the end (see the module's list).  Empty when the recording starts too close to the strike.

    Examples
    --------
    Half a second of 50 Hz hum with its second harmonic, then the same hum to the end:

    >>> t = np.arange(44100) / 44100
    >>> hum = 0.1 * np.sin(2 * np.pi * 50 * t) + 0.05 * np.sin(2 * np.pi * 100 * t)
    >>> [round(f) for f in hum_lines(hum, 44100, 22050)]
    [50, 100]
    """
    guard = int(0.01 * rate)
    pre = x[:max(0, strike - guard)]
    if pre.size < MIN_PREROLL_S * rate:
        return ()
    n = min(pre.size, int(rate), x.size - strike)
    if n < MIN_PREROLL_S * rate:
        return ()
    before, end = _levels(pre[-n:], rate), _levels(x[-n:], rate)
    lobe_hz = 4.0 * rate / n
    found = []
    for mains in MAINS_HZ:
        for k in range(1, HARMONICS + 1):
            f = k * mains
            if f > 0.45 * rate or any(abs(f - g) < 2 * lobe_hz for g in found):
                continue
            a, b = _line(*before, f, lobe_hz), _line(*end, f, lobe_hz)
            if a is not None and b is not None and abs(a[1] - b[1]) <= STEADY_DB:
                found.append(a[0])
    return tuple(sorted(found))


def is_hum(f, lines, lobe_hz):
    """Whether a candidate partial at ``f`` [Hz] is one of the hum ``lines`` (within a main lobe)."""
    return any(abs(f - h) <= lobe_hz for h in lines)


def _supply(lines):
    """The supply frequency [Hz] that explains most of the hum lines (50 Hz on a tie)."""
    def explained(mains):
        return sum(abs(h - round(h / mains) * mains) <= MAINS_TOLERANCE * h for h in lines)

    return max(MAINS_HZ, key=lambda m: (explained(m), -m))


def hum_note(lines):
    """The note a measurement carries when hum was left out.

    >>> hum_note((60.0, 120.0)).split(":")[0]
    'mains hum (60 Hz supply) left out of the partials'
    """
    mains = _supply(lines)
    listed = ", ".join(f"{h:.0f}" for h in lines)
    return (f"mains hum ({mains:.0f} Hz supply) left out of the partials: steady lines at {listed} Hz, there before "
            "the strike and not dying away; record away from mains leads, chargers and lamps, or on battery")

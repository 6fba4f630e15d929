"""Synthesize struck-piece previews (and test recordings) from computed partials.

Each partial is a decaying sine.  For chimes and bars the amplitude of mode n is the free-free
mode shape at the strike point (a mode with a node there is not excited) over sqrt(n) for a
soft mallet; higher partials decay faster (decay time inversely proportional to frequency, a
common simplification for metal tubes).  Air columns get 1/n harmonics.
"""

from __future__ import annotations

import numpy as np

from cutplan.physics.beam import mode_shape

__all__ = ["RATE", "tone", "piece_amplitudes", "piece_preview", "arpeggio"]

RATE = 44100
"""Sample rate of previews [Hz]."""


def tone(partials_hz, amplitudes, decays_s, seconds, rate=RATE, phases=None):
    """Sum of exponentially decaying sines [-1..1 before normalising]."""
    t = np.arange(int(seconds * rate)) / rate
    out = np.zeros_like(t)
    phases = phases if phases is not None else [0.0] * len(partials_hz)
    for f, a, tau, ph in zip(partials_hz, amplitudes, decays_s, phases, strict=True):
        if f < rate / 2:
            out += a * np.exp(-t / tau) * np.sin(2 * np.pi * f * t + ph)
    attack = np.minimum(1.0, t / 0.002)
    return out * attack


def piece_amplitudes(piece, strike_at=0.1):
    """Relative amplitude of each partial of a piece struck at ``strike_at`` x length from the end."""
    n = len(piece.partials_hz)
    if piece.kind in ("chime", "bar"):
        return [abs(float(mode_shape(k + 1, strike_at))) / np.sqrt(k + 1) / 2 for k in range(n)]
    return [1.0 / (k + 1) for k in range(n)]


def piece_preview(piece, seconds=3.0, rate=RATE, strike_at=0.1, decay_s=2.5):
    """Samples of one piece ringing after a strike, normalised to 0.8 peak."""
    amps = piece_amplitudes(piece, strike_at)
    f1 = piece.partials_hz[0]
    decays = [decay_s * f1 / f for f in piece.partials_hz]
    x = tone(piece.partials_hz, amps, decays, seconds, rate)
    peak = np.max(np.abs(x)) or 1.0
    return 0.8 * x / peak


def arpeggio(pieces, step_s=0.6, ring_s=3.0, rate=RATE, strike_at=0.1):
    """The set struck one after another, each left ringing."""
    total = int((step_s * max(len(pieces) - 1, 0) + ring_s) * rate)
    out = np.zeros(total)
    for k, p in enumerate(pieces):
        x = piece_preview(p, ring_s, rate, strike_at)
        start = min(int(k * step_s * rate), out.size)
        end = min(start + x.size, out.size)  # k * step_s * rate rounds either way: never one sample over
        out[start:end] += x[:end - start]
    peak = np.max(np.abs(out)) or 1.0
    return 0.8 * out / peak


def mains_hum(seconds, mains_hz=50.0, amplitudes=(1.0, 0.5, 0.25), rate=RATE):
    """A steady mains hum: sines at ``mains_hz`` and its harmonics (amplitudes of the 1st, 2nd,
    ... harmonic), unchanging from the first sample to the last, as a recorder picks it up from
    nearby wiring [-]."""
    t = np.arange(int(seconds * rate)) / rate
    out = np.zeros_like(t)
    for k, a in enumerate(amplitudes, start=1):
        out += a * np.sin(2 * np.pi * k * mains_hz * t + 0.7 * k)
    return out

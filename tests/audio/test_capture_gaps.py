"""A capture that fell behind: the page's microphone recording on a busy machine holds runs of
digital silence where the browser missed frames (seen in headless Chromium beside two busy loops:
a 1,400-1,800 sample gap 60 ms after the strike).  The pitch read from it must be the tone's own,
as on a quiet machine.  Oracle: the synthesized tone's frequency (the input itself)."""

import math
from functools import cache

import numpy as np
import pytest

from cutplan.audio.analysis import measure
from tests.audio.test_measure import RATE, recording

F1 = 581.46  # the tone's fundamental [Hz] (invented; the input the reading is checked against)


def _gapped(x, at, gap, lead=1300):
    """``x`` as a browser that fell behind delivers it: silence before the device starts, and a run
    of zeros inserted at ``at`` (no sample lost, the rest arrives late), cut to the same length."""
    y = np.concatenate([np.zeros(lead), x[:at], np.zeros(gap), x[at:]])[: x.size]
    return np.round(y * 32767) / 32767  # the page's 16-bit WAV


@cache
def _clean():
    """(the tone, its fundamental as read from the whole 16-bit capture), made and read once for
    every gap below (the tone is read-only; ``_gapped`` copies it)."""
    x = recording(F1, 3.0)
    x.flags.writeable = False
    return x, measure(np.round(x * 32767) / 32767, RATE).fundamental_hz


@pytest.mark.parametrize("at, gap", [(2700, 1600), (2700, 4096), (20000, 1400), (60000, 300)])
def test_a_gap_in_the_capture_does_not_move_the_pitch(at, gap):
    x, whole = _clean()
    gapped = measure(_gapped(x, at, gap), RATE).fundamental_hz
    # the analyser's own promise for a clean recording (tests/audio/test_measure.py): 0.5 cent
    assert abs(1200 * math.log2(gapped / F1)) < 0.5
    assert abs(1200 * math.log2(gapped / whole)) < 0.5


def test_silence_before_and_after_the_ring_is_no_gap():
    x = recording(F1, 2.0)
    padded = np.concatenate([np.zeros(5000), x, np.zeros(20000)])
    assert abs(1200 * math.log2(measure(padded, RATE).fundamental_hz / F1)) < 0.5

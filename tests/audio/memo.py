"""One analysis per distinct recording within a test module.

Some modules hand the analyser the very same samples again and again: the fuzz test's damaged WAVs
that still hold a ringing tone (most of them hold one of three), one recording measured with and
without ``--near``, a recording with hum read by ``measure`` and by ``find_partials``.  The
analysis (:func:`cutplan.audio.partials.find_partials_and_hum`) is a function of the samples and
the rate alone, so within :func:`analyses_remembered` it runs once per distinct (samples, rate)
and later calls get what that run gave: the same partials and hum lines, or the same
:class:`~cutplan.audio.wav.RecordingError` message.  Everything around it (reading the WAV,
naming the fundamental, the command line's wording and exit code) still runs on every call.
"""

from __future__ import annotations

import contextlib
import hashlib

import numpy as np
import pytest

from cutplan.audio import analysis, partials
from cutplan.audio.wav import RecordingError

__all__ = ["analyses_remembered"]


@contextlib.contextmanager
def analyses_remembered():
    """Within the block, :func:`~cutplan.audio.partials.find_partials_and_hum` (as the analyser
    and ``find_partials`` call it) analyses each distinct recording once."""
    real = partials.find_partials_and_hum
    kept: dict[tuple, tuple] = {}

    def remembered(samples, rate):
        x = np.ascontiguousarray(samples)
        key = (x.dtype.str, x.shape, rate, hashlib.blake2b(x.tobytes(), digest_size=32).digest())
        if key not in kept:
            try:
                kept[key] = (real(samples, rate), None)
            except RecordingError as exc:
                kept[key] = (None, exc.args)
        found, refused = kept[key]
        if refused is not None:
            raise RecordingError(*refused)
        return found

    with pytest.MonkeyPatch.context() as patch:
        patch.setattr(partials, "find_partials_and_hum", remembered)
        patch.setattr(analysis, "find_partials_and_hum", remembered)
        yield

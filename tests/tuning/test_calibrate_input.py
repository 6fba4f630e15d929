"""calibrate refuses what is not a measurement before any fit meets it, and no library warning,
traceback or folded line reaches the user: an infinite or absurd frequency, a vanishing length,
a thump instead of a ringing strike, two resonance depths that no air could give.

Oracles: the speed of sound in air, 331.3 sqrt(T / 273.15 K) m/s (ideal gas; Kinsler, Frey,
Coppens and Sanders, "Fundamentals of Acoustics", 4th ed., 2000, eq. 5.6.8), which bounds what
two resonance depths may give; a 96 kHz recording holds nothing above 48 kHz (Nyquist).
Warnings are errors in this suite, so a leaked numpy warning fails the command (exit 1).
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from click.testing import CliRunner

from cutplan.audio.wav import wav_bytes
from cutplan.cli import cli

CHIME = ["calibrate", "--material", "aluminum-6063-t5", "--stock", "al-1.000x0.065"]
BAR = ["calibrate", "--kind", "bar", "--material", "maple-sugar", "--bar", "50 mm x 22 mm"]


def _run(args):
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        result = CliRunner().invoke(cli, args)
    return result, [str(w.message) for w in caught]


def _one_line_refusal(result, leaked, *words):
    assert leaked == []
    assert result.exit_code == 2, result.output
    lines = result.output.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: --")
    assert "Traceback" not in result.output and "\\x0a" not in result.output
    for w in words:
        assert w in lines[0]


@pytest.mark.parametrize("args, words", [
    (CHIME + ["--piece", "503.9 mm @ inf"], ["inf Hz", "48000 Hz"]),  # leaked a RuntimeWarning, then a traceback
    (BAR + ["--piece", "440 mm @ 1e300"], ["1e+300 Hz"]),  # OverflowError traceback
    (BAR + ["--piece", "440 mm @ 495.8, 1e300"], ["1e+300 Hz"]),
    (BAR + ["--piece", "1e-6 mm @ 495.8"], ["0.1 mm to 30 m"]),  # ran out of memory
    (["calibrate", "--kind", "air-column", "--stock", "pvc-sch40-1", "--piece", "185 mm @ inf"], ["inf Hz"]),
    (["calibrate", "--kind", "air-column", "--two-resonance", "160 mm, 1e300 mm @ 512"], ["0.1 mm to 30 m"]),
])
def test_what_is_not_a_measurement_is_one_line(args, words):
    _one_line_refusal(*_run(args), *words)


def test_two_depths_that_no_air_gives_are_refused():
    # 160 mm and 2000 mm as the first two resonance depths at 512 Hz: half a wavelength is
    # 1840 mm, so c = 2 x 1.840 m x 512 Hz = 1884 m/s, far above air's 331.3 sqrt(T/273.15)
    # m/s at any shop temperature (Kinsler et al. 2000, eq. 5.6.8)
    result, leaked = _run(["calibrate", "--kind", "air-column", "--two-resonance", "160 mm, 2000 mm @ 512"])
    _one_line_refusal(result, leaked, "1884 m/s")


def test_a_thump_is_refused_without_a_warning(tmp_path):
    # a thump: 20 ms of decaying noise, no ringing partial (common practice: a dead strike)
    rate = 44100
    t = np.arange(int(1.5 * rate)) / rate
    thump = 0.8 * np.exp(-t / 0.02) * np.random.default_rng(1).standard_normal(t.size)
    wav = tmp_path / "thump.wav"
    wav.write_bytes(wav_bytes(thump / np.abs(thump).max(), rate))
    for args in (CHIME, BAR):
        result, leaked = _run(args + ["--piece", f"440 mm @ {wav}"])
        assert leaked == [] and result.exit_code == 2, result.output
        assert len(result.output.strip().splitlines()) == 1 and "thump.wav" in result.output


def test_one_partial_of_a_real_measurement_still_fits():
    # 503.9 mm of 1.000 x 0.065 in 6063 tube at 591.2 Hz (our porch scenario): one partial, E alone
    result, leaked = _run(CHIME + ["--piece", "503.9 mm @ 591.2"])
    assert leaked == [] and result.exit_code == 0, result.output

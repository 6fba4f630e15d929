"""Mains hum in a bench recording is recognised and left out of the partials.

Oracle: the synthesis.  Each recording is made here with cutplan.audio.synth: a struck piece as a
sum of exponentially decaying sines (tone: A exp(-t / tau) sin(2 pi f t)) after half a second of
room sound, plus a steady mains hum (mains_hum: sines at the supply frequency and its harmonics,
unchanged from the first sample to the last).  Supply frequencies 50 Hz and 60 Hz (IEC 60038,
standard voltages; from memory).  The partials' frequencies, levels and decays are the synthesis
parameters below; the free-free ratios 1 : 2.7565 : 5.4039 are Blevins, Formulas for Natural
Frequency and Mode Shape, 1979, Table 8-1.
"""

import math

import numpy as np
import pytest

from cutplan.audio import partials
from cutplan.audio.analysis import measure
from cutplan.audio.hum import hum_lines
from cutplan.audio.partials import find_partials, strike_segment
from cutplan.audio.synth import mains_hum, tone

# each distinct recording analysed once (tests/audio/memo.py): the same recordings are read by
# measure and by find_partials.
pytestmark = pytest.mark.usefixtures("one_analysis_per_recording")


RATE = 44100
FREE_FREE = (1.0, 2.7565, 5.4039)
AMPS, TAUS = (1.0, 0.5, 0.3), (1.2, 0.4, 0.15)
PRE, RING = 0.5, 3.0


def cents(a, b):
    return 1200 * math.log2(a / b)


def recording(f1, mains, hum_amps, pre=PRE, noise=0.002, seed=3, ratios=FREE_FREE, amps=AMPS, taus=TAUS):
    rng = np.random.default_rng(seed)
    bar = tone([f1 * r for r in ratios], amps, taus, RING, RATE, phases=list(rng.uniform(0, 2 * math.pi, len(ratios))))
    x = np.concatenate([np.zeros(int(pre * RATE)), bar])
    if mains:
        x = x + mains_hum(pre + RING, mains, hum_amps, RATE)[:x.size]
    return x + rng.normal(0, noise, x.size)


@pytest.mark.parametrize("mains", [50.0, 60.0])
def test_hum_is_left_out_and_the_struck_bar_is_found(mains):
    # hum at 0.1, 0.06, 0.04 of the bar's first partial: -20, -24.4, -28 dB, all within the 30 dB
    # the finder lists, so without the hum check they would be listed as partials that ring on
    f1 = 220.0  # A3, 12-TET at A4 = 440 Hz (ISO 16:1975); no partial within 20 Hz of the hum's lines
    x = recording(f1, mains, (0.1, 0.06, 0.04))
    start = len(x) - len(strike_segment(x, RATE))
    assert [round(h) for h in hum_lines(x - x.mean(), RATE, start)] == [mains, 2 * mains, 3 * mains]
    found, hum = partials.find_partials_and_hum(x, RATE)
    assert len(found) == 3
    for p, r, a, tau in zip(found, FREE_FREE, AMPS, TAUS, strict=True):
        assert abs(cents(p.hz, f1 * r)) < 0.5
        assert p.level_db == pytest.approx(20 * math.log10(a), abs=1.0)
        assert p.decay_s == pytest.approx(tau, rel=0.1)
    assert [round(h) for h in hum] == [mains, 2 * mains, 3 * mains]
    m = measure(x, RATE)
    assert abs(cents(m.fundamental_hz, f1)) < 0.5
    assert len(m.partials_hz) == 3
    assert any(w.startswith(f"mains hum ({mains:.0f} Hz supply)") for w in m.warnings)


def test_without_hum_there_is_no_note():
    x = recording(174.61, None, ())
    found, hum = partials.find_partials_and_hum(x, RATE)
    assert len(found) == 3 and hum == ()
    assert measure(x, RATE).warnings == ()


def test_a_partial_on_a_supply_harmonic_stays_a_partial():
    # the bar's first partial at 100 Hz, on the second harmonic of 50 Hz hum (-34 dB) that is there
    # before the strike: it decays (tau 1.2 s), so it is the bar's, and stays listed; the 50 Hz
    # line goes
    x = recording(100.0, 50.0, (0.1, 0.02))
    found, hum = partials.find_partials_and_hum(x, RATE)
    assert [round(h) for h in hum] == [50]
    assert abs(cents(found[0].hz, 100.0)) < 1.0  # the hum under it pulls the reading by a fraction of a cent
    assert found[0].decay_s == pytest.approx(1.2, rel=0.1)
    assert len(found) == 3


def test_a_steady_tone_off_the_supply_harmonics_is_not_hum():
    # a steady 440 Hz tone there from the start (8.8 x 50 Hz, 7.33 x 60 Hz: on no harmonic) is not
    # taken for hum: it stays among the partials, ringing on
    x = recording(174.61, None, ())
    x = x + 0.1 * np.sin(2 * np.pi * 440.0 * np.arange(x.size) / RATE)
    found, hum = partials.find_partials_and_hum(x, RATE)
    assert hum == ()
    assert any(abs(cents(p.hz, 440.0)) < 0.5 and p.decay_s is None for p in found)


def test_hum_needs_the_recording_to_start_before_the_strike():
    # with no room sound before the strike, hum cannot be told from a partial that rings on: the
    # finder lists what it hears (documented limit)
    x = recording(174.61, 50.0, (0.1,), pre=0.0)
    found = find_partials(x, RATE)
    assert any(abs(p.hz - 50.0) < 0.5 and p.decay_s is None for p in found)


def test_the_measure_command_prints_the_hum_note(tmp_path):
    from click.testing import CliRunner

    from cutplan.audio.wav import wav_bytes
    from cutplan.cli import cli

    x = recording(220.0, 60.0, (0.1, 0.06, 0.04))
    path = tmp_path / "hum.wav"
    path.write_bytes(wav_bytes(0.8 * x / np.max(np.abs(x)), RATE))
    result = CliRunner().invoke(cli, ["measure", str(path)])
    assert result.exit_code == 0, result.output
    assert "A3" in result.output and "mains hum (60 Hz supply)" in result.output
    assert "60.0" not in result.output.split("mains hum")[0]  # not listed among the partials

"""Synthetic recordings of struck pieces against the partial finder and the fundamental's naming.

The oracle for every check is the synthesis itself: each recording is a sum of exponentially
decaying sines made here with numpy (cutplan.audio.synth.tone, A exp(-t / tau) sin(2 pi f t)),
so the true frequencies, levels (20 log10 of the amplitude ratios) and decay times tau are the
parameters written below.  Note frequencies are 12-TET at A4 = 440 Hz (ISO 16:1975).

The accuracy expected rests on two published results: the four-term Blackman-Harris window's
side lobes are 92 dB down (Harris, "On the use of windows for harmonic analysis with the discrete
Fourier transform", Proc. IEEE 66(1), 1978, Table 1), so a steady tone gives one peak and no row of
side lobes within 30 dB; and a parabola through the log-magnitude samples of a zero-padded peak
locates it to a small fraction of a bin (Smith & Serra, PARSHL, ICMC 1987; from memory).
"""

import json
import math

import numpy as np
import pytest
from click.testing import CliRunner

import cutplan
from cutplan.audio.analysis import measure
from cutplan.audio.partials import find_partials
from cutplan.audio.synth import piece_preview, tone
from cutplan.audio.wav import RecordingError, wav_bytes
from cutplan.cli import cli

# each distinct recording analysed once (tests/audio/memo.py): one recording is measured with and
# without --near and --kind.
pytestmark = pytest.mark.usefixtures("one_analysis_per_recording")


RATE = 44100
D5, A3 = 587.3295, 220.0  # ISO 16:1975 tuning, 12-TET
# free-free uniform bar, slender: 1 : 2.7565 : 5.4039 (Blevins, Formulas for Natural Frequency and
# Mode Shape, 1979, Table 8-1)
FREE_FREE = (1.0, 2.7565, 5.4039)
# a struck undercut bar as tuned at the bench: partials 1 : 3.93 : 9.1, and one whose third partial
# sits at 9.2 (both are synthesis parameters, near the 1 : 4 : 10 marimba target)
UNDERCUT = (1.0, 3.93, 9.1)


def cents(a, b):
    return 1200 * math.log2(a / b)


def struck(f1, ratios, amps, decays, seconds=3.0, noise=0.0, seed=0):
    rng = np.random.default_rng(seed)
    x = tone([f1 * r for r in ratios], amps, decays, seconds, RATE,
             phases=list(rng.uniform(0, 2 * math.pi, len(ratios))))
    x = x + rng.normal(0, noise, x.size)
    return 0.8 * x / np.max(np.abs(x))


def write(path, x):
    path.write_bytes(wav_bytes(x, RATE))
    return str(path)


def test_decaying_inharmonic_partials_with_noise_are_all_found_with_level_and_decay():
    # oracle: the synthesis; amplitudes 1, 0.5, 0.3 -> 0, -6.0, -10.5 dB; tau 1.2, 0.4, 0.15 s;
    # white noise 40 dB below the strike's peak
    amps, taus = (1.0, 0.5, 0.3), (1.2, 0.4, 0.15)
    x = struck(174.61, FREE_FREE, amps, taus, noise=0.01)
    found = find_partials(x, RATE)
    assert len(found) == 3
    for p, r, a, tau in zip(found, FREE_FREE, amps, taus, strict=True):
        assert abs(cents(p.hz, 174.61 * r)) < 0.5
        assert p.level_db == pytest.approx(20 * math.log10(a), abs=1.0)  # envelope fit through noise
        assert p.decay_s == pytest.approx(tau, rel=0.1)
    m = measure(x, RATE)
    assert abs(cents(m.fundamental_hz, 174.61)) < 0.5 and m.fundamental_heard and m.warnings == ()


def test_equal_loud_partials_of_an_undercut_bar_are_all_listed_and_read_as_a_tuned_bar():
    # oracle: the synthesis; three equally loud partials 1 : 3.93 : 9.2 at D5
    ratios = (1.0, 3.93, 9.2)
    m = measure(struck(D5, ratios, (1.0, 1.0, 1.0), (1.0, 0.6, 0.3)), RATE)
    assert len(m.partials) == 3
    for p, r in zip(m.partials, ratios, strict=True):
        assert abs(cents(p.hz, D5 * r)) < 0.5
        assert abs(p.level_db) < 1.0
    assert m.pattern == "tuned-bar" and m.modes == (1, 2, 3)
    assert abs(cents(m.fundamental_hz, D5)) < 0.5


def test_the_window_has_the_published_side_lobe_level():
    # Harris 1978, Table 1: four-term (-92 dB) Blackman-Harris, highest side lobe -92 dB, main
    # lobe half-width 4 bins (first zero of the transform at 4 bins)
    from cutplan.audio.partials import blackman_harris

    n, pad = 64, 256
    mag = np.abs(np.fft.rfft(blackman_harris(n), n * pad))
    db = 20 * np.log10(mag / mag[0] + 1e-300)
    first_min = int(np.argmax(np.diff(db) > 0))  # the main lobe ends at its first minimum
    assert first_min / pad == pytest.approx(4.0, abs=0.25)
    assert db[first_min:].max() == pytest.approx(-92.0, abs=0.5)


def test_a_steady_tone_is_one_partial_without_side_lobes():
    # oracle: one sine at 587.33 Hz that does not decay; Harris 1978: side lobes 92 dB down
    x = tone([D5], [0.8], [1e9], 2.0, RATE)
    found = find_partials(x, RATE)
    assert len(found) == 1
    assert abs(cents(found[0].hz, D5)) < 0.1
    assert found[0].decay_s is None  # rings on: no decay measurable


def test_a_click_is_refused(tmp_path):
    # oracle: a 5 ms burst of noise (no partial rings) over a faint noise floor
    rng = np.random.default_rng(3)
    x = rng.normal(0, 1e-3, RATE)
    x[2000:2220] += rng.normal(0, 1.0, 220) * np.exp(-np.arange(220) / 40)
    with pytest.raises(RecordingError, match="click"):
        find_partials(x, RATE)
    result = CliRunner().invoke(cli, ["measure", write(tmp_path / "click.wav", 0.8 * x / np.max(np.abs(x)))])
    assert result.exit_code == 2 and len(result.output.strip().splitlines()) == 1
    assert "click.wav" in result.output and "Traceback" not in result.output


def test_an_undercut_bar_at_d5_reads_d5_with_the_default_kind_and_with_near(tmp_path):
    # oracle: the synthesis (1 : 3.93 : 9.1 at D5); it was once read as G#3, and as 427 Hz near D5
    path = write(tmp_path / "bar.wav", struck(D5, UNDERCUT, (1.0, 0.6, 0.5), (1.5, 0.4, 0.15), noise=0.003))
    for extra in ([], ["--near", "D5"], ["--kind", "bar"]):
        out = CliRunner().invoke(cli, ["measure", path, "--format", "json", *extra])
        assert out.exit_code == 0, out.output
        data = json.loads(out.output)
        assert data["note"] == "D5" and abs(data["cents"]) < 0.5, extra
        assert data["pattern"] == "tuned-bar" and data["warnings"] == []
        # every partial listed is one of the synthesis's, with its decay
        assert len(data["partials"]) == 3
        for p, r, tau in zip(data["partials"], UNDERCUT, (1.5, 0.4, 0.15), strict=True):
            assert abs(cents(p["hz"], D5 * r)) < 0.5
            assert p["decay_s"] == pytest.approx(tau, rel=0.1)


def test_a_chime_pattern_forced_on_a_tuned_bar_is_flagged():
    # oracle: the synthesis (1 : 3.93 : 9.1); the free-free pattern explains only the fundamental
    m = measure(struck(D5, UNDERCUT, (1.0, 0.6, 0.5), (1.5, 0.4, 0.15)), RATE, "chime")
    assert m.confidence < 0.5
    assert any("--kind" in w for w in m.warnings)


def test_the_wrong_piece_near_d5_is_refused_naming_what_it_is(tmp_path):
    # oracle: the synthesis, a tuned bar at A3 (220 Hz, an octave and a fourth below D5): no partial
    # lies within half an octave of D5, so no D5 reading may be made up from its overtones
    path = write(tmp_path / "other.wav", struck(A3, UNDERCUT, (1.0, 0.6, 0.5), (1.5, 0.4, 0.15), noise=0.003))
    out = CliRunner().invoke(cli, ["measure", path, "--near", "D5"])
    assert out.exit_code == 2 and len(out.output.strip().splitlines()) == 1
    assert "--near" in out.output and "220.0 Hz (A3" in out.output and "right piece" in out.output
    plain = CliRunner().invoke(cli, ["measure", path, "--format", "json"])
    assert json.loads(plain.output)["note"] == "A3"


def test_a_missing_fundamental_is_named_as_estimated_with_a_warning():
    # oracle: the synthesis, partials 2, 3 and 4 of a free-free bar at D5 only (no energy at D5;
    # ratio 8.933 for partial 4, Blevins 1979, Table 8-1)
    x = tone([D5 * r for r in (*FREE_FREE[1:], 8.9330)], [0.7, 0.5, 0.4], [1.0, 0.5, 0.3], 1.0, RATE)
    m = measure(x, RATE, "bar")
    assert not m.fundamental_heard
    assert abs(cents(m.fundamental_hz, D5)) < 1.0
    assert any("not in the recording" in w for w in m.warnings)


def test_the_tools_own_previews_of_planned_bars_read_at_their_fundamental(example_plan):
    # oracle: the preview synthesis's own partials (the plan's partials_hz); an F3 bar's preview
    # (174.6 Hz) was once read as 63.3 Hz, its second partial over 2.76.  The example's Plan is
    # the session's (tests/conftest.py), planned once for every test that reads it.
    design = cutplan.load_design("examples/workshop-marimba.toml")
    bars = [s for s in design.sets if s.kind == "bar"]
    assert bars
    plan = example_plan("workshop-marimba")
    low = cutplan.design_from_mapping({
        "title": "Low bar", "units": "mm",
        "set": [{"name": "low", "kind": "bar", "notes": ["F3"], "material": "maple-sugar",
                 "section": {"shape": "bar", "width": "50 mm", "thickness": "22 mm"}}]})
    pieces = [p for p in plan.pieces if p.kind == "bar"][::3] + list(cutplan.plan(low).pieces)
    for piece in pieces:
        m = measure(piece_preview(piece), RATE)
        assert abs(cents(m.fundamental_hz, piece.partials_hz[0])) < 0.5, piece.label

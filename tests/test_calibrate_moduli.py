"""Fitting E and G from several partials; slender pieces; plausibility; re-calibration; CLI."""

import numpy as np
import pytest
from click.testing import CliRunner

from cutplan.audio.synth import tone
from cutplan.audio.wav import wav_bytes
from cutplan.cli import cli
from cutplan.materials import load_library
from cutplan.physics.sections import bar, rod, tube
from cutplan.planning.frequency import beam_frequency_function
from cutplan.tuning.calibrate import CalibrationError, fit_beam
from cutplan.tuning.calibrate_moduli import fit_moduli, partial_frequencies, partials_from_peaks

LIB = load_library()
MAPLE = LIB.materials["maple-sugar"]
AL = LIB.materials["aluminum-6063-t5"]
# "true" constants of the synthetic test pieces: a maple board a little softer than the table, with
# E/G = 13 (USDA Wood Handbook 2010, Table 5-1: E/G_LR about 9 for sugar maple; boards vary from
# about 10 to 20, which is why G is worth measuring)
E_TRUE, G_TRUE = 12.5e9, 12.5e9 / 13
DEEP = bar(0.050, 0.022)


def synthetic(material, section, length, modes, e, g, noise_cents, seed):
    """Partials computed with the shear-corrected model from known E and G, plus reading noise."""
    rng = np.random.default_rng(seed)
    f = partial_frequencies(material, section, "timoshenko", e, g, length, modes)
    return [(length, n, fn * 2 ** (rng.normal(0.0, noise_cents) / 1200)) for n, fn in enumerate(f, start=1)]


@pytest.mark.parametrize("seed", [1, 2, 3, 4, 5])
def test_known_e_and_g_are_recovered_within_half_a_percent_from_noisy_partials(seed):
    # synthetic: three partials of one 420 mm bar, 0.2 cent of noise on each (1 sigma)
    measured = synthetic(MAPLE, DEEP, 0.42, 3, E_TRUE, G_TRUE, 0.2, seed)
    fit = fit_moduli(measured, MAPLE, DEEP)
    assert fit.shear == "fitted"
    assert fit.modulus == pytest.approx(E_TRUE, rel=0.005)
    assert fit.shear_modulus == pytest.approx(G_TRUE, rel=0.005)
    assert all(abs(r) < 1.0 for r in fit.residuals_cents)


def test_two_lengths_of_fundamentals_alone_also_separate_g():
    # shear lowers a short piece more than a long one (its effect grows as (depth/length)^2)
    measured = []
    for length in (0.25, 0.32, 0.5):
        measured += synthetic(MAPLE, DEEP, length, 1, E_TRUE, G_TRUE, 0.0, 0)
    fit = fit_moduli(measured, MAPLE, DEEP)
    assert fit.shear == "fitted"
    assert fit.shear_modulus == pytest.approx(G_TRUE, rel=1e-4)


def test_slender_piece_says_g_is_not_determined_and_fits_e_alone():
    # a 10 mm rod 1 m long: shear moves its first three partials by hundredths of a cent
    slim = rod(0.010)
    measured = synthetic(AL, slim, 1.0, 3, 70e9, 26e9, 0.2, 7)
    fit = fit_moduli(measured, AL, slim)
    assert fit.shear == "scaled"
    assert any("G is not determined" in n for n in fit.notes)
    assert fit.modulus == pytest.approx(70e9, rel=0.005)


def test_one_partial_fits_e_alone_exactly_as_before():
    # the earlier one-partial fit scaled E and G together; the new fit must agree with it
    sec = tube(0.0254, 0.065 * 0.0254)
    fit = fit_moduli([(0.5, 1, 601.3)], AL, sec)
    old = fit_beam([(0.5, 601.3)], beam_frequency_function(AL, sec, "timoshenko"))
    assert fit.shear == "scaled"
    assert fit.scale == pytest.approx(old.scale, rel=1e-9)


def test_a_lone_second_partial_is_refused_and_named():
    # measuring partial 2 (about 2.7 x f1, Blevins 1979 Table 8-1 ratio 2.7565 less shear) as the
    # fundamental implies E about 7.4 x the table: outside the metal range of cutplan.plausibility
    sec = tube(0.0254, 0.065 * 0.0254)
    f2 = partial_frequencies(AL, sec, "timoshenko", AL.modulus, AL.shear_modulus_for("timoshenko"), 0.5, 2)[1]
    with pytest.raises(CalibrationError, match="looks like partial 2"):
        fit_moduli([(0.5, 1, f2)], AL, sec)


def test_partials_are_found_in_a_list_of_peaks_with_the_planned_ratios():
    peaks = [(500.0, -3.0), (1290.0, -10.0), (1800.0, -40.0), (2400.0, -20.0)]
    assert partials_from_peaks(peaks, 500.0, [1.0, 2.6, 4.75, 7.5]) == ((1, 500.0), (2, 1290.0), (3, 2400.0))


def _run(args):
    return CliRunner().invoke(cli, args)


def test_cli_fits_e_and_g_from_a_listed_piece_then_recalibrates_holding_g(tmp_path):
    measured = synthetic(MAPLE, DEEP, 0.42, 3, E_TRUE, G_TRUE, 0.0, 0)
    listed = ", ".join(f"{f:.4f}" for _, _, f in measured)
    mats = tmp_path / "mats"
    r = _run(["calibrate", "--kind", "bar", "--material", "maple-sugar", "--bar", "50 mm x 22 mm",
              "--piece", f"420 mm @ {listed}", "-o", str(mats / "maple.toml")])
    assert r.exit_code == 0, r.output
    assert "partial 3" in r.output and "fitted from the partials" in r.output
    lib = load_library([mats])
    cal = lib.materials["maple-sugar-calibrated"]
    assert cal.shear_modulus == pytest.approx(G_TRUE, rel=1e-4)
    # calibrated again from one more tuner reading: found through --materials, G held
    f1 = partial_frequencies(MAPLE, DEEP, "timoshenko", E_TRUE * 1.01, G_TRUE, 0.38, 1)[0]
    r = _run(["calibrate", "--kind", "bar", "--material", "maple-sugar-calibrated", "--materials", str(mats),
              "--bar", "50 mm x 22 mm", "--piece", f"380 mm @ {f1:.4f}", "-o", str(mats / "maple.toml"), "--force"])
    assert r.exit_code == 0, r.output
    assert "held at the earlier measured value" in r.output
    again = load_library([mats]).materials["maple-sugar-calibrated"]
    assert again.modulus == pytest.approx(E_TRUE * 1.01, rel=1e-5)
    assert again.shear_modulus == pytest.approx(G_TRUE, rel=1e-5)


def test_cli_reads_the_partials_of_a_recording(tmp_path):
    measured = synthetic(MAPLE, DEEP, 0.42, 3, E_TRUE, G_TRUE, 0.0, 0)
    freqs = [f for _, _, f in measured]
    wav = tmp_path / "bar.wav"
    wav.write_bytes(wav_bytes(0.8 * tone(freqs, [1.0, 0.5, 0.3], [1.5, 0.8, 0.5], 3.0) / 1.8, 44100))
    r = _run(["calibrate", "--kind", "bar", "--material", "maple-sugar", "--bar", "50 mm x 22 mm",
              "--piece", f"420 mm @ {wav}"])
    assert r.exit_code == 0, r.output
    assert "partial 3" in r.output
    e_line = next(line for line in r.output.splitlines() if line.startswith("effective modulus"))
    e_fit = float(e_line.split()[3]) * 1e9
    assert e_fit == pytest.approx(E_TRUE, rel=0.01)  # spectral peak reading is good to a few tenths of a cent


def test_cli_refuses_a_lone_overtone_with_one_line(tmp_path):
    r = _run(["calibrate", "--material", "aluminum-6063-t5", "--tube", "1 in x 0.065 in", "--piece", "500 mm @ 1596"])
    assert r.exit_code == 2
    assert "looks like partial 2" in r.output
    assert "Traceback" not in r.output


def test_cli_slender_piece_reports_g_not_determined():
    # partials in the free-free ratios 1 : 2.7565 : 5.4039 (Blevins 1979, Table 8-1)
    r = _run(["calibrate", "--material", "aluminum-6063-t5", "--rod", "10 mm", "--piece", "1000 mm @ 45.2, 124.6, 244.2"])
    assert r.exit_code == 0, r.output
    assert "G is not determined" in r.output


def test_calibrate_and_length_accept_a_designs_material_dirs(tmp_path):
    mats = tmp_path / "mats"
    mats.mkdir()
    (mats / "shop.toml").write_text('["shop-maple"]\nmodulus = "12.0 GPa"\ndensity = "700 kg/m3"\n'
                                    'poisson = 0.42\nshear_modulus = "0.95 GPa"\n', encoding="utf-8")
    design = tmp_path / "d.toml"
    design.write_text('material_dirs = ["mats"]\n[[set]]\nkind = "bar"\nnotes = ["C5"]\nmaterial = "shop-maple"\n'
                      'section = { shape = "bar", width = "50 mm", thickness = "22 mm" }\n', encoding="utf-8")
    r = _run(["length", "--kind", "bar", "--note", "C5", "--material", "shop-maple", "--bar", "50 mm x 22 mm",
              "--design", str(design)])
    assert r.exit_code == 0, r.output
    assert "other modes" in r.output
    r = _run(["calibrate", "--kind", "bar", "--material", "shop-maple", "--bar", "50 mm x 22 mm",
              "--piece", "400 mm @ 600", "--design", str(design)])
    assert r.exit_code == 0, r.output
    r = _run(["length", "--kind", "bar", "--note", "C5", "--material", "shop-maple", "--bar", "50 mm x 22 mm"])
    assert r.exit_code == 2 and "shop-maple" in r.output


def test_plan_with_the_fitted_e_and_g_gives_the_true_length_of_a_new_bar(tmp_path):
    # the test bar is synthetic (known E and G); a new bar planned with the calibrated material must
    # have the length the true material gives (shear-corrected, Timoshenko transfer matrix)
    from cutplan.physics import timoshenko

    measured = synthetic(MAPLE, DEEP, 0.42, 3, E_TRUE, G_TRUE, 0.0, 0)
    listed = ", ".join(f"{f:.5f}" for _, _, f in measured)
    mats = tmp_path / "mats"
    r = _run(["calibrate", "--kind", "bar", "--material", "maple-sugar", "--bar", "50 mm x 22 mm",
              "--piece", f"420 mm @ {listed}", "-o", str(mats / "maple.toml")])
    assert r.exit_code == 0, r.output
    design = tmp_path / "d.toml"
    design.write_text('material_dirs = ["mats"]\n[[set]]\nkind = "bar"\nfrequencies = [700.0]\n'
                      'material = "maple-sugar-calibrated"\nsection = { shape = "bar", width = "50 mm", '
                      'thickness = "22 mm" }\n', encoding="utf-8")
    import cutplan

    planned = cutplan.plan(cutplan.load_design(design)).pieces[0].length
    kappa = DEEP.shear_coefficient(MAPLE.poisson)
    true_length = timoshenko.fundamental_length(700.0, E_TRUE * DEEP.second_moment, MAPLE.density * DEEP.area,
                                                kappa * G_TRUE * DEEP.area, MAPLE.density * DEEP.second_moment)
    assert planned == pytest.approx(true_length, rel=1e-4)


def test_cli_accepts_an_overtone_read_on_a_tuner_when_marked_with_its_partial_number():
    # a tuner reading of partial 2 alone, marked "#2", calibrates E just as partial 1 would
    sec = tube(0.0254, 0.065 * 0.0254)
    f = partial_frequencies(AL, sec, "timoshenko", AL.modulus * 1.02, AL.shear_modulus_for("timoshenko") * 1.02,
                             0.5, 2)
    r1 = _run(["calibrate", "--material", "aluminum-6063-t5", "--tube", "1 in x 0.065 in",
               "--piece", f"500 mm @ {f[0]:.4f}"])
    r2 = _run(["calibrate", "--material", "aluminum-6063-t5", "--tube", "1 in x 0.065 in",
               "--piece", f"500 mm @ {f[1]:.4f} #2"])
    assert r1.exit_code == 0 and r2.exit_code == 0, r2.output
    assert "+2.00 %" in r1.output and "+2.00 %" in r2.output

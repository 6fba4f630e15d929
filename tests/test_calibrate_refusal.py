"""calibrate refuses what no uniform test piece can give; every example in its help runs."""

import re
import shlex

import numpy as np
import pytest
from click.testing import CliRunner

from cutplan.audio.synth import tone
from cutplan.audio.wav import wav_bytes
from cutplan.cli import cli
from cutplan.materials import load_library

# Three partials of an undercut padauk bar: 170, 663, 1564 Hz.  f2/f1 = 3.90, while a uniform
# free-free bar has f2/f1 = 2.7565 at most (Blevins, Formulas for Natural Frequency and Mode Shape,
# 1979, Table 8-1; shear only lowers it), so no uniform bar of any E fits these readings.
UNDERCUT = "400 mm @ 170, 663, 1564"
PADAUK = ["calibrate", "--kind", "bar", "--material", "padauk-african", "--bar", "60 mm x 22 mm"]


def _refused(result, out_path):
    assert result.exit_code == 2, result.output
    lines = [ln for ln in result.output.splitlines() if ln.strip()]
    assert len(lines) == 1 and lines[0].startswith("error: ") and "Traceback" not in result.output
    assert not out_path.exists()
    return lines[0]


def test_undercut_bar_readings_are_refused_and_nothing_is_written(tmp_path):
    out = tmp_path / "mats" / "padauk.toml"
    line = _refused(CliRunner().invoke(cli, [*PADAUK, "--piece", UNDERCUT, "-o", str(out)]), out)
    assert "f2/f1 = 3.90" in line and "calibrate from a uniform blank" in line
    assert "15" in line  # the limit on the residual is stated


def test_a_recording_of_an_undercut_bar_is_refused_not_fitted_from_its_fundamental(tmp_path):
    # synthetic recording (numpy): partials 1 : 3.93 : 9.1 on 170 Hz, the tuned ratios of an
    # undercut bar (synthesis parameters); no uniform bar has a partial near 3.93 or 9.1 x f1
    # (Blevins 1979, Table 8-1: 2.7565, 5.4039, 8.9330 at most)
    x = tone([170.0, 170.0 * 3.93, 170.0 * 9.1], [1.0, 0.7, 0.6], [1.5, 0.5, 0.2], 3.0)
    wav = tmp_path / "bar.wav"
    wav.write_bytes(wav_bytes(0.8 * x / np.max(np.abs(x)), 44100))
    out = tmp_path / "padauk.toml"
    line = _refused(CliRunner().invoke(cli, [*PADAUK, "--piece", f"400 mm @ {wav}", "-o", str(out)]), out)
    assert "uniform blank" in line and "3.93 x f1" in line


def test_a_misread_partial_is_named():
    # a uniform bar's three partials from the shear-corrected model (maple, table E and G, 440 mm),
    # with partial 3 read 10 % high: the other two agree, partial 3 is the odd one out
    from cutplan.physics.sections import bar
    from cutplan.tuning.calibrate_moduli import partial_frequencies

    maple = load_library().materials["maple-sugar"]
    f = partial_frequencies(maple, bar(0.05, 0.022), "timoshenko", maple.modulus_for("timoshenko"),
                             maple.shear_modulus_for("timoshenko"), 0.44, 3)
    listed = f"{f[0]:.2f}, {f[1]:.2f}, {1.1 * f[2]:.2f}"
    r = CliRunner().invoke(cli, ["calibrate", "--kind", "bar", "--material", "maple-sugar", "--bar", "50 mm x 22 mm",
                                 "--piece", f"440 mm @ {listed}"])
    assert r.exit_code == 2 and "partial 3" in r.output and "misread" in r.output


def _help_examples():
    text = CliRunner().invoke(cli, ["calibrate", "--help"], terminal_width=200).output
    body = text.split("Examples:", 1)[1].split("Options:", 1)[0]
    joined = re.sub(r"\\\s*\n\s*", " ", body)
    return [shlex.split(line.strip())[1:] for line in joined.splitlines() if line.strip().startswith("cutplan ")]


def test_the_help_has_examples_of_each_kind():
    examples = _help_examples()
    assert len(examples) >= 4
    assert {"air-column", "bar"} <= {a[a.index("--kind") + 1] for a in examples if "--kind" in a}


@pytest.mark.parametrize("args", _help_examples(), ids=lambda a: " ".join(a)[:60])
def test_every_example_in_the_help_runs(tmp_path, monkeypatch, args):
    monkeypatch.chdir(tmp_path)  # the examples write to relative paths
    result = CliRunner().invoke(cli, args)
    assert result.exit_code == 0, result.output
    if "-o" in args:
        written = tmp_path / args[args.index("-o") + 1]
        assert written.is_file()
        if "--material" in args:
            assert load_library([written.parent]).materials  # the written file loads back


def test_a_calibrated_material_keeps_its_class_and_plan_checks_it(tmp_path):
    # the class range check applies to --materials folders: a wood with E/G = 1 is implausible
    # (USDA FPL Wood Handbook, FPL-GTR-190, 2010, Table 5-1: along the grain E/G about 9 to 20)
    mats = tmp_path / "mats"
    mats.mkdir()
    (mats / "odd.toml").write_text(
        '["odd-maple"]\nclass = "wood"\nmodulus = "12 GPa"\ndensity = "700 kg/m3"\npoisson = 0.4\n'
        'shear_modulus = "12 GPa"\n', encoding="utf-8")
    design = tmp_path / "d.toml"
    design.write_text('title = "Garden bars"\nunits = "mm"\n[[set]]\nname = "bars"\nkind = "bar"\nnotes = ["C5"]\n'
                      'material = "odd-maple"\nsection = { shape = "bar", width = "40 mm", thickness = "20 mm" }\n',
                      encoding="utf-8")
    r = CliRunner().invoke(cli, ["plan", str(design), "--materials", str(mats)])
    assert r.exit_code == 2 and "E/G" in r.output and len(r.output.strip().splitlines()) == 1
    # a file written by calibrate names the class, so plan holds it to the wood range
    out = tmp_path / "cal" / "maple.toml"
    r = CliRunner().invoke(cli, ["calibrate", "--kind", "bar", "--material", "maple-sugar", "--bar", "50 mm x 22 mm",
                                 "--piece", "440 mm @ 495.8", "-o", str(out)])
    assert r.exit_code == 0, r.output
    cal = load_library([out.parent]).materials["maple-sugar-calibrated"]
    assert cal.material_class == "wood" and cal.fit_residual_cents < 0.01  # one partial fits exactly


def test_plan_and_trim_refuse_a_material_calibrated_from_a_bad_fit(tmp_path):
    # a material file whose calibration missed a partial by 583 cents (the undercut-bar readings
    # above, as an older cutplan wrote them) is refused before anything is cut
    mats = tmp_path / "mats"
    mats.mkdir()
    (mats / "padauk.toml").write_text(
        '["padauk-calibrated"]\nclass = "wood"\nmodulus = "3.9 GPa"\ndensity = "750 kg/m3"\npoisson = 0.4\n'
        "shear_ratio = 0.1\nfit_residual_cents = 583.0\n", encoding="utf-8")
    design = tmp_path / "d.toml"
    design.write_text('title = "Porch bars"\nunits = "mm"\n[[set]]\nname = "bars"\nkind = "bar"\nnotes = ["C5"]\n'
                      'material = "padauk-calibrated"\n'
                      'section = { shape = "bar", width = "40 mm", thickness = "20 mm" }\n', encoding="utf-8")
    for args in (["plan", str(design)], ["trim", str(design), "bars-1", "--measured", "523.3"]):
        r = CliRunner().invoke(cli, [*args, "--materials", str(mats)])
        assert r.exit_code == 2, r.output
        assert len(r.output.strip().splitlines()) == 1 and "uniform blank" in r.output


def test_e_over_g_outside_the_class_is_named():
    # isotropic metals have E/G = 2 (1 + nu), about 2.66 for aluminium with nu = 0.33 (Timoshenko &
    # Goodier, Theory of Elasticity, 3rd ed., 1970, ch. 1, from memory); E/G = 5 is no metal
    from cutplan.plausibility import problems

    assert problems(69e9, 2700.0, "metal", 69e9 / 2.66) == []
    (line,) = problems(69e9, 2700.0, "metal", 69e9 / 5)
    assert "E/G 5" in line and "2-3.2" in line

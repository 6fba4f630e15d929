"""Air-column calibrations saved as stock files and used by plan for columns cut from that stock."""

import math

import pytest
from click.testing import CliRunner

import cutplan
from cutplan.cli import cli
from cutplan.materials import MaterialError, load_library
from cutplan.physics import air_column


def _run(args):
    return CliRunner().invoke(cli, args)


def _design(tmp_path, stock, notes='["A4", "C5"]', temperature="22 C", extra=""):
    path = tmp_path / "d.toml"
    path.write_text(f'material_dirs = ["mats"]\n[[set]]\nname = "p"\nkind = "air-column"\nends = "closed-open"\n'
                    f'notes = {notes}\nsection = {{ stock = "{stock}" }}\ntemperature = "{temperature}"\n' + extra,
                    encoding="utf-8")
    return path


def test_two_resonance_calibration_is_saved_and_used_by_plan(tmp_path):
    # two-resonance method (standard lab method): c = 2 f (L2 - L1) = 2 x 512 x 0.335 = 343.04 m/s,
    # end correction (L2 - 3 L1) / 2 = (0.495 - 0.480) / 2 = 7.5 mm
    mats = tmp_path / "mats"
    r = _run(["calibrate", "--kind", "air-column", "--stock", "pvc-sch40-1", "--two-resonance",
              "160 mm, 495 mm @ 512", "--temperature", "22 C", "-o", str(mats / "pvc.toml")])
    assert r.exit_code == 0, r.output
    size = load_library([mats]).stock["pvc-sch40-1-calibrated"]
    cal = size.section.air_calibration
    assert cal.speed == pytest.approx(343.04, abs=1e-3)
    assert cal.end_correction == pytest.approx(0.0075, abs=1e-7)
    plan = cutplan.plan(cutplan.load_design(_design(tmp_path, "pvc-sch40-1-calibrated")))
    # closed-open: f = c / (4 (L + delta)) -> L = c / 4f - delta (standard closed-pipe formula)
    a4 = plan.pieces[0]
    assert a4.length == pytest.approx(343.04 / (4 * 440.0) - 0.0075, rel=1e-6)
    assert any("stock calibrated by measurement" in a for a in plan.sets[0].assumptions)


def test_calibrated_speed_follows_the_designs_temperature(tmp_path):
    # c ~ sqrt(T) (ISO 9613-1:1993, Formula A.5): measured 343.04 m/s at 22 C is
    # 343.04 sqrt(303.15 / 295.15) at 30 C
    mats = tmp_path / "mats"
    _run(["calibrate", "--kind", "air-column", "--stock", "pvc-sch40-1", "--two-resonance",
          "160 mm, 495 mm @ 512", "--temperature", "22 C", "-o", str(mats / "pvc.toml")])
    plan = cutplan.plan(cutplan.load_design(_design(tmp_path, "pvc-sch40-1-calibrated", temperature="30 C")))
    c30 = 343.04 * math.sqrt(303.15 / 295.15)
    assert plan.pieces[0].length == pytest.approx(c30 / (4 * 440.0) - 0.0075, rel=1e-6)


def test_measured_pipes_calibration_reproduces_their_pitch(tmp_path):
    # synthetic pipes of a stock whose air and ends give c = 346.1 m/s, delta = 8.1 mm (closed-open)
    c, delta = 346.1, 0.0081
    pieces = []
    for length in (0.15, 0.25, 0.40):
        f = air_column.closed_open_frequency(length, 1.0, c, 1, delta)
        pieces += ["--piece", f"{length * 1000:.3f} mm @ {f:.5f}"]
    mats = tmp_path / "mats"
    r = _run(["calibrate", "--kind", "air-column", "--stock", "pvc-sch40-1", "--ends", "closed-open", *pieces,
              "--name", "my-pvc", "-o", str(mats / "pvc.toml")])
    assert r.exit_code == 0, r.output
    plan = cutplan.plan(cutplan.load_design(_design(tmp_path, "my-pvc", temperature="20 C")))
    assert plan.pieces[0].length == pytest.approx(c / (4 * 440.0) - delta, rel=1e-5)


def test_resonators_cut_from_calibrated_stock_use_it(tmp_path):
    mats = tmp_path / "mats"
    _run(["calibrate", "--kind", "air-column", "--stock", "pvc-sch40-2", "--two-resonance",
          "160 mm, 495 mm @ 512", "--temperature", "20 C", "-o", str(mats / "pvc2.toml")])
    path = tmp_path / "r.toml"
    path.write_text('material_dirs = ["mats"]\n[[set]]\nname = "bars"\nkind = "bar"\nnotes = ["C5"]\n'
                    'material = "maple-sugar"\nsection = { shape = "bar", width = "50 mm", thickness = "22 mm" }\n'
                    '[[set]]\nname = "tubes"\nkind = "resonator"\nserves = "bars"\n'
                    'section = { stock = "pvc-sch40-2-calibrated" }\ntemperature = "20 C"\n', encoding="utf-8")
    plan = cutplan.plan(cutplan.load_design(path))
    tube_piece = next(p for p in plan.pieces if p.kind == "resonator")
    bar_piece = next(p for p in plan.pieces if p.kind == "bar")
    assert tube_piece.length == pytest.approx(343.04 / (4 * bar_piece.fundamental_hz) - 0.0075, rel=1e-6)


def test_saving_an_air_calibration_needs_a_named_stock(tmp_path):
    r = _run(["calibrate", "--kind", "air-column", "--tube", "1 in x 0.065 in", "--two-resonance",
              "160 mm, 495 mm @ 512", "-o", str(tmp_path / "x.toml")])
    assert r.exit_code == 2
    assert "needs --stock" in r.output
    assert not (tmp_path / "x.toml").exists()


def test_incomplete_or_implausible_stock_calibration_is_one_line(tmp_path):
    mats = tmp_path / "mats"
    mats.mkdir()
    row = '[table]\nshape = "tube"\n[sizes."x"]\nouter = "33.4 mm"\nwall = "3.4 mm"\n'
    (mats / "a.toml").write_text(row + 'speed_of_sound = "343 m/s"\n', encoding="utf-8")
    with pytest.raises(MaterialError, match="measured_at"):
        load_library([mats])
    (mats / "a.toml").write_text(row + 'speed_of_sound = "34.3 m/s"\nmeasured_at = "20 C"\n'
                                 'end_correction = "7 mm"\n', encoding="utf-8")
    with pytest.raises(MaterialError, match="between 250 and 450 m/s"):
        load_library([mats])


def test_calibrated_stock_is_cut_with_the_after_test_piece_allowance(tmp_path):
    mats = tmp_path / "mats"
    _run(["calibrate", "--kind", "air-column", "--stock", "pvc-sch40-1", "--two-resonance",
          "160 mm, 495 mm @ 512", "--temperature", "22 C", "-o", str(mats / "pvc.toml")])
    calibrated = cutplan.plan(cutplan.load_design(_design(tmp_path, "pvc-sch40-1-calibrated"))).pieces[0]
    assert calibrated.allowance_uncalibrated == pytest.approx(calibrated.allowance_calibrated)
    table = cutplan.plan(cutplan.load_design(_design(tmp_path, "pvc-sch40-1"))).pieces[0]
    assert calibrated.cut_length - calibrated.length < table.cut_length - table.length

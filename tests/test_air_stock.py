"""Air-column calibrations saved as stock files and used by plan for columns cut from that stock."""

import math

import pytest
from click.testing import CliRunner

import cutplan
from cutplan.cli import cli
from cutplan.materials import MaterialError, load_library
from cutplan.physics import air_column
from cutplan.physics.wall_losses import wall_loss_fraction

PVC_1_BORE = 0.5 * (1.315 - 2 * 1.06 * 0.133) * 0.0254
"""Air radius of 1 in schedule 40 PVC [m]: ASTM D1785 Table 1, OD 1.315 in, minimum wall 0.133 in,
bore at 1.06 x the minimum wall (common practice, halfway into the plus-only tolerance)."""


def _in_pipe(speed, frequency, measured_hz, radius=PVC_1_BORE, kelvin=295.15, measured_kelvin=295.15):
    """A speed measured in a pipe at ``measured_hz`` carried to ``frequency``: the wall losses
    (Keefe 1984, JASA 75(1) 58: dc/c = 1.045 / r_v) of the test pipe out, the note's own in."""
    return (speed * (1 - wall_loss_fraction(frequency, radius, kelvin))
            / (1 - wall_loss_fraction(measured_hz, radius, measured_kelvin)))


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
    assert cal.frequency == 512.0
    plan = cutplan.plan(cutplan.load_design(_design(tmp_path, "pvc-sch40-1-calibrated")))
    # closed-open: f = v / (4 (L + delta)) -> L = v / 4f - delta (standard closed-pipe formula),
    # v the speed in the pipe at 440 Hz
    a4 = plan.pieces[0]
    assert a4.length == pytest.approx(_in_pipe(343.04, 440.0, 512.0) / (4 * 440.0) - 0.0075, rel=1e-9)
    assert any("stock calibrated by measurement" in a for a in plan.sets[0].assumptions)


def test_calibrated_speed_follows_the_designs_temperature(tmp_path):
    # Cramer 1993 (JASA 93(5) 2510, Eq. 15) at the assumed 50 % RH: measured 343.04 m/s at 22 C is
    # 343.04 c(30 C) / c(22 C) at 30 C, with the wall losses of each temperature and frequency.
    # At constant relative humidity the air holds more water when warm, so the ratio is 0.12 %
    # above sqrt(303.15 / 295.15) (ISO 9613-1 A.5, dry air): computed from Cramer's Table III
    mats = tmp_path / "mats"
    _run(["calibrate", "--kind", "air-column", "--stock", "pvc-sch40-1", "--two-resonance",
          "160 mm, 495 mm @ 512", "--temperature", "22 C", "-o", str(mats / "pvc.toml")])
    plan = cutplan.plan(cutplan.load_design(_design(tmp_path, "pvc-sch40-1-calibrated", temperature="30 C")))
    ratio = air_column.speed_of_sound_cramer_1993(303.15, 50.0) / air_column.speed_of_sound_cramer_1993(295.15, 50.0)
    assert ratio / math.sqrt(303.15 / 295.15) == pytest.approx(1.0012, abs=1e-4)
    c30 = _in_pipe(343.04 * ratio, 440.0, 512.0, kelvin=303.15)
    assert plan.pieces[0].length == pytest.approx(c30 / (4 * 440.0) - 0.0075, rel=1e-9)


def test_calibrated_speed_reproduces_its_test_pipe_exactly(tmp_path):
    # two-resonance method: the first two resonances of a closed tube at one frequency, L1 and L2
    # (L2 - L1 = lambda / 2); with every model on, the calibrated stock must put both back at 512 Hz
    from cutplan.planning import air_calibrated

    mats = tmp_path / "mats"
    _run(["calibrate", "--kind", "air-column", "--stock", "pvc-sch40-1", "--two-resonance",
          "160 mm, 495 mm @ 512", "--temperature", "22 C", "-o", str(mats / "pvc.toml")])
    spec = cutplan.load_design(_design(tmp_path, "pvc-sch40-1-calibrated")).sets[0]
    model = air_calibrated.column_model(spec)
    assert model["temperature"] is not None  # wall losses on
    # (to the digits the stock file keeps: 1 mHz in speed, 0.1 um in length, 1 nm in the bore)
    assert air_column.column_frequency(0.160, **model) == pytest.approx(512.0, rel=1e-9)
    assert air_column.column_frequency(0.495, harmonic=2, **model) == pytest.approx(512.0, rel=1e-9)


def test_measured_pipes_calibration_reproduces_their_pitch(tmp_path):
    # synthetic pipes of a stock whose air and ends give c = 346.1 m/s in free air, delta = 8.1 mm
    # (closed-open), each sounding with its own wall losses
    c, delta = 346.1, 0.0081
    pieces = []
    for length in (0.15, 0.25, 0.40):
        f = air_column.column_frequency(length, PVC_1_BORE, c, "closed-open", 1, delta / PVC_1_BORE, 293.15)
        pieces += ["--piece", f"{length * 1000:.3f} mm @ {f:.7f}"]
    mats = tmp_path / "mats"
    r = _run(["calibrate", "--kind", "air-column", "--stock", "pvc-sch40-1", "--ends", "closed-open", *pieces,
              "--name", "my-pvc", "-o", str(mats / "pvc.toml")])
    assert r.exit_code == 0, r.output
    plan = cutplan.plan(cutplan.load_design(_design(tmp_path, "my-pvc", temperature="20 C")))
    v = c * (1 - wall_loss_fraction(440.0, PVC_1_BORE, 293.15))
    assert plan.pieces[0].length == pytest.approx(v / (4 * 440.0) - delta, rel=1e-5)


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
    # ASTM D1785 2 in schedule 40: OD 2.375 in, minimum wall 0.154 in (bore at 1.06 x the wall)
    radius = 0.5 * (2.375 - 2 * 1.06 * 0.154) * 0.0254
    f = bar_piece.fundamental_hz
    v = _in_pipe(343.04, f, 512.0, radius, 293.15, 293.15)
    assert tube_piece.length == pytest.approx(v / (4 * f) - 0.0075, rel=1e-9)


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

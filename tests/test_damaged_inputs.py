"""Damaged material folders and plausible inputs that used to crash: every one is a single line
naming the file or key, exit code 2, never a traceback or a hang.

The oracle is the design-file contract (one line: file, key, value, what is allowed); the
numbers are our own demo values (a garden chime, a workshop tube table)."""

from __future__ import annotations

import os
import sys

import pytest
from click.testing import CliRunner

from cutplan.cli import cli


def _run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args])


def _one_line(result, *words):
    assert result.exit_code == 2, result.output
    lines = [ln for ln in result.output.splitlines() if ln.strip()]
    assert len(lines) == 1 and lines[0].startswith("error: ") and "Traceback" not in result.output, result.output
    for w in words:
        assert w in lines[0], lines[0]
    return lines[0]


def _folder(tmp_path, name, make):
    folder = tmp_path / "tables"
    folder.mkdir()
    make(folder / name)
    return folder


@pytest.mark.skipif(sys.platform == "win32", reason="pipes, devices and symbolic links as POSIX has them")
@pytest.mark.parametrize("kind, words", [
    ("fifo", "not a regular file"), ("device", "not a regular file"), ("folder", "is a folder"),
    ("loop", "cannot be read"),
])
def test_a_table_that_is_not_a_regular_file_is_refused_without_hanging(tmp_path, kind, words):
    def make(path):
        if kind == "fifo":
            os.mkfifo(path)  # reading it would wait for ever
        elif kind == "device":
            path.symlink_to("/dev/zero")  # reading it would never end
        elif kind == "folder":
            path.mkdir()
        else:
            path.symlink_to(path.name)  # a link to itself

    folder = _folder(tmp_path, "metals.toml", make)
    _one_line(_run("materials", "--materials", folder), "metals.toml", words)


@pytest.mark.parametrize("text, key", [
    ('[table]\nwall_factor = "abc"\n[sizes.x]\nouter = "1 in"\nwall = "0.065 in"\n', "table.wall_factor"),
    ('sizes = { x = 5 }\n', "sizes.x"),
    ('table = 3\n[sizes.x]\nouter = "1 in"\nwall = "0.065 in"\n', "table"),
    ('[sizes.x]\nouter = "1 in"\nwall = "0.065 in"\ninner = "2 in"\n', "sizes.x.inner"),
    ('[sizes.x]\nouter = "1 in"\nwall = "0.065 in"\ninner = "wide"\n', "sizes.x.inner"),
    ('[brass]\nmodulus = "100 GPa"\ndensity = "8500 kg/m3"\nshear_ratio = "inf"\n', "brass.shear_ratio"),
])
def test_a_damaged_table_is_one_line_naming_file_and_key(tmp_path, text, key):
    folder = _folder(tmp_path, "shop.toml", lambda p: p.write_text(text))
    _one_line(_run("materials", "--materials", folder), "shop.toml", key)


def test_from_stock_reads_a_designs_pitch_given_with_its_unit(tmp_path):
    design = tmp_path / "garden.toml"
    design.write_text('[tuning]\na4 = "440 Hz"\n[[set]]\nkind = "chime"\nnotes = ["D5", "E5"]\n'
                      'section = { stock = "al-1.000x0.065" }\n[stock]\nlengths = [{ length = "8 ft", count = 1 }]\n')
    result = _run("from-stock", "--design", design, "--count", 5)
    assert result.exit_code == 0, result.output
    design.write_text(design.read_text().replace('"440 Hz"', '"loud"'))
    result = _run("from-stock", "--design", design, "--count", 5)
    assert result.exit_code == 2 and "Traceback" not in result.output and "a4" in result.output


def test_the_page_reads_its_material_folders_once(tmp_path, monkeypatch):
    from cutplan import materials
    from cutplan.web import service

    folder = tmp_path / "tables"
    folder.mkdir()
    (folder / "shop.toml").write_text('[shop-brass]\nmodulus = "100 GPa"\ndensity = "8500 kg/m3"\nclass = "metal"\n')
    calls = []
    real = materials.load_library
    monkeypatch.setattr(service, "load_library", lambda *a, **k: calls.append(a) or real(*a, **k))
    monkeypatch.setattr(service, "_LIBRARIES", {})
    planner = service.Planner([folder])
    data = {"set": [{"kind": "chime", "notes": ["D5"], "material": "shop-brass",
                     "section": {"shape": "tube", "outer": "1 in", "wall": "0.065 in"}}]}
    planner.design(data)
    (folder / "shop.toml").write_text("this is no longer TOML")  # changed while serving: not re-read
    planner.design(data)
    assert len(calls) == 1


def test_an_air_column_fit_outside_what_air_can_do_is_refused_and_nothing_written(tmp_path):
    # closed-open columns: f = c / 4 (L + delta) (Kinsler, Frey, Coppens and Sanders, Fundamentals
    # of Acoustics, 4th ed., 2000, ch. 10, from memory).  190 mm at 426.7 Hz and 300 mm at 900 Hz
    # cannot both hold: the longer pipe sounds higher, so the fitted speed comes out negative
    out = tmp_path / "pvc.toml"
    result = _run("calibrate", "--kind", "air-column", "--stock", "pvc-sch40-1", "--piece", "190 mm @ 426.7",
                  "--piece", "300 mm @ 900", "--fit", "both", "-o", out)
    _one_line(result, "speed of sound")
    assert not out.exists() and not list(tmp_path.iterdir())


def test_a_consistent_air_column_fit_is_still_accepted():
    from cutplan.tuning.calibrate import fit_air_column_choice

    # two closed-open pipes built from c = 343.2 m/s (20 C) and delta = 0.6133 a, a = 13.3 mm
    # (Levine and Schwinger 1948, unflanged end; from memory)
    c, delta = 343.2, 0.6133 * 0.0133
    pieces = [(length, c / (4 * (length + delta)), 1) for length in (0.19, 0.30)]
    fit = fit_air_column_choice(pieces, "closed-open", "both", c, radius=0.0133)
    assert abs(fit.speed - c) < 1e-6 and abs(fit.end_correction - delta) < 1e-9


@pytest.mark.parametrize("temperature", ["-20 C", "50 C", "-4 F"])
def test_the_ends_of_the_air_temperature_range_are_inside_it(tmp_path, temperature):
    # -20 C = 253.15 K = -4 F exactly (ISO 80000-5: T = t + 273.15 K; t_F = 9/5 t_C + 32)
    design = tmp_path / "pipes.toml"
    design.write_text(f'[[set]]\nkind = "air-column"\nnotes = ["C5"]\nsection = {{ stock = "pvc-sch40-1" }}\n'
                      f'temperature = "{temperature}"\n')
    result = _run("plan", design)
    assert result.exit_code == 0, result.output


def test_a_stereo_take_with_one_channel_wired_backwards_is_not_silent(tmp_path):
    import struct

    import numpy as np

    # 440 Hz in both channels, the right one inverted: their mean is exactly zero
    rate, f = 44100, 440.0
    t = np.arange(int(0.8 * rate)) / rate
    ring = 0.5 * np.sin(2 * np.pi * f * t) * np.exp(-t / 0.6)
    left = np.round(ring * 32767).astype("<i2")
    frames = np.column_stack([left, -left]).tobytes()
    header = b"RIFF" + struct.pack("<I", 36 + len(frames)) + b"WAVEfmt " + struct.pack(
        "<IHHIIHH", 16, 1, 2, rate, rate * 4, 4, 16) + b"data" + struct.pack("<I", len(frames))
    path = tmp_path / "take.wav"
    path.write_bytes(header + frames)
    result = _run("measure", path)
    assert result.exit_code == 0, result.output
    assert "440." in result.output


def test_a_fundamental_measured_with_little_confidence_is_not_reported(tmp_path, monkeypatch):
    from cutplan.audio import analysis
    from cutplan.cli import measure

    take = tmp_path / "take.wav"
    take.write_bytes(b"")  # never read: the measurement is replaced below
    monkeypatch.setattr(measure, "measure_file", lambda *a, **k: analysis.Measurement(523.3, (523.3,), 0.08,
                                                                                    "chime", False))
    _one_line(_run("measure", take), "confidence 0.08", "too unsure")
    monkeypatch.setattr(measure, "measure_file", lambda *a, **k: analysis.Measurement(523.3, (523.3,), 0.9,
                                                                                    "chime", True))
    assert _run("measure", take).exit_code == 0


def test_a_broken_materials_option_folder_is_not_blamed_on_the_design(tmp_path):
    folder = _folder(tmp_path, "shop.toml", lambda p: p.write_text("sizes = { x = 5 }\n"))
    design = tmp_path / "garden.toml"
    design.write_text('[[set]]\nkind = "chime"\nnotes = ["D5"]\nsection = { stock = "al-1.000x0.065" }\n')
    line = _one_line(_run("plan", design, "--materials", folder), "--materials", "shop.toml")
    assert "garden.toml" not in line

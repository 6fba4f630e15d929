"""Each class of hard input from the hardening work: packet folders written whole, files that
follow the umask, CSV cells that cannot become formulas, names and titles that cannot carry
escape codes, design files checked before they are read, lengths that must carry a unit,
plausible materials, broken recordings, and numeric trouble kept inside.

Scenarios and numbers here are our own demos (garden chimes), not measurements."""

from __future__ import annotations

import csv
import errno
import io
import math
import os
import struct
import threading
import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

from cutplan import folder, numeric
from cutplan.cli import cli

# each distinct recording analysed once (tests/audio/memo.py): the header tests measure the same
# ringing tone.
pytestmark = pytest.mark.usefixtures("one_analysis_per_recording")


CHIMES = '''title = "Garden chimes"
[[set]]
name = "{name}"
kind = "chime"
notes = {notes}
section = {{ stock = "al-1.000x0.065" }}
[stock]
lengths = [{{ length = "8 ft", count = 3 }}]
'''


def _design(tmp_path, notes=("D5", "E5", "F#5", "A5", "B5"), name="garden", file="garden.toml"):
    path = tmp_path / file
    path.write_text(CHIMES.format(name=name, notes=list(notes)).replace("'", '"'), encoding="utf-8")
    return path


def _run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args])


def _one_error_line(result):
    assert result.exit_code == 2, result.output
    lines = [ln for ln in result.output.splitlines() if ln.strip()]
    assert len(lines) >= 1 and all(ln.startswith("error: ") for ln in lines), result.output
    assert "Traceback" not in result.output and "\x1b" not in result.output
    return lines


def _snapshot(root):
    return {str(p.relative_to(root)): p.read_bytes() for p in sorted(Path(root).rglob("*")) if p.is_file()}


# --- packet folders -------------------------------------------------------------------------

def test_force_over_a_larger_earlier_plan_leaves_only_the_new_plans_files_and_the_users(tmp_path):
    out = tmp_path / "packet"
    assert _run("plan", _design(tmp_path), "-o", out).exit_code == 0
    (out / "my-notes.txt").write_text("bought tube at the yard")
    assert _run("plan", _design(tmp_path, notes=("D5", "E5", "F#5")), "-o", out, "--force").exit_code == 0
    names = set(_snapshot(out))
    assert "my-notes.txt" in names
    assert not any(n.startswith("templates/garden-4") or n.startswith("templates/garden-5") for n in names)
    assert {"templates/garden-1.svg", "templates/garden-3.svg", "plan.csv", "plan.json"} <= names
    assert "D5" in (out / "plan.csv").read_text() and "A5" not in (out / "plan.csv").read_text()
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".packet")]  # no leftovers


def test_without_force_a_non_empty_folder_is_refused(tmp_path):
    out = tmp_path / "packet"
    out.mkdir()
    (out / "mine.txt").write_text("x")
    lines = _one_error_line(_run("plan", _design(tmp_path), "-o", out))
    assert "--force" in lines[0]


@pytest.mark.parametrize("err", [errno.ENOSPC, errno.EROFS])
def test_a_write_failing_halfway_leaves_the_previous_packet_byte_identical(tmp_path, monkeypatch, err):
    out = tmp_path / "packet"
    assert _run("plan", _design(tmp_path), "-o", out).exit_code == 0
    before = _snapshot(out)
    real, calls = folder.write_bytes, []

    def failing(path, payload):
        calls.append(path)
        if len(calls) == 4:  # the disk fills up (or turns read-only) on the fourth file
            raise OSError(err, os.strerror(err), str(path))
        real(path, payload)

    monkeypatch.setattr(folder, "write_bytes", failing)
    result = _run("plan", _design(tmp_path, notes=("C5", "G5")), "-o", out, "--force")
    lines = _one_error_line(result)
    assert len(lines) == 1 and "cannot write" in lines[0] and str(out) in lines[0]
    assert _snapshot(out) == before
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".packet")]


def test_files_follow_the_umask(tmp_path):
    old = os.umask(0o022)
    try:
        out = tmp_path / "packet"
        assert _run("plan", _design(tmp_path), "-o", out).exit_code == 0
        modes = {p.name: p.stat().st_mode & 0o777 for p in out.rglob("*")}
        assert set(modes.values()) <= {0o644, 0o755}
        assert modes["plan.csv"] == 0o644 and modes["templates"] == 0o755
        sounds = tmp_path / "sounds"
        assert _run("listen", _design(tmp_path, notes=("D5",)), "-o", sounds).exit_code == 0
        assert {p.stat().st_mode & 0o777 for p in sounds.iterdir()} == {0o644}
    finally:
        os.umask(old)


def test_listen_force_replaces_its_own_wavs(tmp_path):
    sounds = tmp_path / "sounds"
    assert _run("listen", _design(tmp_path, notes=("D5", "E5")), "-o", sounds).exit_code == 0
    assert _run("listen", _design(tmp_path, notes=("D5",)), "-o", sounds, "--force").exit_code == 0
    assert sorted(p.name for p in sounds.iterdir() if not p.name.startswith(".")) == [
        "garden-1.wav", "garden-arpeggio.wav"]


def test_write_file_whole_follows_the_umask_and_refuses_overwriting(tmp_path):
    old = os.umask(0o022)
    try:
        folder.write_file_whole(tmp_path / "al.toml", "x = 1\n")
        assert (tmp_path / "al.toml").stat().st_mode & 0o777 == 0o644
        with pytest.raises(folder.FolderError, match="already exists"):
            folder.write_file_whole(tmp_path / "al.toml", "x = 2\n")
    finally:
        os.umask(old)


# --- CSV, names, titles ---------------------------------------------------------------------

def test_a_set_named_like_a_formula_cannot_become_one(tmp_path):
    result = _run("plan", _design(tmp_path, name="=1+1"), "--format", "csv")
    assert result.exit_code == 0, result.output
    rows = list(csv.reader(io.StringIO(result.output)))
    for row in rows[1:]:
        for cell in row:
            if cell[:1] in ("=", "+", "-", "@"):
                float(cell)  # only plain numbers such as -3.20 may start so
    assert rows[1][0] == "'=1+1"


@pytest.mark.parametrize("title", ["Garden\x1b[31m chimes", "Garden\nchimes", "Garden \u202echimes"])
def test_a_title_with_control_characters_is_refused_cleanly(tmp_path, title):
    path = tmp_path / "garden.toml"
    path.write_text(CHIMES.format(name="garden", notes='["D5"]').replace('"Garden chimes"',
                    '"' + title.encode("unicode_escape").decode().replace("\\x1b", "\\u001b") + '"'), encoding="utf-8")
    lines = _one_error_line(_run("plan", path))
    assert len(lines) == 1 and "title" in lines[0]


def test_a_title_with_markup_characters_gives_well_formed_svg(tmp_path):
    out = tmp_path / "packet"
    path = _design(tmp_path)
    path.write_text(path.read_text().replace("Garden chimes", "Garden <chimes> & \\\"bells\\\""), encoding="utf-8")
    assert _run("plan", path, "-o", out).exit_code == 0
    for svg in (out / "templates").glob("*.svg"):
        ET.parse(svg)


@pytest.mark.parametrize("name", ["-rf", ".hidden", "a/b", "CON", "bell\x07", "x\u200dy"])
def test_set_names_that_make_unsafe_file_names_are_refused(tmp_path, name):
    path = tmp_path / "garden.toml"
    path.write_text(CHIMES.format(name=name.replace("\x07", "\\u0007").replace("\u200d", "\\u200d"),
                                  notes='["D5"]'), encoding="utf-8")
    lines = _one_error_line(_run("plan", path))
    assert any("set[1].name" in ln for ln in lines)


# --- design files read safely ---------------------------------------------------------------

def test_a_utf8_byte_order_mark_is_accepted(tmp_path):
    path = _design(tmp_path)
    path.write_bytes(b"\xef\xbb\xbf" + path.read_bytes())
    assert _run("plan", path).exit_code == 0


def test_a_named_pipe_is_refused_without_blocking(tmp_path):
    fifo = tmp_path / "pipe.toml"
    os.mkfifo(fifo)
    box = {}
    worker = threading.Thread(target=lambda: box.setdefault("r", _run("plan", fifo)), daemon=True)
    worker.start()
    worker.join(20)
    assert not worker.is_alive(), "reading a named pipe blocked"
    assert "regular file" in _one_error_line(box["r"])[0]


def test_a_device_and_a_huge_file_are_refused_before_reading(tmp_path):
    assert "regular file" in _one_error_line(_run("plan", "/dev/zero"))[0]
    big = tmp_path / "big.toml"
    with open(big, "wb") as fh:
        fh.truncate(2 * 10**9)  # sparse: 2 GB long, nothing written
    assert "bytes" in _one_error_line(_run("plan", big))[0]


def test_deeply_nested_brackets_are_one_line(tmp_path):
    path = tmp_path / "nest.toml"
    path.write_text("x = " + "[" * 5000 + "]" * 5000 + "\n")
    lines = _one_error_line(_run("plan", path))
    assert len(lines) == 1


BARS_AND_RESONATORS = (
    '[[set]]\nname = "bars"\nkind = "bar"\nratios = ["1", "5/4"]\nroot = "C5"\nmaterial = "maple-sugar"\n'
    'section = { shape = "bar", width = "40 mm", thickness = "20 mm" }\n'
    '[[set]]\nname = "r"\nkind = "resonator"\nserves = "bars"\nhumidity = 50\nsection = { stock = "pvc-sch40-2" }\n'
    'max_length = "1 m"\n'
)


@pytest.mark.parametrize(("old", "new", "key"), [
    ('root = "C5"', 'root = ["C5"]', "set[1].root"), ('serves = "bars"', 'serves = ["bars"]', "set[2].serves"),
    ("humidity = 50", 'humidity = "~50%"', "set[2].humidity"),
    ('max_length = "1 m"', 'max_length = "' + "1" * 400 + ' mm"', "set[2].max_length"),
    ('max_length = "1 m"', "max_length = " + "1" * 400, "set[2].max_length"),
    ('max_length = "1 m"', '[stock]\nlengths = ["1e9 m"]', "stock.lengths[1].length"),
])
def test_wrong_types_and_sizes_are_one_line_each(tmp_path, old, new, key):
    path = tmp_path / "g.toml"
    assert _run("plan", _write(path, BARS_AND_RESONATORS)).exit_code == 0
    (line,) = _one_error_line(_run("plan", _write(path, BARS_AND_RESONATORS.replace(old, new))))
    assert f": {key}: " in line


def _write(path, text):
    path.write_text(text, encoding="utf-8")
    return path


# --- units and ranges -----------------------------------------------------------------------

def test_a_bare_length_in_a_design_suggests_inches_and_millimetres(tmp_path):
    path = tmp_path / "g.toml"
    path.write_text('[[set]]\nkind = "chime"\nnotes = ["D5"]\nmaterial = "aluminum-6063-t5"\n'
                    'section = { shape = "tube", outer = 1, wall = "0.065 in" }\n')
    (line,) = _one_error_line(_run("plan", path))
    assert "set[1].section.outer" in line and '"1 in"' in line and '"1 mm"' in line


@pytest.mark.parametrize(("option", "value", "named"), [
    ("--stock", "96 x 2", "--stock"), ("--kerf", "1/16", "--kerf"), ("--end-trim", "-1/8 in", "--end-trim"),
    ("--kerf", "-1 mm", "--kerf"), ("--stock", "1e9 m", "--stock"),
])
def test_command_line_stock_kerf_and_end_trim_get_the_design_ranges(option, value, named):
    args = ["cutlist", "examples/porch-chimes.toml", "--stock", "8 ft"] + [option, value]
    lines = _one_error_line(_run(*args))
    assert any(ln.startswith(f"error: {named}") for ln in lines)


def test_implausible_materials_are_refused_and_unusual_ones_accepted(tmp_path):
    path = tmp_path / "g.toml"
    body = ('[[set]]\nkind = "chime"\nnotes = ["D5"]\nsection = { stock = "al-1.000x0.065" }\n'
            'material = { modulus = "68.9 MPa", density = "2700 kg/m3", class = "metal"%s }\n')
    path.write_text(body % "")
    (line,) = _one_error_line(_run("plan", path))
    assert "10-450 GPa" in line and "unusual = true" in line
    path.write_text(body % ", unusual = true")
    assert _run("plan", path).exit_code == 0


def test_every_shipped_material_is_plausible_for_its_class():
    from cutplan.materials import load_library
    from cutplan.plausibility import material_problems

    lib = load_library()
    assert all(m.material_class for m in lib.materials.values())
    assert {name: material_problems(m) for name, m in lib.materials.items() if material_problems(m)} == {}


@pytest.mark.parametrize("measured", ["400", "520", "130", "5000"])
def test_trim_of_an_air_column_far_off_pitch_refuses_cleanly(measured):
    result = _run("trim", "examples/classroom-pipes.toml", "pipes-1", "--measured", measured)
    if result.exit_code != 0:
        assert len(_one_error_line(result)) == 1


# --- recordings -----------------------------------------------------------------------------

RATE = 44100


def _wav(samples, riff=None, data_size=None, channels=1, block=None):
    data = (np.asarray(samples) * 32767).astype("<i2").tobytes()
    riff = 36 + len(data) if riff is None else riff
    block = 2 * channels if block is None else block
    return (struct.pack("<4sI4s", b"RIFF", riff, b"WAVE")
            + struct.pack("<4sIHHIIHH", b"fmt ", 16, 1, channels, RATE, RATE * block, block, 16)
            + struct.pack("<4sI", b"data", len(data) if data_size is None else data_size) + data)


def _ring(f=587.33, seconds=1.0):
    t = np.arange(int(RATE * seconds)) / RATE
    return 0.5 * np.sin(2 * np.pi * f * t) * np.exp(-2 * t)


@pytest.mark.parametrize(("riff", "data_size"), [(0, None), (12, None), (None, 0xFFFFFFFF), (0, 0)])
def test_interrupted_and_streaming_headers_are_read_to_the_end_of_the_file(tmp_path, riff, data_size):
    from cutplan.audio.wav import read_wav

    path = tmp_path / "take.wav"
    path.write_bytes(_wav(_ring(), riff, data_size))
    samples, rate = read_wav(path)
    assert rate == RATE and samples.size == RATE  # one second, not 812 minutes
    result = _run("measure", path, "--near", "D5")
    assert result.exit_code == 0 and "D5" in result.output


@pytest.mark.parametrize(("kwargs", "words"), [
    ({"channels": 40}, "channels"), ({"block": 3}, "block size"), ({"channels": 0}, "channels"),
])
def test_damaged_headers_are_one_line(tmp_path, kwargs, words):
    path = tmp_path / "take.wav"
    path.write_bytes(_wav(_ring(), **kwargs))
    (line,) = _one_error_line(_run("measure", path))
    assert words in line and "take.wav" in line


def test_a_click_is_not_measured(tmp_path):
    click = np.zeros(RATE)
    click[100:120] = 0.8
    path = tmp_path / "click.wav"
    path.write_bytes(_wav(click))
    _one_error_line(_run("measure", path))


def test_near_is_honoured_strictly(tmp_path):
    path = tmp_path / "take.wav"
    path.write_bytes(_wav(_ring(587.33)))
    (line,) = _one_error_line(_run("measure", path, "--near", "D6"))
    assert "half an octave" in line


# --- numeric trouble ------------------------------------------------------------------------

def test_an_overflow_in_a_solver_becomes_one_clear_error():
    def overflowing():
        return math.exp(1e6)

    with pytest.raises(numeric.NumericError, match="overflowed"):
        numeric.checked_plan(overflowing, "garden.toml")


def test_numpy_warnings_stay_inside():
    # pytest turns warnings into errors here, so a leak would raise
    assert math.isinf(numeric.quiet(lambda: float(np.float64(1e308) * 10)))
    assert numeric.quiet(lambda: np.log(np.zeros(2)))[0] == -math.inf


def test_an_interrupted_run_leaves_the_previous_packet_and_its_leftovers_are_cleared(tmp_path, monkeypatch):
    out = tmp_path / "packet"
    assert _run("plan", _design(tmp_path), "-o", out).exit_code == 0
    before = _snapshot(out)
    real, calls = folder.write_bytes, []

    def interrupted(path, payload):
        calls.append(path)
        if len(calls) == 3:
            raise KeyboardInterrupt  # Ctrl-C halfway through the packet
        real(path, payload)

    monkeypatch.setattr(folder, "write_bytes", interrupted)
    with pytest.raises(KeyboardInterrupt):
        folder.write_folder(out, {"plan.csv": "a", "plan.json": "b", "packet.pdf": b"c"}, force=True)
    assert _snapshot(out) == before
    monkeypatch.setattr(folder, "write_bytes", real)
    (tmp_path / ".packet.cutplan-killed").mkdir()  # what a SIGKILL leaves beside the folder
    (tmp_path / ".packet.cutplan-killed" / "plan.csv").write_text("half")
    assert _run("plan", _design(tmp_path), "-o", out, "--force").exit_code == 0
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".packet")] == []


def test_the_current_folder_is_not_swapped_out_from_under_the_user(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    (line,) = _one_error_line(_run("plan", _design(tmp_path), "-o", ".", "--force"))
    assert "current folder" in line

"""Design files: good ones load; 30+ broken ones each give one line naming the key, exit code 2."""

import pytest
from click.testing import CliRunner

from cutplan.cli import cli
from cutplan.design import DesignErrors, load_design
from cutplan.materials import load_library

GOOD_SET = """
[[set]]
name = "porch"
kind = "chime"
notes = ["D5", "E5"]
material = "aluminum-6063-t5"
section = { shape = "tube", outer = "1 in", wall = "0.065 in" }
"""


def load(tmp_path, text, name="d.toml"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return load_design(path, lambda dirs: load_library(dirs))


def test_good_design_loads(tmp_path):
    design, _ = load(tmp_path, 'title = "x"\n' + GOOD_SET)
    assert design.sets[0].name == "porch"
    assert [t.name for t in design.sets[0].targets] == ["D5", "E5"]


def test_all_problems_are_reported_at_once(tmp_path):
    text = GOOD_SET.replace('"0.065 in"', '"-1 mm"').replace('"D5", "E5"', '"D5", "Q9"') + 'units = "cubits"\n'
    with pytest.raises(DesignErrors) as info:
        load(tmp_path, 'units = "cubits"\n' + text.replace('units = "cubits"\n', ""))
    keys = [e.key for e in info.value.errors]
    assert "units" in keys and "set[1].section.wall" in keys and "set[1].notes" in keys


def test_message_shape(tmp_path):
    with pytest.raises(DesignErrors) as info:
        load(tmp_path, GOOD_SET.replace('"0.065 in"', '"-1 mm"'))
    assert str(info.value.errors[0]).endswith('d.toml: set[1].section.wall: "-1 mm" must be positive')


BROKEN = {
    # name: (file text, key expected in the one-line message)
    "empty file": ("", "(file)"),
    "whitespace only": ("\n\n  \n", "(file)"),
    "binary garbage": (b"\x00\x01\xff\xfe\x89PNG\r\n", "(file)"),
    "not toml": ("title = \n[[set\n", "(file)"),
    "no sets": ('title = "x"\n', "set:"),
    "set not array": ('set = "chimes"\n', "set:"),
    "unknown top key": ('colour = "red"\n' + GOOD_SET, "colour"),
    "bad units": ('units = "cubits"\n' + GOOD_SET, "units"),
    "bad paper": ('paper = "A3"\n' + GOOD_SET, "paper"),
    "bad a4": ("[tuning]\na4 = 1000\n" + GOOD_SET, "tuning.a4"),
    "bad a4 type": ('[tuning]\na4 = "loud"\n' + GOOD_SET, "tuning.a4"),
    "bad temperament": ('[tuning]\ntemperament = "mean"\n' + GOOD_SET, "tuning.temperament"),
    "missing kind": (GOOD_SET.replace('kind = "chime"\n', ""), "set[1].kind"),
    "unknown kind": (GOOD_SET.replace('"chime"', '"gong"'), "set[1].kind"),
    "unknown set key": (GOOD_SET + 'colour = "red"\n', "set[1].colour"),
    "unknown note": (GOOD_SET.replace('"E5"', '"H5"'), "set[1].notes"),
    "empty notes": (GOOD_SET.replace('["D5", "E5"]', "[]"), "set[1].notes"),
    "notes not list": (GOOD_SET.replace('["D5", "E5"]', '"D5"'), "set[1].notes"),
    "ten thousand notes": (GOOD_SET.replace('["D5", "E5"]', "[" + ", ".join(['"D5"'] * 10000) + "]"), "set[1].notes"),
    "notes and scale": (GOOD_SET + 'scale = "major"\nroot = "C4"\ncount = 3\n', "set[1]:"),
    "scale no root": (GOOD_SET.replace('notes = ["D5", "E5"]', 'scale = "major"\ncount = 3'), "set[1].root"),
    "scale bad count": (GOOD_SET.replace('notes = ["D5", "E5"]', 'scale = "major"\nroot = "C4"\ncount = 0'), "set[1].count"),
    "unknown scale": (GOOD_SET.replace('notes = ["D5", "E5"]', 'scale = "majorish"\nroot = "C4"\ncount = 3'), "set[1].scale"),
    "bad frequency": (GOOD_SET.replace('notes = ["D5", "E5"]', 'frequencies = [440, "loud"]'), "set[1].frequencies[2]"),
    "negative frequency": (GOOD_SET.replace('notes = ["D5", "E5"]', "frequencies = [-440]"), "set[1].frequencies[1]"),
    "cents without root": (GOOD_SET.replace('notes = ["D5", "E5"]', "cents = [0, 200]"), "set[1].root"),
    "unknown material": (GOOD_SET.replace('"aluminum-6063-t5"', '"unobtainium"'), "set[1].material"),
    "inline material missing density": (GOOD_SET.replace('"aluminum-6063-t5"', '{ modulus = "70 GPa" }'), "set[1].material.density"),
    "inline material bad unit": (GOOD_SET.replace('"aluminum-6063-t5"', '{ modulus = "70 GPx", density = "2700 kg/m3" }'), "set[1].material.modulus.value"),
    "missing section": (GOOD_SET.replace('section = { shape = "tube", outer = "1 in", wall = "0.065 in" }', ""), "set[1].section"),
    "negative wall": (GOOD_SET.replace('"0.065 in"', '"-1 mm"'), "set[1].section.wall"),
    "wall over radius": (GOOD_SET.replace('"0.065 in"', '"0.6 in"'), "set[1].section.wall"),
    "bad outer unit": (GOOD_SET.replace('"1 in"', '"1 furlong"'), "set[1].section.outer"),
    "huge outer": (GOOD_SET.replace('"1 in"', '"1 m"'), "set[1].section.outer"),
    "unknown shape": (GOOD_SET.replace('shape = "tube"', 'shape = "hexagon"'), "set[1].section.shape"),
    "bar shape in chime set": (GOOD_SET.replace('{ shape = "tube", outer = "1 in", wall = "0.065 in" }', '{ shape = "bar", width = "1 in", thickness = "0.5 in" }'), "set[1].section.shape"),
    "unknown stock size": (GOOD_SET.replace('{ shape = "tube", outer = "1 in", wall = "0.065 in" }', '{ stock = "pvc-sch99-7" }'), "set[1].section.stock"),
    "wall and inner": (GOOD_SET.replace('wall = "0.065 in"', 'wall = "0.065 in", inner = "0.8 in"'), "set[1].section:"),
    "bad model": (GOOD_SET + 'model = "quantum"\n', "set[1].model"),
    "air key on chime": (GOOD_SET + 'ends = "open-open"\n', "set[1].ends"),
    "bad ends": ('[[set]]\nkind = "air-column"\nnotes = ["C4"]\nsection = { stock = "pvc-sch40-1" }\nends = "open-shut"\n', "set[1].ends"),
    "bad temperature": ('[[set]]\nkind = "air-column"\nnotes = ["C4"]\nsection = { stock = "pvc-sch40-1" }\ntemperature = "90 C"\n', "set[1].temperature"),
    "bad humidity": ('[[set]]\nkind = "air-column"\nnotes = ["C4"]\nsection = { stock = "pvc-sch40-1" }\nhumidity = 150\n', "set[1].humidity"),
    "resonator serves nothing": ('[[set]]\nkind = "resonator"\nserves = "bars"\nsection = { stock = "pvc-sch40-1" }\n', "set[1].serves"),
    "duplicate set names": (GOOD_SET + GOOD_SET, "set[2].name"),
    "bad kerf": (GOOD_SET + '[stock]\nkerf = "5 cm"\n', "stock.kerf"),
    "bad stock length": (GOOD_SET + '[stock]\nlengths = [{ length = "long" }]\n', "stock.lengths[1].length"),
    "bad stock count": (GOOD_SET + '[stock]\nlengths = [{ length = "8 ft", count = -2 }]\n', "stock.lengths[1].count"),
    "bad allowance": (GOOD_SET + '[stock]\nallowance = "50 %"\n', "stock.allowance"),
    "note too low for stock": (GOOD_SET.replace('"D5", "E5"', '"C2"') + '[stock]\nlengths = [{ length = "4 ft" }]\n', "set[1]:"),
    "note too high for bore": ('[[set]]\nkind = "air-column"\nnotes = ["C8"]\nsection = { stock = "pvc-sch40-4" }\n', "set[1]:"),
}


@pytest.mark.parametrize("name", sorted(BROKEN))
def test_broken_design_gives_one_line_per_problem_and_exit_code_2(tmp_path, name):
    text, key = BROKEN[name]
    path = tmp_path / "broken.toml"
    if isinstance(text, bytes):
        path.write_bytes(text)
    else:
        path.write_text(text, encoding="utf-8")
    result = CliRunner().invoke(cli, ["plan", str(path)])
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    lines = [ln for ln in result.output.splitlines() if ln.strip()]
    assert lines, "no message"
    assert all(ln.startswith("error: ") and "broken.toml" in ln for ln in lines), lines
    assert any(f": {key}" in ln or f"{key}" in ln.split("broken.toml", 1)[1] for ln in lines), (key, lines)


def test_at_least_thirty_broken_files():
    assert len(BROKEN) >= 30


def test_missing_file(tmp_path):
    result = CliRunner().invoke(cli, ["plan", str(tmp_path / "nope.toml")])
    assert result.exit_code == 2
    assert "does not exist" in result.output


def test_material_dirs_relative_to_design(tmp_path):
    (tmp_path / "mats").mkdir()
    (tmp_path / "mats" / "m.toml").write_text('[shed-pipe]\nmodulus = "70 GPa"\ndensity = "2700 kg/m3"\n', encoding="utf-8")
    design, _ = load(tmp_path, 'material_dirs = ["mats"]\n' + GOOD_SET.replace("aluminum-6063-t5", "shed-pipe"))
    assert design.sets[0].material.modulus == 70e9


def test_the_design_package_keeps_its_public_names():
    # the split into cutplan/design/ keeps every name callers import
    from cutplan.design import (  # noqa: F401
        DEFAULT_SHARP_RISK,
        Design,
        DesignError,
        DesignErrors,
        SetSpec,
        StockLength,
        StockSpec,
        Undercut,
        design_from_mapping,
        load_design,
        read_design_file,
    )

    assert issubclass(DesignError, ValueError) and issubclass(DesignErrors, ValueError)

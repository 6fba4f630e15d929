"""Every command through click's CliRunner: exit codes, one-line errors, files written."""

import json
import re
from pathlib import Path

import pytest
from click.testing import CliRunner

from cutplan import __version__
from cutplan.cli import cli

ROOT = Path(__file__).resolve().parent.parent
PORCH = str(ROOT / "examples" / "porch-chimes.toml")


def run(*args):
    return CliRunner().invoke(cli, list(args))


def test_version_and_help():
    assert __version__ in run("--version").output
    for command in ("plan", "scale", "materials", "length", "new"):
        result = run(command, "--help")
        assert result.exit_code == 0
        assert "Example" in result.output


def test_plan_table_shows_mm_and_inches():
    result = run("plan", PORCH)
    assert result.exit_code == 0
    assert "porch-1" in result.output and " in" in result.output and "mm" in result.output
    assert "Safety" in result.output


def test_plan_json_and_csv():
    data = json.loads(run("plan", PORCH, "--format", "json").output)
    assert data["format"] == "cutplan-plan/1" and len(data["pieces"]) == 5
    csv_text = run("plan", PORCH, "--format", "csv").output
    assert csv_text.splitlines()[0].startswith("set,label,note")
    assert len(csv_text.splitlines()) == 6


def test_plan_writes_output_folder_and_refuses_to_overwrite(tmp_path):
    out = tmp_path / "packet"
    assert run("plan", PORCH, "-o", str(out)).exit_code == 0
    assert (out / "plan.csv").exists() and (out / "plan.json").exists()
    again = run("plan", PORCH, "-o", str(out))
    assert again.exit_code == 2 and "--force" in again.output
    assert run("plan", PORCH, "-o", str(out), "--force").exit_code == 0
    assert not list(out.glob("*.part"))


def test_plan_output_that_is_a_file(tmp_path):
    f = tmp_path / "file.txt"
    f.write_text("x")
    result = run("plan", PORCH, "-o", str(f))
    assert result.exit_code == 2 and "folder" in result.output


def test_units_option():
    assert "in (" in run("plan", PORCH, "--units", "in").output


def test_scale_command():
    result = run("scale", "D5 major-pentatonic 5")
    assert result.exit_code == 0
    assert "F#5" in result.output and "587.330" in result.output
    just = run("scale", "C4..C5 major", "--temperament", "just")
    assert "-13.69" in just.output  # E4 just (5/4) is 13.69 cents flat of equal temperament


@pytest.mark.parametrize("spec", ["", "Q4 major 5", "C4 majorish", "C4 major 0", "C4..B3"])
def test_scale_bad_spec(spec):
    result = run("scale", spec)
    assert result.exit_code == 2 and "Traceback" not in result.output
    assert result.output.startswith("error: ")


def test_materials_list_and_one():
    result = run("materials")
    assert result.exit_code == 0 and "maple-sugar" in result.output and "pvc-sch40-2" in result.output
    one = run("materials", "copper-l-1/2")
    assert "0.625 in" in one.output and "ASTM B88" in one.output
    mat = run("materials", "aluminum-6061-t6")
    assert "68.900 GPa" in mat.output and "source of modulus" in mat.output
    bad = run("materials", "unobtainium")
    assert bad.exit_code == 2 and "unobtainium" in bad.output


def test_length_one_off_questions():
    chime = run("length", "--note", "D5", "--stock", "al-1.000x0.065")
    assert chime.exit_code == 0 and "hang hole 1" in chime.output
    bar = run("length", "--kind", "bar", "--note", "C5", "--material", "maple-sugar", "--bar", "40 mm x 20 mm")
    assert bar.exit_code == 0 and "support 1" in bar.output
    air = run("length", "--kind", "air-column", "--frequency", "440", "--stock", "pvc-sch40-1", "--ends", "closed-open")
    assert air.exit_code == 0 and "length" in air.output


@pytest.mark.parametrize(
    "args",
    [
        ["length"],
        ["length", "--note", "D5"],
        ["length", "--note", "D5", "--tube", "1 in"],
        ["length", "--note", "Z5", "--stock", "al-1.000x0.065"],
        ["length", "--note", "D5", "--tube", '1 in" x 0.065 in', "--material", "steel-1018"],
        ["length", "--note", "D5", "--stock", "nope"],
    ],
)
def test_length_bad_input(args):
    result = run(*args)
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output and result.output.startswith("error: ")


@pytest.mark.parametrize("kind", ["chime", "bar", "air-column"])
def test_new_writes_a_starter_that_plans(tmp_path, kind):
    path = tmp_path / f"{kind}.toml"
    assert run("new", kind, str(path)).exit_code == 0
    assert run("plan", str(path)).exit_code == 0
    again = run("new", kind, str(path))
    assert again.exit_code == 2 and "exists" in again.output


def test_new_to_screen():
    assert "[[set]]" in run("new", "chime").output


def test_user_materials_folder_option(tmp_path):
    (tmp_path / "mats").mkdir()
    (tmp_path / "mats" / "m.toml").write_text('[yard-pipe]\nmodulus = "69 GPa"\ndensity = "2700 kg/m3"\n')
    design = tmp_path / "d.toml"
    design.write_text(Path(PORCH).read_text().replace('"aluminum-6063-t5"', '"yard-pipe"'))
    assert run("plan", str(design), "--materials", str(tmp_path / "mats")).exit_code == 0


def test_usage_errors_are_one_line_with_exit_code_2():
    # a value outside a choice, a missing argument and an unknown command: one line each, exit 2
    for args in (["plan", "x.toml", "--units", "ft"], ["plan"], ["frob"]):
        result = CliRunner().invoke(cli, args)
        assert result.exit_code == 2, args
        lines = [line for line in result.output.splitlines() if line.strip()]
        assert len(lines) == 1 and lines[0].startswith("error: "), (args, result.output)


def test_materials_listing_fits_100_columns_and_names_each_source_once():
    # 100 columns: the widest terminal line the project's style allows (common practice for CLI text)
    listing = run("materials").output
    assert max(len(line) for line in listing.splitlines()) <= 100
    entry = run("materials", "aluminum-6063-t5").output
    assert max(len(line) for line in entry.splitlines()) <= 100
    assert entry.count("source of") == 1 and "source of modulus, density, poisson" in entry


def test_scale_spells_flats_in_flat_keys_and_suggests_scales():
    # F major has one flat, Bb (key signatures: Kostka, Payne & Almen, Tonal Harmony, ch. 1; from memory)
    out = run("scale", "F3 major 4").output
    assert "Bb3" in out and "A#3" not in out
    assert "A#3" in run("scale", "F3 major 4", "--spelling", "sharps").output
    bad = run("scale", "D4 pentatonic")
    assert bad.exit_code == 2 and "did you mean major-pentatonic or minor-pentatonic?" in bad.output


FRACTION = r"(\d+)/(\d+) in"


@pytest.mark.parametrize("den", ["8", "16"])
def test_length_and_from_stock_show_inches_to_the_asked_fraction(den):
    # the design key inch_denominator as an option: every fraction shown is a multiple of 1/den
    # (reduced fractions of 1/den have a denominator dividing den; arithmetic, not a model)
    out = [run("length", "--note", "D5", "--stock", "al-1.000x0.065", "--units", "in", "--inch-denominator", den),
           run("from-stock", "--have", "8 ft x 1", "--stock-size", "al-1.000x0.065", "--count", "3", "--top", "2",
               "--inch-denominator", den)]
    for result in out:
        assert result.exit_code == 0, result.output
        fractions = re.findall(FRACTION, result.output)
        assert fractions
        assert all(int(den) % int(d) == 0 for _n, d in fractions), fractions


def test_inch_denominator_option_takes_only_the_design_keys_values():
    result = run("length", "--note", "D5", "--stock", "al-1.000x0.065", "--inch-denominator", "12")
    assert result.exit_code == 2
    assert "--inch-denominator" in result.output and "12" in result.output


def test_cut_list_json_groups_name_their_material():
    # each group of the cut list is keyed on the material id the design file gives its set
    # (examples/porch-chimes.toml: material = "aluminum-6063-t5")
    result = run("cutlist", PORCH, "--format", "json")
    assert result.exit_code == 0, result.output
    groups = json.loads(result.output)["groups"]
    assert groups and all(g["material"] == "aluminum-6063-t5" for g in groups)

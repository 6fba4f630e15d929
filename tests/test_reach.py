"""A set the beam model cannot plan is refused in a builder's words (the key, the note, the
highest pitch the section reaches), one line, exit 2; a planned length that its own f(L) puts off
its target is refused, not printed."""

import dataclasses
import math

import pytest
from click.testing import CliRunner

import cutplan
from cutplan.cli import cli
from cutplan.design import DesignError
from cutplan.planning import reach

TOO_HIGH = '''[[set]]
name = "porch"
kind = "chime"
notes = ["D5", "C8"]
material = { modulus = "70 GPa", density = "2700 kg/m3", shear_ratio = 0.01, unusual = true }
section = { stock = "al-1.000x0.065" }
'''


def _run(tmp_path, text):
    path = tmp_path / "d.toml"
    path.write_text(text)
    return CliRunner().invoke(cli, ["plan", str(path)])


def test_a_note_above_the_sections_reach_names_key_value_and_limit(tmp_path):
    result = _run(tmp_path, TOO_HIGH)
    assert result.exit_code == 2 and "Traceback" not in result.output
    lines = [line for line in result.output.splitlines() if line.strip()]
    assert len(lines) == 1, lines
    line = lines[0]
    assert 'set[1].notes: "C8"' in line and "too high" in line and "choose notes up to" in line
    assert "math domain" not in line and "cannot be planned" not in line
    high = float(line.split(" sounds ")[1].split(" Hz")[0])
    shortest_mm = float(line.split("covers, ")[1].split(" mm")[0])
    # shear and rotary inertia only lower a beam's pitch (Timoshenko, Phil. Mag. 41, 1921): the
    # limit lies below the Euler-Bernoulli pitch of the same length, f = 22.373 / (2 pi L^2)
    # sqrt(EI / mu) (Blevins, Formulas for Natural Frequency and Mode Shape, 1979, table 8-1)
    outer, inner = 0.0254, 0.0254 - 2 * 0.065 * 0.0254
    ei = 70e9 * math.pi * (outer**4 - inner**4) / 64
    mu = 2700 * math.pi * (outer**2 - inner**2) / 4
    euler = 22.373 / (2 * math.pi * (shortest_mm / 1000) ** 2) * math.sqrt(ei / mu)
    assert 0 < high < euler
    # and a note a semitone below the limit plans
    below = TOO_HIGH.replace('notes = ["D5", "C8"]', f'frequencies = ["{high * 2 ** (-1 / 12):.1f} Hz"]')
    result = _run(tmp_path, below)
    assert result.exit_code == 0, result.output


def test_a_length_its_own_model_puts_off_target_is_refused(example_plan):
    # the example's Plan is the session's (tests/conftest.py), planned once for every test that reads it
    design = cutplan.load_design("examples/porch-chimes.toml")
    spec = design.sets[0]
    pieces = [p for p in example_plan("porch-chimes").pieces if p.set == spec.name]
    assert reach.missed_target(design, spec, pieces) is None  # the planned lengths reach their targets
    # 5 % too long: a free-free beam's pitch goes as 1 / L^2 (Blevins 1979, table 8-1), about
    # 169 cents flat, far outside the 5-cent window
    off = [dataclasses.replace(pieces[0], length=pieces[0].length * 1.05)] + pieces[1:]
    error = reach.missed_target(design, spec, off)
    assert isinstance(error, DesignError) and "\n" not in str(error)


@pytest.mark.parametrize("stock, hz, target", [("pvc-sch80-4", 28000, ""), ("pvc-sch40-4", 28000, 'target = "strike-note"\n')])
def test_a_pitch_no_beam_of_the_section_reaches_is_an_error_not_a_plan(tmp_path, stock, hz, target):
    # 4 in pipe (outside diameter 114.3 mm, ASTM D1785): the solvers gave a 78 mm piece whose own
    # printed pitch was 3072 cents under 28 kHz, and a 17 mm "chime" (0.15 diameters long) for the
    # strike note; a piece under about two depths long is no beam (Timoshenko, Phil. Mag. 41, 1921:
    # the shear correction is first order in depth / length)
    text = f'[[set]]\nkind = "chime"\nname = "p"\nfrequencies = ["{hz} Hz"]\n{target}section = {{ stock = "{stock}" }}\n'
    result = _run(tmp_path, text)
    assert result.exit_code == 2 and "Traceback" not in result.output
    lines = [line for line in result.output.splitlines() if line.strip()]
    assert len(lines) == 1 and "set[1].frequencies" in lines[0] and "too high" in lines[0], lines


def test_a_high_chime_the_model_covers_still_plans(tmp_path):
    # 22.3 kHz in 1 in x 0.065 in tube: 65.5 mm, 2.6 diameters long, within the beam model's reach
    text = '[[set]]\nkind = "chime"\nname = "p"\nfrequencies = ["22300 Hz"]\nsection = { stock = "al-1.000x0.065" }\n'
    assert _run(tmp_path, text).exit_code == 0

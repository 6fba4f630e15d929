"""Targets a piece cannot reach are errors (exit 2, one line naming the key, the value and what
would be allowed), never warnings on a plan that is printed anyway."""

import re

import pytest
from click.testing import CliRunner

import cutplan
from cutplan.cli import cli
from cutplan.design import DesignErrors

RESONATED = '''[[set]]
name = "bars"
kind = "bar"
notes = ["C4"]
material = "maple-sugar"
section = {{ shape = "bar", width = "50 mm", thickness = "25 mm" }}

[[set]]
name = "tubes"
kind = "resonator"
serves = "bars"
section = {{ stock = "pvc-sch40-2" }}
temperature = "20 C"
humidity = 50
max_length = "{limit}"
'''

ARCH = '''[[set]]
name = "bars"
kind = "bar"
notes = ["C6"]
material = "rosewood-honduras"
model = "timoshenko"
section = { shape = "bar", width = "50 mm", thickness = "22 mm" }
undercut = { ratios = [4.0], min_thickness = "18 mm" }
'''


def _one_line(tmp_path, text):
    path = tmp_path / "d.toml"
    path.write_text(text)
    result = CliRunner().invoke(cli, ["plan", str(path)])
    assert result.exit_code == 2 and "Traceback" not in result.output, result.output
    lines = [line for line in result.output.splitlines() if line.strip()]
    assert len(lines) == 1, lines
    return lines[0]


def test_a_resonator_longer_than_its_max_length_is_refused(tmp_path):
    # a closed tube sounds c / 4 (L + 0.61 a) (Kinsler, Frey et al., Fundamentals of Acoustics,
    # 4th ed., 2000, sec. 9.2, unflanged end): C4 = 261.63 Hz in 2 in schedule-40 PVC (inside
    # diameter 52.5 mm, ASTM D1785) at 20 C (c = 343.2 m/s) needs about 312 mm
    line = _one_line(tmp_path, RESONATED.format(limit="200 mm"))
    assert line.startswith("error: ") and "set[2].max_length: 200.0 mm" in line and "at least" in line
    needed_mm = float(line.split("needs: ")[1].split(" mm")[0])
    quarter_wave = 343.2 / (4 * 261.63) - 0.61 * 0.0525 / 2
    assert needed_mm / 1000 == pytest.approx(quarter_wave, rel=0.03)


def test_the_same_resonator_within_its_max_length_plans_without_a_warning():
    data = {"set": [{"name": "bars", "kind": "bar", "notes": ["C4"], "material": "maple-sugar",
                     "section": {"shape": "bar", "width": "50 mm", "thickness": "25 mm"}},
                    {"name": "tubes", "kind": "resonator", "serves": "bars", "section": {"stock": "pvc-sch40-2"},
                     "max_length": "400 mm"}]}
    plan = cutplan.plan(cutplan.design_from_mapping(data))
    assert not any("limit" in w.message for p in plan.pieces for w in p.warnings)


def test_an_arch_that_cannot_reach_its_ratio_is_an_unreachable_error_on_the_ratios(tmp_path):
    line = _one_line(tmp_path, ARCH)
    assert "set[1].undercut.ratios: [4.0] cannot be reached" in line and "min_thickness" in line
    # the bar by name and pitch (C6 = 1046.50 Hz at A4 = 440 Hz, equal temperament: ISO 16:1975),
    # lengths in both units (18 mm = 0.709 in, nearest 1/32 in 23/32; 25.4 mm to the inch exactly:
    # NIST SP 811, 2008, appendix B.8)
    assert "C6 (1046.5 Hz)" in line and "min 18.0 mm (23/32 in)" in line, line
    with pytest.raises(DesignErrors) as info:
        cutplan.plan(cutplan.load_design(tmp_path / "d.toml"))
    assert [(e.code, e.key) for e in info.value.errors] == [("unreachable", "set[1].undercut.ratios")]


def test_the_page_puts_an_unreachable_arch_beside_its_ratios():
    from cutplan.web.app import create_app

    client = create_app().test_client()
    fields = {"title": "t", "sets": "1", "set[1].name": "bars", "set[1].kind": "bar", "set[1].notes": "C6",
              "set[1].material": "rosewood-honduras", "set[1].model": "timoshenko",
              "set[1].section.shape": "bar", "set[1].section.width": "50 mm", "set[1].section.thickness": "22 mm",
              "set[1].undercut.ratios": "4", "set[1].undercut.min_thickness": "18 mm"}
    res = client.post("/preview", data=fields).get_json()
    assert not res["ok"] and list(res["errors"]) == ["set[1].undercut.ratios"]


WIDE_TOP_BAR = '''[[set]]
name = "bars"
kind = "bar"
notes = ["G#6"]
material = "rosewood-honduras"
grain = "flat"
section = { shape = "bar", width = "55 mm", thickness = "24 mm" }
undercut = { ratios = [4.0], min_thickness = "5 mm" }
'''


def test_a_wide_top_bar_is_refused_naming_the_note_and_the_cross_width_mode(tmp_path):
    # a 95-110 mm bar 55 mm wide is a short plate: besides bending along its length it bends
    # across its width near its second partial (Rayleigh, The Theory of Sound, 1894, vol. 1,
    # ch. X, from memory: plates have modes with nodal lines along their length; plane stress cannot show
    # them, the width-resolved body can); the refusal names the bar and says what to change
    line = _one_line(tmp_path, WIDE_TOP_BAR)
    assert "set[1].undercut.ratios: [4.0] cannot be reached" in line and "G#6" in line, line
    # 55 mm = 2.165 in, nearest 1/32 in 2-5/32 (25.4 mm to the inch exactly: NIST SP 811, 2008, B.8)
    assert "across its 55.0 mm (2-5/32 in) width" in line and "narrower" in line and "only the fundamental" in line, line


def test_the_refusal_of_an_inch_design_gives_its_lengths_in_inches_first(tmp_path):
    # the same bar in an inch design with sixteenths: every length in the refusal reads inches
    # first, to the nearest 1/16 in, millimetres after (25.4 mm to the inch exactly: NIST SP 811,
    # 2008, appendix B.8); 55 mm is 2.165 in, nearest sixteenth 2-3/16 in
    line = _one_line(tmp_path, 'units = "in"\ninch_denominator = 16\n' + WIDE_TOP_BAR)
    assert "G#6" in line and "across its 2-3/16 in (55.0 mm) width" in line, line
    assert "min 3/16 in (5.0 mm)" in line, line  # 5 mm is 0.197 in: 3/16 in is the nearest sixteenth
    assert not re.findall(r"\d mm(?!\))", line), line  # millimetres only ever in brackets, after inches

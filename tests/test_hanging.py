"""A chime set as an assembly: the hanging in plan.json checked against geometry and hand
calculations (mode shapes, plate drag, pendulum statics), and the packet's hang holes."""

import json
import math
from pathlib import Path

import mpmath
import pytest
from click.testing import CliRunner

import cutplan
from cutplan.cli import cli
from cutplan.render.pdf import render_pdf
from cutplan.render.svg import svg_files
from tests.pdf_text import page_texts

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = ROOT / "examples"
CHIME_EXAMPLES = sorted(p for p in (ROOT / "examples").glob("*.toml") if 'kind = "chime"' in p.read_text())

HEAVY = """
title = "Heavy porch set in 2 in conduit"
units = "in"
[[set]]
name = "heavy"
kind = "chime"
notes = ["C3", "D3", "E3", "G3", "A3", "C4"]
section = { stock = "emt-2" }
"""
SMALL = """
title = "Three small tubes"
[[set]]
name = "small"
kind = "chime"
notes = ["C6", "E6", "G6"]
material = "aluminum-6063-t5"
section = { stock = "al-0.500x0.035" }
"""
GLASS = """
title = "Glass set"
[[set]]
name = "glass"
kind = "chime"
notes = ["G5", "A5", "C6", "D6", "E6"]
material = { modulus = "72 GPa", density = "2520 kg/m3", poisson = 0.22, class = "glass" }
section = { shape = "tube", outer = "18 mm", wall = "1.5 mm" }
hanging = { clearance = "15 mm", tube_gap = "30 mm", breeze = "8 mph" }
"""
STRIKE_NOTE = """
title = "Bell-like set"
[[set]]
name = "bells"
kind = "chime"
notes = ["C5", "E5", "G5"]
target = "strike-note"
material = "aluminum-6063-t5"
section = { stock = "al-1.250x0.065" }
"""
OWN = {"heavy": HEAVY, "small": SMALL, "glass": GLASS, "bells": STRIKE_NOTE}


def run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args])


_PRINTED: dict[str, str] = {}
"""What ``plan --format json`` printed for each design text planned here (once per process)."""


def plan_json(path, example_json=None):
    """What ``cutplan plan PATH --format json`` prints (a fresh copy); for a bundled example, from
    the session fixture that runs the same command once per run (when the test passes it); for a
    design of this file, run once per process for each design text."""
    if example_json is not None and path.parent == EXAMPLES:
        return example_json(path.stem)
    text = Path(path).read_text(encoding="utf-8")
    if text not in _PRINTED:
        result = run("plan", path, "--format", "json")
        assert result.exit_code == 0, result.output
        _PRINTED[text] = result.output
    return json.loads(_PRINTED[text])


def designs(tmp_path):
    paths = list(CHIME_EXAMPLES)
    for name, text in OWN.items():
        p = tmp_path / f"{name}.toml"
        p.write_text(text, encoding="utf-8")
        paths.append(p)
    return paths


def chime_sets(data):
    for s in data["sets"]:
        if s["kind"] == "chime":
            pieces = [p for p in data["pieces"] if p["set"] == s["name"]]
            yield s["hanging"], pieces


def test_striker_and_tubes_clear_each_other_and_the_whole_set_is_weighed(tmp_path, example_json):
    checked = 0
    for path in designs(tmp_path):
        for h, pieces in chime_sets(plan_json(path, example_json)):
            n = len(pieces)
            r = h["hole_circle_diameter_mm"] / 2
            d = h["tube_outer_mm"]
            # tubes hang with their axes on the hole circle, the striker on the centre line
            clearance = r - d / 2 - h["striker_diameter_mm"] / 2
            assert clearance >= h["clearance_min_mm"] - 1e-9, path
            assert h["clearance_min_mm"] >= 10.0 or path.stem == "glass"
            if n > 1:
                gap = 2 * r * math.sin(math.pi / n) - d  # chord between neighbouring tube axes
                assert gap >= h["tube_gap_min_mm"] - 1e-9, path
            # the plate holds every tube inside its edge
            assert h["plate_diameter_mm"] / 2 >= r + d / 2
            assert h["mass_g"] >= sum(p["mass_g"] for p in pieces)
            assert h["mass_g"] == pytest.approx(sum(h["masses_g"].values()), abs=0.2)
            checked += 1
    assert checked >= len(CHIME_EXAMPLES) + len(OWN)


def test_design_options_are_honoured(tmp_path):
    p = tmp_path / "glass.toml"
    p.write_text(GLASS, encoding="utf-8")
    h, _ = next(chime_sets(plan_json(p)))
    assert h["clearance_min_mm"] == 15.0 and h["tube_gap_min_mm"] == 30.0
    # 8 mph = 8 x 0.44704 m/s exactly (international mile and hour)
    assert h["sail"]["breeze_m_s"] == pytest.approx(3.57632)


def phi(mode, x):
    """Free-free mode shape, end amplitude 2: Blevins, Formulas for Natural Frequency and Mode
    Shape, 1979, Table 8-1: phi = cosh bx + cos bx - s (sinh bx + sin bx), s = (cosh b - cos b) /
    (sinh b - sin b), b the root of cos b cosh b = 1 (computed here independently with mpmath)."""
    guess = {1: 4.73, 4: 14.137, 5: 17.279, 6: 20.420}[mode]
    b = mpmath.findroot(lambda z: mpmath.cos(z) * mpmath.cosh(z) - 1, guess)
    s = (mpmath.cosh(b) - mpmath.cos(b)) / (mpmath.sinh(b) - mpmath.sin(b))
    bx = b * x
    return float(mpmath.cosh(bx) + mpmath.cos(bx) - s * (mpmath.sinh(bx) + mpmath.sin(bx)))


def test_free_free_centre_amplitude_matches_the_hand_value():
    # Blevins 1979 Table 8-1 closed form at x = L/2, b = 4.73004: cosh(2.36502) = 5.3689,
    # cos(2.36502) = -0.7150, sinh = 5.2750, sin = 0.6991, s = 0.98250 -> phi = 4.6539 - 5.8697
    # = -1.2157, i.e. 0.608 of the end amplitude 2 (hand calculation)
    assert abs(phi(1, 0.5)) / 2 == pytest.approx(0.6078, abs=2e-4)


@pytest.mark.parametrize("name", ["porch-chimes", "bells"])
def test_striker_height_is_the_best_height_by_the_mode_shapes(tmp_path, example_json, name):
    path = ROOT / "examples" / f"{name}.toml" if name != "bells" else tmp_path / "bells.toml"
    if name == "bells":
        path.write_text(STRIKE_NOTE, encoding="utf-8")
    h, pieces = next(chime_sets(plan_json(path, example_json)))
    modes = (1,) if name != "bells" else (1, 4, 5, 6)  # heard: the fundamental; or with modes 4-6
    assert h["strike_modes"] == list(modes)
    lengths = [p["length_mm"] for p in pieces]

    def score(height):
        return min(min(abs(phi(n, height / length)) / 2 for n in modes) for length in lengths)

    height = h["striker_height_mm"]
    # every tube is struck where it is, and the reported fractions are height / length
    assert h["strike_fractions"] == pytest.approx([height / length for length in lengths], abs=1e-3)
    # the striker hangs below every hang hole and above the shortest tube's end
    assert height > max(p["nodes_mm"][0] for p in pieces)
    assert height + h["striker_thickness_mm"] / 2 < min(lengths)
    best = score(height)
    assert best > 0.25  # away from the nodes of every heard mode
    # no height 10 mm to either side does better (a coarse independent search)
    for other in (height - 10, height + 10):
        if max(p["nodes_mm"][0] for p in pieces) + h["striker_thickness_mm"] < other < min(lengths) - 25:
            assert score(other) <= best + 1e-6


def test_sail_matches_the_hand_calculation_of_drag_and_swing(example_json):
    data = plan_json(ROOT / "examples" / "porch-chimes.toml", example_json)
    h, _ = next(chime_sets(data))
    sail = h["sail"]
    rho, cd, g = 1.225, 1.17, 9.80665  # ISO 2533:1975 sea-level air (from memory); square flat plate
    # square to the flow, Hoerner, Fluid-Dynamic Drag, 1965, ch. 3 (from memory; the same 1.17 is in
    # Matthews, Aeronautical Engineer's Data Book, 2002, Fig. 5.13(b)); standard gravity (CGPM 1901)
    area = (sail["side_mm"] / 1000) ** 2
    v = sail["breeze_m_s"]
    assert sail["drag_n"] == pytest.approx(0.5 * rho * cd * area * v * v, rel=1e-3)
    # pendulum statics: a steady side push F swings a hung mass m on a line l out by l sin(t),
    # tan(t) = F / (m g); the striker line runs 40 mm + 12 mm plate from the pivot to the tops
    line = (40 + 12 + h["striker_height_mm"]) / 1000
    m = (h["striker_mass_g"] + sail["mass_g"]) / 1000
    c = h["striker_clearance_mm"] / 1000
    push_at_min = m * g * math.tan(math.asin(h["clearance_min_mm"] / 1000 / line))
    assert sail["contact_push_n"] == pytest.approx(push_at_min, rel=1e-2)
    assert c >= h["clearance_min_mm"] / 1000
    # sized for twice that push at the breeze, and the next size down would not be
    assert sail["drag_n"] >= 2 * sail["contact_push_n"]
    smaller = (sail["side_mm"] - 5) / 1000
    smaller_mass = sail["mass_g"] / 1000 * (smaller / (sail["side_mm"] / 1000)) ** 2
    push_smaller = (h["striker_mass_g"] / 1000 + smaller_mass) * g * math.tan(
        math.asin(h["clearance_min_mm"] / 1000 / line))
    assert 0.5 * rho * cd * smaller**2 * v * v < 2 * push_smaller
    # the lightest breeze that brings the striker to the tubes: F = push
    assert sail["lightest_breeze_m_s"] == pytest.approx(math.sqrt(2 * sail["contact_push_n"] / (rho * cd * area)),
                                                        abs=0.01)


def test_line_and_fixing_follow_the_load(tmp_path, example_json):
    heavy_path = tmp_path / "heavy.toml"
    heavy_path.write_text(HEAVY, encoding="utf-8")
    heavy, heavy_pieces = next(chime_sets(plan_json(heavy_path)))
    light, _ = next(chime_sets(plan_json(ROOT / "examples" / "porch-chimes.toml", example_json)))
    g = 9.80665
    for h in (heavy, light):
        assert h["safety_factor"] == 5
        assert h["hook_rating_kg"] == pytest.approx(5 * h["mass_g"] / 1000, abs=0.01)
        if h["hook"] is not None:
            assert h["hook"]["rated_kg"] >= h["hook_rating_kg"]
        for line in h["lines"]:
            # every line, weakened to half at a knot (from memory), breaks at no less than the
            # safety factor times what it carries (the plate's lines share the weight three ways)
            assert line["knotted_n"] == pytest.approx(line["breaking_n"] / 2, abs=1)
            assert line["knotted_n"] >= 5 * line["load_n"] - 0.5
        # line cut: every tube line, the striker line and three plate lines, each with knots
        assert sum(x["count"] for x in h["lines"]) == len(h["strike_fractions"]) + 4
        assert h["line_to_buy_mm"] >= h["line_total_mm"]
    heaviest = max(p["mass_g"] for p in heavy_pieces) / 1000
    tube_line = next(x for x in heavy["lines"] if x["role"] == "tube")
    assert tube_line["load_n"] == pytest.approx(heaviest * g, rel=1e-3)
    light_line = next(x for x in light["lines"] if x["role"] == "tube")
    assert tube_line["breaking_n"] > light_line["breaking_n"]  # heavier tubes, stronger line


def test_no_second_hang_hole_in_any_chime_packet_or_template(tmp_path, example_packet):
    # the packet's files as ``plan -o`` writes them (cutplan.render.packet.packet_files: the PDF and
    # the SVG templates); for a bundled example, the very files of the run's one ``plan -o`` of it
    # (tests/conftest.py: written and read once per run), for this file's designs made here
    for path in designs(tmp_path):
        if path.parent == EXAMPLES:
            _, out, pages = example_packet(path.stem)
            pdf = (out / "packet.pdf").read_bytes()
            text = "".join(pages)
            svgs = {f"templates/{f.name}": f.read_text(encoding="utf-8") for f in (out / "templates").glob("*.svg")}
        else:
            plan = cutplan.plan(cutplan.load_design(path))
            pdf = render_pdf(plan)
            text = "".join(page_texts(pdf))
            svgs = svg_files(plan)
        assert svgs
        for name, svg in svgs.items():
            assert "hang hole 2" not in svg, name
        assert b"hang hole 2" not in pdf
        assert "hang hole 2" not in text and "lower node (no hole)" in text


def test_a_single_chime_gets_a_real_hole_circle(tmp_path):
    p = tmp_path / "one.toml"
    p.write_text(SMALL.replace('["C6", "E6", "G6"]', '["C6"]'), encoding="utf-8")
    h, _ = next(chime_sets(plan_json(p)))
    assert h["hole_circle_diameter_mm"] > h["striker_diameter_mm"] + h["tube_outer_mm"]
    assert h["tube_gap_mm"] is None


@pytest.mark.parametrize("key, value, words", [
    ("clearance", '"1 mm"', "from 3 mm to 100 mm"),
    ("breeze", '"fast"', "wind speed"),
    ("tube_gap", '"20"', "set[1].hanging.tube_gap"),
])
def test_bad_hanging_option_is_one_line_and_exit_2(tmp_path, key, value, words):
    p = tmp_path / "bad.toml"
    p.write_text(SMALL.replace('section = {', f'hanging = {{ {key} = {value} }}\nsection = {{'), encoding="utf-8")
    result = run("plan", p, "--format", "json")
    assert result.exit_code == 2
    assert words in result.output and "Traceback" not in result.output

"""SVG templates a laser cutter can use: top-level groups ``cut``, ``mark`` and ``text``, one
stroke colour per role, plate hole outlines only on ``cut``; still millimetres at 100 %."""

import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

import cutplan
from cutplan.render import svg as svg_mod
from cutplan.render.marks import hanging_plate

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = sorted((ROOT / "examples").glob("*.toml"))
NS = "{http://www.w3.org/2000/svg}"


def groups(text):
    root = ET.fromstring(text)
    return root, {g.get("id"): g for g in root.findall(f"{NS}g")}


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_every_template_has_cut_mark_and_text_groups_and_nothing_outside(path, example_plan):
    plan = example_plan(path.stem)
    files = svg_mod.svg_files(plan)
    assert files
    for name, text in files.items():
        root, g = groups(text)
        assert {"cut", "mark", "text"} <= set(g), name
        # every drawn element sits inside one of the three groups
        assert [child.tag for child in root if child.tag != f"{NS}defs"] == [f"{NS}g"] * 3, name
        assert len(list(g["cut"])) >= 1 and len(list(g["mark"])) >= 1 and len(list(g["text"])) >= 1, name
        assert not list(g["text"].iter(f"{NS}line")), name


def test_default_role_colours_are_documented_and_configurable():
    # common laser-cutter practice: red cut, blue score/mark, black engrave (documented in svg.py)
    assert svg_mod.COLOURS == {"cut": "#ff0000", "mark": "#0000ff", "text": "#000000"}
    for role in ("cut", "mark", "text"):
        assert f"``{role}``" in svg_mod.__doc__ and svg_mod.COLOURS[role] in svg_mod.__doc__
    plan = cutplan.plan(cutplan.load_design(ROOT / "examples" / "porch-chimes.toml"))
    _root, g = groups(svg_mod.render_plate_svg(plan, plan.sets[0], colours={"cut": "#123456"}))
    assert g["cut"].get("stroke") == "#123456"
    assert g["mark"].get("stroke") == "#0000ff"
    assert g["text"].get("fill") == "#000000"


def test_plate_hole_outlines_are_on_cut_only_and_cross_hairs_on_mark():
    plan = cutplan.plan(cutplan.load_design(ROOT / "examples" / "porch-chimes.toml"))
    s = plan.sets[0]
    plate = hanging_plate(s)
    _root, g = groups(svg_mod.render_plate_svg(plan, s))
    r_hole = plate.hole_mm / 2
    cut_holes = [c for c in g["cut"].iter(f"{NS}circle") if abs(float(c.get("r")) - r_hole) < 1e-9]
    mark_holes = [c for c in g["mark"].iter(f"{NS}circle") if abs(float(c.get("r")) - r_hole) < 1e-9]
    # one per tube, the striker hole, and the three holes the plate hangs by
    assert len(cut_holes) == len(s.pieces) + 1 + 3
    assert mark_holes == []
    assert not list(g["cut"].iter(f"{NS}line"))  # no cross-hair would be cut as a slit
    assert len(list(g["mark"].iter(f"{NS}line"))) >= 2 * len(cut_holes)
    # the outer outline is on cut too, at the plate's diameter
    assert any(abs(float(c.get("r")) - plate.diameter_mm / 2) < 1e-9 for c in g["cut"].iter(f"{NS}circle"))


def test_a_stoppered_tube_template_marks_each_stopper_depth_and_the_open_end(example_plan):
    plan = example_plan("music-room-marimba")
    piece = next(p for p in plan.pieces if p.stopper)
    text = svg_mod.render_piece_svg(plan, piece)
    _root, g = groups(text)
    labels = [t.text for t in g["text"].iter(f"{NS}text")]
    assert "OPEN END 0" in labels
    assert "ut the tube to its cut length, tune with the stopper" in " ".join(labels)
    xs = sorted(round(float(e.get("x1")), 4) for e in g["mark"].iter(f"{NS}line") if e.get("x1") == e.get("x2"))
    for _t, depth in piece.stopper:
        want = svg_mod.MARGIN + depth * 1000
        assert min(abs(x - want) for x in xs) < 0.01
    assert sum(1 for lab in labels if lab.startswith("stopper ")) == len(piece.stopper)

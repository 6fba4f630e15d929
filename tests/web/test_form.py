"""Form fields <-> design keys, and the chart: reshaping only, checked against the design files."""

import xml.etree.ElementTree as ET

import cutplan
from cutplan.web.chart import length_pitch_svg
from cutplan.web.form import form_from_mapping, mapping_from_form
from cutplan.web.view import place_errors, slot_for
from tests.web.conftest import PORCH, ROOT, example_mapping


def test_stock_lines_become_the_design_files_stock_table():
    # the same table garden-conduit-chime.toml writes as lengths = [{ length = "10 ft", count = 3, price = 14.5 }]
    data = mapping_from_form({"stock.lengths": "10 ft x 3 @ 14.5; 6 ft\n2.4 m x 1", "stock.kerf": "1/16 in"})
    assert data["stock"] == {"lengths": [{"length": "10 ft", "count": 3, "price": 14.5}, {"length": "6 ft"},
                                         {"length": "2.4 m", "count": 1}], "kerf": "1/16 in"}
    assert example_mapping(ROOT / "examples" / "garden-conduit-chime.toml")["stock"]["lengths"] == \
        mapping_from_form(form_from_mapping(example_mapping(ROOT / "examples" / "garden-conduit-chime.toml")))[
            "stock"]["lengths"]


def test_fields_of_other_kinds_and_shapes_are_left_out():
    fields = {"set[1].kind": "chime", "set[1].notes": "D5, E5", "set[1].temperature": "20 C",
              "set[1].section.shape": "tube", "set[1].section.outer": "1 in", "set[1].section.wall": "0.065 in",
              "set[1].section.width": "38 mm", "tuning.a4": "442", "set[1].count": "five"}
    (spec,) = mapping_from_form(fields)["set"]
    assert spec == {"kind": "chime", "notes": ["D5", "E5"], "count": "five",  # the design says what is wrong
                    "section": {"shape": "tube", "outer": "1 in", "wall": "0.065 in"}}
    assert mapping_from_form(fields)["tuning"] == {"a4": 442}


def test_error_keys_find_their_field():
    slots = {"form", "stock.lengths", "set[1]", "set[1].section", "set[1].section.wall", "set[1].notes"}
    assert slot_for("stock.lengths[2].count", slots) == "stock.lengths"
    assert slot_for("set[1].section.wall", slots) == "set[1].section.wall"
    assert slot_for("set[1].section.inner", slots) == "set[1].section"
    assert slot_for("set[1].undercut.ratios", slots) == "set[1]"
    assert slot_for("colour", slots) == "form"
    assert place_errors([{"key": "set[3].notes", "message": "m"}], slots) == {"form": ["m"]}


def test_chart_has_a_point_per_piece_and_no_colour_per_note():
    plan = cutplan.plan(cutplan.load_design(PORCH))
    svg = length_pitch_svg(plan, "in")
    root = ET.fromstring(svg)
    ns = "{http://www.w3.org/2000/svg}"
    assert len(root.findall(f".//{ns}g[@class='pt']")) == len(plan.pieces) == 5
    assert "finished length [in]" in svg
    assert "fill=" not in svg and "stroke=\"#" not in svg  # ink comes from the page's one style

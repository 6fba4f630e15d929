"""Classroom kits (copies = N) and cautions by material class: one stock layout, one shopping
list with totals and costs, templates once, natural sort; supervision notes for a classroom."""

import json

import pytest
from click.testing import CliRunner

import cutplan
from cutplan.cli import cli
from cutplan.layout.kits import natural_key
from tests.pdf_text import page_texts

KITS = """
title = "Classroom chime kits"
units = "mm"
paper = "a4"
classroom = true
copies = 12

[[set]]
name = "chime"
kind = "chime"
notes = ["C5", "D5", "E5", "G5", "A5"]
material = "aluminum-6063-t5"
section = { stock = "al-0.750x0.049" }

[stock]
lengths = [{ length = "8 ft", price = 12.5 }]
kerf = "1/16 in"
end_trim = "1/8 in"
allowance = "3 mm"
"""


@pytest.fixture(scope="module")
def kits(tmp_path_factory):
    path = tmp_path_factory.mktemp("kits") / "kits.toml"
    path.write_text(KITS, encoding="utf-8")
    return path


def test_natural_sort_counts_numbers_by_value():
    labels = ["kit10-a-1", "kit2-a-1", "kit1-a-1", "kit11-a-1", "kit12-a-1"]
    assert sorted(labels, key=natural_key) == ["kit1-a-1", "kit2-a-1", "kit10-a-1", "kit11-a-1", "kit12-a-1"]


def test_twelve_kits_share_one_layout_and_one_shopping_list(kits, tmp_path):
    plan = cutplan.plan(cutplan.load_design(kits))
    assert plan.copies == 12 and len(plan.pieces) == 5  # the tables show one kit
    cuts = [c.label for s in plan.cut_list.sticks for c in s.cuts]
    assert len(cuts) == 60 and len(set(cuts)) == 60
    # every piece of every kit is cut once, and equal pieces are laid out in natural order
    for piece in plan.pieces:
        mine = [c for c in cuts if c.endswith("-" + piece.label)]
        assert len(mine) == 12
    for stick in plan.cut_list.sticks:
        same = {}
        for c in stick.cuts:
            same.setdefault(round(c.length, 9), []).append(c.label)
        for labels in same.values():
            assert labels == sorted(labels, key=natural_key)
    by = {i.what: i for i in plan.shopping}
    assert by["drill bit for the hang holes (common practice)"].count == 1
    assert by["hanging plate for chime"].count == 12
    assert by["striker disc"].count == 12 and by["wind sail"].count == 12
    h = plan.sets[0].hanging
    line = next(i for i in plan.shopping if i.what.startswith("hanging line"))
    assert line.total >= 12 * h.load.line_total
    # cost: the sticks at their price (the stock table's own numbers), in all and per kit
    sticks = len(plan.cut_list.sticks)
    costs = {i.what: i.cost for i in plan.shopping if i.group == "cost"}
    assert costs["stock, priced from the stock table"] == pytest.approx(12.5 * sticks)
    assert costs["stock per kit"] == pytest.approx(12.5 * sticks / 12)
    # one packet: templates once, the shopping list with the costs
    out = tmp_path / "out"
    result = CliRunner().invoke(cli, ["plan", str(kits), "-o", str(out)])
    assert result.exit_code == 0, result.output
    svgs = sorted(p.name for p in (out / "templates").glob("*.svg"))
    assert svgs == ["chime-1.svg", "chime-2.svg", "chime-3.svg", "chime-4.svg", "chime-5.svg",
                    "chime-plate.svg", "chime-wrap.svg"]
    assert "make 12" in (out / "templates" / "chime-1.svg").read_text(encoding="utf-8")
    pages = page_texts(out / "packet.pdf")
    assert len(pages) < 20
    text = "\n".join(pages)
    assert "stock per kit" in text and "make 12" in text and "one drill bit serves every kit" in text
    data = json.loads((out / "plan.json").read_text(encoding="utf-8"))
    assert len(data["stock"]["sticks"]) == sticks


def test_classroom_gets_supervision_notes_and_others_do_not(kits):
    with_class = [c.text for c in cutplan.plan(cutplan.load_design(kits)).cautions]
    plain = cutplan.plan(cutplan.design_from_mapping(
        {"set": [{"kind": "chime", "notes": ["C5"], "material": "aluminum-6063-t5",
                  "section": {"stock": "al-0.750x0.049"}}]}))
    assert any(t.startswith("Classroom:") for t in with_class)
    assert not any(t.startswith("Classroom:") for t in (c.text for c in plain.cautions))


def _cautions(material, section=None):
    d = cutplan.design_from_mapping({"set": [{"kind": "chime", "notes": ["C6"], "material": material,
                                              "section": section or {"shape": "rod", "diameter": "16 mm"}}]})
    return cutplan.plan(d).cautions


@pytest.mark.parametrize("material, section, word", [
    ({"modulus": "72 GPa", "density": "2520 kg/m3", "poisson": 0.22, "class": "glass"}, None, "Glass:"),
    ({"modulus": "12 GPa", "density": "700 kg/m3", "class": "wood"}, None, "Wood dust"),
    ({"modulus": "3 GPa", "density": "1190 kg/m3", "class": "plastic"}, None, "Plastics:"),
    ("acrylic", None, "Acrylic:"),
    ("steel-emt", {"stock": "emt-3/4"}, "zinc"),
])
def test_cautions_follow_the_material_class_inline_materials_included(material, section, word):
    cautions = _cautions(material, section)
    hit = [c for c in cautions if word in c.text]
    assert hit, [c.text for c in cautions]
    assert hit[0].kind  # every caution keeps where it comes from
    assert "local building codes" in cautions[-1].text  # and the deferral to local codes


def test_bad_copies_is_one_line_and_exit_2(tmp_path):
    p = tmp_path / "bad.toml"
    p.write_text(KITS.replace("copies = 12", "copies = 0"), encoding="utf-8")
    result = CliRunner().invoke(cli, ["plan", str(p), "--format", "json"])
    assert result.exit_code == 2 and "copies" in result.output and "Traceback" not in result.output
